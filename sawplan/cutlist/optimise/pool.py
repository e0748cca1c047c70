"""The fillings column generation has found: the columns every master LP draws on.

A filling is kept three ways: as a tuple (the plan's arithmetic), as a dense
column (pieces per length: the reduced costs of a whole working set in one
product) and as its nonzero entries laid end to end (the master's matrix,
handed to HiGHS column by column without a pass over every length).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from sawplan.cutlist.optimise.problem import Problem


class ColumnPool:
    """Bar fillings found so far: the master's columns, shared by every re-solve."""

    def __init__(self, problem: Problem) -> None:
        import numpy as np

        self.problem = problem
        self.stock: list[int] = []
        self._index: dict[tuple[int, tuple[int, ...]], int] = {}
        self._fillings: list[tuple[int, ...]] = []
        self._matrix = np.zeros((len(problem.lengths), 64))
        self._stock = np.zeros(64, dtype=np.intp)
        self._start = np.zeros(65, dtype=np.intp)  # column n's entries: [start[n], start[n + 1])
        self._items = np.zeros(256, dtype=np.intp)  # every column's lengths cut, end to end
        self._copies = np.zeros(256)  # and the pieces of each

    def __len__(self) -> int:
        return len(self.stock)

    def add(self, s: int, counts: Sequence[int]) -> int:
        """Index of the filling ``counts`` of stock ``s`` (added if new); -1 if empty or too long."""
        import numpy as np

        key = (s, tuple(counts))
        known = self._index.get(key)
        if known is not None:
            return known
        if not any(counts) or not self.problem.fits(s, counts):
            return -1
        return self._append(key, np.asarray(counts, dtype=float))

    def add_one(self, s: int, j: int, copies: int) -> int:
        """Index of the filling of ``copies`` pieces of item ``j`` alone (the seed columns):
        no pass over the other lengths beyond building the key."""
        import numpy as np

        counts = [0] * len(self.problem.lengths)
        counts[j] = copies
        key = (s, tuple(counts))
        known = self._index.get(key)
        if known is not None:
            return known
        if copies <= 0 or not self.problem.fits(s, key[1]):
            return -1
        column = np.zeros(len(counts))
        column[j] = copies
        return self._append(key, column)

    def _append(self, key: tuple[int, tuple[int, ...]], column: Any) -> int:
        import numpy as np

        s = key[0]
        n = len(self.stock)
        if n == self._matrix.shape[1]:
            grown = np.zeros((self._matrix.shape[0], 2 * n))
            grown[:, :n] = self._matrix
            self._matrix = grown
            self._stock = np.concatenate([self._stock, np.zeros(n, dtype=np.intp)])
            self._start = np.concatenate([self._start, np.zeros(n, dtype=np.intp)])
        self._matrix[:, n] = column
        self._stock[n] = s
        self.stock.append(s)
        self._fillings.append(key[1])
        items = np.flatnonzero(column)
        begin, end = self._start[n], self._start[n] + len(items)
        if end > len(self._items):
            size = max(2 * len(self._items), end)
            self._items = np.concatenate([self._items, np.zeros(size, dtype=np.intp)])
            self._copies = np.concatenate([self._copies, np.zeros(size)])
        self._items[begin:end] = items
        self._copies[begin:end] = column[items]
        self._start[n + 1] = end
        self._index[key] = n
        return n

    def entries(self, columns: Sequence[int]) -> tuple[Any, Any, Any]:
        """(column position in ``columns``, item, copies) of every piece in those columns,
        column by column and items ascending within a column."""
        import numpy as np

        cols = np.asarray(columns, dtype=np.intp)
        begin = self._start[cols]
        sizes = self._start[cols + 1] - begin
        ends = np.cumsum(sizes)
        # entry k of column i sits at begin[i] + k: shift a running count by each column's start
        where = np.arange(int(ends[-1]) if len(ends) else 0) + np.repeat(
            begin - ends + sizes, sizes
        )
        position = np.repeat(np.arange(len(cols)), sizes)
        return position, self._items[where], self._copies[where]

    def counts(self, column: int) -> tuple[int, ...]:
        return self._fillings[column]

    @property
    def matrix(self) -> Any:
        return self._matrix[:, : len(self.stock)]

    @property
    def stock_of(self) -> Any:
        """The stock index of every column, as a numpy array."""
        return self._stock[: len(self.stock)]
