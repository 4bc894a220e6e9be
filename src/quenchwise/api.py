"""The Python API: a case from a file or a mapping, and the questions asked of it.

These are thin front doors to the workflows (the same code the command line runs); they are
exported lazily from the package, so `import quenchwise` stays light. See README, "Python API".
"""

from __future__ import annotations

from pathlib import Path
from typing import Callable

from .case import Case, load_case
from .results import Result

__all__ = ["load_case", "simulate", "compare", "size", "band", "jominy", "Result", "Case"]

Progress = Callable[[float], None] | None


def simulate(case: Case | list[Case], progress: Progress = None, model=None) -> Result | list[Result]:
    """Quench one case (a Result) or a list of cases (a list of Results, solved as batches).
    model: a kinetics model name or object to use instead of the cases' own (None: theirs)."""
    from .workflows.simulate import simulate as simulate_cases

    if isinstance(case, Case):
        return simulate_cases([case], progress, model)[0]
    return simulate_cases(list(case), progress, model)


def _quenchants(media, base: Path):
    from .thermal.quenchants import Quenchant, load_quenchant

    return [m if isinstance(m, Quenchant) else load_quenchant(str(m), base, key="media") for m in media]


def compare(case: Case, media: list, progress: Progress = None):
    """The case quenched in each medium (built-in names, curve CSV paths or Quenchant objects),
    one batch; a workflows.compare.Comparison (its .rows are the table of `quenchwise compare`)."""
    from .workflows.compare import compare as compare_media

    return compare_media(case, _quenchants(media, Path.cwd()), progress)


def size(case: Case, requirement=None, media: list | None = None, progress: Progress = None):
    """Mildest severity, quenchants meeting the requirement, largest size (workflows.size)."""
    from .workflows.size import size as size_answer

    return size_answer(case, requirement, None if media is None else _quenchants(media, Path.cwd()), progress)


def band(case: Case, samples: int = 200, seed: int = 1, progress: Progress = None):
    """Hardness spread over the grade's chemistry range (workflows.band; seeded, repeatable)."""
    from .workflows.band import band as band_run

    return band_run(case, samples, seed, progress)


def jominy(case: Case | list[Case], physics_di: bool = True, progress: Progress = None):
    """The simulated end-quench test of the case's steel (one JominyResult, or a list for a list)."""
    from .workflows.jominy import jominy as run_jominy

    one = isinstance(case, Case)
    out = run_jominy([case] if one else list(case), physics_di=physics_di, progress=progress)
    return out[0] if one else out
