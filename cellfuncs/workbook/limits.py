"""The work a workbook may ask of a recalculation, counted before the work is done.

A file of a few kilobytes can declare an array formula over the whole sheet, multiply a
whole column by a whole row, or chain defined names a thousand deep. These limits keep
the work proportional to what a real workbook needs; each can be raised on the command
line. What the file *declares* (array-formula ranges, the dependencies between formulas)
is checked while it is read: over a limit the file is refused, naming the limit and the
cell. What one formula *computes* (a range it reads, an array an operator or function
builds, a spill) is checked before each array is built: over a limit, that cell holds an
error value naming the limit and the rest of the workbook is computed. The work of all
formulas together is bounded too, so many formulas each within their limit (a thousand
sums of a whole column a million rows long) cannot add up to hours: past that limit,
the formulas still to come hold its error value.

>>> Limits().budget().array
Limit(cells=1048576, option='--max-array-cells')
"""

from __future__ import annotations

from dataclasses import dataclass, fields

from ..formula.budget import Budget, Limit


@dataclass(frozen=True)
class Limits:
    """The defaults accept every workbook of the project's reference set with a margin
    (measured there: the largest array-formula range covers 16,384 cells, the largest array
    holds 26,593 cells, one formula builds at most 26,593 array cells, the formulas of one
    workbook 43,411,251 (lookups reading the same ranges over and over), and a workbook has
    at most 20,050 dependencies). At the defaults a workbook stays below 1 GiB of memory
    and, counting at about 0.1 µs a cell, within a minute of evaluation."""

    array_cells: int = 1_048_576  # cells of one array: a range read, a broadcast, a spill (one whole column)
    formula_work: int = 8_388_608  # cells of all the arrays one formula (or defined name) builds
    workbook_work: int = 268_435_456  # cells of all the arrays all formulas of a workbook build (in one pass)
    spill_cells: int = 1_048_576  # cells covered by the array formulas and spills of one workbook
    dependencies: int = 10_000_000  # (formula, formula or spill it reads) pairs of one workbook

    def budget(self) -> Budget:
        """The per-formula budget of the formula engine."""
        return Budget(Limit(self.array_cells, option("array_cells")), Limit(self.formula_work, option("formula_work")),
                      Limit(self.workbook_work, option("workbook_work")))


def option(field: str) -> str:
    """The command-line option that sets a limit.

    >>> option("spill_cells")
    '--max-spill-cells'
    """
    return "--max-" + field.replace("_", "-")


FIELDS = tuple(f.name for f in fields(Limits))
DEFAULTS = Limits()
