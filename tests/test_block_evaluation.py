"""Formulas of one shape side by side (rows, columns, rectangles) evaluated as one block.

The oracle of every check is the same workbook recalculated one cell at a time
(``Recalc.batched = False``): a block's value for each cell must be exactly what that
cell alone gives, the same float bits, error code and reason. The few absolute values
are Excel behaviour as Microsoft documents it for operators and conversions
("Calculation operators and precedence in Excel", "Excel functions (by category)";
recalled from memory of those pages), marked where they stand.
"""

from __future__ import annotations

import math
import random
import re

import pytest

from cellfuncs.errors import DIV0, NA, NUM, VALUE, CellError
from cellfuncs.workbook.engine import Recalc
from cellfuncs.workbook.model import Book, Sheet
from cellfuncs.workbook.refs import address, area, column_letters, column_number
from cellfuncs.workbook.sheetxml import FormulaXml, SheetScan

# Values of every kind a cell holds: numbers (with -0, a large one, zero), numeric text,
# other text, empty text, logical values, errors; blanks are the cells left out.
MIXED = [1.5, -2.0, 0.0, -0.0, 3.0, 1e308, "3", " 1,250.5 ", "abc", "", True, False,
         CellError(NA, "no value"), CellError(DIV0, "division by zero"), 0.1, -7.25, 1e-320, 45.0, 2.5, -0.5]
# Numbers only (the lanes numpy computes), among them zeros of both signs, ties, and powers that overflow
NUMBERS = [1.5, -2.0, 0.0, -0.0, 3.0, 0.1, -7.25, 45.0, 2.5, -0.5, 1e-320, 710.0, 1e200, 2.0, 2.0]

FORMULAS = [
    "=A1*1.8+32", "=A1/B1", "=A1-B1", "=A1^B1", "=-A1%", "=+A1", "=A1", "=A1&B1", "=A1=B1", "=A1<B1",
    '=A1<>"abc"', "=A1>=0", "=IF(A1>B1,A1,B1)", '=IF(A1,"y","n")', "=IF(A1>0,,A1)", "=IF(B1,A1)", "=NOT(A1)",
    "=AND(A1,B1)", "=OR(A1>0,B1)", '=AND(A1<5,"")', "=ABS(A1)", "=SQRT(A1)", "=EXP(A1)", "=LN(A1)",
    "=LOG10(A1)", "=POWER(A1,2)", "=POWER(B1,0.5)", "=ROUND(A1,1)", "=ROUNDUP(A1/3,2)", "=ROUNDDOWN(A1,-1)",
    "=MIN(A1,B1,5)", "=MAX(A1,B1)", '=MIN(A1,"x")', "=MAX(A1*2,-1)", "=A1+$B$1", "=A$1*B1", "=$A1+B$1",
    "=(A1+B1)*(A1-B1)/2", "=A1*A1*A1*A1", "=EXP(A1)*1e300", "=A1=TRUE", "=IF(A1=B1,1/0,A1&\"!\")",
    "=(A1>0)+(B1<0)", "=(A1>B1)=TRUE", '=(A1>0)&"x"', "=IF(A1>0,A1>1,B1)", "=-(A1>0)", "=NOT(A1>B1)",
    "=AND(A1>0,B1>0)", "=MIN(A1>0,B1)", "=IF(A1<>0,5,FALSE)",
]


def _book(sheets: dict[str, dict[str, object]]) -> Book:
    """A workbook from cell texts: a text starting with "=" is a plain formula, anything else a value."""
    out = []
    for i, (name, cells) in enumerate(sheets.items()):
        scan = SheetScan(f"s{i}")
        for ref, v in cells.items():
            a = area(ref)
            if type(v) is str and v.startswith("="):
                scan.formulas[(a.r1, a.c1)] = FormulaXml(v[1:], "normal", None, None, None, None)
            else:
                scan.values[(a.r1, a.c1)] = v
        out.append(Sheet(name, i, f"s{i}", scan))
    return Book("wb", out, {}, None, None)


def _recalc(book: Book, batched: bool) -> Recalc:
    engine = Recalc(book, {})
    engine.batched = batched
    engine.run()
    return engine


def _same(a: object, b: object) -> bool:
    if type(a) is not type(b):
        return False
    return a.hex() == b.hex() if type(a) is float else a == b


def _checked(sheets: dict[str, dict[str, object]]) -> Recalc:
    """Recalculate batched and cell by cell; every cell's value must be the same. The batched engine."""
    book = _book(sheets)
    batched, alone = _recalc(book, True), _recalc(book, False)
    for s, values in enumerate(alone.values):
        differ = {address(*k): (batched.values[s].get(k), v) for k, v in values.items()
                  if not _same(batched.values[s].get(k), v)}
        assert not differ, differ
    return batched


def _blocks(engine: Recalc) -> list[tuple[int, int]]:
    """The shapes (rows, columns) of the units evaluated as blocks."""
    out = []
    for members in engine._graph_used.units:
        if len(members) > 1:
            first, last = engine.cells[members[0]], engine.cells[members[-1]]
            out.append((last.row - first.row + 1, last.col - first.col + 1))
    return out


def _inputs(rows: int, cols: int, kinds: list[object] = MIXED, blanks: int = 2) -> dict[str, object]:
    """A rows x cols block of ``kinds`` from A1, in a fixed pseudo-random order, some cells blank."""
    pick = random.Random(11)
    cells = {}
    for r in range(1, rows + 1):
        for c in range(1, cols + 1):
            k = pick.randrange(len(kinds) + blanks)
            if k < len(kinds):
                cells[address(r, c)] = kinds[k]
    return cells


_REFERENCE = re.compile(r"(?<![A-Za-z$])(\$?)([A-Z]{1,2})(\$?)([0-9]+)(?![0-9(])")


def _moved(formula: str, dr: int, dc: int) -> str:
    """``formula`` (references only to cells near A1) with its relative parts moved dr rows and dc columns."""
    def move(m: re.Match) -> str:
        col_fixed, letters, row_fixed, digits = m.groups()
        col = column_number(letters) + (0 if col_fixed else dc)
        row = int(digits) + (0 if row_fixed else dr)
        return f"{col_fixed}{column_letters(col)}{row_fixed}{row}"

    return _REFERENCE.sub(move, formula)


@pytest.mark.parametrize("kinds", ["mixed", "numbers"])
@pytest.mark.parametrize("formula", FORMULAS)
def test_a_row_a_column_and_a_rectangle_equal_each_cell_alone(formula, kinds):
    # inputs of every kind (or numbers only) in A1:AN60; the formula filled over a row, a column and
    # a rectangle, each cell 100 rows below the inputs it reads
    cells = _inputs(60, 40, MIXED, 2) if kinds == "mixed" else _inputs(60, 40, NUMBERS, 0)
    for r, c in [(1, c) for c in range(1, 21)] + [(r, 25) for r in range(3, 23)] + \
            [(r, c) for r in range(30, 40) for c in range(2, 12)]:
        cells[address(r + 100, c)] = _moved(formula, r - 1, c - 1)
    engine = _checked({"S": cells})
    assert sorted(_blocks(engine)) == [(1, 20), (10, 10), (20, 1)]


_LEAVES = ["B1", "C1", "$A$1", "B$1", "$B1", "A21", "B20", "2", "0", "-1.5", '"3"', '"x"', '""', "TRUE", "#N/A", "1E+308"]
_SHAPES = ["-{}", "{}%", "({}+{})", "({}-{})", "({}*{})", "({}/{})", "({}^{})", "({}&{})", "({}={})", "({}<{})",
           "({}>={})", "IF({},{},{})", "IF({},{})", "NOT({})", "AND({},{})", "OR({},{})", "ABS({})", "SQRT({})",
           "EXP({})", "LN({})", "POWER({},{})", "ROUND({},1)", "MIN({},{})", "MAX({},{},{})"]


def _random_formula(rng: random.Random, depth: int) -> str:
    if depth == 0 or rng.random() < 0.3:
        return rng.choice(_LEAVES)
    form = rng.choice(_SHAPES)
    return form.format(*(_random_formula(rng, depth - 1) for _ in range(form.count("{}"))))


@pytest.mark.parametrize("seed", range(4))
def test_random_formulas_equal_each_cell_alone(seed):
    # formulas of the batched operators and functions nested four deep, over a row and a rectangle
    # (B21:K21, B24:H29) that read inputs of every kind and their own left and upper neighbours
    rng = random.Random(seed)
    for _ in range(40):
        formula = "=" + _random_formula(rng, 4)
        cells = _inputs(14, 12, MIXED if rng.random() < 0.5 else NUMBERS, 2)
        for r, c in [(21, c) for c in range(2, 12)] + [(r, c) for r in range(24, 30) for c in range(2, 9)]:
            cells[address(r, c)] = _moved(formula, r - 21, c - 2)
        _checked({"S": cells})


def test_a_built_in_outside_the_batched_ones_is_evaluated_cell_by_cell():
    cells = _inputs(10, 10)
    cells.update({address(r + 20, c): f"=IF(ISBLANK({address(r, c)}),1,{address(r, c)})"
                  for r in range(1, 6) for c in range(1, 11)})
    engine = _checked({"S": cells})
    assert _blocks(engine) == []


def test_blocks_of_every_layout_are_evaluated_at_once():
    # the same formula over a row of 30, a column of 30 and a 10 x 12 rectangle, reading another sheet
    out = {}
    for c in range(1, 31):
        out[address(1, c)] = f"=In!{address(1, c)}*1.8+32"
    for r in range(3, 33):
        out[address(r, 40)] = f"=In!{address(r, 40)}*1.8+32"
    for r in range(40, 50):
        for c in range(5, 17):
            out[address(r, c)] = f"=In!{address(r, c)}*1.8+32"
    engine = _checked({"In": _inputs(60, 45), "Out": out})
    assert sorted(_blocks(engine)) == [(1, 30), (10, 12), (30, 1)]


def test_numbers_of_a_block_are_exactly_a_cells():
    # Excel behaviour (Microsoft, "Calculation operators and precedence", from memory): 20 degC is 68 degF
    engine = _checked({"S": {"A1": 20.0, "B1": 100.0, "A2": "=A1*1.8+32", "B2": "=B1*1.8+32"}})
    assert engine.values[0][(2, 1)] == 68.0 and engine.values[0][(2, 2)] == 212.0
    assert _blocks(engine) == [(1, 2)]


def test_conversions_and_errors_in_lanes():
    # Excel behaviour (Microsoft, "Calculation operators and precedence", from memory): text that reads as a
    # number is converted ("3"*2 is 6), TRUE is 1, a blank is 0, text that is no number is #VALUE!, a division
    # by zero #DIV/0!, an error in an operand is the result
    values = {"A1": "3", "B1": True, "D1": "abc", "E1": 0.0, "F1": CellError(NA, "no value")}
    formulas = {address(2, c): f"={address(1, c)}*2" for c in range(1, 7)}
    formulas.update({address(3, c): f"=1/{address(1, c)}" for c in range(1, 7)})
    engine = _checked({"S": {**values, **formulas}})
    row = [engine.values[0][(2, c)] for c in range(1, 7)]
    assert row[:3] == [6.0, 2.0, 0.0]
    assert [row[3].code, row[5]] == [VALUE, CellError(NA, "no value")]
    assert engine.values[0][(3, 5)].code == DIV0 and engine.values[0][(3, 3)].code == DIV0  # 1/blank
    assert sorted(_blocks(engine)) == [(1, 6), (1, 6)]


def test_results_too_large_are_num_errors_per_cell():
    # Excel behaviour (from memory): a result beyond the largest number, 1E+308*10, is #NUM!
    engine = _checked({"S": {"A1": 1e308, "B1": 1.0, "A2": "=A1*10", "B2": "=B1*10"}})
    assert engine.values[0][(2, 1)].code == NUM and engine.values[0][(2, 2)] == 10.0


def test_a_row_reading_its_left_neighbour_is_evaluated_cell_by_cell():
    # each cell one more than the cell before it: B1 = A1 + 1 ... Z1 = Y1 + 1
    cells = {"A1": 1.0, **{address(1, c): f"={address(1, c - 1)}+1" for c in range(2, 27)}}
    engine = _checked({"S": cells})
    assert engine.values[0][(1, 26)] == 26.0
    assert _blocks(engine) == []


def test_a_rectangle_reading_its_left_neighbour_is_evaluated_column_by_column():
    cells = {address(r, 1): float(r) for r in range(1, 21)}
    cells.update({address(r, c): f"={address(r, c - 1)}*2" for r in range(1, 21) for c in range(2, 9)})
    engine = _checked({"S": cells})
    assert engine.values[0][(20, 8)] == 20.0 * 2 ** 7
    assert _blocks(engine) == [(20, 1)] * 7


def test_a_rectangle_reading_the_cell_above_is_evaluated_row_by_row():
    cells = {address(1, c): float(c) for c in range(1, 11)}
    cells.update({address(r, c): f"={address(r - 1, c)}+0.5" for r in range(2, 31) for c in range(1, 11)})
    engine = _checked({"S": cells})
    assert engine.values[0][(30, 10)] == 10.0 + 29 * 0.5
    assert _blocks(engine) == [(1, 10)] * 29


def test_a_rectangle_reading_left_and_above_is_evaluated_cell_by_cell():
    # a running table: each cell the sum of the cell above and the cell to the left (binomial coefficients)
    cells = {address(1, c): 1.0 for c in range(1, 9)}
    cells.update({address(r, 1): 1.0 for r in range(2, 9)})
    cells.update({address(r, c): f"={address(r - 1, c)}+{address(r, c - 1)}" for r in range(2, 9) for c in range(2, 9)})
    engine = _checked({"S": cells})
    assert engine.values[0][(8, 8)] == math.comb(14, 7)
    assert _blocks(engine) == []


def test_blocks_that_read_each_other_through_other_cells_still_follow_the_order():
    # row 1 (B1:E1) reads row 2 below it; row 2 (B2:E2) reads the row 1 cell to its left
    cells = {"A1": 1.0}
    cells.update({address(1, c): f"={address(2, c)}+1" for c in range(2, 6)})
    cells.update({address(2, c): f"={address(1, c - 1)}*10" for c in range(2, 6)})
    engine = _checked({"S": cells})
    assert engine.values[0][(1, 2)] == 11.0 and engine.values[0][(1, 5)] == 11111.0


def test_anchored_and_mixed_references_in_a_rectangle():
    # a multiplication table: B2:K11 = $A2 * B$1
    cells = {address(1, c): float(c - 1) for c in range(2, 12)}
    cells.update({address(r, 1): float(r - 1) for r in range(2, 12)})
    cells.update({address(r, c): f"=$A{r}*{address(1, c).replace('1', '$1')}" for r in range(2, 12) for c in range(2, 12)})
    engine = _checked({"S": cells})
    assert engine.values[0][(11, 11)] == 100.0 and engine.values[0][(4, 6)] == 15.0
    assert _blocks(engine) == [(10, 10)]


def test_a_block_larger_than_one_batch_is_cut_into_bands():
    from cellfuncs.workbook import blocks as blocks_module

    cells = {address(r, c): f"=$B{r + 300}*2" for r in range(1, 41) for c in range(1, 11)}
    cells.update({address(r + 300, 2): float(r) for r in range(1, 41)})
    saved = blocks_module.BATCH_CELLS
    blocks_module.BATCH_CELLS = 100
    try:
        engine = _checked({"S": cells})
    finally:
        blocks_module.BATCH_CELLS = saved
    assert _blocks(engine) == [(10, 10)] * 4


def test_the_pack_functions_in_a_row_take_every_lane():
    from cellfuncs.workbook.recalc import pack_functions

    cells = {address(1, c): 1.0 + c for c in range(1, 9)}
    cells.update({address(2, c): f'=BOIL_TEMP("water",{address(1, c)}*1,"bar","degC")' for c in range(1, 9)})
    book = _book({"S": cells})
    batched, alone = Recalc(book, pack_functions()), Recalc(book, pack_functions())
    alone.batched = False
    batched.run()
    alone.run()
    assert _blocks(batched) == [(1, 8)]
    for c in range(1, 9):
        # the pack's contract: a value inside an array equals the scalar's to 1e-14 (DEVELOPERS.md)
        assert batched.values[0][(2, c)] == pytest.approx(alone.values[0][(2, c)], rel=1e-14)
    # IAPWS R7-97(2012) saturation at 0.2 MPa: 393.361 K, 120.21 degC (from memory of its saturation table)
    assert alone.values[0][(2, 1)] == pytest.approx(120.21, abs=0.01)
