"""chainwell in Python: levels, wavefunctions, transition dipoles and spectra
of one-dimensional potentials, for the pi electrons of conjugated chains.

The module wraps the chainwell library (compiled, in ``chainwell._chainwell``),
not the command line; every function takes the same input as the command
(a TOML file, TOML text, or a dict of the same structure) and gives the same
document as the command's ``--json``:

>>> import chainwell
>>> box = {"domain": {"from": 0.0, "to": 10.0}, "grid": {"points": 400, "order": 8},
...        "levels": {"count": 3}}
>>> sol = chainwell.solve(box)
>>> sol.energies                      # eV, as the input's [units] say
>>> sol.wavefunctions[:, 0]           # level 1 on the grid sol.x
>>> sol.to_dict()["format"]
'chainwell.solve/1'

Errors: a fault in the input or an argument raises :class:`InputError` (a
``ValueError``) whose text is the message the command line prints, naming the
file, line and key; a computation that cannot finish raises ``RuntimeError``.
What the user should know about the numbers is also issued as a
:class:`ChainwellWarning`. The GIL is released while chainwell computes.
"""

from __future__ import annotations

import csv
import io
import json
import numbers
import os
import warnings as _warnings
from collections.abc import Iterable, Mapping

import numpy as np

from . import _chainwell
from ._chainwell import InputError

__version__ = _chainwell.__version__

__all__ = [
    "solve",
    "sweep",
    "fit",
    "bands",
    "Solution",
    "Sweep",
    "Fit",
    "Bands",
    "InputError",
    "ChainwellWarning",
]


class ChainwellWarning(UserWarning):
    """What the user should know about a result (a coarse grid, states that
    feel the domain's edges, ...): the warnings the command line prints."""


# ----------------------------------------------------------------------------
# Arguments


def _source(input):
    """The keyword arguments naming an input for the compiled functions."""
    if isinstance(input, os.PathLike):
        return {"path": os.fspath(input)}
    if isinstance(input, Mapping):
        return {"text": _chainwell.to_toml(_plain(input)), "name": "<dict>"}
    if isinstance(input, str):
        if "\n" in input:
            return {"text": input}
        if os.path.exists(input):
            return {"path": input}
        if "=" in input or input.lstrip().startswith("["):
            return {"text": input}
        return {"path": input}
    raise TypeError(
        "input must be TOML text, a path (str or os.PathLike) or a dict, "
        f"not {type(input).__name__}"
    )


def _plain(value):
    """Mappings as dicts and tuples as lists, all the way down."""
    if isinstance(value, Mapping):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    return value


def _sets(set):
    """``set`` as ``KEY=VALUE`` texts: a dict of values, one text, or a list
    of texts."""
    if set is None:
        return []
    if isinstance(set, Mapping):
        return [f"{k}={_chainwell.to_toml(_plain(v), inline=True)}" for k, v in set.items()]
    if isinstance(set, str):
        return [set]
    out = list(set)
    for s in out:
        if not isinstance(s, str):
            raise TypeError(f"set: expected a dict or KEY=VALUE strings, got {s!r}")
    return out


def _number_text(key, v):
    if isinstance(v, bool) or not isinstance(v, numbers.Real):
        raise TypeError(f"vary {key}: values must be numbers, got {v!r}")
    if isinstance(v, numbers.Integral):
        return str(int(v))
    return repr(float(v))


def _list_text(key, values):
    """A number, a range text, or numbers, as the text after ``KEY=``."""
    if isinstance(values, str):
        return values
    if isinstance(values, numbers.Real) and not isinstance(values, bool):
        return _number_text(key, values)
    if isinstance(values, Iterable):
        return ",".join(_number_text(key, v) for v in values)
    raise TypeError(f"{key}: expected numbers or a START:STOP[:STEP] text, got {values!r}")


def _varies(vary):
    if vary is None:
        return []
    if isinstance(vary, Mapping):
        return [f"{k}={_list_text(k, v)}" for k, v in vary.items()]
    if isinstance(vary, str):
        return [vary]
    return list(vary)


def _cell(text):
    """A CSV cell as a number (int when whole), None when empty."""
    if text == "":
        return None
    try:
        return int(text)
    except ValueError:
        pass
    try:
        return float(text)
    except ValueError:
        return text


def _table(csv_text):
    """The rows of a CSV text as dicts, numbers parsed."""
    reader = csv.DictReader(io.StringIO(csv_text))
    return [{k: _cell(v) for k, v in row.items()} for row in reader]


def _frame(rows, columns=None):
    try:
        import pandas
    except ImportError as e:  # pragma: no cover - depends on the environment
        raise ImportError("to_pandas() needs pandas: pip install pandas") from e
    return pandas.DataFrame(rows, columns=columns)


def _warn(messages):
    for w in messages:
        _warnings.warn(w, ChainwellWarning, stacklevel=3)


def _readonly(a):
    if isinstance(a, np.ndarray):
        a.flags.writeable = False
    return a


# ----------------------------------------------------------------------------
# Results


class Solution:
    """One solve: the ``chainwell solve --json`` document and the arrays.

    Attributes (in the input's units, as ``units`` names them):

    - ``n``: level numbers (int array), ``energies``: their energies;
    - ``x``: the grid points (the unknowns; hard walls are not among them),
      ``spacing``: the grid spacing;
    - ``potential``: V at ``x``;
    - ``wavefunctions``: one column per level, ``wavefunctions[:, j]`` the
      level ``n[j]``, normalised so that ``sum(psi**2) * spacing == 1`` (the
      document's convention; in 1/sqrt(length unit));
    - ``occupations``: electrons in each level (None without electrons);
    - ``levels``, ``occupancy``, ``transitions``, ``warnings``, ``units``,
      ``box_length``: the document's entries of those names.
    """

    def __init__(self, raw):
        self._json = raw["json"]
        doc = json.loads(self._json)
        self.units = doc["units"]
        self.box_length = doc.get("box_length")
        self.levels = doc["levels"]
        self.occupancy = doc.get("occupancy")
        self.transitions = doc.get("transitions", [])
        self.warnings = doc.get("warnings", [])
        self.n = _readonly(raw["n"])
        self.energies = _readonly(raw["energies"])
        self.x = _readonly(raw["x"])
        self.spacing = raw["spacing"]
        self.potential = _readonly(raw["potential"])
        self.wavefunctions = _readonly(raw["wavefunctions"])
        self.occupations = _readonly(raw["occupations"])

    def to_dict(self, timing=True):
        """The ``chainwell solve --json`` document (a fresh copy).
        ``timing=False`` leaves out ``timing``, as ``--no-timing`` does."""
        doc = json.loads(self._json)
        if not timing:
            doc.pop("timing", None)
        return doc

    def to_json(self):
        """The document as compact JSON text (with timing)."""
        return self._json

    def __repr__(self):
        e = self.units.get("energy", "eV")
        shown = ", ".join(f"{v:.6g}" for v in self.energies[:4])
        more = ", ..." if len(self.energies) > 4 else ""
        return f"<chainwell.Solution: {len(self.energies)} levels [{shown}{more}] {e}>"


class Sweep:
    """A sweep: one row per case, as the ``chainwell.sweep/1`` document.

    - ``rows`` (also ``len()``, iteration and indexing): the document's rows,
      one dict per case (``case``, ``value``, ``levels``, ``occupancy``, ...);
    - ``table``: the tidy long form of ``chainwell sweep --csv``, one dict per
      case and level (``case``, the varied keys, ``n``, ``energy (eV)``,
      ``occupied``, ``homo``, ``lumo``, ``gap (eV)``, ``wavelength (nm)``;
      the input's energy unit in place of eV);
    - ``to_pandas()``: ``table`` as a DataFrame; ``to_dict()``: the document.
    """

    def __init__(self, raw):
        self._json = raw["json"]
        doc = json.loads(self._json)
        self.rows = doc["rows"]
        self.keys = doc.get("keys") or [doc["key"]]
        self.units = doc["units"]
        self._csv = raw["csv"]
        self.table = _table(self._csv)
        self._columns = next(csv.reader(io.StringIO(self._csv)))
        # Each distinct warning once, with the first case that gave it, as
        # the command line prints them.
        self.warnings = []
        seen = set()
        for row in self.rows:
            label = " ".join(
                f"{k}={v}" for k, v in zip(self.keys, row.get("values", [row["value"]]))
            )
            for w in row.get("warnings", []):
                if w not in seen:
                    seen.add(w)
                    self.warnings.append(f"case {label} (and maybe others): {w}")

    def to_dict(self):
        """The ``chainwell sweep --json`` document (a fresh copy)."""
        return json.loads(self._json)

    def to_pandas(self):
        """The tidy long form (``table``) as a pandas DataFrame."""
        return _frame(self.table, columns=self._columns)

    def to_csv(self):
        """The text ``chainwell sweep --csv FILE`` writes."""
        return self._csv

    def __len__(self):
        return len(self.rows)

    def __iter__(self):
        return iter(self.rows)

    def __getitem__(self, i):
        return self.rows[i]

    def __repr__(self):
        return f"<chainwell.Sweep over {', '.join(self.keys)}: {len(self.rows)} cases>"


class Fit:
    """A fit: the ``chainwell.fit/1`` document.

    - ``parameters``: one dict per free key (``key``, ``value``,
      ``uncertainty``, ``start``), also as ``values`` (key -> value);
    - ``rows``: one dict per data row (``value``, ``observed``, ``model``,
      ``residual``, ``uncertainty``); ``rms``, ``chi2``, ``dof``;
    - ``to_pandas()``: ``rows`` as a DataFrame; ``to_dict()``: the document.
    """

    def __init__(self, raw):
        self._json = raw["json"]
        doc = json.loads(self._json)
        self.parameters = doc["parameters"]
        self.values = {p["key"]: p["value"] for p in self.parameters}
        self.rows = doc["rows"]
        self.rms = doc["rms"]
        self.chi2 = doc["chi2"]
        self.dof = doc["dof"]
        self.key = doc["key"]
        self.quantity = doc["quantity"]
        self.units = doc["units"]

    def to_dict(self):
        """The ``chainwell fit --json`` document (a fresh copy)."""
        return json.loads(self._json)

    def to_pandas(self):
        """``rows`` as a pandas DataFrame."""
        return _frame(self.rows)

    def __len__(self):
        return len(self.rows)

    def __iter__(self):
        return iter(self.rows)

    def __getitem__(self, i):
        return self.rows[i]

    def __repr__(self):
        shown = ", ".join(f"{k}={v:.6g}" for k, v in self.values.items())
        return f"<chainwell.Fit {shown}, rms {self.rms:.3g}>"


class Bands:
    """Bands of the infinite chain: the ``chainwell.bands/1`` document.

    - ``k``: wavevectors from 0 to pi/period (1/length unit);
    - ``energies``: array of shape (bands, k), ``energies[b, i]`` band
      ``b + 1`` at ``k[i]``;
    - ``gaps``: the document's gaps; ``warnings``;
    - ``table``: the tidy rows of ``chainwell bands --csv`` (one per
      wavevector and band); ``to_pandas()`` gives it as a DataFrame;
      ``to_dict()``: the document.
    """

    def __init__(self, raw):
        self._json = raw["json"]
        doc = json.loads(self._json)
        self.k = _readonly(np.asarray(doc["k"], dtype=float))
        self.energies = _readonly(np.asarray(doc["bands"], dtype=float))
        self.gaps = doc.get("gaps", [])
        self.units = doc["units"]
        self.warnings = list(raw["warnings"])
        self._csv = raw["csv"]
        self.table = _table(self._csv)
        self._columns = next(csv.reader(io.StringIO(self._csv)))

    def to_dict(self):
        """The ``chainwell bands --json`` document (a fresh copy)."""
        return json.loads(self._json)

    def to_pandas(self):
        """``table`` as a pandas DataFrame."""
        return _frame(self.table, columns=self._columns)

    def to_csv(self):
        """The text ``chainwell bands --csv FILE`` writes."""
        return self._csv

    def __repr__(self):
        return f"<chainwell.Bands: {self.energies.shape[0]} bands at {len(self.k)} wavevectors>"


# ----------------------------------------------------------------------------
# Functions


def solve(input, set=None, *, estimate=True):
    """Solves one input, as ``chainwell solve --json`` does.

    ``input``: TOML text, a path (str or os.PathLike) or a dict of the same
    structure (``{"domain": {"from": 0.0, "to": 10.0}, "term": [{...}]}``).
    ``set``: overrides, a dict ``{"grid.points": 2000}`` or ``KEY=VALUE``
    strings, as ``--set``. ``estimate=False`` skips the error estimate (two
    coarser solves), as ``--no-estimate``. Returns a :class:`Solution`.
    """
    sol = Solution(_chainwell.solve(**_source(input), set=_sets(set), estimate=estimate))
    _warn(sol.warnings)
    return sol


def sweep(input, vary, set=None):
    """One solve per case of a grid of values, as ``chainwell sweep``.

    ``vary``: a dict of key -> values (a list of numbers, or a
    ``"START:STOP[:STEP]"`` text); several keys make a grid. Returns a
    :class:`Sweep` whose rows are the cases.
    """
    result = Sweep(_chainwell.sweep(**_source(input), vary=_varies(vary), set=_sets(set)))
    _warn(result.warnings)
    return result


def _data(data):
    """The keyword arguments naming a fit's data."""
    if isinstance(data, os.PathLike):
        return {"data_path": os.fspath(data)}
    if isinstance(data, str):
        if "\n" not in data and os.path.exists(data):
            return {"data_path": data}
        if "\n" in data or "," in data:
            return {"data_text": data}
        return {"data_path": data}
    if hasattr(data, "to_csv"):  # a pandas DataFrame
        return {"data_text": data.to_csv(index=False), "data_name": "<DataFrame>"}
    if isinstance(data, Mapping):
        columns = list(data)
        rows = zip(*(list(data[c]) for c in columns))
        return {"data_text": _csv_text(columns, rows), "data_name": "<dict>"}
    if isinstance(data, Iterable):
        rows = [dict(r) for r in data]
        columns = list(rows[0]) if rows else []
        return {
            "data_text": _csv_text(columns, ([r.get(c) for c in columns] for r in rows)),
            "data_name": "<rows>",
        }
    raise TypeError(
        "data must be a CSV path or text, a dict of columns, a list of dicts or a DataFrame"
    )


def _csv_text(columns, rows):
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(columns)
    for r in rows:
        w.writerow(["" if v is None else v for v in r])
    return out.getvalue()


def fit(input, data, free, bounds=None, set=None):
    """Fits input values to a measured series, as ``chainwell fit --data``.

    ``data``: a CSV path or text whose header names the varied key and the
    observed quantity (``chain.bonds,wavelength_nm``, optional
    ``uncertainty``), or the same columns as a dict, a list of dicts or a
    DataFrame. ``free``: the keys to adjust (a list, or ``"a,b"``); start
    values come from the input or ``set``. ``bounds``: key -> (lower, upper),
    either may be None. Returns a :class:`Fit`.
    """
    if isinstance(free, str):
        free = [k.strip() for k in free.split(",") if k.strip()]
    bound_list = []
    for k, b in (bounds or {}).items():
        lo, hi = b
        bound_list.append(
            (k, None if lo is None else float(lo), None if hi is None else float(hi))
        )
    return Fit(
        _chainwell.fit(
            **_source(input), **_data(data), free=list(free), bounds=bound_list, set=_sets(set)
        )
    )


def bands(input, kpoints=41, finite=None, set=None):
    """The bands of the infinite chain, as ``chainwell bands``.

    ``kpoints``: wavevectors from 0 to pi/period (at least 2). ``finite``:
    bond counts of finite chains to lay beside the band edges (a list, or a
    ``"START:STOP[:STEP]"`` text; needs a ``[chain]``). Returns a
    :class:`Bands`.
    """
    if finite is not None and not isinstance(finite, str):
        finite = _list_text("finite", finite)
    result = Bands(
        _chainwell.bands(**_source(input), kpoints=int(kpoints), finite=finite, set=_sets(set))
    )
    _warn(result.warnings)
    return result
