"""Quenchants: the surface heat-transfer coefficient as a function of surface temperature.

Curve format (built-in and user curves alike): a CSV of surface temperature [C] and h [W/(m2 K)]
with the header row `surface_c,htc_w_m2k`, preceded by optional metadata lines '# key: value'
(name, description, kind, bath_c, agitation, flash_point_c, emissivity, source; other keys are
kept as comments). h is interpolated linearly in the table and held constant beyond its ends;
with emissivity > 0 the program adds radiation to the bath/surroundings temperature. A probe
fit (thermal.probe) writes this same format, so `run` accepts it by path.

Built-in library (package data, quenchants/*.csv; `quenchwise quenchants` lists them):
water at 20, 40 and 70 C; brine (10 % NaCl) at 20 C; conventional and fast quench oils at 60 C;
a hot (marquench) oil at 160 C; polymer (PAG-type) solutions of 10, 20 and 30 % at 40 C, each
still, moderate and strong; still air and forced gas. The liquid curves are presets of the
three-stage quenchant model (thermal/quenchant_model.py: vapour blanket, boiling peak,
convection; continuous in bath temperature, agitation velocity and polymer concentration), whose
parameters were set to published ISO 9950 / ASTM D6200 / D6482-type probe figures
(quenchant_data/probe_targets.csv). They are not measurements of a particular bath, and their
source lines say so. Each built-in file caches its probe figures ('# probe_<figure>:') and its
equivalent Grossmann H ('# equivalent_h:'), derived from the curve (thermal.probe,
thermal.severity) and recomputed by tests; H was not a target.

Agitation: the model changes the shape, not only the level: flow breaks the vapour blanket earlier
(at a higher surface temperature), raises convection and the film stage more than the boiling
peak. One multiplier on h(T) cannot move the end of the vapour stage, and a measured probe curve
(the thing users bring) is a whole curve per agitation anyway.

Oils carry a flash point (illustrative values; use the data sheet of your oil): results warn
when the bath comes within results.FLASH_MARGIN_K of it.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass, field, replace
from importlib import resources
from pathlib import Path

import numpy as np

from ..csvmeta import read_commented_csv
from ..errors import InputError

#: Conductivity of steel used to convert Grossmann H (1/inch) to h: H = h / (2 k) [W/(m K)].
#: 25 W/(m K) is the conductivity of austenite and of the ferritic products near 700-800 C
#: (thermal.properties tables), where the severity of a quench decides hardening.
GROSSMANN_CONDUCTIVITY_W_MK = 25.0
METRES_PER_INCH = 0.0254
STEFAN_BOLTZMANN = 5.670374419e-8
#: Largest h accepted in a curve [W/(m2 K)] (the same bound as [quench] htc_w_m2k).
MAX_HTC_W_M2K = 1.0e6


def htc_from_grossmann(severity_per_inch, conductivity_w_mk=GROSSMANN_CONDUCTIVITY_W_MK):
    """Heat-transfer coefficient [W/(m2 K)] of a Grossmann severity H [1/inch]: h = 2 k H.

    Reference: Grossmann, M.A., Asimow, M., Urban, S.F. (1939), Hardenability of Alloy Steels, ASM.

    Valid for H from about 0.2 (still oil) to 5 (violently agitated brine) 1/in, the range of
    Grossmann's table (memory); any H > 0 is converted.

    Parameters
    ----------
    severity_per_inch : float or array_like
        Grossmann severity H [1/in].
    conductivity_w_mk : float or array_like
        Steel conductivity k [W/(m K)].

    Returns
    -------
    float or numpy.ndarray
        Heat-transfer coefficient h = 2 k H [W/(m2 K)].

    >>> round(float(htc_from_grossmann(1.0)), 1)
    1968.5
    """
    return 2.0 * conductivity_w_mk * np.asarray(severity_per_inch, dtype=float) / METRES_PER_INCH


def grossmann_from_htc(htc_w_m2k, conductivity_w_mk=GROSSMANN_CONDUCTIVITY_W_MK):
    """Grossmann severity H [1/inch] of a constant h [W/(m2 K)]: H = h / (2 k).

    The inverse of htc_from_grossmann; the same range.

    Parameters
    ----------
    htc_w_m2k : float or array_like
        Heat-transfer coefficient h [W/(m2 K)].
    conductivity_w_mk : float or array_like
        Steel conductivity k [W/(m K)].

    Returns
    -------
    float or numpy.ndarray
        Grossmann severity H = h / (2 k) [1/in].

    >>> round(float(grossmann_from_htc(1968.5)), 3)
    1.0
    """
    return np.asarray(htc_w_m2k, dtype=float) * METRES_PER_INCH / (2.0 * conductivity_w_mk)


def radiation_htc(surface_c, ambient_c, emissivity):
    """Linearized radiation coefficient eps sigma (Ts^2 + Ta^2)(Ts + Ta) [W/(m2 K)], T in K.

    Grey-body exchange with large surroundings (Stefan-Boltzmann law, any heat-transfer textbook);
    valid where the surroundings are much larger than the part.

    Parameters
    ----------
    surface_c : float or array_like
        Surface temperature [C].
    ambient_c : float or array_like
        Temperature of the surroundings [C].
    emissivity : float or array_like
        Emissivity of the surface [-], 0-1.

    Returns
    -------
    float or numpy.ndarray
        Linearized radiation coefficient [W/(m2 K)].

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
    description: str = ""
    #: Equivalent Grossmann H [1/inch] listed with a built-in curve at its own bath (the
    #: '# equivalent_h:' line; tests/validation/test_quench_severity.py recomputes every one), so a
    #: run need not solve the severity sweep again. None for user curves and other baths.
    listed_grossmann_h: float | None = None
    #: ISO 9950 probe figures listed with a built-in curve at its own bath ('# probe_<figure>:'
    #: lines, thermal.probe.FIGURE_NAMES; tests/thermal/test_quenchant_model.py recomputes them).
    listed_probe: dict | None = None

    def htc(self, surface_c):
        """h at the given surface temperatures [W/(m2 K)], table held constant beyond its ends."""
        h = np.interp(surface_c, self.surface_c, self.htc_w_m2k)
        if self.emissivity > 0:
            h = h + radiation_htc(surface_c, self.bath_c, self.emissivity)
        return h

    def at_bath(self, bath_c: float) -> "Quenchant":
        """The same curve in a bath at another temperature (its listed H holds only at its own bath)."""
        same = float(bath_c) == self.bath_c
        return replace(self, bath_c=float(bath_c), listed_grossmann_h=self.listed_grossmann_h if same else None,
                       listed_probe=self.listed_probe if same else None)

    @classmethod
    def constant(cls, htc_w_m2k: float, bath_c: float, name: str | None = None) -> "Quenchant":
        h = float(htc_w_m2k)
        return cls(name or f"constant h {h:g} W/m2K", float(bath_c), np.array([0.0, 2000.0]),
                   np.array([h, h]), kind="constant", source="constant heat-transfer coefficient")


def builtin_names() -> list[str]:
    folder = resources.files("quenchwise.thermal") / "quenchants"
    return sorted(p.name[:-4] for p in folder.iterdir() if p.name.endswith(".csv"))


def _parse(text: str, origin: str, key: str) -> Quenchant:
    meta, rows = read_commented_csv(text)
    allowed = "a CSV with a header row and two columns: surface temperature (C), h (W/m2K)"
    if len(rows) < 3:
        raise InputError(key, origin, allowed + ", at least two data rows")
    if _numbers(rows[0]):
        raise InputError(key, origin, allowed + f"; the first row {rows[0]!r} is data, the header row "
                         "(surface_c,htc_w_m2k) is missing")
    values = []
    for row in rows[1:]:
        try:
            t, h = (float(x) for x in row[:2])
        except (ValueError, TypeError):
            raise InputError(key, origin, allowed + f"; row {row!r} is not two numbers") from None
        if not (math.isfinite(t) and math.isfinite(h)) or not 0 <= h <= MAX_HTC_W_M2K or not -50 <= t <= 1400:
            raise InputError(key, origin, allowed + f"; row {row!r} must have -50 <= T <= 1400 C and "
                             f"0 <= h <= {MAX_HTC_W_M2K:g} W/m2K")
        values.append((t, h))
    arr = np.array(sorted(values))
    if np.any(np.diff(arr[:, 0]) <= 0):
        raise InputError(key, origin, allowed + "; surface temperatures must not repeat")

    if np.max(arr[:, 1]) <= 0:
        raise InputError(key, origin, allowed + "; h must be above zero somewhere")

    def num(name, default, lo, hi):
        if name not in meta:
            return default
        try:
            v = float(meta[name])
        except ValueError:
            v = math.nan
        if not (math.isfinite(v) and lo <= v <= hi):
            raise InputError(f"{key} (# {name})", meta[name], f"a number from {lo:g} to {hi:g}") from None
        return v

    return Quenchant(
        name=meta.get("name", Path(origin).stem), bath_c=num("bath_c", 20.0, -20.0, 300.0), surface_c=arr[:, 0],
        htc_w_m2k=arr[:, 1], kind=meta.get("kind", "user"), agitation=meta.get("agitation", ""),
        emissivity=num("emissivity", 0.0, 0.0, 1.0), flash_point_c=num("flash_point_c", None, 0.0, 600.0),
        source=meta.get("source", ""), description=meta.get("description", ""),
    )


def _numbers(row: list[str]) -> bool:
    try:
        [float(x) for x in row[:2]]
    except ValueError:
        return False
    return len(row) >= 2


def quenchant_csv_text(q: Quenchant) -> str:
    """The curve in the CSV format that load_quenchant reads (metadata lines, header, rows).

    >>> print(quenchant_csv_text(Quenchant.constant(500.0, 40.0, name="c")).splitlines()[-1])
    2000,500
    """
    lines = [f"# name: {q.name}"]
    if q.description:
        lines.append(f"# description: {q.description}")
    lines += [f"# kind: {q.kind}", f"# bath_c: {q.bath_c:g}"]
    if q.agitation:
        lines.append(f"# agitation: {q.agitation}")
    if q.flash_point_c is not None:
        lines.append(f"# flash_point_c: {q.flash_point_c:g}")
    if q.emissivity > 0:
        lines.append(f"# emissivity: {q.emissivity:g}")
    if q.source:
        lines.append(f"# source: {' '.join(q.source.split())}")
    lines.append("surface_c,htc_w_m2k")
    lines += [f"{t:.6g},{h:.5g}" for t, h in zip(q.surface_c, q.htc_w_m2k)]
    return "\n".join(lines) + "\n"


def builtin_quenchants() -> list[Quenchant]:
    """Every built-in curve, sorted by name."""
    return [load_quenchant(n) for n in builtin_names()]


def load_quenchant(name_or_path: str, base_dir: Path | None = None, key: str = "quench.medium") -> Quenchant:
    """A built-in curve by name, or a user CSV by path (relative paths from base_dir)."""
    if name_or_path in builtin_names():
        text = (resources.files("quenchwise.thermal") / "quenchants" / f"{name_or_path}.csv").read_text("utf-8")
        curve = _parse(text, name_or_path, key)
        listed = re.search(r"^#\s*equivalent_h:\s*([0-9.]+)", text, re.MULTILINE)
        probe = {m.group(1): float(m.group(2))
                 for m in re.finditer(r"^#\s*probe_(\w+):\s*([-0-9.eE+a-z]+)\s*$", text, re.MULTILINE)}
        return replace(curve, listed_grossmann_h=float(listed.group(1)) if listed else None, listed_probe=probe or None)
    path = Path(name_or_path)
    if base_dir is not None and not path.is_absolute():
        path = base_dir / path
    if path.suffix.lower() != ".csv" or not path.is_file():
        close = difflib.get_close_matches(str(name_or_path), builtin_names(), n=3, cutoff=0.5)
        hint = f"; closest: {', '.join(close)}" if close else ""
        raise InputError(key, name_or_path, f"a built-in quenchant name (`quenchwise quenchants` lists them{hint}) "
                         "or the path of an existing .csv file")
    try:
        text = path.read_text("utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(key, name_or_path, f"a readable UTF-8 CSV file ({type(exc).__name__})") from None
    return _parse(text, str(path), key)
