"""The README's figure of the alternating chain's states (docs/figures/
chain_states.svg), remade in a notebook's way with matplotlib: the potential
of the chain, and levels 3 to 9 drawn at their energies, each with its
wavefunction, filled levels solid and empty ones dashed.

    pip install ./python matplotlib
    python python/examples/chain_states.py [OUT.png]

Without matplotlib the script says so and stops (exit status 0).
"""

import pathlib
import sys

import numpy as np

import chainwell

try:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
except ImportError:
    print("matplotlib is not installed: pip install matplotlib (nothing drawn)")
    sys.exit(0)

root = pathlib.Path(__file__).resolve().parents[2]
out = pathlib.Path(sys.argv[1] if len(sys.argv) > 1 else "chain_states.png")

# In a notebook cell, the first three lines are all it takes.
sol = chainwell.solve(root / "potentials" / "alternating_chain.toml")
shown = [j for j, n in enumerate(sol.n) if 3 <= n <= 9]
e_unit, x_unit = sol.units["energy"], sol.units["length"]

# Walls: the grid's unknowns leave out the two ends, where psi = 0.
h = sol.spacing
x = np.concatenate([[sol.x[0] - h], sol.x, [sol.x[-1] + h]])
v = np.concatenate([[sol.potential[0]], sol.potential, [sol.potential[-1]]])

# Wavefunctions scaled to a fraction of the level spacing, so they do not overlap.
spacing = np.min(np.diff(sol.energies[shown]))
scale = 0.4 * spacing / np.max(np.abs(sol.wavefunctions[:, shown]))

fig, ax = plt.subplots(figsize=(8, 5.5))
ax.plot(x, v, color="0.35", lw=1.2, label="potential")
homo = sol.occupancy["homo"] if sol.occupancy else 0
for j in shown:
    n, e = int(sol.n[j]), sol.energies[j]
    psi = np.concatenate([[0.0], sol.wavefunctions[:, j], [0.0]])
    style = "-" if n <= homo else "--"
    ax.axhline(e, color="0.8", lw=0.6, ls=style)
    ax.plot(x, e + scale * psi, ls=style, lw=1.3)
    ax.text(x[-1], e, f" n={n}", va="center", fontsize=8)
ax.set_xlabel(f"x / {x_unit}")
ax.set_ylabel(f"energy / {e_unit}")
ax.set_title(sol.to_dict()["input"]["checked"]["title"] or "states")
fig.tight_layout()
fig.savefig(out, dpi=120)
print(f"wrote {out}")
