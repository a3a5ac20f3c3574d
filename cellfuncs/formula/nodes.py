"""Syntax tree of a parsed formula: immutable nodes, so parse results can be cached and shared.

References and defined names stay unresolved here; the evaluation context resolves them.

>>> from cellfuncs.formula.parser import parse
>>> [type(n).__name__ for n in walk(parse("=SUM(A1:B2)*2"))]
['Binary', 'Call', 'Ref', 'Literal']
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterator, Union

from ..errors import CellError

Scalar = Union[float, bool, str, CellError, None]


@dataclass(frozen=True, slots=True)
class Literal:
    """A number (float), text, TRUE/FALSE or an error value typed into the formula."""

    value: float | bool | str | CellError


@dataclass(frozen=True, slots=True)
class Array:
    """An array constant such as ``{1,2;3,4}``: a tuple of rows of scalars."""

    rows: tuple[tuple[Scalar, ...], ...]


@dataclass(frozen=True, slots=True)
class Missing:
    """An empty function argument, as in ``IF(A1,,2)``."""


@dataclass(frozen=True, slots=True)
class Ref:
    """A cell or range reference: ``sheet`` unquoted (None for the formula's own sheet),
    ``ref`` upper-case as ``A1``, ``$A$1:B3``, ``A:C`` or ``2:5``."""

    sheet: str | None
    ref: str


@dataclass(frozen=True, slots=True)
class Areas:
    """A reference of several areas, as the union operator ``,`` joins them (``(A1:B2,C5)``):
    each part anchored, in the order written. The parser writes the operator (a
    :class:`Binary` ``,``); the evaluator finds this reference from it."""

    parts: tuple[Ref, ...]


@dataclass(frozen=True, slots=True)
class Name:
    """A defined name as written, e.g. ``Rate`` or ``Sheet1!Rate``."""

    text: str


@dataclass(frozen=True, slots=True)
class Unary:
    """Prefix ``+``/``-`` or postfix ``%`` applied to ``operand``."""

    op: str
    operand: Node


@dataclass(frozen=True, slots=True)
class Binary:
    """An infix operator: arithmetic, ``&``, a comparison or a reference operator (``:``,
    a space for intersection, ``,`` for union)."""

    op: str
    left: Node
    right: Node


@dataclass(frozen=True, slots=True)
class Call:
    """A function call; ``name`` is upper-case without the file-format ``prefix``
    (``""``, ``"_xlfn."`` or ``"_xlfn._xlws."``) that writing the formula back needs."""

    name: str
    args: tuple[Node, ...]
    prefix: str = ""


@dataclass(frozen=True, slots=True)
class Invoke:
    """A function value called where it is written: ``LAMBDA(x, x+1)(5)``."""

    callee: Node
    args: tuple[Node, ...]


Node = Union[Literal, Array, Missing, Ref, Name, Unary, Binary, Call, Invoke]


def children(node: Node) -> tuple[Node, ...]:
    """The operands or arguments of ``node`` (empty for leaves).

    >>> children(Binary("+", Literal(1.0), Name("Rate")))
    (Literal(value=1.0), Name(text='Rate'))
    """
    if isinstance(node, Unary):
        return (node.operand,)
    if isinstance(node, Binary):
        return (node.left, node.right)
    if isinstance(node, Call):
        return node.args
    if isinstance(node, Invoke):
        return (node.callee, *node.args)
    return ()


def walk(node: Node) -> Iterator[Node]:
    """Every node of the tree, depth first, parents before children (e.g. to list references).

    >>> from cellfuncs.formula.parser import parse
    >>> [n.ref for n in walk(parse("=A1+Sheet2!B2")) if isinstance(n, Ref)]
    ['A1', 'B2']
    """
    stack = [node]
    while stack:
        n = stack.pop()
        yield n
        stack += reversed(children(n))
