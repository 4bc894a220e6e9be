"""The linear algebra of one integrator step: FiPy's discretization of the diffusion operator,
taken once, rescaled by the face conductances of the step and solved as a symmetric banded system
(thermal/integrator.py, "Linear algebra")."""

from __future__ import annotations

import fipy as fp
import numpy as np
from scipy.linalg import solveh_banded


def unit_face_conductances(mesh, face_ids: np.ndarray, face_cells: np.ndarray) -> np.ndarray:
    """FiPy's geometric factor of each listed face (area over centre distance, A_f / d_f), read from
    the matrix FiPy assembles for a DiffusionTerm with coefficient 1 on those faces and 0 elsewhere.

    >>> import fipy as fp
    >>> mesh = fp.Grid1D(dx=[1.0, 3.0])
    >>> unit_face_conductances(mesh, np.array([1]), np.array([[0, 1]])).tolist()
    [0.5]
    """
    values = np.zeros(mesh.numberOfFaces)
    values[face_ids] = 1.0
    coeff = fp.FaceVariable(mesh=mesh, value=values)
    probe = fp.CellVariable(mesh=mesh, value=0.0)
    term = fp.DiffusionTerm(coeff=coeff)
    term.cacheMatrix()
    term.justResidualVector(var=probe, dt=1.0)
    matrix = term.matrix.matrix.tocsr()
    unit = np.asarray(matrix[face_cells[:, 0], face_cells[:, 1]]).ravel()
    if unit.size and not np.all(unit > 0):
        raise ValueError("a listed face does not connect its two cells in FiPy's mesh")
    return unit


class BandedDiffusion:
    """The symmetric banded matrix diag(d) - sum_f c_f u_f (e_a - e_b)(e_a - e_b)^T of one step,
    in LAPACK's upper banded storage, and its solve."""

    def __init__(self, n: int, face_cells: np.ndarray, unit: np.ndarray):
        a, b = np.minimum(face_cells[:, 0], face_cells[:, 1]), np.maximum(face_cells[:, 0], face_cells[:, 1])
        self.n, self.a, self.b, self.unit = n, a, b, unit
        offset = b - a
        self.bandwidth = int(offset.max()) if offset.size else 0
        self.row = self.bandwidth - offset

    def solve(self, diagonal: np.ndarray, conductance: np.ndarray, rhs: np.ndarray) -> np.ndarray:
        cu = conductance * self.unit
        if self.bandwidth == 0:
            return rhs / diagonal
        ab = np.zeros((self.bandwidth + 1, self.n))
        ab[self.bandwidth] = diagonal + np.bincount(self.a, cu, self.n) + np.bincount(self.b, cu, self.n)
        ab[self.row, self.b] = -cu
        return solveh_banded(ab, rhs, check_finite=False, overwrite_ab=True, overwrite_b=False)
