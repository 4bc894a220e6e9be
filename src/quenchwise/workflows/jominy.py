"""The end-quench (Jominy) test, simulated: hardness along the bar, and the ideal diameter.

Each steel's specimen is solved by thermal.endquench (FiPy) with the phase stepper at every cell,
exactly as a part is solved by workflows.simulate; several steels go in one batch. Readings are
taken every 1/16 in from the quenched end, 0.4 mm below the side (the ground flats of the test).

Model choice: the 1-D axial model (radial_cells = 1, the cross-section lumped) is the default.
Against the references it agrees exactly as well as the 2-D (r, z) model: for 4140H and 8620H the
two differ by at most 0.5 HRC at every reading position from 1/16 to 32/16 in (5 HV), and by 2 %
(4140H) to 11 % (8620H, where ferrite forms near 700 C) in the cooling rate at 700 C
(tests/validation/test_jominy.py), far inside the +/-4 HRC of the band check, while the 2-D model
costs about twice as much. The still-air side loss is small (Biot number about 0.02), so the
radial gradient the 2-D model resolves hardly moves the readings. The (r, z) model
stays selectable (EndQuenchSettings(radial_cells=6), ``jominy --rz``) for studies that need the
radial gradient near the quenched end.

Band files (``--band``): CSV with a header row; the first column is ``distance_mm`` or
``distance_sixteenths``, then ``min_hrc`` and ``max_hrc``; either bound may be left empty (no
bound). Lines starting with '#' are comments.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Callable

import numpy as np

from ..case import Case, load_case
from ..errors import InputError
from ..hardness import hardness_hv, hrb_from_hv, hrc_from_hv
from ..hardness.hardenability import IdealDiameter, a255_ideal_diameter
from ..kinetics import MODELS
from ..measured import csv_rows, numeric_rows
from ..steel import AusteniteState, austenitize
from ..thermal.endquench import (
    SIXTEENTH_M,
    EndQuenchBar,
    EndQuenchHistory,
    EndQuenchSettings,
    EndQuenchSolver,
    end_quench_jet,
    still_air,
)
from .batch import steel_stepper
from .ideal_diameter import physics_ideal_diameters

#: Reading positions: every 1/16 in from 1/16 to 32/16 in (ASTM A255 reads at 1/16 in steps to
#: 16/16 and wider steps beyond, memory; every step is given here).
SIXTEENTHS = np.arange(1, 33)
#: End of the simulated test: the hottest cell below this [C] (the bar then stands at room
#: temperature for the hardness test; martensite is complete to within about 1 %).
END_C = 40.0
#: Room temperature: water of the jet and the air around the specimen [C].
ROOM_C = 20.0
DEFAULT_SETTINGS = EndQuenchSettings(radial_cells=1)
RZ_SETTINGS = EndQuenchSettings(radial_cells=6)


@dataclass(frozen=True)
class BandRow:
    distance_mm: float
    min_hrc: float | None
    max_hrc: float | None


@dataclass
class JominyResult:
    """One simulated end-quench test."""

    case: Case
    state: AusteniteState
    history: EndQuenchHistory
    fractions: dict                 # per cell
    hv_cells: np.ndarray
    rate_cells: np.ndarray
    distance_mm: np.ndarray         # reading positions
    sixteenths: np.ndarray
    hv: np.ndarray
    hrc: np.ndarray
    cooling_rate_700_c_s: np.ndarray
    phases: dict                    # martensite, bainite, ferrite_pearlite, austenite at the readings
    di_a255: IdealDiameter
    di_physics: IdealDiameter | None = None
    settings: EndQuenchSettings = DEFAULT_SETTINGS
    extra: dict = field(default_factory=dict)

    def read(self, cell_values: np.ndarray, distance_mm) -> np.ndarray:
        """A per-cell quantity read at distances from the quenched end [mm] (flat depth)."""
        return self.history.along_bar(cell_values, np.asarray(distance_mm, dtype=float) / 1000.0)

    def hrc_at(self, distance_mm) -> np.ndarray:
        """HRC read at the given distances (NaN below HRC 20)."""
        return hrc_from_hv(self.read(self.hv_cells, distance_mm))

    def band_check(self, band: list[BandRow]) -> list[dict]:
        """Predicted HRC at each band row and whether it lies inside [min, max]."""
        out = []
        for row in band:
            hv = float(np.atleast_1d(self.read(self.hv_cells, [row.distance_mm]))[0])
            hrc = float(hrc_from_hv(hv))
            lo_ok = row.min_hrc is None or (math.isfinite(hrc) and hrc >= row.min_hrc)
            hi_ok = row.max_hrc is None or not math.isfinite(hrc) or hrc <= row.max_hrc
            out.append({"distance_mm": round(row.distance_mm, 3), "min_hrc": row.min_hrc, "max_hrc": row.max_hrc,
                        "hrc": None if not math.isfinite(hrc) else round(hrc, 1), "hv": round(hv, 0),
                        "inside": bool(lo_ok and hi_ok)})
        return out

    def csv_text(self) -> str:
        """jominy.csv: one row per reading position (fixed formatting)."""
        out = io.StringIO()
        w = csv.writer(out, lineterminator="\n")
        w.writerow(["distance_mm", "distance_sixteenths", "hrc", "hv", "cooling_rate_700_c_s", "hrb",
                    "martensite", "bainite", "ferrite_pearlite", "austenite"])
        hrb = hrb_from_hv(self.hv)
        for i in range(self.distance_mm.size):
            w.writerow([f"{self.distance_mm[i]:.3f}", f"{self.sixteenths[i]:g}", _fmt(self.hrc[i], "{:.1f}"),
                        _fmt(self.hv[i], "{:.1f}"), _fmt(self.cooling_rate_700_c_s[i], "{:.4g}"),
                        _fmt(hrb[i] if not np.isfinite(self.hrc[i]) else np.nan, "{:.1f}"),
                        *(f"{self.phases[k][i]:.4f}" for k in ("martensite", "bainite", "ferrite_pearlite", "austenite"))])
        return out.getvalue()

    def summary(self, band: list[BandRow] | None = None) -> dict:
        c = self.case
        rows = [{"sixteenths": int(s), "distance_mm": round(float(d), 2), "hrc": _r(h, 1), "hv": _r(v, 0),
                 "cooling_rate_700_c_s": _r(r, 3), "martensite_pct": _r(100 * m, 1)}
                for s, d, h, v, r, m in zip(self.sixteenths, self.distance_mm, self.hrc, self.hv,
                                            self.cooling_rate_700_c_s, self.phases["martensite"])]
        out = {
            "title": c.title,
            "steel": {"grade": c.grade, "composition_wt_pct": c.composition.as_dict(), "grain_size": c.grain_size,
                      "austenitize_c": c.austenitize_c, "ms_c": _r(self.extra.get("ms_c", np.nan), 1)},
            "test": {"specimen": "round bar 25 mm x 100 mm, water jet on one end, still air elsewhere "
                                 "(ASTM A255 / ISO 642)",
                     "model": "1-D axial" if self.settings.radial_cells == 1 else
                              f"2-D (r, z), {self.settings.radial_cells} radial cells",
                     "jet_htc_w_m2k": float(self.history.extra.get("jet_htc_w_m2k", np.nan)),
                     "jet": "boiling curve of the water jet (thermal/endquench.py JET_BOILING_CURVE); "
                            "jet_htc_w_m2k is its peak",
                     "reading_depth_mm": 0.4, "kinetics": c.model, "martensite": c.martensite,
                     "hardness": "Maynier, Jungmann & Dollet (1978); ASTM E140 conversion",
                     "time_s": round(float(self.history.time_s[-1]), 1), "steps": self.history.steps},
            "di": {"a255": self.di_a255.as_dict(),
                   "physics": self.di_physics.as_dict() if self.di_physics is not None else None},
            "readings": rows,
            "warnings": list(c.composition.range_warnings()) + list(self.di_a255.notes),
        }
        if self.di_physics is not None and c.grain_size != 7.0:
            out["warnings"].append(f"the A255 DI is on a grain size 7 basis; the simulated DI uses this steel's grain "
                                   f"size {c.grain_size:g}, so their ratio is not like for like")
        if self.di_physics is not None:
            out["di"]["physics_over_a255"] = round(self.di_physics.inches / self.di_a255.inches, 3)
        if band is not None:
            checks = self.band_check(band)
            out["band"] = {"rows": checks, "inside": sum(r["inside"] for r in checks), "of": len(checks)}
        return out


def _fmt(v, pattern):
    return pattern.format(v) if np.isfinite(v) else ""


def _r(v, nd):
    return None if v is None or not np.isfinite(v) else round(float(v), nd)


def jominy(cases: list[Case], settings: EndQuenchSettings = DEFAULT_SETTINGS, physics_di: bool = True,
           progress: Callable[[float], None] | None = None) -> list[JominyResult]:
    """Simulate the end-quench test of every case's steel (chemistry, grain size, austenitizing
    temperature, kinetics model); the part and quench of the cases are not used."""
    for c in cases:
        if c.model == "none":
            raise InputError("transform.model", "none", "a kinetics model for the end-quench test (" +
                             ", ".join(MODELS) + ")")
    states = [austenitize(c.composition, c.austenitize_c) for c in cases]
    groups: dict[tuple, list[int]] = {}
    for i, c in enumerate(cases):
        groups.setdefault((c.model, c.martensite), []).append(i)
    results: list[JominyResult | None] = [None] * len(cases)
    share = 0.7 if physics_di else 1.0
    done = 0.0
    jet, air = end_quench_jet(ROOM_C), still_air(ROOM_C)
    for (model, martensite), members in groups.items():
        bars = [EndQuenchBar(cases[i].title or f"steel {i}", cases[i].austenitize_c, jet, air, end_c=END_C)
                for i in members]
        solver = EndQuenchSolver(bars, settings)
        stepper = steel_stepper(cases, states, members, [solver.cells_per_bar] * len(members), solver.initial, model,
                                martensite)
        part = share * len(members) / len(cases)
        report = None
        if progress is not None:
            base = done
            report = lambda f, base=base, part=part: progress(base + part * f)  # noqa: E731
        histories = solver.run(stepper, progress=report)
        done += part
        rate = stepper.cooling_rate_700()
        fr = stepper.fractions()
        for j, (i, h) in enumerate(zip(members, histories)):
            h.extra["jet_htc_w_m2k"] = float(np.max(jet.htc_w_m2k))    # peak of the boiling curve
            sl = slice(solver.starts[j], solver.starts[j] + solver.cells_per_bar)
            fractions = {k: v[sl].copy() for k, v in fr.items()}
            state = states[i]
            hv_cells = hardness_hv(fractions, rate[sl], state.austenite_composition.as_dict(),
                                   undissolved_cementite=state.cementite)
            d_m = SIXTEENTHS * SIXTEENTH_M
            hv = h.along_bar(hv_cells, d_m)
            phases = {
                "martensite": h.along_bar(fractions["martensite"], d_m),
                "bainite": h.along_bar(fractions["bainite"], d_m),
                "ferrite_pearlite": h.along_bar(fractions["ferrite"] + fractions["pearlite"] + fractions["cementite"], d_m),
                "austenite": h.along_bar(fractions["austenite"], d_m),
            }
            results[i] = JominyResult(
                case=cases[i], state=state, history=h, fractions=fractions, hv_cells=hv_cells,
                rate_cells=rate[sl].copy(), distance_mm=d_m * 1000.0, sixteenths=SIXTEENTHS.astype(float),
                hv=hv, hrc=hrc_from_hv(hv), cooling_rate_700_c_s=h.along_bar(rate[sl], d_m), phases=phases,
                di_a255=a255_ideal_diameter(cases[i].composition), settings=settings,
                extra={"ms_c": float(stepper.ms_at_start[sl][0])},
            )
    if physics_di:
        rest = (lambda f: progress(share + (1 - share) * f)) if progress is not None else None
        for r, di in zip(results, physics_ideal_diameters(cases, rest)):
            r.di_physics = di
    return results  # type: ignore[return-value]


# -- inputs -----------------------------------------------------------------------------------
#: Stand-ins for a steel-only case file: the end-quench test fixes its own specimen and quench.
_STAND_IN = {"part": {"shape": "bar", "diameter_mm": 25.0},
             "quench": {"htc_w_m2k": 3.0e4, "bath_c": ROOM_C, "end_c": END_C}}


def load_steel_case(path: str | Path) -> Case:
    """A case file for the end-quench test: [steel] (and [transform]) are used; [part] and
    [quench] may be left out (they are ignored: the test fixes the specimen and the jet)."""
    return load_case(path, defaults=_STAND_IN)


def read_band(path: str | Path) -> list[BandRow]:
    """Read a band CSV (module docstring); errors name the file, the row and what is allowed."""
    key = "--band"
    allowed = ("a CSV with a header row distance_mm (or distance_sixteenths), min_hrc, max_hrc and at least "
               "one row; bounds may be empty")
    rows = csv_rows(path, key)
    if len(rows) < 2:
        raise InputError(key, str(path), allowed)
    header = [h.strip().lower() for h in rows[0]]
    if len(header) < 3 or header[0] not in ("distance_mm", "distance_sixteenths") or header[1:3] != ["min_hrc", "max_hrc"]:
        raise InputError(key, str(path), allowed + f"; header is {','.join(header)}")
    scale = 1.0 if header[0] == "distance_mm" else SIXTEENTH_M * 1000.0
    out = []
    for row, d, lo, hi in numeric_rows(rows[1:], key, path, allowed, scale):
        if not (0.0 < d <= 100.0) or (lo is not None and not 0 <= lo <= 70) or (hi is not None and not 0 <= hi <= 70) \
                or (lo is not None and hi is not None and lo > hi) or (lo is None and hi is None):
            raise InputError(key, str(path), allowed + f"; row {row!r} needs 0 < distance <= 100 mm and "
                                                       "0 <= min <= max <= 70 HRC (at least one bound)")
        out.append(BandRow(d, lo, hi))
    return out


def with_austenitize(case: Case, austenitize_c: float) -> Case:
    """The same steel austenitized at another temperature (validated like the case file key)."""
    austenitize(case.composition, austenitize_c)
    return replace(case, austenitize_c=float(austenitize_c))
