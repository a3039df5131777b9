"""Type stubs of the chainwell package (see its docstrings)."""

import os
from collections.abc import Iterable, Iterator, Mapping, Sequence
from typing import Any, Optional, Union

import numpy as np
import numpy.typing as npt

__version__: str

Input = Union[str, os.PathLike[str], Mapping[str, Any]]
Overrides = Union[None, str, Mapping[str, Any], Sequence[str]]
Values = Union[str, float, Iterable[float]]

class InputError(ValueError):
    """A fault in the input or an argument; str() is the command line's message."""

    key: Optional[str]
    file: Optional[str]
    line: int
    column: int

class ChainwellWarning(UserWarning): ...

class Solution:
    units: dict[str, str]
    box_length: Optional[float]
    levels: list[dict[str, Any]]
    occupancy: Optional[dict[str, Any]]
    transitions: list[dict[str, Any]]
    warnings: list[str]
    n: npt.NDArray[np.int64]
    energies: npt.NDArray[np.float64]
    x: npt.NDArray[np.float64]
    spacing: float
    potential: npt.NDArray[np.float64]
    wavefunctions: npt.NDArray[np.float64]
    occupations: Optional[npt.NDArray[np.float64]]
    def to_dict(self, timing: bool = ...) -> dict[str, Any]: ...
    def to_json(self) -> str: ...

class Sweep:
    rows: list[dict[str, Any]]
    keys: list[str]
    units: dict[str, str]
    table: list[dict[str, Any]]
    warnings: list[str]
    def to_dict(self) -> dict[str, Any]: ...
    def to_pandas(self) -> Any: ...
    def to_csv(self) -> str: ...
    def __len__(self) -> int: ...
    def __iter__(self) -> Iterator[dict[str, Any]]: ...
    def __getitem__(self, i: int) -> dict[str, Any]: ...

class Fit:
    parameters: list[dict[str, Any]]
    values: dict[str, float]
    rows: list[dict[str, Any]]
    rms: float
    chi2: float
    dof: int
    key: str
    quantity: str
    units: dict[str, str]
    def to_dict(self) -> dict[str, Any]: ...
    def to_pandas(self) -> Any: ...
    def __len__(self) -> int: ...
    def __iter__(self) -> Iterator[dict[str, Any]]: ...
    def __getitem__(self, i: int) -> dict[str, Any]: ...

class Bands:
    k: npt.NDArray[np.float64]
    energies: npt.NDArray[np.float64]
    gaps: list[dict[str, Any]]
    units: dict[str, str]
    warnings: list[str]
    table: list[dict[str, Any]]
    def to_dict(self) -> dict[str, Any]: ...
    def to_pandas(self) -> Any: ...
    def to_csv(self) -> str: ...

def solve(input: Input, set: Overrides = ..., *, estimate: bool = ...) -> Solution: ...
def sweep(input: Input, vary: Union[str, Mapping[str, Values], Sequence[str]], set: Overrides = ...) -> Sweep: ...
def fit(
    input: Input,
    data: Any,
    free: Union[str, Sequence[str]],
    bounds: Optional[Mapping[str, tuple[Optional[float], Optional[float]]]] = ...,
    set: Overrides = ...,
) -> Fit: ...
def bands(
    input: Input,
    kpoints: int = ...,
    finite: Union[None, str, Iterable[int]] = ...,
    set: Overrides = ...,
) -> Bands: ...
