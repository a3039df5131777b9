"""Tests of the chainwell Python module against closed forms and against the
command line's own output.

Run from the repository root after `pip install ./python`:

    python -m pytest python/tests

The comparison with `chainwell solve --json` uses the built binary at
$CHAINWELL_BIN, target/release/chainwell or target/debug/chainwell, and is
skipped when none exists.
"""

import math
import os
import pathlib
import shutil
import subprocess
import threading
import warnings

import numpy as np
import pytest

import chainwell

ROOT = pathlib.Path(__file__).resolve().parents[2]
POTENTIALS = ROOT / "potentials"

# CODATA 2022 (NIST, May 2024): h and e exact since the 2019 SI; m_e measured.
PLANCK_J_S = 6.62607015e-34
ELECTRON_MASS_KG = 9.1093837139e-31
ELEMENTARY_CHARGE_C = 1.602176634e-19
HBAR_J_S = PLANCK_J_S / (2 * math.pi)


def box_level_ev(n, length_angstrom, mass=1.0):
    """E_n = n^2 h^2 / (8 m L^2), the particle in a box with hard walls
    (Griffiths, Introduction to Quantum Mechanics, eq. 2.30)."""
    length_m = length_angstrom * 1e-10
    joule = n**2 * PLANCK_J_S**2 / (8 * mass * ELECTRON_MASS_KG * length_m**2)
    return joule / ELEMENTARY_CHARGE_C


BOX = {
    "title": "10 angstrom box",
    "domain": {"from": 0.0, "to": 10.0, "boundary": "walls"},
    "grid": {"points": 1000, "order": 8},
    "levels": {"count": 5},
}

CHAIN = """
[chain]
bonds = 5
bond_length = 1.40
end_extension = 1.40
alternation = 0.5

[grid]
spacing = 0.05
order = 4

[levels]
count = 8
"""


def test_box_energies_match_the_closed_form_to_1e_8():
    sol = chainwell.solve(BOX)
    assert isinstance(sol.energies, np.ndarray)
    assert sol.energies.dtype == np.float64
    assert list(sol.n) == [1, 2, 3, 4, 5]
    expected = np.array([box_level_ev(n, 10.0) for n in range(1, 6)])
    np.testing.assert_allclose(sol.energies, expected, rtol=1e-8, atol=0)
    # The same numbers as the document's levels.
    assert [lv["energy"] for lv in sol.to_dict()["levels"]] == list(sol.energies)


def test_the_first_wavefunction_is_normalised_on_the_grid():
    sol = chainwell.solve(BOX)
    assert sol.wavefunctions.shape == (len(sol.x), 5)
    assert sol.potential.shape == sol.x.shape
    h = sol.spacing
    np.testing.assert_allclose(np.diff(sol.x), h, rtol=1e-12)
    psi = sol.wavefunctions[:, 0]
    assert np.sum(psi**2) * h == pytest.approx(1.0, abs=1e-12)
    # The trapezoid rule over the whole box (psi = 0 on both walls, which are
    # not unknowns) gives the same integral.
    walls = np.concatenate([[0.0], psi**2, [0.0]])
    assert np.sum((walls[1:] + walls[:-1]) / 2) * h == pytest.approx(1.0, abs=1e-12)
    # Ground state of the box: sqrt(2/L) sin(pi x / L) (Griffiths eq. 2.31),
    # positive first lobe by the document's sign rule.
    exact = math.sqrt(2 / 10.0) * np.sin(math.pi * sol.x / 10.0)
    np.testing.assert_allclose(psi, exact, atol=1e-7)
    # Distinct levels are orthogonal on the grid.
    overlap = sol.wavefunctions.T @ sol.wavefunctions * h
    np.testing.assert_allclose(overlap, np.eye(5), atol=1e-10)


def test_a_dict_with_terms_gives_the_harmonic_oscillator():
    # [[term]] as a list of dicts. E_n = (n - 1/2) hbar omega for levels
    # n = 1, 2, ..., omega = sqrt(k / m) (Griffiths eq. 2.61, counted from 1).
    well = {
        "domain": {"from": -12.0, "to": 12.0},
        "grid": {"points": 2400, "order": 8},
        "levels": {"count": 4},
        "term": [{"shape": "harmonic", "center": 0.0, "stiffness": 1.0}],
    }
    sol = chainwell.solve(well)
    k_si = 1.0 * ELEMENTARY_CHARGE_C / 1e-20  # eV/angstrom^2 to J/m^2
    quantum_ev = HBAR_J_S * math.sqrt(k_si / ELECTRON_MASS_KG) / ELEMENTARY_CHARGE_C
    expected = [(n - 0.5) * quantum_ev for n in range(1, 5)]
    np.testing.assert_allclose(sol.energies, expected, rtol=1e-8)
    assert "[[term]]" in sol.to_dict()["input"]["text"]


def test_text_path_pathlike_and_dict_inputs_agree(tmp_path):
    text = (
        "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 1000\norder = 8\n"
        "[levels]\ncount = 5\n"
    )
    f = tmp_path / "box.toml"
    f.write_text(text)
    by_text = chainwell.solve(text).energies
    by_path = chainwell.solve(str(f)).energies
    by_pathlike = chainwell.solve(f).energies
    by_dict = chainwell.solve(BOX).energies
    assert list(by_text) == list(by_path) == list(by_pathlike) == list(by_dict)
    assert chainwell.solve(f).to_dict()["input"]["file"] == str(f)


def test_overrides_as_a_dict_or_as_texts():
    a = chainwell.solve(BOX, set={"domain.to": 12.0, "levels.count": 6})
    b = chainwell.solve(BOX, set=["domain.to=12.0", "levels.count=6"])
    assert list(a.energies) == list(b.energies)
    expected = [box_level_ev(n, 12.0) for n in range(1, 7)]
    np.testing.assert_allclose(a.energies, expected, rtol=1e-8)
    assert a.to_dict()["input"]["overrides"] == ["domain.to=12.0", "levels.count=6"]


def test_to_below_from_raises_value_error_naming_domain():
    bad = "[domain]\nfrom = 5.0\nto = 1.0\n[grid]\npoints = 100\n"
    with pytest.raises(ValueError) as info:
        chainwell.solve(bad)
    e = info.value
    assert isinstance(e, chainwell.InputError)
    assert "domain" in str(e)
    assert e.key.startswith("domain")
    assert e.file == "<string>"
    assert e.line in (2, 3)
    assert str(e).startswith("error: <string>:")


def test_a_bad_override_is_located_at_its_set():
    with pytest.raises(chainwell.InputError) as info:
        chainwell.solve(BOX, set={"grid.order": 5})
    assert "--set grid.order=5" in str(info.value)
    assert info.value.key == "grid.order"


def test_a_missing_file_is_a_value_error_naming_it(tmp_path):
    missing = tmp_path / "nothing.toml"
    with pytest.raises(ValueError, match="nothing.toml"):
        chainwell.solve(missing)


def test_a_computation_that_cannot_finish_raises_runtime_error():
    # 2^31 unknowns with 200 levels need far more memory than the limit:
    # the library refuses before allocating (a computation that cannot
    # finish here, not a fault of the input).
    with pytest.raises(RuntimeError, match=" GB"):
        chainwell.solve(BOX, set={"grid.points": 2**31, "levels.count": 200})


def test_warnings_reach_python():
    coarse = dict(BOX, grid={"points": 30, "order": 2}, levels={"count": 8})
    with pytest.warns(chainwell.ChainwellWarning):
        sol = chainwell.solve(coarse)
    assert sol.warnings


def test_sweep_over_three_bond_counts_gives_three_rows():
    result = chainwell.sweep(CHAIN, vary={"chain.bonds": [3, 5, 7]})
    assert len(result) == 3
    assert [r["value"] for r in result.rows] == [3, 5, 7]
    # Each case equals a solve of that chain.
    for row, bonds in zip(result, (3, 5, 7)):
        one = chainwell.solve(CHAIN, set={"chain.bonds": bonds})
        assert [lv["energy"] for lv in row["levels"]] == list(one.energies)
    # The tidy long form: one line per case and level, as the CSV.
    assert len(result.table) == 3 * 8
    assert list(result.table[0])[:4] == ["case", "chain.bonds", "n", "energy (eV)"]
    assert result.table[8]["chain.bonds"] == 5 and result.table[8]["n"] == 1
    assert result.to_dict()["format"] == "chainwell.sweep/1"


def test_sweep_to_pandas_is_the_tidy_table():
    pandas = pytest.importorskip("pandas")
    frame = chainwell.sweep(CHAIN, vary={"chain.bonds": "3:7:2"}).to_pandas()
    assert isinstance(frame, pandas.DataFrame)
    assert len(frame) == 24
    assert sorted(frame["chain.bonds"].unique()) == [3, 5, 7]


def test_a_bad_vary_value_names_its_case():
    with pytest.raises(chainwell.InputError, match="--vary chain.bonds=3,0"):
        chainwell.sweep(CHAIN, vary={"chain.bonds": [3, 0]})


def test_fit_recovers_the_value_that_made_the_data():
    # Data made by the model itself at chain.alternation = 0.7: the fit from
    # 0.5 must come back to 0.7 (a self-consistency check of the fit loop;
    # the model itself is checked against closed forms above).
    small = {"levels.count": 4, "levels.electrons": 6}
    made = chainwell.sweep(
        CHAIN, vary={"chain.bonds": [3, 5, 7, 9]}, set=dict(small, **{"chain.alternation": 0.7})
    )
    data = {
        "chain.bonds": [r["value"] for r in made.rows],
        "energy.4": [r["levels"][3]["energy"] for r in made.rows],
    }
    fitted = chainwell.fit(CHAIN, data, free="chain.alternation", set=small)
    assert fitted.values["chain.alternation"] == pytest.approx(0.7, abs=1e-6)
    assert fitted.rms < 1e-8
    assert len(fitted) == 4
    assert fitted.to_dict()["format"] == "chainwell.fit/1"


def test_fit_reads_a_csv_file_with_bounds_and_uncertainties(tmp_path):
    small = {"levels.count": 5}
    made = chainwell.sweep(
        CHAIN, vary={"chain.bonds": [3, 5, 7]}, set=dict(small, **{"chain.alternation": 0.8})
    )
    lines = ["chain.bonds,energy.2,uncertainty"]
    lines += [f"{r['value']},{r['levels'][1]['energy']!r},0.01" for r in made.rows]
    data = tmp_path / "series.csv"
    data.write_text("\n".join(lines) + "\n")
    fitted = chainwell.fit(
        CHAIN,
        data,
        free=["chain.alternation"],
        bounds={"chain.alternation": (0.0, 2.0)},
        set=small,
    )
    assert fitted.values["chain.alternation"] == pytest.approx(0.8, abs=1e-6)
    assert fitted.key == "chain.bonds" and fitted.quantity == "energy.2"
    assert fitted.to_dict()["input"]["data"] == str(data)
    # A fault in the data names the file and the line.
    data.write_text("chain.bonds,energy.2\n3,abc\n")
    with pytest.raises(chainwell.InputError, match=r"series.csv:2"):
        chainwell.fit(CHAIN, data, free="chain.alternation", set=small)


def test_free_bands_are_the_free_electron_parabola():
    # An empty periodic cell: band 1 is hbar^2 k^2 / 2m for |k| <= pi/a
    # (the empty lattice, Ashcroft & Mermin ch. 9).
    cell = {
        "domain": {"from": 0.0, "to": 3.0, "boundary": "periodic"},
        "grid": {"points": 300, "order": 8},
        "levels": {"count": 3},
    }
    result = chainwell.bands(cell, kpoints=11)
    assert result.k[0] == 0.0
    assert result.k[-1] == pytest.approx(math.pi / 3.0, rel=1e-12)
    k_m = result.k * 1e10
    parabola = HBAR_J_S**2 * k_m**2 / (2 * ELECTRON_MASS_KG) / ELEMENTARY_CHARGE_C
    np.testing.assert_allclose(result.energies[0], parabola, rtol=1e-7, atol=1e-9)
    assert len(result.table) == 11 * 3


def test_bands_of_the_demo_polymer_have_a_gap():
    result = chainwell.bands(POTENTIALS / "polymer_cell.toml", kpoints=9)
    assert result.energies.shape == (10, 9)
    first = result.gaps[0]
    assert first["below"] == 1 and first["above"] == 2 and first["size"] > 0


def test_solves_in_threads_agree():
    # The GIL is released while chainwell computes; solves in threads must
    # give the same numbers as one after the other.
    alone = chainwell.solve(BOX).energies
    out = [None] * 4

    def work(i):
        out[i] = chainwell.solve(BOX).energies

    threads = [threading.Thread(target=work, args=(i,)) for i in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    for e in out:
        assert list(e) == list(alone)


def _binary():
    for candidate in (
        os.environ.get("CHAINWELL_BIN"),
        ROOT / "target" / "release" / "chainwell",
        ROOT / "target" / "debug" / "chainwell",
        shutil.which("chainwell"),
    ):
        if candidate and os.path.isfile(candidate) and os.access(candidate, os.X_OK):
            return str(candidate)
    return None


def _cli_json(binary, *args):
    out = subprocess.run(
        [binary, *args], cwd=ROOT, check=True, capture_output=True, text=True
    ).stdout
    import json

    return json.loads(out)


@pytest.mark.parametrize(
    "name", ["ideal_box.toml", "alternating_chain.toml", "heteroatom_chain.toml"]
)
def test_to_dict_is_the_solve_json_of_the_command(name, monkeypatch):
    binary = _binary()
    if binary is None:
        pytest.skip("no built chainwell binary (cargo build --release)")
    monkeypatch.chdir(ROOT)
    rel = f"potentials/{name}"
    expected = _cli_json(binary, "solve", rel, "--json", "--no-timing", "--set", "levels.count=6")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", chainwell.ChainwellWarning)
        got = chainwell.solve(rel, set=["levels.count=6"]).to_dict(timing=False)
    assert got == expected


def test_sweep_to_dict_is_the_sweep_json_of_the_command(monkeypatch):
    binary = _binary()
    if binary is None:
        pytest.skip("no built chainwell binary (cargo build --release)")
    monkeypatch.chdir(ROOT)
    rel = "potentials/alternating_chain.toml"
    expected = _cli_json(
        binary, "sweep", rel, "--vary", "chain.bonds=3,5,7", "--set", "grid.spacing=0.05", "--json"
    )
    got = chainwell.sweep(rel, vary={"chain.bonds": [3, 5, 7]}, set={"grid.spacing": 0.05})
    assert got.to_dict() == expected


def test_the_readme_notebook_example_runs(monkeypatch):
    import importlib.util
    import re

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.*?)```", readme, re.S)
    assert blocks, "the README shows a Python example"
    monkeypatch.chdir(ROOT)
    has_pandas = importlib.util.find_spec("pandas") is not None
    scope = {}
    for block in blocks:
        code = compile(block, "README.md", "exec")
        if has_pandas:
            exec(code, scope)
        else:
            # Without pandas only the last line (to_pandas) may fail, and it
            # says what is missing.
            with pytest.raises(ImportError, match="pandas"):
                exec(code, scope)
    assert len(scope["series"]) == 3
    assert scope["sol"].energies.size > 0
    if has_pandas:
        assert len(scope["frame"]) == sum(len(r["levels"]) for r in scope["series"].rows)


def test_an_interrupt_stops_a_long_sweep():
    import _thread

    # Thousands of cases: far more than the time before the interrupt. The
    # interrupt raises the sweep's stop flag, the sweep stops at its next
    # case, and KeyboardInterrupt reaches the caller.
    timer = threading.Timer(0.5, _thread.interrupt_main)
    timer.start()
    try:
        with pytest.raises(KeyboardInterrupt):
            chainwell.sweep(
                CHAIN,
                vary={"chain.bonds": "3:6000"},
                set={"grid.spacing": 0.1, "grid.order": 2, "levels.count": 4},
            )
    finally:
        timer.cancel()
