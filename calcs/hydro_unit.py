"""Small hydro unit: from water power over the gross head to power at the grid, and the year.

P = rho g Q H over the gross head, less the penstock head loss (given, or Darcy-Weisbach with a
given friction factor or one from the wall roughness by Swamee-Jain), then turbine, gearbox,
generator and transformer efficiencies.  The annual energy integrates the power over a
flow-duration curve (trapezoid rule over the exceedance share of the year), with the flow
capped at the design flow, nothing below the turbine's minimum flow, the head loss scaled with
the square of the flow (friction factor held at its design value) and the efficiencies held
at their design values: an upper estimate, since real turbines lose efficiency at part flow.
Units: m, m3/s, kW, MWh.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Chart,
    Check,
    Column,
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

STANDARD_GRAVITY = 9.80665  # m/s2, CGPM 1901 (ISO 80000-3:2019, item 3-9.3 as recalled)
KELVIN = 273.15
HOURS_PER_YEAR = 8760.0


# ---------------------------------------------------------------------------
# Published models, one function each
# ---------------------------------------------------------------------------


def water_properties(temperature_c: float) -> tuple[float, float]:
    """(density kg/m3, kinematic viscosity mm2/s) of liquid water at 1 atm, CoolProp IAPWS-95."""
    from CoolProp.CoolProp import PropsSI  # lazy: a module import stays cheap

    t = temperature_c + KELVIN
    rho = PropsSI("D", "T", t, "P", 101325.0, "Water")
    mu = PropsSI("V", "T", t, "P", 101325.0, "Water")
    return rho, mu / rho * 1e6


def hydraulic_power(density: float, flow: float, head: float) -> float:
    """P = rho g Q H in kW (IEC 60041:1991, hydraulic power of the machine, as recalled)."""
    return density * STANDARD_GRAVITY * flow * head / 1e3


def swamee_jain(reynolds: float, relative_roughness: float) -> float:
    """Darcy friction factor f = 0.25 / [log10(eps/(3.7 D) + 5.74 / Re^0.9)]^2.
    Swamee and Jain, J. Hydraulics Div. ASCE 102 (HY5), 1976, pp. 657-664; stated within about
    1 % of Colebrook for 1e-6 <= eps/D <= 1e-2 and 5e3 <= Re <= 1e8 (as recalled)."""
    if reynolds < 4000.0:
        raise ValueError(f"Swamee-Jain holds for turbulent flow; Re = {reynolds:.0f}")
    return 0.25 / math.log10(relative_roughness / 3.7 + 5.74 / reynolds**0.9) ** 2


def colebrook(reynolds: float, relative_roughness: float) -> float:
    """Darcy friction factor from the implicit Colebrook equation
    1/sqrt(f) = -2 log10(eps/(3.7 D) + 2.51/(Re sqrt(f))), solved by fixed-point iteration
    (Colebrook, J. ICE 11, 1939; White, Fluid Mechanics, 7th ed., 2011, eq. 6.48, as recalled)."""
    inv = 1.0 / math.sqrt(swamee_jain(max(reynolds, 4000.0), relative_roughness))
    for _ in range(50):
        new = -2.0 * math.log10(relative_roughness / 3.7 + 2.51 * inv / reynolds)
        if abs(new - inv) < 1e-12:
            break
        inv = new
    return 1.0 / inv**2


def darcy_weisbach(friction_factor: float, length: float, diameter: float, velocity: float) -> float:
    """Head loss h_f = f (L/D) v^2 / (2 g) in m (White, Fluid Mechanics, 7th ed., eq. 6.10, as recalled)."""
    return friction_factor * length / diameter * velocity**2 / (2.0 * STANDARD_GRAVITY)


def annual_energy(curve: Sequence[tuple[float, float]], power_at_flow, design_flow: float,
                  minimum_flow: float, availability: float) -> float:
    """Annual energy in MWh: trapezoid over the flow-duration curve of P(min(Q, Q_d)), P = 0
    below the minimum flow; 8760 h times the availability (ESHA, Guide on How to Develop a Small
    Hydropower Plant, 2004, ch. 3, as recalled).  ``power_at_flow`` gives kW for a flow in m3/s."""
    pts = sorted(curve)
    if not pts:
        return 0.0

    def p(q: float) -> float:
        used = min(q, design_flow)
        return power_at_flow(used) if used >= minimum_flow and used > 0.0 else 0.0

    # the curve is extended flat to 0 % and 100 % exceedance from its end points
    xs = [0.0] + [e for e, _ in pts] + [100.0]
    ps = [p(pts[0][1])] + [p(q) for _, q in pts] + [p(pts[-1][1])]
    mean_kw = sum(0.5 * (ps[i] + ps[i + 1]) * (xs[i + 1] - xs[i]) for i in range(len(xs) - 1)) / 100.0
    return mean_kw * HOURS_PER_YEAR * availability / 1e3


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iec60041", "IEC 60041:1991, Field acceptance tests to determine the hydraulic performance "
              "of hydraulic turbines, storage pumps and pump-turbines, IEC, Geneva.",
              "Hydraulic power P = rho g Q H and the definitions of head and efficiency (as recalled)."),
    Reference("white", "F. M. White, Fluid Mechanics, 7th ed., McGraw-Hill, New York, 2011.",
              "Darcy-Weisbach head loss (eq. 6.10), Colebrook (eq. 6.48), minor losses (§6.9); equation "
              "numbers as recalled."),
    Reference("swamee_jain", "P. K. Swamee and A. K. Jain, Explicit equations for pipe-flow problems, "
              "J. Hydraulics Division ASCE 102 (HY5), 1976, pp. 657-664.",
              "Explicit friction factor (as recalled)."),
    Reference("coolprop", "I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, CoolProp, Ind. Eng. Chem. Res. "
              "53 (6), 2014, pp. 2498-2508 (CoolProp 6.8.0).",
              "Water density and viscosity (IAPWS-95 and the IAPWS 2008 viscosity formulation)."),
    Reference("esha", "European Small Hydropower Association (ESHA), Guide on How to Develop a Small "
              "Hydropower Plant, Brussels, 2004.",
              "Flow-duration curve and annual energy (ch. 3, as recalled); efficiency chain (ch. 6)."),
    Reference("practice", "Common engineering practice, no published source: screening values "
              "chosen in basisbook 0.1.0 (this module).",
              "Penstock velocity and head-loss limits; confirm with the turbine supplier."),
]

SPEC = CalcSpec(
    kind="hydro_unit",
    discipline="conversion chains",
    title="Hydro unit: water power to grid and annual energy",
    purpose=(
        "Fix the hydraulic power of the design flow over the gross head, the penstock head loss "
        "and net head, the power after turbine, gearbox, generator and transformer, the "
        "water-to-wire efficiency chain and, from a flow-duration curve, the annual energy."
    ),
    inputs=[
        Input("hydro_design_flow", range="[0.01, 1000]", note="from 10 l/s (micro hydro) upwards"),
        Input("gross_head", range="[1, 2000]", note="the lowest-head turbines work from about 1.5 m"),
        Input("water_temperature", range="[0.1, 40]", default=10.0),
        Input("penstock_loss_basis", default="roughness", choices=("head_loss", "friction_factor", "roughness")),
        Input("penstock_head_loss_given", range="[0, 2000]", default=0.0, note="used when the basis is head_loss"),
        Input("penstock_length", range="[0, 20000]", default=0.0),
        Input("penstock_diameter", range="[0, 20]", default=0.0),
        Input("penstock_friction_factor_given", range="[0, 0.1]", default=0.0,
              note="used when the basis is friction_factor"),
        Input("penstock_roughness", range="[0, 10]", default=0.045,
              note="0.045 mm for new commercial steel (White, 7th ed., Table 6.1, as recalled)"),
        Input("penstock_minor_loss_coefficient", range="[0, 50]", default=0.0),
        Input("hydro_turbine_efficiency", range="[0.5, 1]",
              note="best-point efficiencies of real turbines lie between about 0.8 and 0.95"),
        Input("mechanical_efficiency", range="[0.8, 1]", default=1.0, note="gearbox, if any; 1 for direct drive"),
        Input("generator_efficiency", range="[0.7, 1]"),
        Input("hydro_transformer_efficiency", range="[0.9, 1]", default=1.0),
        Input("flow_duration_curve", default=(), min_rows=0,
              columns=(Column("exceedance", "%", "[0, 100]"), Column("flow", "m**3/s", "[0, 100000]")),
              note="optional; rows of exceedance share of the year and river flow available to the unit"),
        Input("minimum_turbine_flow_fraction", range="[0, 1)", default=0.0),
        Input("hydro_availability", range="[0, 1]", default=1.0),
    ],
    outputs=[
        Output("water_density"),
        Output("water_kinematic_viscosity"),
        Output("penstock_velocity"),
        Output("penstock_reynolds_number"),
        Output("penstock_friction_factor"),
        Output("penstock_head_loss"),
        Output("net_head", key=True),
        Output("gross_hydraulic_power"),
        Output("net_hydraulic_power"),
        Output("hydro_shaft_power"),
        Output("hydro_generator_output", key=True),
        Output("hydro_grid_output", key=True),
        Output("hydraulic_efficiency"),
        Output("water_to_wire_efficiency", key=True),
        Output("hydro_annual_energy", key=True),
        Output("hydro_full_load_hours"),
        Output("hydro_capacity_factor"),
    ],
    steps=[
        Step("water_density", r"\rho\left(\mathrm{H}_2\mathrm{O};\ @water_temperature,\ 101.325\ \mathrm{kPa}\right)",
             "coolprop", "IAPWS-95"),
        Step("water_kinematic_viscosity", r"\mu(@water_temperature) / @water_density", "coolprop",
             "IAPWS 2008 viscosity"),
        Step("penstock_velocity", r"\frac{4\,@hydro_design_flow}{\pi\,@penstock_diameter^{2}}", "white",
             "continuity (0 when no penstock is described)"),
        Step("penstock_reynolds_number",
             r"\frac{@penstock_velocity\,@penstock_diameter}{@water_kinematic_viscosity \cdot 10^{-6}}",
             "white", "§6.1"),
        Step("penstock_friction_factor",
             r"\frac{0.25}{\left[\log_{10}\left(\dfrac{@penstock_roughness}{3.7 \cdot 10^{3}\,@penstock_diameter}"
             r" + \dfrac{5.74}{@penstock_reynolds_number^{0.9}}\right)\right]^{2}}",
             "swamee_jain", "explicit friction factor (or the given f)"),
        Step("penstock_head_loss",
             r"\left(@penstock_friction_factor\,\frac{@penstock_length}{@penstock_diameter} + "
             r"@penstock_minor_loss_coefficient\right)\frac{@penstock_velocity^{2}}{2 \cdot 9.80665}",
             "white", "eq. 6.10 Darcy-Weisbach with local losses (§6.9); or the given head loss"),
        Step("net_head", r"@gross_head - @penstock_head_loss", "iec60041", "definition of net head"),
        Step("gross_hydraulic_power",
             r"@water_density \cdot 9.80665\,@hydro_design_flow\,@gross_head \cdot 10^{-3}", "iec60041",
             "hydraulic power"),
        Step("net_hydraulic_power",
             r"@water_density \cdot 9.80665\,@hydro_design_flow\,@net_head \cdot 10^{-3}", "iec60041",
             "hydraulic power"),
        Step("hydro_shaft_power", r"@hydro_turbine_efficiency\,@net_hydraulic_power", "iec60041",
             "turbine efficiency"),
        Step("hydro_generator_output", r"@mechanical_efficiency\,@generator_efficiency\,@hydro_shaft_power",
             "esha", "ch. 6 efficiency chain"),
        Step("hydro_grid_output", r"@hydro_transformer_efficiency\,@hydro_generator_output", "esha",
             "ch. 6 efficiency chain"),
        Step("hydraulic_efficiency", r"\frac{@net_head}{@gross_head}", "esha", "ch. 6"),
        Step("water_to_wire_efficiency", r"\frac{@hydro_grid_output}{@gross_hydraulic_power}", "esha",
             "ch. 6: product of the chain"),
        Step("hydro_annual_energy",
             r"@hydro_availability \cdot 8760\ \mathrm{h} \int_{0}^{1} P_\mathrm{grid}\left("
             r"\min(Q(p), @hydro_design_flow)\right)\mathrm{d}p \cdot 10^{-3}",
             "esha", "ch. 3 (trapezoid rule; P = 0 below the minimum turbine flow)"),
        Step("hydro_full_load_hours", r"\frac{10^{3}\,@hydro_annual_energy}{@hydro_grid_output}", "esha", "ch. 3"),
        Step("hydro_capacity_factor", r"\frac{@hydro_full_load_hours}{8760\ \mathrm{h}}", "esha", "ch. 3"),
    ],
    checks=[
        Check("head_loss", "Penstock head loss at most 10 % of gross head (net over gross at least 0.90)",
              "hydraulic_efficiency", ">=", 0.90, "practice", review_band=0.02),
        Check("velocity", "Penstock velocity at most 5 m/s at design flow", "penstock_velocity", "<=", 5.0,
              "practice", review_band=0.1),
    ],
    references=REFERENCES,
    cautions=[
        "Water under pressure: a penstock, its valves and the turbine casing store large energy; "
        "load rejection causes water hammer. Drain and isolate before opening.",
        "Intakes, weirs, trash racks and tailraces can drown: fence them, keep rescue equipment and "
        "never enter the water ways while the unit can start.",
        "Rotating machinery and live generator terminals: isolate, lock and prove at rest before work.",
        "These figures are a design basis for review, not a supplier's guarantee. Defer to the "
        "local codes, the water authority's conditions and licensed engineering practice.",
    ],
    figures=[
        FigureSpec("energy_flow", "Energy flow from water to grid",
                   "Gross hydraulic power of the design flow to power at the grid, with each loss of the chain."),
        FigureSpec("flow_duration", "Flow-duration curve and power",
                   "River flow available against the share of the year it is exceeded, the flow the "
                   "turbine uses (capped at the design flow) and the grid power at that flow."),
    ],
    tables=[
        TableSpec("efficiency_chain", "Efficiency chain at design flow",
                  "Each conversion stage with its efficiency and the power after it."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def _friction(v: Values, reynolds: float, diameter: float) -> float:
    basis = v.penstock_loss_basis
    if basis == "friction_factor":
        f = float(v.penstock_friction_factor_given)
        if f == 0.0:
            raise InputConflict("penstock_friction_factor_given",
                                "penstock_loss_basis is friction_factor but no friction factor is given")
        return f
    if reynolds < 4000.0:
        raise InputConflict("penstock_diameter", f"penstock flow is not turbulent (Re = {reynolds:.0f}); "
                            "Swamee-Jain does not apply")
    return swamee_jain(reynolds, float(v.penstock_roughness) * 1e-3 / diameter)


def compute(v: Values) -> Result:
    warnings: list[str] = []
    q_d = float(v.hydro_design_flow)
    h_g = float(v.gross_head)
    basis = v.penstock_loss_basis
    length, d = float(v.penstock_length), float(v.penstock_diameter)
    rho, nu = water_properties(float(v.water_temperature))
    eta_t, eta_m = float(v.hydro_turbine_efficiency), float(v.mechanical_efficiency)
    eta_g, eta_tr = float(v.generator_efficiency), float(v.hydro_transformer_efficiency)

    if 0.0 < d < 0.05:
        raise InputConflict("penstock_diameter", f"penstock diameter {d:g} m is below 50 mm; give the "
                            "diameter in metres, or 0 when the head loss is given directly")
    if basis == "head_loss":
        velocity = 4.0 * q_d / (math.pi * d * d) if d > 0 else 0.0
        reynolds = velocity * d / (nu * 1e-6)
        friction = 0.0
        h_f = float(v.penstock_head_loss_given)
        if d == 0.0:
            warnings.append("no penstock diameter given: velocity and Reynolds number shown as 0")
    else:
        if d == 0.0:
            raise InputConflict("penstock_diameter", f"penstock_loss_basis is {basis}: the penstock "
                                "diameter is needed (m)")
        if length == 0.0:
            raise InputConflict("penstock_length", f"penstock_loss_basis is {basis}: the penstock length "
                                "is needed (m)")
        velocity = 4.0 * q_d / (math.pi * d * d)
        reynolds = velocity * d / (nu * 1e-6)
        friction = _friction(v, reynolds, d)
        h_f = (friction * length / d + float(v.penstock_minor_loss_coefficient)) * velocity**2 / (2 * STANDARD_GRAVITY)
    if h_f >= h_g:
        raise InputConflict("penstock_head_loss_given" if basis == "head_loss" else "penstock_diameter",
                            f"the penstock head loss {h_f:.2f} m is not below the gross head {h_g:g} m")
    h_n = h_g - h_f
    if h_f > h_g / 3.0:
        # P ~ q (h_g - h_f (q/q_d)^2) peaks at q = q_d sqrt(h_g / (3 h_f)): beyond it more flow
        # gives less power, so the design flow lies past the unit's best point
        warnings.append(f"the penstock head loss {h_f:.2f} m is more than a third of the gross head: the unit "
                        "would give more power at a lower flow than the design flow; enlarge the penstock")
    p_gross = hydraulic_power(rho, q_d, h_g)
    p_net = hydraulic_power(rho, q_d, h_n)
    p_shaft = eta_t * p_net
    p_gen = eta_m * eta_g * p_shaft
    p_grid = eta_tr * p_gen

    def power_at_flow(q: float) -> float:
        # head loss grows with the square of the flow (friction factor held at design)
        return eta_t * eta_m * eta_g * eta_tr * hydraulic_power(rho, q, h_g - h_f * (q / q_d) ** 2)

    curve = tuple(v.flow_duration_curve)
    q_min = float(v.minimum_turbine_flow_fraction) * q_d
    energy = annual_energy(curve, power_at_flow, q_d, q_min, float(v.hydro_availability))
    if not curve:
        warnings.append("no flow-duration curve given: annual energy shown as 0")
    hours = 1e3 * energy / p_grid
    outputs: dict[str, float | str] = {
        "water_density": rho,
        "water_kinematic_viscosity": nu,
        "penstock_velocity": velocity,
        "penstock_reynolds_number": reynolds,
        "penstock_friction_factor": friction,
        "penstock_head_loss": h_f,
        "net_head": h_n,
        "gross_hydraulic_power": p_gross,
        "net_hydraulic_power": p_net,
        "hydro_shaft_power": p_shaft,
        "hydro_generator_output": p_gen,
        "hydro_grid_output": p_grid,
        "hydraulic_efficiency": h_n / h_g,
        "water_to_wire_efficiency": p_grid / p_gross,
        "hydro_annual_energy": energy,
        "hydro_full_load_hours": hours,
        "hydro_capacity_factor": hours / HOURS_PER_YEAR,
    }
    p_turb_out = p_shaft * eta_m
    flow = EnergyFlow(
        unit="kW",
        inflows=[("Water power over the gross head", p_gross)],
        outflows=[
            ("Power to the grid", p_grid, "product"),
            ("Penstock and intake loss", p_gross - p_net, "loss"),
            ("Turbine loss", p_net - p_shaft, "loss"),
            *([("Gearbox loss", p_shaft - p_turb_out, "loss")] if eta_m < 1.0 else []),
            ("Generator loss", p_turb_out - p_gen, "loss"),
            *([("Transformer loss", p_gen - p_grid, "loss")] if eta_tr < 1.0 else []),
        ],
    )
    table = Table(
        columns=[("Stage", ""), ("Efficiency", ""), ("Power after the stage", "kW"), ("Cumulative efficiency", "")],
        rows=[
            ["Water over the gross head", 1.0, p_gross, 1.0],
            ["Penstock and intake (net / gross head)", h_n / h_g, p_net, p_net / p_gross],
            ["Turbine", eta_t, p_shaft, p_shaft / p_gross],
            ["Gearbox", eta_m, p_turb_out, p_turb_out / p_gross],
            ["Generator", eta_g, p_gen, p_gen / p_gross],
            ["Step-up transformer", eta_tr, p_grid, p_grid / p_gross],
        ],
    )
    charts: dict[str, Chart | EnergyFlow] = {"energy_flow": flow}
    if curve:
        pts = sorted(curve)
        xs = [e for e, _ in pts]
        used = [min(q, q_d) if min(q, q_d) >= q_min else 0.0 for _, q in pts]
        charts["flow_duration"] = Chart(
            x_label="Share of the year the flow is exceeded (%)",
            y_label="Flow (m³/s); grid power (MW)",
            series=[
                Series("River flow available", xs, [q for _, q in pts]),
                Series("Flow through the turbine", xs, used, style="dashed"),
                Series("Grid power (MW)", xs, [power_at_flow(q) / 1e3 if q > 0 else 0.0 for q in used],
                       style="dotted"),
            ],
            markers=[Marker("Design flow", next((e for e, q in pts if q <= q_d), xs[-1]), q_d)],
        )
    return Result(outputs=outputs, charts=charts, tables={"efficiency_chain": table}, warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers
# ---------------------------------------------------------------------------

PUBLISHED_CASES = [
    PublishedCase("smooth-pipe friction factor at Re = 1e5", "Moody chart / Colebrook, smooth pipe, "
                  "f = 0.0180 at Re = 1e5 (White, Fluid Mechanics 7th ed., Fig. 6.13, from memory)",
                  0.0180, "", 0.0003, "chart read to 3 digits; Swamee-Jain is within about 1 % of Colebrook",
                  lambda: swamee_jain(1e5, 0.0)),
    PublishedCase("fully rough friction factor at eps/D = 0.001", "Colebrook fully rough limit "
                  "1/sqrt(f) = -2 log10(eps/(3.7 D)) gives f = 0.0196 at eps/D = 0.001 (White 7th ed., "
                  "eq. 6.48, from memory)", 0.0196, "", 0.0003, "3 digits; Re = 1e8 approximates the rough limit",
                  lambda: swamee_jain(1e8, 0.001)),
    PublishedCase("hydraulic power of 1 m³/s over 100 m", "P = rho g Q H (IEC 60041), rho = 1000 kg/m³, "
                  "g = 9.80665 m/s²: 980.665 kW exactly", 980.665, "kW", 1e-9, "exact identity",
                  lambda: hydraulic_power(1000.0, 1.0, 100.0)),
]
