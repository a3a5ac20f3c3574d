"""Frost and trapped water at an invented pumping station: how pressure shifts the melting point, how
much water expands on freezing, how far the pressure of a blocked-in, liquid-full line rises as it warms."""

from __future__ import annotations

from openpyxl import Workbook

from sheet_kit import P_ATM, Sheet, absolute

PRESSURES = [P_ATM, 50.0, 200.0, 1000.0, 2000.0, 3000.0]  # bar absolute; the first is the reference


def workbook() -> Workbook:
    wb = Workbook()
    ws = wb.active
    ws.title = "Frost and pressure"
    s = Sheet(ws, {"A": 30, "B": 13, "C": 13, "D": 13, "E": 15, "F": 15, "G": 30})
    rows = s.title("Ridgeway Water Utility, pumping station PS-7: frost and trapped water (invented scenario)",
                   "How pressure shifts the melting point, how much water expands on freezing, and how far the "
                   "pressure of a blocked-in, liquid-full line rises as it warms.",
                   "Yellow cells with blue figures are inputs. Pressures here are absolute (bar).")

    s.section(rows.take(), "1. Melting point of ice under pressure")
    head = rows.take()
    s.headers(head, ["Case", "Pressure (bar absolute)", "Melting temperature (°C)", "Change from 1 atm (K)",
                     "Solid that forms (just below the melting point)"], height=45)
    ws.merge_cells(f"E{head}:G{head}")
    case_rows = rows.block(len(PRESSURES))
    reference = absolute(f"C{case_rows[0]}")
    for case, (r, bar) in enumerate(zip(case_rows, PRESSURES)):
        ws.merge_cells(f"E{r}:G{r}")
        s.put(f"A{r}", f"{case + 1}" if case else "1 atm (reference)", kind="label")
        s.put(f"B{r}", bar, "#,##0.0####", "input")
        s.put(f"C{r}", f'=MELT_TEMP("water",B{r},"bar","degC")', "0.000")
        s.put(f"D{r}", f"=C{r}-{reference}", "0.000")
        s.put(f"E{r}", f'=STABLE_PHASE("water",C{r}-0.5,B{r},"degC","bar")', kind="text")
    s.note(rows.take(), "Ice Ih melts at a lower temperature as pressure rises (about 0.0074 K per bar near 1 atm); "
                        "above about 2100 bar the solid that forms is a denser ice (ice III, then V), which melts at "
                        "higher temperatures again.")
    rows.skip()

    s.section(rows.take(), "2. Expansion on freezing")
    p_freeze = s.labelled(rows.take(), "Pressure (bar absolute)", P_ATM, "0.00000", "input")
    t_melt = s.labelled(rows.take(), "Melting temperature (°C)", f'=MELT_TEMP("water",{p_freeze},"bar","degC")',
                        "0.0000")
    s.labelled(rows.take(), "Density of liquid water at the melting point (kg/m³)",
               f'=MASS_DENSITY("water",{t_melt},{p_freeze},"liquid","degC","bar")', "0.00")
    s.labelled(rows.take(), "Density of ice Ih at the melting point (kg/m³)",
               f'=MASS_DENSITY("water",{t_melt},{p_freeze},"ice Ih","degC","bar")', "0.00")
    grow = s.labelled(rows.take(), "Volume increase on freezing (ice volume / water volume - 1)",
                      f'=1/PHASE_CHANGE_RATIO("water","melt",{p_freeze},"bar")-1', "0.00%")
    bore = s.labelled(rows.take(), "Pipe bore (mm), run PS-7/12 to the washwater tank", 52.5, "0.0", "input")
    run = s.labelled(rows.take(), "Length of the run that can freeze solid (m)", 18.0, "0.0", "input")
    held = s.labelled(rows.take(), "Water held in the run (L)", f"=PI()*({bore}/1000)^2/4*{run}*1000", "0.0")
    s.labelled(rows.take(), "Volume the ice needs beyond the pipe's volume (L)", f"={held}*{grow}", "0.00")
    s.note(rows.take(), "A liquid-full run that freezes cannot make room for this extra volume: the ice loads the "
                        "pipe, valves and instruments until something yields. Drain or trace-heat runs that can "
                        "freeze.")
    rows.skip()

    s.section(rows.take(), "3. Blocked-in, liquid-full line warming up (thermal expansion of trapped water)")
    p1 = s.labelled(rows.take(), "Pressure when blocked in (bar absolute)", 6.0, "0.00", "input")
    t1 = s.labelled(rows.take(), "Water temperature when blocked in (°C)", 8.0, "0.0", "input")
    t2 = s.labelled(rows.take(), "Water temperature after warming, e.g. in sun (°C)", 30.0, "0.0", "input")
    tm = s.labelled(rows.take(), "Mean temperature (°C)", f"=({t1}+{t2})/2", "0.0")
    alpha = s.labelled(rows.take(), "Thermal expansivity α at the mean temperature (1/K)",
                       f'=THERMAL_EXPANSIVITY("water",{tm},{p1},"liquid","degC","bar")', "0.000E+00")
    kappa = s.labelled(rows.take(), "Isothermal compressibility κ at the mean temperature (1/bar)",
                       f'=ISOTHERMAL_COMPRESSIBILITY("water",{tm},{p1},"liquid","degC","bar","1/bar")', "0.000E+00")
    per_k = s.labelled(rows.take(), "Pressure rise per kelvin, α/κ (bar/K)", f"={alpha}/{kappa}", "0.00")
    rise = s.labelled(rows.take(), "Pressure rise Δp ≈ (α/κ)·ΔT (bar)", f"={per_k}*({t2}-{t1})", "0.0")
    after = s.labelled(rows.take(), "Pressure after warming (bar absolute)", f"={p1}+{rise}", "0.0")
    design = s.labelled(rows.take(), "Design pressure of the line (barg)", 16.0, "0.0", "input")
    check = rows.take()
    ws.merge_cells(f"E{check}:G{check}")
    excess = f"{after}-{P_ATM}-{design}"  # bar above the design pressure (a gauge pressure)
    s.flags(s.labelled(check, "Check against the design pressure",
                       f'=IF({excess}>0,"EXCEEDS the design pressure by "&ROUND({excess},0)&" bar",'
                       f'"ok: below the design pressure")'))
    s.note(rows.take(), "Δp ≈ (α/κ)·ΔT is the first-order estimate at constant volume: α and κ are taken at the mean "
                        "temperature and the blocked-in pressure, the pipe is taken as rigid (its stretch lowers the "
                        "rise) and no gas pocket or relief is present. Below about 4 °C α is negative: cold water "
                        "contracts as it warms.")
    rows.skip()

    s.closing(rows, [
        ("Melting temperature, solid that forms", "water", "melt_model", "melt_model_source"),
        ("Liquid density, α, κ", "water", "liquid_model", "liquid_model_source"),
        ("Ice Ih density, expansion on freezing", "water", "solid_model", "solid_model_source"),
    ], ["Thermal relief of blocked-in liquid and the protection of lines against frost are specified to the "
        "applicable code by a licensed professional engineer."])
    return wb
