#!/usr/bin/env python3
"""An independent finite-field computation of the static polarizability and
second hyperpolarizability of electrons in a hard-walled box, for checking
chainwell's response equations (tests/response.rs quotes its output).

Independent of chainwell: its own constants, its own second-order
finite-difference Hamiltonian (dense, numpy's eigh), and no perturbation
theory at all. A field F (V/angstrom) along x adds e F x to each electron's
energy; the total energy of the filled levels, E(F) = sum of occupied
eigenvalues (two electrons per level), is computed at F = +-k F0, and the
even part (E(F) + E(-F)) / 2 - E(0) is fitted by least squares with
-alpha F^2/2 - gamma F^4/24 + c6 F^6 + c8 F^8 (the convention
E(F) = E0 - mu F - alpha F^2/2 - beta F^3/6 - gamma F^4/24). The grid is
refined twice and the results extrapolated in h^2 (Richardson), since the
second-order error falls as h^2.

Units: alpha in e^2 A^2 / eV (times 14.3996 for A^3), gamma in
e^4 A^4 / eV^3; atomic units printed beside.

Usage: python3 bench/response_finite_field.py [--length 10] [--electrons 2]
       [--points 800]   (needs numpy only)
"""
import argparse

import numpy as np

# CODATA 2018: h, e exact; m_e; a0; Eh in eV.
PLANCK = 6.62607015e-34
CHARGE = 1.602176634e-19
MASS = 9.1093837015e-31
BOHR_A = 0.529177210903
HARTREE_EV = 27.211386245988
HBAR = PLANCK / (2 * np.pi)
T = HBAR**2 / (2 * MASS) / CHARGE * 1e20  # hbar^2/2m in eV A^2


def total_energy(length, points, electrons, field):
    h = length / (points + 1)
    x = h * np.arange(1, points + 1)
    ham = np.diag(2 * T / h**2 + field * x)
    off = -T / h**2 * np.ones(points - 1)
    ham += np.diag(off, 1) + np.diag(off, -1)
    e = np.linalg.eigvalsh(ham)
    full, half = divmod(electrons, 2)
    return 2 * e[:full].sum() + (e[full] if half else 0.0)


def coefficients(length, points, electrons, f0, steps):
    fields = f0 * np.arange(1, steps + 1)
    e0 = total_energy(length, points, electrons, 0.0)
    even = np.array(
        [
            0.5 * (total_energy(length, points, electrons, f)
                   + total_energy(length, points, electrons, -f)) - e0
            for f in fields
        ]
    )
    design = np.stack([fields**2, fields**4, fields**6, fields**8], axis=1)
    c, *_ = np.linalg.lstsq(design, even, rcond=None)
    return -2 * c[0], -24 * c[1]


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--length", type=float, default=10.0)
    ap.add_argument("--electrons", type=int, default=2)
    ap.add_argument("--points", type=int, default=800)
    ap.add_argument("--field", type=float, default=0.01, help="F0, V/A")
    ap.add_argument("--steps", type=int, default=6)
    a = ap.parse_args()
    rows = []
    for k in (1, 2, 4):
        n = a.points * k + (k - 1)  # h halves exactly: (n + 1) doubles
        alpha, gamma = coefficients(a.length, n, a.electrons, a.field, a.steps)
        rows.append((n, alpha, gamma))
        print(f"points {n:6d}: alpha {alpha:.10f} e^2 A^2/eV, gamma {gamma:.8f} e^4 A^4/eV^3")
    # Richardson in h^2 on the two finest grids: X = (4 X_fine - X_coarse) / 3.
    alpha = (4 * rows[2][1] - rows[1][1]) / 3
    gamma = (4 * rows[2][2] - rows[1][2]) / 3
    print(f"extrapolated: alpha {alpha:.10f} e^2 A^2/eV = {alpha * HARTREE_EV * BOHR_A:.8f} A^3"
          f" = {alpha * HARTREE_EV / BOHR_A**2:.6f} a.u.")
    print(f"extrapolated: gamma {gamma:.8f} e^4 A^4/eV^3 = {gamma * HARTREE_EV**3 / BOHR_A**4:.6f} a.u.")


if __name__ == "__main__":
    main()
