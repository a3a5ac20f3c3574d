"""Formula text (Excel en-US syntax) to a syntax tree.

openpyxl's tokenizer splits the text; an operator-precedence parser builds the tree with
Excel's precedence, lowest first: comparisons, ``&``, ``+ -``, ``* /``, ``^``, prefix
``+ -``, postfix ``%``. Prefix minus binds tighter than ``^``, so ``=-2^2`` is 4, and
all binary operators group left to right (``=2^3^2`` is 64).

>>> parse("=1+2*3")
Binary(op='+', left=Literal(value=1.0), right=Binary(op='*', left=Literal(value=2.0), right=Literal(value=3.0)))
>>> parse("_xlfn.CONCAT('My sheet'!A1:B2)")
Call(name='CONCAT', args=(Ref(sheet='My sheet', ref='A1:B2'),), prefix='_xlfn.')
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from typing import NamedTuple

from ..errors import REF, CellError, parse_error_text
from .a1 import MAX_COL, MAX_ROW, column_number
from .budget import MAX_FORMULA_TEXT
from .nodes import Array, Binary, Call, Invoke, Literal, Missing, Name, Node, Ref, Scalar, Unary, children
from .tokenizer import tokenizer

# The reference operators bind tighter than any other: the range operator most (A1:INDEX(B:B,3)*2),
# then intersection (a space), then union (a comma inside parentheses: SUM((A1,C1:C3)), -(A1,B1)).
_INFIX = {"=": 1, "<>": 1, "<": 1, ">": 1, "<=": 1, ">=": 1, "&": 2, "+": 3, "-": 3, "*": 4, "/": 4, "^": 5,
          ",": 7, " ": 8, ":": 9}
_REFERENCE_OPERATORS = (":", " ", ",")
_PREFIX_POWER = 6  # above ^: Excel negates before raising to a power
_PREFIXES = ("_XLFN.", "_XLWS.")
# Deeper trees would exhaust Python's recursion while evaluating; Excel itself allows
# 64 nested function levels.
MAX_DEPTH = 200

_FILE_PREFIXES = re.compile(r"_xl(?:fn|ws|udf)\.", re.IGNORECASE)  # written in the file, not typed by users
_FUNCTION_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_.]*\Z")
_NAME = re.compile(r"[^\W\d][\w.?\\]*\Z")
_LINKED = re.compile(r"\[\d+\][^\[\]]*!")  # [1]Sheet1!A1, [1]!Name: another workbook, as the file numbers it
_SHEET = re.compile(r"(?:'((?:[^']|'')+)'|([^'!]+))!(.+)\Z")
_CELL = r"\$?([A-Za-z]{1,3})\$?([0-9]{1,7})"
_COLUMN = r"\$?([A-Za-z]{1,3})"
_ROW = r"\$?([0-9]{1,7})"
_AREA = re.compile(rf"{_CELL}(?::{_CELL})?\Z|{_COLUMN}:{_COLUMN}\Z|{_ROW}:{_ROW}\Z")


class FormulaSyntaxError(ValueError):
    """Formula text that cannot be parsed; the message says why in plain words."""


class _Tok(NamedTuple):
    value: str
    type: str
    subtype: str
    spaced: bool  # whitespace came just before


def _valid_area(m: re.Match) -> bool:
    columns = [g for g in (m.group(1), m.group(3), m.group(5), m.group(6)) if g]
    rows = [g for g in (m.group(2), m.group(4), m.group(7), m.group(8)) if g]
    return all(column_number(c) <= MAX_COL for c in columns) and all(1 <= int(r) <= MAX_ROW for r in rows)


def _operand(text: str) -> Node:
    """A RANGE token of the tokenizer: a reference, a defined name, or TRUE/FALSE in lower case."""
    if text.startswith("@"):
        raise FormulaSyntaxError("the implicit intersection operator @ is not supported")
    if text.startswith("[") and not _LINKED.match(text):
        raise FormulaSyntaxError(f"{text}: references to other workbooks are not supported")
    sheet, local = None, text
    m = _SHEET.match(text)
    if m:
        sheet = m.group(1).replace("''", "'") if m.group(1) is not None else m.group(2)
        local = m.group(3)
        if "[" in sheet and not _LINKED.match(sheet + "!"):  # 'C:\dir\[Book.xlsx]Sheet'!A1
            raise FormulaSyntaxError(f"{text}: references to other workbooks are not supported")
        if local.upper() == REF:  # Sheet1!#REF!: a reference whose cells were deleted
            return Literal(CellError(REF, f"{text}: the cells referred to were deleted"))
    elif text.upper() in ("TRUE", "FALSE"):
        return Literal(text.upper() == "TRUE")
    area = _AREA.match(local)
    if area and _valid_area(area):
        return Ref(sheet, local.upper())
    if _NAME.match(local):
        return Name(text)
    raise FormulaSyntaxError(f"{text!r} is neither a cell reference nor a name")


def _literal(tok: _Tok) -> Scalar:
    """The constant an OPERAND token stands for (RANGE tokens excepted)."""
    if tok.subtype == "NUMBER":
        x = float(tok.value)
        if not math.isfinite(x):
            raise FormulaSyntaxError(f"the number {tok.value} is too large")
        return x
    if tok.subtype == "TEXT":
        return tok.value[1:-1].replace('""', '"')
    if tok.subtype == "LOGICAL":
        return tok.value.upper() == "TRUE"
    error = parse_error_text(tok.value)
    if error is None:
        raise FormulaSyntaxError(f"{tok.value} is not an error value")
    return error


def _starts_reference(tok: _Tok) -> bool:
    return (tok.type, tok.subtype) in (("OPERAND", "RANGE"), ("FUNC", "OPEN"), ("PAREN", "OPEN"))


def _is_reference(node: Node) -> bool:
    """Whether ``node`` may stand for a reference, so a space after it intersects."""
    return type(node) in (Ref, Name, Call) or (type(node) is Binary and node.op in _REFERENCE_OPERATORS)


class _Parser:
    def __init__(self, tokens: list[_Tok]):
        self.tokens = tokens
        self.pos = 0
        self.invoking = 0  # inside an Invoke's arguments, where a comma separates them

    def peek(self) -> _Tok | None:
        return self.tokens[self.pos] if self.pos < len(self.tokens) else None

    def next(self) -> _Tok:
        tok = self.peek()
        if tok is None:
            raise FormulaSyntaxError("the formula ends too early")
        self.pos += 1
        return tok

    def unexpected(self, tok: _Tok) -> FormulaSyntaxError:
        if tok.type == "OPERAND" or tok.subtype == "OPEN":  # a value follows a value
            return FormulaSyntaxError(f"an operator is missing before {tok.value!r}")
        return FormulaSyntaxError(f"unexpected {tok.value!r}")

    def expect(self, type_: str, subtype: str, what: str) -> None:
        tok = self.peek()
        if tok is None:
            raise FormulaSyntaxError(f"{what} is missing")
        if tok.type != type_ or tok.subtype != subtype:
            raise self.unexpected(tok)
        self.pos += 1

    def expression(self, min_power: int = 0) -> Node:
        left = self.prefix()
        while (tok := self.peek()) is not None:
            if tok.type == "OPERATOR-POSTFIX":
                self.pos += 1
                left = Unary("%", left)
            elif tok.type == "OPERATOR-INFIX" and tok.value == "," and self.invoking:
                break  # between the arguments of an invocation, not a union
            elif tok.type == "OPERATOR-INFIX" and tok.value in _INFIX:
                power = _INFIX[tok.value]
                if power < min_power:
                    break
                self.pos += 1
                left = Binary(tok.value, left, self.expression(power + 1))
            elif tok.spaced and _starts_reference(tok) and _INFIX[" "] >= min_power and _is_reference(left):
                left = Binary(" ", left, self.expression(_INFIX[" "] + 1))  # A1:C3 B2:D2, the cells in both
            elif tok.type == "OPERATOR-INFIX":
                raise self.unexpected(tok)
            elif tok.type == "PAREN" and tok.subtype == "OPEN" and type(left) in (Call, Invoke):
                self.pos += 1  # a function a call returned, called: LAMBDA(x, x+1)(5)
                left = Invoke(left, self.invocation())
            else:
                break
        return left

    def invocation(self) -> tuple[Node, ...]:
        """The arguments of an :class:`Invoke` after its ``(``; the tokenizer reads the commas
        between them as union operators."""
        args: list[Node] = []
        while True:
            tok = self.peek()
            if tok is not None and (tok.value == "," or (tok.type, tok.subtype) == ("PAREN", "CLOSE")):
                if args or tok.value == ",":
                    args.append(Missing())
            else:
                self.invoking += 1
                try:
                    args.append(self.expression())
                finally:
                    self.invoking -= 1
            tok = self.next()
            if (tok.type, tok.subtype) == ("PAREN", "CLOSE"):
                return tuple(args)
            if tok.value != ",":
                raise self.unexpected(tok)

    def prefix(self) -> Node:
        tok = self.next()
        if tok.type == "OPERATOR-PREFIX":
            return Unary(tok.value, self.expression(_PREFIX_POWER))
        if tok.type == "OPERAND":
            return _operand(tok.value) if tok.subtype == "RANGE" else Literal(_literal(tok))
        if tok.type == "FUNC" and tok.subtype == "OPEN":
            return self.call(tok.value[:-1])
        if tok.type == "PAREN" and tok.subtype == "OPEN":
            invoking, self.invoking = self.invoking, 0  # inside parentheses a comma is a union again
            try:
                inner = self.expression()
            finally:
                self.invoking = invoking
            self.expect("PAREN", "CLOSE", "a closing parenthesis")
            return inner
        if tok.type == "ARRAY" and tok.subtype == "OPEN":
            return self.array()
        raise self.unexpected(tok)

    def call(self, written: str) -> Call:
        name, prefix = written.upper(), ""
        while name.startswith(_PREFIXES):
            prefix += name[:6].lower()
            name = name[6:]
        if not _FUNCTION_NAME.match(name):
            raise FormulaSyntaxError(f"{written!r} is not a function name")
        args: list[Node] = []
        tok = self.peek()
        if tok is not None and tok.type == "FUNC" and tok.subtype == "CLOSE":
            self.pos += 1
            return Call(name, (), prefix)
        while True:
            tok = self.peek()
            if tok is not None and (tok.type, tok.subtype) in (("SEP", "ARG"), ("FUNC", "CLOSE")):
                args.append(Missing())
            else:
                args.append(self.expression())
            tok = self.peek()
            if tok is None:
                raise FormulaSyntaxError(f"the closing parenthesis of {name} is missing")
            self.pos += 1
            if tok.type == "FUNC" and tok.subtype == "CLOSE":
                return Call(name, tuple(args), prefix)
            if (tok.type, tok.subtype) != ("SEP", "ARG"):
                raise self.unexpected(tok)

    def array(self) -> Array:
        rows: list[list[Scalar]] = [[]]
        while True:
            rows[-1].append(self.array_element())
            tok = self.next()
            if tok.type == "ARRAY" and tok.subtype == "CLOSE":
                break
            if tok.type != "SEP":
                raise self.unexpected(tok)
            if tok.subtype == "ROW":
                rows.append([])
        if len({len(r) for r in rows}) > 1:
            raise FormulaSyntaxError("the rows of an array constant must have the same length")
        return Array(tuple(tuple(r) for r in rows))

    def array_element(self) -> Scalar:
        tok = self.next()
        sign = None
        if tok.type == "OPERATOR-PREFIX":
            sign, tok = tok.value, self.next()
        if tok.type != "OPERAND":
            raise FormulaSyntaxError("an array constant holds only numbers, text, TRUE/FALSE and error values")
        value = _operand(tok.value) if tok.subtype == "RANGE" else Literal(_literal(tok))
        if not isinstance(value, Literal) or (sign and type(value.value) is not float):
            raise FormulaSyntaxError("an array constant holds only numbers, text, TRUE/FALSE and error values")
        return -value.value if sign == "-" else value.value


def _split_range_operator(t) -> list[tuple[str, str, str]]:
    """The tokenizer keeps a range operator next to a function or reference in one token
    (``A1:INDEX(``, ``:OFFSET(``, ``:B5``): split it off as an infix ``:``."""
    if t.type == "FUNC" and t.subtype == "OPEN" and ":" in t.value and not t.value.startswith("'"):
        left, _, fn = t.value.rpartition(":")
        return ([(left, "OPERAND", "RANGE")] if left else []) + [(":", "OPERATOR-INFIX", ""), (fn, "FUNC", "OPEN")]
    if t.type == "OPERAND" and t.subtype == "RANGE" and t.value.startswith(":") and len(t.value) > 1:
        return [(":", "OPERATOR-INFIX", ""), (t.value[1:], "OPERAND", "RANGE")]
    return [(t.value, t.type, t.subtype)]


def _tokens(formula: str) -> list[_Tok]:
    try:
        items = tokenizer()(formula).items
    except IndexError:  # the tokenizer's bracket stack ran empty
        raise FormulaSyntaxError("a closing bracket has no opening one") from None
    except Exception as exc:
        raise FormulaSyntaxError(f"the formula cannot be split into tokens: {exc}") from None
    out, spaced = [], False
    for t in items:
        if t.type == "WHITE-SPACE":
            spaced = True
            continue
        for value, type_, subtype in _split_range_operator(t):
            out.append(_Tok(value, type_, subtype, spaced))
            spaced = False
    return out


def _depth(node: Node) -> int:
    """How deep evaluation recurses: the left operand of an operator chain (``A1+A2+A3``)
    is evaluated in a loop, so it counts at its parent's depth."""
    stack, deepest = [(node, 1)], 0
    while stack:
        n, d = stack.pop()
        deepest = max(deepest, d)
        if type(n) is Binary and n.op not in (":", " "):  # a union is a chain too: (A1,A2,...,A300)
            stack += [(n.left, d), (n.right, d + 1)]
        else:
            stack += [(c, d + 1) for c in children(n)]
    return deepest


@lru_cache(maxsize=4096)
def parse(formula: str) -> Node:
    """The syntax tree of ``formula`` (leading ``=`` optional); results are cached.

    Raises :class:`FormulaSyntaxError` for text that is not a formula.

    >>> parse("=-2^2")
    Binary(op='^', left=Unary(op='-', operand=Literal(value=2.0)), right=Literal(value=2.0))
    >>> parse('={1,-2;"a",TRUE}')
    Array(rows=((1.0, -2.0), ('a', True)))
    >>> parse("=IF(A1,,$B$2)").args[1]
    Missing()
    >>> parse("=1+")
    Traceback (most recent call last):
    ...
    cellfuncs.formula.parser.FormulaSyntaxError: the formula ends too early
    >>> parse("=" + "+".join(["1"] * 5000))
    Traceback (most recent call last):
    ...
    cellfuncs.formula.parser.FormulaSyntaxError: the formula has 9,999 characters; Excel's limit is 8,192
    """
    text = formula.strip()
    written = len(_FILE_PREFIXES.sub("", text)) - text.startswith("=")
    if written > MAX_FORMULA_TEXT:  # before tokenizing: the tokens of a huge text would take gigabytes
        raise FormulaSyntaxError(f"the formula has {written:,} characters; Excel's limit is {MAX_FORMULA_TEXT:,}")
    tokens = _tokens(text if text.startswith("=") else "=" + text)
    if not tokens:
        raise FormulaSyntaxError("the formula is empty")
    parser = _Parser(tokens)
    try:
        tree = parser.expression()
    except RecursionError:
        raise FormulaSyntaxError(f"the formula nests more than {MAX_DEPTH} levels deep") from None
    tok = parser.peek()
    if tok is not None:
        raise parser.unexpected(tok)
    if _depth(tree) > MAX_DEPTH:
        raise FormulaSyntaxError(f"the formula nests more than {MAX_DEPTH} levels deep")
    return tree
