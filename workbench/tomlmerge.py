"""Saving over a hand-written file without losing its comments and layout.

Project files live in git and carry comments.  `merge_text` takes the text
the project was loaded from and the new project data, and changes only what
changed: values that are equal stay as written (with their comments and
number format), changed values are replaced in place, removed keys and
tables go, new ones are appended.  The result is verified by parsing it
back; if it does not give exactly the new data, the caller falls back to
the canonical layout (`tomlwrite.dumps`), so a merge can never save wrong
numbers.
"""

from __future__ import annotations

import difflib
import tomllib

import tomlkit
from tomlkit.items import AoT, Table, InlineTable

from .tomlwrite import INLINE_KEYS


def _is_table_array(value) -> bool:
    return isinstance(value, list) and bool(value) and all(isinstance(x, dict) for x in value)


def _new_item(key, value):
    if isinstance(value, dict):
        if key in INLINE_KEYS:
            item = tomlkit.inline_table()
            item.update(value)
            return item
        table = tomlkit.table()
        _merge(table, value)
        table.add(tomlkit.nl())  # a blank line before whatever follows
        return table
    if _is_table_array(value):
        aot = tomlkit.aot()
        for entry in value:
            aot.append(_new_item(None, entry))
        return aot
    return value


def _merge(container, new: dict) -> None:
    for key in [k for k in container.keys() if k not in new]:
        del container[key]
    for key, value in new.items():
        if key not in container:
            container[key] = _new_item(key, value)
            continue
        old = container[key]
        if isinstance(value, dict) and isinstance(old, (Table, InlineTable, dict)):
            _merge(old, value)
        elif _is_table_array(value) and isinstance(old, AoT):
            _merge_tables(old, value)
        elif _plain(old) != value or type(_plain(old)) is bool and type(value) is not bool:
            _replace(container, key, old, value)


def _replace(container, key, old, value) -> None:
    """`key` set to `value` in place: a whole number stays written as one where the file wrote an
    integer (speed = 60 → 65, not 65.0), and a comment after it keeps its column."""
    if isinstance(value, float) and value.is_integer() and type(_plain(old)) is int:
        value = int(value)
    width = len(old.as_string()) if hasattr(old, "as_string") else None
    container[key] = _new_item(key, value)
    new = container.item(key) if hasattr(container, "item") else None
    trivia = getattr(new, "trivia", None)
    if width is not None and trivia is not None and trivia.comment:
        spare = len(trivia.comment_ws) - (len(new.as_string()) - width)
        trivia.comment_ws = " " * max(1, spare)


def _signature(entry) -> tuple:
    """What makes a table of an array the same one after tables were added or removed before it:
    its name where it has one (an axis, a cam), else its law and end position (a segment)."""
    entry = _plain(entry)
    if "name" in entry:
        return ("name", entry["name"])
    return ("law", entry.get("law"), entry.get("to"))


def _merge_tables(old: AoT, new: list[dict]) -> None:
    """An array of tables edited to hold `new`: each new table merged into the old one it matches
    (so its comments stay with it when a table before it was added or removed), tables that are
    gone removed, new ones inserted where they stand."""
    ops = difflib.SequenceMatcher(None, [_signature(t) for t in old], [_signature(t) for t in new],
                                  autojunk=False).get_opcodes()
    at = 0  # where in `old`, as it is being edited, the next table goes
    for tag, i1, i2, j1, j2 in ops:
        paired = min(i2 - i1, j2 - j1) if tag in ("equal", "replace") else 0
        for k in range(paired):
            _merge(old[at + k], new[j1 + k])
        at += paired
        for _ in range((i2 - i1) - paired):  # old tables with no counterpart: removed
            del old[at]
        for entry in new[j1 + paired:j2]:  # new tables with no counterpart: inserted here
            old.insert(at, _new_item(None, entry))
            at += 1


def _plain(item):
    return item.unwrap() if hasattr(item, "unwrap") else item


def merge_text(original: str, new: dict) -> str | None:
    """`original` edited to hold `new`, or None when that cannot be done exactly."""
    try:
        doc = tomlkit.parse(original)
        _merge(doc, new)
        text = tomlkit.dumps(doc)
        if tomllib.loads(text) == new:
            return text
    except Exception:  # noqa: BLE001 - any failure means: use the canonical layout
        return None
    return None
