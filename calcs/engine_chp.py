"""Gas-engine CHP set: fuel input, electricity, recovered heat and primary energy savings.

The fuel gas is methane with CO2 as the inert rest (biogas, or natural gas taken as methane).
Its net calorific value per normal cubic metre is the methane fraction times the density of
methane at 0 degC, 101.325 kPa (CoolProp, real gas) times methane's net calorific value per
kilogram (a cited table value: CoolProp holds no enthalpy of combustion).

Heat rejected to jacket water, lube oil and charge air are data-sheet shares of the fuel input.
The exhaust is an ideal-gas mixture of N2, O2, Ar, CO2 and H2O whose composition follows from
complete combustion of the gas in dry air, the excess air coming from the exhaust and fuel mass
flows; each component's enthalpy is CoolProp's at 1 kPa, where every component (water too, at
25 degC) is an ideal-gas vapour, consistent with the net-calorific-value basis.  Treating the
exhaust as plain air instead would understate its enthalpy drop by about 7 % for lean-burn
biogas exhaust (tests/test_engine_chp.py shows the size); that is why the mixture is used.
Units: kW, kJ/kg, degC, m3(n)/h.
"""

from __future__ import annotations

from collections.abc import Mapping
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
NORMAL_PRESSURE = 101325.0  # Pa; normal conditions 0 degC, 101.325 kPa (ISO 13443:1996)
REFERENCE_TEMPERATURE = 25.0  # degC: combustion reference of the net calorific value (ISO 6976:2016)
HEATING_CIRCUIT_PRESSURE = 3.0e5  # Pa; the water enthalpy hardly depends on it (< 0.05 % per bar)
IDEAL_GAS_PRESSURE = 1000.0  # Pa; each exhaust component evaluated as a near-ideal gas

# Molar masses, g/mol (ISO 6976:2016 Table 1, as recalled; IUPAC atomic weights)
MOLAR_MASS = {"CH4": 16.043, "CO2": 44.010, "H2O": 18.015, "O2": 31.999, "N2": 28.014, "Ar": 39.948}
# Dry air, mole fractions (ISO 2533:1975 standard atmosphere composition, as recalled; the
# 0.04 % CO2 is added to the argon share so that the four species sum to one)
DRY_AIR = {"N2": 0.78084, "O2": 0.20946, "Ar": 0.00970}
COOLPROP_NAME = {"CO2": "CarbonDioxide", "H2O": "Water", "O2": "Oxygen", "N2": "Nitrogen", "Ar": "Argon"}


# ---------------------------------------------------------------------------
# Published models, one function each
# ---------------------------------------------------------------------------


def normal_density(fluid: str) -> float:
    """Density in kg/m3 at normal conditions (0 degC, 101.325 kPa) from CoolProp (real gas:
    Setzmann-Wagner 1991 for methane, Span-Wagner 1996 for CO2)."""
    from CoolProp.CoolProp import PropsSI  # lazy: a module import stays cheap

    return PropsSI("D", "T", KELVIN, "P", NORMAL_PRESSURE, fluid)


def gas_net_calorific_value(methane_fraction: float, methane_density: float,
                            methane_lhv_mass: float) -> float:
    """H_i,n = x_CH4 rho_n,CH4 H_i,m,CH4 in MJ/m3(n): the CO2 adds nothing (ISO 6976:2016
    cl. 7, volumetric calorific value of a mixture as the fraction-weighted sum, real-gas
    compressibility of the mixture taken as methane's)."""
    if not 0.0 < methane_fraction <= 1.0:
        raise ValueError(f"methane fraction must lie in (0, 1], got {methane_fraction}")
    return methane_fraction * methane_density * methane_lhv_mass


def stoichiometric_air_fuel_ratio(methane_fraction: float) -> float:
    """Dry air per unit mass of CH4/CO2 gas for CH4 + 2 O2 -> CO2 + 2 H2O
    (Heywood, Internal Combustion Engine Fundamentals, 1988, §3.3, eq. 3.5, as recalled)."""
    x = methane_fraction
    air_mol = 2.0 * x / DRY_AIR["O2"]
    air_molar_mass = sum(DRY_AIR[k] * MOLAR_MASS[k] for k in DRY_AIR)
    fuel_mass = x * MOLAR_MASS["CH4"] + (1.0 - x) * MOLAR_MASS["CO2"]
    return air_mol * air_molar_mass / fuel_mass


def exhaust_mass_fractions(methane_fraction: float, excess_air: float) -> dict[str, float]:
    """Mass fractions of the wet exhaust of complete combustion of 1 mol CH4/CO2 gas in
    ``excess_air`` times stoichiometric dry air (Heywood 1988, §3.3, as recalled)."""
    if excess_air < 1.0:
        raise ValueError(f"excess air ratio below 1 ({excess_air}): incomplete combustion")
    x = methane_fraction
    air = excess_air * 2.0 * x / DRY_AIR["O2"]
    moles = {
        "CO2": 1.0,  # the inert CO2 plus the CO2 from x mol CH4
        "H2O": 2.0 * x,
        "O2": air * DRY_AIR["O2"] - 2.0 * x,
        "N2": air * DRY_AIR["N2"],
        "Ar": air * DRY_AIR["Ar"],
    }
    mass = {k: n * MOLAR_MASS[k] for k, n in moles.items()}
    total = sum(mass.values())
    return {k: m / total for k, m in mass.items()}


def mixture_enthalpy(mass_fractions: Mapping[str, float], temperature_c: float) -> float:
    """Specific enthalpy in kJ/kg of an ideal-gas mixture: sum of w_i h_i(T), each component
    from CoolProp at 1 kPa (ideal-gas mixing, Gibbs-Dalton law: Cengel & Boles,
    Thermodynamics, 8th ed., §13-3, as recalled).  Only differences of it are meaningful."""
    from CoolProp.CoolProp import PropsSI

    t = temperature_c + KELVIN
    return sum(w * PropsSI("H", "T", t, "P", IDEAL_GAS_PRESSURE, COOLPROP_NAME[k])
               for k, w in mass_fractions.items()) / 1e3


def air_enthalpy(temperature_c: float) -> float:
    """Specific enthalpy of dry air at 101.325 kPa, kJ/kg (CoolProp 'Air', Lemmon et al. 2000);
    used only to show the size of the 'exhaust as air' approximation."""
    from CoolProp.CoolProp import PropsSI

    return PropsSI("H", "T", temperature_c + KELVIN, "P", NORMAL_PRESSURE, "Air") / 1e3


def water_enthalpy(temperature_c: float) -> float:
    """Specific enthalpy of liquid water at 3 bar, kJ/kg (CoolProp, IAPWS-95)."""
    from CoolProp.CoolProp import PropsSI

    return PropsSI("H", "T", temperature_c + KELVIN, "P", HEATING_CIRCUIT_PRESSURE, "Water") / 1e3


def primary_energy_savings(chp_heat_efficiency: float, chp_electrical_efficiency: float,
                           ref_heat_efficiency: float, ref_electrical_efficiency: float) -> float:
    """PES = 1 - 1 / (CHP H eta / Ref H eta + CHP E eta / Ref E eta), as a fraction.
    Directive 2012/27/EU, Annex II (b)."""
    return 1.0 - 1.0 / (chp_heat_efficiency / ref_heat_efficiency
                        + chp_electrical_efficiency / ref_electrical_efficiency)


class HeatRecovery(NamedTuple):
    jacket: float
    oil: float
    charge_air: float
    charge_air_recovered: float
    exhaust: float
    stack: float
    total: float


def heat_recovery(fuel_kw: float, shares: tuple[float, float, float], charge_air_recovered: bool,
                  exhaust_kg_h: float, fractions: Mapping[str, float], t_exh_in: float,
                  t_exh_out: float) -> HeatRecovery:
    """Heat streams in kW: shares of the fuel input, and the exhaust enthalpy drop
    Q = m (h(T1) - h(T2)) (steady-flow energy balance, Cengel & Boles 8th ed., eq. 5-38, as recalled)."""
    jw, lo, ca = (s * fuel_kw for s in shares)
    h_in = mixture_enthalpy(fractions, t_exh_in)
    h_out = mixture_enthalpy(fractions, t_exh_out)
    h_ref = mixture_enthalpy(fractions, REFERENCE_TEMPERATURE)
    q_exh = exhaust_kg_h / 3600.0 * (h_in - h_out)
    q_stack = exhaust_kg_h / 3600.0 * (h_out - h_ref)
    ca_rec = ca if charge_air_recovered else 0.0
    return HeatRecovery(jw, lo, ca, ca_rec, q_exh, q_stack, jw + lo + ca_rec + q_exh)


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iso6976", "ISO 6976:2016, Natural gas - Calculation of calorific values, density, "
              "relative density and Wobbe indices from composition, ISO, Geneva.",
              "Methane net calorific value 802.69 kJ/mol at 25 °C combustion reference over 16.043 g/mol "
              "= 50.03 MJ/kg (Tables 1 and 3, as recalled, from memory); mixture rule cl. 7 (as recalled)."),
    Reference("coolprop", "I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Pure and pseudo-pure fluid "
              "thermophysical property evaluation and the open-source thermophysical property library "
              "CoolProp, Ind. Eng. Chem. Res. 53 (6), 2014, pp. 2498-2508 (CoolProp 6.8.0).",
              "Methane (Setzmann and Wagner 1991), CO2 (Span and Wagner 1996), N2, O2, Ar, water (IAPWS-95)."),
    Reference("heywood", "J. B. Heywood, Internal Combustion Engine Fundamentals, McGraw-Hill, "
              "New York, 1988.",
              "§3.3 combustion stoichiometry, relative air-fuel ratio; section and equation numbers as recalled."),
    Reference("cengel", "Y. A. Cengel and M. A. Boles, Thermodynamics: An Engineering Approach, 8th ed., "
              "McGraw-Hill, New York, 2015.",
              "Steady-flow energy balance (ch. 5), ideal-gas mixtures (ch. 13); equation numbers as recalled."),
    Reference("eu2012_27", "Directive 2012/27/EU of the European Parliament and of the Council of "
              "25 October 2012 on energy efficiency, OJ L 315, 14.11.2012.",
              "Annex II (b) primary energy savings formula; Annex II (a) high-efficiency cogeneration: "
              "PES of at least 10 % for units of 1 MWe and more, positive PES for small-scale and "
              "micro units (as recalled). The directive applies PES to annual CHP-mode quantities; "
              "here it is evaluated at the load point."),
    Reference("eu2015_2402", "Commission Delegated Regulation (EU) 2015/2402 of 12 October 2015 reviewing "
              "harmonised efficiency reference values for separate production of electricity and heat, "
              "OJ L 333, 19.12.2015, Annexes I and II.",
              "As recalled: Ref E eta 53.0 % for natural gas and 42.0 % for biogas; Ref H eta for hot water "
              "92 % natural gas, 80 % biogas. The climate and grid-loss corrections of its Annexes III "
              "and IV are to be applied by the project to the reference values it enters."),
    Reference("practice", "Common engineering practice, no published source: screening values "
              "chosen in basisbook 0.1.0 (this module).",
              "Acid dew point limit, plausible total efficiency and radiation loss; confirm with the "
              "engine supplier."),
]

SPEC = CalcSpec(
    kind="engine_chp",
    discipline="conversion chains",
    title="Gas-engine CHP set: fuel, electricity, recovered heat and primary energy savings",
    purpose=(
        "Fix the fuel input of the gas-engine CHP set from its gas, the electricity and the heat "
        "recovered from jacket water, lube oil, charge air and exhaust, the heating-water flow, "
        "the electrical, thermal and total efficiencies, and the primary energy savings against "
        "separate production by the EU high-efficiency cogeneration formula."
    ),
    inputs=[
        Input("engine_electrical_output", range="[1, 20000]",
              note="link it to the generator's rated active power"),
        Input("fuel_input_basis", default="electrical_efficiency",
              choices=("electrical_efficiency", "gas_flow", "fuel_input")),
        Input("engine_electrical_efficiency_given", range="[0, 0.6]", default=0.0,
              note="used when the basis is electrical_efficiency"),
        Input("fuel_gas_flow", range="[0, 100000]", default=0.0, note="used when the basis is gas_flow"),
        Input("engine_fuel_input_given", range="[0, 60000]", default=0.0,
              note="used when the basis is fuel_input"),
        Input("methane_fraction", range="[0.3, 1]",
              note="the rest is taken as CO2 (inert); below about 0.3 (weak landfill gas) the gas "
                   "no longer fires an engine"),
        Input("methane_net_calorific_value", range="[45, 55]", default=50.03,
              note="ISO 6976:2016 Table 3 at 25 °C (as recalled, from memory)"),
        Input("jacket_water_heat_share", range="[0, 1)"),
        Input("lube_oil_heat_share", range="[0, 1)"),
        Input("charge_air_heat_share", range="[0, 1)", default=0.0),
        Input("charge_air_heat_recovery", default="not_recovered", choices=("not_recovered", "recovered"),
              note="the low-temperature charge-air stage is usually too cold for a heating circuit"),
        Input("exhaust_mass_flow", range="(0, 200000]"),
        Input("exhaust_temperature", range="(100, 800]"),
        Input("exhaust_outlet_temperature", range="(25, 600]"),
        Input("exhaust_dew_point_limit", range="[50, 250]", default=120.0,
              note="common practice for desulphurised biogas; raise it (150-180 °C) for gas with more H2S"),
        Input("heating_supply_temperature", range="(20, 140]"),
        Input("heating_return_temperature", range="(10, 130]"),
        Input("reference_electrical_efficiency", range="[0.2, 1]", default=0.42,
              note="Regulation (EU) 2015/2402 Annex I, biogas (as recalled); 0.53 for natural gas"),
        Input("reference_heat_efficiency", range="[0.5, 1]", default=0.80,
              note="Regulation (EU) 2015/2402 Annex II, biogas, hot water (as recalled); 0.92 for natural gas"),
    ],
    outputs=[
        Output("methane_normal_density"),
        Output("fuel_gas_net_calorific_value", key=True),
        Output("chp_fuel_input", key=True),
        Output("chp_fuel_gas_flow", key=True),
        Output("chp_electrical_efficiency", key=True),
        Output("fuel_gas_normal_density"),
        Output("chp_fuel_mass_flow"),
        Output("stoichiometric_air_fuel_ratio"),
        Output("excess_air_ratio"),
        Output("jacket_water_heat"),
        Output("lube_oil_heat"),
        Output("charge_air_heat"),
        Output("charge_air_heat_recovered"),
        Output("exhaust_enthalpy_drop"),
        Output("exhaust_heat_recovered"),
        Output("exhaust_stack_enthalpy"),
        Output("exhaust_stack_loss"),
        Output("chp_thermal_output", key=True),
        Output("chp_thermal_efficiency"),
        Output("chp_total_efficiency", key=True),
        Output("power_to_heat_ratio"),
        Output("heating_water_flow", key=True),
        Output("unaccounted_heat_loss"),
        Output("unaccounted_loss_share"),
        Output("exhaust_dew_point_margin"),
        Output("pes_threshold"),
        Output("separate_production_fuel_ratio"),
        Output("primary_energy_savings", key=True),
    ],
    steps=[
        Step("methane_normal_density", r"\rho\left(\mathrm{CH}_4;\ 0\,^{\circ}\mathrm{C},\ 101.325\ \mathrm{kPa}\right)",
             "coolprop", "Setzmann-Wagner equation of state for methane"),
        Step("fuel_gas_net_calorific_value",
             r"@methane_fraction\,@methane_normal_density\,@methane_net_calorific_value",
             "iso6976", "cl. 7, mixture rule (as recalled); CO2 inert"),
        Step("chp_fuel_input",
             r"\begin{cases} @engine_electrical_output / @engine_electrical_efficiency_given & "
             r"\text{basis: electrical efficiency} \\ @fuel_gas_flow\,@fuel_gas_net_calorific_value / 3.6 & "
             r"\text{basis: gas flow} \\ @engine_fuel_input_given & \text{basis: fuel input} \end{cases}",
             "cengel", "ch. 5, energy balance on net calorific value"),
        Step("chp_fuel_gas_flow", r"\frac{3.6\,@chp_fuel_input}{@fuel_gas_net_calorific_value}", "iso6976",
             "volume flow at normal conditions (ISO 13443 reference conditions)"),
        Step("chp_electrical_efficiency", r"\frac{@engine_electrical_output}{@chp_fuel_input}", "cengel",
             "ch. 5, efficiency as output over input"),
        Step("fuel_gas_normal_density",
             r"@methane_fraction\,@methane_normal_density + \left(1 - @methane_fraction\right)"
             r"\rho_{\mathrm{n,CO}_2}", "coolprop", "Span-Wagner equation of state for CO2 (ideal mixing by volume)"),
        Step("chp_fuel_mass_flow", r"@chp_fuel_gas_flow\,@fuel_gas_normal_density", "cengel", "ch. 5, mass flow"),
        Step("stoichiometric_air_fuel_ratio",
             r"\frac{2\,@methane_fraction / 0.20946 \cdot 28.96}"
             r"{16.043\,@methane_fraction + 44.010\left(1 - @methane_fraction\right)}",
             "heywood", "§3.3, CH4 + 2 O2 -> CO2 + 2 H2O, dry air 20.946 % O2"),
        Step("excess_air_ratio",
             r"\frac{@exhaust_mass_flow - @chp_fuel_mass_flow}{@stoichiometric_air_fuel_ratio\,@chp_fuel_mass_flow}",
             "heywood", "§3.3, relative air-fuel ratio from the mass balance"),
        Step("jacket_water_heat", r"@jacket_water_heat_share\,@chp_fuel_input", "cengel", "ch. 5"),
        Step("lube_oil_heat", r"@lube_oil_heat_share\,@chp_fuel_input", "cengel", "ch. 5"),
        Step("charge_air_heat", r"@charge_air_heat_share\,@chp_fuel_input", "cengel", "ch. 5"),
        Step("charge_air_heat_recovered",
             r"\begin{cases} @charge_air_heat & \text{recovered} \\ 0 & \text{not recovered} \end{cases}",
             "cengel", "ch. 5"),
        Step("exhaust_enthalpy_drop",
             r"\sum_i w_i\left[h_i(@exhaust_temperature) - h_i(@exhaust_outlet_temperature)\right]",
             "cengel", "ch. 13, ideal-gas mixture; w_i from complete combustion at the excess air ratio"),
        Step("exhaust_heat_recovered", r"\frac{@exhaust_mass_flow}{3600}\,@exhaust_enthalpy_drop",
             "cengel", "ch. 5, steady-flow energy balance"),
        Step("exhaust_stack_enthalpy",
             r"\sum_i w_i\left[h_i(@exhaust_outlet_temperature) - h_i(25\,^{\circ}\mathrm{C})\right]",
             "cengel", "ch. 13; 25 °C is the combustion reference of the net calorific value"),
        Step("exhaust_stack_loss", r"\frac{@exhaust_mass_flow}{3600}\,@exhaust_stack_enthalpy",
             "cengel", "ch. 5"),
        Step("chp_thermal_output",
             r"@jacket_water_heat + @lube_oil_heat + @charge_air_heat_recovered + @exhaust_heat_recovered",
             "cengel", "ch. 5"),
        Step("chp_thermal_efficiency", r"\frac{@chp_thermal_output}{@chp_fuel_input}", "eu2012_27",
             "Annex II (b), CHP H eta"),
        Step("chp_total_efficiency", r"@chp_electrical_efficiency + @chp_thermal_efficiency", "eu2012_27",
             "Annex II (b)"),
        Step("power_to_heat_ratio", r"\frac{@engine_electrical_output}{@chp_thermal_output}", "eu2012_27",
             "Annex I, power-to-heat ratio (as recalled)"),
        Step("heating_water_flow",
             r"\frac{3.6\,@chp_thermal_output}{h_\mathrm{w}(@heating_supply_temperature) - "
             r"h_\mathrm{w}(@heating_return_temperature)}", "cengel", "ch. 5; water enthalpy from CoolProp at 3 bar"),
        Step("unaccounted_heat_loss",
             r"@chp_fuel_input - @engine_electrical_output - @jacket_water_heat - @lube_oil_heat - "
             r"@charge_air_heat - @exhaust_heat_recovered - @exhaust_stack_loss", "cengel",
             "ch. 5, first law: what is left is radiation and unaccounted loss"),
        Step("unaccounted_loss_share", r"100\,\frac{@unaccounted_heat_loss}{@chp_fuel_input}", "cengel", "ch. 5"),
        Step("exhaust_dew_point_margin", r"@exhaust_outlet_temperature - @exhaust_dew_point_limit",
             "practice", "acid dew point with margin"),
        Step("pes_threshold",
             r"\begin{cases} 10\ \% & @engine_electrical_output \geq 1000\ \mathrm{kW} \\ 0\ \% & "
             r"\text{small-scale unit} \end{cases}", "eu2012_27", "Annex II (a) (as recalled)"),
        Step("separate_production_fuel_ratio",
             r"\frac{@chp_thermal_efficiency}{@reference_heat_efficiency} + "
             r"\frac{@chp_electrical_efficiency}{@reference_electrical_efficiency}",
             "eu2015_2402", "Annexes I and II reference values, in the sum of Directive 2012/27/EU Annex II (b)"),
        Step("primary_energy_savings", r"100\left(1 - \frac{1}{@separate_production_fuel_ratio}\right)",
             "eu2012_27", "Annex II (b)"),
    ],
    checks=[
        Check("exhaust_dew_point", "Exhaust leaves the heat exchanger above the acid dew-point limit",
              "exhaust_dew_point_margin", ">=", 0.0, "practice"),
        Check("energy_balance", "Energy balance closes: the declared outputs do not exceed the fuel input",
              "unaccounted_loss_share", ">=", 0.0, "cengel", "ch. 5, first law"),
        Check("radiation_loss", "Radiation and unaccounted loss at most 10 % of fuel input",
              "unaccounted_loss_share", "<=", 10.0, "practice", review_band=0.3),
        Check("total_efficiency", "Total efficiency plausible (at most 95 % on net calorific value)",
              "chp_total_efficiency", "<=", 0.95, "practice", review_band=0.05),
        Check("high_efficiency", "Primary energy savings qualify the unit as high-efficiency cogeneration",
              "primary_energy_savings", ">=", "pes_threshold", "eu2012_27", "Annex II (a)", review_band=0.2),
    ],
    references=REFERENCES,
    cautions=[
        "Fuel gas (biogas, natural gas) forms explosive mixtures with air; biogas also carries toxic "
        "hydrogen sulphide. Gas trains, engine rooms and exhaust systems need gas detection, "
        "ventilation and hazardous-area classification by the applicable codes.",
        "The exhaust system, heat exchangers and heating water are hot enough to burn; the exhaust "
        "contains carbon monoxide. Keep insulation, guarding and stack discharge as designed.",
        "Rotating machinery: isolate, lock and prove the engine at rest before any work on it or "
        "its generator.",
        "These figures are a design basis for review, not an engine supplier's data sheet. Defer to "
        "the local codes and to licensed engineering practice, and confirm every value against the "
        "supplier's guaranteed data.",
    ],
    figures=[
        FigureSpec("energy_flow", "Energy flow of the CHP set",
                   "Fuel input on net calorific value to electricity, recovered heat and losses at the load point."),
        FigureSpec("heat_vs_return", "Heat output against heating return temperature",
                   "Recovered heat if the heating return temperature changes and the exhaust heat "
                   "exchanger keeps its design cold-end difference (exhaust outlet minus return "
                   "temperature); jacket, oil and charge-air heat taken as constant (the engine's "
                   "cooling-water temperatures must allow the return temperature). Simplified model."),
    ],
    tables=[
        TableSpec("energy_balance", "Energy balance at the load point",
                  "Every stream as power and as a share of the fuel input."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def _fuel_input(v: Values, p_el: float, lhv_n: float) -> float:
    basis = v.fuel_input_basis
    if basis == "electrical_efficiency":
        eta = float(v.engine_electrical_efficiency_given)
        if eta == 0.0:
            raise InputConflict("engine_electrical_efficiency_given",
                                "fuel_input_basis is electrical_efficiency but no efficiency is given "
                                "(expected the data-sheet value, e.g. 0.40-0.44)")
        return p_el / eta
    if basis == "gas_flow":
        flow = float(v.fuel_gas_flow)
        if flow == 0.0:
            raise InputConflict("fuel_gas_flow", "fuel_input_basis is gas_flow but no gas flow is given "
                                "(expected m³/h at 0 °C, 101.325 kPa)")
        fuel = flow * lhv_n / 3.6
        key = "fuel_gas_flow"
    else:
        fuel = float(v.engine_fuel_input_given)
        key = "engine_fuel_input_given"
        if fuel == 0.0:
            raise InputConflict(key, "fuel_input_basis is fuel_input but no fuel input is given (kW)")
    if fuel <= p_el:
        raise InputConflict(key, f"the fuel input ({fuel:.0f} kW) is not larger than the electrical "
                            f"output ({p_el:.0f} kW): the electrical efficiency would be 100 % or more")
    return fuel


def compute(v: Values) -> Result:
    warnings: list[str] = []
    p_el = float(v.engine_electrical_output)
    x = float(v.methane_fraction)
    t_s, t_r = float(v.heating_supply_temperature), float(v.heating_return_temperature)
    t1, t2 = float(v.exhaust_temperature), float(v.exhaust_outlet_temperature)
    m_exh = float(v.exhaust_mass_flow)
    shares = (float(v.jacket_water_heat_share), float(v.lube_oil_heat_share), float(v.charge_air_heat_share))
    recovered = v.charge_air_heat_recovery == "recovered"

    if t_s <= t_r:
        raise InputConflict("heating_supply_temperature",
                            f"supply {t_s:g} °C is not above return {t_r:g} °C; the CHP set heats the water")
    if t2 >= t1:
        raise InputConflict("exhaust_outlet_temperature",
                            f"exhaust outlet {t2:g} °C is not below the exhaust inlet {t1:g} °C")
    if t2 <= t_r:
        raise InputConflict("exhaust_outlet_temperature",
                            f"exhaust outlet {t2:g} °C is not above the heating return temperature "
                            f"{t_r:g} °C; the heat exchanger cannot cool the gas below the water it heats")
    if x < 0.45:
        warnings.append(f"methane fraction {x:g} is below 0.45: most engines need a richer gas; check "
                        "with the engine supplier")

    rho_ch4 = normal_density("Methane")
    lhv_n = gas_net_calorific_value(x, rho_ch4, float(v.methane_net_calorific_value))
    fuel = _fuel_input(v, p_el, lhv_n)
    eta_el = p_el / fuel
    if eta_el < 0.15:
        key = {"gas_flow": "fuel_gas_flow", "fuel_input": "engine_fuel_input_given"}.get(
            v.fuel_input_basis, "engine_electrical_efficiency_given")
        raise InputConflict(key, f"the electrical efficiency would be {100 * eta_el:.1f} %; gas engine "
                            "generator sets reach 25-45 % at rated load, check the fuel data")
    share_sum = eta_el + sum(shares)
    if share_sum >= 1.0:
        raise InputConflict("jacket_water_heat_share",
                            f"electrical efficiency {eta_el:.3f} and the jacket-water, lube-oil and charge-air "
                            f"shares ({', '.join(f'{s:g}' for s in shares)}) sum to {100 * share_sum:.1f} % of "
                            "the fuel input, at or above 100 %; no energy would be left for the exhaust")

    gas_flow = 3.6 * fuel / lhv_n
    rho_gas = x * rho_ch4 + (1.0 - x) * normal_density("CarbonDioxide")
    m_fuel = gas_flow * rho_gas
    a_st = stoichiometric_air_fuel_ratio(x)
    lam = (m_exh - m_fuel) / (a_st * m_fuel)
    if lam < 1.0:
        raise InputConflict("exhaust_mass_flow",
                            f"exhaust mass flow {m_exh:.0f} kg/h is less than the fuel gas ({m_fuel:.0f} kg/h) "
                            f"plus its stoichiometric air; the excess air ratio would be {lam:.2f} < 1")
    if lam > 3.0:
        warnings.append(f"excess air ratio {lam:.2f} is unusually high for a gas engine (lean-burn "
                        "engines run at about 1.6-2.0); check the exhaust mass flow")
    fractions = exhaust_mass_fractions(x, lam)
    hr = heat_recovery(fuel, shares, recovered, m_exh, fractions, t1, t2)
    dh_exh = mixture_enthalpy(fractions, t1) - mixture_enthalpy(fractions, t2)
    dh_stack = mixture_enthalpy(fractions, t2) - mixture_enthalpy(fractions, REFERENCE_TEMPERATURE)
    q_th = hr.total
    eta_th = q_th / fuel
    m_hw = 3.6 * q_th / (water_enthalpy(t_s) - water_enthalpy(t_r))
    if p_el + q_th > fuel:
        # the stack always carries heat away, so useful outputs above the fuel input break the
        # first law whatever the rounding of the data sheet (a smaller mismatch is the check's job)
        raise InputConflict("exhaust_mass_flow",
                            f"electricity ({p_el:.0f} kW) and recovered heat ({q_th:.0f} kW, of which "
                            f"{hr.exhaust:.0f} kW from {m_exh:.0f} kg/h of exhaust) exceed the fuel input "
                            f"({fuel:.0f} kW): check the exhaust mass flow and temperatures")
    unaccounted = fuel - p_el - hr.jacket - hr.oil - hr.charge_air - hr.exhaust - hr.stack
    if unaccounted < 0:
        warnings.append(f"the declared outputs exceed the fuel input by {-unaccounted:.0f} kW: check the "
                        "heat shares, exhaust mass flow and temperatures against the data sheet")
    pes_min = 10.0 if p_el >= 1000.0 else 0.0
    pes = 100.0 * primary_energy_savings(eta_th, eta_el, float(v.reference_heat_efficiency),
                                         float(v.reference_electrical_efficiency))
    ratio = eta_th / float(v.reference_heat_efficiency) + eta_el / float(v.reference_electrical_efficiency)

    outputs: dict[str, float | str] = {
        "methane_normal_density": rho_ch4,
        "fuel_gas_net_calorific_value": lhv_n,
        "chp_fuel_input": fuel,
        "chp_fuel_gas_flow": gas_flow,
        "chp_electrical_efficiency": eta_el,
        "fuel_gas_normal_density": rho_gas,
        "chp_fuel_mass_flow": m_fuel,
        "stoichiometric_air_fuel_ratio": a_st,
        "excess_air_ratio": lam,
        "jacket_water_heat": hr.jacket,
        "lube_oil_heat": hr.oil,
        "charge_air_heat": hr.charge_air,
        "charge_air_heat_recovered": hr.charge_air_recovered,
        "exhaust_enthalpy_drop": dh_exh,
        "exhaust_heat_recovered": hr.exhaust,
        "exhaust_stack_enthalpy": dh_stack,
        "exhaust_stack_loss": hr.stack,
        "chp_thermal_output": q_th,
        "chp_thermal_efficiency": eta_th,
        "chp_total_efficiency": eta_el + eta_th,
        "power_to_heat_ratio": p_el / q_th if q_th > 0 else 0.0,
        "heating_water_flow": m_hw,
        "unaccounted_heat_loss": unaccounted,
        "unaccounted_loss_share": 100.0 * unaccounted / fuel,
        "exhaust_dew_point_margin": t2 - float(v.exhaust_dew_point_limit),
        "pes_threshold": pes_min,
        "separate_production_fuel_ratio": ratio,
        "primary_energy_savings": pes,
    }
    if q_th == 0.0:
        warnings.append("no heat is recovered: the power-to-heat ratio is shown as 0")

    flow = EnergyFlow(
        unit="kW",
        inflows=[("Fuel gas (net calorific value)", fuel)],
        outflows=[
            ("Electricity", p_el, "product"),
            ("Jacket-water heat", hr.jacket, "product"),
            ("Lube-oil heat", hr.oil, "product"),
            *([("Charge-air heat", hr.charge_air, "product")] if recovered and hr.charge_air > 0 else []),
            ("Exhaust heat", hr.exhaust, "product"),
            *([("Charge-air heat to dump cooler", hr.charge_air, "loss")]
              if not recovered and hr.charge_air > 0 else []),
            ("Exhaust to stack", hr.stack, "loss"),
            # a negative residual is reported by the energy-balance check; the figure cannot draw it
            ("Radiation and unaccounted", max(unaccounted, 0.0), "loss"),
        ],
    )
    rows = [[label, val, 100.0 * val / fuel] for label, val in (
        ("Fuel input", fuel), ("Electricity", p_el), ("Jacket-water heat", hr.jacket),
        ("Lube-oil heat", hr.oil), ("Charge-air heat" + (" (recovered)" if recovered else " (dump cooler)"),
                                    hr.charge_air),
        ("Exhaust heat recovered", hr.exhaust), ("Exhaust to stack (above 25 °C)", hr.stack),
        ("Radiation and unaccounted", unaccounted), ("Useful heat, total", q_th))]
    table = Table(columns=[("Stream", ""), ("Power", "kW"), ("Share of fuel input", "%")], rows=rows)

    charts: dict[str, Chart | EnergyFlow] = {"energy_flow": flow,
                                             "heat_vs_return": _heat_vs_return(hr, fractions, m_exh, t1, t2, t_r,
                                                                               t_s, float(v.exhaust_dew_point_limit))}
    return Result(outputs=outputs, charts=charts, tables={"energy_balance": table}, warnings=warnings)


def _heat_vs_return(hr: HeatRecovery, fractions: Mapping[str, float], m_exh: float, t1: float, t2: float,
                    t_r: float, t_s: float, t_dew: float) -> Chart:
    """Heat output over a range of return temperatures, cold-end difference t2 - t_r kept."""
    approach = t2 - t_r
    lo, hi = max(15.0, t_r - 30.0), min(t_s - 2.0, t_r + 20.0, t1 - approach - 1.0)
    n = 26
    xs = [lo + (hi - lo) * k / (n - 1) for k in range(n)]
    h1 = mixture_enthalpy(fractions, t1)
    cooling = hr.jacket + hr.oil + hr.charge_air_recovered
    exh = [m_exh / 3600.0 * (h1 - mixture_enthalpy(fractions, x + approach)) for x in xs]
    markers = [Marker("Design point", t_r, hr.total)]
    t_r_dew = t_dew - approach  # return temperature at which the exhaust outlet meets the limit
    if lo <= t_r_dew <= hi:
        q_dew = cooling + m_exh / 3600.0 * (h1 - mixture_enthalpy(fractions, t_dew))
        markers.append(Marker("Exhaust outlet at the dew-point limit", t_r_dew, q_dew))
    return Chart(
        x_range=(lo, hi),
        x_label="Heating return temperature (°C)",
        y_label="Heat output (kW)",
        series=[
            Series("Total useful heat", xs, [cooling + e for e in exh]),
            Series("Exhaust heat", xs, exh, style="dashed"),
            Series("Jacket, oil and charge-air heat", xs, [cooling] * n, style="dotted"),
        ],
        markers=markers,
    )


# ---------------------------------------------------------------------------
# Checks against published numbers (run by the tests and shown in the
# handbook's verification appendix)
# ---------------------------------------------------------------------------


def _methane_lhv_volumetric() -> float:
    return gas_net_calorific_value(1.0, normal_density("Methane"), 50.03)


PUBLISHED_CASES = [
    PublishedCase("methane net calorific value per normal cubic metre",
                  "DVGW G 260 / ISO 6976 tables, methane H_i,n = 35.88 MJ/m³ at 0 °C, 101.325 kPa (from memory)",
                  35.88, "MJ/m³", 0.05, "the table prints 4 digits; 0.05 covers the last one and the "
                  "real-gas density used here", _methane_lhv_volumetric),
    PublishedCase("methane density at normal conditions",
                  "ISO 6976 tables / gas handbooks, methane 0.7175 kg/m³ at 0 °C, 101.325 kPa (from memory)",
                  0.7175, "kg/m³", 0.0005, "the table prints 4 digits", lambda: normal_density("Methane")),
    PublishedCase("stoichiometric air-fuel ratio of methane",
                  "Heywood, Internal Combustion Engine Fundamentals, 1988, App. D fuel data, (A/F)s = 17.2 "
                  "(from memory)", 17.2, "kg/kg", 0.05, "the book prints 3 digits",
                  lambda: stoichiometric_air_fuel_ratio(1.0)),
    PublishedCase("primary energy savings, worked case",
                  "Directive 2012/27/EU Annex II (b) formula evaluated by hand (from memory of the formula): "
                  "CHP H eta 0.45, CHP E eta 0.40, Ref H eta 0.90, Ref E eta 0.525 gives PES = 20.75 %",
                  20.75, "%", 0.005, "hand calculation to 4 digits",
                  lambda: 100.0 * primary_energy_savings(0.45, 0.40, 0.90, 0.525)),
]
