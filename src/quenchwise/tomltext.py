"""Case-file text (TOML) written from a mapping of tables (the Python API's load_case(mapping))."""

from __future__ import annotations

import json
import math
from collections.abc import Mapping

from .errors import InputError


def toml_text(data: Mapping) -> str:
    """Case-file text (TOML) of a mapping of the case-file tables, so that a case built in Python
    carries a source text and SHA-256 like a file does (tables nested at most two levels).

    >>> print(toml_text({"title": "t", "steel": {"grade": "4140"}, "quench": {"severity_h": 0.5}}))
    title = "t"
    [steel]
    grade = "4140"
    [quench]
    severity_h = 0.5
    <BLANKLINE>
    """
    def value(v, key):
        if isinstance(v, bool):
            return "true" if v else "false"
        if isinstance(v, (int, float)) and not isinstance(v, bool):
            return repr(v) if math.isfinite(v) else ("nan" if v != v else ("inf" if v > 0 else "-inf"))
        if isinstance(v, str):
            return json.dumps(v)
        if isinstance(v, (list, tuple)):
            return "[" + ", ".join(value(x, key) for x in v) + "]"
        raise InputError(key, v, "a number, text, true/false or a list of them")

    def table(name, t, lines):
        if not isinstance(t, Mapping):
            raise InputError(name, t, f"a [{name}] table (a mapping)")
        lines.append(f"[{name}]")
        subs = []
        for k, v in t.items():
            if isinstance(v, Mapping):
                subs.append((f"{name}.{k}", v))
            else:
                lines.append(f"{k} = {value(v, f'{name}.{k}')}")
        for sub_name, sub in subs:
            table(sub_name, sub, lines)

    lines = [f"{k} = {value(v, k)}" for k, v in data.items() if not isinstance(v, Mapping)]
    for k, v in data.items():
        if isinstance(v, Mapping):
            table(k, v, lines)
    return "\n".join(lines) + "\n"
