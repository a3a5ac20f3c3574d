"""Built-in database functions: DSUM, DCOUNT, DCOUNTA, DAVERAGE, DMAX, DMIN, DPRODUCT, DGET,
DSTDEV, DSTDEVP, DVAR, DVARP.

A database is a range whose first row names its fields; ``field`` is a name
(case-insensitive; a number or logical value written as a field name reads as text) or a
1-based column number. The criteria range has field names in its
first row and conditions below: a record qualifies when every condition of some row holds
(rows are alternatives). A condition is a COUNTIF criterion, except that plain text matches
the texts that begin with it, as in Excel's advanced filter.

>>> from cellfuncs.formula import compute
>>> db = '{"Tree","Height";"Apple",18;"Pear",12;"Apple",13}'
>>> compute(f'=DSUM({db}, "Height", {{"Tree";"Apple"}})'), compute(f'=DCOUNT({db}, 2, {{"Height";">12"}})')
(31.0, 2.0)
"""

from __future__ import annotations

import math
import statistics
from typing import Callable

from ..errors import DIV0, NUM, VALUE, CellError
from .arrays import Value, as_array
from .coerce import fold, to_number, to_text
from .evaluate import builtin
from .fn_count import criterion
from .nodes import Scalar


def _condition(c: Scalar) -> Callable[[Scalar], bool]:
    if type(c) is str and c and c[0] not in "=<>" and type(to_number(c)) is CellError:
        return criterion(c + "*")
    return criterion(c)


def _column(header: list[Scalar], field: Scalar) -> int | CellError:
    """The 0-based column of ``field``: a number (or logical value) counts columns from 1;
    text names the first field whose name, as text (a number or TRUE as written), is the
    same but for case."""
    if type(field) is CellError:
        return field
    if type(field) in (float, bool):
        k = int(to_number(field))
        return k - 1 if 1 <= k <= len(header) else CellError(VALUE, f"the database has no column {k}")
    return _named(header, field)


def _named(header: list[Scalar], name: Scalar) -> int | CellError:
    """The first column whose field name reads as ``name`` but for case."""
    wanted = to_text(name)
    if type(wanted) is CellError:
        return wanted
    for i, h in enumerate(header):
        if h is not None and type(h) is not CellError and fold(to_text(h)) == fold(wanted):
            return i
    return CellError(VALUE, f'the database has no field "{wanted}"')


def _selected(database: Value, field: Value, criteria: Value) -> list[Scalar] | CellError:
    """The ``field`` values of the records meeting the criteria."""
    for v in (database, field, criteria):
        if type(v) is CellError:
            return v
    db, cr = as_array(database), as_array(criteria)
    if db.shape[0] < 2:
        return CellError(VALUE, "the database has no records below its field names")
    if type(field) is type(db):
        if field.size != 1:
            return CellError(VALUE, "the field must be one name or number")
        field = field[0, 0]
    header = list(db[0])
    col = _column(header, field) if field is not None else None
    if type(col) is CellError:
        return col
    rows = []
    for crow in cr[1:]:
        tests = []
        for name, c in zip(cr[0], crow):
            if c is None:
                continue
            where = _named(header, name)
            if type(where) is CellError:
                tests = None
                break
            tests.append((where, _condition(c)))
        if tests is not None:
            rows.append(tests)
    out = []
    for record in db[1:]:
        if any(all(test(record[i]) for i, test in tests) for tests in rows):
            out.append(record[col] if col is not None else 1.0)
    return out


def _numbers(values: list[Scalar]) -> list[float]:
    return [x for x in values if type(x) is float]


def _register(name: str, reduce: Callable[[list[Scalar]], Scalar]) -> None:
    def fn(database: Value, field: Value, criteria: Value) -> Scalar:
        values = _selected(database, field, criteria)
        return values if type(values) is CellError else reduce(values)

    fn.__doc__ = f"{name}(database, field, criteria)."
    builtin(name, 3)(fn)


def _needs(n: int, fn: Callable[[list[float]], float]) -> Callable[[list[Scalar]], Scalar]:
    def reduce(values: list[Scalar]) -> Scalar:
        nums = _numbers(values)
        return fn(nums) if len(nums) >= n else CellError(DIV0, f"fewer than {n} numbers meet the criteria")

    return reduce


def _get(values: list[Scalar]) -> Scalar:
    if not values:
        return CellError(VALUE, "no record meets the criteria")
    if len(values) > 1:
        return CellError(NUM, "more than one record meets the criteria")
    return 0.0 if values[0] is None else values[0]


_register("DSUM", lambda v: math.fsum(_numbers(v)))
_register("DCOUNT", lambda v: float(len(_numbers(v))))
_register("DCOUNTA", lambda v: float(sum(1 for x in v if x is not None and x != "")))
_register("DAVERAGE", _needs(1, statistics.fmean))
_register("DMAX", lambda v: max(_numbers(v), default=0.0))
_register("DMIN", lambda v: min(_numbers(v), default=0.0))
_register("DPRODUCT", lambda v: math.prod(_numbers(v)) if _numbers(v) else 0.0)
_register("DGET", _get)
_register("DSTDEV", _needs(2, statistics.stdev))
_register("DSTDEVP", _needs(1, statistics.pstdev))
_register("DVAR", _needs(2, statistics.variance))
_register("DVARP", _needs(1, statistics.pvariance))
