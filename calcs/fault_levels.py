"""Fault levels (IEC 60909-0), largest-motor start, reactive capability at the
grid connection, and the key single-line diagram of the unit.

The network is the usual unit connection: grid -- step-up transformer (GSU) --
generator bus (generator through its circuit breaker, unit auxiliary
transformer UAT) -- auxiliary board with its motors.  Impedances are complex
ohms referred to the voltage of the bus in question; the IEC 60909 equivalent
voltage source c U_n / sqrt(3) drives them.  The generator and GSU form a
power-station unit, so the standard's unit correction factors (K_S or K_SO for
a fault on the HV side, K_G,S and K_T,S for a fault between generator and GSU)
apply instead of K_G and the network-transformer factor K_T; the UAT is a
network transformer (K_T).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Chart,
    Check,
    FigureSpec,
    Input,
    LineElement,
    Marker,
    Output,
    PublishedCase,
    Reference,
    Result,
    Series,
    SingleLine,
    Step,
    Table,
    TableSpec,
    Values,
)

SQRT3 = math.sqrt(3.0)

# ---------------------------------------------------------------------------
# IEC 60909-0:2016 models, one function each (clause and equation numbers as recalled)
# ---------------------------------------------------------------------------


def voltage_factor(nominal_kv: float, lv_factor: float, mv_factor: float) -> float:
    """c_max of Table 1: 1.05 (LV, +6 % tolerance) or 1.10 (LV +10 %) up to 1 kV, 1.10 above."""
    return lv_factor if nominal_kv <= 1.0 else mv_factor


def network_feeder_impedance(c: float, nominal_kv: float, fault_level_mva: float, r_over_x: float) -> complex:
    """Z_Q = c U_nQ^2 / S''_kQ (eq. 1 with S''_kQ = sqrt(3) U_nQ I''_kQ), X_Q = Z_Q / sqrt(1 + (R/X)^2)."""
    z = c * nominal_kv**2 / fault_level_mva
    x = z / math.sqrt(1.0 + r_over_x**2)
    return complex(r_over_x * x, x)


def transformer_impedance(uk_percent: float, ur_percent: float, rated_kv: float, rated_mva: float) -> complex:
    """Z_T = u_kr U_rT^2 / (100 S_rT), R_T = u_Rr U_rT^2 / (100 S_rT) (eq. 7, 8), X_T from eq. 9."""
    base = rated_kv**2 / rated_mva
    return complex(ur_percent / 100.0 * base, math.sqrt(uk_percent**2 - ur_percent**2) / 100.0 * base)


def network_transformer_correction(c_max: float, x_t: float) -> float:
    """K_T = 0.95 c_max / (1 + 0.6 x_T), x_T in pu on the transformer rating (eq. 12a)."""
    return 0.95 * c_max / (1.0 + 0.6 * x_t)


def generator_resistance_ratio(rated_kv: float, rated_mva: float) -> float:
    """R_Gf / X''_d of cl. 6.6.1: 0.05 (U_rG > 1 kV, S_rG >= 100 MVA), 0.07 (U_rG > 1 kV,
    S_rG < 100 MVA), 0.15 (U_rG <= 1 kV)."""
    if rated_kv <= 1.0:
        return 0.15
    return 0.05 if rated_mva >= 100.0 else 0.07


def generator_impedance(x_dss: float, rated_kv: float, rated_mva: float) -> complex:
    """Z_G = R_Gf + j X''_d, X''_d = x''_d U_rG^2 / S_rG (cl. 6.6.1)."""
    x = x_dss * rated_kv**2 / rated_mva
    return complex(generator_resistance_ratio(rated_kv, rated_mva) * x, x)


def generator_correction(c_max: float, x_dss: float, power_factor: float, nominal_kv: float,
                         rated_kv: float) -> float:
    """K_G = (U_n / U_rG) c_max / (1 + x''_d sin phi_rG) (eq. 18): a generator connected directly."""
    return nominal_kv / rated_kv * c_max / (1.0 + x_dss * math.sqrt(1.0 - power_factor**2))


def unit_correction_on_load(c_max: float, x_dss: float, x_t: float, power_factor: float,
                            grid_kv: float, hv_kv: float, lv_kv: float, gen_kv: float) -> float:
    """K_S = (U_nQ^2/U_rTHV^2)(U_rTLV^2/U_rG^2) c_max / (1 + |x''_d - x_T| sin phi_rG):
    power-station unit with on-load tap changer, fault on the HV side (cl. 6.7.1, eq. 22)."""
    sin = math.sqrt(1.0 - power_factor**2)
    return (grid_kv / hv_kv) ** 2 * (lv_kv / gen_kv) ** 2 * c_max / (1.0 + abs(x_dss - x_t) * sin)


def unit_correction_off_load(c_max: float, x_dss: float, power_factor: float, grid_kv: float,
                             hv_kv: float, lv_kv: float, gen_kv: float) -> float:
    """K_SO = U_nQ/U_rG · U_rTLV/U_rTHV · c_max / (1 + x''_d sin phi_rG): unit without on-load tap
    changer, taps at the rated ratio (p_G = p_T = 0) (cl. 6.7.2, eq. 24)."""
    return grid_kv / gen_kv * lv_kv / hv_kv * c_max / (1.0 + x_dss * math.sqrt(1.0 - power_factor**2))


def unit_generator_correction(c_max: float, x_dss: float, power_factor: float) -> float:
    """K_G,S = c_max / (1 + x''_d sin phi_rG): generator partial current for a fault between
    generator and unit transformer (cl. 6.7.1, as recalled)."""
    return c_max / (1.0 + x_dss * math.sqrt(1.0 - power_factor**2))


def unit_transformer_correction(c_max: float, x_t: float, power_factor: float) -> float:
    """K_T,S = c_max / (1 - x_T sin phi_rG): network partial current through the unit
    transformer for a fault between generator and unit transformer (cl. 6.7.1, as recalled)."""
    return c_max / (1.0 - x_t * math.sqrt(1.0 - power_factor**2))


def motor_group_impedance(current_ratio: float, rated_kv: float, rated_mva: float, r_over_x: float) -> complex:
    """Z_M = (1 / (I_LR/I_rM)) U_rM^2 / S_rM (cl. 6.8, eq. 26 as recalled), X_M = Z_M / sqrt(1 + (R/X)^2)."""
    z = rated_kv**2 / (current_ratio * rated_mva)
    x = z / math.sqrt(1.0 + r_over_x**2)
    return complex(r_over_x * x, x)


def motor_resistance_ratio(rated_kv: float) -> float:
    """R_M/X_M of cl. 6.8: 0.42 for LV motor groups with their cables, 0.15 for MV motors
    of less than 1 MW per pole pair (as recalled)."""
    return 0.42 if rated_kv <= 1.0 else 0.15


def initial_current(c: float, nominal_kv: float, z: complex) -> float:
    """I''_k = c U_n / (sqrt(3) |Z_k|) in kA (eq. 29)."""
    return c * nominal_kv / (SQRT3 * abs(z))


def peak_factor(z: complex) -> float:
    """kappa = 1.02 + 0.98 exp(-3 R/X) (eq. 55)."""
    return 1.02 + 0.98 * math.exp(-3.0 * z.real / z.imag)


def parallel(*zs: complex) -> complex:
    return 1.0 / sum(1.0 / z for z in zs)


@dataclass(frozen=True)
class Branch:
    """A partial short-circuit current and its peak, kA."""

    name: str
    impedance: complex
    current: float
    kappa: float

    @property
    def peak(self) -> float:
        return self.kappa * math.sqrt(2.0) * self.current


def branch(name: str, c: float, nominal_kv: float, z: complex) -> Branch:
    return Branch(name, z, initial_current(c, nominal_kv, z), peak_factor(z))


def motor_start_voltages(z_source: complex, base_p: float, base_q: float, start_s: float,
                         start_pf: float, bus_kv: float) -> tuple[float, float]:
    """(bus voltage before, during the start) in pu of the source EMF: impedance method of
    IEEE Std 399-1997 ch. 9 (as recalled).  Running load and locked rotor as constant
    impedances Z = U^2 / S* (U in kV, S in MVA/Mvar, Z in ohm); z_source in ohm at bus_kv."""
    # worked in admittances Y = S* / U^2 (= 1/Z): a vanishing load is Y -> 0, not Z -> inf
    # (Z = U^2/S* overflowed for a load of a few watts and the divider gave NaN)
    y_load = complex(base_p, -base_q) / bus_kv**2
    sin = math.sqrt(1.0 - start_pf**2)
    y_motor = complex(start_s * start_pf, -start_s * sin) / bus_kv**2

    def divide(y_l: complex) -> float:
        # |Z_l / (Z_s + Z_l)| = 1 / |1 + Z_s Y_l|
        return 1.0 / abs(1.0 + z_source * y_l)

    return divide(y_load), divide(y_load + y_motor)


def capability_pq(p: float, s_r: float, x_d: float, e_0: float) -> tuple[float, float]:
    """(Q_max, Q_min) in Mvar at P (MW) for a round-rotor generator at 1 pu voltage: stator circle,
    field circle about (-S/x_d, 0) of radius E_0 S / x_d, theoretical stability line Q = -S/x_d
    (Kundur 1994, §5.4)."""
    stator = math.sqrt(max(0.0, s_r * s_r - p * p))
    r_f = e_0 * s_r / x_d
    field = math.sqrt(max(0.0, r_f * r_f - p * p)) - s_r / x_d
    return min(stator, field), max(-stator, -s_r / x_d)


def through_transformer(p: float, q: float, u_r: float, u_x: float, s_t: float) -> tuple[float, float]:
    """(P, Q) at the HV terminals: less the series losses I^2 R and I^2 X with I = S / U at 1 pu
    (Grainger and Stevenson, Power System Analysis, 1994, ch. 2, as recalled); magnetising
    power neglected."""
    s2 = (p * p + q * q) / s_t
    return p - u_r / 100.0 * s2, q - u_x / 100.0 * s2


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iec60909", "IEC 60909-0:2016, Short-circuit currents in three-phase a.c. systems - "
              "Part 0: Calculation of currents, International Electrotechnical Commission, Geneva.",
              "Table 1 voltage factor; cl. 6.2 network feeder; cl. 6.3 transformers, eq. 12a K_T; "
              "cl. 6.6 generators, eq. 18 K_G; cl. 6.7 power-station units (K_S, K_SO, K_G,S, K_T,S); "
              "cl. 6.8 motors; eq. 29 I''_k; eq. 55 kappa; clause and equation numbers as recalled."),
    Reference("ieee399", "IEEE Std 399-1997, IEEE Recommended Practice for Industrial and Commercial "
              "Power Systems Analysis (Brown Book), IEEE, New York, 1998.",
              "Ch. 9 motor-starting studies, impedance method (as recalled)."),
    Reference("kundur", "P. Kundur, Power System Stability and Control, McGraw-Hill, New York, 1994.",
              "§5.4 capability curves of a round-rotor generator (as recalled)."),
    Reference("grainger", "J. J. Grainger and W. D. Stevenson, Power System Analysis, McGraw-Hill, "
              "New York, 1994.", "Ch. 2: complex power absorbed by a series impedance (as recalled)."),
    Reference("practice", "Common engineering practice, no published source.",
              "Screening limits: 80 % bus voltage during a motor start; switchgear compared with I''_k "
              "(conservative, as the breaking current I_b <= I''_k)."),
]


def _ratings(prefix: str, title: str) -> list[Input]:
    return [Input(f"{prefix}_switchgear_breaking_current", range="[1, 300]",
                  note=f"rated short-circuit breaking current of the {title} switchgear"),
            Input(f"{prefix}_switchgear_making_current", range="[2.5, 800]",
                  note=f"rated short-circuit making (peak) current of the {title} switchgear")]


SPEC = CalcSpec(
    kind="fault_levels",
    discipline="fault levels",
    title="Fault levels, motor start, grid-connection reactive capability and key single-line diagram",
    purpose=(
        "Find the initial symmetrical and peak short-circuit currents at the grid connection, the "
        "generator bus and the auxiliary board by the IEC 60909 method and check them against the "
        "switchgear ratings; find the auxiliary-board voltage while the largest motor starts on "
        "back-feed from the grid; carry the generator capability chart through the step-up "
        "transformer to the grid connection and compare it with the required power-factor range; "
        "draw the unit's key single-line diagram."
    ),
    inputs=[
        Input("grid_voltage", range="[1, 1200]", note="nominal system voltage U_nQ, usually from the site"),
        Input("grid_fault_level", range="[1, 100000]", note="maximum, as stated by the network operator"),
        Input("grid_resistance_ratio", range="[0, 2]", default=0.1,
              note="IEC 60909-0 cl. 6.2 allows R_Q = 0.1 X_Q when unknown"),
        Input("voltage_factor_mv", range="[1, 1.1]", default=1.1, note="IEC 60909-0 Table 1, above 1 kV"),
        Input("voltage_factor_lv", range="[1, 1.1]", default=1.05,
              note="IEC 60909-0 Table 1: 1.05 (+6 % tolerance) or 1.10 (+10 %)"),
        Input("step_up_rated_power", range="[0.1, 2000]"),
        Input("step_up_short_circuit_impedance", range="[1, 30]"),
        Input("step_up_resistive_impedance", range="[0, 10]"),
        Input("step_up_hv_voltage", range="[1, 800]"),
        Input("step_up_lv_voltage", range="[0.1, 800]"),
        Input("step_up_tap_changer", choices=("on_load", "off_circuit")),
        Input("generator_apparent_power", range="[0.01, 2000]"),
        Input("generator_active_power", range="[0.01, 2000]"),
        Input("generator_voltage", range="[0.1, 30]"),
        Input("generator_power_factor", range="[0.5, 1]"),
        Input("subtransient_reactance", range="[0.05, 1]", note="saturated value, IEC 60034-4-1"),
        Input("direct_axis_reactance", range="[0.1, 10]"),
        Input("internal_emf", range="[0.5, 10]", note="excitation EMF at the rated point (field limit)"),
        Input("prime_mover_rating", range="[0.01, 2000]"),
        Input("auxiliary_transformer_rated_power", range="[0.01, 2000]"),
        Input("auxiliary_transformer_short_circuit_impedance", range="[1, 30]"),
        Input("auxiliary_transformer_resistive_impedance", range="[0, 10]"),
        Input("auxiliary_transformer_hv_voltage", range="[0.4, 800]"),
        Input("auxiliary_transformer_lv_voltage", range="[0.1, 800]"),
        Input("maximum_demand_active", range="[0, 1e6]"),
        Input("maximum_demand_reactive", range="[-1e6, 1e6]"),
        Input("running_motor_apparent_power", range="[0, 1e6]"),
        Input("motor_group_current_ratio", range="[0, 12]"),
        Input("largest_motor_starting_power", range="[0, 1e6]"),
        Input("largest_motor_starting_power_factor", range="[0.05, 1]"),
        Input("motor_start_base_active_load", range="[0, 1e6]"),
        Input("motor_start_base_reactive_load", range="[-1e6, 1e6]"),
        Input("motor_start_voltage_limit", range="(0, 100]", default=80.0,
              note="common practice: 80 % at the board for a direct-on-line start"),
        *_ratings("hv", "grid-connection (HV)"),
        *_ratings("generator", "generator-bus"),
        *_ratings("auxiliary", "auxiliary-board"),
        Input("required_power_factor_lagging", range="[0.5, 1]", default=0.95,
              note="at the connection point, delivering reactive power"),
        Input("required_power_factor_leading", range="[0.5, 1]", default=0.95,
              note="at the connection point, absorbing reactive power"),
    ],
    outputs=[
        Output("grid_impedance"),
        Output("step_up_impedance"),
        Output("generator_subtransient_impedance"),
        Output("step_up_unit_correction"),
        Output("unit_generator_correction"),
        Output("unit_transformer_correction"),
        Output("auxiliary_transformer_correction"),
        Output("hv_fault_current", key=True),
        Output("hv_peak_current"),
        Output("generator_partial_current"),
        Output("network_partial_current"),
        Output("generator_bus_fault_current", key=True),
        Output("generator_bus_peak_current"),
        Output("motor_partial_current"),
        Output("auxiliary_bus_fault_current", key=True),
        Output("auxiliary_bus_peak_current"),
        Output("backfeed_source_impedance"),
        Output("voltage_before_motor_start"),
        Output("voltage_during_motor_start", key=True),
        Output("motor_start_voltage_dip"),
        Output("connection_active_power"),
        Output("connection_reactive_lagging"),
        Output("connection_reactive_leading"),
        Output("required_reactive_lagging"),
        Output("required_reactive_leading"),
        Output("lagging_reactive_margin", key=True),
        Output("leading_reactive_margin", key=True),
    ],
    steps=[
        Step("grid_impedance", r"\frac{@voltage_factor_mv\,@grid_voltage^{2}}{@grid_fault_level}", "iec60909",
             "cl. 6.2, eq. 1", note="|Z_Q| at U_nQ; X_Q = Z_Q/√(1 + (R/X)²)"),
        Step("step_up_impedance",
             r"\frac{@step_up_short_circuit_impedance}{100}\,\frac{@step_up_hv_voltage^{2}}{@step_up_rated_power}",
             "iec60909", "cl. 6.3.1, eq. 7 (at the HV side)"),
        Step("generator_subtransient_impedance",
             r"@subtransient_reactance\,\frac{@generator_voltage^{2}}{@generator_apparent_power}",
             "iec60909", "cl. 6.6.1 (X''_d; R_Gf = 0.05/0.07/0.15 X''_d by rating)"),
        Step("step_up_unit_correction",
             r"\begin{cases} \frac{@grid_voltage^{2}}{@step_up_hv_voltage^{2}}\,"
             r"\frac{@step_up_lv_voltage^{2}}{@generator_voltage^{2}}\,"
             r"\frac{@voltage_factor_mv}{1 + |@subtransient_reactance - x_\mathrm{T}|\sin\varphi_\mathrm{rG}}"
             r" & \text{on-load taps } (K_\mathrm{S}) \\ \frac{@grid_voltage}{@generator_voltage}\,"
             r"\frac{@step_up_lv_voltage}{@step_up_hv_voltage}\,"
             r"\frac{@voltage_factor_mv}{1 + @subtransient_reactance\sin\varphi_\mathrm{rG}} & "
             r"\text{off-circuit taps } (K_\mathrm{SO}) \end{cases}",
             "iec60909", "cl. 6.7.1 eq. 22 / cl. 6.7.2 eq. 24 (as recalled)",
             note="x_T = u_X/100 of the GSU; the unit impedance K (t_r² Z_G + Z_THV) feeds a fault on the HV side"),
        Step("unit_generator_correction",
             r"\frac{@voltage_factor_mv}{1 + @subtransient_reactance\sqrt{1 - @generator_power_factor^{2}}}",
             "iec60909", "cl. 6.7.1, K_G,S (as recalled)"),
        Step("unit_transformer_correction",
             r"\frac{@voltage_factor_mv}{1 - x_\mathrm{T}\sqrt{1 - @generator_power_factor^{2}}}",
             "iec60909", "cl. 6.7.1, K_T,S (as recalled)", note="x_T of the GSU"),
        Step("auxiliary_transformer_correction", r"\frac{0.95\,@voltage_factor_mv}{1 + 0.6\,x_\mathrm{T,aux}}",
             "iec60909", "cl. 6.3.3, eq. 12a", note="x_T,aux = u_X/100 of the UAT"),
        Step("hv_fault_current",
             r"\frac{@voltage_factor_mv\,@grid_voltage}{\sqrt{3}\,\left|Z_\mathrm{Q} \parallel "
             r"@step_up_unit_correction\,(t_\mathrm{r}^{2} Z_\mathrm{G} + Z_\mathrm{THV})\right|}",
             "iec60909", "eq. 29 with cl. 6.7.1", note="aux motors behind two transformers neglected"),
        Step("hv_peak_current", r"\sum_{i} \left(1.02 + 0.98\,e^{-3R_i/X_i}\right)\sqrt{2}\,I''_{\mathrm{k}i}",
             "iec60909", "eq. 55 per branch, partial peaks summed (cl. 8.1, as recalled)"),
        Step("generator_partial_current",
             r"\frac{@voltage_factor_mv\,@generator_voltage}{\sqrt{3}\,\left|@unit_generator_correction\,"
             r"Z_\mathrm{G}\right|}", "iec60909", "cl. 6.7.1, eq. 29",
             note="the current the generator circuit breaker interrupts for a fault on the GSU side"),
        Step("network_partial_current",
             r"\frac{@voltage_factor_mv\,@generator_voltage}{\sqrt{3}\,\left|@unit_transformer_correction\,"
             r"Z_\mathrm{TLV} + Z_\mathrm{Q}/t_\mathrm{r}^{2}\right|}", "iec60909", "cl. 6.7.1, eq. 29"),
        Step("motor_partial_current",
             r"\frac{c\,U_\mathrm{n,aux}}{\sqrt{3}\,\left|Z_\mathrm{M}\right|},\quad Z_\mathrm{M} = "
             r"\frac{U_\mathrm{n,aux}^{2}}{@motor_group_current_ratio\,@running_motor_apparent_power \cdot 10^{-3}}",
             "iec60909", "cl. 6.8 (R_M/X_M = 0.42 LV, 0.15 MV)", note="the running motors of the load list "
             "as one group at the auxiliary board"),
        Step("generator_bus_fault_current",
             r"\frac{@voltage_factor_mv\,@generator_voltage}{\sqrt{3}\,\left|@unit_generator_correction Z_\mathrm{G}"
             r" \parallel (@unit_transformer_correction Z_\mathrm{TLV} + Z_\mathrm{Q}/t_\mathrm{r}^{2}) \parallel "
             r"t_\mathrm{aux}^{2}(Z_\mathrm{M} + @auxiliary_transformer_correction Z_\mathrm{T,aux})\right|}",
             "iec60909", "cl. 6.7.1, eq. 29"),
        Step("generator_bus_peak_current", r"\sum_{i} \kappa_i\sqrt{2}\,I''_{\mathrm{k}i}", "iec60909",
             "eq. 55 per branch (generator, network, motors)"),
        Step("auxiliary_bus_fault_current",
             r"\frac{c\,U_\mathrm{n,aux}}{\sqrt{3}\,\left|\left(Z_\mathrm{gen\,bus}/t_\mathrm{aux}^{2} + "
             r"@auxiliary_transformer_correction\,Z_\mathrm{T,aux}\right) \parallel Z_\mathrm{M}\right|}",
             "iec60909", "cl. 6.3.3, 6.8, eq. 29", note="c from Table 1 for the board's voltage; "
             "Z_gen bus from the generator and network branches above"),
        Step("auxiliary_bus_peak_current", r"\sum_{i} \kappa_i\sqrt{2}\,I''_{\mathrm{k}i}", "iec60909",
             "eq. 55 per branch (supply, motors)"),
        Step("backfeed_source_impedance",
             r"\left|\frac{Z_\mathrm{Q}}{c} + Z_\mathrm{THV} \right| t_\mathrm{aux}^{-2}t_\mathrm{r}^{-2}"
             r" + \left|Z_\mathrm{T,aux}\right|", "ieee399",
             "ch. 9: generator off line, auxiliaries back-fed from the grid (no correction factors)",
             note="shown as magnitudes; the calculation adds the complex impedances"),
        Step("voltage_before_motor_start",
             r"100\left|\frac{Z_\mathrm{L}}{@backfeed_source_impedance + Z_\mathrm{L}}\right|,\quad "
             r"Z_\mathrm{L} = \frac{U_\mathrm{n,aux}^{2}}{(@motor_start_base_active_load - j\,"
             r"@motor_start_base_reactive_load)\cdot 10^{-3}}", "ieee399", "ch. 9, impedance method (as recalled)"),
        Step("voltage_during_motor_start",
             r"100\left|\frac{Z_\mathrm{L}\parallel Z_\mathrm{LR}}{@backfeed_source_impedance + "
             r"Z_\mathrm{L}\parallel Z_\mathrm{LR}}\right|,\quad Z_\mathrm{LR} = "
             r"\frac{U_\mathrm{n,aux}^{2}}{@largest_motor_starting_power\cdot 10^{-3}\,"
             r"(@largest_motor_starting_power_factor - j\sin\varphi_\mathrm{LR})}",
             "ieee399", "ch. 9, impedance method (as recalled)"),
        Step("motor_start_voltage_dip",
             r"100\left(1 - \frac{@voltage_during_motor_start}{@voltage_before_motor_start}\right)",
             "ieee399", "ch. 9"),
        Step("connection_active_power",
             r"P_\mathrm{r} - \frac{@maximum_demand_active}{10^{3}} - \frac{u_\mathrm{R}}{100}"
             r"\frac{S_{1}^{2}}{@step_up_rated_power}", "grainger", "ch. 2 (I²R of the GSU)",
             note="at the lagging limit; S₁ = the power entering the GSU"),
        Step("connection_reactive_lagging",
             r"Q_{\max}(P_\mathrm{r}) - \frac{@maximum_demand_reactive}{10^{3}} - \frac{u_\mathrm{X}}{100}"
             r"\frac{S_{1}^{2}}{@step_up_rated_power}", "kundur",
             "§5.4 field and stator limits, carried through the GSU (Grainger and Stevenson ch. 2)"),
        Step("connection_reactive_leading",
             r"Q_{\min}(P_\mathrm{r}) - \frac{@maximum_demand_reactive}{10^{3}} - \frac{u_\mathrm{X}}{100}"
             r"\frac{S_{1}^{2}}{@step_up_rated_power}", "kundur",
             "§5.4 stator and stability limits, carried through the GSU"),
        Step("required_reactive_lagging",
             r"@connection_active_power\,\tan\left(\arccos @required_power_factor_lagging\right)",
             "grainger", "power triangle"),
        Step("required_reactive_leading",
             r"-P_\mathrm{c}\,\tan\left(\arccos @required_power_factor_leading\right)", "grainger",
             "power triangle", note="P_c at the leading limit"),
        Step("lagging_reactive_margin", r"@connection_reactive_lagging - @required_reactive_lagging",
             "grainger", "capability less requirement"),
        Step("leading_reactive_margin", r"@required_reactive_leading - @connection_reactive_leading",
             "grainger", "capability less requirement (absorbing)"),
    ],
    checks=[
        Check("hv_breaking", "Grid-connection switchgear breaks I''_k", "hv_fault_current", "<=",
              "hv_switchgear_breaking_current", "practice", "I''_k used for I_b (conservative)", review_band=0.1),
        Check("hv_making", "Grid-connection switchgear makes i_p", "hv_peak_current", "<=",
              "hv_switchgear_making_current", "iec60909", "eq. 55", review_band=0.1),
        Check("generator_breaking", "Generator-bus switchgear breaks I''_k", "generator_bus_fault_current", "<=",
              "generator_switchgear_breaking_current", "practice",
              "I''_k for I_b; a generator breaker also needs its d.c. component checked", review_band=0.1),
        Check("generator_making", "Generator-bus switchgear makes i_p", "generator_bus_peak_current", "<=",
              "generator_switchgear_making_current", "iec60909", "eq. 55", review_band=0.1),
        Check("auxiliary_breaking", "Auxiliary-board switchgear breaks I''_k", "auxiliary_bus_fault_current",
              "<=", "auxiliary_switchgear_breaking_current", "practice", "I''_k for I_b", review_band=0.1),
        Check("auxiliary_making", "Auxiliary-board switchgear makes i_p", "auxiliary_bus_peak_current", "<=",
              "auxiliary_switchgear_making_current", "iec60909", "eq. 55", review_band=0.1),
        Check("motor_start", "Board voltage while the largest motor starts", "voltage_during_motor_start",
              ">=", "motor_start_voltage_limit", "practice", "screening limit", review_band=0.03),
        Check("lagging_range", "Lagging reactive power at the connection covers the required range",
              "lagging_reactive_margin", ">=", 0.0, "kundur", "§5.4"),
        Check("leading_range", "Leading reactive power at the connection covers the required range",
              "leading_reactive_margin", ">=", 0.0, "kundur", "§5.4"),
    ],
    references=REFERENCES,
    cautions=[
        "Switchgear and transformers carry lethal voltages; a short circuit in them releases arc-flash "
        "energy set by the fault levels on this page. Work only on isolated, proved-dead and earthed "
        "equipment, with the protection an arc-flash study prescribes.",
        "Fault levels grow when the grid is reinforced or generation is added: recheck the switchgear "
        "whenever the network operator restates the fault level.",
        "This is a design-basis screening by the IEC 60909 method, not a protection study. Defer to "
        "local codes and licensed engineering practice.",
    ],
    figures=[
        FigureSpec("single_line", "Key single-line diagram",
                   "The unit from the grid to the auxiliary board (IEC 60617 graphical symbols), with "
                   "ratings and fault levels. Each element opens the input row it is drawn from, which "
                   "links on to the calculation that produced it."),
        FigureSpec("connection_capability", "Reactive capability at the grid connection",
                   "The generator's stator, field and stability limits at 1 pu terminal voltage (dashed), "
                   "less the auxiliary demand and the step-up transformer's series losses (solid), against "
                   "the required power-factor range at the connection point. Transformer magnetising "
                   "power and tap position neglected."),
    ],
    tables=[
        TableSpec("fault_table", "Short-circuit currents by location and branch",
                  "Initial symmetrical current I''_k, the R/X and peak factor of each branch, and the peak "
                  "current; branch peaks are summed."),
        TableSpec("capability_table", "Reactive range at the grid connection",
                  "Generator-terminal limits and what reaches the connection point, with the requirement."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def compute(v: Values) -> Result:
    warnings: list[str] = []
    c_mv = float(v.voltage_factor_mv)
    u_q = float(v.grid_voltage)
    u_g = float(v.generator_voltage)
    s_g = float(v.generator_apparent_power)
    pf_g = float(v.generator_power_factor)
    x_dss = float(v.subtransient_reactance)
    s_t, u_thv, u_tlv = float(v.step_up_rated_power), float(v.step_up_hv_voltage), float(v.step_up_lv_voltage)
    uk_t, ur_t = float(v.step_up_short_circuit_impedance), float(v.step_up_resistive_impedance)
    s_a, u_ahv, u_alv = (float(v.auxiliary_transformer_rated_power), float(v.auxiliary_transformer_hv_voltage),
                         float(v.auxiliary_transformer_lv_voltage))
    uk_a, ur_a = (float(v.auxiliary_transformer_short_circuit_impedance),
                  float(v.auxiliary_transformer_resistive_impedance))
    if ur_t >= uk_t:
        raise InputConflict("step_up_resistive_impedance", f"u_R = {ur_t:g} % is not below u_k = {uk_t:g} %")
    if ur_a >= uk_a:
        raise InputConflict("auxiliary_transformer_resistive_impedance",
                            f"u_R = {ur_a:g} % is not below u_k = {uk_a:g} %")
    if u_tlv >= u_thv:
        raise InputConflict("step_up_lv_voltage", "the GSU's LV voltage is not below its HV voltage")
    for name, rated, nominal in (("step_up_hv_voltage", u_thv, u_q), ("step_up_lv_voltage", u_tlv, u_g),
                                 ("auxiliary_transformer_hv_voltage", u_ahv, u_g)):
        if not 0.8 <= rated / nominal <= 1.2:
            raise InputConflict(name, f"{rated:g} kV does not match the {nominal:g} kV it connects to")
    if abs(u_tlv / u_g - 1.0) > 0.05:
        warnings.append(f"GSU LV {u_tlv:g} kV differs from the generator's {u_g:g} kV by more than 5 %")

    t_r = u_thv / u_tlv          # GSU rated ratio
    t_a = u_ahv / u_alv          # UAT rated ratio
    c_aux = voltage_factor(u_alv, float(v.voltage_factor_lv), c_mv)
    sin_g = math.sqrt(1.0 - pf_g**2)

    z_q = network_feeder_impedance(c_mv, u_q, float(v.grid_fault_level), float(v.grid_resistance_ratio))
    z_thv = transformer_impedance(uk_t, ur_t, u_thv, s_t)
    z_tlv = z_thv / t_r**2
    x_t = z_thv.imag / (u_thv**2 / s_t)
    z_g = generator_impedance(x_dss, u_g, s_g)
    z_ua = transformer_impedance(uk_a, ur_a, u_alv, s_a)  # at the UAT's LV side
    x_ta = z_ua.imag / (u_alv**2 / s_a)
    k_t_aux = network_transformer_correction(c_mv, x_ta)
    s_m = float(v.running_motor_apparent_power) / 1e3  # MVA
    ratio_m = float(v.motor_group_current_ratio)
    if 0.0 < ratio_m < 1.0:
        raise InputConflict("motor_group_current_ratio", f"locked-rotor to rated current ratio {ratio_m:g} "
                            "is below 1; induction motors draw 4-8 times their rated current (0: no motors)")
    z_m = None
    if s_m > 0 and ratio_m > 0:
        z_m = motor_group_impedance(ratio_m, u_alv, s_m, motor_resistance_ratio(u_alv))
        # a group of a few milliwatts: its impedance overflows and its contribution is nil
        z_m = z_m if math.isfinite(abs(z_m)) else None

    # fault at the grid connection (HV side of the GSU): network feeder and power-station unit
    if v.step_up_tap_changer == "on_load":
        k_s = unit_correction_on_load(c_mv, x_dss, x_t, pf_g, u_q, u_thv, u_tlv, u_g)
    else:
        k_s = unit_correction_off_load(c_mv, x_dss, pf_g, u_q, u_thv, u_tlv, u_g)
    hv = [branch("network feeder", c_mv, u_q, z_q),
          branch("power-station unit", c_mv, u_q, k_s * (t_r**2 * z_g + z_thv))]
    z_hv = parallel(*(b.impedance for b in hv))

    # fault at the generator bus: generator, network through the GSU, motors through the UAT
    k_gs = unit_generator_correction(c_mv, x_dss, pf_g)
    if x_t * sin_g >= 1.0:
        raise InputConflict("step_up_short_circuit_impedance", "x_T sin(phi_rG) >= 1 leaves K_T,S undefined")
    k_ts = unit_transformer_correction(c_mv, x_t, pf_g)
    gb = [branch("generator", c_mv, u_g, k_gs * z_g),
          branch("network through GSU", c_mv, u_g, k_ts * z_tlv + z_q / t_r**2)]
    if z_m is not None:
        gb.append(branch("aux motors through UAT", c_mv, u_g, t_a**2 * (z_m + k_t_aux * z_ua)))
    z_gb_sources = parallel(gb[0].impedance, gb[1].impedance)  # supply side seen by the UAT
    z_gb = parallel(*(b.impedance for b in gb))

    # fault at the auxiliary board: supply through the UAT and the board's own motors
    ab = [branch("supply through UAT", c_aux, u_alv, z_gb_sources / t_a**2 + k_t_aux * z_ua)]
    if z_m is not None:
        ab.append(branch("motor group", c_aux, u_alv, z_m))
    z_ab = parallel(*(b.impedance for b in ab))

    # largest motor start, generator off line, back-fed from the grid (physical impedances, c = 1)
    z_src = (z_q / c_mv + z_thv) / (t_r**2 * t_a**2) + z_ua
    v0, v1 = motor_start_voltages(z_src, float(v.motor_start_base_active_load) / 1e3,
                                  float(v.motor_start_base_reactive_load) / 1e3,
                                  float(v.largest_motor_starting_power) / 1e3,
                                  float(v.largest_motor_starting_power_factor), u_alv)
    # the rated ratios make the source EMF 1 pu of U_n,aux (taps at neutral)

    # reactive capability at the grid connection
    p_r, p_pm = float(v.generator_active_power), float(v.prime_mover_rating)
    x_d, e_0 = float(v.direct_axis_reactance), float(v.internal_emf)
    if p_r > s_g * (1 + 1e-9):
        raise InputConflict("generator_active_power", f"{p_r:g} MW exceeds the rated {s_g:g} MVA")
    p_aux, q_aux = float(v.maximum_demand_active) / 1e3, float(v.maximum_demand_reactive) / 1e3
    u_x_t = math.sqrt(uk_t**2 - ur_t**2)

    def at_connection(p: float, q: float) -> tuple[float, float]:
        return through_transformer(p - p_aux, q - q_aux, ur_t, u_x_t, s_t)

    q_max, q_min = capability_pq(p_r, s_g, x_d, e_0)
    p_lag, q_lag = at_connection(p_r, q_max)
    p_lead, q_lead = at_connection(p_r, q_min)
    tan_lag = math.tan(math.acos(float(v.required_power_factor_lagging)))
    tan_lead = math.tan(math.acos(float(v.required_power_factor_leading)))
    req_lag, req_lead = p_lag * tan_lag, -p_lead * tan_lead

    chart, cap_table = _capability(s_g, min(p_pm, s_g), x_d, e_0, at_connection, tan_lag, tan_lead,
                                   (q_lag, p_lag), (q_lead, p_lead))

    fault_rows = []
    for where, c, un, branches, z_tot in (("grid connection", c_mv, u_q, hv, z_hv),
                                          ("generator bus", c_mv, u_g, gb, z_gb),
                                          ("auxiliary board", c_aux, u_alv, ab, z_ab)):
        for b in branches:
            fault_rows.append([where, b.name, b.current, b.impedance.real / b.impedance.imag, b.kappa, b.peak])
        fault_rows.append([where, "total", initial_current(c, un, z_tot), z_tot.real / z_tot.imag, "",
                           sum(b.peak for b in branches)])
    fault_table = Table(columns=[("Location", "text"), ("Branch", "text"), ("I''_k", "kA"), ("R/X", ""),
                                 ("κ", ""), ("i_p", "kA")], rows=fault_rows)

    outputs: dict[str, float | str] = {
        "grid_impedance": abs(z_q),
        "step_up_impedance": abs(z_thv),
        "generator_subtransient_impedance": z_g.imag,
        "step_up_unit_correction": k_s,
        "unit_generator_correction": k_gs,
        "unit_transformer_correction": k_ts,
        "auxiliary_transformer_correction": k_t_aux,
        "hv_fault_current": initial_current(c_mv, u_q, z_hv),
        "hv_peak_current": sum(b.peak for b in hv),
        "generator_partial_current": gb[0].current,
        "network_partial_current": gb[1].current,
        "generator_bus_fault_current": initial_current(c_mv, u_g, z_gb),
        "generator_bus_peak_current": sum(b.peak for b in gb),
        "motor_partial_current": ab[1].current if len(ab) > 1 else 0.0,
        "auxiliary_bus_fault_current": initial_current(c_aux, u_alv, z_ab),
        "auxiliary_bus_peak_current": sum(b.peak for b in ab),
        "backfeed_source_impedance": abs(z_src),
        "voltage_before_motor_start": 100.0 * v0,
        "voltage_during_motor_start": 100.0 * v1,
        "motor_start_voltage_dip": 100.0 * (1.0 - v1 / v0),
        "connection_active_power": p_lag,
        "connection_reactive_lagging": q_lag,
        "connection_reactive_leading": q_lead,
        "required_reactive_lagging": req_lag,
        "required_reactive_leading": req_lead,
        "lagging_reactive_margin": q_lag - req_lag,
        "leading_reactive_margin": req_lead - q_lead,
    }
    if float(v.largest_motor_starting_power) <= 0:
        warnings.append("no direct-on-line motor given: the motor-start voltage is the running-load voltage")
    return Result(outputs=outputs,
                  charts={"single_line": single_line(v, outputs), "connection_capability": chart},
                  tables={"fault_table": fault_table, "capability_table": cap_table}, warnings=warnings)


def _capability(s_g: float, p_top: float, x_d: float, e_0: float, at_connection, tan_lag: float,
                tan_lead: float, lag_point: tuple[float, float],
                lead_point: tuple[float, float]) -> tuple[Chart, Table]:
    n = 41
    ps = [p_top * k / (n - 1) for k in range(n)]
    lims = [capability_pq(p, s_g, x_d, e_0) for p in ps]
    gen_lag = ([q for q, _ in lims], ps)
    gen_lead = ([q for _, q in lims], ps)
    pcc_lag = [at_connection(p, q) for p, (q, _) in zip(ps, lims, strict=True)]
    pcc_lead = [at_connection(p, q) for p, (_, q) in zip(ps, lims, strict=True)]

    def r(xs: list[float]) -> list[float]:
        return [round(x, 9) for x in xs]

    p_line = max(p for p, _ in pcc_lag)
    chart = Chart(
        x_label="Reactive power Q (Mvar), lagging (delivered) positive",
        y_label="Active power P (MW)",
        series=[
            Series("Generator terminals, lagging limit", r(gen_lag[0]), r(gen_lag[1]), style="dashed"),
            Series("Generator terminals, leading limit", r(gen_lead[0]), r(gen_lead[1]), style="dashed"),
            Series("Connection point, lagging limit", r([q for _, q in pcc_lag]), r([p for p, _ in pcc_lag])),
            Series("Connection point, leading limit", r([q for _, q in pcc_lead]), r([p for p, _ in pcc_lead])),
            Series("Required range (power factor)", r([p_line * tan_lag, 0.0, -p_line * tan_lead]),
                   r([p_line, 0.0, p_line]), style="dotted"),
        ],
        markers=[Marker("Rated P, lagging limit", round(lag_point[0], 9), round(lag_point[1], 9)),
                 Marker("Rated P, leading limit", round(lead_point[0], 9), round(lead_point[1], 9))],
    )
    rows = []
    for k in (0, n // 4, n // 2, 3 * n // 4, n - 1):
        p = ps[k]
        (pl, ql), (pd, qd) = pcc_lag[k], pcc_lead[k]
        # a requirement applies to export only (P_c > 0)
        rows.append([p, lims[k][0], lims[k][1], pl, ql, qd, max(pl, 0.0) * tan_lag, -max(pd, 0.0) * tan_lead])
    table = Table(columns=[("Generator P", "MW"), ("Q_max at terminals", "Mvar"), ("Q_min at terminals", "Mvar"),
                           ("P at connection", "MW"), ("Q_max at connection", "Mvar"),
                           ("Q_min at connection", "Mvar"), ("required lagging", "Mvar"),
                           ("required leading", "Mvar")], rows=rows)
    return chart, table


def single_line(v: Values, out: dict[str, float | str]) -> SingleLine:
    """The key single-line diagram; every element opens its input row (which links upstream)."""
    def f(x: float) -> str:
        # three significant figures, never in exponent form (kVA values run into thousands)
        return f"{x:.0f}" if abs(x) >= 100 else f"{x:.3g}"

    e = [
        LineElement("grid", "grid", f"Grid {f(v.grid_voltage)} kV · S''kQ {f(v.grid_fault_level)} MVA",
                    None, "", "in-grid_fault_level"),
        LineElement("hv_breaker", "breaker", f"HV switchgear · I''k {f(out['hv_fault_current'])} kA "
                    f"(rated {f(v.hv_switchgear_breaking_current)} kA)", "grid", "", "check-hv_breaking"),
        LineElement("gsu", "transformer", f"Step-up transformer {f(v.step_up_rated_power)} MVA · "
                    f"{f(v.step_up_hv_voltage)}/{f(v.step_up_lv_voltage)} kV · uk "
                    f"{f(v.step_up_short_circuit_impedance)} %", "hv_breaker", "", "in-step_up_rated_power"),
        LineElement("generator_bus", "busbar", f"Generator bus {f(v.generator_voltage)} kV · I''k "
                    f"{f(out['generator_bus_fault_current'])} kA · ip {f(out['generator_bus_peak_current'])} kA",
                    "gsu", "", "out-generator_bus_fault_current"),
        LineElement("generator_breaker", "breaker", f"Generator breaker · rated "
                    f"{f(v.generator_switchgear_breaking_current)} kA", "generator_bus", "",
                    "check-generator_breaking"),
        LineElement("generator", "generator", f"Generator {f(v.generator_apparent_power)} MVA · "
                    f"{f(v.generator_voltage)} kV · x''d {f(v.subtransient_reactance)} pu", "generator_breaker",
                    "", "in-generator_apparent_power"),
        LineElement("uat_breaker", "breaker", "UAT feeder", "generator_bus", "", "check-generator_making"),
        LineElement("uat", "transformer", f"Unit auxiliary transformer {f(v.auxiliary_transformer_rated_power)} "
                    f"MVA · {f(v.auxiliary_transformer_hv_voltage)}/{f(v.auxiliary_transformer_lv_voltage)} kV · "
                    f"uk {f(v.auxiliary_transformer_short_circuit_impedance)} %", "uat_breaker", "",
                    "in-auxiliary_transformer_rated_power"),
        LineElement("aux_bus", "busbar", f"Auxiliary board {f(v.auxiliary_transformer_lv_voltage)} kV · "
                    f"demand {f(math.hypot(v.maximum_demand_active, v.maximum_demand_reactive))} kVA · I''k "
                    f"{f(out['auxiliary_bus_fault_current'])} kA", "uat", "", "in-maximum_demand_active"),
        LineElement("motors", "motor", f"Running motors {f(v.running_motor_apparent_power)} kVA · largest DOL "
                    f"start {f(v.largest_motor_starting_power)} kVA · board at "
                    f"{f(out['voltage_during_motor_start'])} % during the start", "aux_bus", "", "in-running_motor_apparent_power"),
        LineElement("other_loads", "load", "Other auxiliary loads", "aux_bus", "", "in-maximum_demand_reactive"),
    ]
    return SingleLine(elements=e)


# ---------------------------------------------------------------------------
# Checks against published numbers
# ---------------------------------------------------------------------------

_K = "IEC 60909-0:2016 eq. 55 (as recalled); the standard's Fig. 16 curve: kappa(R/X = 0) = 2.00"


def _hand_grid_case() -> float:
    # 33 kV, 750 MVA, c = 1.1: I''_k = c S / (sqrt(3) c U) = S / (sqrt(3) U) = 13.122 kA
    z = network_feeder_impedance(1.1, 33.0, 750.0, 0.1)
    return initial_current(1.1, 33.0, z)


PUBLISHED_CASES = [
    PublishedCase("peak factor at R/X = 0", _K, 2.0, "", 1e-12, "exact: 1.02 + 0.98", lambda: peak_factor(1j)),
    PublishedCase("peak factor at R/X = 0.1", "IEC 60909-0:2016 eq. 55 (as recalled), hand-worked: "
                  "1.02 + 0.98 e^-0.3 = 1.7460", 1.7460, "", 5e-5, "4 decimals printed",
                  lambda: peak_factor(complex(0.1, 1.0))),
    PublishedCase("K_T of a transformer with x_T = 0.08, c_max = 1.1", "IEC 60909-0:2016 eq. 12a (as "
                  "recalled), hand-worked: 0.95 x 1.1 / 1.048 = 0.99714", 0.99714, "", 5e-6,
                  "5 decimals printed", lambda: network_transformer_correction(1.1, 0.08)),
    PublishedCase("network feeder 750 MVA at 33 kV gives back its own current", "IEC 60909-0:2016 eq. 1 "
                  "and 29 (as recalled): I''_kQ = S''_kQ / (sqrt(3) U_nQ) = 13.122 kA", 13.122, "kA", 5e-4,
                  "3 decimals printed", _hand_grid_case),
]
