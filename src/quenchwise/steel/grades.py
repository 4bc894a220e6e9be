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
    """A grade by designation, case-insensitive (e.g. "4140", "52100", "8620H").

    >>> find_grade("4140h").en
    ''
    """
    table = grades()
    found = table.get(str(name).strip().upper())
    if found is None:
        raise InputError(key, name, "one of the built-in grades: " + ", ".join(g.name for g in table.values()))
    return found
