"""Writing project data as TOML in the layout people write by hand (DESIGN §6).

Sub-tables become ``[a.b]`` headers and arrays of tables ``[[a.b]]`` blocks,
never inline arrays; scalars come first in each table, in the order given.
Tables whose key is in `INLINE_KEYS` (short condition tables such as a
segment's ``start = { velocity = 0.0 }``) are written inline.  Scalar values
are formatted by tomli-w, so quoting and escaping follow the TOML spec.
"""

from __future__ import annotations

import re

import numpy as np
import tomli_w

INLINE_KEYS = {"start", "end", "points"}
_BARE = re.compile(r"^[A-Za-z0-9_-]+$")


def _key(k: str) -> str:
    return k if _BARE.match(k) else tomli_w.dumps({"k": k}).split(" = ", 1)[1].strip()


def _float(v: float) -> str:
    """Shortest exact text of a float; large and small magnitudes as 7.0e5, not 700000.0."""
    text = repr(v)
    if v != 0.0 and (abs(v) >= 1e5 or abs(v) < 1e-4) and "e" not in text:
        mantissa, exponent = np.format_float_scientific(v, unique=True, trim="0").split("e")
        short = f"{mantissa}e{int(exponent)}"
        if float(short) == v:
            return short
    return text


def _value(v) -> str:
    """One TOML value (scalar, array of scalars or inline table)."""
    if isinstance(v, float):
        return _float(v)
    if isinstance(v, list) and not any(isinstance(x, (dict, list)) for x in v):
        return "[" + ", ".join(_value(x) for x in v) + "]"  # short lists stay on one line
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{_key(a)} = {_value(b)}" for a, b in v.items()) + " }"
    return tomli_w.dumps({"k": v}).split(" = ", 1)[1].strip()


def _is_table_array(v) -> bool:
    return isinstance(v, list) and bool(v) and all(isinstance(x, dict) for x in v)


def _inline(k, v) -> bool:
    return isinstance(v, dict) and k in INLINE_KEYS


def _table(data: dict, path: list[str], out: list[str]) -> None:
    for k, v in data.items():
        if _inline(k, v):
            out.append(f"{_key(k)} = {_value(v)}")
        elif not isinstance(v, dict) and not _is_table_array(v):
            out.append(f"{_key(k)} = {_value(v)}")
    for k, v in data.items():
        if _inline(k, v):
            continue
        name = ".".join(_key(p) for p in [*path, k])
        if isinstance(v, dict):
            out.extend(["", f"[{name}]"])
            _table(v, [*path, k], out)
        elif _is_table_array(v):
            for item in v:
                out.extend(["", f"[[{name}]]"])
                _table(item, [*path, k], out)


def dumps(data: dict) -> str:
    """TOML text of `data` (plain dicts, lists and scalars)."""
    out: list[str] = []
    _table(data, [], out)
    return "\n".join(out).lstrip("\n") + "\n"
