"""Case files (TOML): schema, loading and validation into a Case with SI units inside.

Every problem is reported as one InputError line naming the file, the key, the value and what
is allowed. Keys are lower case and carry their unit in the name (see README, case-file reference).
"""

from __future__ import annotations

import hashlib
import math
import tomllib

import numpy as np
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

from .errors import InputError
from .tomltext import toml_text
from .measured import read_measured_jominy
from .part_case import FINITE_KEYS, parse_part
from .steel.composition import ELEMENTS, Composition
from .steel.austenite import austenitize
from .steel.grades import find_grade
from .thermal.geometry import Section
from .thermal.quenchants import Quenchant, htc_from_grossmann, load_quenchant
from .thermal.settings import SolverSettings
from .units import US_KEYS, si_keys

SECTIONS = {
    "title": {},
    "steel": {"grade", "grain_size", "austenitize_c", "measured_jominy", *ELEMENTS},
    "part": {"shape", "thickness_mm", "diameter_mm", "outer_diameter_mm", "inner_diameter_mm", "faces"} | FINITE_KEYS["part"],
    "quench": {"medium", "htc_w_m2k", "severity_h", "bath_c", "end_c", "kind", "agitation", "concentration_pct",
               "inner_medium", "inner_htc_w_m2k", "inner_severity_h", "inner_bath_c"} | FINITE_KEYS["quench"],
    "temper": {"temperature_c", "hours"},
    "transform": {"model", "martensite"},
    "thermal": {"conductivity_w_mk", "density_kg_m3", "specific_heat_j_kgk"},
    "mesh": {"cells", "growth", "max_temperature_step_k", "max_fraction_step", "max_relative_step"} | FINITE_KEYS["mesh"],
    "requirement": {"min_hrc", "min_martensite_pct", "depth_mm"},
    "compare": {"media"},
    "record": set(),  # filled below from RECORD_KEYS
}
#: [record]: the sheet's controlled-record fields, every one optional, all text (date may be a TOML date).
RECORD_KEYS = ("part_number", "drawing_number", "revision", "customer", "order_number", "material_spec",
               "heat_number", "hardness_test", "prepared_by", "checked_by", "approved_by", "date", "notes")
SECTIONS["record"] = set(RECORD_KEYS)
MODELS = ("li1998", "kirkaldy1983", "li1998-a255", "li1998-multigrade", "none")
#: Kinetics model of a case without [transform] model: the multi-grade calibration, because its
#: leave-one-grade-out score on the SAE J1268 H-bands beats the published coefficients' (kinetics/
#: multigrade.py, benchmarks/calibrate_kinetics.py, benchmarks/accuracy.md); "li1998" stays selectable.
DEFAULT_MODEL = "li1998-multigrade"
MARTENSITE_LAWS = ("koistinen_marburger", "van_bohemen_sietsma")
SHAPE_NAMES = ("plate", "bar", "tube", "sphere", "stepped_shaft")
#: Default end of the quench: the hottest point of the section below this [C] ...
DEFAULT_END_C = 60.0
#: ... or this far above the hottest bath, for baths at or above DEFAULT_END_C (60 C oils, hot oil):
#: the part then cools to room temperature in air (workflows.simulate), where the remaining
#: austenite can still turn to martensite. Same margin as workflows.variants.HOT_BATH_END_MARGIN_K.
END_MARGIN_K = 20.0


@dataclass(frozen=True)
class Temper:
    temperature_c: float
    hours: float


@dataclass(frozen=True)
class Requirement:
    """What the drawing asks: a minimum HRC or martensite percentage down to a depth below the
    quenched surface (None: down to the centre / through the wall)."""

    min_hrc: float | None = None
    min_martensite_pct: float | None = None
    depth_mm: float | None = None

    def describe(self, units=None) -> str:
        """In words; the depth in inches when units (a units.Units) asks for US units.

        >>> Requirement(min_hrc=45, depth_mm=5.08).describe()
        'at least 45 HRC down to 5.08 mm depth'
        >>> from quenchwise.units import Units
        >>> Requirement(min_hrc=45, depth_mm=5.08).describe(Units("us"))   # 1 in = 25.4 mm exactly
        'at least 45 HRC down to 0.2 in depth'
        """
        what = f"{self.min_hrc:g} HRC" if self.min_hrc is not None else f"{self.min_martensite_pct:g} % martensite"
        depth = None if self.depth_mm is None else (
            f"{units.length(self.depth_mm):.3g} in" if units is not None and units.us else f"{self.depth_mm:g} mm")
        where = "at the centre" if depth is None else f"down to {depth} depth"
        return f"at least {what} {where}"


def parse_requirement(table: dict, section: str = "requirement") -> Requirement:
    """[requirement]: exactly one of min_hrc, min_martensite_pct; optional depth_mm."""
    keys = [k for k in ("min_hrc", "min_martensite_pct") if k in table]
    if len(keys) != 1:
        raise InputError(f"{section}.min_hrc", ", ".join(keys) or "(missing)",
                         "exactly one of min_hrc, min_martensite_pct")
    return Requirement(
        min_hrc=_number(table, section, "min_hrc", 20.0, 68.0),
        min_martensite_pct=_number(table, section, "min_martensite_pct", 0.0, 100.0, lo_open=True),
        depth_mm=_number(table, section, "depth_mm", 0.0, 1000.0),
    )


@dataclass(frozen=True)
class Case:
    """A validated case: what to simulate, in SI units and degrees C."""

    title: str
    composition: Composition
    grade: str | None
    grain_size: float
    austenitize_c: float
    section: Section
    outer: Quenchant
    inner: Quenchant | None
    end_c: float
    model: str = DEFAULT_MODEL          # a name of MODELS; from Python also a kinetics model object
    martensite: str = "koistinen_marburger"
    temper: Temper | None = None
    conductivity_w_mk: float | None = None
    density_kg_m3: float | None = None
    specific_heat_j_kgk: float | None = None
    settings: SolverSettings = SolverSettings()
    requirement: Requirement | None = None
    compare_media: tuple = ()
    dimensions_mm: dict = field(default_factory=dict)
    source_text: str = ""
    source_name: str = ""
    record: dict = field(default_factory=dict)
    #: [steel] measured_jominy: the heat's end-quench curve (measured.MeasuredCurve); the
    #: steel is fitted to it before a solve (workflows.heat_fit), which then sets this to None.
    measured_jominy: object = None
    finite: object = None   # part_case.FiniteSpec: a finite part solved in (r, z) (issue 17); None: the 1-D section

    @property
    def source_sha256(self) -> str:
        return hashlib.sha256(self.source_text.encode("utf-8")).hexdigest()


def _number(table: dict, section: str, key: str, lo: float, hi: float, *, required=False, default=None,
            lo_open=False, integer=False):
    full = f"{section}.{key}"
    if key not in table:
        if required:
            raise InputError(full, "(missing)", _range_text(lo, hi, lo_open, integer))
        return default
    v = table[key]
    if isinstance(v, bool) or not isinstance(v, (int, float)) or (integer and not isinstance(v, int)):
        raise InputError(full, v, _range_text(lo, hi, lo_open, integer))
    if not math.isfinite(v) or v > hi or v < lo or (lo_open and v <= lo):
        raise InputError(full, v, _range_text(lo, hi, lo_open, integer))
    return int(v) if integer else float(v)


def _range_text(lo, hi, lo_open, integer) -> str:
    kind = "a whole number" if integer else "a number"
    return f"{kind} {'above' if lo_open else 'from'} {lo:g} {'up to' if lo_open else 'to'} {hi:g}"


def _choice(table: dict, section: str, key: str, allowed: tuple, default=None):
    if key not in table:
        if default is None:
            raise InputError(f"{section}.{key}", "(missing)", "one of " + ", ".join(allowed))
        return default
    v = table[key]
    if not isinstance(v, str) or v not in allowed:
        raise InputError(f"{section}.{key}", v, "one of " + ", ".join(allowed))
    return v


def _quenchant(q: dict, prefix: str, base_dir: Path, default_bath: float | None) -> Quenchant | None:
    if not prefix and any(k in q for k in ("kind", "agitation", "concentration_pct")):
        # A quenchant class with bath, flow and concentration (thermal/quenchant_model.py).
        from .thermal.quenchant_model import quenchant_from_case

        if "kind" not in q:
            raise InputError("quench.kind", "(missing)", "a quenchant class when agitation or concentration_pct is given")
        return quenchant_from_case(q, _number(q, "quench", "bath_c", -20.0, 300.0, default=None))
    keys = [k for k in (f"{prefix}medium", f"{prefix}htc_w_m2k", f"{prefix}severity_h") if k in q]
    if len(keys) != 1:
        if not keys and prefix:
            return None
        raise InputError(f"quench.{prefix}medium", ", ".join(keys) or "(missing)",
                         f"exactly one of {prefix}medium, {prefix}htc_w_m2k, {prefix}severity_h")
    bath = _number(q, "quench", f"{prefix}bath_c", -20.0, 300.0, default=default_bath)
    key = keys[0]
    if key.endswith("medium"):
        if not isinstance(q[key], str) or not q[key].strip():
            raise InputError(f"quench.{key}", q[key], "a built-in quenchant name or a CSV path")
        if prefix and q[key] == "insulated":
            return None
        medium = load_quenchant(q[key], base_dir, key=f"quench.{key}")
        return medium.at_bath(bath) if bath is not None else medium
    bath = 20.0 if bath is None else bath
    if key.endswith("htc_w_m2k"):
        h = _number(q, "quench", key, 0.0, 1.0e6, lo_open=True)
        return Quenchant.constant(h, bath)
    severity = _number(q, "quench", key, 0.0, 100.0, lo_open=True)
    return Quenchant.constant(float(htc_from_grossmann(severity)), bath, name=f"Grossmann H = {severity:g} 1/in")


def _inner_quenchant(q: dict, base_dir: Path, outer: Quenchant) -> Quenchant | None:
    """The bore of a tube. Its own medium runs at its own bath (the curve's, or inner_bath_c); with
    inner_bath_c alone the bore has the outer medium at that bath; a constant h or H in the bore
    without inner_bath_c shares the outer bath (one tank). None: inner_medium = "insulated"."""
    own = [k for k in ("inner_medium", "inner_htc_w_m2k", "inner_severity_h") if k in q]
    bath = _number(q, "quench", "inner_bath_c", -20.0, 300.0)
    if not own:
        return outer.at_bath(bath) if bath is not None else outer
    return _quenchant(q, "inner_", base_dir, None if own == ["inner_medium"] else outer.bath_c)


def _check_cooling_time(q: dict, section: Section, outer: Quenchant, inner: Quenchant | None,
                        start_c: float, end_c: float) -> None:
    """Refuse a quench so weak (a near-zero h) that the part could not reach end_c within the
    solver's time limit, naming the key, instead of a solver failure after a long wait.

    Lumped estimate (Newton cooling at the table's smallest h plus radiation at end_c, an upper
    bound on the time for a given h since conduction inside only slows the centre once h is large):
    t = rho cp (V/A) / h * ln((start - bath) / (end - bath)), rho cp = 7800 * 600 J/(m3 K)."""
    from .thermal.quenchants import radiation_htc

    limit_s = SolverSettings().max_time_s
    surfaces = [(outer, section.outer_m ** section.m)]
    if inner is not None and section.inner_quenched:
        surfaces.append((inner, section.inner_m ** section.m))
    volume = (section.outer_m ** (section.m + 1) - section.inner_m ** (section.m + 1)) / (section.m + 1)
    conductance = sum(a * (float(np.min(m.htc_w_m2k)) + float(radiation_htc(end_c, m.bath_c, m.emissivity)))
                      for m, a in surfaces)
    bath = max(m.bath_c for m, _ in surfaces)
    if conductance <= 0.0:
        hours = math.inf
    else:
        hours = 7800.0 * 600.0 * volume / conductance * math.log((start_c - bath) / (end_c - bath)) / 3600.0
    if hours * 3600.0 > limit_s:
        key = next((f"quench.{k}" for k in ("medium", "htc_w_m2k", "severity_h") if k in q), "quench.medium")
        raise InputError(key, q.get(key.split(".")[1], "(missing)"),
                         f"a quench that cools this part below end_c = {end_c:g} C within {limit_s / 3600.0:.0f} h "
                         f"(this one would take about {hours:.3g} h: h is too small)")


def _section(p: dict) -> tuple[Section, dict]:
    shape = _choice(p, "part", "shape", SHAPE_NAMES)
    allowed_dims = {"plate": {"thickness_mm", "faces"}, "bar": {"diameter_mm"}, "sphere": {"diameter_mm"},
                    "tube": {"outer_diameter_mm", "inner_diameter_mm"}}[shape]
    for key in p:
        if key != "shape" and key not in allowed_dims:
            raise InputError(f"part.{key}", p[key], f"for shape = {shape!r} only " + ", ".join(sorted(allowed_dims)))
    size = (0.5, 2000.0)
    if shape == "plate":
        t = _number(p, "part", "thickness_mm", *size, required=True)
        faces = _choice(p, "part", "faces", ("both", "one"), default="both")
        return Section.plate(t / 1000.0, faces), {"thickness_mm": t, "faces": faces}
    if shape in ("bar", "sphere"):
        d = _number(p, "part", "diameter_mm", *size, required=True)
        return (Section.bar if shape == "bar" else Section.sphere)(d / 1000.0), {"diameter_mm": d}
    do = _number(p, "part", "outer_diameter_mm", *size, required=True)
    di = _number(p, "part", "inner_diameter_mm", 0.0, do, required=True, lo_open=True)
    if do - di < 2 * size[0] / 2:
        raise InputError("part.inner_diameter_mm", di, f"a bore leaving a wall of at least 0.25 mm (outer {do:g} mm)")
    return Section.tube(do / 1000.0, di / 1000.0), {"outer_diameter_mm": do, "inner_diameter_mm": di}


def _short(key: str, limit: int = 60) -> str:
    """A key as shown in a message: at most `limit` characters (a 5000-character key is not echoed)."""
    return key if len(key) <= limit else f"{key[:limit - 3]}... ({len(key)} characters)"


def parse_case(data: dict, source_text: str = "", source_name: str = "", base_dir: Path = Path(".")) -> Case:
    for name, value in data.items():
        if name not in SECTIONS:
            raise InputError(_short(name), "(table)" if isinstance(value, dict) else value,
                             "a known section: " + ", ".join(SECTIONS) + _did_you_mean(name, SECTIONS))
        if name != "title":
            if not isinstance(value, dict):
                raise InputError(name, value, f"a [{name}] table")
            for key in value:
                if key not in SECTIONS[name] and key not in US_KEYS.get(name, {}):
                    raise InputError(f"{name}.{_short(key)}", value[key], f"a key of [{name}]: " + ", ".join(sorted(SECTIONS[name]))
                                     + _did_you_mean(key, SECTIONS[name] | set(US_KEYS.get(name, {}))))
    data = si_keys(data)  # inch / Fahrenheit keys -> SI keys (pint), before any range check
    for required in ("steel", "part", "quench"):
        if required not in data:
            raise InputError(required, "(missing)", f"a [{required}] table")
    title = data.get("title", "")
    if not isinstance(title, str):
        raise InputError("title", title, "a text")

    s = data["steel"]
    grade = None
    chemistry = {}
    grain, aust = 7.0, None
    if "grade" in s:
        if not isinstance(s["grade"], str):
            raise InputError("steel.grade", s["grade"], "a grade name (text)")
        g = find_grade(s["grade"])
        grade, chemistry, grain, aust = g.name, dict(g.nominal), g.grain_size, g.austenitize_c
    for element in ELEMENTS:
        if element in s:
            chemistry[element] = s[element]
    if "c" not in chemistry:
        raise InputError("steel.c", "(missing)", "carbon in wt% (or a built-in grade)")
    bad = {k: v for k, v in chemistry.items() if isinstance(v, bool) or not isinstance(v, (int, float))}
    if bad:
        k, v = next(iter(bad.items()))
        raise InputError(f"steel.{k}", v, "a number in wt%")
    composition = Composition(**chemistry)
    grain = _number(s, "steel", "grain_size", 1.0, 14.0, default=grain)
    aust = _number(s, "steel", "austenitize_c", 600.0, 1250.0, required=aust is None, default=aust)
    austenitize(composition, aust)  # rejects a temperature at or below Ae1 here, before any work
    measured = None
    if "measured_jominy" in s:
        v = s["measured_jominy"]
        if not isinstance(v, str) or not v.strip():
            raise InputError("steel.measured_jominy", v, "the path of the heat's end-quench curve CSV")
        path = Path(v) if Path(v).is_absolute() else base_dir / v
        measured = read_measured_jominy(path)

    section, dims, finite = parse_part(data, _section, _number, base_dir)
    q = data["quench"]
    outer = _quenchant(q, "", base_dir, None)
    inner = None
    if section.shape == "tube":
        # An immersed tube is quenched in its bore too: same medium unless inner_* keys say otherwise.
        has_inner = any(k.startswith("inner_") for k in q)
        inner = _inner_quenchant(q, base_dir, outer) if has_inner else outer
        if inner is None:  # inner_medium = "insulated": closed bore
            section = Section("tube", section.inner_m, section.outer_m, inner_quenched=False)
    elif any(k.startswith("inner_") for k in q):
        k = next(k for k in q if k.startswith("inner_"))
        raise InputError(f"quench.{k}", q[k], "inner_* keys only for shape = 'tube'")
    # The hottest point can only fall below a temperature above the hotter of the two baths.
    hottest_bath = max(outer.bath_c, inner.bath_c if inner else outer.bath_c)
    end_c = _number(q, "quench", "end_c", -20.0, 700.0, default=max(DEFAULT_END_C, hottest_bath + END_MARGIN_K))
    if end_c <= hottest_bath + 1.0:
        raise InputError("quench.end_c", end_c, f"a temperature above the hottest bath ({hottest_bath:g} C) by more than 1 C")
    if end_c >= aust:
        raise InputError("quench.end_c", end_c, f"a temperature below austenitize_c ({aust:g} C)")
    _check_cooling_time(q, section, outer, inner, aust, end_c)

    t = data.get("transform", {})
    model = _choice(t, "transform", "model", MODELS, default=DEFAULT_MODEL)
    martensite = _choice(t, "transform", "martensite", MARTENSITE_LAWS, default="koistinen_marburger")

    temper = None
    if "temper" in data:
        tp = data["temper"]
        temper = Temper(_number(tp, "temper", "temperature_c", 100.0, 720.0, required=True),
                        _number(tp, "temper", "hours", 0.0, 1000.0, required=True, lo_open=True))

    requirement = parse_requirement(data["requirement"]) if "requirement" in data else None
    if requirement is not None and requirement.depth_mm is not None and requirement.depth_mm > section.thickness_m * 1000.0:
        raise InputError("requirement.depth_mm", requirement.depth_mm,
                         f"a depth from 0 to {section.thickness_m * 1000.0:g} mm (surface to centre / through the wall)")
    media = data.get("compare", {}).get("media", [])
    if not isinstance(media, list) or not all(isinstance(m, str) and m for m in media):
        raise InputError("compare.media", media, "a list of quenchant names or CSV paths")
    compare_media = tuple(load_quenchant(m, base_dir, key="compare.media") for m in media)

    th = data.get("thermal", {})
    k = _number(th, "thermal", "conductivity_w_mk", 0.0, 500.0, lo_open=True)
    rho = _number(th, "thermal", "density_kg_m3", 0.0, 30000.0, lo_open=True)
    cp = _number(th, "thermal", "specific_heat_j_kgk", 0.0, 10000.0, lo_open=True)

    m = data.get("mesh", {})
    d = SolverSettings()
    # The finest settings allowed finish a 100 mm oil-quenched bar in about 25 s of one core
    # (400 cells and all three step limits at their minimum; 2000 cells took 4 minutes).
    settings = SolverSettings(
        cells=_number(m, "mesh", "cells", 8, 400, default=d.cells, integer=True),
        growth=_number(m, "mesh", "growth", 1.0, 1.5, default=d.growth),
        max_temperature_step_k=_number(m, "mesh", "max_temperature_step_k", 1.0, 100.0, default=d.max_temperature_step_k),
        max_fraction_step=_number(m, "mesh", "max_fraction_step", 0.005, 0.5, default=d.max_fraction_step),
        max_relative_step=_number(m, "mesh", "max_relative_step", 0.01, 1.0, default=d.max_relative_step))
    return Case(
        title=title, composition=composition, grade=grade, grain_size=grain, austenitize_c=aust, section=section,
        outer=outer, inner=inner, end_c=end_c, model=model, martensite=martensite, temper=temper,
        conductivity_w_mk=k, density_kg_m3=rho, specific_heat_j_kgk=cp, settings=settings,
        requirement=requirement, compare_media=compare_media, dimensions_mm=dims,
        source_text=source_text, source_name=source_name, record=_record(data.get("record", {})),
        measured_jominy=measured, finite=finite)


def _did_you_mean(word: str, choices) -> str:
    """'; did you mean X?' for a near miss of a known name (difflib), else ''."""
    import difflib

    close = difflib.get_close_matches(str(word).lower(), [str(c) for c in choices], n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


def _record(table: dict) -> dict:
    """[record]: text values (a TOML date or a number is taken as written), in RECORD_KEYS order."""
    out = {}
    for key in RECORD_KEYS:
        if key not in table:
            continue
        v = table[key]
        if isinstance(v, (bool, list, dict)) or v is None:
            raise InputError(f"record.{key}", v, "a text (e.g. \"DWG-1047\") or, for date, a date")
        text = str(v).strip()
        if len(text) > 200:
            raise InputError(f"record.{key}", text, "a text of at most 200 characters")
        if text:
            out[key] = text
    return out


def load_case(path: str | Path | Mapping, defaults: dict | None = None) -> Case:
    """Read and validate a case file, or a mapping of its tables (as `tomllib.load` would give
    them); any problem is one InputError naming the file ("(mapping)" for a mapping).

    defaults: whole tables used where the file has none (e.g. the end-quench test supplies its
    own [part] and [quench])."""
    if isinstance(path, Mapping):
        text = toml_text(path)
        data = tomllib.loads(text)
        if defaults:
            data = {**data, **{k: v for k, v in defaults.items() if k not in data}}
        try:
            return parse_case(data, text, "(mapping)", Path.cwd())
        except InputError as exc:
            from .units import renamed_error, us_origins

            raise renamed_error(exc, us_origins(data)).with_source("(mapping)") from None
    p = Path(path)
    name = str(path)
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise InputError("case file", name, f"an existing, readable file ({exc.strerror or type(exc).__name__})") from None
    try:
        text = raw.decode("utf-8-sig")   # a byte-order mark (some editors write one) is not content
    except UnicodeDecodeError as exc:
        raise InputError("case file", name, f"UTF-8 text (bad byte at position {exc.start})") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError("case file", name, f"valid TOML ({exc})") from None
    if defaults:
        data = {**data, **{k: v for k, v in defaults.items() if k not in data}}
    try:
        return parse_case(data, text, name, p.parent)
    except InputError as exc:
        from .units import renamed_error, us_origins

        raise renamed_error(exc, us_origins(data)).with_source(name) from None
