"""Quick runs without a case file: a case written from a few command-line options.

The options become the text of an ordinary case file (so the run is checked by the same
validation, and its SHA-256 on the sheet identifies exactly what was run).
"""

from __future__ import annotations

import json
import tomllib

from .errors import InputError


def quick_case_text(grade: str | None, bar_mm: float | None = None, plate_mm: float | None = None,
                    sphere_mm: float | None = None, medium: str | None = None, austenitize_c: float | None = None,
                    bath_c: float | None = None, title: str | None = None, end_c: float | None = None) -> str:
    """Case-file text (TOML) for a built-in grade, one section (bar / plate / sphere diameter or
    thickness in mm) and one quenchant.

    >>> print(quick_case_text("4140", bar_mm=50, medium="oil_conventional_60c_moderate"))
    title = "4140, 50 mm bar, oil_conventional_60c_moderate (quick run)"
    [steel]
    grade = "4140"
    [part]
    shape = "bar"
    diameter_mm = 50
    [quench]
    medium = "oil_conventional_60c_moderate"
    <BLANKLINE>
    """
    if grade is None:
        raise InputError("--grade", "(missing)", "a built-in grade (`quenchwise steels`) for a run without a case file")
    sizes = {k: v for k, v in (("bar", bar_mm), ("plate", plate_mm), ("sphere", sphere_mm)) if v is not None}
    if len(sizes) != 1:
        raise InputError("--bar/--plate/--sphere", ", ".join(sizes) or "(missing)",
                         "exactly one section: --bar DIAMETER_MM, --plate THICKNESS_MM or --sphere DIAMETER_MM")
    if medium is None:
        raise InputError("--medium", "(missing)", "a quenchant name (`quenchwise quenchants`) or a curve CSV path")
    (shape, size), = sizes.items()
    key = "thickness_mm" if shape == "plate" else "diameter_mm"
    title = title or f"{grade}, {size:g} mm {shape}, {medium} (quick run)"
    lines = [f"title = {json.dumps(title)}", "[steel]", f"grade = {json.dumps(grade)}"]
    if austenitize_c is not None:
        lines.append(f"austenitize_c = {austenitize_c:g}")
    lines += ["[part]", f'shape = "{shape}"', f"{key} = {size:g}", "[quench]", f"medium = {json.dumps(medium)}"]
    if bath_c is not None:
        lines.append(f"bath_c = {bath_c:g}")
    if end_c is not None:
        lines.append(f"end_c = {end_c:g}")
    return "\n".join(lines) + "\n"


def quick_case(**options):
    """The validated Case of quick_case_text(**options); problems name the option."""
    from pathlib import Path

    from .case import parse_case

    from .case import DEFAULT_END_C
    from .thermal.quenchants import load_quenchant

    if options.get("medium") and options.get("end_c") is None:
        # End 20 K above a warm bath (oils at 60 C and more), else at the usual default.
        bath = options.get("bath_c")
        if bath is None:
            bath = load_quenchant(options["medium"], Path.cwd(), key="--medium").bath_c
        options["end_c"] = max(DEFAULT_END_C, bath + 20.0)
    text = quick_case_text(**options)
    try:
        return parse_case(tomllib.loads(text), text, "(command-line options)", Path.cwd())
    except InputError as exc:
        raise exc.with_source("command-line options") from None
