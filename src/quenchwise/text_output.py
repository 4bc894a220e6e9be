"""Text rendering of the command summaries: pure functions from a summary (dict) to a string.

Nothing here computes physics or writes files; the command line prints what these return. Units
follow a units.Units (SI by default; ``--units us`` gives inches and Fahrenheit).
"""

from __future__ import annotations

import math

from .version import __version__
from .cautions import CAUTION
from .formatting import fmt
from .units import Units

#: What the sizing answer means by a constant severity, printed under the sizing answer.
SEVERITY_NOTE = (
    "note: the mildest constant severity is a constant heat-transfer coefficient h = 2 k H over the whole quench. "
    "A real quenchant's h changes with the surface temperature (vapour blanket, boiling, convection), and its "
    "equivalent H matches only the centre's 800-500 C time of a 25 mm bar. So a real curve with an equivalent H "
    "above the mildest constant H can still fail (e.g. weak cooling where the steel transforms), and one below it "
    "can pass. Choose the quenchant from the list solved with the real curves, not from H alone."
)


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
    chem = chemistry_text(steel["composition_wt_pct"])
    dims = ", ".join((f"{k.replace('_mm', '')} " + " / ".join(u.fmt_length(x, 3 if u.us else 1) for x in v)
                      if isinstance(v, list) else f"{k.replace('_mm', '')} {u.fmt_length(v, 3 if u.us else 1)}")
                     if k.endswith("_mm") else f"{k} {v}" for k, v in s["part"].items() if k != "shape")
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
    if "softest" in s:
        lines.extend(softest_lines(s, u))
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


def softest_lines(s: dict, u: Units) -> list[str]:
    """A finite part's profile line and its softest surface and section points (r, z, faces)."""
    line = s.get("profile_line", {})
    out = [f"        readings above along the {line.get('what', 'profile line')} (z = {u.fmt_length(line.get('z_mm', 0.0), 1)})"]
    if s["quench"].get("lower_end"):
        out.append(f"ends    lower end face (z = 0): {s['quench']['lower_end']}; upper: {s['quench']['upper_end']}")
    for key, label in (("surface", "softest surface"), ("section", "softest section")):
        p = s["softest"].get(key)
        if p is None:
            continue
        hard = f"{p['hrc']:.1f} HRC" if p.get("hrc") is not None else f"{p['hv']:.0f} HV"
        faces = f", {p['faces'].replace('_', ' ')} face" if p.get("faces") else ""
        out.append(f"{label:<16}{hard} ({p['hv']:.0f} HV, martensite {p['martensite_pct']:.1f} %) at r "
                   f"{u.fmt_length(p['r_mm'])}, z {u.fmt_length(p['z_mm'])} from the lower end{faces}")
    w = s.get("requirement_whole_part")
    if w:
        p = w["worst"]
        hard = f"{p['hrc']:.1f} HRC" if p.get("hrc") is not None else f"{p['hv']:.0f} HV"
        verdict = ("met on every cell within that depth of a cooled face" if w["met"] else
                   f"NOT met on every cell: {w['share_met_pct']:.1f} % of the volume within that depth meets it")
        out.append(f"whole part '{w['requirement']}': {verdict}; weakest {hard} at r {u.fmt_length(p['r_mm'])}, "
                   f"z {u.fmt_length(p['z_mm'])}, {u.fmt_length(p['depth_mm'])} below the nearest cooled face")
    return out


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
             *length_lines(d, medium_name, L),
             SEVERITY_NOTE,
             "wrote   " + ", ".join(str(f) for f in files)]
    return "\n".join(lines)


def length_lines(d: dict, medium_name: str, L) -> list[str]:
    """A finite part's largest length in the size answer (none for a 1-D section)."""
    g = d.get("largest_length")
    if g is None:
        return []
    if g["largest_passing_mm"] is None:
        return [f"no length tried meets it in {medium_name}; this part: {L(g['case_length_mm'])}"]
    tail = (f"({L(g['next_longer_failing_mm'])} does not meet it)" if g["next_longer_failing_mm"] is not None
            else "(longest tried: any length meets it)")
    return [f"largest length in {medium_name}: {L(g['largest_passing_mm'])} {tail}; this part: {L(g['case_length_mm'])}"]


def wrote(files: list) -> str:
    """The 'wrote' line of a summary."""
    return "wrote   " + ", ".join(str(f) for f in files)


def chemistry_text(composition_wt_pct: dict, sep: str = ", ", pattern: str = "{:g}") -> str:
    """The chemistry as shown in summaries, figures and the sheet: the elements present, capitalized.

    >>> chemistry_text({"c": 0.4, "mn": 0.85, "ni": 0.0})
    'C 0.4, Mn 0.85'
    >>> chemistry_text({"c": 0.4, "mn": 0.85}, "  ", "{:.2f}")
    'C 0.40  Mn 0.85'
    """
    return sep.join(f"{k.capitalize()} {pattern.format(v)}" for k, v in composition_wt_pct.items() if v > 0)


def band_line(label: str, row: dict) -> str:
    """HRC min / median / max at one position; HV where below HRC 20 (never 'nan')."""
    ks = ("min", "median", "max")
    if all(row[f"hrc_{k}"] != row[f"hrc_{k}"] for k in ks):
        return f"{label:<10}below HRC 20 for every heat ({row['hv_min']:.0f}-{row['hv_max']:.0f} HV)"
    cells = [f"{row[f'hrc_{k}']:.1f}" if row[f"hrc_{k}"] == row[f"hrc_{k}"] else f"{row[f'hv_{k}']:.0f} HV" for k in ks]
    return f"{label:<10}" + "".join(f"{c:>9}" for c in cells)


def band_text(title: str | None, sampled: str, samples: int, seed: int, rows: list[dict], share: float | None,
              requirement: str | None, files: list) -> str:
    """The `band` summary: what was sampled, HRC min / median / max at the surface and the centre,
    share meeting."""
    surface, centre = rows[0], rows[-1]
    lines = [f"{title or 'case'}: {samples} heats (seed {seed}), one batch; sampled: {sampled}",
             f"{'':<10}{'HRC min':>9}{'median':>9}{'max':>9}",
             *(band_line(label, row) for label, row in (("surface", surface), ("centre", centre)))]
    if any(not math.isfinite(r[f"hrc_{k}"]) for r in (surface, centre) for k in ("min", "median", "max")):
        lines.append("HV: below HRC 20, where the Rockwell C scale ends (ASTM E140)")
    if share is not None:
        lines.append(f"share of heats meeting '{requirement}': {100 * share:.1f} %")
    lines.append(wrote(files))
    return "\n".join(lines)


def sheet_text(title: str | None, keys: dict, files: list, units: Units | None = None,
               requirement: str | None = None) -> str:
    """The `sheet` summary: the key numbers of the sheet and whether the requirement is met
    (requirement: its wording in the chosen units, default keys["requirement"])."""
    u = units or Units("si")
    lines = [f"{title or 'case'}: hardening sheet",
             f"effective depth {u.fmt_length(keys['effective_depth_mm'])} to {keys['limit_hrc']:g} HRC; centre martensite "
             f"{keys['centre_martensite_pct']:g} %; retained austenite up to {keys['max_retained_austenite_pct']:g} %"]
    if keys["requirement"]:
        lines.append(("MET: " if keys["meets_requirement"] else "NOT MET: ") + (requirement or keys["requirement"]))
    lines.append(wrote(files))
    return "\n".join(lines)


def jominy_text(summary: dict, files: list) -> str:
    """The `jominy` summary: steel, test, DI, readings at the usual distances, band check."""
    s = summary
    steel = s["steel"]
    chem = chemistry_text(steel["composition_wt_pct"])
    di = s["di"]
    lines = [f"quenchwise {__version__}  |  {s['title'] or 'end-quench test'}",
             f"steel   {steel['grade'] or 'custom'} ({chem} wt%), grain size {steel['grain_size']:g}, "
             f"austenitized at {steel['austenitize_c']:g} C",
             f"test    {s['test']['specimen']}; {s['test']['model']} model, jet peak h {s['test']['jet_htc_w_m2k']:g} W/m2K; "
             f"{s['test']['time_s']:g} s, {s['test']['steps']} steps",
             f"DI      ASTM A255 {di['a255']['in']:.2f} in ({di['a255']['mm']:.0f} mm)"
             + (f"; simulated {di['physics']['in']:.2f} in ({di['physics']['mm']:.0f} mm), ratio "
                f"{di['physics_over_a255']:.2f}" if di.get("physics") else ""),
             "",
             f"{'1/16 in':>8}{'mm':>8}{'HRC':>7}{'HV':>7}{'C/s at 700 C':>14}{'martensite %':>14}"]
    for r in s["readings"]:
        if r["sixteenths"] <= 16 or r["sixteenths"] % 4 == 0:
            lines.append(f"{r['sixteenths']:>8}{r['distance_mm']:>8.1f}{fmt(r['hrc']):>7}{fmt(r['hv'], '{:.0f}'):>7}"
                         f"{fmt(r['cooling_rate_700_c_s'], '{:.3g}'):>14}{fmt(r['martensite_pct']):>14}")
    if "band" in s:
        b = s["band"]
        lines.append(f"band    {b['inside']} of {b['of']} band rows inside: "
                     + ", ".join(f"{r['distance_mm']:g} mm {fmt(r['hrc'])} HRC in [{fmt(r['min_hrc'], '{:g}')}, "
                                 f"{fmt(r['max_hrc'], '{:g}')}]{'' if r['inside'] else ' OUT'}" for r in b["rows"]))
    for w in s["warnings"]:
        lines.append(f"warning {w}")
    if files:
        lines.append(wrote(files))
    return "\n".join(lines)


def diagram_text(title: str | None, summary: dict, files: list) -> str:
    """The `diagram` summary: steel, levels, noses and bay (TTT) or critical rates and paths (CCT)."""
    s = summary
    steel = s["steel"]
    chem = chemistry_text(steel["composition_wt_pct"])
    levels = ", ".join(f"{k} {v:.0f} C" for k, v in s["levels_c"].items())
    lines = [f"{title or 'case'}: {s['kind'].upper()} diagram, kinetics {s['model']}",
             f"steel   {steel['grade'] or 'custom'} ({chem} wt%), austenitized {s['austenitize_c']:g} C, "
             f"{s['austenite_carbon_wt_pct']:.2f} %C in austenite, grain size {s['grain_size']:g}",
             f"levels  {levels}  ({steel['critical_temperatures']})"]
    if s["kind"] == "ttt":
        noses = "; ".join(f"{p} {n['time_s']:.3g} s at {n['temperature_c']:.0f} C"
                          for p, n in s["noses"].items() if n is not None)
        lines.append(f"noses   {noses or 'none within 11 days'}")
        bay = s["bay"]
        lines.append("bay     " + (f"{bay['time_s']:.3g} s at {bay['temperature_c']:.0f} C (longest start between the "
                                   "upper and the bainite nose)" if bay else "none (no local maximum of the start "
                                                                               "between the noses)"))
    else:
        for family, label in (("constant_rate", "constant rates"), ("newtonian", "Newtonian, rate at 700 C")):
            c = s["critical_rates_k_s"][family]
            lines.append(f"critical ({label}): " + "; ".join(
                f"{k.replace('_', ' ')} {'-' if v is None else f'{v:.3g} K/s'}" for k, v in c.items()))
        lines.append(f"{'path':<14}{'K/s at 700':>11}{'F %':>6}{'C %':>6}{'P %':>6}{'B %':>6}{'M %':>6}{'A %':>6}"
                     f"{'HV':>7}{'HRC':>6}")
        for p in s["paths"]:
            pct = p["final_pct"]
            lines.append(f"{p['label']:<14}{p['rate_700_c_s']:>11.3g}" + "".join(
                f"{pct.get(k, 0.0):>6.0f}" for k in ("ferrite", "cementite", "pearlite", "bainite", "martensite",
                                                     "austenite"))
                + f"{fmt(p['hv'], '{:.0f}'):>7}{fmt(p['hrc'], '{:.0f}'):>6}")
    for w in s["warnings"]:
        lines.append(f"warning {w}")
    lines.append(wrote(files))
    return "\n".join(lines)


def quenchant_list_text(rows: list[dict], probe_note: str, severity_definition: str) -> str:
    """The `quenchants` table: bath, agitation, flash point, probe figures, equivalent H."""
    lines = [f"{'name':<30}{'bath C':>7}  {'agitation':<9}{'flash C':>8}  {'max K/s':>7}{'at C':>6}"
             f"{'@300':>6}{'t600':>6}{'t400':>6}{'t200':>6}{'H 1/in':>8}  kind"]
    for r in rows:
        p = r["probe"]
        lines.append(f"{r['name']:<30}{r['bath_c']:>7g}  {r['agitation'] or '-':<9}"
                     f"{fmt(r['flash_point_c'], '{:.0f}'):>8}  {fmt(p['max_rate_k_s'], '{:.0f}'):>7}"
                     f"{fmt(p['t_max_rate_c'], '{:.0f}'):>6}{fmt(p['rate_300_k_s'], '{:.0f}'):>6}"
                     f"{fmt(p['time_600_s'], '{:.1f}'):>6}{fmt(p['time_400_s'], '{:.1f}'):>6}"
                     f"{fmt(p['time_200_s'], '{:.0f}'):>6}{fmt(r['equivalent_h_per_inch'], '{:.2f}'):>8}  {r['kind']}")
    lines += [probe_note + ".",
              f"H: equivalent Grossmann severity, derived from the curve: {severity_definition}.",
              "Liquid curves: presets of the three-stage model set to published probe figures (not measured "
              "data; sources in quenchant_data/probe_targets.csv); a case can ask for any bath, flow and "
              "concentration with [quench] kind / agitation / concentration_pct. Fit your own bath with "
              "`quenchwise probe`. Flash points are illustrative: use your oil's data sheet."]
    return "\n".join(lines)


def quenchant_text(q, row: dict, note: str, severity_definition: str, files: list | None) -> str:
    """One quenchant: kind, bath, probe figures, equivalent H, source; its table when nothing was
    written (files None), else the files."""
    p = row["probe"]
    lines = [f"{q.name}" + (f": {q.description}" if q.description else ""),
             f"kind {q.kind}, bath {q.bath_c:g} C, agitation {q.agitation or '-'}, flash point "
             f"{fmt(q.flash_point_c, '{:.0f} C')}" + (f", emissivity {q.emissivity:g} (radiation added)" if q.emissivity else ""),
             f"probe   max {fmt(p['max_rate_k_s'], '{:.0f} K/s')} at {fmt(p['t_max_rate_c'], '{:.0f} C')}, "
             f"{fmt(p['rate_300_k_s'], '{:.1f} K/s')} at 300 C; to 600 / 400 / 200 C in "
             f"{fmt(p['time_600_s'], '{:.1f}')} / {fmt(p['time_400_s'], '{:.1f}')} / {fmt(p['time_200_s'], '{:.1f}')} s"
             " (ISO 9950 type probe, 1-D model)",
             f"equivalent H {fmt(row['equivalent_h_per_inch'], '{:.2f} 1/in')} "
             f"(h {fmt(row['equivalent_htc_w_m2k'], '{:.0f} W/m2K')}; {severity_definition})" + (f"; {note}" if note else ""),
             f"source  {q.source or 'not given'}"]
    if files is None:
        lines += ["surface_c  htc_w_m2k"] + [f"{t:>9g}  {h:>9g}" for t, h in zip(q.surface_c, q.htc_w_m2k)]
    else:
        lines.append(wrote(files))
    return "\n".join(lines)


def probe_fit_text(q, fit, record, curve, bath_c: float, summary: dict, out, files: list) -> str:
    """The `probe` summary: method, refit error, the fitted curve and how to use it, warnings."""
    lines = [f"probe fit {q.name}: {record.time_s.size} samples from {curve}, bath {bath_c:g} C",
             f"method  Beck's sequential function specification on a 1-D alloy 600 cylinder (12.5 mm), "
             f"{fit.future_steps} future steps of {fit.dt_s:.4g} s" + (f" (noise {fit.noise_k:.2f} K)" if fit.noise_k == fit.noise_k else "")
             + (f"; end faces corrected (up to {fit.end_correction_k:.1f} K)" if fit.end_correction_k else ""),
             f"refit   RMS {fit.rms_k:.2f} K, max {fit.max_k:.2f} K (measured centre vs the fitted curve run forward)",
             f"curve   surface {q.surface_c[0]:.0f}-{q.surface_c[-1]:.0f} C (held constant beyond), peak h "
             f"{q.htc_w_m2k.max():.0f} W/m2K at {q.surface_c[int(q.htc_w_m2k.argmax())]:.0f} C; equivalent H "
             f"{fmt(summary['equivalent_h_per_inch'], '{:.2f} 1/in')}",
             f"use     [quench] medium = \"{out / 'quenchant.csv'}\"",
             wrote(files)] + [f"warning {w}" for w in fit.warnings]
    return "\n".join(line for line in lines if line)


def steels_text(table: dict) -> str:
    """The `steels` list: grade, EN name, family, nominal chemistry, austenitizing temperature."""
    lines = [f"{'grade':<8}{'EN':<10}{'family':<30}{'C':>6}{'Mn':>6}{'Si':>6}{'Ni':>6}{'Cr':>6}{'Mo':>6}{'V':>6}{'aust C':>8}"]
    for g in table.values():
        n = g.nominal
        lines.append(f"{g.name:<8}{g.en or '-':<10}{g.family:<30}" + "".join(f"{n.get(e, 0):>6.2f}" for e in ("c", "mn", "si", "ni", "cr", "mo", "v"))
                     + f"{g.austenitize_c:>8.0f}")
    lines.append("Nominal chemistry in wt% (midpoints of the specification ranges, recalled from SAE/EN standards: check "
                 "against the current standard and the mill certificate). A grade may be given by the EN name listed "
                 "here (e.g. grade = \"42CrMo4\").")
    return "\n".join(lines)


def heat_fit_line(fit: dict) -> str:
    """One line on the heat's fitted hardenability (workflows.heat_fit summary).

    >>> print(heat_fit_line({"file": "h.csv", "points_used": 16, "position": -0.96, "position_se": 0.04,
    ...     "composition_wt_pct": {"c": 0.381, "mn": 0.755, "ni": 0.0}, "rms_hrc": 0.19, "max_abs_hrc": 0.42,
    ...     "rms_hrc_nominal": 5.96}))
    heat    fitted to h.csv (16 readings): position -0.96 +/- 0.04 in the grade's chemistry range (C 0.381, Mn 0.755 wt%); RMS 0.19 HRC (nominal steel 5.96), max 0.42 HRC
    """
    chem = chemistry_text(fit["composition_wt_pct"])
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
    lines.append(wrote(s["files"]))
    lines += [f"warning {w}" for w in s["warnings"]]
    return "\n".join(lines)
