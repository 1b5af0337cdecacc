"""Simple-cycle gas turbine (open Brayton cycle): work, efficiency, heat rate, exhaust.

States: 1 compressor inlet, 2 compressor outlet, 3 turbine inlet, 4 turbine exhaust.  Air
properties are CoolProp's real-gas 'Air' (Lemmon et al. 2000): h(T, p) and s(T, p), with the
isentropic states from (p, s).  The combustion gas is treated as air carrying the fuel's mass
(documented approximation, as the issue asks): its enthalpy is that of air at the same T and p.
Products of lean combustion have a larger specific heat than air, so this understates the turbine
work and the exhaust enthalpy by a few percent at gas-turbine excess air (about 3 %, order of
magnitude as recalled); the fuel-air ratio, efficiency and exhaust temperature carry errors of that
order.  Heat input is the fuel's net calorific value times the combustion efficiency; the fuel
enters at the 25 degC reference.  Exhaust pressure equals inlet pressure (no diffuser or stack loss).
Units: degC, bar, kJ/kg, MW.
"""

from __future__ import annotations

from typing import NamedTuple

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Chart,
    Check,
    EnergyFlow,
    FigureSpec,
    Input,
    Marker,
    Output,
    PublishedCase,
    Reference,
    Result,
    Series,
    Step,
    Table,
    TableSpec,
    Values,
)

KELVIN = 273.15
REFERENCE_TEMPERATURE = 25.0  # degC, combustion reference of the net calorific value


# ---------------------------------------------------------------------------
# Air properties (CoolProp) and published models
# ---------------------------------------------------------------------------


def _air(output: str, name1: str, value1: float, name2: str, value2: float) -> float:
    from CoolProp.CoolProp import PropsSI  # lazy: a module import stays cheap

    return PropsSI(output, name1, value1, name2, value2, "Air")


def air_h(t_c: float, p_bar: float) -> float:
    """Specific enthalpy of air, kJ/kg."""
    return _air("H", "T", t_c + KELVIN, "P", p_bar * 1e5) / 1e3


def air_s(t_c: float, p_bar: float) -> float:
    """Specific entropy of air, kJ/(kg K)."""
    return _air("S", "T", t_c + KELVIN, "P", p_bar * 1e5) / 1e3


def air_h_ps(p_bar: float, s: float) -> float:
    """Enthalpy at pressure and entropy (the isentropic state), kJ/kg."""
    return _air("H", "P", p_bar * 1e5, "S", s * 1e3) / 1e3


def air_t_ph(p_bar: float, h: float) -> float:
    """Temperature at pressure and enthalpy, degC."""
    return _air("T", "P", p_bar * 1e5, "H", h * 1e3) - KELVIN


def air_standard_efficiency(pressure_ratio: float, k: float = 1.4) -> float:
    """Ideal Brayton cycle, cold air standard: eta = 1 - r^(-(k-1)/k).
    Cengel & Boles, Thermodynamics, 8th ed., 2015, §9-8, eq. 9-17 (as recalled)."""
    return 1.0 - pressure_ratio ** (-(k - 1.0) / k)


class BraytonStates(NamedTuple):
    h1: float
    h2s: float
    h2: float
    h3: float
    h4s: float
    h4: float
    t2: float
    t4: float
    p2: float
    p3: float


def brayton_states(t1: float, p1: float, ratio: float, eta_c: float, t3: float, eta_t: float,
                   pressure_loss: float = 0.0) -> BraytonStates:
    """State points of the simple cycle with isentropic efficiencies
    eta_C = (h2s - h1)/(h2 - h1), eta_T = (h3 - h4)/(h3 - h4s) (Cengel & Boles 8th ed., §7-12
    eqs. 7-61 and 7-60, §9-8, as recalled).  ``pressure_loss`` is a fraction of p2."""
    p2 = ratio * p1
    p3 = p2 * (1.0 - pressure_loss)
    h1 = air_h(t1, p1)
    h2s = air_h_ps(p2, air_s(t1, p1))
    h2 = h1 + (h2s - h1) / eta_c
    h3 = air_h(t3, p3)
    h4s = air_h_ps(p1, air_s(t3, p3))
    h4 = h3 - eta_t * (h3 - h4s)
    return BraytonStates(h1, h2s, h2, h3, h4s, h4, air_t_ph(p2, h2), air_t_ph(p1, h4), p2, p3)


def air_standard_cycle_efficiency(states: BraytonStates) -> float:
    """Air-standard cycle (no fuel mass): (w_T - w_C) / q_in with q_in = h3 - h2 (Cengel & Boles
    8th ed., §9-8, as recalled)."""
    w_t = states.h3 - states.h4
    w_c = states.h2 - states.h1
    return (w_t - w_c) / (states.h3 - states.h2)


def fuel_air_ratio(h2: float, h3: float, h_ref: float, lhv_kj_kg: float, eta_b: float) -> float:
    """f from the combustor energy balance (h2 - h_ref) + f eta_b LHV = (1 + f)(h3 - h_ref), the
    fuel entering at the reference temperature (Cengel & Boles 8th ed., §15-3 steady-flow
    combustion, as recalled)."""
    return (h3 - h2) / (eta_b * lhv_kj_kg - (h3 - h_ref))


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("cengel", "Y. A. Cengel and M. A. Boles, Thermodynamics: An Engineering Approach, 8th ed., "
              "McGraw-Hill, New York, 2015.",
              "Isentropic efficiencies (§7-12), Brayton cycle (§9-8, Examples 9-5 and 9-6), steady-flow "
              "combustion (§15-3); section and equation numbers as recalled."),
    Reference("coolprop", "I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, CoolProp, Ind. Eng. Chem. Res. "
              "53 (6), 2014, pp. 2498-2508 (CoolProp 6.8.0); air: E. W. Lemmon et al., J. Phys. Chem. "
              "Ref. Data 29 (3), 2000, pp. 331-385.",
              "Air enthalpy and entropy as a pseudo-pure fluid."),
    Reference("iso3977", "ISO 3977-2:1997, Gas turbines - Procurement - Part 2: Standard reference "
              "conditions and ratings, ISO, Geneva.",
              "Standard reference conditions 15 °C, 101.325 kPa, 60 % relative humidity; heat rate "
              "definition (as recalled)."),
]

SPEC = CalcSpec(
    kind="gas_turbine",
    discipline="conversion chains",
    title="Simple-cycle gas turbine: work, efficiency, heat rate and exhaust",
    purpose=(
        "Fix the state points of a simple gas-turbine cycle from the pressure ratio, turbine inlet "
        "temperature and component efficiencies, its specific work, thermal and electrical "
        "efficiency, heat rate, air, fuel and exhaust flows at the rated output and the exhaust "
        "temperature for heat recovery, and compare it with the ideal air-standard Brayton cycle."
    ),
    inputs=[
        Input("gas_turbine_electrical_output", range="[0.01, 500]"),
        Input("compressor_inlet_temperature", range="[-50, 55]", default=15.0,
              note="ISO 3977-2 reference 15 °C; link to the site ambient for a site rating"),
        Input("compressor_inlet_pressure", range="[0.5, 1.1]", default=1.01325),
        Input("compressor_pressure_ratio", range="(1, 50]"),
        Input("compressor_isentropic_efficiency", range="[0.6, 1]",
              note="real axial and centrifugal compressors reach about 0.80-0.92"),
        Input("turbine_inlet_temperature", range="(100, 1700]"),
        Input("gas_turbine_isentropic_efficiency", range="[0.6, 1]",
              note="real expanders reach about 0.85-0.93"),
        Input("combustor_pressure_loss", range="[0, 20]", default=0.0),
        Input("combustion_efficiency", range="[0.9, 1]", default=1.0,
              note="gas turbine combustors burn out 0.98-0.999 of the fuel"),
        Input("gas_turbine_fuel_lhv", range="[3, 130]",
              note="from weak syngas (about 4 MJ/kg) to hydrogen (120 MJ/kg)"),
        Input("mechanical_efficiency", range="[0.8, 1]", default=1.0, note="bearings and any gearbox"),
        Input("generator_efficiency", range="[0.7, 1]", default=1.0),
        Input("air_heat_capacity_ratio", range="(1, 1.67]", default=1.4,
              note="cold air standard, room-temperature air (Cengel & Boles 8th ed., Table A-2)"),
    ],
    outputs=[
        Output("compressor_outlet_pressure"),
        Output("turbine_inlet_pressure"),
        Output("compressor_inlet_enthalpy"),
        Output("compressor_isentropic_outlet_enthalpy"),
        Output("compressor_outlet_enthalpy"),
        Output("compressor_outlet_temperature"),
        Output("turbine_inlet_enthalpy"),
        Output("turbine_isentropic_outlet_enthalpy"),
        Output("turbine_outlet_enthalpy"),
        Output("turbine_exhaust_temperature", key=True),
        Output("fuel_air_ratio"),
        Output("compressor_specific_work"),
        Output("expander_specific_work"),
        Output("gas_turbine_net_specific_work", key=True),
        Output("gas_turbine_specific_heat_input"),
        Output("back_work_ratio"),
        Output("gas_turbine_thermal_efficiency", key=True),
        Output("air_standard_brayton_efficiency"),
        Output("gas_turbine_electrical_efficiency", key=True),
        Output("gas_turbine_heat_rate", key=True),
        Output("gas_turbine_air_flow"),
        Output("gas_turbine_fuel_flow"),
        Output("gas_turbine_fuel_input", key=True),
        Output("gas_turbine_exhaust_flow"),
    ],
    steps=[
        Step("compressor_outlet_pressure", r"@compressor_pressure_ratio\,@compressor_inlet_pressure",
             "cengel", "§9-8"),
        Step("turbine_inlet_pressure",
             r"@compressor_outlet_pressure\left(1 - \frac{@combustor_pressure_loss}{100}\right)", "cengel", "§9-8"),
        Step("compressor_inlet_enthalpy", r"h(@compressor_inlet_temperature, @compressor_inlet_pressure)",
             "coolprop", "air"),
        Step("compressor_isentropic_outlet_enthalpy",
             r"h\left(@compressor_outlet_pressure,\ s(@compressor_inlet_temperature, @compressor_inlet_pressure)\right)",
             "coolprop", "isentropic state"),
        Step("compressor_outlet_enthalpy",
             r"@compressor_inlet_enthalpy + \frac{@compressor_isentropic_outlet_enthalpy - "
             r"@compressor_inlet_enthalpy}{@compressor_isentropic_efficiency}", "cengel", "§7-12, eq. 7-61"),
        Step("compressor_outlet_temperature", r"T(@compressor_outlet_pressure, @compressor_outlet_enthalpy)",
             "coolprop", "air"),
        Step("turbine_inlet_enthalpy", r"h(@turbine_inlet_temperature, @turbine_inlet_pressure)", "coolprop",
             "combustion gas taken as air"),
        Step("turbine_isentropic_outlet_enthalpy",
             r"h\left(@compressor_inlet_pressure,\ s(@turbine_inlet_temperature, @turbine_inlet_pressure)\right)",
             "coolprop", "isentropic state"),
        Step("turbine_outlet_enthalpy",
             r"@turbine_inlet_enthalpy - @gas_turbine_isentropic_efficiency\left(@turbine_inlet_enthalpy - "
             r"@turbine_isentropic_outlet_enthalpy\right)", "cengel", "§7-12, eq. 7-60"),
        Step("turbine_exhaust_temperature", r"T(@compressor_inlet_pressure, @turbine_outlet_enthalpy)",
             "coolprop", "air"),
        Step("fuel_air_ratio",
             r"\frac{@turbine_inlet_enthalpy - @compressor_outlet_enthalpy}{@combustion_efficiency\,"
             r"@gas_turbine_fuel_lhv \cdot 10^{3} - \left(@turbine_inlet_enthalpy - h_\mathrm{25\,^{\circ}C}\right)}",
             "cengel", "§15-3, combustor energy balance, fuel at 25 °C"),
        Step("compressor_specific_work", r"@compressor_outlet_enthalpy - @compressor_inlet_enthalpy",
             "cengel", "§9-8"),
        Step("expander_specific_work",
             r"\left(1 + @fuel_air_ratio\right)\left(@turbine_inlet_enthalpy - @turbine_outlet_enthalpy\right)",
             "cengel", "§9-8, fuel mass included"),
        Step("gas_turbine_net_specific_work", r"@expander_specific_work - @compressor_specific_work",
             "cengel", "§9-8"),
        Step("gas_turbine_specific_heat_input", r"@fuel_air_ratio\,@gas_turbine_fuel_lhv \cdot 10^{3}",
             "cengel", "§15-3, on net calorific value"),
        Step("back_work_ratio", r"\frac{@compressor_specific_work}{@expander_specific_work}", "cengel", "§9-8"),
        Step("gas_turbine_thermal_efficiency",
             r"\frac{@gas_turbine_net_specific_work}{@gas_turbine_specific_heat_input}", "cengel", "§9-8"),
        Step("air_standard_brayton_efficiency",
             r"1 - @compressor_pressure_ratio^{-\left(@air_heat_capacity_ratio - 1\right)/@air_heat_capacity_ratio}",
             "cengel", "§9-8, eq. 9-17"),
        Step("gas_turbine_electrical_efficiency",
             r"@mechanical_efficiency\,@generator_efficiency\,@gas_turbine_thermal_efficiency", "cengel",
             "§9-8 with the shaft-train efficiencies"),
        Step("gas_turbine_heat_rate", r"\frac{3600}{@gas_turbine_electrical_efficiency}", "iso3977",
             "heat rate on net calorific value (as recalled)"),
        Step("gas_turbine_air_flow",
             r"\frac{10^{3}\,@gas_turbine_electrical_output}{@mechanical_efficiency\,@generator_efficiency\,"
             r"@gas_turbine_net_specific_work}", "cengel", "§9-8"),
        Step("gas_turbine_fuel_flow", r"3600\,@fuel_air_ratio\,@gas_turbine_air_flow", "cengel", "§15-3"),
        Step("gas_turbine_fuel_input", r"\frac{@gas_turbine_electrical_output}{@gas_turbine_electrical_efficiency}",
             "cengel", "§9-8"),
        Step("gas_turbine_exhaust_flow", r"\left(1 + @fuel_air_ratio\right)@gas_turbine_air_flow", "cengel",
             "mass balance"),
    ],
    checks=[
        Check("below_ideal", "Real-cycle thermal efficiency below the ideal air-standard Brayton efficiency",
              "gas_turbine_thermal_efficiency", "<", "air_standard_brayton_efficiency", "cengel", "§9-8"),
        Check("net_work", "The cycle delivers net work (turbine work exceeds compressor work)",
              "gas_turbine_net_specific_work", ">", 0.0, "cengel", "§9-8"),
    ],
    references=REFERENCES,
    cautions=[
        "Natural gas and other fuels form explosive mixtures with air: purge the gas path before "
        "ignition, keep gas detection and enclosure ventilation as designed.",
        "The exhaust duct and casing are hot enough to burn; the exhaust contains carbon monoxide "
        "and nitrogen oxides.",
        "High-speed rotating machinery: a blade or disc failure releases great energy; keep clear "
        "of the plane of rotation during start-up and overspeed tests.",
        "These figures are a design basis for review, not a manufacturer's rating. Defer to the "
        "local codes and to licensed engineering practice.",
    ],
    figures=[
        FigureSpec("efficiency_vs_ratio", "Efficiency and specific work against pressure ratio",
                   "Thermal efficiency and net specific work of this cycle (same temperatures and "
                   "component efficiencies) and the ideal air-standard efficiency, against the "
                   "compressor pressure ratio."),
        FigureSpec("energy_flow", "Energy flow of the gas-turbine set",
                   "Fuel input on net calorific value to electricity, shaft-train losses and exhaust heat."),
    ],
    tables=[
        TableSpec("state_points", "State points", "Air properties from CoolProp; states 3 and 4 are "
                  "combustion gas taken as air."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


class Cycle(NamedTuple):
    states: BraytonStates
    f: float
    w_c: float
    w_t: float
    w_net: float
    q_in: float
    eta: float


def _cycle(t1: float, p1: float, ratio: float, eta_c: float, t3: float, eta_t: float, loss: float,
           lhv: float, eta_b: float) -> Cycle:
    st = brayton_states(t1, p1, ratio, eta_c, t3, eta_t, loss)
    h_ref = air_h(REFERENCE_TEMPERATURE, p1)
    f = fuel_air_ratio(st.h2, st.h3, h_ref, lhv * 1e3, eta_b)
    w_c = st.h2 - st.h1
    w_t = (1.0 + f) * (st.h3 - st.h4)
    q_in = f * lhv * 1e3
    return Cycle(st, f, w_c, w_t, w_t - w_c, q_in, (w_t - w_c) / q_in if q_in > 0 else 0.0)


def compute(v: Values) -> Result:
    warnings: list[str] = []
    t1, p1, ratio = float(v.compressor_inlet_temperature), float(v.compressor_inlet_pressure), \
        float(v.compressor_pressure_ratio)
    t3 = float(v.turbine_inlet_temperature)
    eta_c, eta_t = float(v.compressor_isentropic_efficiency), float(v.gas_turbine_isentropic_efficiency)
    loss = float(v.combustor_pressure_loss) / 100.0
    lhv, eta_b = float(v.gas_turbine_fuel_lhv), float(v.combustion_efficiency)
    eta_m, eta_g = float(v.mechanical_efficiency), float(v.generator_efficiency)
    p_el = float(v.gas_turbine_electrical_output)

    if ratio * (1.0 - loss) <= 1.0:
        raise InputConflict("combustor_pressure_loss", "after the combustor loss the turbine inlet pressure "
                            "is not above the exhaust pressure; nothing would drive the turbine")
    cyc = _cycle(t1, p1, ratio, eta_c, t3, eta_t, loss, lhv, eta_b)
    st = cyc.states
    if st.t2 >= t3:
        raise InputConflict("turbine_inlet_temperature",
                            f"turbine inlet {t3:g} °C is not above the compressor outlet {st.t2:.0f} °C; "
                            "the combustor would add no heat")
    if cyc.w_net <= 0.0:
        raise InputConflict("compressor_pressure_ratio",
                            f"the cycle delivers no net work (w_net = {cyc.w_net:.1f} kJ/kg): the compressor "
                            "takes all the turbine work; raise the turbine inlet temperature or efficiencies")
    if cyc.f > 0.06:
        warnings.append(f"fuel-air ratio {cyc.f:.4f} exceeds 0.06, near stoichiometric for natural gas: "
                        "the turbine inlet temperature is beyond what lean combustion gives")
    eta_ideal = air_standard_efficiency(ratio, float(v.air_heat_capacity_ratio))
    eta_el = eta_m * eta_g * cyc.eta
    m_air = 1e3 * p_el / (eta_m * eta_g * cyc.w_net)
    fuel_mw = p_el / eta_el
    outputs: dict[str, float | str] = {
        "compressor_outlet_pressure": st.p2,
        "turbine_inlet_pressure": st.p3,
        "compressor_inlet_enthalpy": st.h1,
        "compressor_isentropic_outlet_enthalpy": st.h2s,
        "compressor_outlet_enthalpy": st.h2,
        "compressor_outlet_temperature": st.t2,
        "turbine_inlet_enthalpy": st.h3,
        "turbine_isentropic_outlet_enthalpy": st.h4s,
        "turbine_outlet_enthalpy": st.h4,
        "turbine_exhaust_temperature": st.t4,
        "fuel_air_ratio": cyc.f,
        "compressor_specific_work": cyc.w_c,
        "expander_specific_work": cyc.w_t,
        "gas_turbine_net_specific_work": cyc.w_net,
        "gas_turbine_specific_heat_input": cyc.q_in,
        "back_work_ratio": cyc.w_c / cyc.w_t,
        "gas_turbine_thermal_efficiency": cyc.eta,
        "air_standard_brayton_efficiency": eta_ideal,
        "gas_turbine_electrical_efficiency": eta_el,
        "gas_turbine_heat_rate": 3600.0 / eta_el,
        "gas_turbine_air_flow": m_air,
        "gas_turbine_fuel_flow": 3600.0 * cyc.f * m_air,
        "gas_turbine_fuel_input": fuel_mw,
        "gas_turbine_exhaust_flow": (1.0 + cyc.f) * m_air,
    }

    # efficiency against pressure ratio, same temperatures and component efficiencies
    hi = max(2.0 * ratio, 30.0)
    ratios = [1.5 + (hi - 1.5) * k / 39 for k in range(40)]
    eff, work, ideal, rs = [], [], [], []
    for r in ratios:
        c = _cycle(t1, p1, r, eta_c, t3, eta_t, loss, lhv, eta_b)
        if c.w_net <= 0.0 or c.states.t2 >= t3:
            continue
        rs.append(r)
        eff.append(100.0 * c.eta)
        work.append(c.w_net / 10.0)
        ideal.append(100.0 * air_standard_efficiency(r, float(v.air_heat_capacity_ratio)))
    chart = Chart(
        x_range=(1.0, hi),
        x_label="Compressor pressure ratio",
        y_label="Efficiency (%); net specific work (kJ/kg ÷ 10)",
        series=[Series("Thermal efficiency of this cycle", rs, eff),
                Series("Net specific work ÷ 10", rs, work, style="dashed"),
                Series("Ideal air-standard Brayton efficiency", rs, ideal, style="dotted")],
        markers=[Marker("Design point", ratio, 100.0 * cyc.eta)],
    )
    shaft = p_el / (eta_m * eta_g)
    flow = EnergyFlow(
        unit="MW",
        inflows=[("Fuel (net calorific value)", fuel_mw)],
        outflows=[
            ("Electricity", p_el, "product"),
            *([("Mechanical and generator losses", shaft - p_el, "loss")] if shaft > p_el else []),
            ("Exhaust and combustion losses", fuel_mw - shaft, "loss"),
        ],
    )
    table = Table(
        columns=[("State", ""), ("Location", ""), ("p", "bar"), ("T", "degC"), ("h", "kJ/kg")],
        rows=[
            ["1", "compressor inlet", p1, t1, st.h1],
            ["2s", "compressor outlet, isentropic", st.p2, air_t_ph(st.p2, st.h2s), st.h2s],
            ["2", "compressor outlet", st.p2, st.t2, st.h2],
            ["3", "turbine inlet", st.p3, t3, st.h3],
            ["4s", "turbine exhaust, isentropic", p1, air_t_ph(p1, st.h4s), st.h4s],
            ["4", "turbine exhaust", p1, st.t4, st.h4],
        ],
    )
    return Result(outputs=outputs, charts={"efficiency_vs_ratio": chart, "energy_flow": flow},
                  tables={"state_points": table}, warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers
# ---------------------------------------------------------------------------

_EX95 = ("Cengel & Boles, Thermodynamics 8th ed., Example 9-5 (from memory): ideal Brayton, r = 8, "
         "T1 = 300 K, T3 = 1300 K, air tables")
_EX96 = ("Cengel & Boles, Thermodynamics 8th ed., Example 9-6 (from memory): Example 9-5 with "
         "eta_C = 0.80, eta_T = 0.85")


def _ex(eta_c: float = 1.0, eta_t: float = 1.0) -> BraytonStates:
    return brayton_states(300.0 - KELVIN, 1.0, 8.0, eta_c, 1300.0 - KELVIN, eta_t)


PUBLISHED_CASES = [
    PublishedCase("ideal Brayton, compressor exit temperature", _EX95, 540.0, "K", 2.0,
                  "the book prints 3 digits from air tables", lambda: _ex().t2 + KELVIN),
    PublishedCase("ideal Brayton, turbine exit temperature", _EX95, 770.0, "K", 2.0,
                  "the book prints 3 digits from air tables", lambda: _ex().t4 + KELVIN),
    PublishedCase("ideal Brayton, thermal efficiency", _EX95, 0.426, "", 0.002,
                  "the book prints 3 digits", lambda: air_standard_cycle_efficiency(_ex())),
    PublishedCase("real Brayton, thermal efficiency", _EX96, 0.266, "", 0.002, "the book prints 3 digits",
                  lambda: air_standard_cycle_efficiency(_ex(0.80, 0.85))),
    PublishedCase("cold air-standard Brayton efficiency at r = 8",
                  "1 - r^(-(k-1)/k), k = 1.4 (Cengel & Boles 8th ed., eq. 9-17, from memory): 0.448",
                  0.448, "", 0.0005, "3 digits", lambda: air_standard_efficiency(8.0)),
]
