"""Case files (TOML): schema, loading and validation into a Case with SI units inside.

Every problem is reported as one InputError line naming the file, the key, the value and what
is allowed. Keys are lower case and carry their unit in the name (see README, case-file reference).
"""

from __future__ import annotations

import hashlib
import math
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from .errors import InputError
from .steel.composition import ELEMENTS, Composition
from .steel.austenite import austenitize
from .steel.grades import find_grade
from .thermal.geometry import Section
from .thermal.quenchants import Quenchant, htc_from_grossmann, load_quenchant
from .thermal.solver import SolverSettings

SECTIONS = {
    "title": {},
    "steel": {"grade", "grain_size", "austenitize_c", *ELEMENTS},
    "part": {"shape", "thickness_mm", "diameter_mm", "outer_diameter_mm", "inner_diameter_mm", "faces"},
    "quench": {"medium", "htc_w_m2k", "severity_h", "bath_c", "end_c",
               "inner_medium", "inner_htc_w_m2k", "inner_severity_h", "inner_bath_c"},
    "temper": {"temperature_c", "hours"},
    "transform": {"model", "martensite"},
    "thermal": {"conductivity_w_mk", "density_kg_m3", "specific_heat_j_kgk"},
    "mesh": {"cells", "growth", "max_temperature_step_k", "max_fraction_step", "max_relative_step"},
    "requirement": {"min_hrc", "min_martensite_pct", "depth_mm"},
    "compare": {"media"},
}
MODELS = ("li1998", "kirkaldy1983", "li1998-a255", "li1998-multigrade", "none")
#: Kinetics model of a case without [transform] model: the multi-grade calibration, because its
#: leave-one-grade-out score on the SAE J1268 H-bands beats the published coefficients' (kinetics/
#: multigrade.py, benchmarks/calibrate_kinetics.py, benchmarks/accuracy.md); "li1998" stays selectable.
DEFAULT_MODEL = "li1998-multigrade"
MARTENSITE_LAWS = ("koistinen_marburger", "van_bohemen_sietsma")
SHAPE_NAMES = ("plate", "bar", "tube", "sphere")
#: Default end of the quench: the hottest point of the section below this [C].
DEFAULT_END_C = 60.0


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

    def describe(self) -> str:
        what = f"{self.min_hrc:g} HRC" if self.min_hrc is not None else f"{self.min_martensite_pct:g} % martensite"
        where = "at the centre" if self.depth_mm is None else f"down to {self.depth_mm:g} mm depth"
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
    model: str = DEFAULT_MODEL
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


def parse_case(data: dict, source_text: str = "", source_name: str = "", base_dir: Path = Path(".")) -> Case:
    for name, value in data.items():
        if name not in SECTIONS:
            raise InputError(name, "(table)" if isinstance(value, dict) else value,
                             "a known section: " + ", ".join(SECTIONS))
        if name != "title":
            if not isinstance(value, dict):
                raise InputError(name, value, f"a [{name}] table")
            for key in value:
                if key not in SECTIONS[name]:
                    raise InputError(f"{name}.{key}", value[key], f"a key of [{name}]: " + ", ".join(sorted(SECTIONS[name])))
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

    section, dims = _section(data["part"])
    q = data["quench"]
    outer = _quenchant(q, "", base_dir, None)
    inner = None
    if section.shape == "tube":
        # An immersed tube is quenched in its bore too: same medium unless inner_* keys say otherwise.
        has_inner = any(k.startswith("inner_") for k in q)
        inner = _quenchant(q, "inner_", base_dir, outer.bath_c) if has_inner else outer
        if inner is None:  # inner_medium = "insulated": closed bore
            section = Section("tube", section.inner_m, section.outer_m, inner_quenched=False)
    elif any(k.startswith("inner_") for k in q):
        k = next(k for k in q if k.startswith("inner_"))
        raise InputError(f"quench.{k}", q[k], "inner_* keys only for shape = 'tube'")
    end_c = _number(q, "quench", "end_c", -20.0, 700.0, default=DEFAULT_END_C)
    lowest_bath = min(outer.bath_c, inner.bath_c if inner else outer.bath_c)
    if end_c <= lowest_bath + 1.0:
        raise InputError("quench.end_c", end_c, f"a temperature above the bath ({lowest_bath:g} C) by more than 1 C")
    if end_c >= aust:
        raise InputError("quench.end_c", end_c, f"a temperature below austenitize_c ({aust:g} C)")

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
    settings = SolverSettings(
        cells=_number(m, "mesh", "cells", 8, 2000, default=d.cells, integer=True),
        growth=_number(m, "mesh", "growth", 1.0, 1.5, default=d.growth),
        max_temperature_step_k=_number(m, "mesh", "max_temperature_step_k", 0.1, 100.0, default=d.max_temperature_step_k),
        max_fraction_step=_number(m, "mesh", "max_fraction_step", 0.001, 0.5, default=d.max_fraction_step),
        max_relative_step=_number(m, "mesh", "max_relative_step", 0.001, 1.0, default=d.max_relative_step),
    )
    return Case(
        title=title, composition=composition, grade=grade, grain_size=grain, austenitize_c=aust, section=section,
        outer=outer, inner=inner, end_c=end_c, model=model, martensite=martensite, temper=temper,
        conductivity_w_mk=k, density_kg_m3=rho, specific_heat_j_kgk=cp, settings=settings,
        requirement=requirement, compare_media=compare_media, dimensions_mm=dims,
        source_text=source_text, source_name=source_name,
    )


def load_case(path: str | Path, defaults: dict | None = None) -> Case:
    """Read and validate a case file; any problem is one InputError naming the file.

    defaults: whole tables used where the file has none (e.g. the end-quench test supplies its
    own [part] and [quench])."""
    p = Path(path)
    name = str(path)
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise InputError("case file", name, f"an existing, readable file ({exc.strerror or type(exc).__name__})") from None
    try:
        text = raw.decode("utf-8")
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
        raise exc.with_source(name) from None
