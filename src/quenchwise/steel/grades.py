"""The built-in grade library (package data grades.toml): nominal chemistry and specification
ranges by SAE/AISI designation (values recalled from the standards: memory)."""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from ..errors import InputError
from .composition import Composition


@dataclass(frozen=True)
class Grade:
    name: str
    family: str
    en: str
    standard: str
    grain_size: float
    austenitize_c: float
    nominal: dict
    range: dict

    def composition(self, **overrides) -> Composition:
        return Composition(**{**self.nominal, **overrides})


@lru_cache(maxsize=1)
def grades() -> dict[str, Grade]:
    text = (resources.files("quenchwise.steel") / "grades.toml").read_text("utf-8")
    out = {}
    for key, g in tomllib.loads(text)["grades"].items():
        out[key.upper()] = Grade(
            name=g["name"], family=g["family"], en=g.get("en", ""), standard=g.get("standard", ""),
            grain_size=float(g["grain_size"]), austenitize_c=float(g["austenitize_c"]),
            nominal={k: float(v) for k, v in g["nominal"].items()},
            range={k: (float(v[0]), float(v[1])) for k, v in g["range"].items()},
        )
    return out


def find_grade(name: str, key: str = "steel.grade") -> Grade:
    """A grade by designation, case-insensitive (e.g. "4140", "52100", "8620H"), or by the EN/DIN
    name the table lists as its counterpart (e.g. "42CrMo4").

    >>> find_grade("4140h").en
    ''
    >>> find_grade("42crmo4").name
    '4140'
    """
    table = grades()
    wanted = str(name).strip().upper()
    found = table.get(wanted)
    if found is None:  # the EN / DIN name the table lists as the counterpart (e.g. 42CrMo4 -> 4140)
        found = next((g for g in table.values() if g.en and g.en.upper() == wanted), None)
    if found is None:
        import difflib

        names = {**{g.name.upper(): g.name for g in table.values()}, **{g.en.upper(): g.en for g in table.values() if g.en}}
        close = difflib.get_close_matches(wanted, names, n=1, cutoff=0.6)
        hint = f"; did you mean {names[close[0]]!r}?" if close else ""
        raise InputError(key, name, "one of the built-in grades: " + ", ".join(g.name for g in table.values())
                         + " (or the EN name `quenchwise steels` lists)" + hint)
    return found
