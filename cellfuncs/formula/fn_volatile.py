"""Built-in functions whose value changes from one recalculation to the next: NOW, TODAY,
RAND, RANDBETWEEN, RANDARRAY. They read ``formula.clock``, which a recalculation may pin
(``--now``, ``--seed``) to repeat its results.

>>> import datetime as dt
>>> from .clock import fixed
>>> with fixed(dt.datetime(2024, 1, 2, 18)):
...     compute("=NOW()"), compute("=TODAY()")
(45293.75, 45293.0)
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import NUM, VALUE, CellError
from .arrays import Value, as_value, numeric
from .budget import charge
from .clock import generator, now
from .coerce import to_bool, to_number
from .dates import serial
from .evaluate import builtin, compute  # noqa: F401  (compute: doctests)


@builtin("TODAY", 0)
def today() -> float:
    """Today's date as a serial number."""
    d = now()
    return float(serial(d.year, d.month, d.day))


@builtin("NOW", 0)
def now_() -> float:
    """The date and time now as a serial number (the time as the fraction of the day)."""
    d = now()
    seconds = d.hour * 3600 + d.minute * 60 + d.second + d.microsecond / 1e6
    return serial(d.year, d.month, d.day) + seconds / 86400.0


@builtin("RAND", 0)
def rand() -> float:
    """A random number from 0 up to (not including) 1.

    >>> 0 <= compute("=RAND()") < 1
    True
    """
    return float(generator().random())


@builtin("RANDBETWEEN", 2)
@numeric
def randbetween(bottom: float, top: float) -> float | CellError:
    """A random whole number from ``bottom`` to ``top`` (rounded up and down to whole numbers).

    >>> compute("=RANDBETWEEN(3, 3)"), compute("=RANDBETWEEN(5, 1)").code
    (3.0, '#NUM!')
    """
    lo, hi = math.ceil(bottom), math.floor(top)
    if lo > hi:
        return CellError(NUM, "RANDBETWEEN's bottom is above its top")
    return float(generator().integers(lo, hi, endpoint=True))


@builtin("RANDARRAY", 0, 5)
def randarray(rows: Value = None, columns: Value = None, low: Value = None, high: Value = None,
              whole: Value = None) -> Value:
    """A rows x columns array of random numbers from ``min`` to ``max`` (0 to 1 by default),
    whole numbers when ``whole_number`` is TRUE.

    >>> compute("=RANDARRAY(2, 3)").shape, compute("=RANDARRAY(1, 1, 5, 1)").code
    ((2, 3), '#VALUE!')
    """
    if any(type(v) is np.ndarray for v in (rows, columns, low, high, whole)):
        return CellError(VALUE, "RANDARRAY takes single values")
    args = [to_number(d if v is None else v) for v, d in ((rows, 1.0), (columns, 1.0), (low, 0.0), (high, 1.0))]
    integral = to_bool(False if whole is None else whole)
    for x in (*args, integral):
        if type(x) is CellError:
            return x
    r, c, lo, hi = int(args[0]), int(args[1]), args[2], args[3]
    if r < 1 or c < 1 or lo > hi:
        return CellError(VALUE, "RANDARRAY needs at least one row and column, and min not above max")
    over = charge((r, c))
    if over is not None:
        return over
    rng = generator()
    if integral:
        if math.ceil(lo) > math.floor(hi):
            return CellError(VALUE, "no whole number lies between RANDARRAY's min and max")
        values = rng.integers(math.ceil(lo), math.floor(hi), size=(r, c), endpoint=True).astype(float)
    else:
        values = lo + (hi - lo) * rng.random((r, c))
    return as_value(values)
