#!/usr/bin/env python3
"""Times chainwell's order-2 eigen-solver against LAPACK (scipy's
eigh_tridiagonal with select='i': dstebz + dstein) on the same matrix, in one
run, and prints the time ratio and the largest eigenvalue difference in units
of eps * ||H||_1.

The matrix is the order-2 finite-difference Hamiltonian of a long chain
(bonds * 1.40 angstrom plus one bond at each end, a 1.0 eV cosine ripple of
period two bonds), built here exactly as chainwell builds it from the same
input file: H_ii = 2 t / h^2 + V(x_i), H_i,i+1 = -t / h^2 with
t = hbar^2 / (2 m_e), x_i = (i + 1) h, h = L / (N + 1).

Usage: python3 bench/against_scipy.py [--binary target/release/chainwell]
       [--points 1000000] [--repeat 3]
Needs numpy and scipy (pip install numpy scipy); build chainwell first with
cargo build --release.
"""
import argparse
import json
import math
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
from scipy.linalg import eigh_tridiagonal

# CODATA 2018 (as src/constants.rs): h, e exact; m_e.
PLANCK = 6.62607015e-34
CHARGE = 1.602176634e-19
M_E = 9.1093837015e-31
HBAR = PLANCK / (2 * math.pi)
T_KINETIC = HBAR * HBAR / (2 * M_E) / CHARGE / 1e-20  # eV A^2

BONDS = 1999
BOND = 1.40
ALTERNATION = 1.0


def chain_input(points, first, count):
    return f"""[chain]
bonds = {BONDS}
bond_length = {BOND}
alternation = {ALTERNATION}
[grid]
points = {points}
order = 2
[levels]
first = {first}
count = {count}
"""


def matrix(points):
    length = BONDS * BOND + 2 * BOND
    h = length / (points + 1)
    x = (np.arange(points) + 1.0) * h
    # Ripple minima at the centres of bonds 1, 3, ...: phase = c1 + b.
    c1 = BOND + 0.5 * BOND
    v = ALTERNATION * np.cos(2 * math.pi * (x - (c1 + BOND)) / (2 * BOND))
    d = 2 * T_KINETIC / h**2 + v
    e = np.full(points - 1, -T_KINETIC / h**2)
    return d, e


def run_chainwell(binary, points, first, count):
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "chain.toml")
        with open(path, "w") as f:
            f.write(chain_input(points, first, count))
        out = subprocess.run(
            [binary, "solve", path, "--json", "--no-estimate"],
            check=True, capture_output=True, text=True)
    doc = json.loads(out.stdout)
    return doc["timing"]["solve_s"], np.array([l["energy"] for l in doc["levels"]])


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--binary", default="target/release/chainwell")
    ap.add_argument("--points", type=int, nargs="*", default=[100_000, 1_000_000])
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()
    print(f"{'N':>9} {'levels':>10} {'scipy (s)':>10} {'chainwell (s)':>14} "
          f"{'ratio':>7} {'max diff / (eps ||H||)':>24}")
    for n in args.points:
        d, e = matrix(n)
        norm = np.max(np.abs(d)) + 2 * np.max(np.abs(e))
        for first, count in [(1, 20), (991, 20)]:
            ts, tc = [], []
            for _ in range(args.repeat):
                t0 = time.perf_counter()
                w, _ = eigh_tridiagonal(d, e, select="i",
                                        select_range=(first - 1, first + count - 2))
                ts.append(time.perf_counter() - t0)
                t, ours = run_chainwell(args.binary, n, first, count)
                tc.append(t)
            diff = np.max(np.abs(ours - w)) / (np.finfo(float).eps * norm)
            s, c = min(ts), min(tc)
            print(f"{n:>9} {f'{first}..{first + count - 1}':>10} {s:>10.3f} {c:>14.3f} "
                  f"{c / s:>7.3f} {diff:>24.2f}")
            sys.stdout.flush()


if __name__ == "__main__":
    main()
