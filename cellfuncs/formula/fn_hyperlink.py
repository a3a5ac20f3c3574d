"""Built-in HYPERLINK: the cell shows (and its value is) the friendly name, or the link
location when there is none; the jump itself is the spreadsheet program's business.

>>> from cellfuncs.formula import compute
>>> compute('=HYPERLINK("https://example.com", "Example")'), compute('=HYPERLINK("#Sheet2!A1")')
('Example', '#Sheet2!A1')
"""

from __future__ import annotations

from ..errors import CellError
from .arrays import elementwise
from .evaluate import builtin
from .nodes import Scalar

_NO_NAME = object()


@builtin("HYPERLINK", 1, 2)
@elementwise
def hyperlink(link_location: Scalar, friendly_name: Scalar = _NO_NAME) -> Scalar:
    """The friendly name (a blank cell shows 0, as a reference to it does), else the link
    location; an error in either shows instead.

    >>> hyperlink("x", None), hyperlink("x", 5.0)
    (0.0, 5.0)
    """
    if friendly_name is _NO_NAME:
        return link_location
    if type(link_location) is CellError:
        return link_location
    return 0.0 if friendly_name is None else friendly_name
