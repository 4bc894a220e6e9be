"""Numerical settings of the thermal solvers (mesh and step control), kept free of FiPy.

The case loader builds SolverSettings from [mesh] / [time] and must stay light to import (no FiPy,
no matplotlib), so the settings live here and not beside the solver.
"""

from __future__ import annotations

from dataclasses import dataclass, replace


#: Largest ratio of the widest to the narrowest cell of a section. [mesh] growth is a rate per cell,
#: so 1.08 over 420 cells would make cells 1e14 times narrower at the surface than at the centre
#: and the matrix exactly singular; the growth is lowered to keep this ratio (at the default 40
#: cells and 1.08 the ratio is 20, so default meshes are unchanged).
MAX_CELL_RATIO = 100.0


def mesh_growth(cells: int, growth: float, graded_cells: int | None = None) -> float:
    """The growth actually used: `growth`, lowered so that growth**(graded_cells - 1) stays within
    MAX_CELL_RATIO (graded_cells: cells in one graded run, default all of them).

    >>> mesh_growth(40, 1.08)
    1.08
    >>> round(mesh_growth(2000, 1.08) ** 1999, 6)
    100.0
    """
    n = max((cells if graded_cells is None else graded_cells) - 1, 1)
    return min(float(growth), MAX_CELL_RATIO ** (1.0 / n))


@dataclass(frozen=True)
class StepControl:
    """Limits of the adaptive time step of the integrator (thermal/integrator.py), shared by the
    settings of every solver: per step, about max_temperature_step_k of temperature change,
    max_fraction_step of phase fraction, max_relative_step of a node's distance from the bath and
    max_film_step of rise in a surface's film coefficient (as ln(h_new / h_old), 0: no limit; see
    SolverSettings); the step grows by at most max_step_growth; a solve stops with an error after
    max_steps steps or max_time_s of quench time."""

    max_temperature_step_k: float = 12.0
    max_fraction_step: float = 0.05
    max_relative_step: float = 0.15
    max_film_step: float = 0.0
    first_step_s: float = 0.001
    max_step_growth: float = 1.5
    max_steps: int = 50000
    max_time_s: float = 1.0e6

    def refined_steps(self, times: int = 1) -> dict:
        """The step limits halved `times` times (and the step budget doubled as often), as keyword
        arguments for dataclasses.replace; the subclasses refine their meshes beside them."""
        f = 2 ** times
        return dict(max_temperature_step_k=self.max_temperature_step_k / f, max_fraction_step=self.max_fraction_step / f,
                    max_relative_step=self.max_relative_step / f, max_film_step=self.max_film_step / f,
                    first_step_s=self.first_step_s / f,
                    max_steps=self.max_steps * f)


@dataclass(frozen=True)
class SolverSettings(StepControl):
    """Numerics of the sections: mesh cells per section and geometric growth of cell width away from
    quenched surfaces, with the step limits of StepControl.

    first_step_s = 1 ms resolves the first instants at a severe surface (error at the surface of a
    Bi = 10 section 0.1 % instead of 0.9 % with 5 ms) for about 4 more steps per case.

    max_film_step = 0.1: a vapour blanket that breaks multiplies h about ten-fold within 25 K; taken
    in two 12 K steps its break came late, and the surface of a 40 mm bar in a sharply breaking oil
    read 54.6 HRC against 56.6 with the steps refined; with the limit 56.5, for 27 % more steps there
    and 15-25 % with the built-in curves (tests/thermal/test_film_step.py, benchmarks/README.md). The (r, z) parts and the end-quench specimen keep it off:
    there the break sweeps over many surface rows one after another and the limit held every step
    of a 40 x 320 mm bar small (3.3 times the steps) without bringing its answer closer."""

    cells: int = 40
    growth: float = 1.08
    max_film_step: float = 0.1

    def refined(self, times: int = 1) -> "SolverSettings":
        """The same numerics with the cells doubled and the step limits halved `times` times."""
        f = 2 ** times
        return replace(self, cells=self.cells * f, growth=self.growth ** (1.0 / f), **self.refined_steps(times))
