"""Text rendering of the command summaries: pure functions from a summary (dict) to a string.

Nothing here computes physics or writes files; the command line prints what these return. Units
follow a units.Units (SI by default; ``--units us`` gives inches and Fahrenheit).
"""

from __future__ import annotations

from . import __version__
from .cautions import CAUTION
from .units import Units

#: What the sizing answer means by a constant severity, printed under the sizing answer.
SEVERITY_NOTE = (
    "note: the mildest constant severity is a constant heat-transfer coefficient h = 2 k H over the whole quench. "
    "A real quenchant's h changes with the surface temperature (vapour blanket, boiling, convection), and its "
    "equivalent H matches only the centre's 800-500 C time of a 25 mm bar. So a real curve with an equivalent H "
    "above the mildest constant H can still fail (e.g. weak cooling where the steel transforms), and one below it "
    "can pass. Choose the quenchant from the list solved with the real curves, not from H alone."
)


def fmt(v, pattern: str = "{:.1f}") -> str:
    """A number with the pattern, or '-' for a missing value.

    >>> fmt(None), fmt(3.14159, "{:.2f}")
    ('-', '3.14')
    """
    return "-" if v is None else pattern.format(v)


def yes_no_na(meets, has_requirement: bool) -> str:
    """The 'meets' column: n/a when there is no requirement to meet.

    >>> yes_no_na(False, False), yes_no_na(False, True), yes_no_na(True, True)
    ('n/a', 'no', 'yes')
    """
    if not has_requirement or meets is None:
        return "n/a"
    return "yes" if meets else "no"


def point_scales(p: dict, suffix: str = "") -> tuple[str, str, str, str]:
    """HRC, HV, HRB and HB of a reading (HRB and HB only where HRC does not apply; '-' where a scale
    does not apply).

    >>> point_scales({"hrc": None, "hv": 200.0, "hrb": 91.5, "hb": 190.0})
    ('-', '200', '91.5', '190')
    """
    soft = p.get(f"hrc{suffix}") is None
    return (fmt(p.get(f"hrc{suffix}")), fmt(p.get(f"hv{suffix}"), "{:.0f}"),
            fmt(p.get(f"hrb{suffix}")) if soft else "-", fmt(p.get(f"hb{suffix}"), "{:.0f}") if soft else "-")


def run_summary_text(summary: dict, files: list, units: Units | None = None) -> str:
    """The `run` summary: steel, part, quench, the readings at surface / half radius / centre
    (HRC, HV, and HRB below HRC 20), temper, DI, models, warnings, files, caution."""
    u = units or Units("si")
    s = summary
    steel = s["steel"]
    T = u.fmt_temperature
    chem = ", ".join(f"{k.capitalize()} {v:g}" for k, v in steel["composition_wt_pct"].items() if v > 0)
    dims = ", ".join(f"{k.replace('_mm', '')} {u.fmt_length(v, 3 if u.us else 1)}" if k.endswith("_mm") else f"{k} {v}"
                     for k, v in s["part"].items() if k != "shape")
    lines = [
        f"quenchwise {__version__}  |  {s['title'] or 'untitled case'}",
        f"steel   {steel['grade'] or 'custom'} ({chem} wt%), grain size {steel['grain_size']:g}, "
        f"austenitized at {T(steel['austenitize_c'])}",
        f"        Ae1 {T(steel['ae1_c'])}, Ae3 {T(steel['ae3_c'])}"
        + (f", Acm {T(steel['acm_c'])}" if steel["acm_c"] else "")
        + (f", Ms {T(steel['ms_c'])}" if steel["ms_c"] is not None else "")
        + f"  ({steel['critical_temperatures']})",
        f"part    {s['part']['shape']} {dims}",
        f"quench  {s['quench']['outer']} at {T(s['quench']['bath_c'])}"
        + (f" (equivalent Grossmann H {s['quench']['equivalent_h_per_inch']:.2f} 1/in)"
           if s["quench"].get("equivalent_h_per_inch") is not None else "")
        + (f"; bore: {s['quench']['inner']}" if s["quench"]["inner"] else "")
        + f"; until the hottest point is below {T(s['quench']['end_c'])} ({s['time_to_end_s']:.1f} s, {s['steps']} steps)",
        "",
        f"{'location':<20}{'depth ' + u.length_unit:>9}{'HRC':>7}{'HV':>7}{'HRB':>7}{'HB':>6}{'martensite %':>14}{'bainite %':>11}"
        f"{'ferr+pearl %':>14}{'ret. aust %':>13}{'Jominy ' + u.length_unit:>11}",
    ]
    for p in s["points"]:
        hrc, hv, hrb, hb = point_scales(p)
        depth = u.length(p["depth_mm"])
        lines.append(f"{p['location']:<20}{depth:>9.{3 if u.us else 2}f}{hrc:>7}{hv:>7}{hrb:>7}{hb:>6}"
                     f"{p['martensite_pct']:>14.1f}{p['bainite_pct']:>11.1f}{p['ferrite_pearlite_pct']:>14.1f}"
                     f"{p['retained_austenite_pct']:>13.1f}"
                     f"{fmt(u.length(p.get('jominy_distance_mm')), '{:.2f}' if u.us else '{:.1f}'):>11}")
    if any(p.get("hrc") is None for p in s["points"]):
        lines.append("        HRC does not apply below HRC 20 (ASTM E140): HRB and HB given there, HV everywhere")
    if "temper" in s:
        t = s["temper"]
        lines.append(f"temper  {t['hours']:g} h at {T(t['temperature_c'])}: " + ", ".join(
            f"{p['location']} " + (f"{p['hrc_tempered']:.1f} HRC" if p.get("hrc_tempered") is not None
                                   else f"{fmt(p.get('hrb_tempered'))} HRB") + f" ({fmt(p.get('hv_tempered'), '{:.0f}')} HV)"
            for p in s["points"]) + f"  ({t['method']})")
    if "di" in s:
        lines.append(f"DI      {s['di']['a255']['in']:.2f} in ({s['di']['a255']['mm']:.0f} mm) from composition, "
                     "ASTM A255; the simulated DI: quenchwise jominy")
    if "measured_jominy" in s:
        lines.append(heat_fit_line(s["measured_jominy"]))
    lines.append(f"models  kinetics {s['models']['kinetics']}, martensite {s['models']['martensite']}, "
                 f"hardness {s['models']['hardness']}")
    for w in s["warnings"]:
        lines.append(f"warning {w}")
    lines.append("wrote   " + ", ".join(str(f) for f in files) if files else "wrote   nothing (no --out given)")
    lines.append("")
    lines.append(CAUTION)
    return "\n".join(lines)


def compare_text(title: str, rows: list[dict], requirement: str | None, files: list, best: str | None,
                 limit_from_requirement: bool, units: Units | None = None) -> str:
    """The `compare` table; the 'meets' column reads n/a when the case has no requirement."""
    u = units or Units("si")
    has_req = requirement is not None
    lines = [f"{title or 'case'}: {len(rows)} quenchants, one batch",
             f"{'medium':<30}{'H 1/in':>8}{'surf HRC':>10}{'half HRC':>10}{'ctr HRC':>9}{'ctr M %':>9}"
             f"{'eff. depth ' + u.length_unit:>15}{'meets':>7}  crack risk"]
    for r in rows:
        lines.append(f"{r['medium']:<30}{fmt(r['equivalent_h'], '{:.2f}'):>8}{fmt(r['surface_hrc']):>10}"
                     f"{fmt(r['half_hrc']):>10}{fmt(r['centre_hrc']):>9}{r['centre_martensite_pct']:>9.1f}"
                     f"{u.length(r['effective_depth_mm']):>15.{3 if u.us else 2}f}{yes_no_na(r['meets_requirement'], has_req):>7}  {r['crack_risk']}")
    lines.append(f"effective depth: to {rows[0]['limit_hrc']:g} HRC "
                 + ("(the requirement)" if limit_from_requirement else "(50 % martensite, Hodge & Orehoski)"))
    if has_req:
        lines.append(f"requirement: {requirement}; mildest that meets it: " + (best or "none of these"))
    else:
        lines.append("meets: n/a, the case has no [requirement] (add one, or use `quenchwise size --min-hrc ...`)")
    lines.append("crack risk: common-practice rule on austenite carbon and severity (see workflows/compare.py)")
    lines.append("wrote   " + ", ".join(str(f) for f in files))
    return "\n".join(lines)


def size_text(title: str, d: dict, medium_name: str, files: list, units: Units | None = None) -> str:
    """The `size` answers, each real quenchant with its equivalent H, and what a constant severity means."""
    u = units or Units("si")
    L = lambda mm: f"{u.length(mm):.3g} in" if u.us else f"{mm:g} mm"  # noqa: E731
    sev, big = d["mildest_severity"], d["largest_size"]
    by_name = {q["medium"]: q for q in d.get("quenchants", [])}

    def with_h(name):
        h = by_name.get(name, {}).get("equivalent_h")
        return name if h is None else f"{name} (H {h:.2f})"

    failing = [q for q in d.get("quenchants", []) if not q["meets_requirement"]]
    lines = [f"{title or 'case'}: {d['requirement']}",
             ("mildest constant severity: H = {:.3g} 1/in (h = {:.0f} W/m2K); H = {:.3g} does not meet it".format(
                 sev["grossmann_h_per_inch"], sev["htc_w_m2k"], sev["next_milder_h_per_inch"])
              if sev["reachable"] and sev["next_milder_h_per_inch"] is not None else
              ("met even by the mildest severity tried" if sev["reachable"] else
               "not reachable by quench severity alone: choose a more hardenable steel or a smaller section")),
             "real quenchant curves that meet it, mildest first: "
             + (", ".join(with_h(n) for n in d["quenchants_meeting"]) or "none"),
             "real curves that do not: " + (", ".join(with_h(q["medium"]) for q in failing) or "none"),
             (f"largest {big['dimension'].replace('_mm', '')} in {medium_name}: {L(big['largest_passing_mm'])} "
              + (f"({L(big['next_larger_failing_mm'])} does not meet it)" if big["next_larger_failing_mm"] else "(largest tried)")
              if big["largest_passing_mm"] is not None else f"no {big['dimension'].replace('_mm', '')} tried meets it in {medium_name}")
             + f"; this part: {L(big['case_size_mm'])}",
             SEVERITY_NOTE,
             "wrote   " + ", ".join(str(f) for f in files)]
    return "\n".join(lines)


def heat_fit_line(fit: dict) -> str:
    """One line on the heat's fitted hardenability (workflows.heat_fit summary).

    >>> print(heat_fit_line({"file": "h.csv", "points_used": 16, "position": -0.96, "position_se": 0.04,
    ...     "composition_wt_pct": {"c": 0.381, "mn": 0.755, "ni": 0.0}, "rms_hrc": 0.19, "max_abs_hrc": 0.42,
    ...     "rms_hrc_nominal": 5.96}))
    heat    fitted to h.csv (16 readings): position -0.96 +/- 0.04 in the grade's chemistry range (C 0.381, Mn 0.755 wt%); RMS 0.19 HRC (nominal steel 5.96), max 0.42 HRC
    """
    chem = ", ".join(f"{k.capitalize()} {v:g}" for k, v in fit["composition_wt_pct"].items() if v > 0)
    return (f"heat    fitted to {fit['file']} ({fit['points_used']} readings): position {fit['position']:g} +/- "
            f"{fit['position_se']:g} in the grade's chemistry range ({chem} wt%); RMS {fit['rms_hrc']:g} HRC "
            f"(nominal steel {fit['rms_hrc_nominal']:g}), max {fit['max_abs_hrc']:g} HRC")


def tank_fit_text(summary: dict, out_csv: str) -> str:
    """The `fit-tank` summary: factor, its range, RMS before and after, what to put in the case.

    >>> print(tank_fit_text({"traverse": "t.csv", "points_used": 11, "factor": 2.0, "factor_range_2se": [1.8, 2.3],
    ...     "rms_hrc": 0.03, "max_abs_hrc": 0.04, "start_rms_hrc": 7.0, "quenchant": "q x 2",
    ...     "vapour_blanket_collapse": "not fitted", "warnings": [], "files": ["o/quenchant.csv"]},
    ...     "o/quenchant.csv").splitlines()[1])
    factor  h x 2 on the case's curve (1.8-2.3 at 2 standard errors)
    """
    s = summary
    lines = [f"tank fit {s['quenchant']}: {s['points_used']} readings from {s['traverse']}",
             f"factor  h x {s['factor']:g} on the case's curve ({s['factor_range_2se'][0]:g}-{s['factor_range_2se'][1]:g} "
             "at 2 standard errors)",
             f"traverse RMS {s['rms_hrc']:g} HRC, max {s['max_abs_hrc']:g} HRC (the case as given: RMS {s['start_rms_hrc']:g} HRC)",
             f"vapour blanket collapse: {s['vapour_blanket_collapse']}"]
    if s.get("equivalent_h_per_inch") is not None:
        lines.append(f"severity equivalent Grossmann H {s['equivalent_h_per_inch']:.2f} 1/in")
    lines.append(f"use     [quench] medium = \"{out_csv}\"")
    lines.append("wrote   " + ", ".join(str(f) for f in s["files"]))
    lines += [f"warning {w}" for w in s["warnings"]]
    return "\n".join(lines)
