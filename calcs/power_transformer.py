"""Power transformer sizing: generator step-up or unit auxiliary transformer.

One module for both roles: the instance links the load it must carry (for the
step-up transformer the generator output less the auxiliary demand, P and Q
separately; for the auxiliary transformer the maximum demand) and states its
voltages, cooling, losses, vector group and tap range.  All impedances are in
per cent on the transformer's own rating.
"""

from __future__ import annotations

import math

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Check,
    Input,
    Output,
    PublishedCase,
    Reference,
    Result,
    Step,
    Values,
)

# ISO 3:1973 basic series R10, rounded values (the preferred numbers used for transformer ratings)
R10 = (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)

# IEC 60076-5:2006 Table 1, recognised minimum short-circuit impedance of two-winding
# transformers (from memory): (upper end of the rated-power band in kVA, u_k in %)
MIN_IMPEDANCE = ((630.0, 4.0), (1250.0, 5.0), (2500.0, 6.0), (6300.0, 7.0), (25000.0, 8.0),
                 (40000.0, 10.0), (63000.0, 11.0), (100000.0, 12.5))

# IEC 60076-2:2011 Table 1 (as recalled): average winding temperature-rise limit, K,
# for ON.. and OF.. cooling; referred to 1000 m and a 40 degC maximum ambient
WINDING_RISE = {"ONAN": 65.0, "ONAF": 65.0}
# IEC 60076-2:2011 cl. 6.3 (as recalled): reduction of the rise limits per metre above 1000 m
ALTITUDE_RISE_PER_M = {"ONAN": 1.0 / 400.0, "ONAF": 1.0 / 250.0}
# IEC 60076-7:2018 Table 5 (as recalled): exponent of the temperature rise on the load (x = 0.8, ON)
RISE_EXPONENT = 0.8


# ---------------------------------------------------------------------------
# Published models, one function each
# ---------------------------------------------------------------------------


def next_r10(value: float) -> float:
    """Smallest R10 preferred number (ISO 3) >= value, any decade."""
    if not value > 0.0:
        raise ValueError(f"a rating must be positive, got {value}")
    decade = 10.0 ** math.floor(math.log10(value))
    for mult in (1.0, 10.0):
        for r in R10:
            candidate = r * decade * mult
            # relative tolerance: 16.0 computed as 1.6 x 10 must count as 16
            if candidate >= value * (1.0 - 1e-9):
                return round(candidate, 9)
    raise AssertionError("unreachable: 10 x decade is always >= value")


def minimum_short_circuit_impedance(rated_power_kva: float) -> float:
    """u_k,min in % from IEC 60076-5:2006 Table 1 (from memory); above 100 MVA the
    table says 'more than 12.5 %' (by agreement), taken here as 12.5."""
    for upper, uk in MIN_IMPEDANCE:
        if rated_power_kva <= upper:
            return uk
    return 12.5


def temperature_rise_reduction(ambient_max: float, altitude: float, cooling: str) -> float:
    """K by which the rise limits are reduced: the excess of the maximum ambient over 40 degC
    (IEC 60076-2:2011 cl. 6.2) plus the altitude correction above 1000 m (cl. 6.3), as recalled."""
    return max(0.0, ambient_max - 40.0) + max(0.0, altitude - 1000.0) * ALTITUDE_RISE_PER_M[cooling]


def derating_factor(rise_reduction: float, cooling: str) -> float:
    """Load (pu of rating) at which a standard transformer stays within the reduced rise:
    rise ~ K^(2x) with x = 0.8 (IEC 60076-7:2018 exponents, as recalled; a screening estimate)."""
    limit = WINDING_RISE[cooling]
    if rise_reduction >= limit:
        raise ValueError("the rise reduction consumes the whole temperature-rise limit")
    return ((limit - rise_reduction) / limit) ** (1.0 / (2.0 * RISE_EXPONENT))


def impedance_components(uk_percent: float, load_loss_kw: float, rated_mva: float) -> tuple[float, float]:
    """(u_R, u_X) in %: u_R = P_k / S_r (IEC 60076-1:2011 / IEC 60909-0:2016 eq. 8), u_X = sqrt(u_k^2 - u_R^2)."""
    u_r = load_loss_kw / (10.0 * rated_mva)
    if u_r >= uk_percent:
        raise ValueError(f"resistive part {u_r:g} % is not below the impedance {uk_percent:g} %")
    return u_r, math.sqrt(uk_percent**2 - u_r**2)


def voltage_regulation(e_r: float, e_x: float, power_factor: float, load_factor: float = 1.0,
                       lagging: bool = True) -> float:
    """Regulation in % at a load of ``load_factor`` pu and power factor cos(phi):
    eps = u_r' + u_x'^2 / 200, u_r' = b(e_r cos phi + e_x sin phi), u_x' = b(e_x cos phi - e_r sin phi).
    IEC 60076-1:2011 Annex A / IEC 60076-8:1997 cl. 7 (as recalled); sin phi < 0 for leading."""
    c = power_factor
    s = math.sqrt(max(0.0, 1.0 - c * c)) * (1.0 if lagging else -1.0)
    ur = load_factor * (e_r * c + e_x * s)
    ux = load_factor * (e_x * c - e_r * s)
    return ur + ux * ux / 200.0


def efficiency(load_mva: float, power_factor: float, rated_mva: float, no_load_kw: float,
               load_loss_kw: float) -> tuple[float, float]:
    """(losses kW, efficiency %) at the load point: eta = P / (P + P_0 + b^2 P_k)
    (Chapman, Electric Machinery Fundamentals, 5th ed., §2.7, as recalled)."""
    b = load_mva / rated_mva
    losses = no_load_kw + b * b * load_loss_kw
    p = 1e3 * load_mva * power_factor
    return losses, 100.0 * p / (p + losses)


def through_fault_current(rated_mva: float, voltage_kv: float, uk_percent: float,
                          source_mva: float = 0.0) -> float:
    """Symmetrical through-fault current in kA at the terminals of ``voltage_kv``:
    I = U / (sqrt(3) (Z_t + Z_s)), Z_s = U^2 / S_source (0 for an infinite source).
    IEC 60076-5:2006 cl. 4.1.2, eq. (1) (as recalled)."""
    z_t = uk_percent / 100.0 * voltage_kv**2 / rated_mva
    z_s = voltage_kv**2 / source_mva if source_mva > 0 else 0.0
    return voltage_kv / (math.sqrt(3.0) * (z_t + z_s))


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iec60076_1", "IEC 60076-1:2011, Power transformers - Part 1: General, International "
              "Electrotechnical Commission, Geneva.",
              "Rated power, preferred ratings from the R10 series of ISO 3, rated current, load loss; "
              "Annex A voltage drop at load; clause numbers as recalled."),
    Reference("iso3", "ISO 3:1973, Preferred numbers - Series of preferred numbers, International "
              "Organization for Standardization, Geneva.", "Basic series R10 (rounded values)."),
    Reference("iec60076_2", "IEC 60076-2:2011, Power transformers - Part 2: Temperature rise for "
              "liquid-immersed transformers, International Electrotechnical Commission, Geneva.",
              "Table 1 rise limits; cl. 6.2 ambient and cl. 6.3 altitude corrections, as recalled."),
    Reference("iec60076_5", "IEC 60076-5:2006, Power transformers - Part 5: Ability to withstand short "
              "circuit, International Electrotechnical Commission, Geneva.",
              "Table 1 minimum short-circuit impedance (from memory); cl. 4.1.2 symmetrical current."),
    Reference("iec60076_7", "IEC 60076-7:2018, Power transformers - Part 7: Loading guide for "
              "mineral-oil-immersed power transformers, International Electrotechnical Commission, Geneva.",
              "Oil exponent x = 0.8 (ON cooling), as recalled; used for a screening derating only."),
    Reference("iec60076_8", "IEC 60076-8:1997, Power transformers - Part 8: Application guide, "
              "International Electrotechnical Commission, Geneva.",
              "Voltage regulation at load power factor (cl. 7, as recalled)."),
    Reference("chapman", "S. J. Chapman, Electric Machinery Fundamentals, 5th ed., McGraw-Hill, "
              "New York, 2012.", "Transformer efficiency and power triangle (ch. 2, as recalled)."),
    Reference("practice", "Common engineering practice, no published source.",
              "Loading screening band; the tap range is expected to cover the full-load regulation."),
]

SPEC = CalcSpec(
    kind="power_transformer",
    discipline="auxiliary supply and transformers",
    title="Power transformer rating, impedance, regulation and losses",
    purpose=(
        "Size a two-winding power transformer (generator step-up or unit auxiliary) from the active "
        "and reactive power it carries, derate it for the site's ambient and altitude, pick the next "
        "preferred rating, fix its short-circuit impedance, and give its regulation, losses, "
        "efficiency and through-fault currents."
    ),
    inputs=[
        Input("transformer_role", choices=("step_up", "unit_auxiliary")),
        Input("transformer_active_load", range="[0, 2000]"),
        Input("transformer_reactive_load", range="[-2000, 2000]",
              note="lagging (inductive) load positive"),
        Input("growth_margin", range="[0, 100]", default=0.0,
              note="future load, common practice 10-25 % on auxiliary transformers"),
        Input("hv_rated_voltage", range="[0.4, 800]"),
        Input("lv_rated_voltage", range="[0.1, 800]"),
        Input("cooling_method", choices=("ONAN", "ONAF"), default="ONAN"),
        Input("ambient_temperature_max", range="[-60, 60]", note="usually linked from the site"),
        Input("altitude", range="[-500, 5000]", note="usually linked from the site"),
        Input("stated_rated_power", range="[0, 2000]", default=0.0,
              note="0: the next R10 preferred rating above the required one"),
        Input("stated_short_circuit_impedance", range="[0, 30]", default=0.0,
              note="0: the IEC 60076-5 Table 1 minimum for the rating"),
        Input("load_loss", range="(0, 5000]", note="at rated current and reference temperature (75 °C)"),
        Input("no_load_loss", range="[0, 2000]"),
        Input("vector_group", choices=("YNd11", "YNd1", "YNd5", "Dyn11", "Dyn1", "Dyn5", "YNyn0", "Yyn0",
                                       "Dd0")),
        Input("tap_range", range="[0, 30]", note="± range of the tap changer"),
        Input("tap_step", range="(0, 5]"),
        Input("tap_changer", choices=("on_load", "off_circuit")),
        Input("source_fault_level", range="[0, 100000]", default=0.0,
              note="short-circuit power of the supply on the HV side; 0 for an infinite source"),
    ],
    outputs=[
        Output("transformer_load_apparent_power"),
        Output("transformer_load_power_factor"),
        Output("temperature_rise_reduction"),
        Output("transformer_derating_factor"),
        Output("required_rated_power"),
        Output("transformer_rated_power", key=True),
        Output("minimum_short_circuit_impedance"),
        Output("short_circuit_impedance", key=True),
        Output("resistive_impedance"),
        Output("reactive_impedance"),
        Output("transformer_loading", key=True),
        Output("voltage_regulation", key=True),
        Output("transformer_losses"),
        Output("transformer_efficiency"),
        Output("hv_rated_current"),
        Output("lv_rated_current"),
        Output("through_fault_current_hv"),
        Output("through_fault_current_lv", key=True),
    ],
    steps=[
        Step("transformer_load_apparent_power",
             r"\sqrt{@transformer_active_load^{2} + @transformer_reactive_load^{2}}", "chapman",
             "power triangle", note="P and Q carried separately (generator output less auxiliaries)"),
        Step("transformer_load_power_factor",
             r"\frac{@transformer_active_load}{@transformer_load_apparent_power}", "chapman", "power triangle"),
        Step("temperature_rise_reduction",
             r"\max(0,\ @ambient_temperature_max - 40) + \max(0,\ @altitude - 1000)\,"
             r"\frac{1\ \mathrm{K}}{400\ \mathrm{m}\ (\mathrm{ONAN}),\ 250\ \mathrm{m}\ (\mathrm{ONAF})}",
             "iec60076_2", "cl. 6.2 and 6.3 (as recalled)"),
        Step("transformer_derating_factor",
             r"\left(\frac{65 - @temperature_rise_reduction}{65}\right)^{1/(2 \cdot 0.8)}", "iec60076_7",
             "rise ~ K^{2x}, x = 0.8 (as recalled)", note="65 K average winding rise (IEC 60076-2 Table 1)"),
        Step("required_rated_power",
             r"\frac{@transformer_load_apparent_power\,(1 + @growth_margin/100)}{@transformer_derating_factor}",
             "iec60076_1", "cl. 5.1 rated power (continuous loading at the site)"),
        Step("transformer_rated_power", r"\mathrm{R10}\!\uparrow\!\left(@required_rated_power\right)",
             "iso3", "next preferred number of the R10 series (1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 "
             "× 10ⁿ)", note="or the stated rating if one is given"),
        Step("minimum_short_circuit_impedance", r"u_{k,\min}\left(10^{3}\,@transformer_rated_power\right)",
             "iec60076_5", "Table 1 (from memory)"),
        Step("short_circuit_impedance",
             r"\begin{cases} @stated_short_circuit_impedance & \text{if stated} \\ "
             r"@minimum_short_circuit_impedance & \text{otherwise} \end{cases}", "iec60076_5", "Table 1"),
        Step("resistive_impedance", r"\frac{@load_loss}{10\,@transformer_rated_power}", "iec60076_1",
             "load loss at rated current: u_R = P_k / S_r"),
        Step("reactive_impedance", r"\sqrt{@short_circuit_impedance^{2} - @resistive_impedance^{2}}",
             "iec60076_1", "impedance triangle"),
        Step("transformer_loading",
             r"100\,\frac{@transformer_load_apparent_power\,(1 + @growth_margin/100)}"
             r"{@transformer_derating_factor\,@transformer_rated_power}",
             "iec60076_1", "continuous loading against the site-derated rating"),
        Step("voltage_regulation",
             r"b\,(@resistive_impedance\cos\varphi + @reactive_impedance\sin\varphi) + "
             r"\frac{b^{2}\,(@reactive_impedance\cos\varphi - @resistive_impedance\sin\varphi)^{2}}{200}",
             "iec60076_8", "cl. 7 (as recalled)",
             note="b = S/S_r at the load without growth margin, cos φ = the load power factor"),
        Step("transformer_losses",
             r"@no_load_loss + \left(\frac{@transformer_load_apparent_power}{@transformer_rated_power}"
             r"\right)^{2} @load_loss", "chapman", "ch. 2 (losses at part load)"),
        Step("transformer_efficiency",
             r"100\,\frac{10^{3}\,@transformer_active_load}{10^{3}\,@transformer_active_load + "
             r"@transformer_losses}", "chapman", "ch. 2 (efficiency)"),
        Step("hv_rated_current", r"\frac{10^{3}\,@transformer_rated_power}{\sqrt{3}\,@hv_rated_voltage}",
             "iec60076_1", "rated current"),
        Step("lv_rated_current", r"\frac{10^{3}\,@transformer_rated_power}{\sqrt{3}\,@lv_rated_voltage}",
             "iec60076_1", "rated current"),
        Step("through_fault_current_lv",
             r"\frac{@lv_rated_current\cdot 10^{-3}}{@short_circuit_impedance/100 + "
             r"@transformer_rated_power/@source_fault_level}", "iec60076_5",
             "cl. 4.1.2, eq. (1) (as recalled)", note="fault at the LV terminals fed from the HV side; "
             "the second term is 0 for an infinite source"),
        Step("through_fault_current_hv",
             r"@through_fault_current_lv\,\frac{@lv_rated_voltage}{@hv_rated_voltage}", "iec60076_5",
             "cl. 4.1.2 (the same fault seen on the HV side)"),
    ],
    checks=[
        Check("loading", "Continuous load within the site-derated rating", "transformer_loading", "<=", 100.0,
              "iec60076_1", "rated power at site conditions", review_band=0.05),
        Check("impedance_minimum", "Short-circuit impedance not below the standard's minimum",
              "short_circuit_impedance", ">=", "minimum_short_circuit_impedance", "iec60076_5", "Table 1"),
        Check("regulation", "Tap range covers the full-load regulation", "voltage_regulation", "<=",
              "tap_range", "practice", review_band=0.1),
    ],
    references=REFERENCES,
    cautions=[
        "Transformer terminals and the switchgear on both sides carry lethal voltages; a transformer "
        "can be back-fed from either side. Isolate, prove dead and earth both sides before work.",
        "A fault in the switchgear releases arc-flash energy set by the through-fault current: keep "
        "clear and wear the protection the arc-flash study prescribes.",
        "Oil-immersed transformers hold a large fire load; follow the local fire code for "
        "separation and containment. Defer to local codes and licensed engineering practice.",
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def compute(v: Values) -> Result:
    warnings: list[str] = []
    p = float(v.transformer_active_load)
    q = float(v.transformer_reactive_load)
    s_load = math.hypot(p, q)
    if s_load < 1e-3:
        raise InputConflict("transformer_active_load", f"the transformer carries no load: {s_load:.3g} MVA "
                            "is below 1 kVA (P = Q = 0, or values not in MW/Mvar)")
    if float(v.lv_rated_voltage) >= float(v.hv_rated_voltage):
        raise InputConflict("lv_rated_voltage", f"LV {v.lv_rated_voltage:g} kV is not below HV "
                            f"{v.hv_rated_voltage:g} kV")
    pf = p / s_load
    cooling = v.cooling_method
    dtheta = temperature_rise_reduction(float(v.ambient_temperature_max), float(v.altitude), cooling)
    if dtheta >= WINDING_RISE[cooling]:
        raise InputConflict("ambient_temperature_max", "ambient and altitude leave no temperature rise")
    k = derating_factor(dtheta, cooling)
    growth = 1.0 + float(v.growth_margin) / 100.0
    s_req = s_load * growth / k
    s_r = float(v.stated_rated_power) or next_r10(s_req)
    if s_r < s_load / 20.0:
        # an undersized rating is the rating check's job; twenty times overloaded is a unit slip
        raise InputConflict("stated_rated_power", f"stated rating {s_r:.3g} MVA is below a twentieth of "
                            f"the load {s_load:.3g} MVA; check its unit (MVA expected)")
    if v.stated_rated_power and not math.isclose(s_r, next_r10(s_r), rel_tol=1e-9):
        warnings.append(f"stated rating {s_r:g} MVA is not an R10 preferred rating (ISO 3)")
    uk_min = minimum_short_circuit_impedance(1e3 * s_r)
    uk = float(v.stated_short_circuit_impedance) or uk_min
    try:
        u_r, u_x = impedance_components(uk, float(v.load_loss), s_r)
    except ValueError as exc:
        raise InputConflict("load_loss", f"{exc}; the load loss is too large for {s_r:g} MVA") from None
    if u_r > 0.5 * uk:
        warnings.append(f"u_R = {u_r:.2f} % is more than half of u_k: check the load loss")
    b = s_load / s_r
    reg = voltage_regulation(u_r, u_x, pf, b, lagging=q >= 0)
    losses, eta = efficiency(s_load, pf, s_r, float(v.no_load_loss), float(v.load_loss))
    i_hv = 1e3 * s_r / (math.sqrt(3.0) * float(v.hv_rated_voltage))
    i_lv = 1e3 * s_r / (math.sqrt(3.0) * float(v.lv_rated_voltage))
    s_src = float(v.source_fault_level)
    if 0.0 < s_src < s_r:
        # such a supply could not hold its voltage at the transformer's own rated load
        raise InputConflict("source_fault_level", f"source fault level {s_src:.3g} MVA is below the "
                            f"transformer rating {s_r:g} MVA; check the value (0 for an infinite source)")
    i_f_lv = through_fault_current(s_r, float(v.lv_rated_voltage), uk, s_src)
    if v.transformer_role == "step_up" and v.tap_changer == "off_circuit":
        warnings.append("a step-up transformer with off-circuit taps only: the generator's voltage "
                        "range must cover the grid's")
    outputs: dict[str, float | str] = {
        "transformer_load_apparent_power": s_load,
        "transformer_load_power_factor": pf,
        "temperature_rise_reduction": dtheta,
        "transformer_derating_factor": k,
        "required_rated_power": s_req,
        "transformer_rated_power": s_r,
        "minimum_short_circuit_impedance": uk_min,
        "short_circuit_impedance": uk,
        "resistive_impedance": u_r,
        "reactive_impedance": u_x,
        "transformer_loading": 100.0 * s_load * growth / (k * s_r),
        "voltage_regulation": reg,
        "transformer_losses": losses,
        "transformer_efficiency": eta,
        "hv_rated_current": i_hv,
        "lv_rated_current": i_lv,
        "through_fault_current_hv": i_f_lv * float(v.lv_rated_voltage) / float(v.hv_rated_voltage),
        "through_fault_current_lv": i_f_lv,
    }
    return Result(outputs=outputs, warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers
# ---------------------------------------------------------------------------

_REG = ("hand-worked case (common practice, no source): e_r = 1 %, e_x = 8 %, full load at cos phi = 0.8 "
        "lagging: 0.8 + 4.8 + (6.4 - 0.6)^2 / 200 = 5.7682 %")

PUBLISHED_CASES = [
    PublishedCase("next R10 rating above 14.3 MVA", "ISO 3:1973, series R10", 16.0, "MVA", 1e-9, "exact",
                  lambda: next_r10(14.3)),
    PublishedCase("next R10 rating above 1.26 MVA", "ISO 3:1973, series R10", 1.6, "MVA", 1e-9, "exact",
                  lambda: next_r10(1.26)),
    PublishedCase("R10 rating 3.15 is its own next rating", "ISO 3:1973, series R10", 3.15, "MVA", 1e-9,
                  "exact", lambda: next_r10(3.15)),
    PublishedCase("minimum u_k of a 1600 kVA transformer", "IEC 60076-5:2006 Table 1 (from memory)", 6.0,
                  "%", 1e-9, "table value", lambda: minimum_short_circuit_impedance(1600.0)),
    PublishedCase("minimum u_k of a 16 MVA transformer", "IEC 60076-5:2006 Table 1 (from memory)", 8.0,
                  "%", 1e-9, "table value", lambda: minimum_short_circuit_impedance(16000.0)),
    PublishedCase("regulation at full load, 0.8 pf lagging", _REG, 5.7682, "%", 5e-5,
                  "the hand result is printed to 4 decimals", lambda: voltage_regulation(1.0, 8.0, 0.8)),
]
