"""Blocks of variables and rows, assembled with numpy before any Pyomo object exists.

Each constraint family (capacity, dispatch, storage, fuels, emissions, policy) adds its rows here as arrays of
(row, column, coefficient) triples. :mod:`pathcast.model.pyomo_model` then turns the blocks into one Pyomo component
per family; keeping the maths in arrays is what lets a national model build in seconds.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sp

__all__ = ["VariableBlock", "RowBlock", "LinearProgram"]


@dataclass
class VariableBlock:
    """A family of columns laid out as an array of ``shape`` over the named ``dims``."""

    name: str
    dims: tuple[str, ...]
    shape: tuple[int, ...]
    offset: int
    unit: str
    lower: np.ndarray
    upper: np.ndarray

    @property
    def size(self) -> int:
        return int(np.prod(self.shape)) if self.shape else 1

    def columns(self, *index: np.ndarray | int) -> np.ndarray:
        """Global column numbers of the given (broadcast) index arrays."""
        if not index:
            return self.offset + np.arange(self.size)
        arrays = np.broadcast_arrays(*[np.asarray(i) for i in index])
        return self.offset + np.ravel_multi_index(arrays, self.shape)

    def all(self) -> np.ndarray:
        """Global column numbers of the whole block, shaped like the block."""
        return (self.offset + np.arange(self.size)).reshape(self.shape)


@dataclass
class RowBlock:
    """A family of rows over ``dims``, with sense ``"=="``, ``"<="`` or ``">="`` and right-hand sides."""

    name: str
    dims: tuple[str, ...]
    shape: tuple[int, ...]
    sense: str
    rhs: np.ndarray
    unit: str
    rows: list[np.ndarray] = field(default_factory=list)
    cols: list[np.ndarray] = field(default_factory=list)
    coefs: list[np.ndarray] = field(default_factory=list)
    offset: int = 0

    @property
    def size(self) -> int:
        return int(np.prod(self.shape)) if self.shape else 1

    def add(self, rows: np.ndarray, cols: np.ndarray, coefs: np.ndarray | float) -> None:
        """Add coefficients; ``rows`` are local row numbers (flat), broadcast against ``cols`` and ``coefs``."""
        rows, cols, coefs = np.broadcast_arrays(
            np.asarray(rows), np.asarray(cols), np.asarray(coefs, dtype=float)
        )
        self.rows.append(rows.ravel())
        self.cols.append(cols.ravel())
        self.coefs.append(coefs.ravel())

    def local(self) -> np.ndarray:
        """Local row numbers shaped like the block."""
        return np.arange(self.size).reshape(self.shape)


class LinearProgram:
    """min c'x  s.t.  row blocks, column bounds. Pure numpy/scipy; no modelling-layer objects."""

    def __init__(self) -> None:
        self.variables: dict[str, VariableBlock] = {}
        self.row_blocks: dict[str, RowBlock] = {}
        self._n_cols = 0
        self._cost_cols: list[np.ndarray] = []
        self._cost_coefs: list[np.ndarray] = []
        self._matrix_cache: tuple | None = None  # (fingerprint, (matrix, lower, upper))

    # ---------------------------------------------------------------------------------------- variables
    def add_variables(
        self,
        name: str,
        dims: tuple[str, ...],
        shape: tuple[int, ...],
        unit: str,
        lower: float | np.ndarray = 0.0,
        upper: float | np.ndarray = math.inf,
    ) -> VariableBlock:
        size = int(np.prod(shape)) if shape else 1
        block = VariableBlock(
            name=name,
            dims=dims,
            shape=tuple(shape),
            offset=self._n_cols,
            unit=unit,
            lower=np.broadcast_to(np.asarray(lower, dtype=float), shape).ravel().copy(),
            upper=np.broadcast_to(np.asarray(upper, dtype=float), shape).ravel().copy(),
        )
        self._n_cols += size
        self.variables[name] = block
        return block

    @property
    def n_cols(self) -> int:
        return self._n_cols

    def add_cost(self, cols: np.ndarray, coefs: np.ndarray | float) -> None:
        """Add objective coefficients [million currency per unit of the column]."""
        cols, coefs = np.broadcast_arrays(np.asarray(cols), np.asarray(coefs, dtype=float))
        self._cost_cols.append(cols.ravel())
        self._cost_coefs.append(coefs.ravel())

    # ---------------------------------------------------------------------------------------- rows
    def add_rows(
        self,
        name: str,
        dims: tuple[str, ...],
        shape: tuple[int, ...],
        sense: str,
        unit: str,
        rhs: float | np.ndarray = 0.0,
    ) -> RowBlock:
        if sense not in ("==", "<=", ">="):
            raise ValueError(f"sense must be '==', '<=' or '>=', got {sense!r}")
        if name in self.row_blocks:
            raise ValueError(f"row block {name!r} exists already")
        block = RowBlock(
            name=name,
            dims=dims,
            shape=tuple(shape),
            sense=sense,
            unit=unit,
            rhs=np.broadcast_to(np.asarray(rhs, dtype=float), shape).ravel().copy(),
        )
        self.row_blocks[name] = block
        return block

    # ---------------------------------------------------------------------------------------- assembly
    def cost_vector(self) -> np.ndarray:
        c = np.zeros(self._n_cols)
        if self._cost_cols:
            np.add.at(c, np.concatenate(self._cost_cols), np.concatenate(self._cost_coefs))
        return c

    def _fingerprint(self) -> tuple:
        """Changes whenever a block or a batch of coefficients is added (blocks only ever grow) or a right-hand side
        changes."""
        return (
            self._n_cols,
            tuple((name, b.sense, len(b.rows), hash(b.rhs.tobytes())) for name, b in self.row_blocks.items()),
        )

    def matrix(self) -> tuple[sp.csr_array, np.ndarray, np.ndarray]:
        """The whole constraint matrix in CSR with row lower and upper bounds (duplicates summed, zeros dropped).

        Assembled once and kept until a block or coefficients are added (the pipeline and the Pyomo build both ask
        for it); treat the returned arrays as read-only."""
        key = self._fingerprint()
        if self._matrix_cache is not None and self._matrix_cache[0] == key:
            return self._matrix_cache[1]
        result = self._assemble()
        self._matrix_cache = (key, result)
        return result

    def _assemble(self) -> tuple[sp.csr_array, np.ndarray, np.ndarray]:
        offset = 0
        rows, cols, coefs, lower, upper = [], [], [], [], []
        for block in self.row_blocks.values():
            block.offset = offset
            if block.rows:
                rows.append(np.concatenate(block.rows) + offset)
                cols.append(np.concatenate(block.cols))
                coefs.append(np.concatenate(block.coefs))
            lo = block.rhs.copy() if block.sense in ("==", ">=") else np.full(block.size, -math.inf)
            hi = block.rhs.copy() if block.sense in ("==", "<=") else np.full(block.size, math.inf)
            lower.append(lo)
            upper.append(hi)
            offset += block.size
        if rows:
            matrix = sp.coo_array(
                (np.concatenate(coefs), (np.concatenate(rows), np.concatenate(cols))),
                shape=(offset, self._n_cols),
            ).tocsr()
        else:
            matrix = sp.csr_array((offset, self._n_cols))
        matrix.sum_duplicates()
        matrix.eliminate_zeros()
        return (
            matrix,
            np.concatenate(lower) if lower else np.zeros(0),
            np.concatenate(upper) if upper else np.zeros(0),
        )

    def column_bounds(self) -> tuple[np.ndarray, np.ndarray]:
        blocks = list(self.variables.values())
        return (np.concatenate([b.lower for b in blocks]), np.concatenate([b.upper for b in blocks]))

    def row_offsets(self) -> dict[str, int]:
        offset, out = 0, {}
        for block in self.row_blocks.values():
            out[block.name] = offset
            offset += block.size
        return out
