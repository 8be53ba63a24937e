"""Measured logs as CSV: a machine's temperature log or pressure trace, read
into SI arrays with every column found by its name and converted by its unit.

Conventions (README, "Measured logs")
-------------------------------------
- One header row; lines starting with ``#`` before it are comments.  Cells are
  separated by commas, or by semicolons (then a decimal comma is accepted,
  ``12,5``), or by tabs.
- A column is found by a word in its name, case-insensitive (``time``,
  ``oil``, ``ambient``, ``running``; ``pressure``, ``flow``, ``position``);
  its unit stands in square brackets: ``time [s]``, ``oil temperature [degC]``,
  ``pump pressure [bar]``.  Any unit of the right kind works (``degF``,
  ``K``, ``min``, ``psi``, ``gpm``, ``in``); ``°C`` and a bare ``C`` or ``F``
  in a temperature column mean degrees Celsius / Fahrenheit.
- The time column holds numbers with a unit, or timestamps
  (``2026-05-04 06:00:00``, ISO 8601) without one; time must increase down
  the file.  Times are returned in seconds from the first row.
- An empty cell in a value column is a gap: its row is left out (counted in
  :attr:`Log.gaps`).  A ``running`` column holds 0 or 1 (machine stopped or
  running), or a fraction of the interval.
- The caller can name a column (``{"oil": "T_tank"}``) and give a unit where
  the header has none (``{"oil": "degF"}``); a given unit overrides the header's.

Every rejection is one :class:`~heatload.errors.HeatloadError` line naming the
file, the line, the column and the expected unit.
"""

from __future__ import annotations

import csv
import io as _io
import math
import re
import warnings
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path

import numpy as np

from heatload.errors import HeatloadError

#: Largest log read [bytes]: a week at one sample per second is about 30 MB.
MAX_LOG_BYTES = 256 * 2 ** 20
#: Most data rows read (a week at one sample per second is 604 800 rows).
MAX_ROWS = 2_000_000

_UNIT = re.compile(r"\[([^\]]*)\]")
#: What a bare logger unit means in a temperature column.
_TEMPERATURE_ALIASES = {"c": "degC", "°c": "degC", "degc": "degC", "f": "degF", "°f": "degF",
                        "degf": "degF", "k": "K"}


@dataclass(frozen=True)
class ColumnSpec:
    """A column a reader looks for."""

    words: tuple          #: name fragments that identify it (any one, case-insensitive)
    kind: str             #: a key of :data:`heatload.units.KINDS`, or "fraction" (0..1, no unit)
    required: bool = True
    example: str = ""     #: an example unit for messages ("degC")


@dataclass
class Log:
    """A log read into SI arrays (one entry per kept row)."""

    source: str                     #: file name
    time: np.ndarray                #: from the first row [s]
    values: dict                    #: key -> SI array (K, Pa, m^3/s, m, or 0..1)
    headers: dict                   #: key -> the column's header as written
    units: dict                     #: key -> the unit used
    lines: np.ndarray               #: file line of each kept row (1-based)
    start: datetime | None = None   #: timestamp of the first row, when time is a timestamp
    gaps: int = 0                   #: rows left out for an empty cell
    notes: list = field(default_factory=list)

    def __len__(self):
        return len(self.time)


def _err(message, source, line=None, column=None):
    return HeatloadError(message, field=f"column {column!r}" if column else None,
                         file=source, line=line)


def _decode(raw: bytes) -> str:
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        # data loggers often write Windows code pages ("°C" as 0xb0)
        text = raw.decode("cp1252", errors="replace")
    return text.removeprefix("\ufeff")


def _delimiter(header_line: str) -> str:
    counts = {d: header_line.count(d) for d in (",", ";", "\t")}
    best = max(counts, key=counts.get)
    return best if counts[best] else ","


def _name_and_unit(header: str):
    mt = _UNIT.search(header)
    unit = mt.group(1).strip() if mt else None
    name = _UNIT.sub("", header).strip().lower()
    return name, unit or None


def _find_columns(headers, specs, chosen, source, header_line):
    """key -> column index: a name given by the caller, else the one header
    containing one of the key's words."""
    found = {}
    names = [_name_and_unit(h)[0] for h in headers]
    for key, spec in specs.items():
        if key in chosen:
            want = chosen[key].strip().lower()
            hits = [i for i, h in enumerate(headers) if h.strip().lower() == want
                    or names[i] == want]
            if not hits:
                raise _err(f"no column called {chosen[key]!r} for {key} (columns: "
                           f"{', '.join(headers)})", source, header_line)
            found[key] = hits[0]
            continue
        hits = [i for i, n in enumerate(names) if any(w in n for w in spec.words)
                and i not in found.values()]
        if len(hits) > 1:
            raise _err(f"{len(hits)} columns could be the {key} column "
                       f"({', '.join(repr(headers[i]) for i in hits)}); name one with "
                       f"--column {key}=NAME", source, header_line)
        if hits:
            found[key] = hits[0]
        elif spec.required:
            what = " or ".join(repr(w) for w in spec.words)
            unit = f" [{spec.example}]" if spec.example else ""
            raise _err(f"no {key} column: expected a header containing {what}, e.g. "
                       f"'{spec.words[0]}{unit}', or name it with --column {key}=NAME "
                       f"(columns: {', '.join(headers) or 'none'})", source, header_line)
    return found


def _affine(unit: str, kind: str, source, line, column, example):
    """(offset, factor) with SI = offset + factor * value for *unit* of *kind*."""
    from heatload.units import KINDS, to_si

    if kind == "temperature":
        unit = _TEMPERATURE_ALIASES.get(unit.strip().lower(), unit)
    try:
        zero = to_si(f"0 {unit}", kind)
        one = to_si(f"1 {unit}", kind)
    except HeatloadError:
        raise _err(f"unknown unit [{unit}] for {KINDS[kind].noun}; expected a unit such as "
                   f"[{example}]", source, line, column) from None
    return zero, one - zero


def _number(cell: str, decimal_comma: bool) -> float:
    text = cell.strip()
    if decimal_comma:
        text = text.replace(",", ".")
    v = float(text)          # ValueError for text that is not a number
    if not math.isfinite(v):
        raise ValueError(cell)
    return v


def _read_clean(body, delim, n_cols, found, specs, conv):
    """key -> SI array of a log whose every row is a full row of finite
    numbers (no gap, blank or comment line, no timestamp), read by numpy's
    reader at once; None where any row needs the row-by-row reader, which then
    finds the line and says what is wrong (so both give the same messages)."""
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")          # "input contained no data"
            table = np.loadtxt(body, delimiter=delim, comments=None, quotechar='"',
                               ndmin=2, dtype=float)
    except ValueError:
        return None
    if table.shape != (len(body), n_cols):
        return None                      # a blank line was skipped: line numbers move
    out = {}
    for key, i in found.items():
        v = table[:, i]
        if not np.all(np.isfinite(v)) or (specs[key].kind == "fraction"
                                          and not np.all((v >= 0.0) & (v <= 1.0))):
            return None
        off, fac, _ = conv[key]
        out[key] = off + fac * v
    return out


def read_log(path, specs: dict, columns: dict | None = None, units: dict | None = None,
             min_rows: int = 2, text: str | None = None) -> Log:
    """Read a CSV log, find the columns of *specs* and convert them to SI.

    Parameters
    ----------
    path : str or os.PathLike
        The CSV file (named in every message).
    specs : dict
        key -> :class:`ColumnSpec`; a ``"time"`` key is required.
    columns : dict, optional
        key -> column name chosen by the user (overrides the search by words).
    units : dict, optional
        key -> unit text (``"degF"``), overrides or completes the header's unit.
    min_rows : int, optional
        Fewest data rows accepted.
    text : str, optional
        The file's content (then *path* is only its name), e.g. an upload.

    Returns
    -------
    Log
        Time in [s] from the first row, values in SI (K, Pa, m^3/s, m; 0..1).

    Raises
    ------
    HeatloadError
        A missing column, a cell that is not a number, an unknown or missing
        unit, too few rows, a time that does not increase, a row with the
        wrong number of cells: one line naming the file, line and column.
    """
    source = str(path)
    columns = dict(columns or {})
    units = dict(units or {})
    for key in list(columns) + list(units):
        if key not in specs:
            raise HeatloadError(f"unknown column key {key!r}; expected one of "
                                f"{', '.join(specs)}", field="--column", file=source)
    if text is None:
        try:
            size = Path(path).stat().st_size
            if size > MAX_LOG_BYTES:
                raise HeatloadError(f"the file is {size:,} bytes; a log is at most "
                                    f"{MAX_LOG_BYTES:,}", file=source)
            text = _decode(Path(path).read_bytes())
        except OSError as e:
            raise HeatloadError(f"cannot read the file: {e.strerror or e}", file=source) \
                from None
    all_lines = text.splitlines()
    first = 0
    while first < len(all_lines) and (not all_lines[first].strip()
                                      or all_lines[first].lstrip().startswith("#")):
        first += 1
    if first == len(all_lines):
        raise HeatloadError("no header row: the file is empty or only comments",
                            file=source)
    header_line = first + 1
    delim = _delimiter(all_lines[first])
    decimal_comma = delim == ";"
    reader = csv.reader(_io.StringIO("\n".join(all_lines[first:])), delimiter=delim)
    headers = [h.strip() for h in next(reader)]
    found = _find_columns(headers, specs, columns, source, header_line)

    conv = {}
    stamps = False
    for key, i in found.items():
        spec = specs[key]
        unit = units.get(key) or _name_and_unit(headers[i])[1]
        col = headers[i]
        if spec.kind == "fraction":
            conv[key] = (0.0, 1.0, "")
            continue
        if unit is None:
            if key == "time":
                stamps = True       # decided on the first row: timestamps need no unit
                conv[key] = None
                continue
            raise _err(f"no unit: write it in square brackets, e.g. "
                       f"'{_name_and_unit(col)[0] or key} [{spec.example}]', or give "
                       f"--unit {key}={spec.example}", source, header_line, col)
        off, fac = _affine(unit, spec.kind, source, header_line, col, spec.example)
        conv[key] = (off, fac, unit)

    n_cols = len(headers)
    rows = {k: [] for k in found}
    lines = []
    gaps = 0
    start = None
    body = all_lines[first + 1:]
    arrays = (None if stamps or decimal_comma or not body or len(body) > MAX_ROWS
              else _read_clean(body, delim, n_cols, found, specs, conv))
    for offset, cells in enumerate(reader if arrays is None else ()):
        line = header_line + 1 + offset
        if not cells or all(not c.strip() for c in cells):
            continue
        if cells[0].lstrip().startswith("#"):
            continue
        if len(cells) != n_cols:
            raise HeatloadError(f"{len(cells)} cells, the header has {n_cols} (separator "
                                f"{delim!r})", file=source, line=line)
        if len(lines) >= MAX_ROWS:
            raise HeatloadError(f"more than {MAX_ROWS:,} data rows; thin the log first "
                                f"(keep every n-th row, or a mean per minute)",
                                file=source, line=line)
        values = {}
        gap = False
        for key, i in found.items():
            cell = cells[i].strip()
            col = headers[i]
            if not cell:
                if key == "time":
                    raise _err("empty time cell", source, line, col)
                gap = True
                continue
            if key == "time" and stamps:
                try:
                    ts = datetime.fromisoformat(cell)
                except ValueError:
                    raise _err(f"{cell!r} is neither a timestamp (2026-05-04 06:00:00) nor "
                               f"a number with a unit in the header (e.g. 'time [s]')",
                               source, line, col) from None
                if start is None:
                    start = ts
                try:
                    values[key] = (ts - start).total_seconds()
                except TypeError:
                    raise _err(f"{cell!r} mixes timestamps with and without a time zone",
                               source, line, col) from None
                continue
            try:
                v = _number(cell, decimal_comma)
            except ValueError:
                unit = conv[key][2] if conv[key] else ""
                raise _err(f"{cell!r} is not a number" + (f" (expected a value in "
                                                          f"[{unit}])" if unit else ""),
                           source, line, col) from None
            off, fac, _ = conv[key]
            if specs[key].kind == "fraction" and not 0.0 <= v <= 1.0:
                raise _err(f"{cell!r}: expected 0 (stopped) .. 1 (running)", source, line, col)
            values[key] = off + fac * v
        if gap:
            gaps += 1
            continue
        for key in found:
            rows[key].append(values[key])
        lines.append(line)

    if arrays is None:
        arrays = {k: np.asarray(v, float) for k, v in rows.items()}
    else:
        lines = list(range(header_line + 1, header_line + 1 + len(body)))
    if len(lines) < min_rows:
        raise HeatloadError(f"{len(lines)} data row{'s' if len(lines) != 1 else ''}; this "
                            f"needs at least {min_rows}", file=source)
    t = arrays.pop("time")
    step = np.diff(t)
    bad = np.nonzero(~(step > 0.0))[0]
    if bad.size:
        k = bad[0] + 1
        col = headers[found["time"]]
        raise _err(f"time does not increase: this row's time is not after the previous "
                   f"row's (line {lines[k - 1]}); sort the log by time", source, lines[k], col)
    for key, arr in arrays.items():
        if specs[key].kind == "temperature" and np.any(arr <= 0.0):
            k = int(np.argmax(arr <= 0.0))
            raise _err("at or below absolute zero: check the unit", source, lines[k],
                       headers[found[key]])
    log = Log(source=source, time=t - t[0], values=arrays,
              headers={k: headers[i] for k, i in found.items()},
              units={k: (c[2] if c else "timestamp") for k, c in conv.items()},
              lines=np.asarray(lines, int), start=start, gaps=gaps)
    if gaps:
        log.notes.append(f"{gaps} row{'s' if gaps != 1 else ''} with an empty cell left out")
    return log


def parse_assignments(items, option: str) -> dict:
    """``["oil=T tank", "time=Zeit"]`` -> ``{"oil": "T tank", "time": "Zeit"}``
    (command-line ``--column`` / ``--unit`` values)."""
    out = {}
    for item in items or ():
        key, sep, value = item.partition("=")
        if not sep or not key.strip() or not value.strip():
            raise HeatloadError(f"expected KEY=VALUE, got {item!r}", field=option)
        out[key.strip().lower()] = value.strip()
    return out
