"""Build the design workbooks, deterministically, and store the pack's results in them.

    python3 workbooks/build.py                 # rebuild every workbook in workbooks/
    python3 workbooks/build.py --out DIR NAME  # rebuild NAME (e.g. steam_service.xlsx) into DIR

Each workbook is written with openpyxl (fixed document properties and zip member
timestamps, so the same script gives the same bytes), then recalculated with
``cellfuncs.workbook.recalc`` so the file carries cached values that any reader shows.
The scenarios, places and tags are invented.

Design: what a person reads sits in ordinary cells, one formula per cell; errors that a
sheet expects are caught with IFERROR and a plain message, so the committed workbooks
hold no error values. PHASE_LINE spills are used where a chart needs a line of points.
"""

from __future__ import annotations

import argparse
import datetime
import io
import math
import os
import sys
import zipfile
from pathlib import Path
from typing import Callable

# openpyxl serialises XML with lxml when it is installed and with the standard library
# otherwise, and the two differ in bytes; the standard library's is the one every machine has
os.environ["OPENPYXL_LXML"] = "False"

from openpyxl import Workbook  # noqa: E402  (after the setting above)
from openpyxl.chart import Reference, ScatterChart, Series
from openpyxl.chart.marker import Marker
from openpyxl.formatting.rule import FormulaRule
from openpyxl.styles import Alignment, Border, Font, PatternFill, Side
from openpyxl.utils import get_column_letter
from openpyxl.workbook.properties import CalcProperties
from openpyxl.worksheet.datavalidation import DataValidation
from openpyxl.worksheet.worksheet import Worksheet
from openpyxl.writer.excel import ExcelWriter

from cellfuncs.workbook.authoring import mark_spills, spill, spills_of

HERE = Path(__file__).resolve().parent
STAMP = datetime.datetime(2025, 1, 6, 9, 0, 0)  # every workbook's created/modified time and zip member time
CREATOR = "cellfuncs design workbooks (workbooks/build.py)"
P_ATM = 1.01325  # bar: the standard atmosphere, the reference of the gauge units

# ---- styles --------------------------------------------------------------------------------
def _fill(rgb: str) -> PatternFill:
    return PatternFill("solid", start_color=rgb, end_color=rgb)


_THIN = Side(style="thin", color="8C8C8C")
BOX = Border(left=_THIN, right=_THIN, top=_THIN, bottom=_THIN)
TITLE = Font(bold=True, size=14, color="1F3A5F")
SUBTITLE = Font(italic=True, size=10, color="404040")
SECTION_FONT = Font(bold=True, color="FFFFFF")
SECTION_FILL = _fill("2E5E6E")
HEADER_FONT = Font(bold=True, color="1F3A5F")
HEADER_FILL = _fill("DCE6EC")
INPUT_FONT = Font(color="1F4E9A", bold=True)
INPUT_FILL = _fill("FFF4CC")
RESULT_FONT = Font(bold=True)
NOTE_FONT = Font(size=10, color="404040")
CAUTION_FILL = _fill("FBE3D6")
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

    def title(self, text: str, *lines: str) -> None:
        """The title and the lines under it, each across the sheet's width, wrapped where long."""
        for i, (line, font) in enumerate([(text, TITLE)] + [(line, SUBTITLE) for line in lines], start=1):
            self.ws.merge_cells(start_row=i, start_column=1, end_row=i, end_column=self.last_col)
            cell = self.ws.cell(i, 1, line)
            cell.font, cell.alignment = font, WRAP
            self.fit(i, line, font.size)

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
        for start, fill, colour in FLAG_RULES:
            self.ws.conditional_formatting.add(area, FormulaRule(
                formula=[f'LEFT({first},{len(start)})="{start}"'], fill=_fill(fill), font=Font(bold=True, color=colour),
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


# ---- a. steam and hot-water service ------------------------------------------------------------
def steam_service() -> Workbook:
    wb = Workbook()
    ws = wb.active
    ws.title = "Steam service"
    s = Sheet(ws, {"A": 26, "B": 30, "C": 13, "D": 13, "E": 14, "F": 15, "G": 14, "H": 15, "I": 42})
    s.title("Quillon Valley Board Mill: steam and hot-water service (invented scenario)",
            "Saturation temperatures at the steam levels, margins of measured points to saturation, and flash steam "
            "from condensate let down between levels.",
            "Yellow cells with blue figures are inputs. Gauge pressures (barg) are relative to the standard "
            "atmosphere, 101.325 kPa, not to the local barometer.")

    s.section(5, "1. Steam levels: saturation temperature at the header pressure")
    s.headers(6, ["Steam level", "Service", "Header pressure (barg)", "Absolute pressure (bar)",
                  "Saturation temperature (°C)", "Latent heat of condensation (kJ/kg)"])
    levels = [("HP steam", "turbine inlet, digester", 41.0), ("MP steam", "dryer section, first group", 13.5),
              ("LP steam", "dryer section, last groups", 4.2), ("Condensate receiver", "flash vessel, vented", 0.3)]
    for r, (name, service, barg) in enumerate(levels, start=7):
        s.put(f"A{r}", name, kind="label")
        s.put(f"B{r}", service, kind="label")
        s.put(f"C{r}", barg, "0.0#", "input")
        s.put(f"D{r}", f"=C{r}+{P_ATM}", "0.000")
        s.put(f"E{r}", f'=BOIL_TEMP("water",C{r},"barg","degC")', "0.0")
        s.put(f"F{r}", f'=LATENT_HEAT("water","boil",E{r},"degC","kJ/kg")', "0")

    s.section(12, "2. Measured points: margin to saturation and phase check")
    s.labelled(13, "Smallest acceptable margin to saturation (K)", 5.0, "0.0", "input", value_col="C")
    s.headers(14, ["Tag", "Service", "Expected phase", "Pressure (barg)", "Temperature (°C)",
                   "Saturation temperature at this pressure (°C)", "Margin to saturation (K)",
                   "Phase at the measured state", "Check"], height=60)
    points = [("PT/TT-101", "HP header after boiler", "vapor", 41.0, 400.0),
              ("PT/TT-214", "MP header after let-down station", "vapor", 13.5, 205.0),
              ("PT/TT-318", "LP header at dryer group 5", "vapor", 4.2, 150.0),
              ("PT/TT-402", "condensate pump P-402 suction", "liquid", 0.3, 104.0),
              ("PT/TT-120", "feedwater after economiser", "liquid", 48.0, 218.0),
              ("PT/TT-560", "hot-water heating return", "liquid", 2.5, 72.0)]
    for r, (tag, service, phase, barg, degc) in enumerate(points, start=15):
        s.put(f"A{r}", tag, kind="label")
        s.put(f"B{r}", service, kind="label")
        s.put(f"C{r}", phase, kind="input")
        s.put(f"D{r}", barg, "0.0#", "input")
        s.put(f"E{r}", degc, "0.0", "input")
        s.put(f"F{r}", f'=BOIL_TEMP("water",D{r},"barg","degC")', "0.0")
        s.put(f"G{r}", f'=IF(C{r}="vapor",SUPERHEAT("water",E{r},D{r},"degC","barg"),'
                       f'SUBCOOLING("water",E{r},D{r},"degC","barg"))', "0.0")
        s.put(f"H{r}", f'=STABLE_PHASE("water",E{r},D{r},"degC","barg")', kind="text")
        s.put(f"I{r}", f'=IF(OR(H{r}=C{r},AND(C{r}="vapor",H{r}="gas")),IF(G{r}<$C$13,"LOW MARGIN: under "&$C$13'
                       f'&" K","ok"),"CHECK: "&H{r}&" at this state, expected "&C{r})', kind="text")
    phases = DataValidation(type="list", formula1='"liquid,vapor"', allow_blank=False)
    ws.add_data_validation(phases)
    phases.add("C15:C20")
    s.flags("I15:I20")
    s.note(21, "Margin: superheat T - Tsat(p) for a vapour service, subcooling Tsat(p) - T for a liquid service, "
               "both temperature differences in K. Above the critical temperature (373.9 °C) STABLE_PHASE calls steam "
               "\"gas\"; a vapour service accepts it. A wet-steam reading (CHECK) or a small subcooling at a pump "
               "suction (cavitation risk) is worth a second look at the instruments and the trap or level control.")

    s.section(23, "3. Flash steam from condensate let down between levels (adiabatic, to saturation)")
    s.headers(24, ["From level", "To level", "Condensate flow (kg/h)", "Condensate temperature (°C)",
                   "From pressure (barg)", "To pressure (barg)", "Flash fraction (kg steam per kg condensate)",
                   "Flash steam (kg/h)", "Condensate left as liquid (kg/h)"], height=60)
    for r, (src, dst, flow) in enumerate([(7, 8, 5200.0), (8, 9, 8400.0), (9, 10, 11600.0)], start=25):
        s.put(f"A{r}", f"=A{src}", kind="label")
        s.put(f"B{r}", f"=A{dst}", kind="label")
        s.put(f"C{r}", flow, "#,##0", "input")
        s.put(f"D{r}", f"=E{src}", "0.0", "input")
        s.put(f"E{r}", f"=C{src}", "0.0#")
        s.put(f"F{r}", f"=C{dst}", "0.0#")
        s.put(f"G{r}", f'=FLASH_FRACTION("water",D{r},E{r},F{r},"degC","barg")', "0.0000")
        s.put(f"H{r}", f"=C{r}*G{r}", "#,##0")
        s.put(f"I{r}", f"=C{r}-H{r}", "#,##0")
    s.note(28, "The condensate temperature starts as the saturation temperature of the level it drains from; type "
               "over it for subcooled condensate. A flash fraction of 0 means the liquid stays below its boiling "
               "point after the let-down.")

    row = s.formulations(30, [
        ("Saturation temperature, latent heat, margins, phase", "water", "boil_model", "boil_model_source"),
        ("Condensate and feedwater (liquid)", "water", "liquid_model", "liquid_model_source"),
        ("Steam (vapour), flash enthalpy balance", "water", "vapor_model", "vapor_model_source"),
    ])
    s.caution(row + 1, [ESTIMATES, CODES,
                        "Flash vessels, let-down stations and condensate receivers are pressure equipment: their "
                        "relief and venting are sized to the applicable code, not from this sheet."])
    return wb


# ---- b. cryogenic liquid handling ----------------------------------------------------------------
def cryogen_release() -> Workbook:
    wb = Workbook()
    ws = wb.active
    ws.title = "Cryogen release"
    s = Sheet(ws, {"A": 22, "B": 12, "C": 12, "D": 12, "E": 12, "F": 14, "G": 13, "H": 12, "I": 15, "J": 14,
                   "K": 15})
    s.title("Northmoor Institute, low-temperature laboratory B12: cryogenic liquid handling (invented scenario)",
            "Liquid-to-gas expansion of nitrogen, oxygen and argon, the gas a dewar's contents release, and the "
            "oxygen left in the room afterwards.",
            "Yellow cells with blue figures are inputs. The reference state of the released gas is 21 °C and "
            "1 atm (1.01325 bar absolute).")

    s.section(5, "1. Reference state and room")
    t_ref = s.labelled(6, "Reference temperature of the released gas (°C)", 21.0, "0.0", "input")
    p_ref = s.labelled(7, "Reference pressure (bar absolute; 1 atm = 1.01325 bar)", P_ATM, "0.00000", "input")
    length = s.labelled(8, "Room length (m)", 7.2, "0.00", "input")
    width = s.labelled(9, "Room width (m)", 5.5, "0.00", "input")
    height = s.labelled(10, "Room height (m)", 3.0, "0.00", "input")
    room = s.labelled(11, "Room volume (m³)", f"={length}*{width}*{height}", "0.0")
    air = s.labelled(12, "Oxygen in fresh air (% by volume)", 20.9, "0.0", "input")
    low = s.labelled(13, "Oxygen-deficiency threshold (% by volume; common practice 19.5)", 19.5, "0.0",
                     "input")
    high = s.labelled(14, "Oxygen-enrichment threshold (% by volume; common practice 23.5)", 23.5, "0.0",
                      "input")
    fixed = {k: v.replace("E", "$E$") for k, v in
             dict(t_ref=t_ref, p_ref=p_ref, room=room, air=air, low=low, high=high).items()}

    s.section(16, "2. Dewars and liquid-to-gas expansion")
    s.headers(17, ["Dewar", "Substance", "Liquid content (L)", "Vessel pressure (barg)",
                   "Vessel pressure (bar absolute)", "Liquid temperature, saturated (°C)", "Liquid density (kg/m³)",
                   "Liquid mass (kg)", "Expansion ratio, liquid to gas at the reference state",
                   "Gas released (m³ at the reference state)", "Expansion ratio from the normal boiling point"],
              height=60)
    dewars = [("D-1 liquid nitrogen", "nitrogen", 180.0), ("D-2 liquid oxygen", "oxygen", 160.0),
              ("D-3 liquid argon", "argon", 230.0)]
    for r, (name, substance, litres) in enumerate(dewars, start=18):
        s.put(f"A{r}", name, kind="label")
        s.put(f"B{r}", substance, kind="label")
        s.put(f"C{r}", litres, "0", "input")
        s.put(f"D{r}", 1.5, "0.00", "input")
        s.put(f"E{r}", f"=D{r}+{P_ATM}", "0.000")
        s.put(f"F{r}", f'=BOIL_TEMP(B{r},E{r},"bar","degC")', "0.0")
        s.put(f"G{r}", f'=MASS_DENSITY(B{r},F{r},E{r},"liquid","degC","bar")', "0.0")
        s.put(f"H{r}", f"=C{r}/1000*G{r}", "0.0")
        s.put(f"I{r}", f'=EXPANSION_RATIO(B{r},F{r},E{r},{fixed["t_ref"]},{fixed["p_ref"]},"liquid","gas",'
                       f'"degC","bar")', "0")
        s.put(f"J{r}", f"=C{r}/1000*I{r}", "0.0")
        s.put(f"K{r}", f'=EXPANSION_RATIO(B{r},BOIL_TEMP(B{r},{P_ATM},"bar","degC"),{P_ATM},{fixed["t_ref"]},'
                       f'{fixed["p_ref"]},"liquid","gas","degC","bar")', "0")
    s.note(21, "The liquid is taken as saturated at the vessel pressure. The last column is the ratio usually "
               "quoted: liquid at its normal boiling point (1 atm) to gas at the reference state.")

    s.section(23, "3. Oxygen in the room after a release (well mixed)")
    s.headers(24, ["Release", "", "", "", "Gas released (m³)", "Oxygen afterwards (% by volume)", "Assessment"],
              height=45)
    for col in ("A", "G"):
        ws.merge_cells(f"{col}24:{'D' if col == 'A' else 'K'}24")
    releases = [("All of D-1 (nitrogen)", "=J18", "B18"), ("All of D-2 (oxygen)", "=J19", "B19"),
                ("All of D-3 (argon)", "=J20", "B20"), ("D-1 and D-3 together", "=J18+J20", "B18")]
    for r, (what, gas, substance) in enumerate(releases, start=25):
        ws.merge_cells(f"A{r}:D{r}")
        ws.merge_cells(f"G{r}:K{r}")
        s.put(f"A{r}", what, kind="label")
        s.put(f"E{r}", gas, "0.0")
        # well mixed, the mixture leaving as gas is added: the room's oxygen decays as exp(-V_gas/V_room)
        s.put(f"F{r}", f'=IF({substance}="oxygen",100-(100-{fixed["air"]})*EXP(-E{r}/{fixed["room"]}),'
                       f'{fixed["air"]}*EXP(-E{r}/{fixed["room"]}))', "0.0")
        s.put(f"G{r}", f'=IF(F{r}<{fixed["low"]},"OXYGEN DEFICIENCY: below "&{fixed["low"]}&" % - asphyxiation '
                       f'hazard",IF(F{r}>{fixed["high"]},"OXYGEN ENRICHMENT: above "&{fixed["high"]}&" % - fire '
                       f'hazard","within "&{fixed["low"]}&" to "&{fixed["high"]}&" %"))', kind="text")
    s.flags("G25:G28")
    s.labelled(29, "Largest release of liquid nitrogen from D-1 that keeps the room at or above the deficiency "
                   "threshold (L)", f'={fixed["room"]}*LN({fixed["air"]}/{fixed["low"]})/I18*1000', "0.0")
    ws.row_dimensions[29].height = 30
    ws["A29"].alignment = WRAP
    s.note(30, "Assumption: the room is well mixed and not ventilated. The released gas mixes at once with all the "
               "room air and pushes the mixture out through the room's leaks at room pressure as it is added "
               "(displacement), so the oxygen fraction falls as 20.9 % x exp(-V_gas/V_room) (for released oxygen "
               "the air's nitrogen and argon fall the same way). No ventilation is credited. Cold gas sinks and pools: near the floor, in pits and "
               "below benches the oxygen can be far lower than this average.")

    row = s.formulations(32, [
        ("Liquid density, liquid side of the expansion ratio", "nitrogen", "liquid_model", "liquid_density_source"),
        ("Gas side of the expansion ratio", "nitrogen", "vapor_model", "critical_temperature_source"),
        ("Saturation temperature of the liquid", "nitrogen", "boil_model", "boil.reference"),
        ("Liquid density, liquid side of the expansion ratio", "oxygen", "liquid_model", "liquid_density_source"),
        ("Gas side of the expansion ratio", "oxygen", "vapor_model", "critical_temperature_source"),
        ("Saturation temperature of the liquid", "oxygen", "boil_model", "boil.reference"),
        ("Liquid density, liquid side of the expansion ratio", "argon", "liquid_model", "liquid_density_source"),
        ("Gas side of the expansion ratio", "argon", "vapor_model", "critical_temperature_source"),
        ("Saturation temperature of the liquid", "argon", "boil_model", "boil.reference"),
    ])
    s.note(row, "The liquid model is anchored on the saturated-liquid density named in the source column; the gas "
                "model takes the critical constants from the source named.")
    s.caution(row + 2, [
        ESTIMATES, CODES,
        "Oxygen deficiency gives no warning: a few breaths of nitrogen or argon can cause collapse. Rooms with "
        "cryogens need a ventilation and oxygen-monitoring assessment by a competent person; never enter a space "
        "on the strength of this sheet.",
        "Oxygen enrichment makes clothing and oils burn fiercely. Liquid trapped between valves must have relief; "
        "cold burns and embrittlement call for the right equipment and training.",
    ])
    return wb


# ---- c. water under pressure and frost -----------------------------------------------------------
def frost_and_pressure() -> Workbook:
    wb = Workbook()
    ws = wb.active
    ws.title = "Frost and pressure"
    s = Sheet(ws, {"A": 30, "B": 13, "C": 13, "D": 13, "E": 15, "F": 15, "G": 30})
    s.title("Ridgeway Water Utility, pumping station PS-7: frost and trapped water (invented scenario)",
            "How pressure shifts the melting point, how much water expands on freezing, and how far the pressure "
            "of a blocked-in, liquid-full line rises as it warms.",
            "Yellow cells with blue figures are inputs. Pressures here are absolute (bar).")

    s.section(5, "1. Melting point of ice under pressure")
    s.headers(6, ["Case", "Pressure (bar absolute)", "Melting temperature (°C)", "Change from 1 atm (K)",
                  "Solid that forms (just below the melting point)"], height=45)
    ws.merge_cells("E6:G6")
    for r, bar in enumerate([P_ATM, 50.0, 200.0, 1000.0, 2000.0, 3000.0], start=7):
        ws.merge_cells(f"E{r}:G{r}")
        s.put(f"A{r}", "1 atm (reference)" if r == 7 else f"{r - 6}", kind="label")
        s.put(f"B{r}", bar, "#,##0.0####", "input")
        s.put(f"C{r}", f'=MELT_TEMP("water",B{r},"bar","degC")', "0.000")
        s.put(f"D{r}", f"=C{r}-$C$7", "0.000")
        s.put(f"E{r}", f'=STABLE_PHASE("water",C{r}-0.5,B{r},"degC","bar")', kind="text")
    s.note(13, "Ice Ih melts at a lower temperature as pressure rises (about 0.0074 K per bar near 1 atm); above "
               "about 2100 bar the solid that forms is a denser ice (ice III, then V), which melts at higher "
               "temperatures again.")

    s.section(15, "2. Expansion on freezing")
    p_freeze = s.labelled(16, "Pressure (bar absolute)", P_ATM, "0.00000", "input")
    t_melt = s.labelled(17, "Melting temperature (°C)", f'=MELT_TEMP("water",{p_freeze},"bar","degC")', "0.0000")
    s.labelled(18, "Density of liquid water at the melting point (kg/m³)",
               f'=MASS_DENSITY("water",{t_melt},{p_freeze},"liquid","degC","bar")', "0.00")
    s.labelled(19, "Density of ice Ih at the melting point (kg/m³)",
               f'=MASS_DENSITY("water",{t_melt},{p_freeze},"ice Ih","degC","bar")', "0.00")
    grow = s.labelled(20, "Volume increase on freezing (ice volume / water volume - 1)",
                      f'=1/PHASE_CHANGE_RATIO("water","melt",{p_freeze},"bar")-1', "0.00%")
    bore = s.labelled(21, "Pipe bore (mm), run PS-7/12 to the washwater tank", 52.5, "0.0", "input")
    run = s.labelled(22, "Length of the run that can freeze solid (m)", 18.0, "0.0", "input")
    held = s.labelled(23, "Water held in the run (L)", f"=PI()*({bore}/1000)^2/4*{run}*1000", "0.0")
    s.labelled(24, "Volume the ice needs beyond the pipe's volume (L)", f"={held}*{grow}", "0.00")
    s.note(25, "A liquid-full run that freezes cannot make room for this extra volume: the ice loads the pipe, "
               "valves and instruments until something yields. Drain or trace-heat runs that can freeze.")

    s.section(27, "3. Blocked-in, liquid-full line warming up (thermal expansion of trapped water)")
    p1 = s.labelled(28, "Pressure when blocked in (bar absolute)", 6.0, "0.00", "input")
    t1 = s.labelled(29, "Water temperature when blocked in (°C)", 8.0, "0.0", "input")
    t2 = s.labelled(30, "Water temperature after warming, e.g. in sun (°C)", 30.0, "0.0", "input")
    tm = s.labelled(31, "Mean temperature (°C)", f"=({t1}+{t2})/2", "0.0")
    alpha = s.labelled(32, "Thermal expansivity α at the mean temperature (1/K)",
                       f'=THERMAL_EXPANSIVITY("water",{tm},{p1},"liquid","degC","bar")', "0.000E+00")
    kappa = s.labelled(33, "Isothermal compressibility κ at the mean temperature (1/bar)",
                       f'=ISOTHERMAL_COMPRESSIBILITY("water",{tm},{p1},"liquid","degC","bar","1/bar")', "0.000E+00")
    per_k = s.labelled(34, "Pressure rise per kelvin, α/κ (bar/K)", f"={alpha}/{kappa}", "0.00")
    rise = s.labelled(35, "Pressure rise Δp ≈ (α/κ)·ΔT (bar)", f"={per_k}*({t2}-{t1})", "0.0")
    after = s.labelled(36, "Pressure after warming (bar absolute)", f"={p1}+{rise}", "0.0")
    design = s.labelled(37, "Design pressure of the line (barg)", 16.0, "0.0", "input")
    ws.merge_cells("E38:G38")
    excess = f"{after}-{P_ATM}-{design}"  # bar above the design pressure (a gauge pressure)
    s.labelled(38, "Check against the design pressure",
               f'=IF({excess}>0,"EXCEEDS the design pressure by "&ROUND({excess},0)&" bar","ok: below the design pressure")')
    s.flags("E38")
    s.note(39, "Δp ≈ (α/κ)·ΔT is the first-order estimate at constant volume: α and κ are taken at the mean "
               "temperature and the blocked-in pressure, the pipe is taken as rigid (its stretch lowers the rise) and "
               "no gas pocket or relief is present. Below about 4 °C α is negative: cold water contracts as it warms.")

    row = s.formulations(41, [
        ("Melting temperature, solid that forms", "water", "melt_model", "melt_model_source"),
        ("Liquid density, α, κ", "water", "liquid_model", "liquid_model_source"),
        ("Ice Ih density, expansion on freezing", "water", "solid_model", "solid_model_source"),
    ])
    s.caution(row + 1, [ESTIMATES, CODES,
                        "Thermal relief of blocked-in liquid and the protection of lines against frost are "
                        "specified to the applicable code by a licensed professional engineer."])
    return wb


# ---- d. phase maps ---------------------------------------------------------------------------------
PALETTE = (  # (legend entry: the phases as STABLE_PHASE names them, fill, text colour, texts it marks, meaning)
    ("phase + phase (on a line)", "4A4A4A", "FFFFFF", None, "two or three phases coexist"),
    ("ice Ih", "D6ECFA", "1F3A5F", ("ice Ih",), "ordinary ice"),
    ("solid", "D6ECFA", "1F3A5F", ("solid",), "the solid"),
    ("ice III, ice V, ice VI, ice VII", "6F8FD0", "FFFFFF", ("ice III", "ice V", "ice VI", "ice VII"),
     "the denser ices of high pressure"),
    ("liquid", "3FA89C", "FFFFFF", ("liquid",), "liquid"),
    ("vapor", "F2DFA7", "5C4300", ("vapor",), "vapour, below the critical temperature"),
    ("gas", "F5A97F", "5A1800", ("gas",), "gas: above the critical temperature, below the critical pressure"),
    ("supercritical fluid", "A58BC8", "FFFFFF", ("supercritical fluid",),
     "above the critical temperature and the critical pressure"),
    ("no data", "D9D9D9", "404040", ("no data",), "outside the data of the formulations"),
)
TRIPLE_COLOUR, CRITICAL_COLOUR = "D81B60", "111111"
# line colours of the charts: every series its own hue
BOIL, SUBLIME, MELT = "1B6CA8", "8A5A00", ("2E7D32", "E65100", "6A1B9A", "00ACC1")


def _map_rule(first: str, texts: tuple[str, ...] | None) -> str:
    if texts is None:
        return f'ISNUMBER(SEARCH(" + ",{first}))'
    return "OR(" + ",".join(f'{first}="{t}"' for t in texts) + ")" if len(texts) > 1 else f'{first}="{texts[0]}"'


MAP_FONT = Font(size=8)


def _phase_map(wb: Workbook, title: str, substance: str, scenario: str, t_start: float, t_step: float,
               columns: int, log_top: float, log_step: float, rows: int, phases: tuple[str, ...]) -> Worksheet:
    """A map sheet: inputs, a grid of STABLE_PHASE (pressures down column A, temperatures along row 11)
    coloured by conditional formatting, and the legend."""
    ws = wb.create_sheet(title)
    widths = {"A": 13}
    widths.update({get_column_letter(c): 9.5 for c in range(2, 2 + columns)})  # "supercritical" at 8 pt
    s = Sheet(ws, widths)
    s.title(f"Phase map of {substance}: the stable phase over temperature and pressure", scenario,
            "Yellow cells with blue figures are inputs. Each map cell is STABLE_PHASE at its column's temperature "
            "and its row's pressure; the colours follow the legend below the map.")
    s.labelled(5, "Substance", substance, kind="result", value_col="D")
    ws.merge_cells("D5:F5")
    s.labelled(6, "First temperature (°C)", t_start, "0", "input", value_col="D")
    s.labelled(7, "Temperature step (K)", t_step, "0", "input", value_col="D")
    s.labelled(8, "Highest pressure, log10 of bar", log_top, "0.0", "input", value_col="D")
    s.labelled(9, "Pressure step, decades per row", log_step, "0.00", "input", value_col="D")
    head, top = 11, 12
    last_col = get_column_letter(1 + columns)
    ws.merge_cells(f"B{head - 1}:{last_col}{head - 1}")
    ws[f"B{head - 1}"] = "Temperature (°C) →"
    ws[f"B{head - 1}"].font = HEADER_FONT
    ws[f"A{head}"] = "Pressure (bar) ↓"
    ws[f"A{head}"].font, ws[f"A{head}"].alignment = HEADER_FONT, WRAP
    ws.row_dimensions[head].height = 30
    for c in range(2, 2 + columns):
        letter = get_column_letter(c)
        s.put(f"{letter}{head}", "=$D$6" if c == 2 else f"={get_column_letter(c - 1)}{head}+$D$7", "0")
        ws[f"{letter}{head}"].fill = HEADER_FILL
    for r in range(top, top + rows):
        s.put(f"A{r}", "=10^$D$8" if r == top else f"=A{r - 1}/10^$D$9", "0.0E+0")
        ws[f"A{r}"].fill = HEADER_FILL
        for c in range(2, 2 + columns):
            letter = get_column_letter(c)
            cell = ws[f"{letter}{r}"]
            cell.value = f'=IFERROR(STABLE_PHASE($D$5,{letter}${head},$A{r},"degC","bar"),"no data")'
            cell.font = MAP_FONT
            cell.alignment = Alignment(horizontal="center", vertical="center", wrap_text=True)
        ws.row_dimensions[r].height = 24  # two lines at 8 pt: "supercritical / fluid", "ice Ih + / liquid"
    area = f"B{top}:{last_col}{top + rows - 1}"
    for name, fill, text, texts, _ in PALETTE:
        ws.conditional_formatting.add(area, FormulaRule(formula=[_map_rule(f"B{top}", texts)], fill=_fill(fill),
                                                        font=Font(color=text, size=8), stopIfTrue=True))
    ws.freeze_panes = f"B{top}"
    legend = top + rows + 1
    s.section(legend, "Legend: the phase each colour marks, as STABLE_PHASE names it")
    entries = [entry for entry in PALETTE if entry[0] in phases]
    for i, (name, fill, text, texts, meaning) in enumerate(entries, start=legend + 1):
        ws.merge_cells(f"A{i}:D{i}")
        ws.merge_cells(f"E{i}:{last_col}{i}")
        s.put(f"A{i}", name, kind="plain")
        for col in range(1, 5):
            ws.cell(i, col).fill = _fill(fill)
        ws[f"A{i}"].font = Font(bold=True, color=text)
        ws[f"E{i}"] = meaning
    return ws


def _line_sheet(wb: Workbook, title: str, map_title: str, substance: str,
                lines: list[tuple[str, str, float, float, str | None, str]], x_range: tuple[float, float],
                x_step: float, y_range: tuple[float, float], models: list[tuple[str, str, str]],
                note: str) -> Worksheet:
    """The chart of the lines and its data: one PHASE_LINE spill per line, triple and critical points."""
    ws = wb.create_sheet(title)
    # the printed part is twelve columns wide (points, chart, formulations, caution); the line data
    # below it take three columns a line, however many there are
    s = Sheet(ws, {get_column_letter(c): 11 for c in range(1, 13)})
    for c in range(13, 3 * len(lines) + 1):
        ws.column_dimensions[get_column_letter(c)].width = 11
    s.title(f"Lines of {substance}: boiling, melting and sublimation (PHASE_LINE), triple and critical points",
            note, "The line data below are PHASE_LINE spills, stored with their values; the chart reads plain "
            "references to them (lower block). LibreOffice recomputes array formulas that use functions it does not "
            "know, so it shows #NAME? in the spills, but keeps the references' stored values and draws the chart.")
    sub = f"'{map_title}'!$D$5"
    # what a person reads comes first and is the print area: points, chart, formulations, caution;
    # the chart's data follow below it
    row = s.formulations(24, [(what, substance, model, source) for what, model, source in models], height=26)
    end = s.caution(row + 1, [ESTIMATES, CODES]) - 1
    ws.print_area = f"A1:{get_column_letter(s.last_col)}{end}"
    points, data = 40, end + 5
    copy = data + points + 3  # first row of the chart's data: references to the spills
    s.note(copy - 3, "Chart data: references to the spills above (a spreadsheet program that cannot compute the "
                     "spills still shows these stored values)")
    ws["B5"], ws["C5"] = "T (°C)", "p (bar)"
    s.put("A6", "Triple point", kind="plain")
    s.put("B6", f'=TRIPLE_POINT({sub},"T","degC")', "0.000")
    s.put("C6", f'=TRIPLE_POINT({sub},"P","bar")', "0.00000")
    s.put("A7", "Critical point", kind="plain")
    s.put("B7", f'=CRITICAL_POINT({sub},"T","degC")', "0.000")
    s.put("C7", f'=CRITICAL_POINT({sub},"P","bar")', "0.000")
    chart = ScatterChart()
    chart.title = f"{substance}: phase lines"
    chart.style = 13
    chart.height, chart.width = 9, 20
    chart.x_axis.title = "Temperature (°C)"
    chart.y_axis.title = "Pressure (bar), logarithmic"
    chart.x_axis.scaling.min, chart.x_axis.scaling.max = x_range
    chart.y_axis.scaling.logBase = 10
    chart.y_axis.scaling.min, chart.y_axis.scaling.max = y_range
    chart.x_axis.majorUnit = x_step
    chart.x_axis.number_format = "0"
    chart.y_axis.number_format = "0E+0"
    chart.x_axis.delete = chart.y_axis.delete = False
    chart.x_axis.crosses = chart.y_axis.crosses = "min"  # the axes along the bottom and the left edge
    chart.legend.position = "r"
    for i, (label, boundary, t_a, t_b, solid, colour) in enumerate(lines):
        col = 1 + 3 * i
        x, y = get_column_letter(col), get_column_letter(col + 1)
        ws.merge_cells(f"{x}{data - 2}:{y}{data - 2}")
        ws[f"{x}{data - 2}"] = label
        ws[f"{x}{data - 2}"].font = HEADER_FONT
        ws[f"{x}{data - 1}"], ws[f"{y}{data - 1}"] = "T (°C)", "p (bar)"
        extra = f',"{solid}"' if solid else ""
        spill(ws, f"{x}{data}", f'=PHASE_LINE({sub},"{boundary}",{t_a},{t_b},{points},"degC","bar"{extra})')
        for r in range(data, data + points):  # formats of the spill range: empty cells, so nothing blocks it
            ws[f"{x}{r}"].number_format, ws[f"{y}{r}"].number_format = "0.00", "0.000E+00"
        ws.merge_cells(f"{x}{copy - 2}:{y}{copy - 2}")
        ws[f"{x}{copy - 2}"] = label
        ws[f"{x}{copy - 2}"].font = HEADER_FONT
        ws[f"{x}{copy - 1}"], ws[f"{y}{copy - 1}"] = "T (°C)", "p (bar)"
        for k in range(points):
            s.put(f"{x}{copy + k}", f"={x}{data + k}", "0.00", kind="plain")
            s.put(f"{y}{copy + k}", f"={y}{data + k}", "0.000E+00", kind="plain")
        series = Series(Reference(ws, min_col=col + 1, min_row=copy, max_row=copy + points - 1),
                        Reference(ws, min_col=col, min_row=copy, max_row=copy + points - 1), title=label)
        series.marker = Marker(symbol="none")
        series.smooth = False
        series.graphicalProperties.line.solidFill = colour
        series.graphicalProperties.line.width = 28575 if boundary == "boil" else 22225
        chart.series.append(series)
    for row, label, colour, symbol in ((6, "triple point", TRIPLE_COLOUR, "diamond"),
                                       (7, "critical point", CRITICAL_COLOUR, "circle")):
        series = Series(Reference(ws, min_col=3, min_row=row), Reference(ws, min_col=2, min_row=row), title=label)
        series.marker = Marker(symbol=symbol, size=9)
        series.marker.graphicalProperties.solidFill = colour
        series.marker.graphicalProperties.line.solidFill = colour
        series.graphicalProperties.line.noFill = True
        chart.series.append(series)
    for c in (2, 3):
        ws.cell(5, c).font = HEADER_FONT
    ws.add_chart(chart, "E5")
    return ws


def phase_maps() -> Workbook:
    wb = Workbook()
    wb.remove(wb.active)
    scenario = ("Tessellate Process Training Centre, module 3 (invented scenario): where a pure substance is "
                "solid, liquid, vapour, gas or supercritical fluid.")
    common = ("phase + phase (on a line)", "liquid", "vapor", "gas", "supercritical fluid", "no data")
    _phase_map(wb, "Water map", "water", scenario, -60.0, 30.0, 18, 4.5, 0.5, 18,
               common + ("ice Ih", "ice III, ice V, ice VI, ice VII"))
    _line_sheet(wb, "Water lines", "Water map", "water", [
        ("boiling", "boil", 0.01, 373.946, None, BOIL),
        ("sublimation", "sublime", -60.0, 0.01, None, SUBLIME),
        ("melting, ice Ih", "melt", -21.985, 0.01, "ice Ih", MELT[0]),
        ("melting, ice III", "melt", -21.985, -16.987, "ice III", MELT[1]),
        ("melting, ice V", "melt", -16.985, 0.159, "ice V", MELT[2]),
        ("melting, ice VI and VII", "melt", 0.161, 441.85, None, MELT[3]),
    ], (-100.0, 500.0), 100.0, (1e-5, 1e6), [
        ("Boiling line", "boil_model", "boil_model_source"),
        ("Melting lines", "melt_model", "melt_model_source"),
        ("Sublimation line", "sublime_model", "sublime_model_source"),
    ], "The melting line of each ice is drawn over the temperatures where that ice melts; the ice VI and VII lines "
       "join at their common triple point near 82 °C.")
    _phase_map(wb, "CO2 map", "carbon dioxide", scenario, -110.0, 14.0, 16, 3.5, 0.25, 19, common + ("solid",))
    _line_sheet(wb, "CO2 lines", "CO2 map", "carbon dioxide", [
        ("boiling", "boil", -56.558, 30.978, None, BOIL),
        ("sublimation", "sublime", -118.89, -56.558, None, SUBLIME),
        ("melting", "melt", -56.558, 53.85, None, MELT[0]),
    ], (-120.0, 100.0), 20.0, (1e-2, 1e4), [
        ("Boiling line", "boil_model", "boil.reference"),
        ("Melting line", "melt_model", "melt.reference"),
        ("Sublimation line", "sublime_model", "sublime.reference"),
    ], "Carbon dioxide sublimes at 1 atm: there is no liquid below its triple-point pressure of about 5.2 bar.")
    return wb


BOOKS: dict[str, Callable[[], Workbook]] = {
    "steam_service.xlsx": steam_service,
    "cryogen_release.xlsx": cryogen_release,
    "frost_and_pressure.xlsx": frost_and_pressure,
    "phase_maps.xlsx": phase_maps,
}


# ---- writing ---------------------------------------------------------------------------------------
def save(wb: Workbook, path: Path) -> None:
    """Write ``wb`` to ``path`` with fixed properties and fixed zip member times."""
    wb.properties.creator = wb.properties.lastModifiedBy = CREATOR
    wb.properties.created = wb.properties.modified = STAMP
    # calcId: the calculation-engine number current Excel writes, so that it shows the stored values on opening
    # rather than recalculating at once (our reading of the file format; not verified with Excel)
    wb.calculation = CalcProperties(calcId=191029, fullCalcOnLoad=False)
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w", zipfile.ZIP_DEFLATED) as archive:
        ExcelWriter(wb, archive).save()  # openpyxl's save_workbook would stamp the current time
    with zipfile.ZipFile(buffer) as built, zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as out:
        for info in built.infolist():
            fixed = zipfile.ZipInfo(info.filename, date_time=STAMP.timetuple()[:6])
            fixed.compress_type = zipfile.ZIP_DEFLATED
            fixed.external_attr = 0o600 << 16
            out.writestr(fixed, built.read(info.filename))
    mark_spills(path, spills_of(wb))  # the PHASE_LINE cells, recorded as Excel records a spilling formula


def build(names: list[str] | None = None, folder: Path = HERE) -> list[Path]:
    """Build the named workbooks (all by default) into ``folder`` and recalculate them in place."""
    from cellfuncs.workbook.recalc import recalc_file

    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for name in names or list(BOOKS):
        path = folder / name
        save(BOOKS[name](), path)
        outcome = recalc_file(str(path), str(path))
        if outcome.refused or outcome.errors:
            raise RuntimeError(f"{name}: {outcome.refused or outcome.errors[:5]}")
        paths.append(path)
    return paths


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Build the design workbooks and store their cached values.")
    parser.add_argument("names", nargs="*", metavar="NAME", help="any of " + ", ".join(BOOKS) + " (default: all)")
    parser.add_argument("--out", type=Path, default=HERE, help="folder to write to (default: workbooks/)")
    args = parser.parse_args(argv)
    unknown = [n for n in args.names if n not in BOOKS]
    if unknown:
        parser.error(f"unknown workbook {unknown[0]}; choose from {', '.join(BOOKS)}")
    for path in build(args.names or None, args.out):
        print(path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
