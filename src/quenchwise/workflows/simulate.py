"""Simulate cases: the public entry of the batched solve (workflows.batch).

A case that carries its heat's measured end-quench curve ([steel] measured_jominy) is first fitted
to it (workflows.heat_fit) and solved with the fitted steel; the fit goes into the result's summary
and warnings. The batched solve itself lives in workflows.batch, which the ideal-diameter search
uses directly, so that the end-quench fit (workflows.jominy -> ideal_diameter) does not import back.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Callable

from ..case import Case
from ..results import Result
from .batch import ROOM_C, attach_equivalent_severity  # noqa: F401  (the module's former names)
from .batch import simulate as simulate_batch


def simulate(cases: list[Case], progress: Callable[[float], None] | None = None, model=None) -> list[Result]:
    """Results for every case, in order; cases with the same numerics and model share one solve.
    A case with a measured end-quench curve is first fitted to it (workflows.heat_fit).

    model: solve every case with this kinetics model instead of its own ``model``: a name of
    kinetics.MODELS or a model object (e.g. trial coefficients); None keeps each case's."""
    if model is not None:
        cases = [replace(c, model=model) for c in cases]
    cases, fits = _fit_measured(cases)
    results = _simulate_split(cases, progress)
    for i, fit in fits.items():
        results[i].extra["measured_jominy"] = fit.summary()
        results[i].extra.setdefault("warnings", []).extend(fit.warnings)
    return results


def _simulate_split(cases: list[Case], progress) -> list[Result]:
    """1-D sections through the batch solver, finite parts (r, z) through workflows.finite (loaded
    only when a finite part is there: the 1-D path need not import the (r, z) modules)."""
    finite = [i for i, c in enumerate(cases) if getattr(c, "finite", None) is not None]
    if not finite:
        return simulate_batch(cases, progress)
    from .finite import simulate_finite

    flat = [i for i in range(len(cases)) if i not in set(finite)]
    results: list = [None] * len(cases)
    share = len(flat) / len(cases)
    if flat:
        part = None if progress is None else (lambda f: progress(share * f))
        for i, r in zip(flat, simulate_batch([cases[i] for i in flat], part)):
            results[i] = r
    part = None if progress is None else (lambda f: progress(share + (1.0 - share) * f))
    for i, r in zip(finite, simulate_finite([cases[i] for i in finite], part)):
        results[i] = r
    return results


def simulate_case(case: Case, progress: Callable[[float], None] | None = None, model=None) -> Result:
    """One case: a batch of one."""
    return simulate([case], progress, model)[0]


#: Heat fits done in this process, by steel and curve: `size` solves the same case in several
#: rounds, and each round should not fit the heat again.
_HEAT_FITS: dict = {}


def _fit_measured(cases: list[Case]) -> tuple[list[Case], dict]:
    """Cases with measured_jominy replaced by their fitted steel; {index: HeatFit}. Cases of the same
    steel and curve (compare, size) share one fit; all fits run as one end-quench batch."""
    need = [i for i, c in enumerate(cases) if c.measured_jominy is not None]
    if not need:
        return cases, {}
    from .heat_fit import fit_heats, fitted_case

    def key(c):
        m = c.measured_jominy
        return (tuple(sorted(c.composition.as_dict().items())), c.grade, c.grain_size, c.austenitize_c, c.model,
                c.martensite, m.source, m.position_mm.tobytes(), m.hrc.tobytes())

    unique: dict = {}
    for i in need:
        if key(cases[i]) not in _HEAT_FITS:
            unique.setdefault(key(cases[i]), cases[i])
    _HEAT_FITS.update(zip(unique, fit_heats(list(unique.values()))))
    fits = {i: _HEAT_FITS[key(cases[i])] for i in need}
    return [fitted_case(c, fits[i]) if i in fits else c for i, c in enumerate(cases)], fits
