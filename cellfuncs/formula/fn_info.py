"""Built-in information functions: the IS* tests, NA, N, TYPE and ERROR.TYPE.

>>> from cellfuncs.formula import compute
>>> compute("=ISNA(NA())"), compute('=ISNUMBER("1")'), compute("=ERROR.TYPE(1/0)"), compute('=TYPE("a")')
(True, False, 2.0, 2.0)
"""

from __future__ import annotations

import numpy as np

from ..errors import CODES, NA, VALUE, CellError
from .arrays import Value, elementwise, numeric
from .evaluate import builtin
from .nodes import Scalar


def _test(name: str, fn, doc: str) -> None:
    fn.__doc__ = doc
    builtin(name, 1)(elementwise(fn))


_test("ISNA", lambda v: type(v) is CellError and v.code == NA, "TRUE for #N/A.")
_test("ISERR", lambda v: type(v) is CellError and v.code != NA, "TRUE for an error other than #N/A.")
_test("ISNUMBER", lambda v: type(v) is float, "TRUE for a number (not for numeric text).")
_test("ISTEXT", lambda v: type(v) is str, "TRUE for text.")
_test("ISNONTEXT", lambda v: type(v) is not str, "TRUE for anything but text (blanks included).")
_test("ISLOGICAL", lambda v: type(v) is bool, "TRUE for TRUE or FALSE.")
_test("ISBLANK", lambda v: v is None, "TRUE for an empty cell (not for empty text).")


def _parity(odd: bool):
    numbers = numeric(lambda x: (int(x) % 2 == 1) == odd)  # Excel truncates first: ISODD(-3.7) is TRUE

    def test(x: Scalar) -> Scalar:
        # TRUE and FALSE are not numbers here (#VALUE!), as Excel's stored values show
        return CellError(VALUE, "ISODD and ISEVEN take numbers, not TRUE or FALSE") if type(x) is bool else numbers(x)

    return elementwise(test)


builtin("ISEVEN", 1)(_parity(False))
builtin("ISODD", 1)(_parity(True))


@builtin("NA", 0)
def na() -> CellError:
    """The #N/A error value.

    >>> na().code
    '#N/A'
    """
    return CellError(NA, "NA()")


@builtin("N", 1)
@elementwise
def n(v: Scalar) -> Scalar:
    """A number as itself, TRUE as 1, an error as itself, anything else (text, blank) as 0.

    >>> n(2.5), n(True), n("7"), n(None)
    (2.5, 1.0, 0.0, 0.0)
    """
    t = type(v)
    if t is float or t is CellError:
        return v
    return 1.0 if v is True else 0.0


@builtin("TYPE", 1)
def type_(v: Value) -> float:
    """1 number (and blank), 2 text, 4 logical value, 16 error, 64 array.

    >>> type_(None), type_(True), type_(CellError(NA))
    (1.0, 4.0, 16.0)
    """
    if type(v) is np.ndarray:
        return 64.0
    return {str: 2.0, bool: 4.0, CellError: 16.0}.get(type(v), 1.0)


_ERROR_NUMBERS = {code: float(i) for i, code in enumerate(CODES[:7], start=1)} | {"#SPILL!": 9.0, "#CALC!": 14.0}


@builtin("ERROR.TYPE", 1)
@elementwise
def error_type(v: Scalar) -> Scalar:
    """The number of an error value (1 #NULL!, 2 #DIV/0!, 3 #VALUE!, 4 #REF!, 5 #NAME?, 6 #NUM!,
    7 #N/A, 9 #SPILL!, 14 #CALC!); #N/A for anything else.

    >>> error_type(CellError("#REF!")), error_type(1.0).code
    (4.0, '#N/A')
    """
    if type(v) is CellError and v.code in _ERROR_NUMBERS:
        return _ERROR_NUMBERS[v.code]
    return CellError(NA, "ERROR.TYPE of a value that is not an error")
