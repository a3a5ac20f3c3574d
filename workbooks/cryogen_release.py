"""Cryogenic liquid handling in an invented laboratory: liquid-to-gas expansion of nitrogen, oxygen and
argon, the gas a dewar's contents release, and the oxygen left in the room afterwards."""

from __future__ import annotations

from openpyxl import Workbook

from sheet_kit import CODES, ESTIMATES, P_ATM, WRAP, Sheet, absolute

DEWARS = [("D-1 liquid nitrogen", "nitrogen", 180.0), ("D-2 liquid oxygen", "oxygen", 160.0),
          ("D-3 liquid argon", "argon", 230.0)]  # (dewar, substance, liquid content in L)
RELEASES = [("All of D-1 (nitrogen)", (0,)), ("All of D-2 (oxygen)", (1,)), ("All of D-3 (argon)", (2,)),
            ("D-1 and D-3 together", (0, 2))]  # (release, the dewars emptied; the first names the gas)


def workbook() -> Workbook:
    wb = Workbook()
    ws = wb.active
    ws.title = "Cryogen release"
    s = Sheet(ws, {"A": 22, "B": 12, "C": 12, "D": 12, "E": 12, "F": 14, "G": 13, "H": 12, "I": 15, "J": 14,
                   "K": 15})
    rows = s.title("Northmoor Institute, low-temperature laboratory B12: cryogenic liquid handling (invented "
                   "scenario)",
                   "Liquid-to-gas expansion of nitrogen, oxygen and argon, the gas a dewar's contents release, and "
                   "the oxygen left in the room afterwards.",
                   "Yellow cells with blue figures are inputs. The reference state of the released gas is 21 °C and "
                   "1 atm (1.01325 bar absolute).")

    s.section(rows.take(), "1. Reference state and room")
    t_ref = s.labelled(rows.take(), "Reference temperature of the released gas (°C)", 21.0, "0.0", "input")
    p_ref = s.labelled(rows.take(), "Reference pressure (bar absolute; 1 atm = 1.01325 bar)", P_ATM, "0.00000",
                       "input")
    length = s.labelled(rows.take(), "Room length (m)", 7.2, "0.00", "input")
    width = s.labelled(rows.take(), "Room width (m)", 5.5, "0.00", "input")
    height = s.labelled(rows.take(), "Room height (m)", 3.0, "0.00", "input")
    room = s.labelled(rows.take(), "Room volume (m³)", f"={length}*{width}*{height}", "0.0")
    air = s.labelled(rows.take(), "Oxygen in fresh air (% by volume)", 20.9, "0.0", "input")
    low = s.labelled(rows.take(), "Oxygen-deficiency threshold (% by volume; common practice 19.5)", 19.5, "0.0",
                     "input")
    high = s.labelled(rows.take(), "Oxygen-enrichment threshold (% by volume; common practice 23.5)", 23.5, "0.0",
                      "input")
    t_ref, p_ref, room, air, low, high = map(absolute, (t_ref, p_ref, room, air, low, high))
    rows.skip()

    s.section(rows.take(), "2. Dewars and liquid-to-gas expansion")
    s.headers(rows.take(), ["Dewar", "Substance", "Liquid content (L)", "Vessel pressure (barg)",
                            "Vessel pressure (bar absolute)", "Liquid temperature, saturated (°C)",
                            "Liquid density (kg/m³)", "Liquid mass (kg)",
                            "Expansion ratio, liquid to gas at the reference state",
                            "Gas released (m³ at the reference state)", "Expansion ratio from the normal boiling point"],
              height=60)
    dewar_rows = rows.block(len(DEWARS))
    for r, (name, substance, litres) in zip(dewar_rows, DEWARS):
        s.put(f"A{r}", name, kind="label")
        s.put(f"B{r}", substance, kind="label")
        s.put(f"C{r}", litres, "0", "input")
        s.put(f"D{r}", 1.5, "0.00", "input")
        s.put(f"E{r}", f"=D{r}+{P_ATM}", "0.000")
        s.put(f"F{r}", f'=BOIL_TEMP(B{r},E{r},"bar","degC")', "0.0")
        s.put(f"G{r}", f'=MASS_DENSITY(B{r},F{r},E{r},"liquid","degC","bar")', "0.0")
        s.put(f"H{r}", f"=C{r}/1000*G{r}", "0.0")
        s.put(f"I{r}", f'=EXPANSION_RATIO(B{r},F{r},E{r},{t_ref},{p_ref},"liquid","gas","degC","bar")', "0")
        s.put(f"J{r}", f"=C{r}/1000*I{r}", "0.0")
        s.put(f"K{r}", f'=EXPANSION_RATIO(B{r},BOIL_TEMP(B{r},{P_ATM},"bar","degC"),{P_ATM},{t_ref},'
                       f'{p_ref},"liquid","gas","degC","bar")', "0")
    s.note(rows.take(), "The liquid is taken as saturated at the vessel pressure. The last column is the ratio "
                        "usually quoted: liquid at its normal boiling point (1 atm) to gas at the reference state.")
    rows.skip()

    s.section(rows.take(), "3. Oxygen in the room after a release (well mixed)")
    head = rows.take()
    s.headers(head, ["Release", "", "", "", "Gas released (m³)", "Oxygen afterwards (% by volume)", "Assessment"],
              height=45)
    ws.merge_cells(f"A{head}:D{head}")
    ws.merge_cells(f"G{head}:K{head}")
    release_rows = rows.block(len(RELEASES))
    for r, (what, emptied) in zip(release_rows, RELEASES):
        ws.merge_cells(f"A{r}:D{r}")
        ws.merge_cells(f"G{r}:K{r}")
        s.put(f"A{r}", what, kind="label")
        s.put(f"E{r}", "=" + "+".join(f"J{dewar_rows[d]}" for d in emptied), "0.0")
        gas = f"B{dewar_rows[emptied[0]]}"
        # well mixed, the mixture leaving as gas is added: the room's oxygen decays as exp(-V_gas/V_room)
        s.put(f"F{r}", f'=IF({gas}="oxygen",100-(100-{air})*EXP(-E{r}/{room}),{air}*EXP(-E{r}/{room}))', "0.0")
        s.put(f"G{r}", f'=IF(F{r}<{low},"OXYGEN DEFICIENCY: below "&{low}&" % - asphyxiation hazard",'
                       f'IF(F{r}>{high},"OXYGEN ENRICHMENT: above "&{high}&" % - fire hazard",'
                       f'"within "&{low}&" to "&{high}&" %"))', kind="text")
    s.flags(f"G{release_rows[0]}:G{release_rows[-1]}")
    largest = rows.take()
    s.labelled(largest, "Largest release of liquid nitrogen from D-1 that keeps the room at or above the deficiency "
                        "threshold (L)", f"={room}*LN({air}/{low})/I{dewar_rows[0]}*1000", "0.0")
    ws.row_dimensions[largest].height = 30
    ws[f"A{largest}"].alignment = WRAP
    s.note(rows.take(), "Assumption: the room is well mixed and not ventilated. The released gas mixes at once with "
                        "all the room air and pushes the mixture out through the room's leaks at room pressure as it "
                        "is added (displacement), so the oxygen fraction falls as 20.9 % x exp(-V_gas/V_room) (for "
                        "released oxygen the air's nitrogen and argon fall the same way). No ventilation is credited. "
                        "Cold gas sinks and pools: near the floor, in pits and below benches the oxygen can be far "
                        "lower than this average.")
    rows.skip()

    rows.at(s.formulations(rows.take(), [
        (what, substance, model, source) for _, substance, _ in DEWARS
        for what, model, source in (
            ("Liquid density, liquid side of the expansion ratio", "liquid_model", "liquid_density_source"),
            ("Gas side of the expansion ratio", "vapor_model", "critical_temperature_source"),
            ("Saturation temperature of the liquid", "boil_model", "boil.reference"))]))
    s.note(rows.take(), "The liquid model is anchored on the saturated-liquid density named in the source column; "
                        "the gas model takes the critical constants from the source named.")
    rows.skip()
    s.caution(rows.take(), [
        ESTIMATES, CODES,
        "Oxygen deficiency gives no warning: a few breaths of nitrogen or argon can cause collapse. Rooms with "
        "cryogens need a ventilation and oxygen-monitoring assessment by a competent person; never enter a space "
        "on the strength of this sheet.",
        "Oxygen enrichment makes clothing and oils burn fiercely. Liquid trapped between valves must have relief; "
        "cold burns and embrittlement call for the right equipment and training.",
    ])
    return wb
