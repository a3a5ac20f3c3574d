"""Steam and hot-water service of an invented board mill: saturation at the steam levels, margins of
measured points to saturation, flash steam from condensate let down between levels."""

from __future__ import annotations

from openpyxl import Workbook
from openpyxl.worksheet.datavalidation import DataValidation

from sheet_kit import P_ATM, Sheet, absolute

LEVELS = [  # (steam level, service, header pressure in barg)
    ("HP steam", "turbine inlet, digester", 41.0), ("MP steam", "dryer section, first group", 13.5),
    ("LP steam", "dryer section, last groups", 4.2), ("Condensate receiver", "flash vessel, vented", 0.3)]
POINTS = [  # (tag, service, expected phase, barg, degC)
    ("PT/TT-101", "HP header after boiler", "vapor", 41.0, 400.0),
    ("PT/TT-214", "MP header after let-down station", "vapor", 13.5, 205.0),
    ("PT/TT-318", "LP header at dryer group 5", "vapor", 4.2, 150.0),
    ("PT/TT-402", "condensate pump P-402 suction", "liquid", 0.3, 104.0),
    ("PT/TT-120", "feedwater after economiser", "liquid", 48.0, 218.0),
    ("PT/TT-560", "hot-water heating return", "liquid", 2.5, 72.0)]
LET_DOWNS = [(0, 1, 5200.0), (1, 2, 8400.0), (2, 3, 11600.0)]  # (from level, to level, condensate kg/h)


def workbook() -> Workbook:
    wb = Workbook()
    ws = wb.active
    ws.title = "Steam service"
    s = Sheet(ws, {"A": 26, "B": 30, "C": 13, "D": 13, "E": 14, "F": 15, "G": 14, "H": 15, "I": 42})
    rows = s.title("Quillon Valley Board Mill: steam and hot-water service (invented scenario)",
                   "Saturation temperatures at the steam levels, margins of measured points to saturation, and "
                   "flash steam from condensate let down between levels.",
                   "Yellow cells with blue figures are inputs. Gauge pressures (barg) are relative to the standard "
                   "atmosphere, 101.325 kPa, not to the local barometer.")

    s.section(rows.take(), "1. Steam levels: saturation temperature at the header pressure")
    s.headers(rows.take(), ["Steam level", "Service", "Header pressure (barg)", "Absolute pressure (bar)",
                            "Saturation temperature (°C)", "Latent heat of condensation (kJ/kg)"])
    level_rows = rows.block(len(LEVELS))
    for r, (name, service, barg) in zip(level_rows, LEVELS):
        s.put(f"A{r}", name, kind="label")
        s.put(f"B{r}", service, kind="label")
        s.put(f"C{r}", barg, "0.0#", "input")
        s.put(f"D{r}", f"=C{r}+{P_ATM}", "0.000")
        s.put(f"E{r}", f'=BOIL_TEMP("water",C{r},"barg","degC")', "0.0")
        s.put(f"F{r}", f'=LATENT_HEAT("water","boil",E{r},"degC","kJ/kg")', "0")
    rows.skip()

    s.section(rows.take(), "2. Measured points: margin to saturation and phase check")
    margin = absolute(s.labelled(rows.take(), "Smallest acceptable margin to saturation (K)", 5.0, "0.0", "input",
                                 value_col="C"))
    s.headers(rows.take(), ["Tag", "Service", "Expected phase", "Pressure (barg)", "Temperature (°C)",
                            "Saturation temperature at this pressure (°C)", "Margin to saturation (K)",
                            "Phase at the measured state", "Check"], height=60)
    point_rows = rows.block(len(POINTS))
    for r, (tag, service, phase, barg, degc) in zip(point_rows, POINTS):
        s.put(f"A{r}", tag, kind="label")
        s.put(f"B{r}", service, kind="label")
        s.put(f"C{r}", phase, kind="input")
        s.put(f"D{r}", barg, "0.0#", "input")
        s.put(f"E{r}", degc, "0.0", "input")
        s.put(f"F{r}", f'=BOIL_TEMP("water",D{r},"barg","degC")', "0.0")
        s.put(f"G{r}", f'=IF(C{r}="vapor",SUPERHEAT("water",E{r},D{r},"degC","barg"),'
                       f'SUBCOOLING("water",E{r},D{r},"degC","barg"))', "0.0")
        s.put(f"H{r}", f'=STABLE_PHASE("water",E{r},D{r},"degC","barg")', kind="text")
        s.put(f"I{r}", f'=IF(OR(H{r}=C{r},AND(C{r}="vapor",H{r}="gas")),IF(G{r}<{margin},"LOW MARGIN: under "&{margin}'
                       f'&" K","ok"),"CHECK: "&H{r}&" at this state, expected "&C{r})', kind="text")
    phases = DataValidation(type="list", formula1='"liquid,vapor"', allow_blank=False)
    ws.add_data_validation(phases)
    phases.add(f"C{point_rows[0]}:C{point_rows[-1]}")
    s.flags(f"I{point_rows[0]}:I{point_rows[-1]}")
    s.note(rows.take(), "Margin: superheat T - Tsat(p) for a vapour service, subcooling Tsat(p) - T for a liquid "
                        "service, both temperature differences in K. Above the critical temperature (373.9 °C) "
                        "STABLE_PHASE calls steam \"gas\"; a vapour service accepts it. A wet-steam reading (CHECK) or "
                        "a small subcooling at a pump suction (cavitation risk) is worth a second look at the "
                        "instruments and the trap or level control.")
    rows.skip()

    s.section(rows.take(), "3. Flash steam from condensate let down between levels (adiabatic, to saturation)")
    s.headers(rows.take(), ["From level", "To level", "Condensate flow (kg/h)", "Condensate temperature (°C)",
                            "From pressure (barg)", "To pressure (barg)", "Flash fraction (kg steam per kg condensate)",
                            "Flash steam (kg/h)", "Condensate left as liquid (kg/h)"], height=60)
    for r, (source, target, flow) in zip(rows.block(len(LET_DOWNS)), LET_DOWNS):
        src, dst = level_rows[source], level_rows[target]
        s.put(f"A{r}", f"=A{src}", kind="label")
        s.put(f"B{r}", f"=A{dst}", kind="label")
        s.put(f"C{r}", flow, "#,##0", "input")
        s.put(f"D{r}", f"=E{src}", "0.0", "input")
        s.put(f"E{r}", f"=C{src}", "0.0#")
        s.put(f"F{r}", f"=C{dst}", "0.0#")
        s.put(f"G{r}", f'=FLASH_FRACTION("water",D{r},E{r},F{r},"degC","barg")', "0.0000")
        s.put(f"H{r}", f"=C{r}*G{r}", "#,##0")
        s.put(f"I{r}", f"=C{r}-H{r}", "#,##0")
    s.note(rows.take(), "The condensate temperature starts as the saturation temperature of the level it drains "
                        "from; type over it for subcooled condensate. A flash fraction of 0 means the liquid stays "
                        "below its boiling point after the let-down.")
    rows.skip()

    s.closing(rows, [
        ("Saturation temperature, latent heat, margins, phase", "water", "boil_model", "boil_model_source"),
        ("Condensate and feedwater (liquid)", "water", "liquid_model", "liquid_model_source"),
        ("Steam (vapour), flash enthalpy balance", "water", "vapor_model", "vapor_model_source"),
    ], ["Flash vessels, let-down stations and condensate receivers are pressure equipment: their relief and "
        "venting are sized to the applicable code, not from this sheet."])
    return wb
