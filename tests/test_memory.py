"""The freed-memory setting (heatload._memory): applied once, switchable off,
and doing what it is for -- large temporaries no longer faulted in from the
system on every allocation (glibc's documented mallopt behaviour: blocks under
M_MMAP_THRESHOLD come from the heap; free space above M_TRIM_THRESHOLD at its
top is handed back)."""

import subprocess
import sys
import textwrap

import pytest

from heatload import _memory

glibc = pytest.mark.skipif(not sys.platform.startswith("linux"), reason="glibc settings")

_FAULTS = textwrap.dedent("""
    import resource, sys
    import numpy as np
    from heatload import _memory
    if sys.argv[1] == "keep":
        assert _memory.keep_freed_memory()
    a = np.ones(600_000)
    def step():                   # a solver step: 20 temporaries of 4.8 MB, then freed
        b = [a * 2.0 for _ in range(20)]
        del b
    step()                        # warm up: the first blocks fault in in any case
    f0 = resource.getrusage(resource.RUSAGE_SELF).ru_minflt
    for _ in range(10):
        step()
    print(resource.getrusage(resource.RUSAGE_SELF).ru_minflt - f0)
""")


def _faults(mode):
    out = subprocess.run([sys.executable, "-c", _FAULTS, mode], capture_output=True, text=True,
                         check=True, env={"HEATLOAD_KEEP_MEMORY": "1", "PATH": ""})
    return int(out.stdout.strip())


@glibc
def test_large_temporaries_are_not_faulted_in_again():
    kept, default = _faults("keep"), _faults("default")
    # by default the freed blocks go back to the system and fault in again:
    # ~1,170 pages of 4 KiB per 4.8 MB (fewer with huge pages, still many);
    # kept, the heap's blocks are reused
    assert default >= 200
    assert kept * 10 <= default


def test_applied_once_and_switchable_off(monkeypatch):
    monkeypatch.setattr(_memory, "_state", {"done": False, "kept": False})
    monkeypatch.setenv("HEATLOAD_KEEP_MEMORY", "0")
    assert _memory.keep_freed_memory() is False
    monkeypatch.setenv("HEATLOAD_KEEP_MEMORY", "1")
    assert _memory.keep_freed_memory() is False      # decided once per process


_RELEASE = textwrap.dedent("""
    import numpy as np
    from heatload import _memory

    def rss_mb():
        with open("/proc/self/statm") as f:
            return int(f.read().split()[1]) * 4096 / 2**20

    a = np.ones(600_000)
    with _memory.batch():
        with _memory.batch():                # nested: nothing handed back here
            b = [a * 2.0 for _ in range(40)]  # 190 MB
            del b
        inside = rss_mb()
    after = rss_mb()
    print(inside, after)
""")


@glibc
def test_memory_kept_during_a_batch_and_handed_back_after():
    out = subprocess.run([sys.executable, "-c", _RELEASE], capture_output=True, text=True,
                         check=True, env={"HEATLOAD_KEEP_MEMORY": "1", "PATH": ""})
    inside, after = map(float, out.stdout.split())
    assert inside > after + 150      # the 190 MB of freed arrays kept, then returned


@pytest.mark.parametrize("name,value", [("HEATLOAD_THREADS", "two"), ("HEATLOAD_THREADS", "0"),
                                        ("HEATLOAD_KEEP_MEMORY", "abc")])
def test_a_bad_switch_is_refused_before_any_work(monkeypatch, capsys, name, value):
    from heatload.cli import main

    monkeypatch.setenv(name, value)
    assert main(["compare"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and name in err[0]
