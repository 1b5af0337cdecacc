"""Regenerative steam cycle: state points, flows and efficiencies from fuel to net export.

Cycle, points numbered as on the page:

    1 condenser outlet (saturated liquid) -> condensate pump -> 2 (deaerator pressure)
    3 deaerator outlet (saturated liquid) -> feed pump -> 4 (boiler inlet pressure)
    4 -> closed feed-water heater -> 5 -> boiler and superheater -> 6 live steam
    6 -> HP section -> 7 heater extraction -> IP section -> 8 deaerator extraction
      -> LP section -> 9 exhaust -> condenser -> 1
    10 heater drain (saturated, or drain-cooled), throttled and cascaded to the deaerator.

Water and steam properties are IAPWS-IF97 through CoolProp's "IF97::Water" backend: IF97 is
the industrial formulation that turbine guarantees and acceptance tests are written in, and the
backend is 20-50 times faster than the IAPWS-95 one for the (p, s) and (p, h) flashes a cycle
needs.  CoolProp is imported inside functions only (a module import stays cheap).
Everything here runs in bar, degC, kJ/kg and kJ/(kg K); the CoolProp wrappers convert to SI.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
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

FLUID = "IF97::Water"
CRITICAL_PRESSURE = 220.64  # bar, IAPWS-IF97 (R7-97) eq. for region 4 ends at the critical point
CRITICAL_TEMPERATURE = 373.946  # degC (647.096 K), IAPWS-IF97
KELVIN = 273.15
# Latent heat of water at 25 degC per % moisture, MJ/kg: ISO 18125:2017 (2.443 MJ/kg / 100)
EVAPORATION_PER_PERCENT = 0.02443
# bar: saturation at about 7 °C; no condenser is designed colder (a given pressure below it is an
# input error)
MINIMUM_CONDENSER_PRESSURE = 0.01
# bar: triple point of water, where IAPWS-IF97 region 4 begins; the sensitivity sweep stays above it
TRIPLE_POINT_PRESSURE = 0.00611657
# MJ/kg as received: below about this no solid fuel sustains combustion without support fuel
# (common practice, no source; wet bark at 60 % moisture still gives about 6 MJ/kg)
MINIMUM_FUEL_LHV = 2.0

# ---------------------------------------------------------------------------
# Water and steam properties (IAPWS-IF97 via CoolProp), in bar / degC / kJ
# ---------------------------------------------------------------------------


def _props(output: str, name1: str, value1: float, name2: str, value2: float) -> float:
    from CoolProp.CoolProp import PropsSI  # lazy: the import costs ~0.3 s

    return PropsSI(output, name1, value1, name2, value2, FLUID)


class State(NamedTuple):
    """A state point: pressure bar, temperature degC, h kJ/kg, s kJ/(kg K), quality
    (vapour mass fraction; NaN for a single-phase state)."""

    pressure: float
    temperature: float
    enthalpy: float
    entropy: float
    quality: float


def _state_from(p_bar: float, name: str, value: float) -> State:
    p = p_bar * 1e5
    t = _props("T", "P", p, name, value) - KELVIN
    h = _props("H", "P", p, name, value) / 1e3 if name != "H" else value / 1e3
    s = _props("S", "P", p, name, value) / 1e3 if name != "S" else value / 1e3
    return State(p_bar, t, h, s, quality(p_bar, h))


def state_pt(p_bar: float, t_c: float) -> State:
    """State from pressure and temperature (single-phase regions of IAPWS-IF97)."""
    return _state_from(p_bar, "T", t_c + KELVIN)


def state_ph(p_bar: float, h: float) -> State:
    return _state_from(p_bar, "H", h * 1e3)


def state_ps(p_bar: float, s: float) -> State:
    return _state_from(p_bar, "S", s * 1e3)


def saturated_liquid(p_bar: float) -> State:
    p = p_bar * 1e5
    return State(p_bar, _props("T", "P", p, "Q", 0.0) - KELVIN, _props("H", "P", p, "Q", 0.0) / 1e3,
                 _props("S", "P", p, "Q", 0.0) / 1e3, 0.0)


def saturation_temperature(p_bar: float) -> float:
    """T_sat(p) in degC, IAPWS-IF97 region 4."""
    return _props("T", "P", p_bar * 1e5, "Q", 0.0) - KELVIN


def saturation_pressure(t_c: float) -> float:
    """p_sat(T) in bar, IAPWS-IF97 region 4."""
    return _props("P", "T", t_c + KELVIN, "Q", 0.0) / 1e5


def quality(p_bar: float, h: float) -> float:
    """Vapour mass fraction x = (h - h_f)/(h_g - h_f) inside the dome, NaN outside."""
    if p_bar >= CRITICAL_PRESSURE:
        return math.nan
    h_f = _props("H", "P", p_bar * 1e5, "Q", 0.0) / 1e3
    h_g = _props("H", "P", p_bar * 1e5, "Q", 1.0) / 1e3
    if h_f <= h <= h_g:
        return (h - h_f) / (h_g - h_f)
    return math.nan


def phase_name(state: State) -> str:
    if state.pressure >= CRITICAL_PRESSURE:
        return "supercritical"
    if math.isfinite(state.quality):
        if state.quality <= 1e-9:
            return "saturated liquid"
        if state.quality >= 1.0 - 1e-9:
            return "saturated vapour"
        return "wet steam"
    t_sat = saturation_temperature(state.pressure)
    return "subcooled liquid" if state.temperature < t_sat else "superheated vapour"


def water_cp(t_c: float, p_bar: float = 2.0) -> float:
    """Isobaric specific heat of liquid water in kJ/(kg K), IAPWS-IF97 region 1."""
    return _props("C", "P", p_bar * 1e5, "T", t_c + KELVIN) / 1e3


# ---------------------------------------------------------------------------
# Published models, one function each
# ---------------------------------------------------------------------------


def turbine_expansion(inlet: State, p_out: float, efficiency: float) -> State:
    """h_out = h_in - eta_s (h_in - h_s(p_out, s_in)).  Isentropic efficiency of a turbine,
    Cengel & Boles 8th ed., Sec. 7-12, eq. (7-61) as recalled."""
    h_s = state_ps(p_out, inlet.entropy).enthalpy
    return state_ph(p_out, inlet.enthalpy - efficiency * (inlet.enthalpy - h_s))


def pump_compression(inlet: State, p_out: float, efficiency: float) -> State:
    """h_out = h_in + (h_s(p_out, s_in) - h_in) / eta_s.  Isentropic efficiency of a pump,
    Cengel & Boles 8th ed., Sec. 7-12, eq. (7-62) as recalled."""
    h_s = state_ps(p_out, inlet.entropy).enthalpy
    return state_ph(p_out, inlet.enthalpy + (h_s - inlet.enthalpy) / efficiency)


def as_received_lhv(lhv_dry: float, moisture_percent: float) -> float:
    """q_net,ar = q_net,d (1 - M_ar/100) - 0.02443 M_ar in MJ/kg.

    ISO 18125:2017 (solid biofuels, determination of calorific value), as-received net
    calorific value at constant pressure from the dry-basis value; 0.02443 MJ/kg per
    percent of moisture is the enthalpy of vaporisation of water at 25 degC
    (2.443 MJ/kg).  Clause as recalled (calculation of the net calorific value).
    """
    return lhv_dry * (1.0 - moisture_percent / 100.0) - EVAPORATION_PER_PERCENT * moisture_percent


def carnot_efficiency(t_hot_c: float, t_cold_c: float) -> float:
    """eta_C = 1 - T_L/T_H on absolute temperatures, Cengel & Boles 8th ed., Sec. 6-10,
    eq. (6-18) as recalled."""
    return 1.0 - (t_cold_c + KELVIN) / (t_hot_c + KELVIN)


@dataclass(frozen=True)
class CycleDesign:
    """What fixes the cycle; pressures bar, temperatures degC, differences K.

    deaerator_pressure None: no deaerator (condensate pumped straight to the boiler).
    heater_pressure None: no closed heater (it needs a deaerator to drain to).
    drain_cooler_approach None: no drain cooler, the drain leaves saturated.
    A turbine section whose extraction is absent merges with the next one and takes
    the efficiency of the section ending at the next extraction present.
    """

    live_pressure: float
    live_temperature: float
    condenser_pressure: float
    boiler_pressure_drop: float = 0.0
    deaerator_pressure: float | None = None
    heater_pressure: float | None = None
    heater_ttd: float = 0.0
    drain_cooler_approach: float | None = None
    hp_efficiency: float = 1.0
    ip_efficiency: float = 1.0
    lp_efficiency: float = 1.0
    pump_efficiency: float = 1.0


@dataclass
class Cycle:
    """Solved cycle, per kg of live steam."""

    design: CycleDesign
    states: dict[int, State]
    heater_fraction: float
    deaerator_fraction: float
    turbine_work: float
    pump_work: float
    heat_added: float
    heat_rejected: float
    extra: dict[str, float] = field(default_factory=dict)

    @property
    def condenser_fraction(self) -> float:
        return 1.0 - self.heater_fraction - self.deaerator_fraction

    @property
    def net_work(self) -> float:
        return self.turbine_work - self.pump_work

    @property
    def thermal_efficiency(self) -> float:
        return self.net_work / self.heat_added

    @property
    def balance_residual(self) -> float:
        """|q_in + w_P - w_T - q_out| / (q_in + w_P): steady-flow energy balance of the
        whole working fluid (Cengel & Boles 8th ed., Sec. 5-4), a check that the heater
        balances were solved right."""
        inflow = self.heat_added + self.pump_work
        return abs(inflow - self.turbine_work - self.heat_rejected) / inflow


def solve_cycle(d: CycleDesign) -> Cycle:
    """State points, extraction fractions, works and heats of the regenerative cycle.

    Closed heater balance y7 (h7 - h10) = h5 - h4 and deaerator (open heater) balance
    y8 h8 + y7 h10 + (1 - y7 - y8) h2 = h3: Cengel & Boles 8th ed., Sec. 10-6
    (regenerative Rankine cycle, open and closed feed-water heaters; as recalled).
    Raises InputConflict, named after the project input at fault, where the cycle
    cannot exist.
    """
    if d.heater_pressure is not None and d.deaerator_pressure is None:
        raise ValueError("a closed heater needs a deaerator to cascade its drain to")
    p4 = d.live_pressure + d.boiler_pressure_drop
    t_sat6 = saturation_temperature(d.live_pressure)
    if d.live_temperature <= t_sat6:
        raise InputConflict("live_steam_temperature",
                            f"live steam at {d.live_pressure:g} bar and {d.live_temperature:g} °C is not "
                            f"superheated: saturation is {t_sat6:.1f} °C; give a temperature above it")
    st: dict[int, State] = {}
    st[1] = saturated_liquid(d.condenser_pressure)
    if d.deaerator_pressure is not None:
        st[2] = pump_compression(st[1], d.deaerator_pressure, d.pump_efficiency)
        st[3] = saturated_liquid(d.deaerator_pressure)
        st[4] = pump_compression(st[3], p4, d.pump_efficiency)
    else:
        st[4] = pump_compression(st[1], p4, d.pump_efficiency)
    st[6] = state_pt(d.live_pressure, d.live_temperature)

    # turbine sections in flow order: (point, pressure, efficiency)
    sections = []
    if d.heater_pressure is not None:
        sections.append((7, d.heater_pressure, d.hp_efficiency))
    if d.deaerator_pressure is not None:
        sections.append((8, d.deaerator_pressure,
                         d.ip_efficiency if d.heater_pressure is not None else d.hp_efficiency))
    sections.append((9, d.condenser_pressure, d.lp_efficiency))
    inlet = st[6]
    for point, p, eta in sections:
        st[point] = turbine_expansion(inlet, p, eta)
        inlet = st[point]

    extra: dict[str, float] = {"feed_pump_discharge_pressure": p4, "live_steam_saturation_temperature": t_sat6}
    y7 = 0.0
    if d.heater_pressure is not None:
        t_sat7 = saturation_temperature(d.heater_pressure)
        t5 = t_sat7 - d.heater_ttd
        if t5 <= st[4].temperature:
            raise InputConflict("heater_terminal_difference",
                                f"the closed heater would not heat: shell saturation {t_sat7:.1f} °C less "
                                f"TTD {d.heater_ttd:g} K leaves {t5:.1f} °C, not above the feed-water inlet "
                                f"{st[4].temperature:.1f} °C; raise the extraction pressure or lower the TTD")
        st[5] = state_pt(p4, t5)
        if d.drain_cooler_approach is None:
            st[10] = saturated_liquid(d.heater_pressure)
        else:
            t10 = st[4].temperature + d.drain_cooler_approach
            if t10 >= t_sat7:
                raise InputConflict("drain_cooler_approach",
                                    f"feed-water inlet {st[4].temperature:.1f} °C plus approach "
                                    f"{d.drain_cooler_approach:g} K is not below the shell saturation "
                                    f"{t_sat7:.1f} °C: the drain cooler cannot cool the drain")
            st[10] = state_pt(d.heater_pressure, t10)
        y7 = (st[5].enthalpy - st[4].enthalpy) / (st[7].enthalpy - st[10].enthalpy)
        extra["heater_saturation_temperature"] = t_sat7
    else:
        st[5] = st[4]
    y8 = 0.0
    if d.deaerator_pressure is not None:
        drain = st[10].enthalpy if d.heater_pressure is not None else 0.0
        y8 = ((st[3].enthalpy - st[2].enthalpy) - y7 * (drain - st[2].enthalpy)) / \
             (st[8].enthalpy - st[2].enthalpy)
        if y8 < 0.0:
            raise InputConflict("deaerator_pressure",
                                f"the heater drain alone overheats the deaerator (steam balance "
                                f"y8 = {y8:.4f} < 0); raise the deaerator pressure or lower the heater's")
    y9 = 1.0 - y7 - y8

    # work of each section times the steam fraction still flowing through it
    w_t = 0.0
    flow = 1.0
    inlet = st[6]
    for point, _p, _eta in sections:
        w_t += flow * (inlet.enthalpy - st[point].enthalpy)
        flow -= {7: y7, 8: y8, 9: 0.0}[point]
        inlet = st[point]
    if d.deaerator_pressure is not None:
        w_p = y9 * (st[2].enthalpy - st[1].enthalpy) + (st[4].enthalpy - st[3].enthalpy)
    else:
        w_p = st[4].enthalpy - st[1].enthalpy
    q_in = st[6].enthalpy - st[5].enthalpy
    q_out = y9 * (st[9].enthalpy - st[1].enthalpy)
    return Cycle(d, st, y7, y8, w_t, w_p, q_in, q_out, extra)


class PlantChain(NamedTuple):
    """From cycle to fuel at the rated gross output; flows t/h, powers MW."""

    steam_flow: float
    shaft_power: float
    mechanical_loss: float
    generator_loss: float
    pump_power: float
    boiler_duty: float
    fuel_heat: float
    boiler_loss: float
    gross_efficiency: float
    net_output: float
    net_efficiency: float
    fuel_flow: float
    condenser_heat: float


def plant_chain(cycle: Cycle, gross_output: float, eta_m: float, eta_g: float, eta_b: float,
                aux_load: float, fuel_lhv: float) -> PlantChain:
    """Energy chain from fuel to net export.  Overall efficiency as the product of boiler,
    cycle and generator efficiencies: Cengel & Boles 8th ed., Sec. 2-7 (energy conversion
    efficiencies; as recalled).  The pumps are motor driven: their power is part of the
    auxiliary load, so the generator carries the turbine work w_T, not w_net."""
    m = 3600.0 * gross_output / (cycle.turbine_work * eta_m * eta_g)  # t/h: MW/(kJ/kg) = 1000 kg/s
    shaft = m * cycle.turbine_work / 3600.0
    duty = m * cycle.heat_added / 3600.0
    fuel_heat = duty / eta_b
    net = gross_output - aux_load
    return PlantChain(
        steam_flow=m, shaft_power=shaft, mechanical_loss=shaft * (1.0 - eta_m),
        generator_loss=shaft * eta_m * (1.0 - eta_g), pump_power=m * cycle.pump_work / 3600.0,
        boiler_duty=duty, fuel_heat=fuel_heat, boiler_loss=fuel_heat - duty,
        gross_efficiency=gross_output / fuel_heat, net_output=net, net_efficiency=net / fuel_heat,
        fuel_flow=3.6 * fuel_heat / fuel_lhv, condenser_heat=m * cycle.heat_rejected / 3600.0)


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iapws_if97", "IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation "
              "1997 for the Thermodynamic Properties of Water and Steam, International Association "
              "for the Properties of Water and Steam, 2007 (revised 2012).",
              "Regions 1 and 2 (liquid, vapour), region 4 (saturation line); evaluated through "
              "CoolProp's IF97 backend."),
    Reference("coolprop", "I. H. Bell, J. Wronski, S. Quoilin and V. Lemort, Pure and pseudo-pure "
              "fluid thermophysical property evaluation and the open-source thermophysical property "
              "library CoolProp, Ind. Eng. Chem. Res. 53 (6), 2014, pp. 2498-2508 (CoolProp 6.8.0).",
              "Property library; fluid string 'IF97::Water'."),
    Reference("cengel", "Y. A. Çengel and M. A. Boles, Thermodynamics: An Engineering Approach, "
              "8th ed., McGraw-Hill Education, New York, 2015.",
              "Sec. 2-7 conversion efficiencies, Sec. 5-4 steady-flow energy balance, Sec. 6-10 "
              "Carnot efficiency, Sec. 7-12 isentropic efficiencies, ch. 10 Rankine and "
              "regenerative cycles; section and equation numbers as recalled."),
    Reference("iso18125", "ISO 18125:2017, Solid biofuels - Determination of calorific value, "
              "International Organization for Standardization, Geneva.",
              "Net calorific value as received from the dry-basis value and the moisture "
              "(constant pressure); clause as recalled, check the issued text."),
    Reference("practice", "Common engineering practice, no published source: screening limits "
              "chosen in basisbook 0.1.0 (this module).",
              "Exhaust wetness, superheat margin, condenser terminal difference, typical "
              "generator efficiency; the project may override them; confirm with the suppliers."),
]

_BOILER_PATH_POINTS = 24
_SWEEP_POINTS = 7

SPEC = CalcSpec(
    kind="steam_cycle",
    discipline="conversion chains",
    title="Steam cycle efficiency chain: state points, flows and efficiencies",
    purpose=(
        "Fix the energy chain of the biomass steam unit from fuel to net export: every state "
        "point of a regenerative cycle with one closed feed-water heater and a deaerator, the "
        "extraction fractions, the cycle efficiency, the steam, fuel and cooling-water flows "
        "for the rated generator output, and the gross and net electrical efficiencies."
    ),
    inputs=[
        Input("gross_electrical_output", range="[0.1, 500]",
              note="the generator's rated active power where linked"),
        Input("live_steam_pressure", range="[1, 220]", note="subcritical cycles only"),
        Input("live_steam_temperature", range="(0, 800]", note="IAPWS-IF97 region 2 ends at 800 °C"),
        Input("boiler_pressure_drop", range="[0, 50]"),
        Input("heater_extraction_pressure", range="(0, 220)",
              note="extraction line pressure loss neglected: shell pressure = extraction pressure"),
        Input("deaerator_pressure", range="(0, 50]"),
        Input("condenser_pressure_basis", default="given", choices=("given", "cooling_water")),
        Input("condenser_pressure", range="[0, 5]", default=0.0,
              note="needed when the basis is 'given'; 0 = not given"),
        Input("cooling_water_inlet_temperature", range="[0, 60]"),
        Input("cooling_water_rise", range="[2, 30]", note="condensers are designed for about 5-12 K"),
        Input("condenser_design_terminal_difference", range="[1, 30]", default=5.0,
              note="used when the basis is 'cooling_water'; common practice 3-6 K"),
        Input("condenser_minimum_terminal_difference", range="[0, 30]", default=3.0,
              note="common practice, no source"),
        Input("hp_section_efficiency", range="[0.5, 1]", note="real sections reach about 0.75-0.92"),
        Input("ip_section_efficiency", range="[0.5, 1]"),
        Input("lp_section_efficiency", range="[0.5, 1]"),
        Input("pump_efficiency", range="[0.3, 1]", note="feed pumps reach about 0.6-0.85"),
        Input("heater_terminal_difference", range="[-5, 30]",
              note="a negative value needs a desuperheating zone, which this model does not have"),
        Input("drain_cooler", default="none", choices=("none", "fitted")),
        Input("drain_cooler_approach", range="(0, 30]", default=5.6,
              note="used when a drain cooler is fitted; common practice about 5.6 K (10 °F)"),
        Input("mechanical_efficiency", range="[0.9, 1]", note="bearings and any gearbox: 0.97-0.995"),
        Input("generator_efficiency", range="[0.7, 1]", default=0.975,
              note="common practice for a 10-20 MVA air-cooled generator, no source; the generator "
                   "calc gives no efficiency yet"),
        Input("boiler_efficiency", range="[0.3, 1]",
              note="net calorific value basis; real biomass boilers reach about 0.80-0.92"),
        Input("auxiliary_load", range="[0, 100]",
              note="an input until the auxiliary-load calc exists"),
        Input("fuel_basis", default="dry_and_moisture", choices=("dry_and_moisture", "as_received")),
        Input("fuel_lhv_dry", range="[0, 40]", default=0.0,
              note="needed when the fuel basis is 'dry_and_moisture'"),
        Input("fuel_moisture", range="[0, 80)", default=0.0, note="wet basis, as received"),
        Input("fuel_lhv_as_received", range="[0, 60]", default=0.0,
              note="needed when the fuel basis is 'as_received'"),
        Input("exhaust_quality_limit", range="(0, 1]", default=0.88, note="common practice, no source"),
        Input("superheat_margin_minimum", range="[0, 300]", default=50.0, note="common practice, no source"),
    ],
    outputs=[
        Output("feed_pump_discharge_pressure"),
        Output("condenser_operating_pressure", key=True),
        Output("condenser_saturation_temperature"),
        Output("cooling_water_outlet_temperature"),
        Output("condenser_terminal_difference"),
        Output("live_steam_saturation_temperature"),
        Output("live_steam_superheat"),
        Output("condenser_outlet_enthalpy"),
        Output("condenser_outlet_entropy"),
        Output("condensate_pump_outlet_enthalpy"),
        Output("deaerator_outlet_enthalpy"),
        Output("deaerator_outlet_entropy"),
        Output("feed_pump_outlet_enthalpy"),
        Output("feed_pump_outlet_temperature"),
        Output("heater_saturation_temperature"),
        Output("heater_outlet_temperature"),
        Output("heater_outlet_enthalpy"),
        Output("heater_shell_to_feedwater_difference"),
        Output("live_steam_enthalpy"),
        Output("live_steam_entropy"),
        Output("heater_extraction_enthalpy"),
        Output("heater_extraction_entropy"),
        Output("deaerator_extraction_enthalpy"),
        Output("deaerator_extraction_entropy"),
        Output("turbine_exhaust_enthalpy"),
        Output("turbine_exhaust_quality", key=True),
        Output("heater_drain_temperature"),
        Output("heater_drain_enthalpy"),
        Output("heater_extraction_fraction"),
        Output("deaerator_extraction_fraction"),
        Output("condenser_steam_fraction"),
        Output("turbine_specific_work"),
        Output("pump_specific_work"),
        Output("net_specific_work"),
        Output("specific_heat_added"),
        Output("specific_heat_rejected"),
        Output("cycle_thermal_efficiency", key=True),
        Output("carnot_efficiency"),
        Output("energy_balance_residual"),
        Output("live_steam_flow", key=True),
        Output("turbine_shaft_power"),
        Output("mechanical_loss"),
        Output("generator_loss"),
        Output("cycle_pump_power"),
        Output("boiler_heat_duty"),
        Output("fuel_lhv", key=True),
        Output("fuel_heat_input", key=True),
        Output("boiler_loss"),
        Output("gross_electrical_efficiency", key=True),
        Output("net_electrical_output", key=True),
        Output("net_electrical_efficiency", key=True),
        Output("fuel_mass_flow", key=True),
        Output("condenser_heat_rejection", key=True),
        Output("cooling_water_specific_heat"),
        Output("cooling_water_flow", key=True),
    ],
    steps=[
        Step("feed_pump_discharge_pressure", r"@live_steam_pressure + @boiler_pressure_drop",
             "cengel", "ch. 10 (pressure losses in the boiler and piping)"),
        Step("cooling_water_outlet_temperature", r"@cooling_water_inlet_temperature + @cooling_water_rise",
             "cengel", "Sec. 5-4 (heat exchanger stream)"),
        Step("condenser_operating_pressure",
             r"\begin{cases} {@condenser_pressure} & \text{given} \\ "
             r"p_\mathrm{sat}\left(@cooling_water_outlet_temperature + @condenser_design_terminal_difference\right)"
             r" & \text{from cooling water} \end{cases}",
             "iapws_if97", "region 4, saturation pressure"),
        Step("condenser_saturation_temperature", r"T_\mathrm{sat}\left(@condenser_operating_pressure\right)",
             "iapws_if97", "region 4, saturation temperature"),
        Step("condenser_terminal_difference",
             r"@condenser_saturation_temperature - @cooling_water_outlet_temperature",
             "practice", "terminal temperature difference of a surface condenser"),
        Step("live_steam_saturation_temperature", r"T_\mathrm{sat}\left(@live_steam_pressure\right)",
             "iapws_if97", "region 4"),
        Step("live_steam_superheat", r"@live_steam_temperature - @live_steam_saturation_temperature",
             "iapws_if97", "region 4"),
        Step("condenser_outlet_enthalpy", r"h_\mathrm{f}\left(@condenser_operating_pressure\right)",
             "iapws_if97", "region 4 / region 1, saturated liquid"),
        Step("condenser_outlet_entropy", r"s_\mathrm{f}\left(@condenser_operating_pressure\right)",
             "iapws_if97", "region 4 / region 1, saturated liquid"),
        Step("condensate_pump_outlet_enthalpy",
             r"@condenser_outlet_enthalpy + \frac{h\left(@deaerator_pressure,\,@condenser_outlet_entropy\right)"
             r" - @condenser_outlet_enthalpy}{@pump_efficiency}",
             "cengel", "Sec. 7-12, eq. (7-62) as recalled (pump isentropic efficiency)"),
        Step("deaerator_outlet_enthalpy", r"h_\mathrm{f}\left(@deaerator_pressure\right)",
             "iapws_if97", "region 4, saturated liquid (deaerator outlet)"),
        Step("deaerator_outlet_entropy", r"s_\mathrm{f}\left(@deaerator_pressure\right)",
             "iapws_if97", "region 4, saturated liquid"),
        Step("feed_pump_outlet_enthalpy",
             r"@deaerator_outlet_enthalpy + \frac{h\left(@feed_pump_discharge_pressure,\,"
             r"@deaerator_outlet_entropy\right) - @deaerator_outlet_enthalpy}{@pump_efficiency}",
             "cengel", "Sec. 7-12, eq. (7-62) as recalled"),
        Step("feed_pump_outlet_temperature",
             r"T\left(@feed_pump_discharge_pressure,\,@feed_pump_outlet_enthalpy\right)",
             "coolprop", "IF97 backend: IAPWS-IF97 region 1 backward equation T(p, h)"),
        Step("heater_saturation_temperature", r"T_\mathrm{sat}\left(@heater_extraction_pressure\right)",
             "iapws_if97", "region 4"),
        Step("heater_outlet_temperature", r"@heater_saturation_temperature - @heater_terminal_difference",
             "cengel", "Sec. 10-6 (closed feed-water heater, terminal temperature difference)"),
        Step("heater_outlet_enthalpy",
             r"h\left(@feed_pump_discharge_pressure,\,@heater_outlet_temperature\right)",
             "iapws_if97", "region 1"),
        Step("heater_shell_to_feedwater_difference",
             r"@heater_saturation_temperature - @heater_outlet_temperature", "cengel", "Sec. 10-6"),
        Step("live_steam_enthalpy", r"h\left(@live_steam_pressure,\,@live_steam_temperature\right)",
             "iapws_if97", "region 2"),
        Step("live_steam_entropy", r"s\left(@live_steam_pressure,\,@live_steam_temperature\right)",
             "iapws_if97", "region 2"),
        Step("heater_extraction_enthalpy",
             r"@live_steam_enthalpy - @hp_section_efficiency\left(@live_steam_enthalpy - "
             r"h\left(@heater_extraction_pressure,\,@live_steam_entropy\right)\right)",
             "cengel", "Sec. 7-12, eq. (7-61) as recalled (turbine isentropic efficiency)"),
        Step("heater_extraction_entropy",
             r"s\left(@heater_extraction_pressure,\,@heater_extraction_enthalpy\right)",
             "coolprop", "IF97 backend: IAPWS-IF97 region 2 / 4 (p, h) flash"),
        Step("deaerator_extraction_enthalpy",
             r"@heater_extraction_enthalpy - @ip_section_efficiency\left(@heater_extraction_enthalpy - "
             r"h\left(@deaerator_pressure,\,@heater_extraction_entropy\right)\right)",
             "cengel", "Sec. 7-12, eq. (7-61) as recalled"),
        Step("deaerator_extraction_entropy",
             r"s\left(@deaerator_pressure,\,@deaerator_extraction_enthalpy\right)",
             "coolprop", "IF97 backend: IAPWS-IF97 region 2 / 4 (p, h) flash"),
        Step("turbine_exhaust_enthalpy",
             r"@deaerator_extraction_enthalpy - @lp_section_efficiency\left(@deaerator_extraction_enthalpy - "
             r"h\left(@condenser_operating_pressure,\,@deaerator_extraction_entropy\right)\right)",
             "cengel", "Sec. 7-12, eq. (7-61) as recalled"),
        Step("turbine_exhaust_quality",
             r"\min\left(1,\;\frac{@turbine_exhaust_enthalpy - @condenser_outlet_enthalpy}"
             r"{h_\mathrm{g}\left(@condenser_operating_pressure\right) - @condenser_outlet_enthalpy}\right)",
             "cengel", "ch. 3, quality of a saturated mixture (1 for dry or superheated exhaust)"),
        Step("heater_drain_temperature",
             r"\begin{cases} {@heater_saturation_temperature} & \text{no drain cooler} \\ "
             r"@feed_pump_outlet_temperature + @drain_cooler_approach & \text{drain cooler} \end{cases}",
             "cengel", "Sec. 10-6 (closed heater drain)"),
        Step("heater_drain_enthalpy",
             r"h\left(@heater_extraction_pressure,\,@heater_drain_temperature\right)",
             "iapws_if97", "region 1 / 4 (saturated liquid without drain cooler)"),
        Step("heater_extraction_fraction",
             r"\frac{@heater_outlet_enthalpy - @feed_pump_outlet_enthalpy}"
             r"{@heater_extraction_enthalpy - @heater_drain_enthalpy}",
             "cengel", "Sec. 10-6, energy balance of the closed feed-water heater"),
        Step("deaerator_extraction_fraction",
             r"\frac{\left(@deaerator_outlet_enthalpy - @condensate_pump_outlet_enthalpy\right) - "
             r"@heater_extraction_fraction\left(@heater_drain_enthalpy - @condensate_pump_outlet_enthalpy\right)}"
             r"{@deaerator_extraction_enthalpy - @condensate_pump_outlet_enthalpy}",
             "cengel", "Sec. 10-6, energy balance of the open feed-water heater (drain cascaded in)"),
        Step("condenser_steam_fraction",
             r"1 - @heater_extraction_fraction - @deaerator_extraction_fraction", "cengel", "Sec. 10-6"),
        Step("turbine_specific_work",
             r"\left(@live_steam_enthalpy - @heater_extraction_enthalpy\right) + "
             r"\left(1 - @heater_extraction_fraction\right)\left(@heater_extraction_enthalpy - "
             r"@deaerator_extraction_enthalpy\right) + @condenser_steam_fraction\left("
             r"@deaerator_extraction_enthalpy - @turbine_exhaust_enthalpy\right)",
             "cengel", "Sec. 10-6, turbine work with extractions"),
        Step("pump_specific_work",
             r"@condenser_steam_fraction\left(@condensate_pump_outlet_enthalpy - @condenser_outlet_enthalpy\right)"
             r" + \left(@feed_pump_outlet_enthalpy - @deaerator_outlet_enthalpy\right)",
             "cengel", "Sec. 10-6"),
        Step("net_specific_work", r"@turbine_specific_work - @pump_specific_work", "cengel", "Sec. 10-2"),
        Step("specific_heat_added", r"@live_steam_enthalpy - @heater_outlet_enthalpy", "cengel", "Sec. 10-2"),
        Step("specific_heat_rejected",
             r"@condenser_steam_fraction\left(@turbine_exhaust_enthalpy - @condenser_outlet_enthalpy\right)",
             "cengel", "Sec. 10-2"),
        Step("cycle_thermal_efficiency", r"\frac{@net_specific_work}{@specific_heat_added}",
             "cengel", "Sec. 10-2, eq. (10-3) as recalled"),
        Step("carnot_efficiency",
             r"1 - \frac{@condenser_saturation_temperature + 273.15}{@live_steam_temperature + 273.15}",
             "cengel", "Sec. 6-10, eq. (6-18) as recalled"),
        Step("energy_balance_residual",
             r"100\,\frac{\left|@specific_heat_added + @pump_specific_work - @turbine_specific_work - "
             r"@specific_heat_rejected\right|}{@specific_heat_added + @pump_specific_work}",
             "cengel", "Sec. 5-4, steady-flow energy balance of the working fluid"),
        Step("live_steam_flow",
             r"\frac{3600\,@gross_electrical_output}{@turbine_specific_work\,@mechanical_efficiency\,"
             r"@generator_efficiency}",
             "cengel", "Sec. 2-7 (conversion efficiencies); MW/(kJ/kg) = 1000 kg/s = 3600 t/h"),
        Step("turbine_shaft_power", r"\frac{@live_steam_flow\,@turbine_specific_work}{3600}", "cengel",
             "Sec. 5-4"),
        Step("mechanical_loss", r"@turbine_shaft_power\left(1 - @mechanical_efficiency\right)", "cengel",
             "Sec. 2-7"),
        Step("generator_loss",
             r"@turbine_shaft_power\,@mechanical_efficiency\left(1 - @generator_efficiency\right)",
             "cengel", "Sec. 2-7"),
        Step("cycle_pump_power", r"\frac{@live_steam_flow\,@pump_specific_work}{3600}", "cengel", "Sec. 5-4"),
        Step("boiler_heat_duty", r"\frac{@live_steam_flow\,@specific_heat_added}{3600}", "cengel", "Sec. 5-4"),
        Step("fuel_lhv",
             r"\begin{cases} @fuel_lhv_dry\left(1 - \frac{@fuel_moisture}{100}\right) - 0.02443\,@fuel_moisture"
             r" & \text{dry basis and moisture} \\ {@fuel_lhv_as_received} & \text{as received} \end{cases}",
             "iso18125", "net calorific value at constant pressure, as received (clause as recalled)"),
        Step("fuel_heat_input", r"\frac{@boiler_heat_duty}{@boiler_efficiency}", "cengel",
             "Sec. 2-7 (combustion / boiler efficiency)"),
        Step("boiler_loss", r"@fuel_heat_input - @boiler_heat_duty", "cengel", "Sec. 2-7"),
        Step("gross_electrical_efficiency", r"\frac{@gross_electrical_output}{@fuel_heat_input}", "cengel",
             "Sec. 2-7 (overall plant efficiency)"),
        Step("net_electrical_output", r"@gross_electrical_output - @auxiliary_load", "cengel", "Sec. 2-7"),
        Step("net_electrical_efficiency", r"\frac{@net_electrical_output}{@fuel_heat_input}", "cengel",
             "Sec. 2-7"),
        Step("fuel_mass_flow", r"\frac{3.6\,@fuel_heat_input}{@fuel_lhv}", "cengel",
             "Sec. 2-7; MW/(MJ/kg) = kg/s = 3.6 t/h"),
        Step("condenser_heat_rejection", r"\frac{@live_steam_flow\,@specific_heat_rejected}{3600}", "cengel",
             "Sec. 5-4"),
        Step("cooling_water_specific_heat",
             r"c_p\left(\frac{@cooling_water_inlet_temperature + @cooling_water_outlet_temperature}{2}\right)",
             "iapws_if97", "region 1 at 2 bar"),
        Step("cooling_water_flow",
             r"\frac{3600\,@condenser_heat_rejection}{@cooling_water_specific_heat\,@cooling_water_rise}",
             "cengel", "Sec. 5-4 (heat exchanger energy balance)"),
    ],
    checks=[
        Check("exhaust_wetness", "Turbine exhaust quality at or above the wetness limit",
              "turbine_exhaust_quality", ">=", "exhaust_quality_limit", "practice",
              "blade erosion by droplets", review_band=0.01),
        Check("condenser_cooling_water", "Condenser saturation temperature above the cooling-water "
              "outlet by at least the minimum terminal difference",
              "condenser_terminal_difference", ">=", "condenser_minimum_terminal_difference",
              "practice", review_band=0.2),
        Check("superheat_margin", "Live-steam superheat at or above the chosen margin",
              "live_steam_superheat", ">=", "superheat_margin_minimum", "practice", review_band=0.1),
        Check("heater_terminal_difference", "Closed-heater terminal difference positive (no "
              "desuperheating zone modelled)", "heater_shell_to_feedwater_difference", ">", 0.0, "cengel",
              "Sec. 10-6"),
        Check("energy_balance", "Cycle energy balance closes: |in - out| / in at most 0.1 %",
              "energy_balance_residual", "<=", 0.1, "cengel", "Sec. 5-4"),
        Check("carnot_bound", "Cycle efficiency below the Carnot efficiency between the same temperatures",
              "cycle_thermal_efficiency", "<", "carnot_efficiency", "cengel", "Sec. 6-10"),
    ],
    references=REFERENCES,
    cautions=[
        "High-pressure steam and hot surfaces can kill: a pin-hole leak of superheated steam is "
        "invisible and cuts; isolate, vent, drain and prove zero pressure before opening any "
        "part of the steam and feed-water system.",
        "Boilers, steam lines, feed-water heaters and the deaerator are pressure equipment, "
        "governed by the local pressure-equipment codes and inspection regime; nothing here "
        "replaces their design, fabrication and inspection rules.",
        "Stored biomass self-heats and its dust can explode; fuel figures here are a design "
        "basis, not a fuel-handling safety study.",
        "These figures are a design basis for review by a licensed engineer, not a supplier's "
        "heat balance or guarantee. Defer to the local codes and to licensed engineering "
        "practice, and confirm every value against the suppliers' guaranteed data.",
    ],
    figures=[
        FigureSpec("ts_diagram", "Temperature-entropy diagram",
                   "Saturation dome and the cycle (IAPWS-IF97 through CoolProp). Pumping 1-2 and "
                   "3-4, deaerator 2-3, closed heater 4-5, boiler and superheater 5-6 (plotted "
                   "along the boiler's pressure drop), turbine sections 6-7-8-9 drawn as straight "
                   "lines between the computed states, condensation 9-1; 10 is the heater drain."),
        FigureSpec("energy_flow", "Energy flow from fuel to net export",
                   "At the rated gross output. The pump work enters as a second inflow: it is "
                   "drawn from the auxiliary supply and returned to the water."),
        FigureSpec("sensitivity_condenser", "Net efficiency against condenser pressure",
                   "Other inputs as given, rated gross output held; extraction pressures and "
                   "section efficiencies held, so the exhaust loss change is not modelled."),
        FigureSpec("sensitivity_live_steam", "Net efficiency against live-steam temperature",
                   "Other inputs as given, rated gross output held; section efficiencies held."),
    ],
    tables=[
        TableSpec("state_points", "State points",
                  "Per state point: pressure, temperature, specific enthalpy and entropy (IAPWS-IF97 "
                  "through CoolProp), quality inside the dome, and mass flow at the rated output."),
        TableSpec("sensitivity_table", "Sensitivity of the efficiencies",
                  "Each row one cycle solve; the varied input named, the others as given."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------

_POINT_NAMES = {
    1: "condenser outlet",
    2: "condensate pump outlet",
    3: "deaerator outlet",
    4: "feed pump outlet",
    5: "closed heater outlet (boiler inlet)",
    6: "live steam (turbine inlet)",
    7: "heater extraction",
    8: "deaerator extraction",
    9: "turbine exhaust",
    10: "heater drain",
}


def _design(v: Values, condenser_pressure: float) -> CycleDesign:
    return CycleDesign(
        live_pressure=float(v.live_steam_pressure), live_temperature=float(v.live_steam_temperature),
        condenser_pressure=condenser_pressure, boiler_pressure_drop=float(v.boiler_pressure_drop),
        deaerator_pressure=float(v.deaerator_pressure), heater_pressure=float(v.heater_extraction_pressure),
        heater_ttd=float(v.heater_terminal_difference),
        drain_cooler_approach=float(v.drain_cooler_approach) if v.drain_cooler == "fitted" else None,
        hp_efficiency=float(v.hp_section_efficiency), ip_efficiency=float(v.ip_section_efficiency),
        lp_efficiency=float(v.lp_section_efficiency), pump_efficiency=float(v.pump_efficiency),
    )


def _check_pressure_order(v: Values, p_c: float) -> None:
    p6, p7, p8 = float(v.live_steam_pressure), float(v.heater_extraction_pressure), float(v.deaerator_pressure)
    p_boiler = p6 + float(v.boiler_pressure_drop)
    if p_boiler >= CRITICAL_PRESSURE:
        # the feed pump delivers p6 + drop; at or above the critical point there is no
        # evaporation and the model (drum boiler, IF97 regions 1, 2 and 4) does not apply
        raise InputConflict("boiler_pressure_drop",
                            f"live steam {p6:g} bar plus boiler pressure drop {float(v.boiler_pressure_drop):g} bar "
                            f"puts the boiler at {p_boiler:g} bar, at or above the critical pressure of water "
                            f"({CRITICAL_PRESSURE:g} bar, IAPWS-IF97): this model is for subcritical cycles only")
    if p_c >= p6:
        raise InputConflict("condenser_pressure",
                            f"condenser pressure {p_c:g} bar is not below the live-steam pressure {p6:g} bar "
                            "(and so above the saturation pressure of the live steam): the turbine "
                            "cannot expand into the condenser")
    if not p7 < p6:
        raise InputConflict("heater_extraction_pressure",
                            f"heater extraction at {p7:g} bar is not below the live-steam pressure {p6:g} bar; "
                            "expected live steam > heater extraction > deaerator > condenser")
    if not p8 < p7:
        raise InputConflict("deaerator_pressure",
                            f"deaerator at {p8:g} bar is not below the heater extraction at {p7:g} bar; "
                            "expected live steam > heater extraction > deaerator > condenser")
    if not p_c < p8:
        raise InputConflict("condenser_pressure" if v.condenser_pressure_basis == "given"
                            else "cooling_water_inlet_temperature",
                            f"condenser pressure {p_c:.4g} bar is not below the deaerator at {p8:g} bar; "
                            "expected live steam > heater extraction > deaerator > condenser")


def _fuel_lhv(v: Values, warnings: list[str]) -> float:
    if v.fuel_basis == "as_received":
        if float(v.fuel_lhv_as_received) <= 0.0:
            raise InputConflict("fuel_lhv_as_received",
                                "fuel basis 'as_received' needs fuel_lhv_as_received > 0 (MJ/kg)")
        if float(v.fuel_lhv_as_received) < MINIMUM_FUEL_LHV:
            raise InputConflict("fuel_lhv_as_received",
                                f"{float(v.fuel_lhv_as_received):g} MJ/kg is below {MINIMUM_FUEL_LHV:g} MJ/kg: "
                                "the fuel would not sustain combustion")
        if float(v.fuel_lhv_dry) or float(v.fuel_moisture):
            warnings.append("fuel basis 'as_received': the dry-basis heating value and moisture are ignored")
        return float(v.fuel_lhv_as_received)
    if float(v.fuel_lhv_dry) <= 0.0:
        raise InputConflict("fuel_lhv_dry", "fuel basis 'dry_and_moisture' needs fuel_lhv_dry > 0 (MJ/kg)")
    if float(v.fuel_lhv_dry) < MINIMUM_FUEL_LHV:
        raise InputConflict("fuel_lhv_dry", f"{float(v.fuel_lhv_dry):g} MJ/kg is below {MINIMUM_FUEL_LHV:g} "
                            "MJ/kg: no dry fuel burns so poorly (wood about 19 MJ/kg)")
    q = as_received_lhv(float(v.fuel_lhv_dry), float(v.fuel_moisture))
    if q < MINIMUM_FUEL_LHV:
        raise InputConflict("fuel_moisture",
                            f"with {float(v.fuel_moisture):g} % moisture the as-received net calorific value "
                            f"is {q:.2f} MJ/kg: the fuel would not sustain combustion")
    if float(v.fuel_moisture) > 60.0:
        warnings.append(f"fuel moisture {float(v.fuel_moisture):g} % is above what grate boilers usually "
                        "burn without support fuel (about 55-60 %, common practice)")
    if float(v.fuel_lhv_as_received):
        warnings.append("fuel basis 'dry_and_moisture': fuel_lhv_as_received is ignored")
    return q


def _ts_chart(cycle: Cycle) -> Chart:
    st = cycle.states
    # saturation dome: liquid line up to near the critical point, back down the vapour line
    temps = [0.01 + (CRITICAL_TEMPERATURE - 0.5 - 0.01) * (k / 40) ** 0.8 for k in range(41)]
    s_f = [_props("S", "T", t + KELVIN, "Q", 0.0) / 1e3 for t in temps]
    s_g = [_props("S", "T", t + KELVIN, "Q", 1.0) / 1e3 for t in temps]
    dome_s = s_f + s_g[::-1]
    dome_t = temps + temps[::-1]
    # boiler path 5 -> 6 in equal enthalpy steps, pressure falling linearly over the boiler
    d = cycle.design
    p4 = d.live_pressure + d.boiler_pressure_drop
    boiler = []
    for k in range(1, _BOILER_PATH_POINTS):
        f = k / _BOILER_PATH_POINTS
        h = st[5].enthalpy + f * (st[6].enthalpy - st[5].enthalpy)
        boiler.append(state_ph(p4 + f * (d.live_pressure - p4), h))
    path = [st[1], st[2], st[3], st[4], st[5], *boiler, st[6], st[7], st[8], st[9], st[1]]
    markers = [Marker(str(n), round(st[n].entropy, 6), round(st[n].temperature, 6))
               for n in (1, 3, 5, 6, 7, 8, 9, 10)]
    drain = [st[7], st[10]]
    return Chart(
        x_label="Specific entropy s (kJ/(kg·K))",
        y_label="Temperature T (°C)",
        series=[
            Series("Saturation dome", [round(x, 6) for x in dome_s], [round(y, 6) for y in dome_t],
                   style="dashed"),
            Series("Cycle (main flow)", [round(s.entropy, 6) for s in path],
                   [round(s.temperature, 6) for s in path]),
            Series("Heater extraction to drain", [round(s.entropy, 6) for s in drain],
                   [round(s.temperature, 6) for s in drain], style="dotted"),
        ],
        markers=markers,
        x_range=(0.0, 9.5),
        y_range=(0.0, max(CRITICAL_TEMPERATURE, st[6].temperature) * 1.08),
    )


def _sweep(v: Values, p_c: float, fuel_lhv: float) -> tuple[Chart, Chart, Table, list[str]]:
    """Net efficiency against condenser pressure and live-steam temperature, other inputs held."""
    notes: list[str] = []
    base = _design(v, p_c)
    args = (float(v.gross_electrical_output), float(v.mechanical_efficiency), float(v.generator_efficiency),
            float(v.boiler_efficiency), float(v.auxiliary_load), fuel_lhv)
    rows: list[list[object]] = []

    def solve(design: CycleDesign, label: str) -> tuple[float, float] | None:
        try:
            cyc = solve_cycle(design)
        except InputConflict as exc:
            notes.append(f"sensitivity point skipped ({label}): {exc.message}")
            return None
        chain = plant_chain(cyc, *args)
        x9 = cyc.states[9].quality
        rows.append([label, design.condenser_pressure, design.live_temperature,
                     100.0 * cyc.thermal_efficiency, 100.0 * chain.net_efficiency,
                     x9 if math.isfinite(x9) else 1.0, chain.fuel_flow])
        return 100.0 * chain.net_efficiency, 100.0 * cyc.thermal_efficiency

    # condenser pressure from half to twice the design value, kept below the deaerator
    factors = [0.5, 0.67, 0.83, 1.0, 1.25, 1.5, 2.0][:_SWEEP_POINTS]
    pc_x, pc_net = [], []
    for f in factors:
        p = round(p_c * f, 6)
        if p >= float(v.deaerator_pressure) or p <= TRIPLE_POINT_PRESSURE:
            continue
        r = solve(replace(base, condenser_pressure=p), "condenser pressure")
        if r:
            pc_x.append(p)
            pc_net.append(r[0])
    # live-steam temperature -60 K to +60 K about the design, kept superheated and in IF97 range
    t_sat = saturation_temperature(base.live_pressure)
    t_x, t_net = [], []
    for k in range(_SWEEP_POINTS):
        t = base.live_temperature + 20.0 * (k - (_SWEEP_POINTS - 1) / 2)
        if t <= t_sat + 1.0 or t > 800.0:
            continue
        r = solve(replace(base, live_temperature=t), "live-steam temperature")
        if r:
            t_x.append(t)
            t_net.append(r[0])

    def chart(x_label: str, xs: list[float], ys: list[float], x0: float, y0: float) -> Chart:
        lo, hi = min(ys + [y0]), max(ys + [y0])
        pad = max(0.5, 0.15 * (hi - lo))
        return Chart(x_label=x_label, y_label="Net electrical efficiency (%)",
                     series=[Series("Net electrical efficiency", [round(x, 6) for x in xs],
                                    [round(y, 6) for y in ys])],
                     markers=[Marker("design", round(x0, 6), round(y0, 6))],
                     x_range=(min(xs) - 0.05 * (max(xs) - min(xs)), max(xs) + 0.05 * (max(xs) - min(xs))),
                     y_range=(lo - pad, hi + pad))

    design_net = 100.0 * plant_chain(solve_cycle(base), *args).net_efficiency
    c1 = chart("Condenser pressure (bar)", pc_x, pc_net, p_c, design_net)
    c2 = chart("Live-steam temperature (°C)", t_x, t_net, base.live_temperature, design_net)
    table = Table(columns=[("Varied input", ""), ("Condenser pressure", "bar"),
                           ("Live-steam temperature", "degC"), ("Cycle efficiency", "%"),
                           ("Net electrical efficiency", "%"), ("Exhaust quality", ""),
                           ("Fuel flow", "t/h")],
                  rows=rows)
    return c1, c2, table, notes


def compute(v: Values) -> Result:
    warnings: list[str] = []
    t_cw_out = float(v.cooling_water_inlet_temperature) + float(v.cooling_water_rise)
    if v.condenser_pressure_basis == "given":
        if float(v.condenser_pressure) <= 0.0:
            raise InputConflict("condenser_pressure",
                                "condenser-pressure basis 'given' needs condenser_pressure > 0 "
                                "(or choose condenser_pressure_basis = 'cooling_water')")
        p_c = float(v.condenser_pressure)
        if p_c < MINIMUM_CONDENSER_PRESSURE:
            raise InputConflict("condenser_pressure",
                                f"condenser pressure {p_c:g} bar is below {MINIMUM_CONDENSER_PRESSURE:g} bar "
                                "(saturation at about 7 °C); no condenser runs so cold: check the unit (bar)")
    else:
        t_sat_c = t_cw_out + float(v.condenser_design_terminal_difference)
        if t_sat_c >= 100.0:
            raise InputConflict("cooling_water_inlet_temperature",
                                f"cooling water out {t_cw_out:g} °C plus terminal difference puts condensing "
                                f"at {t_sat_c:g} °C, not a vacuum condenser")
        p_c = saturation_pressure(t_sat_c)
        if float(v.condenser_pressure):
            warnings.append("condenser-pressure basis 'cooling_water': the given condenser_pressure is ignored")
    _check_pressure_order(v, p_c)
    lhv = _fuel_lhv(v, warnings)

    cycle = solve_cycle(_design(v, p_c))
    st = cycle.states
    gross = float(v.gross_electrical_output)
    aux = float(v.auxiliary_load)
    if aux >= gross:
        raise InputConflict("auxiliary_load",
                            f"auxiliary load {aux:g} MW is not below the gross output {gross:g} MW")
    chain = plant_chain(cycle, gross, float(v.mechanical_efficiency), float(v.generator_efficiency),
                        float(v.boiler_efficiency), aux, lhv)

    p_sat_c = st[1].temperature
    x9 = st[9].quality
    if not math.isfinite(x9):
        warnings.append("the turbine exhaust is superheated; quality reported as 1")
        x9 = 1.0
    if chain.pump_power > aux:
        warnings.append(f"auxiliary load {aux:g} MW is below the cycle pump power alone "
                        f"({chain.pump_power:.3f} MW); the pumps are part of the auxiliary load")
    if float(v.boiler_efficiency) > 0.95:
        warnings.append(f"boiler efficiency {float(v.boiler_efficiency):g} on net calorific value is "
                        "high for a biomass boiler (about 0.85-0.92, common practice)")
    # plausibility, not errors: possible, but a reviewer must look (common practice, no source)
    if float(v.generator_efficiency) < 0.90:
        warnings.append(f"generator efficiency {float(v.generator_efficiency):g} is below 0.90: unusual for a "
                        "generator of this size (about 0.96-0.98, common practice); check the input")
    if x9 < float(v.exhaust_quality_limit):
        warnings.append(f"turbine exhaust wetness {100 * (1 - x9):.1f} % is past the limit of "
                        f"{100 * (1 - float(v.exhaust_quality_limit)):.0f} %: blade erosion; see the design check")
    t_mean = 0.5 * (float(v.cooling_water_inlet_temperature) + t_cw_out)
    cp_cw = water_cp(t_mean)
    outputs: dict[str, float | str] = {
        "feed_pump_discharge_pressure": cycle.extra["feed_pump_discharge_pressure"],
        "condenser_operating_pressure": p_c,
        "condenser_saturation_temperature": p_sat_c,
        "cooling_water_outlet_temperature": t_cw_out,
        "condenser_terminal_difference": p_sat_c - t_cw_out,
        "live_steam_saturation_temperature": cycle.extra["live_steam_saturation_temperature"],
        "live_steam_superheat": st[6].temperature - cycle.extra["live_steam_saturation_temperature"],
        "condenser_outlet_enthalpy": st[1].enthalpy,
        "condenser_outlet_entropy": st[1].entropy,
        "condensate_pump_outlet_enthalpy": st[2].enthalpy,
        "deaerator_outlet_enthalpy": st[3].enthalpy,
        "deaerator_outlet_entropy": st[3].entropy,
        "feed_pump_outlet_enthalpy": st[4].enthalpy,
        "feed_pump_outlet_temperature": st[4].temperature,
        "heater_saturation_temperature": cycle.extra["heater_saturation_temperature"],
        "heater_outlet_temperature": st[5].temperature,
        "heater_outlet_enthalpy": st[5].enthalpy,
        "heater_shell_to_feedwater_difference": cycle.extra["heater_saturation_temperature"] - st[5].temperature,
        "live_steam_enthalpy": st[6].enthalpy,
        "live_steam_entropy": st[6].entropy,
        "heater_extraction_enthalpy": st[7].enthalpy,
        "heater_extraction_entropy": st[7].entropy,
        "deaerator_extraction_enthalpy": st[8].enthalpy,
        "deaerator_extraction_entropy": st[8].entropy,
        "turbine_exhaust_enthalpy": st[9].enthalpy,
        "turbine_exhaust_quality": x9,
        "heater_drain_temperature": st[10].temperature,
        "heater_drain_enthalpy": st[10].enthalpy,
        "heater_extraction_fraction": cycle.heater_fraction,
        "deaerator_extraction_fraction": cycle.deaerator_fraction,
        "condenser_steam_fraction": cycle.condenser_fraction,
        "turbine_specific_work": cycle.turbine_work,
        "pump_specific_work": cycle.pump_work,
        "net_specific_work": cycle.net_work,
        "specific_heat_added": cycle.heat_added,
        "specific_heat_rejected": cycle.heat_rejected,
        "cycle_thermal_efficiency": cycle.thermal_efficiency,
        "carnot_efficiency": carnot_efficiency(st[6].temperature, p_sat_c),
        "energy_balance_residual": 100.0 * cycle.balance_residual,
        "live_steam_flow": chain.steam_flow,
        "turbine_shaft_power": chain.shaft_power,
        "mechanical_loss": chain.mechanical_loss,
        "generator_loss": chain.generator_loss,
        "cycle_pump_power": chain.pump_power,
        "boiler_heat_duty": chain.boiler_duty,
        "fuel_lhv": lhv,
        "fuel_heat_input": chain.fuel_heat,
        "boiler_loss": chain.boiler_loss,
        "gross_electrical_efficiency": chain.gross_efficiency,
        "net_electrical_output": chain.net_output,
        "net_electrical_efficiency": chain.net_efficiency,
        "fuel_mass_flow": chain.fuel_flow,
        "condenser_heat_rejection": chain.condenser_heat,
        "cooling_water_specific_heat": cp_cw,
        "cooling_water_flow": 3600.0 * chain.condenser_heat / (cp_cw * float(v.cooling_water_rise)),
    }

    # mass flow through each point, t/h, from the extraction fractions
    m = chain.steam_flow
    y7, y8, y9 = cycle.heater_fraction, cycle.deaerator_fraction, cycle.condenser_fraction
    flows = {1: y9, 2: y9, 3: 1.0, 4: 1.0, 5: 1.0, 6: 1.0, 7: y7, 8: y8, 9: y9, 10: y7}
    rows = []
    for n in sorted(st):
        s = st[n]
        rows.append([n, _POINT_NAMES[n], s.pressure, s.temperature, s.enthalpy, s.entropy,
                     s.quality if math.isfinite(s.quality) else "-", phase_name(s), flows[n] * m])
    state_table = Table(columns=[("Point", ""), ("Location", ""), ("p", "bar"), ("T", "degC"),
                                 ("h", "kJ/kg"), ("s", "kJ/(kg*K)"), ("x", ""), ("Phase", ""),
                                 ("Mass flow", "t/h")], rows=rows)

    flow = EnergyFlow(
        unit="MW",
        inflows=[("Fuel (net calorific value)", chain.fuel_heat), ("Pump work to the water", chain.pump_power)],
        outflows=[
            ("Net export", chain.net_output, "product"),
            ("Auxiliary load", aux, "loss"),
            ("Generator loss", chain.generator_loss, "loss"),
            ("Mechanical loss", chain.mechanical_loss, "loss"),
            ("Condenser", chain.condenser_heat, "loss"),
            ("Boiler loss", chain.boiler_loss, "loss"),
        ],
    )
    c_pc, c_t, sweep_table, notes = _sweep(v, p_c, lhv)
    warnings.extend(notes)
    return Result(
        outputs=outputs,
        charts={"ts_diagram": _ts_chart(cycle), "energy_flow": flow,
                "sensitivity_condenser": c_pc, "sensitivity_live_steam": c_t},
        tables={"state_points": state_table, "sensitivity_table": sweep_table},
        warnings=warnings,
    )


# ---------------------------------------------------------------------------
# Checks against published numbers (run by the tests and shown in the
# handbook's verification appendix)
# ---------------------------------------------------------------------------

_IF97_T5 = ("IAPWS R7-97(2012), Table 5, region 1 verification values (from memory; the independent "
            "iapws package reproduces them, tests/test_steam_cycle.py)")
_IF97_T15 = ("IAPWS R7-97(2012), Table 15, region 2 verification values (from memory; reproduced by "
             "the iapws package)")
_NINE = "the release prints 9 significant digits"
_CENGEL_1 = ("Çengel & Boles, Thermodynamics: An Engineering Approach, 8th ed., 2015, Example 10-1 "
             "(from memory): ideal Rankine, 3 MPa 350 °C, condenser 75 kPa")
_CENGEL_2 = ("Çengel & Boles 8th ed., Example 10-2 (from memory): turbine 15 MPa 600 °C to 10 kPa, "
             "eta_T 0.87; pump 9 kPa 38 °C to 16 MPa, eta_P 0.85; boiler 15.9 MPa 35 °C to 15.2 MPa 625 °C")
_CENGEL_4 = ("Çengel & Boles 8th ed., Example 10-4 (from memory): ideal regenerative, 15 MPa 600 °C, "
             "condenser 10 kPa, open feed-water heater at 1.2 MPa")


def _example_10_2() -> float:
    s1 = state_pt(0.09, 38.0)
    w_p = pump_compression(s1, 160.0, 0.85).enthalpy - s1.enthalpy
    s5 = state_pt(150.0, 600.0)
    w_t = s5.enthalpy - turbine_expansion(s5, 0.1, 0.87).enthalpy
    return (w_t - w_p) / (state_pt(152.0, 625.0).enthalpy - state_pt(159.0, 35.0).enthalpy)


PUBLISHED_CASES = [
    PublishedCase("IF97 h at 3 MPa, 300 K", _IF97_T5, 115.331273, "kJ/kg", 1e-6, _NINE,
                  lambda: state_pt(30.0, 300.0 - KELVIN).enthalpy),
    PublishedCase("IF97 s at 3 MPa, 300 K", _IF97_T5, 0.392294792, "kJ/(kg*K)", 1e-9, _NINE,
                  lambda: state_pt(30.0, 300.0 - KELVIN).entropy),
    PublishedCase("IF97 h at 80 MPa, 300 K", _IF97_T5, 184.142828, "kJ/kg", 1e-6, _NINE,
                  lambda: state_pt(800.0, 300.0 - KELVIN).enthalpy),
    PublishedCase("IF97 h at 3 MPa, 500 K", _IF97_T5, 975.542239, "kJ/kg", 1e-6, _NINE,
                  lambda: state_pt(30.0, 500.0 - KELVIN).enthalpy),
    PublishedCase("IF97 s at 3 MPa, 500 K", _IF97_T5, 2.58041912, "kJ/(kg*K)", 1e-8, _NINE,
                  lambda: state_pt(30.0, 500.0 - KELVIN).entropy),
    PublishedCase("IF97 h at 3.5 kPa, 700 K", _IF97_T15, 3335.68375, "kJ/kg", 1e-5, _NINE,
                  lambda: state_pt(0.035, 700.0 - KELVIN).enthalpy),
    PublishedCase("IF97 h at 30 MPa, 700 K", _IF97_T15, 2631.49474, "kJ/kg", 1e-5, _NINE,
                  lambda: state_pt(300.0, 700.0 - KELVIN).enthalpy),
    PublishedCase("ideal Rankine cycle efficiency", _CENGEL_1, 0.260, "", 1e-3,
                  "3 digits printed; book tables (IAPWS-95) vs IF97 ~0.1 kJ/kg",
                  lambda: solve_cycle(CycleDesign(30.0, 350.0, 0.75)).thermal_efficiency),
    PublishedCase("ideal Rankine exhaust quality", _CENGEL_1, 0.886, "", 1e-3, "3 digits printed",
                  lambda: solve_cycle(CycleDesign(30.0, 350.0, 0.75)).states[9].quality),
    PublishedCase("non-ideal Rankine cycle efficiency", _CENGEL_2, 0.361, "", 1e-3,
                  "3 digits printed; the book's pump work v dp differs by 0.1 kJ/kg",
                  _example_10_2),
    PublishedCase("open-heater extraction fraction", _CENGEL_4, 0.2270, "", 3e-4,
                  "4 digits printed; the book's flashed h at 1.2 MPa is 1.3 kJ/kg above IF97",
                  lambda: solve_cycle(CycleDesign(150.0, 600.0, 0.1, deaerator_pressure=12.0)).deaerator_fraction),
    PublishedCase("regenerative cycle efficiency", _CENGEL_4, 0.463, "", 1e-3, "3 digits printed",
                  lambda: solve_cycle(CycleDesign(150.0, 600.0, 0.1, deaerator_pressure=12.0)).thermal_efficiency),
    PublishedCase("as-received net calorific value, 19 MJ/kg dry, 45 % moisture",
                  "ISO 18125:2017 relation q_net,ar = q_net,d (1 - M/100) - 0.02443 M, hand-worked: "
                  "10.45 - 1.09935", 9.35065, "MJ/kg", 1e-9, "exact arithmetic",
                  lambda: as_received_lhv(19.0, 45.0)),
]
