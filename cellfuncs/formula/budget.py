"""The work budget of an evaluation: how many cells one array may hold, how many all the
arrays of one formula may hold together, and all those of a workbook.

Every array the engine builds from a range, an operator or a function over arrays is
charged *before* it is built; over the budget, the error value naming the limit is the
result instead. A budget is active inside :func:`active` (workbook recalculation sets one
per formula); without one, as in ``cellfuncs eval``, arrays are bounded by the formula's
own text.

>>> with active(Budget(Limit(100, "--cells"), Limit(150, "--work"), Limit(200, "--all"))) as budget:
...     charge((10, 10)) is None, charge((5, 5)) is None
...     print(charge((1, 101)))
...     print(charge((5, 6)))
...     budget.start(); charge((5, 6)) is None
...     print(charge((5, 10)))
(True, True)
#NUM! the 1x101 array would have 101 cells, over the limit of 100 cells per array (--cells)
#NUM! the formula would build more than 150 array cells in all, the limit per formula (--work)
True
#NUM! the formulas of the workbook would build more than 200 array cells in all, the limit per workbook (--all)
"""

from __future__ import annotations

from contextlib import contextmanager
from contextvars import ContextVar
from typing import Iterator, NamedTuple

from ..errors import NUM, VALUE, CellError

# Excel's limits (common practice): the characters one cell can hold and the characters of a formula
MAX_TEXT = 32_767
MAX_FORMULA_TEXT = 8_192


class Limit(NamedTuple):
    """A number of cells and the words (an option) that let a user raise it."""

    cells: int
    option: str


class Budget:
    """Cells per array (``array``), per formula (``work``) and per workbook (``total``);
    :meth:`start` opens a formula's account, :meth:`restart` the workbook's."""

    __slots__ = ("array", "work", "total", "left", "total_left")

    def __init__(self, array: Limit, work: Limit, total: Limit):
        self.array, self.work, self.total = array, work, total
        self.left, self.total_left = work.cells, total.cells

    def start(self, cells_of: int = 1) -> None:
        """A new formula (``cells_of`` cells evaluated as one, each with its own account)."""
        self.left = self.work.cells * cells_of

    def restart(self) -> None:
        """A new pass over the workbook."""
        self.total_left = self.total.cells

    def charge(self, shape: tuple[int, ...]) -> CellError | None:
        """Account for an array of ``shape``; the error value if it is over a limit."""
        cells = 1
        for n in shape:
            cells *= n
        if cells > self.array.cells:
            return CellError(NUM, f"the {'x'.join(map(str, shape))} array would have {cells:,} cells, over the "
                                  f"limit of {self.array.cells:,} cells per array ({self.array.option})")
        self.left -= cells
        if self.left < 0:
            return CellError(NUM, f"the formula would build more than {self.work.cells:,} array cells in all, the "
                                  f"limit per formula ({self.work.option})")
        self.total_left -= cells
        if self.total_left < 0:
            return CellError(NUM, f"the formulas of the workbook would build more than {self.total.cells:,} array "
                                  f"cells in all, the limit per workbook ({self.total.option})")
        return None


_CURRENT: ContextVar[Budget | None] = ContextVar("cellfuncs_budget", default=None)


@contextmanager
def active(budget: Budget) -> Iterator[Budget]:
    """Charge the arrays built inside the block to ``budget``."""
    token = _CURRENT.set(budget)
    try:
        yield budget
    finally:
        _CURRENT.reset(token)


def charge(shape: tuple[int, ...]) -> CellError | None:
    """Account for an array of ``shape`` to the active budget (none active: always fine)."""
    budget = _CURRENT.get()
    return None if budget is None else budget.charge(shape)


def text_error(length: int) -> CellError | None:
    """The error for a text of ``length`` characters if a cell cannot hold it.

    >>> print(text_error(40_000))
    #VALUE! the text would have 40,000 characters; a cell holds at most 32,767
    """
    if length <= MAX_TEXT:
        return None
    return CellError(VALUE, f"the text would have {length:,} characters; a cell holds at most {MAX_TEXT:,}")
