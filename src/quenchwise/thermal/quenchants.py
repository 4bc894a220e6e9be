"""Quenchants: the surface heat-transfer coefficient as a function of surface temperature.

Built-in curves are package data (quenchants/*.csv); a user curve is a CSV of surface
temperature [C] and h [W/(m2 K)] with a header row. Metadata lines start with '#' and carry
'key: value' pairs (name, kind, bath_c, agitation, flash_point_c, emissivity, source).
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass, field, replace
from importlib import resources
from pathlib import Path

import numpy as np

from ..errors import InputError

#: Conductivity of steel used to convert Grossmann H (1/inch) to h: H = h / (2 k) [W/(m K)].
#: 25 W/(m K) is the conductivity of austenite and of the ferritic products near 700-800 C
#: (thermal.properties tables), where the severity of a quench decides hardening.
GROSSMANN_CONDUCTIVITY_W_MK = 25.0
METRES_PER_INCH = 0.0254
STEFAN_BOLTZMANN = 5.670374419e-8


def htc_from_grossmann(severity_per_inch, conductivity_w_mk=GROSSMANN_CONDUCTIVITY_W_MK):
    """Heat-transfer coefficient [W/(m2 K)] of a Grossmann severity H [1/inch]: h = 2 k H.

    Reference: Grossmann, M.A., Asimow, M., Urban, S.F. (1939), Hardenability of Alloy Steels, ASM.

    >>> round(float(htc_from_grossmann(1.0)), 1)
    1968.5
    """
    return 2.0 * conductivity_w_mk * np.asarray(severity_per_inch, dtype=float) / METRES_PER_INCH


def grossmann_from_htc(htc_w_m2k, conductivity_w_mk=GROSSMANN_CONDUCTIVITY_W_MK):
    """Grossmann severity H [1/inch] of a constant h [W/(m2 K)]: H = h / (2 k).

    >>> round(float(grossmann_from_htc(1968.5)), 3)
    1.0
    """
    return np.asarray(htc_w_m2k, dtype=float) * METRES_PER_INCH / (2.0 * conductivity_w_mk)


def radiation_htc(surface_c, ambient_c, emissivity):
    """Linearized radiation coefficient eps sigma (Ts^2 + Ta^2)(Ts + Ta) [W/(m2 K)], T in K.

    >>> round(float(radiation_htc(850.0, 20.0, 0.8)), 1)
    86.6
    """
    ts = np.asarray(surface_c, dtype=float) + 273.15
    ta = ambient_c + 273.15
    return emissivity * STEFAN_BOLTZMANN * (ts * ts + ta * ta) * (ts + ta)


@dataclass(frozen=True)
class Quenchant:
    """A quench medium at a bath temperature: h(T_surface) table plus optional radiation."""

    name: str
    bath_c: float
    surface_c: np.ndarray = field(repr=False)
    htc_w_m2k: np.ndarray = field(repr=False)
    kind: str = "user"
    agitation: str = ""
    emissivity: float = 0.0
    flash_point_c: float | None = None
    source: str = ""

    def htc(self, surface_c):
        """h at the given surface temperatures [W/(m2 K)], table held constant beyond its ends."""
        h = np.interp(surface_c, self.surface_c, self.htc_w_m2k)
        if self.emissivity > 0:
            h = h + radiation_htc(surface_c, self.bath_c, self.emissivity)
        return h

    def at_bath(self, bath_c: float) -> "Quenchant":
        return replace(self, bath_c=float(bath_c))

    @classmethod
    def constant(cls, htc_w_m2k: float, bath_c: float, name: str | None = None) -> "Quenchant":
        h = float(htc_w_m2k)
        return cls(name or f"constant h {h:g} W/m2K", float(bath_c), np.array([0.0, 2000.0]),
                   np.array([h, h]), kind="constant", source="constant heat-transfer coefficient")


def builtin_names() -> list[str]:
    folder = resources.files("quenchwise.thermal") / "quenchants"
    return sorted(p.name[:-4] for p in folder.iterdir() if p.name.endswith(".csv"))


def _parse(text: str, origin: str, key: str) -> Quenchant:
    meta: dict[str, str] = {}
    rows: list[list[str]] = []
    for line in text.splitlines():
        stripped = line.strip()
        if not stripped:
            continue
        if stripped.startswith("#"):
            body = stripped.lstrip("#").strip()
            if ":" in body:
                k, v = body.split(":", 1)
                meta[k.strip().lower()] = v.strip()
            continue
        rows.append(next(csv.reader(io.StringIO(stripped))))
    allowed = "a CSV with a header row and two columns: surface temperature (C), h (W/m2K)"
    if len(rows) < 3:
        raise InputError(key, origin, allowed + ", at least two data rows")
    values = []
    for row in rows[1:]:
        try:
            t, h = (float(x) for x in row[:2])
        except (ValueError, TypeError):
            raise InputError(key, origin, allowed + f"; row {row!r} is not two numbers") from None
        if not (math.isfinite(t) and math.isfinite(h)) or h < 0 or not -50 <= t <= 1400:
            raise InputError(key, origin, allowed + f"; row {row!r} must have -50 <= T <= 1400 C and h >= 0")
        values.append((t, h))
    arr = np.array(sorted(values))
    if np.any(np.diff(arr[:, 0]) <= 0):
        raise InputError(key, origin, allowed + "; surface temperatures must not repeat")

    def num(name, default):
        try:
            return float(meta[name]) if name in meta else default
        except ValueError:
            raise InputError(f"{key} ({name})", meta[name], "a number") from None

    return Quenchant(
        name=meta.get("name", Path(origin).stem), bath_c=num("bath_c", 20.0), surface_c=arr[:, 0],
        htc_w_m2k=arr[:, 1], kind=meta.get("kind", "user"), agitation=meta.get("agitation", ""),
        emissivity=num("emissivity", 0.0), flash_point_c=num("flash_point_c", None), source=meta.get("source", ""),
    )


def load_quenchant(name_or_path: str, base_dir: Path | None = None, key: str = "quench.medium") -> Quenchant:
    """A built-in curve by name, or a user CSV by path (relative paths from base_dir)."""
    if name_or_path in builtin_names():
        text = (resources.files("quenchwise.thermal") / "quenchants" / f"{name_or_path}.csv").read_text("utf-8")
        return _parse(text, name_or_path, key)
    path = Path(name_or_path)
    if base_dir is not None and not path.is_absolute():
        path = base_dir / path
    if path.suffix.lower() != ".csv" or not path.is_file():
        raise InputError(key, name_or_path, "a built-in quenchant (" + ", ".join(builtin_names())
                         + ") or the path of an existing .csv file")
    try:
        text = path.read_text("utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(key, name_or_path, f"a readable UTF-8 CSV file ({type(exc).__name__})") from None
    return _parse(text, str(path), key)
