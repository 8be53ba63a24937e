"""Writing output files: the checks on a target before anything is computed,
the project's one atomic writer, and text cells a spreadsheet cannot run.

Every file heatload writes (the report's HTML, ``--xlsx``, ``--csv``, a
sweep's CSV or Parquet, a saved duty-cycle file) goes through
:func:`write_atomic`: the content is written to a hidden temporary file in the
target's folder (``.<name>.heatload-tmp-<pid>-<n><suffix>``), synced and
moved over the target with :func:`os.replace`, so a reader sees the old file
or the whole new one, never half of one.  The temporary file is removed on
any exception (``finally``); one left behind by a process killed outright
(``kill -9``) is removed by the next write to the same target, once its
process is gone.

:func:`check_output` runs before the computing starts (a report takes
seconds, a sweep minutes): a target that exists and is not a regular file (a
folder, a FIFO, a device such as ``/dev/null``) is refused even with
``--force`` — replacing it would swap a pipe or a device for a plain file, or
cannot work at all — as is a wrong extension and an existing file without
``--force``.

Spreadsheets run a text cell that begins with ``=``, ``+``, ``-``, ``@``, a
tab or a carriage return as a formula (CSV injection).  Names come from the
user's file, so exported text cells are neutralised: in CSV a single quote is
put in front (the usual spreadsheet-safety practice; OWASP, "CSV Injection"),
in xlsx the cell is stored as text with the quote-prefix style (shown without
the quote, never evaluated).  Numbers stay numbers.
"""

from __future__ import annotations

import itertools
import os
import re
import stat
import threading
import time
from pathlib import Path

from heatload.errors import HeatloadError, printable

#: First characters that make a spreadsheet read a text cell as a formula.
FORMULA_LEADS = ("=", "+", "-", "@", "\t", "\r")

#: Marks heatload's temporary files: ``.<name>.heatload-tmp-<pid>-<n><suffix>``.
TEMP_TAG = ".heatload-tmp-"

#: A temporary file this old is stale whatever its process id says [s] (a
#: process id can be reused by an unrelated process; no write takes a day).
STALE_AFTER = 24 * 3600.0

#: Characters of the target's name kept in a temporary name (NAME_MAX is 255).
_NAME_KEEP = 120

_counter = itertools.count()
_active: set = set()
_lock = threading.Lock()

_KINDS = ((stat.S_ISDIR, "a folder"), (stat.S_ISFIFO, "a FIFO (named pipe)"),
          (stat.S_ISCHR, "a character device"), (stat.S_ISBLK, "a block device"),
          (stat.S_ISSOCK, "a socket"))


def _refusal(path, what: str, field: str | None) -> HeatloadError:
    if field:
        return HeatloadError(f"{path} {what}", field=field)
    return HeatloadError(what, file=str(path))


def _special(path: Path):
    """What *path* is when it exists and is not a regular file, else None."""
    try:
        mode = os.stat(path).st_mode
    except FileNotFoundError:
        return None          # absent, or a dangling link (replaced like a file)
    except OSError as e:
        return f"cannot be examined ({e.strerror or e})"
    if stat.S_ISREG(mode):
        return None
    for test, name in _KINDS:
        if test(mode):
            return f"is {name}, not a regular file"
    return "is not a regular file"


def check_output(path, field: str | None = None, *, force: bool = False, suffixes=None,
                 hint: str = "use --force to overwrite it") -> Path:
    """Refuse a target that cannot or must not be written, before any work.

    Parameters
    ----------
    path : str or os.PathLike
        The file to be written.
    field : str, optional
        Option the path came from (``"--xlsx"``), named in the message; without
        it the message starts with the path as a file.
    force : bool
        An existing regular file may be replaced.
    suffixes : sequence of str, optional
        Allowed extensions (lower case, with the dot), e.g. ``(".csv", ".parquet")``.
    hint : str
        How to allow overwriting, said when the file exists.

    Returns
    -------
    Path

    Raises
    ------
    HeatloadError
        A wrong or missing extension; a target that is a folder, FIFO, device
        or socket (even with *force*); an existing file without *force*; a
        parent that is not a folder or cannot be written.
    """
    p = Path(path)
    if str(path).endswith(("/", os.sep)) or p.name in ("", ".", ".."):
        raise _refusal(path, "is a folder name; give a file name", field)
    special = _special(p)
    if special:
        raise _refusal(path, f"{special}; give a file name (--force replaces "
                             f"regular files only)", field)
    if suffixes and p.suffix.lower() not in suffixes:
        got = f"the extension {p.suffix!r}" if p.suffix else "no extension"
        raise _refusal(path, f"has {got}; expected a {' or '.join(suffixes)} file", field)
    if os.path.lexists(p) and not force:
        raise _refusal(path, f"exists; {hint}", field)
    _check_folder(p.parent, path, field)
    return p


def check_output_folder(path, field: str | None = None) -> Path:
    """Refuse a folder target (``--csv DIR``) that exists and is not a folder."""
    p = Path(path)
    try:
        mode = os.stat(p).st_mode
    except FileNotFoundError:
        _check_folder(p.parent, path, field)
        return p
    if not stat.S_ISDIR(mode):
        raise _refusal(path, "exists and is not a folder; give a folder name", field)
    if not os.access(p, os.W_OK | os.X_OK):
        raise _refusal(path, "is a folder that cannot be written in", field)
    return p


def _check_folder(folder: Path, path, field):
    """*folder* must be a writable folder that exists: a missing one is a typing
    slip, never created (only a ``--csv`` folder itself is made, in an existing
    one: :func:`check_output_folder`)."""
    d = folder if str(folder) else Path(".")
    if not os.path.exists(d):
        raise _refusal(path, f"cannot be written: the folder {d} does not exist", field)
    if not os.path.isdir(d):
        raise _refusal(path, f"cannot be written: {d} is not a folder", field)
    if not os.access(d, os.W_OK | os.X_OK):
        raise _refusal(path, f"cannot be written: no permission to write in {d}", field)


def _temp_pattern(target: Path):
    return re.compile(re.escape(f".{target.name[:_NAME_KEEP]}{TEMP_TAG}")
                      + r"(\d+)-(\d+)" + re.escape(target.suffix) + r"\Z")


def _alive(pid: int) -> bool:
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True          # someone else's live process
    except OSError:
        return False
    return True


def remove_stale_temporaries(target) -> list:
    """Remove temporary files of earlier writes to *target* that can no longer
    finish: their process is gone (killed outright), or it is this process and
    no write of it is under way, or they are older than :data:`STALE_AFTER`.

    Returns
    -------
    list of Path
        The files removed.
    """
    target = Path(target)
    folder = target.parent if str(target.parent) else Path(".")
    pattern = _temp_pattern(target)
    removed = []
    try:
        names = os.listdir(folder)
    except OSError:
        return removed
    now = time.time()
    for name in names:
        mt = pattern.match(name)
        if not mt:
            continue
        p = folder / name
        pid = int(mt.group(1))
        with _lock:
            mine_active = str(p) in _active
        try:
            st = os.lstat(p)
        except OSError:
            continue
        if not stat.S_ISREG(st.st_mode) or mine_active:
            continue
        stale = (now - st.st_mtime > STALE_AFTER or pid == os.getpid()
                 or not _alive(pid))
        if stale:
            try:
                os.unlink(p)
                removed.append(p)
            except OSError:
                pass
    return removed


def _new_temporary(target: Path) -> Path:
    folder = target.parent if str(target.parent) else Path(".")
    while True:
        tmp = folder / (f".{target.name[:_NAME_KEEP]}{TEMP_TAG}{os.getpid()}-"
                        f"{next(_counter)}{target.suffix}")
        try:
            # O_EXCL: never reuse or follow anything already there; 0o666 less
            # the umask gives the permissions of any file the user makes.
            fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
        except FileExistsError:
            continue
        os.close(fd)
        with _lock:
            _active.add(str(tmp))
        return tmp


def _sync(path, directory=False):
    try:
        fd = os.open(path, os.O_RDONLY | (getattr(os, "O_DIRECTORY", 0) if directory else 0))
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _place_new(tmp, target, field, hint) -> None:
    """Move the finished *tmp* to *target* only if no file is there: a hard
    link fails where a file appeared while computing (another run's), so it is
    refused, not replaced; where the file system has no hard links, checked
    once more and replaced."""
    try:
        os.link(tmp, target)
    except FileExistsError:
        check_output(target, field, force=False, hint=hint)   # the one-line refusal
        raise
    except OSError:
        check_output(target, field, force=False, hint=hint)
        os.replace(tmp, target)
        return
    os.unlink(tmp)


def write_atomic(target, write, field: str | None = None, *, force: bool = False,
                 hint: str = "use --force to overwrite it") -> Path:
    """Write a file atomically through *write(tmp_path)*.

    *write* is given the path of a fresh empty temporary file beside *target*
    (same folder, so the final :func:`os.replace` is atomic; same extension,
    so writers that choose a format by it choose right) and writes the whole
    content to it.  The folder must exist (a missing one is refused).

    Parameters
    ----------
    target : str or os.PathLike
    write : callable
        ``write(tmp_path: str)``.
    field : str, optional
        Option named in error messages (see :func:`check_output`).
    force : bool
        Replace an existing regular file.  Without it a file that appears
        while *write* runs is not replaced either (refused).
    hint : str
        How to allow overwriting, said when the file exists.

    Returns
    -------
    Path
        The written file.

    Raises
    ------
    HeatloadError
        Everything :func:`check_output` refuses (checked again here: the file
        system may have changed while computing), and an operating-system
        error while writing, as one line.  Any other exception of *write*
        propagates; in every case the temporary file is gone.
    """
    target = Path(target)
    check_output(target, field, force=force, hint=hint)
    folder = target.parent if str(target.parent) else Path(".")
    tmp = None
    try:
        remove_stale_temporaries(target)
        tmp = _new_temporary(target)
        write(str(tmp))
        _sync(tmp)
        if _special(target):    # became a folder or a pipe meanwhile
            check_output(target, field, force=True, hint=hint)
        if force:
            os.replace(tmp, target)
        else:
            _place_new(tmp, target, field, hint)
        tmp_done = tmp
        tmp = None
        with _lock:
            _active.discard(str(tmp_done))
        _sync(folder, directory=True)
    except OSError as e:
        raise _refusal(target, f"cannot be written: {e.strerror or e}", field) from None
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
            except OSError:
                pass
            with _lock:
                _active.discard(str(tmp))
    return target


# ---------------------------------------------------------------------------
# spreadsheet-safe text
# ---------------------------------------------------------------------------

def formula_like(value) -> bool:
    """True for a text value a spreadsheet would run as a formula."""
    return isinstance(value, str) and value.startswith(FORMULA_LEADS)


def csv_text(value):
    """*value* for a CSV cell: text a spreadsheet would run gets a leading
    single quote; everything else (numbers included, negative ones too) is
    returned unchanged."""
    return "'" + value if formula_like(value) else value


def to_csv(frame, path) -> None:
    """Write the DataFrame *frame* to *path* as a spreadsheet-safe CSV: UTF-8,
    text cells through :func:`csv_safe`, rows ended by CR LF as RFC 4180
    has it — with a bare line feed ending rows, Python's csv writer would
    leave a carriage return inside a cell unquoted, and a spreadsheet would
    start a new row (and read a formula) there."""
    safe = csv_safe(frame)
    if len(safe) >= _ARROW_ROWS:
        # a large table through pyarrow's writer (C++): pandas formats each float
        # in Python, about a minute for a 10^6-variant sweep; the same cells (NaN
        # empty, text quoted where needed, CR LF)
        try:
            import pyarrow as pa
            from pyarrow import csv as pa_csv
        except ImportError:
            pa = None
        if pa is not None:
            try:
                # in slices: one slice's copy at a time, not the whole table's
                first = pa.Table.from_pandas(safe.iloc[:_ARROW_ROWS], preserve_index=False)
                with pa_csv.CSVWriter(str(path), first.schema,
                                      write_options=pa_csv.WriteOptions(eol="\r\n")) as w:
                    w.write_table(first)
                    for start in range(_ARROW_ROWS, len(safe), _ARROW_SLICE):
                        w.write_table(pa.Table.from_pandas(
                            safe.iloc[start:start + _ARROW_SLICE], preserve_index=False,
                            schema=first.schema))
                return
            except (TypeError, pa.ArrowException):  # an older pyarrow (no eol), an odd column
                pass
    safe.to_csv(path, index=False, encoding="utf-8", lineterminator="\r\n")


#: From this many rows a CSV is written by pyarrow, in slices of _ARROW_SLICE
_ARROW_ROWS = 10_000
_ARROW_SLICE = 100_000


def csv_safe(frame):
    """A copy of the DataFrame *frame* with every text cell (and column name)
    passed through :func:`csv_text`; numeric columns are not touched (nor
    copied: copy-on-write keeps the caller's frame as it was)."""
    out = frame.copy(deep=False)
    for col in out.columns:
        if out[col].dtype.kind not in "biufcmM":     # text or mixed columns only
            out[col] = out[col].map(csv_text)
    out.columns = [csv_text(c) for c in out.columns]
    return out


#: Characters an xlsx file cannot hold (XML 1.0 forbids them); shown escaped.
_XML_ILLEGAL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f]")


def xlsx_safe(frame):
    """A copy of *frame* whose text cells hold no character an xlsx file
    cannot store (control characters other than tab, line feed and carriage
    return are shown escaped, as :func:`heatload.errors.printable` does)."""
    def fix(v):
        return _XML_ILLEGAL.sub(lambda mt: printable(mt.group()), v) if isinstance(v, str) else v
    out = frame.copy()
    for col in out.columns:
        if out[col].dtype.kind not in "biufcmM":
            out[col] = out[col].map(fix)
    out.columns = [fix(c) for c in out.columns]
    return out


def mark_text_cells(worksheet) -> int:
    """Store every cell of an openpyxl *worksheet* whose text begins like a
    formula as text with the quote-prefix style: openpyxl would otherwise
    write ``=...`` as a formula, and a spreadsheet keeps a quote-prefixed cell
    text even when it is edited.  Returns the number of cells marked."""
    n = 0
    for row in worksheet.iter_rows():
        for cell in row:
            if formula_like(cell.value):
                cell.data_type = "s"      # the value stays the user's text
                cell.quotePrefix = True
                n += 1
    return n
