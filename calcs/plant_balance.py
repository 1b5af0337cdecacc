"""Plant energy balance: the generating units added up, at the rated point and over a year.

Fixed, named inputs per unit type (steam turbine unit, engine CHP unit, hydro unit, gas-turbine
unit), each linked to its own unit page where that calculation exists; an absent unit stays at
its default 0.  Fuel inputs are on net calorific value.  Efficiencies on fuel exclude the hydro
unit (it burns nothing).  Annual figures multiply each unit's rated net output, heat and fuel by
its equivalent full-load hours.  Units: MW, h, GWh.
"""

from __future__ import annotations

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Check,
    EnergyFlow,
    FigureSpec,
    Input,
    Output,
    PublishedCase,
    Reference,
    Result,
    Step,
    Table,
    TableSpec,
    Values,
)

HOURS_PER_YEAR = 8760.0

# (label, fuel, gross, aux, fuel input, heat export, hours, water power) input names per unit
UNITS = (
    ("Steam turbine unit", "solid biomass", "steam_unit_gross_output", "steam_unit_auxiliary_load",
     "steam_unit_fuel_input", "steam_unit_heat_export", "steam_unit_operating_hours", None),
    ("Engine CHP unit", "biogas", "chp_unit_electrical_output", "chp_unit_auxiliary_load",
     "chp_unit_fuel_input", "chp_unit_heat_export", "chp_unit_operating_hours", None),
    ("Hydro unit", "water", "hydro_unit_electrical_output", "hydro_unit_auxiliary_load",
     None, None, "hydro_unit_operating_hours", "hydro_unit_water_power"),
    ("Gas-turbine unit", "natural gas", "gt_unit_electrical_output", "gt_unit_auxiliary_load",
     "gt_unit_fuel_input", None, "gt_unit_operating_hours", None),
)


def _power(name: str, default: float | None = 0.0, note: str = "") -> Input:
    return Input(name, range="[0, 2000]", default=default, note=note)


def _hours(name: str) -> Input:
    return Input(name, range="[0, 8760]", default=0.0)


REFERENCES = [
    Reference("cengel", "Y. A. Cengel and M. A. Boles, Thermodynamics: An Engineering Approach, 8th ed., "
              "McGraw-Hill, New York, 2015.",
              "First law for a control volume (ch. 5): what comes in as fuel and water power leaves as "
              "electricity, heat and losses; efficiency as output over input (as recalled)."),
    Reference("eu2012_27", "Directive 2012/27/EU of the European Parliament and of the Council of "
              "25 October 2012 on energy efficiency, OJ L 315, 14.11.2012.",
              "Overall efficiency: annual electricity plus useful heat over the annual fuel input on net "
              "calorific value (Annex I, as recalled); annual quantities from rated values and "
              "equivalent full-load hours are this module's simplification."),
    Reference("practice", "Common engineering practice, no published source: screening values "
              "chosen in basisbook 0.1.0 (this module).",
              "Auxiliary share limit for a biomass plant with an engine set."),
]

SPEC = CalcSpec(
    kind="plant_balance",
    discipline="plant balance",
    title="Plant energy balance: units, auxiliary load, export and annual energy",
    purpose=(
        "Add the plant's generating units: gross electrical output, auxiliary load and net "
        "export, heat export, fuel input by fuel, the plant's efficiencies on fuel, and the annual "
        "energy from each unit's operating hours, with a link to every unit's own page."
    ),
    inputs=[
        _power("steam_unit_gross_output", None, "link to the steam turbine generator"),
        _power("steam_unit_auxiliary_load"),
        _power("steam_unit_fuel_input"),
        _power("steam_unit_heat_export"),
        _hours("steam_unit_operating_hours"),
        _power("chp_unit_electrical_output"),
        _power("chp_unit_auxiliary_load"),
        _power("chp_unit_fuel_input"),
        _power("chp_unit_heat_export"),
        _hours("chp_unit_operating_hours"),
        _power("hydro_unit_electrical_output"),
        _power("hydro_unit_auxiliary_load"),
        _power("hydro_unit_water_power"),
        _hours("hydro_unit_operating_hours"),
        _power("gt_unit_electrical_output"),
        _power("gt_unit_auxiliary_load"),
        _power("gt_unit_fuel_input"),
        _hours("gt_unit_operating_hours"),
        _power("common_auxiliary_load"),
    ],
    outputs=[
        Output("plant_gross_output", key=True),
        Output("plant_auxiliary_load", key=True),
        Output("plant_net_export", key=True),
        Output("plant_heat_export", key=True),
        Output("plant_fuel_input", key=True),
        Output("plant_conversion_losses"),
        Output("plant_auxiliary_share"),
        Output("fired_net_electrical_efficiency", key=True),
        Output("plant_fuel_utilisation"),
        Output("plant_annual_gross_generation"),
        Output("plant_annual_net_export", key=True),
        Output("plant_annual_heat_export"),
        Output("plant_annual_fuel_input"),
    ],
    steps=[
        Step("plant_gross_output",
             r"@steam_unit_gross_output + @chp_unit_electrical_output + @hydro_unit_electrical_output + "
             r"@gt_unit_electrical_output", "cengel", "ch. 5"),
        Step("plant_auxiliary_load",
             r"@steam_unit_auxiliary_load + @chp_unit_auxiliary_load + @hydro_unit_auxiliary_load + "
             r"@gt_unit_auxiliary_load + @common_auxiliary_load", "cengel", "ch. 5"),
        Step("plant_net_export", r"@plant_gross_output - @plant_auxiliary_load", "cengel", "ch. 5"),
        Step("plant_heat_export", r"@steam_unit_heat_export + @chp_unit_heat_export", "cengel", "ch. 5"),
        Step("plant_fuel_input", r"@steam_unit_fuel_input + @chp_unit_fuel_input + @gt_unit_fuel_input",
             "cengel", "ch. 5, on net calorific value"),
        Step("plant_conversion_losses",
             r"@plant_fuel_input + @hydro_unit_water_power - @plant_gross_output - @plant_heat_export",
             "cengel", "ch. 5, first law"),
        Step("plant_auxiliary_share", r"100\,\frac{@plant_auxiliary_load}{@plant_gross_output}", "cengel", "ch. 5"),
        Step("fired_net_electrical_efficiency",
             r"\frac{@plant_net_export - \left(@hydro_unit_electrical_output - @hydro_unit_auxiliary_load\right)}"
             r"{@plant_fuel_input}", "cengel", "ch. 5, hydro excluded; common load charged to the fired units"),
        Step("plant_fuel_utilisation",
             r"@fired_net_electrical_efficiency + \frac{@plant_heat_export}{@plant_fuel_input}", "eu2012_27",
             "Annex I, overall efficiency (as recalled)"),
        Step("plant_annual_gross_generation",
             r"10^{-3}\left(@steam_unit_gross_output\,@steam_unit_operating_hours + "
             r"@chp_unit_electrical_output\,@chp_unit_operating_hours + "
             r"@hydro_unit_electrical_output\,@hydro_unit_operating_hours + "
             r"@gt_unit_electrical_output\,@gt_unit_operating_hours\right)", "eu2012_27", "operating hours method"),
        Step("plant_annual_net_export",
             r"10^{-3}\left(\sum_i \left(P_{\mathrm{g},i} - P_{\mathrm{aux},i}\right) t_i - "
             r"@common_auxiliary_load \cdot 8760\ \mathrm{h}\right)", "eu2012_27",
             "operating hours method; common load all year"),
        Step("plant_annual_heat_export",
             r"10^{-3}\left(@steam_unit_heat_export\,@steam_unit_operating_hours + "
             r"@chp_unit_heat_export\,@chp_unit_operating_hours\right)", "eu2012_27", "operating hours method"),
        Step("plant_annual_fuel_input",
             r"10^{-3}\left(@steam_unit_fuel_input\,@steam_unit_operating_hours + "
             r"@chp_unit_fuel_input\,@chp_unit_operating_hours + @gt_unit_fuel_input\,@gt_unit_operating_hours\right)",
             "eu2012_27", "operating hours method"),
    ],
    checks=[
        Check("net_export", "The plant exports power at the rated point", "plant_net_export", ">", 0.0, "cengel",
              "ch. 5"),
        Check("auxiliary_share", "Auxiliary load at most 10 % of gross output", "plant_auxiliary_share", "<=",
              10.0, "practice", review_band=0.2),
        Check("fuel_utilisation", "Fuel utilisation of the fired units below 100 % (first law)",
              "plant_fuel_utilisation", "<", 1.0, "cengel", "ch. 5", review_band=0.05),
    ],
    references=REFERENCES,
    cautions=[
        "The plant combines high-voltage generation, rotating machinery, high-pressure steam, "
        "fuel gas and water under pressure; each unit page carries its own cautions.",
        "These totals are a design basis for review, not a guaranteed performance. Defer to the "
        "local codes and to licensed engineering practice.",
    ],
    figures=[
        FigureSpec("energy_flow", "Plant energy flow",
                   "Fuel by fuel and water power in; net export, heat export, auxiliary load and "
                   "conversion losses out, at the rated point."),
    ],
    tables=[
        TableSpec("units", "Units at the rated point and over the year",
                  "Each unit's rated gross output, auxiliary load, net output, heat, fuel, hours and annual "
                  "energy; follow the input links above to each unit's page."),
    ],
    glossary=GLOSSARY,
)


def compute(v: Values) -> Result:
    warnings: list[str] = []
    rows = []
    flows_in: list[tuple[str, float]] = []
    gross = aux = heat = fuel = water = 0.0
    e_gross = e_net = e_heat = e_fuel = 0.0
    for label, fuel_name, g_n, a_n, f_n, h_n, t_n, w_n in UNITS:
        g, a, t = float(v[g_n]), float(v[a_n]), float(v[t_n])
        f = float(v[f_n]) if f_n else 0.0
        h = float(v[h_n]) if h_n else 0.0
        w = float(v[w_n]) if w_n else 0.0
        if g == 0.0 and (a or f or h or t or w):
            warnings.append(f"{label}: no gross output but other values given; the unit counts as idle")
        if f_n and g > 0.0 and f == 0.0:
            raise InputConflict(f_n, f"{label} delivers {g:g} MW but no fuel input is given")
        if f_n and g + h >= f > 0.0:
            raise InputConflict(f_n, f"{label}: gross output {g:g} MW plus heat {h:g} MW is not below its "
                                f"fuel input {f:g} MW; the unit would make energy from nothing")
        if w_n and g > 0.0 and w and g >= w:
            raise InputConflict(w_n, f"{label}: gross output {g:g} MW is not below its water power {w:g} MW")
        if a >= g > 0.0:
            # at its design point a generating unit that consumes all it makes is a data error
            raise InputConflict(a_n, f"{label}: auxiliary load {a:g} MW is not below its gross output "
                                f"{g:g} MW; the unit would export nothing at its design point")
        if g > 0.0 and t == 0.0:
            warnings.append(f"{label}: no operating hours given; its annual energy counts as 0")
        gross += g
        aux += a
        heat += h
        fuel += f
        water += w
        e_gross += g * t / 1e3
        e_net += (g - a) * t / 1e3
        e_heat += h * t / 1e3
        e_fuel += f * t / 1e3
        if g > 0.0:
            rows.append([label, fuel_name, g, a, g - a, h, f, t, (g - a) * t / 1e3, h * t / 1e3])
        if f > 0.0:
            flows_in.append((f"Fuel: {fuel_name}", f))
        if w > 0.0:
            flows_in.append(("Water power (hydro)", w))
    common = float(v.common_auxiliary_load)
    aux += common
    e_net -= common * HOURS_PER_YEAR / 1e3
    if common:
        rows.append(["Common services", "", 0.0, common, -common, 0.0, 0.0, HOURS_PER_YEAR,
                     -common * HOURS_PER_YEAR / 1e3, 0.0])
    hydro_g = float(v.hydro_unit_electrical_output)
    hydro_net = hydro_g - float(v.hydro_unit_auxiliary_load)
    if hydro_g > 0.0 and water == 0.0:
        raise InputConflict("hydro_unit_water_power", "the hydro unit delivers power but its water power is "
                            "not given; link it to the hydro unit's gross hydraulic power")
    if fuel == 0.0:
        raise InputConflict("steam_unit_fuel_input", "no fired unit has a fuel input; the plant efficiencies "
                            "on fuel are undefined")
    if gross == 0.0:
        raise InputConflict("steam_unit_gross_output", "no unit delivers power; the balance needs at least "
                            "one unit with a gross output")
    net = gross - aux
    if net - hydro_net <= 0.0:
        raise InputConflict("common_auxiliary_load",
                            f"the common services load {common:g} MW is not below the fired units' own net "
                            f"output {net - hydro_net + common:g} MW; charged to them, their net efficiency "
                            "would be zero or negative")
    losses = fuel + water - gross - heat
    eta_el = (net - hydro_net) / fuel
    outputs: dict[str, float | str] = {
        "plant_gross_output": gross,
        "plant_auxiliary_load": aux,
        "plant_net_export": net,
        "plant_heat_export": heat,
        "plant_fuel_input": fuel,
        "plant_conversion_losses": losses,
        "plant_auxiliary_share": 100.0 * aux / gross,
        "fired_net_electrical_efficiency": eta_el,
        "plant_fuel_utilisation": eta_el + heat / fuel,
        "plant_annual_gross_generation": e_gross,
        "plant_annual_net_export": e_net,
        "plant_annual_heat_export": e_heat,
        "plant_annual_fuel_input": e_fuel,
    }
    flow = EnergyFlow(
        unit="MW",
        inflows=flows_in,
        outflows=[("Net electrical export", net, "product"),
                  *([("Heat export", heat, "product")] if heat > 0 else []),
                  ("Auxiliary load", aux, "loss"),
                  ("Conversion losses", losses, "loss")],
    )
    rows.append(["Plant", "", gross, aux, net, heat, fuel, "", e_net, e_heat])
    table = Table(
        columns=[("Unit", ""), ("Fuel", ""), ("Gross output", "MW"), ("Auxiliary load", "MW"),
                 ("Net output", "MW"), ("Heat export", "MW"), ("Fuel input", "MW"),
                 ("Full-load hours", "h"), ("Annual net energy", "GWh"), ("Annual heat", "GWh")],
        rows=rows,
    )
    return Result(outputs=outputs, charts={"energy_flow": flow}, tables={"units": table}, warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers: exact identities of the balance
# ---------------------------------------------------------------------------


def _identity_case() -> Values:
    base = {i.name: 0.0 for i in SPEC.inputs}
    base.update(steam_unit_gross_output=10.0, steam_unit_auxiliary_load=1.0, steam_unit_fuel_input=40.0,
                steam_unit_operating_hours=8000.0, chp_unit_electrical_output=2.0, chp_unit_fuel_input=5.0,
                chp_unit_heat_export=2.0, chp_unit_operating_hours=8000.0)
    return Values(base)


PUBLISHED_CASES = [
    PublishedCase("net export of a two-unit plant", "first law, exact identity (Cengel & Boles 8th ed., ch. 5, "
                  "from memory): 10 + 2 - 1 = 11 MW", 11.0, "MW", 1e-12, "exact",
                  lambda: compute(_identity_case()).outputs["plant_net_export"]),
    PublishedCase("annual net export of a two-unit plant", "exact identity: 11 MW x 8000 h = 88 GWh",
                  88.0, "GWh", 1e-9, "exact",
                  lambda: compute(_identity_case()).outputs["plant_annual_net_export"]),
    PublishedCase("fuel utilisation of a two-unit plant", "exact identity: (11 + 2) MW / 45 MW",
                  13.0 / 45.0, "", 1e-12, "exact",
                  lambda: compute(_identity_case()).outputs["plant_fuel_utilisation"]),
]
