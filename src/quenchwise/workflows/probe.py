"""Quenchant figures for the command line: a probe record fitted into a quenchant curve (options
checked, fit, fit table, summary), and the severity rows of the `quenchants` list."""

from __future__ import annotations

import csv
import io
import re
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError
from ..formatting import rounded

PROBE_NOTE = ("probe: ISO 9950 type probe (12.5 mm alloy 600, from 850 C, centre), 1-D model (thermal/probe.py): "
              "max cooling rate K/s at centre temperature C, rate at 300 C, times to 600/400/200 C")


def file_stem(name: str) -> str:
    """A file-name-safe version of a curve name.

    >>> file_stem("oil 60 C / still")
    'oil_60_C_still'
    """
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", name).strip("._") or "quenchant"


def severity_row(q, s, figures: dict | None = None) -> dict:
    """One quenchant's row of the `quenchants` list: its data, equivalent severity and probe figures."""
    row = {"name": q.name, "description": q.description, "kind": q.kind, "bath_c": q.bath_c,
           "agitation": q.agitation or None, "flash_point_c": q.flash_point_c, "emissivity": q.emissivity,
           "equivalent_h_per_inch": rounded(s.grossmann_h, 3), "equivalent_htc_w_m2k": rounded(s.htc_w_m2k, 1),
           "centre_800_500_s": rounded(s.time_800_500_s, 2), "severity_note": s.note or None, "source": q.source}
    if figures is not None:
        row["probe"] = {k: rounded(v, 2) for k, v in figures.items()}
    return row


def listed_severity(q):
    """Severity of a built-in curve from its listed H (no solve; centre time not listed)."""
    from ..thermal.quenchants import htc_from_grossmann
    from ..thermal.severity import Severity

    h = q.listed_grossmann_h
    return Severity(q.name, q.bath_c, float("nan"), float(htc_from_grossmann(h)), float(h))


def severity_of(q):
    """The listed severity of a built-in curve, else the computed one."""
    from ..thermal import severity

    return listed_severity(q) if q.listed_grossmann_h is not None else severity.equivalent_severities([q])[0]


def quenchant_detail(q):
    """One curve in full: its severity, its probe cooling curve with the figures (cached ones for
    built-ins), and its listing row."""
    from ..thermal.probe import cooling_curve_figures, probe_cooling

    s = severity_of(q)
    t_probe, c_probe = probe_cooling(q)
    figures = q.listed_probe or cooling_curve_figures(t_probe, c_probe)
    return s, (t_probe, c_probe, figures), severity_row(q, s, figures)


def quenchant_rows(media: list) -> list[dict]:
    """Rows of the `quenchants` list (built-ins list their probe figures and H, computed once in
    thermal/quenchant_model.py; others are computed here)."""
    from ..thermal import severity
    from ..thermal.probe import probe_figures

    todo = [q for q in media if q.listed_grossmann_h is None]
    computed = dict(zip((q.name for q in todo), severity.equivalent_severities(todo))) if todo else {}
    return [severity_row(q, computed.get(q.name) or listed_severity(q), q.listed_probe or probe_figures(q))
            for q in media]


def probe_bath_c(record, bath_c: float | None, curve) -> float:
    """The bath temperature: the option, else the record's '# bath_c:' line; checked."""
    if bath_c is None:
        if "bath_c" not in record.meta:
            raise InputError("--bath-c", "(missing)", "the bath temperature in C (option --bath-c, or a "
                             "'# bath_c: ...' line in the record)")
        try:
            bath_c = float(record.meta["bath_c"])
        except ValueError:
            raise InputError("# bath_c", record.meta["bath_c"], "a number (C)", source=str(curve)) from None
    if not (-20.0 <= bath_c <= 300.0) or bath_c != bath_c:
        raise InputError("--bath-c", bath_c, "a number from -20 to 300 (C)")
    if bath_c > float(record.temperature_c.min()) + 5.0:
        raise InputError("--bath-c", bath_c, f"a bath not above the coolest measured temperature "
                         f"({record.temperature_c.min():g} C)")
    return bath_c


def check_fit_options(future_s: float | None, tc_time_constant: float) -> None:
    if future_s is not None and not (0.05 <= future_s <= 10.0):
        raise InputError("--future-s", future_s, "a number from 0.05 to 10 (s)")
    if not (0.0 <= tc_time_constant <= 2.0):
        raise InputError("--tc-time-constant", tc_time_constant, "a number from 0 to 2 (s)")


@dataclass
class ProbeAnswer:
    quenchant: object        # thermal.quenchants.Quenchant
    fit: object              # thermal.probe fit result
    record: object           # thermal.probe.ProbeCurve
    bath_c: float
    severity: object         # thermal.severity.Severity

    def fit_csv_text(self) -> str:
        """probe_fit.csv: measured and refitted centre, surface temperature, flux and h over time."""
        fit = self.fit
        table = io.StringIO()
        w = csv.writer(table, lineterminator="\n")
        w.writerow(["time_s", "measured_c", "refit_c", "surface_c", "flux_w_m2", "htc_w_m2k"])
        for row in zip(fit.time_s, fit.measured_c, fit.refit_c, fit.surface_c, fit.flux_w_m2, fit.htc_w_m2k):
            w.writerow([f"{row[0]:.4f}", f"{row[1]:.2f}", f"{row[2]:.2f}", f"{row[3]:.2f}", f"{row[4]:.1f}",
                        "" if row[5] != row[5] else f"{row[5]:.1f}"])
        return table.getvalue()

    def summary(self, curve, end_correction: bool) -> dict:
        from ..thermal.severity import DEFINITION

        q, fit, s = self.quenchant, self.fit, self.severity
        return {"name": q.name, "record": str(curve), "samples": int(self.record.time_s.size), "bath_c": self.bath_c,
                "method": "Beck's sequential function specification, 1-D alloy 600 cylinder 12.5 mm",
                "time_step_s": round(fit.dt_s, 6), "future_steps": fit.future_steps,
                "regularization": fit.regularization, "noise_k": rounded(fit.noise_k, 3),
                "refit_rms_k": round(fit.rms_k, 2), "refit_max_k": round(fit.max_k, 2),
                "surface_range_c": [float(q.surface_c[0]), float(q.surface_c[-1])],
                "equivalent_h_per_inch": rounded(s.grossmann_h, 3),
                "tc_time_constant_s": fit.tc_time_constant_s, "end_correction": end_correction,
                "warnings": list(fit.warnings), "severity_definition": DEFINITION}


def fit_probe_record(curve: Path, bath_c: float | None = None, name: str | None = None, future_s: float | None = None,
                     tc_time_constant: float = 0.0, end_correction: bool = True) -> ProbeAnswer:
    """Read a probe record, check the options, fit h(T_surface) and its equivalent severity."""
    from ..thermal import severity
    from ..thermal.probe import fit_probe, read_probe_curve

    record = read_probe_curve(curve)
    bath_c = probe_bath_c(record, bath_c, curve)
    check_fit_options(future_s, tc_time_constant)
    q, fit = fit_probe(record, bath_c, name=name or f"{file_stem(record.name)}_fit", future_s=future_s,
                       end_correction=end_correction, tc_time_constant_s=tc_time_constant)
    [s] = severity.equivalent_severities([q])
    return ProbeAnswer(q, fit, record, bath_c, s)
