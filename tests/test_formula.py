"""Tests of the formula engine (cellfuncs.formula): parsing, evaluation, built-ins.

Expected values marked "Excel behaviour (common practice)" are what Excel documents or
is commonly known to do; "engine contract" values are this engine's own design choices
(value types, error reasons, tree shapes). Unmarked values follow from the arithmetic of
the formula itself (e.g. SQRT(16) = 4) or from the fake context defined here.
"""

from __future__ import annotations

import contextlib
import dataclasses
import math
import os

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cellfuncs.errors import DIV0, NA, NAME, NUM, REF, STRICT_VARIABLE, VALUE, CellError
from cellfuncs.formula import (
    BUILTINS,
    Array,
    Binary,
    Call,
    FormulaSyntaxError,
    Literal,
    Missing,
    Name,
    Ref,
    SimpleContext,
    Unary,
    as_value,
    compute,
    evaluate,
    format_number,
    parse,
    walk,
)
from cellfuncs.formula.arrays import object_array


def arr(*rows):
    return object_array([list(r) for r in rows])


def values(v):
    """Array value as nested lists (for comparisons)."""
    assert isinstance(v, np.ndarray) and v.ndim == 2 and v.dtype == object
    return v.tolist()


class Sheet(SimpleContext):
    """A fake workbook: cells by (sheet, ref text); records the look-ups it served."""

    def __init__(self, cells=None, functions=None, names=None):
        super().__init__(functions, names)
        self.cells = cells or {}
        self.asked = []

    def reference(self, sheet, ref):
        self.asked.append((sheet, ref))
        if (sheet, ref) in self.cells:
            return self.cells[(sheet, ref)]
        return super().reference(sheet, ref)


# A1:C2 holds 1, "2", TRUE / blank, 4, "x"
GRID = arr([1.0, "2", True], [None, 4.0, "x"])
CELLS = {
    (None, "A1"): 2.0,
    (None, "B1"): None,
    (None, "A1:C2"): GRID,
    (None, "E1:E3"): arr([1.0], [CellError(NA, "no data")], [3.0]),
    ("My sheet", "A1:B2"): arr([10.0, 20.0], [30.0, 40.0]),
    (None, "K1:L4"): arr(["a", 1.0], ["b", 2.0], ["c", 3.0], ["d", 4.0]),
}


def calc(formula, **kw):
    return compute(formula, Sheet(CELLS, **kw))


# ---------------------------------------------------------------- precedence


@pytest.mark.parametrize(
    "formula, expected",
    [
        ("=1+2*3", 7.0),  # arithmetic: * before +
        ("=(1+2)*3", 9.0),  # arithmetic
        ("=-2^2", 4.0),  # Excel behaviour (common practice): negation binds tighter than ^
        ("=0-2^2", -4.0),  # Excel behaviour (common practice): binary minus does not
        ("=2^3^2", 64.0),  # Excel behaviour (common practice): ^ groups left to right
        ("=2^-2", 0.25),  # arithmetic
        ("=-3^2*2", 18.0),  # Excel behaviour (common practice)
        ("=10-4-3", 3.0),  # arithmetic, left to right
        ("=12/3/2", 2.0),  # arithmetic, left to right
        ("=2*3%", 0.06),  # Excel behaviour (common practice): % divides by 100
        ("=50%^2", 0.25),  # Excel behaviour (common practice): % before ^
        ("=1+2&3", "33"),  # Excel behaviour (common practice): & below +
        ('=1&2="12"', True),  # Excel behaviour (common practice): comparisons lowest
        ("=1+1=2", True),  # Excel behaviour (common practice)
        ("=1--1", 2.0),  # arithmetic
        ('=+"abc"', "abc"),  # Excel behaviour (common practice): prefix + changes nothing
        ("1+2", 3.0),  # engine contract: leading = optional
    ],
)
def test_precedence(formula, expected):
    assert calc(formula) == pytest.approx(expected) if type(expected) is float else calc(formula) == expected


def test_tree_shapes():
    # engine contract: the trees the parser builds
    assert parse("=-2^2") == Binary("^", Unary("-", Literal(2.0)), Literal(2.0))
    assert parse("=1+2*3") == Binary("+", Literal(1.0), Binary("*", Literal(2.0), Literal(3.0)))
    assert parse("=A1%") == Unary("%", Ref(None, "A1"))


# ---------------------------------------------------------------- parsing


@pytest.mark.parametrize(
    "formula, node",
    [
        ('="say ""hi"""', Literal('say "hi"')),  # Excel behaviour (common practice): doubled quotes
        ("=true", Literal(True)),
        ("=FALSE", Literal(False)),
        ("=#N/A", Literal(CellError(NA))),
        ("=#DIV/0!", Literal(CellError(DIV0))),
        ("=1E+3", Literal(1000.0)),
        ("=.5", Literal(0.5)),
        ("=a1", Ref(None, "A1")),
        ("=$A$1", Ref(None, "$A$1")),
        ("=A1:b3", Ref(None, "A1:B3")),
        ("=Sheet1!A1", Ref("Sheet1", "A1")),
        ("='My sheet'!A1:B2", Ref("My sheet", "A1:B2")),
        ("='it''s'!$C$3", Ref("it's", "$C$3")),
        ("=A:A", Ref(None, "A:A")),
        ("=$B:$D", Ref(None, "$B:$D")),
        ("=1:3", Ref(None, "1:3")),
        ("=XFD1048576", Ref(None, "XFD1048576")),  # the last cell of a sheet
        ("=Rate", Name("Rate")),
        ("=Sheet1!Rate", Name("Sheet1!Rate")),
        ("=XFE1", Name("XFE1")),  # beyond column XFD: a name, not a cell
        ("=_xlfn.CONCAT(1)", Call("CONCAT", (Literal(1.0),), "_xlfn.")),
        ("=_xlfn._xlws.SORT(A1)", Call("SORT", (Ref(None, "A1"),), "_xlfn._xlws.")),
        ("=sum(1)", Call("SUM", (Literal(1.0),))),
        ("=PI()", Call("PI", ())),
        ("=IF(,1,)", Call("IF", (Missing(), Literal(1.0), Missing()))),
        ("= 1 + 2 ", Binary("+", Literal(1.0), Literal(2.0))),
    ],
)
def test_parse(formula, node):
    tree = parse(formula)
    assert tree == node
    assert type(tree) is type(node) and type(getattr(tree, "value", None)) is type(getattr(node, "value", None))


def test_array_constants():
    # engine contract: rows x columns, floats, text, booleans, errors, negative numbers
    assert parse('={1,-2;"a",TRUE;#N/A,+3}') == Array(((1.0, -2.0), ("a", True), (CellError(NA), 3.0)))
    v = calc('={1,-2;"a",TRUE}')
    assert values(v) == [[1.0, -2.0], ["a", True]]
    assert v.shape == (2, 2) and type(v[0, 0]) is float
    assert calc("={1;2;3}").shape == (3, 1)


def test_parse_results_are_cached_and_immutable():
    tree = parse("=SUM(A1:B2)+1")
    assert parse("=SUM(A1:B2)+1") is tree  # engine contract: lru_cache on the text
    hash(tree)
    with pytest.raises(dataclasses.FrozenInstanceError):
        tree.op = "-"
    assert [type(n).__name__ for n in walk(tree)] == ["Binary", "Call", "Ref", "Literal"]


@pytest.mark.parametrize(
    "formula, words",
    [
        ("=", "empty"),
        ("", "empty"),
        ("=1+", "ends too early"),
        ("=(1", "closing parenthesis"),
        ("=SUM(1", "closing parenthesis of SUM"),
        ("=)", "closing bracket"),
        ('="abc', "tokens"),
        ("=1 2", "operator is missing"),
        ("={1,2;3}", "same length"),
        ("={1,A1}", "array constant"),
        ('={-"a"}', "array constant"),
        ("={1,,2}", "array constant"),
        ("=[Book1.xlsx]Sheet1!A1", "other workbooks"),  # a file writes [1]Sheet1!A1, numbered links
        ("=@A1", "implicit intersection"),
        ("=1e400", "too large"),
        ("=#BOGUS!", "Invalid error code"),
        ("=#GETTING_DATA", "not an error value"),
        ("=Table1[Col]", "neither a cell reference nor a name"),
        ("=1;2", "unexpected ';'"),
        ("=" + "-" * 300 + "1", "levels deep"),
        ("=" + "(" * 2000 + "1" + ")" * 2000, "levels deep"),
    ],
)
def test_syntax_errors(formula, words):
    with pytest.raises(FormulaSyntaxError, match=words.replace("(", r"\(").replace("[", r"\[")) as info:
        parse(formula)
    assert isinstance(info.value, ValueError)


# ---------------------------------------------------------------- values and coercion


@pytest.mark.parametrize(
    "formula, expected",
    [
        ('="3"+1', 4.0),  # Excel behaviour (common practice): numeric text converts
        ("=TRUE+1", 2.0),  # Excel behaviour (common practice): TRUE is 1
        ("=B1+1", 1.0),  # Excel behaviour (common practice): blank is 0
        ('="1,000"*2', 2000.0),  # Excel behaviour (common practice): thousands separators
        ('="50%"*2', 1.0),  # Excel behaviour (common practice)
        ("=-B1", 0.0),  # Excel behaviour (common practice)
    ],
)
def test_arithmetic_coercion(formula, expected):
    assert calc(formula) == expected


def test_numbers_are_floats():
    assert type(calc("=1")) is float and type(calc("=1+1")) is float  # engine contract


@pytest.mark.parametrize(
    "formula, code",
    [
        ('="abc"+1', VALUE),  # Excel behaviour (common practice)
        ("=1/0", DIV0),  # Excel behaviour (common practice)
        ("=1E308*10", NUM),  # Excel behaviour (common practice): overflow
        ("=0^0", NUM),  # Excel behaviour (common practice)
        ("=0^-1", DIV0),  # Excel behaviour (common practice)
        ("=(-8)^(1/3)", NUM),  # Excel behaviour (common practice)
        ("=FOO(1)", NAME),  # Excel behaviour (common practice): unknown function
        ("=NoSuchName", NAME),  # Excel behaviour (common practice): unknown name
        ("=Z9", REF),  # engine contract: no such cell in the fake sheet
    ],
)
def test_error_values(formula, code):
    v = calc(formula)
    assert type(v) is CellError and v.code == code and v.reason


def test_unknown_function_reason():
    assert calc("=FOO(1)") == CellError(NAME, "unknown function FOO")  # the pack's own message
    assert compute("=A1").reason == "A1 is a cell reference, but the formula has no workbook"  # engine contract


@pytest.mark.parametrize(
    "x, text",
    [
        (1.5, "1.5"),  # Excel behaviour (common practice)
        (2.0, "2"),  # Excel behaviour (common practice)
        (-0.5, "-0.5"),  # Excel behaviour (common practice)
        (1e20, "1E+20"),  # Excel behaviour (common practice)
        (1 / 3, "0.333333333333333"),  # Excel behaviour (common practice): 15 significant digits
        (123456789012345.0, "123456789012345"),  # Excel behaviour (common practice)
        (1e15, "1E+15"),  # Excel behaviour (common practice)
        (123456789012345678.0, "1.23456789012346E+17"),  # Excel behaviour (common practice)
        (0.1 + 0.2, "0.3"),  # Excel behaviour (common practice)
        (0.0001, "0.0001"),  # Excel behaviour (common practice)
        (-0.0, "0"),
        (1.5e-300, "1.5E-300"),
    ],
)
def test_format_number(x, text):
    assert format_number(x) == text


def test_concatenation():
    assert calc('="T="&1.5&"K"&TRUE&B1') == "T=1.5KTRUE"  # Excel behaviour (common practice)
    assert calc("=1E20&1/4") == "1E+200.25"  # Excel behaviour (common practice)


@pytest.mark.parametrize(
    "formula, expected",
    [
        ('="abc"="ABC"', True),  # Excel behaviour (common practice): case-insensitive
        ('="a"<"B"', True),  # Excel behaviour (common practice)
        ('=9<"1"', True),  # Excel behaviour (common practice): numbers < text
        ('="zzz"<FALSE', True),  # Excel behaviour (common practice): text < booleans
        ("=TRUE>99", True),  # Excel behaviour (common practice)
        ("=B1=0", True),  # Excel behaviour (common practice): blank equals 0
        ('=B1=""', True),  # Excel behaviour (common practice): and the empty text
        ("=B1=FALSE", True),  # Excel behaviour (common practice): and FALSE
        ("=1<>1", False),
        ("=2>=2", True),
        ("=2<=1", False),
    ],
)
def test_comparisons(formula, expected):
    assert calc(formula) is expected


# ---------------------------------------------------------------- arrays


def test_broadcasting():
    # Excel behaviour (common practice): element-wise array arithmetic
    assert values(calc("={1,2,3}+{10;20}")) == [[11.0, 12.0, 13.0], [21.0, 22.0, 23.0]]
    assert values(calc("={1,2;3,4}*2")) == [[2.0, 4.0], [6.0, 8.0]]
    assert values(calc("={1,2;3,4}-{1,1;1,1}")) == [[0.0, 1.0], [2.0, 3.0]]
    assert values(calc("={1,2;3,4}+{10,20}")) == [[11.0, 22.0], [13.0, 24.0]]
    assert values(calc("={1}+{5,6}")) == [[6.0, 7.0]]
    assert values(calc('={1,2}&"x"')) == [["1x", "2x"]]
    assert values(calc("={1,2}<{2;1}")) == [[True, False], [False, False]]
    assert values(calc("=-{1,2}%")) == [[-0.01, -0.02]]


def test_shapes_that_differ_pad_with_na():
    # Excel behaviour (from memory of Microsoft's array formula guidelines; the same rule gives the
    # #N/A that Excel stored for DATE(A2:A6,B2:B4,C2:C3) in IronCalc's DATE workbook): a single row
    # or column repeats, a shorter array is padded with #N/A
    na = CellError(NA, "beyond the end of the shorter array")
    assert values(calc("={1,2,3;4,5,6}+{1;2;3;4}")) == [[2.0, 3.0, 4.0], [6.0, 7.0, 8.0], [na] * 3, [na] * 3]
    assert values(calc("={1,2}*{1,2,3}")) == [[1.0, 4.0, na]]


def test_errors_stay_per_element():
    # Excel behaviour (common practice): an error element does not spoil its neighbours
    v = calc('={1,0,"a"}/{2,0,1}')
    assert v[0, 0] == 0.5
    assert v[0, 1].code == DIV0 and v[0, 2].code == VALUE
    v = calc("=SQRT({4,-1})+1")
    assert v[0, 0] == 3.0 and v[0, 1] == CellError(NUM, "square root of a negative number")


# ---------------------------------------------------------------- error propagation


def test_first_error_wins_and_keeps_reason():
    assert calc("=#N/A+1/0").code == NA  # engine contract: left to right
    assert calc("=1/0+#N/A") == CellError(DIV0, "division by zero")
    assert calc("=SQRT(-4)*2+1/0") == CellError(NUM, "square root of a negative number")
    assert calc('=ROUND("x"&1/0, 1)').code == DIV0
    v = calc("={1,2}/{0,1}+#N/A")  # element by element: the left error where there is one
    assert [e.code for e in v.flat] == [DIV0, NA]
    assert values(calc("=#N/A+{1,2}")) == [[CellError(NA), CellError(NA)]]  # the array still shapes the result


def test_iferror_and_iserror():
    assert calc('=IFERROR(1/0, "none")') == "none"  # Excel behaviour (common practice)
    assert calc("=IFERROR(5, 1/0)") == 5.0  # Excel behaviour (common practice)
    assert calc("=IFERROR(#N/A,)") == 0.0  # Excel behaviour (common practice): empty fallback is 0
    assert values(calc("=IFERROR(1/{1,0,4}, -1)")) == [[1.0, -1.0, 0.25]]
    assert values(calc("=IFERROR(1/{1,0}, {7,8})")) == [[1.0, 8.0]]
    assert calc("=ISERROR(SQRT(-1))") is True  # Excel behaviour (common practice)
    assert calc('=ISERROR("x")') is False
    assert values(calc("=ISERROR(E1:E3)")) == [[False], [True], [False]]


def test_iferror_evaluates_fallback_only_on_error():
    calls = []

    def count():
        calls.append(1)
        return 0.0

    assert calc("=IFERROR(1, PROBE())", functions={"PROBE": count}) == 1.0
    assert not calls
    assert calc("=IFERROR(1/0, PROBE())", functions={"PROBE": count}) == 0.0
    assert calls == [1]


# ---------------------------------------------------------------- built-ins


def test_if():
    assert calc('=IF(2>1, "yes", "no")') == "yes"  # Excel behaviour (common practice)
    assert calc("=IF(FALSE, 1)") is False  # Excel behaviour (common practice): no else gives FALSE
    assert calc("=IF(FALSE, 1, )") == 0.0  # Excel behaviour (common practice): empty else gives 0
    assert calc("=IF(TRUE,)") == 0.0  # Excel behaviour (common practice)
    assert calc('=IF("maybe", 1, 2)').code == VALUE  # Excel behaviour (common practice)
    assert calc("=IF(#N/A, 1, 2)").code == NA
    assert values(calc('=IF({1,0;0,1}, "d", {"a";"b"})')) == [["d", "a"], ["b", "d"]]


def test_if_short_circuits():
    calls = []
    fn = {"BOOM": lambda: calls.append(1) or 1.0}
    assert calc("=IF(TRUE, 1, BOOM())", functions=fn) == 1.0
    assert calc("=IF(FALSE, BOOM(), 2)", functions=fn) == 2.0
    assert not calls  # engine contract: the other branch is not evaluated


def test_and_or_not():
    assert calc("=AND(TRUE, 1, 2>1)") is True  # Excel behaviour (common practice)
    assert calc("=AND(TRUE, 0)") is False
    assert calc("=AND(A1:C2)") is True  # Excel behaviour (common practice): text and blanks skipped
    assert calc('=AND("x")').code == VALUE  # Excel behaviour (common practice)
    assert calc('=AND({"x"})').code == VALUE  # Excel behaviour (common practice): no logical values
    assert calc("=OR(FALSE, 0, 3)") is True
    assert calc("=OR(FALSE, FALSE)") is False
    assert calc("=OR(E1:E3)").code == NA
    assert calc("=NOT(TRUE)") is False
    assert calc("=NOT(0)") is True
    assert values(calc("=NOT({1,0})")) == [[False, True]]


def test_aggregates_ranges_vs_direct_arguments():
    # Excel behaviour (common practice): in a range only numbers count; typed arguments convert
    assert calc("=SUM(A1:C2)") == 5.0  # 1 + 4; "2", TRUE, blank, "x" skipped
    assert calc('=SUM("2", TRUE, 1)') == 4.0
    assert calc('=SUM({1,"2",TRUE})') == 1.0
    assert calc('=SUM("x")').code == VALUE
    assert calc("=SUM(A1:C2, 10)") == 15.0
    assert calc("=SUM(E1:E3)") == CellError(NA, "no data")  # Excel behaviour (common practice): errors propagate
    assert calc("=SUM(B1)") == 0.0
    assert calc("=SUM(1,,2)") == 3.0  # Excel behaviour (common practice): empty argument is 0
    assert calc("=AVERAGE(A1:C2)") == 2.5  # Excel behaviour (common practice)
    assert calc("=AVERAGE(1, 2, TRUE)") == pytest.approx(4.0 / 3.0)
    assert calc('=AVERAGE({"a"})').code == DIV0  # Excel behaviour (common practice)
    assert calc("=MIN(A1:C2)") == 1.0
    assert calc("=MIN(5, -2, 3)") == -2.0
    assert calc("=MAX(A1:C2, 3)") == 4.0
    assert calc('=MAX({"a"})') == 0.0  # Excel behaviour (common practice): no numbers give 0
    assert calc("=MIN(B1)") == 0.0


@pytest.mark.parametrize(
    "formula, expected",
    [
        ("=ROUND(2.5, 0)", 3.0),  # Excel behaviour (common practice): half away from zero
        ("=ROUND(-2.5, 0)", -3.0),  # Excel behaviour (common practice)
        ("=ROUND(2.675, 2)", 2.68),  # Excel behaviour (common practice): decimal digits, not binary
        ("=ROUND(1234.567, -2)", 1200.0),  # Excel behaviour (common practice)
        ("=ROUND(1.25, 1.9)", 1.3),  # Excel behaviour (common practice): digit count truncated
        ("=ROUND(2.5,)", 3.0),  # Excel behaviour (common practice): empty digits are 0
        ("=ROUNDUP(3.14159, 3)", 3.142),  # Excel behaviour (common practice)
        ("=ROUNDUP(-3.14159, 1)", -3.2),  # Excel behaviour (common practice): away from zero
        ("=ROUNDUP(31415.92654, -2)", 31500.0),  # Excel behaviour (common practice)
        ("=ROUNDDOWN(3.14159, 3)", 3.141),  # Excel behaviour (common practice)
        ("=ROUNDDOWN(-3.14159, 1)", -3.1),  # Excel behaviour (common practice): toward zero
        ("=ABS(-2)", 2.0),
        ("=SQRT(16)", 4.0),
        ("=EXP(1)", math.e),
        ("=LN(EXP(2))", 2.0),
        ("=LOG10(1000)", 3.0),
        ("=POWER(2, 10)", 1024.0),
        ("=POWER(4, 0.5)", 2.0),
        ("=PI()", math.pi),
    ],
)
def test_math(formula, expected):
    assert calc(formula) == pytest.approx(expected, rel=1e-15)


@pytest.mark.parametrize(
    "formula, code",
    [
        ("=SQRT(-1)", NUM),  # Excel behaviour (common practice)
        ("=LN(0)", NUM),  # Excel behaviour (common practice)
        ("=LOG10(-1)", NUM),  # Excel behaviour (common practice)
        ("=EXP(1000)", NUM),  # Excel behaviour (common practice): overflow
        ("=POWER(0, -1)", DIV0),  # Excel behaviour (common practice)
        ('=ABS("x")', VALUE),  # Excel behaviour (common practice)
        ("=ROUND(1)", VALUE),  # engine contract: wrong argument count
        ("=PI(1)", VALUE),  # engine contract
    ],
)
def test_math_errors(formula, code):
    assert calc(formula).code == code


def test_elementwise_functions_broadcast():
    assert values(calc("=ABS({-1,2;-3,4})")) == [[1.0, 2.0], [3.0, 4.0]]
    assert values(calc("=ROUND({1.25,2.35}, {1;0})")) == [[1.3, 2.4], [1.0, 2.0]]
    assert values(calc("=POWER({2,3}, 2)")) == [[4.0, 9.0]]
    v = calc('=SQRT({4,"x",-1})')
    assert v[0, 0] == 2.0 and v[0, 1].code == VALUE and v[0, 2].code == NUM


def test_index():
    assert calc("=INDEX({1,2;3,4}, 2, 1)") == 3.0  # Excel behaviour (common practice)
    assert calc("=INDEX({5,6,7}, 3)") == 7.0  # Excel behaviour (common practice): single row
    assert calc("=INDEX({5;6;7}, 2)") == 6.0  # Excel behaviour (common practice): single column
    assert values(calc("=INDEX({1,2;3,4}, 2)")) == [[3.0, 4.0]]  # Excel behaviour (common practice): whole row
    assert values(calc("=INDEX({1,2;3,4}, 0, 2)")) == [[2.0], [4.0]]  # Excel behaviour (common practice)
    assert values(calc("=INDEX({1,2;3,4}, , 2)")) == [[2.0], [4.0]]
    assert values(calc("=INDEX({1,2;3,4}, {1,2}, 2)")) == [[2.0, 4.0]]
    assert calc("=INDEX('My sheet'!A1:B2, 2, 2)") == 40.0
    assert calc("=INDEX({1,2;3,4}, 3, 1)").code == REF  # Excel behaviour (common practice)
    assert calc("=INDEX({1,2;3,4}, -1, 1)").code == VALUE  # Excel behaviour (common practice)


def test_match():
    assert calc("=MATCH(25, {10,20,30})") == 2.0  # Excel behaviour (common practice): default type 1
    assert calc("=MATCH(30, {10,20,30}, 1)") == 3.0
    assert calc("=MATCH(5, {10,20,30}, 1)").code == NA  # Excel behaviour (common practice)
    assert calc("=MATCH(20, {10,20,30}, 0)") == 2.0
    assert calc('=MATCH("B", {"a";"b";"c"}, 0)') == 2.0  # Excel behaviour (common practice): case-insensitive
    assert calc('=MATCH("c*", {"ab","cd"}, 0)') == 2.0  # Excel behaviour (common practice): wildcards
    assert calc('=MATCH("a?", {"a","ab"}, 0)') == 2.0
    assert calc('=MATCH("~*", {"a","*"}, 0)') == 2.0
    assert calc("=MATCH(20, {10,20,30},)") == 2.0  # Excel behaviour (common practice): empty type is 0
    assert calc("=MATCH(25, {10,20,30}, 0)") == CellError(NA, "25 was not found")
    assert calc("=MATCH(25, {30,20,10}, -1)") == 1.0  # Excel behaviour (common practice)
    assert calc("=MATCH(20, {30,20,10}, -1)") == 2.0
    assert calc("=MATCH(40, {30,20,10}, -1)").code == NA
    assert values(calc("=MATCH({20,30}, {10,20,30}, 0)")) == [[2.0, 3.0]]
    assert calc("=MATCH(1, {1,2;3,4}, 0)").code == NA  # Excel behaviour (common practice): 2-D lookup array


def test_vlookup():
    assert calc('=VLOOKUP("C", K1:L4, 2, FALSE)') == 3.0  # Excel behaviour (common practice)
    assert calc('=VLOOKUP("c", K1:L4, 2, 0)') == 3.0
    assert calc('=VLOOKUP("bb", K1:L4, 2)') == 2.0  # Excel behaviour (common practice): approximate
    assert calc('=VLOOKUP("bb", K1:L4, 2,)').code == NA  # Excel behaviour (common practice): empty mode is exact
    assert calc("=VLOOKUP(2.5, {1,10;2,20;3,30}, 2, TRUE)") == 20.0
    assert calc("=VLOOKUP(0.5, {1,10;2,20}, 2)").code == NA
    assert calc("=VLOOKUP(1, {1,10}, 3, FALSE)").code == REF  # Excel behaviour (common practice)
    assert calc("=VLOOKUP(1, {1,10}, 0, FALSE)").code == VALUE  # Excel behaviour (common practice)
    assert values(calc("=VLOOKUP({1;3}, {1,10;2,20;3,30}, 2, FALSE)")) == [[10.0], [30.0]]


def test_concat():
    assert calc('=CONCAT("a", 1.5, TRUE, B1)') == "a1.5TRUE"  # Excel behaviour (common practice)
    assert calc("=CONCAT(A1:C2)") == "12TRUE4x"  # Excel behaviour (common practice): row by row
    assert calc('=_xlfn.CONCAT("x",,"y")') == "xy"
    assert calc("=CONCAT(E1:E3)").code == NA


@pytest.mark.parametrize(
    "formula, text",
    [
        ('=TEXT(3.567, "0")', "4"),  # Excel behaviour (common practice)
        ('=TEXT(2.5, "0")', "3"),  # Excel behaviour (common practice): half away from zero
        ('=TEXT(3.14159, "0.0")', "3.1"),  # Excel behaviour (common practice)
        ('=TEXT(2.675, "0.00")', "2.68"),  # Excel behaviour (common practice)
        ('=TEXT(1234567.891, "#,##0")', "1,234,568"),  # Excel behaviour (common practice)
        ('=TEXT(-1234.5, "#,##0.00")', "-1,234.50"),  # Excel behaviour (common practice)
        ('=TEXT(12345, "0.00E+00")', "1.23E+04"),  # Excel behaviour (common practice)
        ('=TEXT(0.000123, "0.00E+00")', "1.23E-04"),  # Excel behaviour (common practice)
        ('=TEXT(9.999, "0.00E+00")', "1.00E+01"),  # Excel behaviour (common practice): carry
        ('=TEXT(0.256, "0%")', "26%"),  # Excel behaviour (common practice)
        ('=TEXT(0.2567, "0.0%")', "25.7%"),  # Excel behaviour (common practice)
        ('=TEXT(1/4, "General")', "0.25"),  # Excel behaviour (common practice)
        ('=TEXT("abc", "@")', "abc"),  # Excel behaviour (common practice)
        ('=TEXT(2, "@")', "2"),
        ('=TEXT("3", "0.00")', "3.00"),  # Excel behaviour (common practice): numeric text converts
        ('=TEXT(5, "00")', "05"),  # Excel behaviour (common practice): minimum digits
    ],
)
def test_text(formula, text):
    assert calc(formula) == text


def test_text_errors_and_arrays():
    assert calc('=TEXT(1.5, "# ?/?")') == "1 1/2"  # Excel behaviour (Microsoft's number format codes page)
    assert calc('=TEXT(41181, "mm###")').code == VALUE  # Excel (reference workbook TEXT_TEXT): dates mixed with digits
    assert calc('=TEXT(1, "yyyy")') == "1900"  # Excel behaviour (common practice): day 1 is 1900-01-01
    assert calc('=TEXT(1/0, "0")').code == DIV0
    assert calc('=TEXT(1E307, "0%")').code == NUM
    assert values(calc('=TEXT({1,2.5}, "0.0")')) == [["1.0", "2.5"]]


def test_every_builtin_is_tested():
    # this module and the examples of Excel's documentation, tests/test_builtins*.py
    from pathlib import Path

    here = Path(__file__).parent
    source = "".join(p.read_text(encoding="utf-8") for p in [here / "test_formula.py", *here.glob("test_builtins*.py")])
    untested = [name for name in BUILTINS if f"{name}(" not in source]
    assert not untested


# ---------------------------------------------------------------- missing arguments


def test_missing_arguments_reach_pack_functions_as_none():
    seen = []
    fn = {"ARGS": lambda *a: seen.append(a) or 1.0}
    assert calc("=ARGS(1,,3,)", functions=fn) == 1.0
    assert seen == [(1.0, None, 3.0, None)]  # engine contract
    assert calc("=ARGS()", functions=fn) == 1.0 and seen[-1] == ()


# ---------------------------------------------------------------- references, names, pack functions


def test_references_through_context():
    ctx = Sheet(CELLS)
    assert compute("=A1*2+'My sheet'!A1:B2", ctx).tolist() == [[14.0, 24.0], [34.0, 44.0]]
    assert ctx.asked == [(None, "A1"), ("My sheet", "A1:B2")]  # engine contract: sheet unquoted
    assert compute("=$a$1", ctx).code == REF and ctx.asked[-1] == (None, "$A$1")


def test_names_through_context():
    ctx = Sheet(CELLS, names={"Rate": 0.25, "Table": arr([1.0, "t"])})
    assert compute("=rate*4", ctx) == 1.0  # Excel behaviour (common practice): names ignore case
    assert compute("=SUM(Table)", ctx) == 1.0
    assert compute("=Missing_Name", ctx) == CellError(NAME, "unknown name Missing_Name")


def fake_phase(t):
    """A pack-function stand-in: element-wise, an error element below 273.16."""
    t = np.broadcast_to(np.asarray(t, dtype=object), np.shape(t))
    out = np.empty(np.shape(t), dtype=object)
    for idx, x in np.ndenumerate(t):
        out[idx] = CellError(NUM, f"{x:g} K is below the triple point") if x < 273.16 else x / 100.0
    return out


def test_pack_function_array_with_error_element():
    fn = {"PHASE": fake_phase}
    v = calc("=PHASE({300,200,400})*2", functions=fn)
    assert v[0, 0] == 6.0 and v[0, 2] == 8.0  # the other elements are not blanked
    assert v[0, 1] == CellError(NUM, "200 K is below the triple point")
    assert values(calc('=IFERROR(PHASE({300,200}), "ice")', functions=fn)) == [[3.0, "ice"]]
    assert calc("=SUM(PHASE({300,200}))", functions=fn).code == NUM
    assert calc("=PHASE(300)", functions=fn) == 3.0


@contextlib.contextmanager
def normal_mode():
    """Outside the suite's strict mode (conftest.py): an exception in a function is the cell's #VALUE!."""
    saved = os.environ.pop(STRICT_VARIABLE, None)
    try:
        yield
    finally:
        if saved is not None:
            os.environ[STRICT_VARIABLE] = saved


def test_pack_function_results_are_normalised():
    fn = {
        "VEC": lambda: np.array([1.0, np.nan, np.inf]),
        "INTS": lambda: np.arange(4).reshape(2, 2),
        "NP": lambda: np.float64(2.5),
        "CUBE": lambda: np.zeros((2, 2, 2)),
        "FAIL": lambda x: 1.0 / 0.0,
    }
    v = calc("=VEC()", functions=fn)
    assert v.shape == (1, 3) and v[0, 0] == 1.0  # engine contract: 1-D is a row
    assert v[0, 1].code == NUM and v[0, 2].code == NUM
    assert values(calc("=INTS()", functions=fn)) == [[0.0, 1.0], [2.0, 3.0]]
    assert type(calc("=INTS()", functions=fn)[0, 0]) is float
    assert type(calc("=NP()", functions=fn)) is float
    assert calc("=CUBE()", functions=fn).code == VALUE
    with normal_mode():
        assert calc("=FAIL(1)", functions=fn) == CellError(
            VALUE, "internal error: ZeroDivisionError: float division by zero (in FAIL)")
    with pytest.raises(ZeroDivisionError):  # strict mode: a bug fails loudly
        calc("=FAIL(1)", functions=fn)


def test_pack_functions_receive_arrays_and_scalars():
    seen = []
    fn = {"SEE": lambda *a: seen.extend(a) or 0.0}
    calc("=SEE(A1, A1:C2, {1,2}, \"t\", #N/A)", functions=fn)
    assert seen[0] == 2.0
    assert isinstance(seen[1], np.ndarray) and seen[1].shape == (2, 3) and seen[1].dtype == object
    assert seen[2].shape == (1, 2)
    assert seen[3] == "t" and seen[4] == CellError(NA)


def test_builtins_come_before_pack_functions():
    assert calc("=SUM(1,2)", functions={"SUM": lambda *a: -1.0}) == 3.0  # engine contract


# ---------------------------------------------------------------- random formulas

_CONTEXT = Sheet(CELLS, functions={"PHASE": fake_phase, "BAD": lambda *a: 1 / 0}, names={"Rate": 0.5})
_LEAVES = st.one_of(
    st.floats(0, 1e12, allow_nan=False).map(repr),
    st.integers(0, 400).map(str),
    st.sampled_from(['"abc"', '"3"', '""', "TRUE", "FALSE", "#N/A", "#DIV/0!", "{1,2;3,4}", '{1,"a",TRUE}',
                     "{-1;0;2}", "A1", "B1", "A1:C2", "E1:E3", "Rate", "Nope", "Z1", '"0.0%"',
                     '"#,##0.00"', '"0.00E+00"', "1E+300"]),
)
_FUNCTIONS = sorted(BUILTINS) + ["PHASE", "BAD", "NOPE"]
_OPERATORS = ["+", "-", "*", "/", "^", "&", "=", "<>", "<", ">", "<=", ">="]


def _grow(inner):
    return st.one_of(
        st.tuples(inner, st.sampled_from(_OPERATORS), inner).map("".join),
        st.tuples(st.sampled_from(["-", "+"]), inner).map("".join),
        inner.map(lambda s: f"({s})"),
        inner.map(lambda s: f"{s}%"),
        st.tuples(st.sampled_from(_FUNCTIONS), st.lists(st.one_of(inner, st.just("")), max_size=4)).map(
            lambda t: f"{t[0]}({','.join(t[1])})"
        ),
    )


_FORMULAS = st.recursive(_LEAVES, _grow, max_leaves=20)


def _is_scalar(v):
    if type(v) is float:
        return math.isfinite(v)
    return v is None or type(v) in (bool, str, CellError)


def _check_value(v):
    if isinstance(v, np.ndarray):
        assert v.ndim == 2 and v.dtype == object and v.size > 0
        assert all(_is_scalar(x) for x in v.flat)
    else:
        assert _is_scalar(v), repr(v)


@settings(max_examples=400, deadline=None)
@given(_FORMULAS)
def test_random_formulas_give_values(text):
    """Any formula either fails to parse with FormulaSyntaxError or evaluates to a value."""
    try:
        tree = parse("=" + text)
    except FormulaSyntaxError:
        return
    with normal_mode():  # BAD raises: its cells show #VALUE!
        _check_value(evaluate(tree, _CONTEXT))


@settings(max_examples=400, deadline=None)
@given(st.text(alphabet='=+-*/^&<>%(){},;:!$\'" .#ABC1230eE_xlfn', max_size=25))
def test_random_text_parses_or_fails_cleanly(text):
    try:
        tree = parse(text)
    except FormulaSyntaxError as exc:
        assert str(exc)
        return
    with normal_mode():
        _check_value(evaluate(tree, _CONTEXT))


def test_as_value_rejects_unknown_types():
    assert as_value(object()).code == VALUE  # engine contract
    assert as_value(np.array([], dtype=float)).code == "#CALC!"


def test_a_long_flat_chain_of_operators_is_not_nesting():
    # Excel takes =A1+A2+...+A300 (any length within its 8,192 characters): a chain, not 300 levels
    assert compute("=" + "+".join(["1"] * 300)) == 300.0
    assert compute("=" + "*".join(["1.01"] * 1500)) == pytest.approx(1.01 ** 1500)
    with pytest.raises(FormulaSyntaxError, match="nests more than"):
        parse("=" + "ABS(" * 250 + "1" + ")" * 250)  # true nesting still has its limit
