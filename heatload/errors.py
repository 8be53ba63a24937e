"""The project's own error type.

Every rejection of user input raises :class:`HeatloadError` naming the field
(a dotted path such as ``phases[3].speed``), and where known the file and the
line, so the command line can print one clear line instead of a traceback.

Numbering: a field path is the TOML path of the value and counts array items
from 0 (``phases[2].speed`` is the third ``[[phases]]`` item, as in
``--vary`` and ``[[uncertainty]]`` paths); where a message names a phase for a
person it counts from 1, like line numbers, and gives its name:
``press.toml:41: phase 3 'press', phases[2].speed: expected ...``.
"""

from __future__ import annotations

import re

#: Array items people know by number and name (path prefix -> word).
_ROWS = {"phases": "phase"}
_ROW = re.compile(r"(phases)\[(\d+)\]")
#: Characters of a name shown in a message.
_NAME_SHOWN = 40


class HeatloadError(ValueError):
    """Invalid input or an impossible request.

    Parameters
    ----------
    message : str
        What is wrong and what was expected.
    field : str, optional
        Field path inside the scenario, e.g. ``"phases[2].speed"``.
    file : str, optional
        File the value came from.
    line : int, optional
        1-based line in that file, where it could be found.
    row_name : str, optional
        Name of the phase the field lies in (``phases[i]...``); when known the
        line names the phase by its 1-based number and this name.
    """

    def __init__(self, message: str, field: str | None = None,
                 file: str | None = None, line: int | None = None,
                 row_name: str | None = None):
        self.message = message
        self.field = field
        self.file = file
        self.line = line
        self.row_name = row_name
        super().__init__(self.one_line())

    def one_line(self) -> str:
        """The error as one line: ``file:line: field: message`` (control
        characters a user's key or value may carry are shown escaped)."""
        where = ""
        if self.file:
            where = f"{self.file}:{self.line}: " if self.line else f"{self.file}: "
        field = f"{self.field}: " if self.field else ""
        row = _ROW.match(self.field or "")
        if row and self.row_name:
            name = self.row_name
            if len(name) > _NAME_SHOWN:
                name = name[:_NAME_SHOWN - 1] + "…"
            field = f"{_ROWS[row.group(1)]} {int(row.group(2)) + 1} '{name}', {field}"
        return printable(f"{where}{field}{self.message}")

    def located(self, file: str | None = None, line: int | None = None,
                field_prefix: str | None = None) -> "HeatloadError":
        """A copy of this error with file, line or a field prefix filled in."""
        field = self.field
        if field_prefix:
            field = f"{field_prefix}.{field}" if field else field_prefix
        return HeatloadError(self.message, field=field,
                             file=file if file is not None else self.file,
                             line=line if line is not None else self.line,
                             row_name=self.row_name)

    def named_from(self, data) -> "HeatloadError":
        """A copy naming the phase of the field, looked up in the
        parsed file *data* (``data["phases"][i]["name"]``); itself if none."""
        row = _ROW.match(self.field or "")
        if not row or self.row_name or not isinstance(data, dict):
            return self
        items = data.get(row.group(1))
        i = int(row.group(2))
        item = items[i] if isinstance(items, list) and i < len(items) else None
        name = item.get("name") if isinstance(item, dict) else None
        if not isinstance(name, str) or not name.strip():
            return self
        return HeatloadError(self.message, field=self.field, file=self.file,
                             line=self.line, row_name=name)


def printable(text: str, keep: str = "", json: bool = False) -> str:
    """*text* with every character a terminal could act on (control and
    format characters, line and paragraph separators) shown escaped as Python
    writes it (``\\x1b``, ``\\u202e``), or with *json* as JSON writes it
    (``\\u001b``: in JSON text such characters stand only inside strings, so
    the result is valid JSON of the same value); characters in *keep* (e.g.
    ``"\\n"``) pass.

    The one escape of user text for a terminal: error lines, and every text
    the command line prints."""
    probe = text
    for ch in keep:
        probe = probe.replace(ch, "")
    if probe.isprintable():             # the usual case, at C speed
        return text
    return "".join(ch if ch.isprintable() or ch in keep
                   else _json_escape(ch) if json
                   else ch.encode("unicode_escape").decode("ascii") for ch in text)


def _json_escape(ch: str) -> str:
    b = ch.encode("utf-16-be")          # astral characters as a surrogate pair
    return "".join(f"\\u{int.from_bytes(b[i:i + 2], 'big'):04x}" for i in range(0, len(b), 2))


def require(condition, message: str, field: str | None = None) -> None:
    """Raise :class:`HeatloadError` unless *condition* holds (not an assert:
    it stays active under ``python -O``)."""
    if not condition:
        raise HeatloadError(message, field=field)
