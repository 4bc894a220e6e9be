"""Heat conduction through the section: geometry and mesh, properties, quenchants, FiPy solver.

This package knows nothing of transformation kinetics: the solver asks a stepper object
(any object with ``advance`` and ``fractions``) to advance the phase state over each step.
"""

from .geometry import SHAPES, Section
from .quenchants import Quenchant, load_quenchant
from .settings import SolverSettings


def __getattr__(name: str):
    # The FiPy solver loads on first use, so the case loader (geometry, quenchants, settings)
    # imports no FiPy.
    if name in ("BatchSolver", "CaseHistory"):
        from . import solver

        return getattr(solver, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


__all__ = ["SHAPES", "Section", "Quenchant", "load_quenchant", "BatchSolver", "CaseHistory", "SolverSettings"]
