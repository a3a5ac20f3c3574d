"""Functions as values: what LAMBDA makes, LET and a call bind, and how a name is looked up.

A :class:`Lambda` is a value like a number, made by ``LAMBDA(x, y, body)``, bound to a name
by ``LET`` or a defined name, and called as ``f(1, 2)``, ``LAMBDA(x, x+1)(5)`` or by the
helpers MAP, REDUCE, SCAN, BYROW, BYCOL and MAKEARRAY (``fn_lambda.py``). Calling one binds its
parameters in a scope (a mapping from the parameter's key to its value, a reference, or
:data:`OMITTED`) that the context carries while the body is evaluated
(``formula.evaluate`` looks names up there first). A cell whose formula gives a function
without calling it shows #CALC!, as in Excel.

>>> param_key("_xlpm.rate"), param_key("Rate")
('RATE', 'RATE')
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Mapping

# the file writes a parameter as _xlpm.name, an optional one as _xlop.name
_FILE_PREFIXES = ("_XLPM.", "_XLOP.")


def param_key(text: str) -> str:
    """The key of a parameter or LET name: upper-case (names are case-insensitive), without
    the prefix the file writes."""
    key = text.upper()
    return key[6:] if key.startswith(_FILE_PREFIXES) else key


def is_optional(text: str) -> bool:
    """Whether a parameter is written as optional (``_xlop.``), so a call may leave it out."""
    return text.upper().startswith("_XLOP.")


class _Omitted:
    """The value of a parameter a call left out (ISOMITTED tells it); it reads as empty."""

    __slots__ = ()

    def __repr__(self) -> str:
        return "OMITTED"


OMITTED = _Omitted()


@dataclass(frozen=True, slots=True, eq=False)
class Lambda:
    """A function value: parameter keys, the ones a call may leave out, the body, the names
    it closed over (LET names and outer parameters), and the context whose references its
    body was written against (the defining cell, or the defined name's view)."""

    params: tuple[str, ...]
    optional: frozenset[str]
    body: Any  # a formula node
    scope: Mapping[str, Any]
    home: Any  # the context

    def __repr__(self) -> str:
        return f"LAMBDA({', '.join(self.params)})"
