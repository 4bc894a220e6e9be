"""Result of one simulated case, its summary, and the HDF5 / CSV writers.

Writers put each file in place atomically (write to a temporary name, then rename), so a
reader never sees half a file.
"""

from __future__ import annotations

import csv
import io
import os
import tempfile
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path

import h5py
import numpy as np

from . import __version__
from .hardness.jominy_equivalent import equivalent_jominy_distance_mm
from .hardness.phases import HARDNESS_METHOD
from .kinetics import critical_temperature_note
from .steel import AusteniteState
from .thermal.solver import CaseHistory

FRACTIONS = ("ferrite", "pearlite", "bainite", "martensite", "austenite")


@dataclass
class Result:
    case: object                      # quenchwise.case.Case (not imported: results sits below case)
    state: AusteniteState
    history: CaseHistory
    fractions: dict
    hv: np.ndarray
    hrc: np.ndarray
    cooling_rate_700_c_s: np.ndarray
    ms_c: float
    extra: dict = field(default_factory=dict)
    hv_tempered: np.ndarray | None = None   # after the case's [temper] (None: no temper)
    hrc_tempered: np.ndarray | None = None

    # -- geometry of the nodes ----------------------------------------------------------------
    @property
    def position_mm(self) -> np.ndarray:
        """Node distance from the centre line / mid-plane (tube: from the axis) [mm]."""
        return self.history.radius_m * 1000.0

    @property
    def depth_mm(self) -> np.ndarray:
        """Node depth below the outer quenched surface [mm]."""
        return (self.history.section.outer_m - self.history.radius_m) * 1000.0

    @property
    def jominy_distance_mm(self) -> np.ndarray:
        """Equivalent end-quench distance of each node [mm]: the Jominy distance with the same
        cooling rate at 700 C (hardness.jominy_equivalent); NaN beyond the published curve."""
        return equivalent_jominy_distance_mm(self.cooling_rate_700_c_s)

    @property
    def fraction_names(self) -> tuple[str, ...]:
        hyper = self.state.hypereutectoid or float(np.max(self.fractions.get("cementite", 0.0))) > 0
        return FRACTIONS + (("cementite",) if hyper else ())

    def points(self) -> list[tuple[str, float]]:
        """Named reading positions (label, radius in m): surface, half radius, centre (by shape)."""
        s = self.history.section
        mid = 0.5 * (s.inner_m + s.outer_m)
        if s.shape == "tube":
            inner_label = "bore" if s.inner_quenched else "bore (insulated)"
            return [("outer surface", s.outer_m), ("mid-wall", mid), (inner_label, s.inner_m)]
        if s.shape == "plate" and self.case_faces() == "one":
            return [("quenched face", s.outer_m), ("mid-thickness", mid), ("back face", s.inner_m)]
        half = "quarter thickness" if s.shape == "plate" else "half radius"
        centre = "mid-plane" if s.shape == "plate" else "centre"
        return [("surface", s.outer_m), (half, mid), (centre, s.inner_m)]

    def case_faces(self) -> str:
        return getattr(self.case, "dimensions_mm", {}).get("faces", "both")

    def at(self, values: np.ndarray, radius_m: float) -> float:
        r = self.history.radius_m
        return float(np.interp(radius_m, r, values))

    def summary(self) -> dict:
        """What the engineer reads first: hardness and martensite at surface, half radius, centre."""
        case = self.case
        rows = []
        for label, r in self.points():
            hv = self.at(self.hv, r)
            hrc = self.at(self.hrc, r) if np.isfinite(self.hrc).all() else _nan_aware(self, self.hrc, r)
            rows.append({
                "location": label, "depth_mm": round((self.history.section.outer_m - r) * 1000.0, 3),
                "hrc": _round(hrc, 1), "hv": _round(hv, 0),
                "martensite_pct": _round(100.0 * self.at(self.fractions["martensite"], r), 1),
                "bainite_pct": _round(100.0 * self.at(self.fractions["bainite"], r), 1),
                "ferrite_pearlite_pct": _round(100.0 * self.at(self.fractions["ferrite"] + self.fractions["pearlite"], r), 1),
                "retained_austenite_pct": _round(100.0 * self.at(self.fractions["austenite"], r), 1),
                "cooling_rate_700_c_s": _round(self.at(self.cooling_rate_700_c_s, r), 3),
                "jominy_distance_mm": _round(float(equivalent_jominy_distance_mm(self.at(self.cooling_rate_700_c_s, r))), 1),
            })
            rows[-1].update(_other_scales(hv, hrc))
            if self.hv_tempered is not None:
                hv_t = self.at(self.hv_tempered, r)
                hrc_t = _nan_aware(self, self.hrc_tempered, r)
                rows[-1].update({"hrc_tempered": _round(hrc_t, 1), "hv_tempered": _round(hv_t, 0)})
                rows[-1].update({f"{k}_tempered": v for k, v in _other_scales(hv_t, hrc_t).items()})
        return {
            "title": case.title,
            "program": f"quenchwise {__version__}",
            "steel": {"grade": case.grade, "composition_wt_pct": case.composition.as_dict(),
                      "grain_size": case.grain_size, "austenitize_c": case.austenitize_c,
                      "austenite_carbon_wt_pct": round(self.state.carbon, 4),
                      "undissolved_ferrite": round(self.state.ferrite, 4),
                      "undissolved_carbide": round(self.state.cementite, 4),
                      "ae1_c": round(self.state.ae1, 1), "ae3_c": round(self.state.ae3, 1),
                      "acm_c": round(self.state.acm, 1) if self.state.hypereutectoid else None,
                      "ms_c": _round(self.ms_c, 1),
                      "critical_temperatures": critical_temperature_note(case.model)},
            "part": {"shape": self.history.section.shape, **case.dimensions_mm},
            "quench": {"outer": case.outer.name, "bath_c": case.outer.bath_c,
                       "inner": case.inner.name if case.inner else None, "end_c": case.end_c,
                       "equivalent_h_per_inch": self.extra.get("equivalent_h", {}).get("outer"),
                       "equivalent_h_inner_per_inch": self.extra.get("equivalent_h", {}).get("inner")},
            "models": {"kinetics": case.model, "martensite": case.martensite,
                       "hardness": f"{HARDNESS_METHOD}; ASTM E140 conversion"},
            "time_to_end_s": round(float(self.history.time_s[-1]), 3),
            "steps": self.history.steps,
            "points": rows,
            **{k: self.extra[k] for k in ("temper", "di", "measured_jominy") if k in self.extra},
            "warnings": self.warnings(),
        }

    def warnings(self) -> list[str]:
        case = self.case
        out = list(case.composition.range_warnings(case.model))
        out.extend(self.state.warnings())
        for q in (case.outer, case.inner):
            if q is not None and q.flash_point_c is not None and q.bath_c > q.flash_point_c - FLASH_MARGIN_K:
                out.append(f"{q.name}: bath at {q.bath_c:g} C is within {FLASH_MARGIN_K:g} K of the oil's flash "
                           f"point ({q.flash_point_c:g} C): fire risk")
        out.extend(self.extra.get("warnings", []))
        return out


#: Keep an oil bath at least this far below its flash point (common practice, no source: shops
#: commonly keep about 50-60 C of margin below the open-cup flash point).
FLASH_MARGIN_K = 55.0


def _other_scales(hv: float, hrc: float) -> dict:
    """Where HRC does not apply (below HRC 20), the hardness also in Rockwell B and Brinell when
    those scales cover it (ASTM E140; never extrapolated): {"hrb": .., "hb": ..} or {}."""
    if np.isfinite(hrc) or not np.isfinite(hv):
        return {}
    from .hardness import hb_from_hv, hrb_from_hv
    return {"hrb": _round(float(hrb_from_hv(hv)), 1), "hb": _round(float(hb_from_hv(hv)), 0)}


def _round(v, nd):
    return None if v is None or not np.isfinite(v) else round(float(v), nd)


def _nan_aware(result: Result, values: np.ndarray, r: float) -> float:
    ok = np.isfinite(values)
    if not ok.any():
        return float("nan")
    v = result.at(np.where(ok, values, 0.0), r)
    near = np.argmin(np.abs(result.history.radius_m - r))
    return v if ok[near] else float("nan")


# -- writers --------------------------------------------------------------------------------
def _atomic_write(path: Path, write) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    os.close(fd)
    try:
        write(Path(tmp))
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def profile_csv_text(result: Result) -> str:
    """profile.csv: one row per node from the quenched surface inward (fixed formatting, so the
    same input gives the same bytes)."""
    names = result.fraction_names
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    tempered = result.hv_tempered is not None
    w.writerow(["depth_mm", "position_mm", *names, "hv", "hrc", "cooling_rate_700_c_s", "jominy_distance_mm",
                *(("hv_tempered", "hrc_tempered") if tempered else ())])
    order = np.argsort(result.depth_mm, kind="stable")
    jominy = result.jominy_distance_mm
    for j in order:
        w.writerow([f"{result.depth_mm[j]:.4f}", f"{result.position_mm[j]:.4f}",
                    *(f"{result.fractions[n][j]:.5f}" for n in names),
                    _fmt(result.hv[j], "{:.1f}"), _fmt(result.hrc[j], "{:.1f}"),
                    _fmt(result.cooling_rate_700_c_s[j], "{:.5g}"), _fmt(jominy[j], "{:.2f}"),
                    *((_fmt(result.hv_tempered[j], "{:.1f}"), _fmt(result.hrc_tempered[j], "{:.1f}")) if tempered else ())])
    return out.getvalue()


def _fmt(v, pattern):
    return pattern.format(v) if np.isfinite(v) else ""


def write_profile_csv(result: Result, path: Path) -> None:
    text = profile_csv_text(result)
    _atomic_write(Path(path), lambda p: p.write_text(text, "utf-8"))


def write_result_h5(result: Result, path: Path) -> None:
    """result.h5 with the datasets of the contract; case text and program version as attributes."""
    def write(p: Path) -> None:
        with h5py.File(p, "w") as f:
            f.create_dataset("time_s", data=result.history.time_s)
            f.create_dataset("position_mm", data=result.position_mm)
            f.create_dataset("depth_mm", data=result.depth_mm)
            f.create_dataset("temperature_c", data=result.history.temperature_c, compression="gzip")
            for name in result.fraction_names:
                f.create_dataset(name, data=result.fractions[name])
            f.create_dataset("hv", data=result.hv)
            f.create_dataset("hrc", data=result.hrc)
            if result.hv_tempered is not None:
                f.create_dataset("hv_tempered", data=result.hv_tempered)
                f.create_dataset("hrc_tempered", data=result.hrc_tempered)
            f.create_dataset("cooling_rate_700_c_s", data=result.cooling_rate_700_c_s)
            f.create_dataset("jominy_distance_mm", data=result.jominy_distance_mm)
            f.attrs["case"] = result.case.source_text
            f.attrs["case_sha256"] = result.case.source_sha256
            f.attrs["program"] = "quenchwise"
            f.attrs["version"] = __version__
            f.attrs["created_utc"] = datetime.now(timezone.utc).isoformat(timespec="seconds")
    _atomic_write(Path(path), write)


def read_result_h5(path: Path) -> dict:
    """Datasets and attributes of a result.h5 as plain numpy arrays and strings."""
    with h5py.File(path, "r") as f:
        data = {k: f[k][()] for k in f.keys()}
        data["attrs"] = {k: (v.decode() if isinstance(v, bytes) else v) for k, v in f.attrs.items()}
    return data


def write_table_csv(path: Path, rows: list[dict], columns: list[str] | None = None) -> None:
    """A list of flat dicts as CSV (None and NaN as empty fields), written atomically."""
    columns = columns or list(rows[0].keys())
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(columns)
    for r in rows:
        w.writerow(["" if r.get(c) is None or (isinstance(r.get(c), float) and not np.isfinite(r[c]))
                    else (f"{r[c]:.6g}" if isinstance(r[c], float) else r[c]) for c in columns])
    text = out.getvalue()
    _atomic_write(Path(path), lambda p: p.write_text(text, "utf-8"))
