"""Phase maps of water and carbon dioxide for an invented training centre: a grid of STABLE_PHASE
coloured by phase, and a chart of the lines drawn from PHASE_LINE spills."""

from __future__ import annotations

from openpyxl import Workbook
from openpyxl.chart import Reference, ScatterChart, Series
from openpyxl.chart.marker import Marker
from openpyxl.formatting.rule import FormulaRule
from openpyxl.styles import Alignment, Font
from openpyxl.utils import get_column_letter
from openpyxl.worksheet.worksheet import Worksheet

from cellfuncs.workbook.authoring import spill
from sheet_kit import CODES, ESTIMATES, HEADER_FILL, HEADER_FONT, WRAP, Sheet, absolute, fill

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
               columns: int, log_top: float, log_step: float, rows: int, phases: tuple[str, ...]) -> str:
    """A map sheet: inputs, a grid of STABLE_PHASE (pressures down column A, temperatures along its head
    row) coloured by conditional formatting, and the legend; returns the reference of its substance cell,
    which the sheet of the substance's lines reads too."""
    ws = wb.create_sheet(title)
    widths = {"A": 13}
    widths.update({get_column_letter(c): 9.5 for c in range(2, 2 + columns)})  # "supercritical" at 8 pt
    s = Sheet(ws, widths)
    cursor = s.title(f"Phase map of {substance}: the stable phase over temperature and pressure", scenario,
                     "Yellow cells with blue figures are inputs. Each map cell is STABLE_PHASE at its column's "
                     "temperature and its row's pressure; the colours follow the legend below the map.")
    name_row = cursor.take()
    chosen = absolute(s.labelled(name_row, "Substance", substance, kind="result", value_col="D"))
    ws.merge_cells(f"D{name_row}:F{name_row}")
    first, step, highest, decades = (absolute(s.labelled(cursor.take(), label, value, fmt, "input", value_col="D"))
                                     for label, value, fmt in (("First temperature (°C)", t_start, "0"),
                                                               ("Temperature step (K)", t_step, "0"),
                                                               ("Highest pressure, log10 of bar", log_top, "0.0"),
                                                               ("Pressure step, decades per row", log_step, "0.00")))
    axis, head, top = cursor.take(), cursor.take(), cursor.row
    last_col = get_column_letter(1 + columns)
    ws.merge_cells(f"B{axis}:{last_col}{axis}")
    ws[f"B{axis}"] = "Temperature (°C) →"
    ws[f"B{axis}"].font = HEADER_FONT
    ws[f"A{head}"] = "Pressure (bar) ↓"
    ws[f"A{head}"].font, ws[f"A{head}"].alignment = HEADER_FONT, WRAP
    ws.row_dimensions[head].height = 30
    for c in range(2, 2 + columns):
        letter = get_column_letter(c)
        s.put(f"{letter}{head}", f"={first}" if c == 2 else f"={get_column_letter(c - 1)}{head}+{step}", "0")
        ws[f"{letter}{head}"].fill = HEADER_FILL
    for r in cursor.block(rows):
        s.put(f"A{r}", f"=10^{highest}" if r == top else f"=A{r - 1}/10^{decades}", "0.0E+0")
        ws[f"A{r}"].fill = HEADER_FILL
        for c in range(2, 2 + columns):
            letter = get_column_letter(c)
            cell = ws[f"{letter}{r}"]
            cell.value = f'=IFERROR(STABLE_PHASE({chosen},{letter}${head},$A{r},"degC","bar"),"no data")'
            cell.font = MAP_FONT
            cell.alignment = Alignment(horizontal="center", vertical="center", wrap_text=True)
        ws.row_dimensions[r].height = 24  # two lines at 8 pt: "supercritical / fluid", "ice Ih + / liquid"
    area = f"B{top}:{last_col}{top + rows - 1}"
    for _, background, text, texts, _ in PALETTE:
        ws.conditional_formatting.add(area, FormulaRule(formula=[_map_rule(f"B{top}", texts)], fill=fill(background),
                                                        font=Font(color=text, size=8), stopIfTrue=True))
    ws.freeze_panes = f"B{top}"
    cursor.skip()
    legend = cursor.take()
    s.section(legend, "Legend: the phase each colour marks, as STABLE_PHASE names it")
    entries = [entry for entry in PALETTE if entry[0] in phases]
    for i, (name, background, text, _, meaning) in zip(cursor.block(len(entries)), entries):
        ws.merge_cells(f"A{i}:D{i}")
        ws.merge_cells(f"E{i}:{last_col}{i}")
        s.put(f"A{i}", name, kind="plain")
        for col in range(1, 5):
            ws.cell(i, col).fill = fill(background)
        ws[f"A{i}"].font = Font(bold=True, color=text)
        ws[f"E{i}"] = meaning
    return f"'{title}'!{chosen}"


def _line_sheet(wb: Workbook, title: str, sub: str, substance: str,
                lines: list[tuple[str, str, float, float, str | None, str]], x_range: tuple[float, float],
                x_step: float, y_range: tuple[float, float], models: list[tuple[str, str, str]],
                note: str) -> Worksheet:
    """The chart of the lines and its data: one PHASE_LINE spill per line, triple and critical points, for
    the substance named in cell ``sub`` (its map sheet's substance cell)."""
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


def workbook() -> Workbook:
    wb = Workbook()
    wb.remove(wb.active)
    scenario = ("Tessellate Process Training Centre, module 3 (invented scenario): where a pure substance is "
                "solid, liquid, vapour, gas or supercritical fluid.")
    common = ("phase + phase (on a line)", "liquid", "vapor", "gas", "supercritical fluid", "no data")
    water = _phase_map(wb, "Water map", "water", scenario, -60.0, 30.0, 18, 4.5, 0.5, 18,
                       common + ("ice Ih", "ice III, ice V, ice VI, ice VII"))
    _line_sheet(wb, "Water lines", water, "water", [
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
    co2 = _phase_map(wb, "CO2 map", "carbon dioxide", scenario, -110.0, 14.0, 16, 3.5, 0.25, 19,
                     common + ("solid",))
    _line_sheet(wb, "CO2 lines", co2, "carbon dioxide", [
        ("boiling", "boil", -56.558, 30.978, None, BOIL),
        ("sublimation", "sublime", -118.89, -56.558, None, SUBLIME),
        ("melting", "melt", -56.558, 53.85, None, MELT[0]),
    ], (-120.0, 100.0), 20.0, (1e-2, 1e4), [
        ("Boiling line", "boil_model", "boil.reference"),
        ("Melting line", "melt_model", "melt.reference"),
        ("Sublimation line", "sublime_model", "sublime.reference"),
    ], "Carbon dioxide sublimes at 1 atm: there is no liquid below its triple-point pressure of about 5.2 bar.")
    return wb
