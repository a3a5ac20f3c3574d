"""Excel's dynamic-array, text-splitting and regular-expression built-ins, example by example.

Each case names its source: "from memory of Microsoft's NAME page" for the examples of
Microsoft's function reference (its data typed in as array constants), "reference workbook"
for a case of the Excel-computed function sheets (ironcalc's calc_tests, values as Excel
stored them), or "rule on Microsoft's NAME page" for a case built here, with data of its own,
to check a rule the page states.
"""

from __future__ import annotations

import numpy as np
import pytest

from cellfuncs.errors import CellError
from cellfuncs.formula import compute

NA, VALUE, CALC, NUM = "#N/A", "#VALUE!", "#CALC!", "#NUM!"


def shown(v):
    """A result with its errors as their codes, arrays as nested lists."""
    if type(v) is np.ndarray:
        return [[shown(x) for x in row] for row in v.tolist()]
    return v.code if type(v) is CellError else v


MS = "from memory of Microsoft's {} page"
RULE = "rule on Microsoft's {} page"
WORKBOOK = "reference workbook {}"
LIKE_WORKBOOK = "reference workbook {}'s rule, on data of our own"

RED = "\"Little Red Riding Hood's red hood\""
red = "\"Little red riding hood's red hood\""
SALES = '{"East","Tom",3;"West","Ann",1;"East","Cid",2}'

CASES = [
    # SORT
    ("=SORT({3;1;2})", [[1.0], [2.0], [3.0]], RULE.format("SORT")),
    (f"=SORT({SALES}, 3, -1)", [["East", "Tom", 3.0], ["East", "Cid", 2.0], ["West", "Ann", 1.0]], RULE.format("SORT")),
    ("=SORT({3,1,2}, 1, 1, TRUE)", [[1.0, 2.0, 3.0]], RULE.format("SORT")),  # by_col sorts columns
    (f"=SORT({SALES}, {{1,3}}, {{1,-1}})", [["East", "Tom", 3.0], ["East", "Cid", 2.0], ["West", "Ann", 1.0]],
     RULE.format("SORT")),  # several sort indexes, each with its order
    ('=SORT({"b";TRUE;1;"A";"a"})', [[1.0], ["A"], ["a"], ["b"], [True]], LIKE_WORKBOOK.format("SORT")),  # stable, no case
    ("=SORT({1;2}, 2)", VALUE, RULE.format("SORT")),  # sort_index beyond the columns
    ("=SORT({1;2}, 1, 0)", VALUE, RULE.format("SORT")),  # sort_order is 1 or -1
    # SORTBY
    ('=SORTBY({"Tom";"Fred";"Amy"}, {52;65;22})', [["Amy"], ["Tom"], ["Fred"]], RULE.format("SORTBY")),
    ('=SORTBY({"a";"b";"c";"d"}, {"x";"y";"x";"y"}, 1, {1;2;3;4}, -1)', [["c"], ["a"], ["d"], ["b"]],
     RULE.format("SORTBY")),  # a second key breaks the first one's ties
    ('=SORTBY({"a","b","c"}, {3,1,2})', [["b", "c", "a"]], RULE.format("SORTBY")),  # a row sorts columns
    ("=SORTBY({1;2;3}, {1;2})", VALUE, RULE.format("SORTBY")),  # by_array of another size
    # UNIQUE
    ('=UNIQUE({"Fred";"Tom";"fred";"Amy";"Tom"})', [["Fred"], ["Tom"], ["Amy"]], RULE.format("UNIQUE")),
    ('=UNIQUE({"Fred";"Tom";"Amy";"Tom"}, FALSE, TRUE)', [["Fred"], ["Amy"]], RULE.format("UNIQUE")),
    ("=UNIQUE({1,1,2,1}, TRUE)", [[1.0, 2.0]], RULE.format("UNIQUE")),  # by_col
    ("=UNIQUE({1;1}, FALSE, TRUE)", CALC, RULE.format("UNIQUE")),  # nothing occurs once
    # FILTER
    (f'=FILTER({SALES}, {{"East";"West";"East"}}="East")', [["East", "Tom", 3.0], ["East", "Cid", 2.0]],
     RULE.format("FILTER")),
    (f'=FILTER({SALES}, ({{"East";"West";"East"}}="East")*({{3;1;2}}>2))', [["East", "Tom", 3.0]], RULE.format("FILTER")),
    ('=FILTER({1;2;3}, {1;2;3}>5, "")', "", RULE.format("FILTER")),
    ("=FILTER({1;2;3}, {1;2;3}>5)", CALC, RULE.format("FILTER")),  # empty, no if_empty
    ('=FILTER({3;5;7}, {"yes";1;1})', VALUE, WORKBOOK.format("FILTER_ERRORS")),  # text in include
    ("=FILTER({1,2,3}, {TRUE,FALSE,TRUE})", [[1.0, 3.0]], RULE.format("FILTER")),  # a row filters columns
    # HSTACK, VSTACK
    ('=HSTACK({"A","B";"C","D"}, {1,2;3,4})', [["A", "B", 1.0, 2.0], ["C", "D", 3.0, 4.0]], RULE.format("HSTACK")),
    ('=HSTACK({1;2;3}, {4;5})', [[1.0, 4.0], [2.0, 5.0], [3.0, NA]], RULE.format("HSTACK")),  # padded with #N/A
    ('=VSTACK({"A","B"}, {"C","D"}, {1,2})', [["A", "B"], ["C", "D"], [1.0, 2.0]], RULE.format("VSTACK")),
    ("=VSTACK({1,2,3}, {4,5})", [[1.0, 2.0, 3.0], [4.0, 5.0, NA]], RULE.format("VSTACK")),
    # TOCOL, TOROW
    ('=TOCOL({"Ben","Peter";"Mary","Sam"})', [["Ben"], ["Peter"], ["Mary"], ["Sam"]], RULE.format("TOCOL")),
    ('=TOCOL({"Ben","Peter";"Mary","Sam"}, 0, TRUE)', [["Ben"], ["Mary"], ["Peter"], ["Sam"]], RULE.format("TOCOL")),
    ("=TOCOL({1,#N/A;3,4}, 2)", [[1.0], [3.0], [4.0]], RULE.format("TOCOL")),  # 2 ignores errors
    ('=TOROW({"Ben","Peter";"Mary","Sam"})', [["Ben", "Peter", "Mary", "Sam"]], RULE.format("TOROW")),
    ('=TOROW({"Ben","Peter";"Mary","Sam"}, 0, TRUE)', [["Ben", "Mary", "Peter", "Sam"]], RULE.format("TOROW")),
    ("=TOROW({1,2}, 5)", VALUE, RULE.format("TOROW")),
    # WRAPROWS, WRAPCOLS
    ('=WRAPROWS({"A","B","C","D","E","F","G"}, 3)', [["A", "B", "C"], ["D", "E", "F"], ["G", NA, NA]],
     MS.format("WRAPROWS")),
    ('=WRAPROWS({"A","B","C","D","E","F","G"}, 3, "x")', [["A", "B", "C"], ["D", "E", "F"], ["G", "x", "x"]],
     MS.format("WRAPROWS")),
    ('=WRAPCOLS({"A","B","C","D","E","F","G"}, 3)', [["A", "D", "G"], ["B", "E", NA], ["C", "F", NA]],
     MS.format("WRAPCOLS")),
    ("=WRAPCOLS({1,2;3,4}, 2)", VALUE, RULE.format("WRAPCOLS")),  # not a vector
    ("=WRAPROWS({1,2}, 0)", NUM, RULE.format("WRAPROWS")),  # wrap_count below 1
    # TAKE, DROP
    ("=TAKE({1,2,3;4,5,6;7,8,9}, 2)", [[1.0, 2.0, 3.0], [4.0, 5.0, 6.0]], MS.format("TAKE")),
    ("=TAKE({1,2,3;4,5,6;7,8,9}, , 2)", [[1.0, 2.0], [4.0, 5.0], [7.0, 8.0]], MS.format("TAKE")),
    ("=TAKE({1,2,3;4,5,6;7,8,9}, -2)", [[4.0, 5.0, 6.0], [7.0, 8.0, 9.0]], MS.format("TAKE")),
    ("=TAKE({1,2,3;4,5,6;7,8,9}, 2, -2)", [[2.0, 3.0], [5.0, 6.0]], MS.format("TAKE")),
    ("=TAKE({1;2}, 0)", CALC, RULE.format("TAKE")),  # an empty array
    ("=DROP({1,2,3;4,5,6;7,8,9}, 2)", [[7.0, 8.0, 9.0]], MS.format("DROP")),
    ("=DROP({1,2,3;4,5,6;7,8,9}, , 2)", [[3.0], [6.0], [9.0]], MS.format("DROP")),
    ("=DROP({1,2,3;4,5,6;7,8,9}, -2)", [[1.0, 2.0, 3.0]], MS.format("DROP")),
    ("=DROP({1,2,3;4,5,6;7,8,9}, 2, 2)", [[9.0]], MS.format("DROP")),
    ("=DROP({1;2;3}, 3.4)", CALC, LIKE_WORKBOOK.format("DROP_TAKE")),  # truncated to 3: nothing is left
    # EXPAND
    ("=EXPAND({1,2;3,4}, 3, 3)", [[1.0, 2.0, NA], [3.0, 4.0, NA], [NA, NA, NA]], MS.format("EXPAND")),
    ('=EXPAND({1,2;3,4}, 3, 3, "-")', [[1.0, 2.0, "-"], [3.0, 4.0, "-"], ["-", "-", "-"]], MS.format("EXPAND")),
    ("=EXPAND({1;2}, 3)", [[1.0], [2.0], [NA]], LIKE_WORKBOOK.format("EXPAND")),  # columns left out
    ("=EXPAND({1,2;3,4}, 1)", VALUE, RULE.format("EXPAND")),  # fewer rows than the array's
    # CHOOSECOLS, CHOOSEROWS
    ("=CHOOSECOLS({1,2,3;4,5,6}, 1, 3)", [[1.0, 3.0], [4.0, 6.0]], RULE.format("CHOOSECOLS")),
    ("=CHOOSECOLS({1,2,3;4,5,6}, -1, -1)", [[3.0, 3.0], [6.0, 6.0]], RULE.format("CHOOSECOLS")),
    ("=CHOOSECOLS({1,2,3}, 4)", VALUE, RULE.format("CHOOSECOLS")),
    ("=CHOOSEROWS({1,2;3,4;5,6}, 1, 3, 1)", [[1.0, 2.0], [5.0, 6.0], [1.0, 2.0]], RULE.format("CHOOSEROWS")),
    ("=CHOOSEROWS({1,2;3,4;5,6}, {1,2})", [[1.0, 2.0], [3.0, 4.0]], RULE.format("CHOOSEROWS")),
    ("=CHOOSEROWS({1;2}, 0)", VALUE, RULE.format("CHOOSEROWS")),
    # TEXTSPLIT
    ('=TEXTSPLIT("Dakota Lennon Sanchez", " ")', [["Dakota", "Lennon", "Sanchez"]], MS.format("TEXTSPLIT")),
    ('=TEXTSPLIT("1,2,3;4,5,6", ",", ";")', [["1", "2", "3"], ["4", "5", "6"]], MS.format("TEXTSPLIT")),
    ('=TEXTSPLIT("Do. Or do not. There is no try.", , ".", TRUE)', [["Do"], [" Or do not"], [" There is no try"]],
     RULE.format("TEXTSPLIT")),
    ('=TEXTSPLIT("1,2.3-4", {",",".","-"})', [["1", "2", "3", "4"]], WORKBOOK.format("TEXTSPLIT")),
    ('=TEXTSPLIT("1,,2", ",")', [["1", "", "2"]], LIKE_WORKBOOK.format("TEXTSPLIT")),
    ('=TEXTSPLIT("1,2;3", ",", ";", TRUE, 0, "-")', [["1", "2"], ["3", "-"]], LIKE_WORKBOOK.format("TEXTSPLIT")),
    ('=TEXTSPLIT("aXbxc", "x", , , 1)', [["a", "b", "c"]], RULE.format("TEXTSPLIT")),  # match_mode 1
    ('=TEXTSPLIT("Hello", "")', VALUE, WORKBOOK.format("TEXTSPLIT")),
    ('=TEXTSPLIT("Hello", )', VALUE, WORKBOOK.format("TEXTSPLIT")),
    # TEXTBEFORE
    (f'=TEXTBEFORE({RED}, "Red")', "Little ", MS.format("TEXTBEFORE")),
    (f'=TEXTBEFORE({RED}, "basket")', NA, MS.format("TEXTBEFORE")),
    (f'=TEXTBEFORE({red}, "red", 2)', "Little red riding hood's ", MS.format("TEXTBEFORE")),
    (f'=TEXTBEFORE({red}, "red", -2)', "Little ", MS.format("TEXTBEFORE")),
    (f'=TEXTBEFORE({red}, "Red", , FALSE)', NA, MS.format("TEXTBEFORE")),
    (f'=TEXTBEFORE({RED}, "red", 3)', NA, MS.format("TEXTBEFORE")),
    ('=TEXTBEFORE("Marcus Aurelius", " ", , , 1)', "Marcus", MS.format("TEXTBEFORE")),
    ('=TEXTBEFORE("Socrates", " ", , , 0)', NA, MS.format("TEXTBEFORE")),
    ('=TEXTBEFORE("Socrates", " ", , , 1)', "Socrates", MS.format("TEXTBEFORE")),
    ('=TEXTBEFORE("a-b", "-", 0)', VALUE, RULE.format("TEXTBEFORE")),  # instance 0
    ('=TEXTBEFORE("123 the 456 the 891", "the", -1.2)', "123 ", WORKBOOK.format("TEXTBEFORE_TEXTAFTER")),
    # TEXTAFTER
    (f'=TEXTAFTER({RED}, "Red")', " Riding Hood's red hood", MS.format("TEXTAFTER")),
    (f'=TEXTAFTER({RED}, "basket")', NA, MS.format("TEXTAFTER")),
    (f'=TEXTAFTER({red}, "red", 2)', " hood", MS.format("TEXTAFTER")),
    (f'=TEXTAFTER({red}, "red", -2)', " riding hood's red hood", MS.format("TEXTAFTER")),
    (f'=TEXTAFTER({RED}, "")', "Little Red Riding Hood's red hood", MS.format("TEXTAFTER")),
    (f'=TEXTAFTER({RED}, "", -1)', "", MS.format("TEXTAFTER")),
    ('=TEXTAFTER("Marcus Aurelius", " ", , , 1)', "Aurelius", MS.format("TEXTAFTER")),
    ('=TEXTAFTER("Socrates", " ", , , 1)', "", MS.format("TEXTAFTER")),
    ('=TEXTAFTER("a day", "DAY", 1, 1, 0, "@")', "", RULE.format("TEXTAFTER")),  # match_mode 1 ignores case
    ('=TEXTAFTER("del", "deli", 1)', VALUE, WORKBOOK.format("TEXTBEFORE_TEXTAFTER")),
    ('=TEXTAFTER("del", "deli")', NA, WORKBOOK.format("TEXTBEFORE_TEXTAFTER")),
    # REGEXTEST, REGEXEXTRACT, REGEXREPLACE
    ('=REGEXTEST("Mr. Sherlock Holmes", "[A-Z]her")', True, WORKBOOK.format("REGEX")),
    ('=REGEXTEST("Mr. Sherlock Holmes", "[0-9]+")', False, WORKBOOK.format("REGEX")),
    ('=REGEXTEST("ALPHA", "alpha", 1)', True, RULE.format("REGEXTEST")),  # case_sensitivity 1
    ('=REGEXTEST("a", "(")', VALUE, RULE.format("REGEXTEST")),  # a pattern that does not compile
    ('=REGEXEXTRACT("DylanWilliams", "[A-Z][a-z]+")', "Dylan", MS.format("REGEXEXTRACT")),
    ('=REGEXEXTRACT("DylanWilliams", "[A-Z][a-z]+", 1)', [["Dylan", "Williams"]], MS.format("REGEXEXTRACT")),
    ('=REGEXEXTRACT("DylanWilliams", "([A-Z][a-z]+)([A-Z][a-z]+)", 2)', [["Dylan", "Williams"]],
     RULE.format("REGEXEXTRACT")),
    ('=REGEXEXTRACT("abc", "[0-9]")', NA, RULE.format("REGEXEXTRACT")),
    ('=REGEXREPLACE("DylanWilliams", "([A-Z][a-z]+)([A-Z][a-z]+)", "$2, $1")', "Williams, Dylan",
     MS.format("REGEXREPLACE")),
    ('=REGEXREPLACE("JamesBond", "([A-Z][a-z]+)([A-Z][a-z]+)", "$2, $1 $2")', "Bond, James Bond",
     WORKBOOK.format("REGEX")),
    ('=REGEXREPLACE("a1b22c333", "[0-9]+", "#", 2)', "a1b#c333", RULE.format("REGEXREPLACE")),  # occurrence
    ('=REGEXREPLACE("a1b22c333", "[0-9]+", "#", -1)', "a1b22c#", RULE.format("REGEXREPLACE")),
    ('=REGEXREPLACE("2024-05", "(?<y>[0-9]+)-(?<m>[0-9]+)", "${m}/$y")', "05/2024", RULE.format("REGEXREPLACE")),
]


@pytest.mark.parametrize("formula, expected, source", CASES)
def test_documented_example(formula, expected, source):
    assert shown(compute(formula)) == expected, source


def test_sort_puts_blanks_last_in_both_directions():
    # reference workbook SORT's rule, on data of our own: numbers, text, logicals, errors by
    # their ERROR.TYPE number, then blanks
    from cellfuncs.formula import SimpleContext
    from cellfuncs.formula.arrays import object_array

    column = object_array([[None], [CellError("#N/A")], [True], ["x"], [CellError("#DIV/0!")], [2.0]])
    ctx = SimpleContext(names={"data": column})
    assert shown(compute("=SORT(data)", ctx)) == [[2.0], ["x"], [True], ["#DIV/0!"], ["#N/A"], [None]]
    assert shown(compute("=SORT(data, 1, -1)", ctx)) == [["#N/A"], ["#DIV/0!"], [True], ["x"], [2.0], [None]]


def test_results_are_charged_to_the_work_budget():
    from cellfuncs.formula.budget import Budget, Limit, active

    with active(Budget(Limit(100, "--cells"), Limit(1000, "--work"), Limit(1000, "--all"))):
        assert compute("=EXPAND(1, 20, 20)").code == NUM
        assert compute("=TOCOL(SEQUENCE(10, 10))").shape == (100, 1)


def test_a_pattern_that_backtracks_without_end_is_stopped():
    # (x+x+)+y on a run of x's takes exponential time in a backtracking matcher (a classic
    # pattern of the trade); the time limit turns it into #VALUE! instead of a hung recalculation
    assert compute('=REGEXTEST(REPT("x",5000),"(x+x+)+y")').code == "#VALUE!"
    assert compute('=REGEXEXTRACT("abcDEF","\\p{Lu}+")') == "DEF"  # PCRE2's Unicode property classes
