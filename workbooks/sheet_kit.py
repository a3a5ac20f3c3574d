"""The layout kit of the design workbooks: styles, the print setting, a sheet being laid out, a row cursor.

Every scenario module lays its sheets out with these, so that the workbooks share one look: yellow
input cells with blue figures, boxed results, section bands, a formulation table and a caution block.
"""

from __future__ import annotations

import math

from openpyxl.formatting.rule import FormulaRule
from openpyxl.styles import Alignment, Border, Font, PatternFill, Side
from openpyxl.utils import get_column_letter
from openpyxl.worksheet.worksheet import Worksheet

from cellfuncs import data

# bar: the standard atmosphere, the reference of the gauge units (the pack's own constant, in bar)
P_ATM = data.constant("atmosphere", "sea_level_pressure").value / 1e5


def fill(rgb: str) -> PatternFill:
    """A solid fill of colour ``rgb``."""
    return PatternFill("solid", start_color=rgb, end_color=rgb)


_THIN = Side(style="thin", color="8C8C8C")
BOX = Border(left=_THIN, right=_THIN, top=_THIN, bottom=_THIN)
TITLE = Font(bold=True, size=14, color="1F3A5F")
SUBTITLE = Font(italic=True, size=10, color="404040")
SECTION_FONT = Font(bold=True, color="FFFFFF")
SECTION_FILL = fill("2E5E6E")
HEADER_FONT = Font(bold=True, color="1F3A5F")
HEADER_FILL = fill("DCE6EC")
INPUT_FONT = Font(color="1F4E9A", bold=True)
INPUT_FILL = fill("FFF4CC")
RESULT_FONT = Font(bold=True)
NOTE_FONT = Font(size=10, color="404040")
CAUTION_FILL = fill("FBE3D6")
CAUTION_HEAD = Font(bold=True, color="9C2A00", size=12)
CAUTION_FONT = Font(color="5A1800")
WRAP = Alignment(wrap_text=True, vertical="top")
TEXT_RESULT = Alignment(horizontal="left", indent=1)  # a text beside a number keeps its distance
FLAG_RULES = (  # (text the flag starts with, fill, font colour)
    ("CHECK", "F4B6A6", "7A1500"), ("LOW", "FFE08A", "5C4300"), ("OXYGEN", "F4B6A6", "7A1500"),
    ("EXCEEDS", "F4B6A6", "7A1500"), ("ok", "CDEBC6", "1E5020"), ("within", "CDEBC6", "1E5020"),
)


# Printing: a column-width unit is the width of "0" in the workbook's font: about 7 px at 96 dpi
# plus 5 px of padding a column in Excel's Calibri, and about 9.4 px (padding included) where
# LibreOffice draws with a wider substitute font (measured on its rendered pages). The wider
# figure decides, so the sheet stays readable in both.
PX_PER_UNIT, PX_PER_COLUMN, MM_PER_PX = 9.4, 0.0, 25.4 / 96
PAGE_MM = {"portrait": 210.0, "landscape": 297.0}  # A4 widths
MARGIN_IN = 0.4  # left and right page margins
MIN_SCALE = 60  # per cent: smaller prints are hard to read


def print_scale(width_units: float, columns: int) -> tuple[str, int]:
    """(orientation, per-cent scale) at which a sheet ``width_units`` wide fits an A4 page's width."""
    width_mm = (width_units * PX_PER_UNIT + columns * PX_PER_COLUMN) * MM_PER_PX
    printable = {o: w - 2 * MARGIN_IN * 25.4 for o, w in PAGE_MM.items()}
    orientation = "portrait" if printable["portrait"] >= width_mm else "landscape"
    return orientation, min(100, math.floor(100 * printable[orientation] / width_mm))


class Rows:
    """A cursor down a sheet: the layout asks it for rows in order instead of writing row numbers,
    so that a block added or removed moves everything below it."""

    def __init__(self, first: int):
        self.row = first

    def take(self) -> int:
        """The next row."""
        self.row += 1
        return self.row - 1

    def block(self, count: int) -> range:
        """The next ``count`` rows."""
        self.row += count
        return range(self.row - count, self.row)

    def skip(self, count: int = 1) -> None:
        """Leave ``count`` rows empty."""
        self.row += count

    def at(self, row: int) -> None:
        """Go on from ``row``, the next free row a block reports."""
        self.row = row


def absolute(ref: str) -> str:
    """``"C13"`` as the absolute reference ``"$C$13"``."""
    letters = ref.rstrip("0123456789")
    return f"${letters}${ref[len(letters):]}"


class Sheet:
    """A worksheet being laid out: helpers that put labelled inputs and results in cells."""

    def __init__(self, ws: Worksheet, widths: dict[str, float]):
        self.ws = ws
        self.last_col = len(widths)
        self.width = sum(widths.values())
        for letter, width in widths.items():
            ws.column_dimensions[letter].width = width
        ws.sheet_view.showGridLines = False
        # one page wide, as many tall as it takes: fitting a long sheet on one page would shrink its
        # text until it cannot be read; the width is kept so that the scale stays at MIN_SCALE or more
        orientation, scale = print_scale(self.width, self.last_col)
        if scale < MIN_SCALE:
            raise ValueError(f"sheet {ws.title!r} is too wide to print at {MIN_SCALE} %: {scale} %")
        self.print_scale = scale
        ws.page_setup.orientation = orientation
        ws.page_setup.paperSize = ws.PAPERSIZE_A4
        ws.page_setup.fitToWidth, ws.page_setup.fitToHeight = 1, 0
        ws.sheet_properties.pageSetUpPr.fitToPage = True
        ws.page_margins.left = ws.page_margins.right = MARGIN_IN
        ws.page_margins.top = ws.page_margins.bottom = 0.5
        ws.page_margins.header = ws.page_margins.footer = 0.3

    def fit(self, row: int, text: str, size: float = 11) -> None:
        """Make a row spanning the sheet tall enough for ``text`` wrapped in it (a width unit holds
        about one character at 11 pt)."""
        lines = math.ceil(len(text) / (self.width * 11 / size * 0.95))
        self.ws.row_dimensions[row].height = max(15.0, round(lines * size * 1.4 + 4))

    def title(self, text: str, *lines: str) -> Rows:
        """The title and the lines under it, each across the sheet's width, wrapped where long; returns
        the cursor for the rest of the sheet, one empty row below them."""
        for i, (line, font) in enumerate([(text, TITLE)] + [(line, SUBTITLE) for line in lines], start=1):
            self.ws.merge_cells(start_row=i, start_column=1, end_row=i, end_column=self.last_col)
            cell = self.ws.cell(i, 1, line)
            cell.font, cell.alignment = font, WRAP
            self.fit(i, line, font.size)
        return Rows(len(lines) + 3)

    def section(self, row: int, text: str) -> None:
        for col in range(1, self.last_col + 1):
            self.ws.cell(row, col).fill = SECTION_FILL
        self.ws.merge_cells(start_row=row, start_column=1, end_row=row, end_column=self.last_col)
        cell = self.ws.cell(row, 1, text)
        cell.font = SECTION_FONT

    def headers(self, row: int, texts: list[str], height: float = 45) -> None:
        for col, text in enumerate(texts, start=1):
            cell = self.ws.cell(row, col, text)
            cell.font, cell.fill, cell.border = HEADER_FONT, HEADER_FILL, BOX
            cell.alignment = Alignment(wrap_text=True, vertical="center", horizontal="center")
        self.ws.row_dimensions[row].height = height

    def put(self, ref: str, value, fmt: str | None = None, kind: str = "result") -> None:
        """A value or formula; ``kind`` is "input", "result", "text" (a result that is text), "label" or "plain"."""
        cell = self.ws[ref]
        cell.value = value
        if fmt:
            cell.number_format = fmt
        if kind == "input":
            cell.font, cell.fill, cell.border = INPUT_FONT, INPUT_FILL, BOX
        elif kind in ("result", "text"):
            cell.font, cell.border = RESULT_FONT, BOX
            if kind == "text":
                cell.alignment = TEXT_RESULT
        elif kind == "label":
            cell.border = BOX
            cell.alignment = Alignment(wrap_text=True, vertical="center")

    def labelled(self, row: int, label: str, value, fmt: str | None = None, kind: str = "result",
                 value_col: str = "E") -> str:
        """A label spanning the columns before ``value_col`` and the value beside it; returns its address."""
        end = self.ws[value_col + "1"].column - 1
        self.ws.merge_cells(start_row=row, start_column=1, end_row=row, end_column=end)
        self.ws.cell(row, 1, label).alignment = Alignment(vertical="center")
        ref = f"{value_col}{row}"
        self.put(ref, value, fmt, kind)
        return ref

    def note(self, row: int, text: str) -> None:
        self.ws.merge_cells(start_row=row, start_column=1, end_row=row, end_column=self.last_col)
        cell = self.ws.cell(row, 1, text)
        cell.font, cell.alignment = NOTE_FONT, WRAP
        self.fit(row, text, NOTE_FONT.size)

    def flags(self, area: str) -> None:
        """Colour a column of check texts by how they begin."""
        first = area.split(":")[0].replace("$", "")
        for start, background, colour in FLAG_RULES:
            self.ws.conditional_formatting.add(area, FormulaRule(
                formula=[f'LEFT({first},{len(start)})="{start}"'], fill=fill(background), font=Font(bold=True, color=colour),
                stopIfTrue=True))

    def formulations(self, row: int, rows: list[tuple[str, str, str, str]], height: float = 36) -> int:
        """A table of the formulations behind the results: (result, substance, model field, source field),
        each looked up with SUBSTANCE_INFO; returns the next free row."""
        self.section(row, "Which published formulation stands behind each result (looked up with SUBSTANCE_INFO)")
        half = max(3, (self.last_col - 2) // 2)
        self.headers(row + 1, ["Result", "Substance", "Formulation"] + [""] * (half - 1) + ["Source"]
                     + [""] * (self.last_col - 3 - half), height=20)
        self.ws.merge_cells(start_row=row + 1, start_column=3, end_row=row + 1, end_column=2 + half)
        self.ws.merge_cells(start_row=row + 1, start_column=3 + half, end_row=row + 1, end_column=self.last_col)
        for i, (result, substance, model, source) in enumerate(rows, start=row + 2):
            self.ws.cell(i, 1, result).alignment = WRAP
            self.ws.cell(i, 2, substance).alignment = WRAP
            self.ws.merge_cells(start_row=i, start_column=3, end_row=i, end_column=2 + half)
            self.ws.merge_cells(start_row=i, start_column=3 + half, end_row=i, end_column=self.last_col)
            self.put(f"C{i}", f'=SUBSTANCE_INFO("{substance}","{model}")', kind="plain")
            self.put(f"{get_column_letter(3 + half)}{i}", f'=SUBSTANCE_INFO("{substance}","{source}")', kind="plain")
            for col in (3, 3 + half):
                self.ws.cell(i, col).alignment = WRAP
                self.ws.cell(i, col).font = NOTE_FONT
            self.ws.row_dimensions[i].height = height
        return row + 2 + len(rows)

    def closing(self, rows: Rows, formulations: list[tuple[str, str, str, str]], cautions: list[str]) -> None:
        """What ends a sheet: the formulation table, an empty row and the caution block, which states
        ESTIMATES and CODES before the sheet's own ``cautions``."""
        rows.at(self.formulations(rows.take(), formulations))
        rows.skip()
        self.caution(rows.take(), [ESTIMATES, CODES, *cautions])

    def caution(self, row: int, lines: list[str]) -> int:
        """The caution block: a heading and one merged, wrapped line per point; returns the next free row."""
        rows = [("CAUTION", CAUTION_HEAD)] + [(line, CAUTION_FONT) for line in lines]
        for i, (text, font) in enumerate(rows, start=row):
            self.ws.merge_cells(start_row=i, start_column=1, end_row=i, end_column=self.last_col)
            cell = self.ws.cell(i, 1, text)
            cell.font, cell.alignment = font, WRAP
            for col in range(1, self.last_col + 1):
                self.ws.cell(i, col).fill = CAUTION_FILL
            self.fit(i, text, font.size or 11)
        return row + len(rows)


CODES = ("Pressure equipment, pressure relief, cryogenic systems and the assessment of oxygen deficiency or "
         "enrichment are governed by local codes and regulations. Designs, relief sizing and safety decisions "
         "are made and checked by a licensed professional engineer and the site's competent persons.")
ESTIMATES = ("The numbers here are engineering estimates from published formulations, for orientation and "
             "checking. They are not a design basis and not a substitute for measurement.")

