"""Heat conduction through the section: geometry and mesh, properties, quenchants, FiPy solver.

This package knows nothing of transformation kinetics: the solver asks a stepper object
(any object with ``advance`` and ``fractions``) to advance the phase state over each step.
"""

from .geometry import SHAPES, Section
from .quenchants import Quenchant, load_quenchant
from .solver import BatchSolver, CaseHistory, SolverSettings

__all__ = ["SHAPES", "Section", "Quenchant", "load_quenchant", "BatchSolver", "CaseHistory", "SolverSettings"]
