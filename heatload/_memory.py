"""Keep freed array memory in the process between the solver's steps.

A solve of many variants makes hundreds of temporary arrays of a few MB each.
With the C library's defaults (glibc), blocks that large are mapped from the
operating system when made and handed back when freed, so every temporary
is faulted in page by page again: measured on the 12-phase press, 153,000 page
faults per coupled sweep of 50,000 variants and about half its time (more on
a virtual machine, where a fault is dearer).  Raising the thresholds below
keeps freed blocks in the process for the next array; the peak memory is the
same (measured: 1,093 MB before, 1,088 MB after, same sweep), only not handed
back until the process ends.

A study of many chunks (a sweep, a Monte Carlo: :func:`batch`) hands the
memory back when it ends (``malloc_trim``): a long-running process (the
dashboard's server, whose threads each keep their own heap) does not hold on
to a Monte Carlo's arrays after it.  A single evaluation keeps it, so that
the next one in the same process does not fault its arrays in again (on
this kind of machine that alone was a third of a 50,000-variant solve).

Only glibc (Linux) has these settings; elsewhere, or with the environment
variable ``HEATLOAD_KEEP_MEMORY=0``, nothing changes.  The figures never
depend on it.
"""

from __future__ import annotations

import contextlib
import ctypes
import ctypes.util
import os
import sys
import threading

from heatload.errors import HeatloadError

#: mallopt() parameters (glibc's malloc.h)
_M_TRIM_THRESHOLD = -1
_M_MMAP_THRESHOLD = -3

#: Blocks up to this size come from the process's heap, not a fresh mapping [B]
MMAP_THRESHOLD = 256 * 2**20
#: Free memory at the heap's top kept rather than handed back [B]
TRIM_THRESHOLD = 2 * 2**30

_state = {"done": False, "kept": False, "libc": None, "depth": 0}
_lock = threading.Lock()


def keep_memory_setting() -> bool:
    """``HEATLOAD_KEEP_MEMORY``: "1" or unset (keep), "0" (the C library's defaults)."""
    given = os.environ.get("HEATLOAD_KEEP_MEMORY", "1").strip() or "1"
    if given not in ("0", "1"):
        raise HeatloadError(f"expected 0 or 1, got {given!r}", field="HEATLOAD_KEEP_MEMORY")
    return given == "1"


def threads_setting() -> int:
    """Worker threads for chunked batches: ``HEATLOAD_THREADS`` (default 1).

    numpy's array loops release the interpreter lock, so two threads can run
    two chunks on two cores; measured on a shared 2-core machine the gain was
    small (a sweep of 10^6 variants 24.5 -> 22.5 s) for a peak memory 17 %
    higher (each chunk's arrays at once), and a Monte Carlo was slower, so
    it is left to the user to ask for.  At most one per core."""
    given = os.environ.get("HEATLOAD_THREADS", "").strip()
    if not given:
        return 1
    if not given.isdigit() or int(given) < 1:
        raise HeatloadError(f"expected a whole number of threads >= 1, got {given!r}",
                            field="HEATLOAD_THREADS")
    # never more than the cores: each thread holds a chunk's arrays
    return min(int(given), os.cpu_count() or 1)


def check_environment() -> None:
    """Refuse a bad ``HEATLOAD_THREADS`` or ``HEATLOAD_KEEP_MEMORY`` up front (the
    command line calls it before any work), by name."""
    keep_memory_setting()
    threads_setting()


def keep_freed_memory() -> bool:
    """Raise glibc's mapping and trim thresholds once per process (see the
    module's text).  Returns whether the settings are in force."""
    if _state["done"]:
        return _state["kept"]
    _state["done"] = True
    if not keep_memory_setting() or not sys.platform.startswith("linux"):
        return False
    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or "libc.so.6")
        mallopt = libc.mallopt
    except (OSError, AttributeError):     # not glibc (musl has no mallopt)
        return False
    mallopt.argtypes, mallopt.restype = (ctypes.c_int, ctypes.c_int), ctypes.c_int
    _state["kept"] = bool(mallopt(_M_MMAP_THRESHOLD, MMAP_THRESHOLD)) and bool(
        mallopt(_M_TRIM_THRESHOLD, TRIM_THRESHOLD))
    _state["libc"] = libc if _state["kept"] else None
    return _state["kept"]


def release() -> None:
    """Hand the free memory of every heap back to the system (glibc's
    ``malloc_trim(0)``); nothing where the settings are not in force."""
    libc = _state["libc"]
    if libc is not None:
        libc.malloc_trim(0)


@contextlib.contextmanager
def batch():
    """A study of many chunks: freed memory kept while it (and any study
    inside it, on any thread) runs, handed back when the outermost one ends."""
    with _lock:
        if _state["depth"] == 0:
            keep_freed_memory()
        _state["depth"] += 1
    try:
        yield
    finally:
        with _lock:
            _state["depth"] -= 1
            last = _state["depth"] == 0
        if last:
            release()
