"""Result of one simulated case, its summary, and the HDF5 / CSV writers.

Writers put each file in place atomically (write to a temporary name, then rename), so a
reader never sees half a file.
"""

from __future__ import annotations

import csv
import io
import os
import tempfile
from dataclasses import dataclass, field, replace
from datetime import datetime, timezone
from pathlib import Path

import h5py
import numpy as np

from .formatting import csv_cell, rounded
from .version import __version__
from .hardness.jominy_equivalent import equivalent_jominy_distance_mm
from .hardness.phases import HARDNESS_METHOD
from .kinetics import critical_temperature_note, model_name
from .steel import AusteniteState
from .thermal.solver import CaseHistory

FRACTIONS = ("ferrite", "pearlite", "bainite", "martensite", "austenite")


def surface_first(history: CaseHistory) -> CaseHistory:
    """The solver's history (nodes from the centre line / inner end outward) seen from the outer
    quenched surface inward, as a Result keeps it: every node axis reversed (views, no copies)."""
    return replace(history, radius_m=history.radius_m[::-1], cell_width_m=history.cell_width_m[::-1],
                   volume_weight=history.volume_weight[::-1], temperature_c=history.temperature_c[:, ::-1])


@dataclass
class Result:
    """One simulated case. Every per-node array runs from the outer quenched surface inward, as
    profile.csv does: ``hv``, ``hrc``, ``fractions[...]``, ``cooling_rate_700_c_s``, the tempered
    hardness, ``depth_mm`` (0 first), ``position_mm`` and ``history`` (the solver's CaseHistory seen
    surface first: ``history.radius_m`` and the columns of ``history.temperature_c``; see
    surface_first). The solver's own CaseHistory runs the other way; result.h5 keeps that order."""

    case: object                      # quenchwise.case.Case (not imported: results sits below case)
    state: AusteniteState
    history: CaseHistory              # surface first (surface_first)
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

    def to_dataframe(self):
        """The profile as a pandas DataFrame (optional extra `pandas`): the columns of profile.csv,
        one row per node from the quenched surface inward, full precision."""
        try:
            import pandas as pd
        except ImportError:
            raise ImportError("Result.to_dataframe needs pandas: pip install 'quenchwise[pandas]'") from None
        return pd.DataFrame(profile_columns(self))

    def case_faces(self) -> str:
        return getattr(self.case, "dimensions_mm", {}).get("faces", "both")

    def node_at(self, radius_m: float) -> int:
        """Index of the node nearest a radius [m]; of two equally near, the deeper one."""
        gap = np.abs(self.history.radius_m - radius_m)
        near = np.flatnonzero(gap == gap.min())
        return int(near[np.argmax(self.depth_mm[near])])

    def at(self, values: np.ndarray, radius_m: float) -> float:
        """A node quantity interpolated at a radius [m] (linear between the nodes)."""
        r = self.history.radius_m
        order = np.argsort(r)
        return float(np.interp(radius_m, r[order], np.asarray(values)[order]))

    def summary(self) -> dict:
        """What the engineer reads first: hardness and martensite at surface, half radius, centre."""
        case = self.case
        rows = []
        for label, r in self.points():
            hv = self.at(self.hv, r)
            hrc = self.at(self.hrc, r) if np.isfinite(self.hrc).all() else _nan_aware(self, self.hrc, r)
            rows.append({
                "location": label, "depth_mm": round((self.history.section.outer_m - r) * 1000.0, 3),
                "hrc": rounded(hrc, 1), "hv": rounded(hv, 0),
                "martensite_pct": rounded(100.0 * self.at(self.fractions["martensite"], r), 1),
                "bainite_pct": rounded(100.0 * self.at(self.fractions["bainite"], r), 1),
                "ferrite_pearlite_pct": rounded(100.0 * self.at(self.fractions["ferrite"] + self.fractions["pearlite"], r), 1),
                "retained_austenite_pct": rounded(100.0 * self.at(self.fractions["austenite"], r), 1),
                "cooling_rate_700_c_s": rounded(self.at(self.cooling_rate_700_c_s, r), 3),
                "jominy_distance_mm": rounded(float(equivalent_jominy_distance_mm(self.at(self.cooling_rate_700_c_s, r))), 1),
            })
            rows[-1].update(_other_scales(hv, hrc))
            if self.hv_tempered is not None:
                hv_t = self.at(self.hv_tempered, r)
                hrc_t = _nan_aware(self, self.hrc_tempered, r)
                rows[-1].update({"hrc_tempered": rounded(hrc_t, 1), "hv_tempered": rounded(hv_t, 0)})
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
                      "ms_c": rounded(self.ms_c, 1),
                      "critical_temperatures": critical_temperature_note(case.model)},
            "part": {"shape": self.history.section.shape, **case.dimensions_mm},
            "quench": {"outer": case.outer.name, "bath_c": case.outer.bath_c,
                       "inner": case.inner.name if case.inner else None, "end_c": case.end_c,
                       "equivalent_h_per_inch": self.extra.get("equivalent_h", {}).get("outer"),
                       "equivalent_h_inner_per_inch": self.extra.get("equivalent_h", {}).get("inner")},
            "models": {"kinetics": model_name(case.model), "martensite": case.martensite,
                       "hardness": f"{HARDNESS_METHOD}; ASTM E140 conversion"},
            "time_to_end_s": round(float(self.history.time_s[-1]), 3),
            "steps": self.history.steps,
            "points": rows,
            **{k: self.extra[k] for k in ("temper", "di", "measured_jominy") if k in self.extra},
            "warnings": self.warnings(),
        }

    def warnings(self) -> list[str]:
        case = self.case
        out = list(case.composition.range_warnings(model_name(case.model)))
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
    return {"hrb": rounded(float(hrb_from_hv(hv)), 1), "hb": rounded(float(hb_from_hv(hv)), 0)}


def _nan_aware(result: Result, values: np.ndarray, r: float) -> float:
    ok = np.isfinite(values)
    if not ok.any():
        return float("nan")
    v = result.at(np.where(ok, values, 0.0), r)
    return v if ok[result.node_at(r)] else float("nan")


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


def profile_columns(result: Result) -> dict[str, np.ndarray]:
    """The columns of profile.csv as arrays, one value per node from the quenched surface inward
    (by depth, as the Result's own arrays run)."""
    order = np.argsort(result.depth_mm, kind="stable")
    columns = {"depth_mm": result.depth_mm, "position_mm": result.position_mm,
               **{n: result.fractions[n] for n in result.fraction_names},
               "hv": result.hv, "hrc": result.hrc, "cooling_rate_700_c_s": result.cooling_rate_700_c_s,
               "jominy_distance_mm": result.jominy_distance_mm}
    if result.hv_tempered is not None:
        columns.update(hv_tempered=result.hv_tempered, hrc_tempered=result.hrc_tempered)
    return {name: np.asarray(values)[order] for name, values in columns.items()}


#: profile.csv formats by column (fractions: 5 decimals); empty where a value is NaN
_CSV_FORMATS = {"depth_mm": "{:.4f}", "position_mm": "{:.4f}", "hv": "{:.1f}", "hrc": "{:.1f}",
                "cooling_rate_700_c_s": "{:.5g}", "jominy_distance_mm": "{:.2f}", "hv_tempered": "{:.1f}",
                "hrc_tempered": "{:.1f}"}


def profile_csv_text(result: Result) -> str:
    """profile.csv: one row per node from the quenched surface inward (fixed formatting, so the
    same input gives the same bytes)."""
    columns = profile_columns(result)
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(list(columns))
    formats = [_CSV_FORMATS.get(name, "{:.5f}") for name in columns]
    for row in zip(*columns.values()):
        w.writerow([csv_cell(v, f) for v, f in zip(row, formats)])
    return out.getvalue()


def write_profile_csv(result: Result, path: Path) -> None:
    text = profile_csv_text(result)
    _atomic_write(Path(path), lambda p: p.write_text(text, "utf-8"))


#: Units of the result.h5 datasets (the `units` attribute of each; "1" for fractions and counts).
H5_UNITS = {"time": "s", "node": "1", "time_s": "s", "position_mm": "mm", "depth_mm": "mm", "temperature_c": "degC",
            "hv": "HV", "hrc": "HRC", "hv_tempered": "HV", "hrc_tempered": "HRC", "cooling_rate_700_c_s": "K/s",
            "jominy_distance_mm": "mm", **{name: "1" for name in FRACTIONS + ("cementite",)}}


def write_fields_h5(path: Path, case, time_s, temperature_c, node_ids, by_node: dict, units: dict,
                    long_names: dict, attrs: dict | None = None) -> None:
    """One self-describing result.h5 (atomically): `time_s`, `temperature_c` (n_t x n_nodes) and the
    per-node datasets of by_node, each with a `units` attribute and a `long_name`, the dimension
    scales `time` [s] and `node` (node_ids) attached to their axes, and the case text, its SHA-256,
    the program, version and creation time (plus attrs) as file attributes."""

    def write(p: Path) -> None:
        with h5py.File(p, "w") as f:
            time = f.create_dataset("time", data=time_s)
            node = f.create_dataset("node", data=np.asarray(node_ids, dtype=np.int32))
            time.make_scale("time")
            node.make_scale("node")
            f.create_dataset("time_s", data=time_s).dims[0].attach_scale(time)
            temperature = f.create_dataset("temperature_c", data=temperature_c, compression="gzip")
            temperature.dims[0].attach_scale(time)
            temperature.dims[1].attach_scale(node)
            for name, values in by_node.items():
                f.create_dataset(name, data=np.asarray(values)).dims[0].attach_scale(node)
            for name, ds in f.items():
                ds.attrs["units"] = units[name]
                ds.attrs["long_name"] = long_names.get(name, name.replace("_", " "))
            f.attrs["case"] = case.source_text
            f.attrs["case_sha256"] = case.source_sha256
            f.attrs["program"] = "quenchwise"
            f.attrs["version"] = __version__
            for key, value in (attrs or {}).items():
                f.attrs[key] = value
            f.attrs["created_utc"] = datetime.now(timezone.utc).isoformat(timespec="seconds")
    _atomic_write(Path(path), write)


def write_result_h5(result: Result, path: Path) -> None:
    """result.h5 with the datasets of the contract; case text and program version as attributes.

    Self-describing: every dataset has a `units` attribute (H5_UNITS) and a `long_name`, and two
    HDF5 dimension scales, `time` [s] and `node` (the node index, as stored), are attached to the
    axes of the arrays, so netCDF readers (xarray with the h5netcdf engine) see named dimensions.
    Nodes are stored from the centre line / inner end outward (position_mm rising; DESIGN.md's
    contract), the reverse of the Result's surface-first arrays."""
    order = np.argsort(result.position_mm, kind="stable")
    by_node = {"position_mm": result.position_mm, "depth_mm": result.depth_mm}
    by_node.update({name: result.fractions[name] for name in result.fraction_names})
    by_node.update(hv=result.hv, hrc=result.hrc)
    if result.hv_tempered is not None:
        by_node.update(hv_tempered=result.hv_tempered, hrc_tempered=result.hrc_tempered)
    by_node.update(cooling_rate_700_c_s=result.cooling_rate_700_c_s, jominy_distance_mm=result.jominy_distance_mm)
    temperature = result.history.temperature_c
    write_fields_h5(path, result.case, result.history.time_s, temperature[:, order], np.arange(temperature.shape[1]),
                    {name: np.asarray(values)[order] for name, values in by_node.items()}, H5_UNITS, H5_LONG_NAMES)


H5_LONG_NAMES = {"time": "time from the start of the quench", "node": "mesh node index",
                 "time_s": "time from the start of the quench", "position_mm": "distance from the centre line / mid-plane",
                 "depth_mm": "depth below the quenched outer surface", "temperature_c": "node temperature",
                 "hv": "Vickers hardness as quenched", "hrc": "Rockwell C hardness as quenched (ASTM E140)",
                 "cooling_rate_700_c_s": "cooling rate at 700 C",
                 "jominy_distance_mm": "equivalent end-quench (Jominy) distance"}


def read_result_h5(path: Path) -> dict:
    """Datasets and attributes of a result.h5 as plain numpy arrays and strings."""
    with h5py.File(path, "r") as f:
        data = {k: f[k][()] for k in f.keys() if k not in ("time", "node")}
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
