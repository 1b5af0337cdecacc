"""Unit auxiliary load: load list, duty-based maximum demand, share of gross output.

The load list (CSV or XLSX) has one row per drive or service.  Each row's
electrical input at rated output is its rated power (divided by the motor
efficiency when the rating is a shaft power); the running load is that times
the row's load factor, and its share of the maximum demand is the running load
times the demand factor of its duty.  Active and reactive power are summed
separately (the reactive part from each row's power factor, taken constant
over the load range: a simplification, stated on the page).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Check,
    Field,
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

DUTIES = ("continuous", "intermittent", "standby")
# busbar sections of one auxiliary switchboard; the loader rejects any other name with file:row
BUSES = ("section_a", "section_b", "essential")

LOAD_LIST_FIELDS = (
    Field("tag", "equipment tag", "text", unique=True),
    Field("description", "what the load is", "text", default=""),
    Field("service", "system or service it belongs to", "text", default=""),
    Field("bus", "busbar section it is fed from", "choice", choices=BUSES),
    Field("rated_power", "rated power (shaft power of a motor, electrical input otherwise)", "kW",
          range="(0, 20000]"),
    Field("power_basis", "what rated_power means: shaft (motor output) or electrical (input)", "choice",
          choices=("shaft", "electrical"), default="electrical"),
    Field("efficiency", "motor efficiency at rated output (1 for an electrical rating)", "",
          range="(0, 1]", default=1.0),
    Field("power_factor", "power factor at rated output", "", range="(0, 1]"),
    Field("load_factor", "absorbed power as a share of the rated power", "", range="[0, 1.2]"),
    Field("duty", "duty", "choice", choices=DUTIES),
    Field("essential", "needed for island operation and black start", "choice", choices=("yes", "no"),
          default="no"),
    Field("dol_start", "motor started direct-on-line", "choice", choices=("yes", "no"), default="no"),
    Field("starting_current_ratio", "locked-rotor to rated current I_LR/I_r", "", range="[1, 12]",
          default=6.0),
    Field("starting_power_factor", "power factor at locked rotor", "", range="(0, 1]", default=0.3),
)


# ---------------------------------------------------------------------------
# Published models, one function each
# ---------------------------------------------------------------------------


def electrical_input(rated_power: float, power_basis: str, efficiency: float) -> float:
    """Electrical input at rated output, kW: P_in = P_shaft / eta for a motor rated at the
    shaft (IEC 60034-1:2022 cl. 3, rated output of a motor is mechanical), else P_r."""
    return rated_power / efficiency if power_basis == "shaft" else rated_power


def reactive_power(active_power: float, power_factor: float) -> float:
    """Q = P tan(phi) = P sqrt(1 - cos^2 phi) / cos phi (power triangle)."""
    return active_power * math.sqrt(max(0.0, 1.0 - power_factor**2)) / power_factor


def starting_apparent_power(rated_input_kw: float, power_factor: float, current_ratio: float) -> float:
    """Locked-rotor apparent power at rated voltage, kVA: S_LR = (I_LR/I_r) P_in / cos(phi_r)
    (IEEE Std 399-1997 ch. 9, motor starting, as recalled)."""
    return current_ratio * rated_input_kw / power_factor


@dataclass(frozen=True)
class LoadRow:
    """One load-list row evaluated: kW, kvar, kVA in the declared units."""

    tag: str
    bus: str
    duty: str
    essential: bool
    dol: bool
    motor: bool
    rated_input: float       # kW at rated output
    running_active: float    # kW at the row's load factor
    demand_active: float     # kW with the duty's demand factor
    demand_reactive: float   # kvar
    rated_apparent: float    # kVA at rated output
    starting_apparent: float  # kVA at locked rotor (DOL motors), else 0
    starting_power_factor: float
    shaft_power: float       # kW, motors only
    record: Mapping[str, Any]


def evaluate_row(rec: Mapping[str, Any], demand_factors: Mapping[str, float]) -> LoadRow:
    """Connected, running and demand power of one row (demand factor per duty:
    IEEE Std 141-1993 §2.? definition of demand factor, as recalled; values common practice)."""
    p_in = electrical_input(rec["rated_power"], rec["power_basis"], rec["efficiency"])
    pf = rec["power_factor"]
    running = rec["load_factor"] * p_in
    p_d = demand_factors[rec["duty"]] * running
    motor = rec["power_basis"] == "shaft"
    dol = rec["dol_start"] == "yes"
    s_lr = starting_apparent_power(p_in, pf, rec["starting_current_ratio"]) if dol else 0.0
    return LoadRow(rec["tag"], rec["bus"], rec["duty"], rec["essential"] == "yes", dol, motor,
                   p_in, running, p_d, reactive_power(p_d, pf), p_in / pf, s_lr,
                   rec["starting_power_factor"], rec["rated_power"] if motor else 0.0, rec)


@dataclass(frozen=True)
class Demand:
    connected: float  # kW
    active: float     # kW
    reactive: float   # kvar

    @property
    def apparent(self) -> float:
        return math.hypot(self.active, self.reactive)


def summed_demand(rows: Sequence[LoadRow]) -> Demand:
    """Maximum demand as the sum of the rows' demand, P and Q summed separately
    (IEEE Std 141-1993 ch. 2 load summation, as recalled; common practice)."""
    return Demand(sum(r.rated_input for r in rows), sum(r.demand_active for r in rows),
                  sum(r.demand_reactive for r in rows))


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("ieee141", "IEEE Std 141-1993, IEEE Recommended Practice for Electric Power Distribution "
              "for Industrial Plants (Red Book), IEEE, New York, 1994.",
              "Ch. 2 (planning): connected load, demand factor and maximum demand; clause numbers as "
              "recalled."),
    Reference("ieee399", "IEEE Std 399-1997, IEEE Recommended Practice for Industrial and Commercial "
              "Power Systems Analysis (Brown Book), IEEE, New York, 1998.",
              "Ch. 9 motor-starting studies: locked-rotor kVA from I_LR/I_r; as recalled."),
    Reference("iec60034_1", "IEC 60034-1:2022, Rotating electrical machines - Part 1: Rating and "
              "performance, International Electrotechnical Commission, Geneva.",
              "The rated output of a motor is the mechanical power at the shaft; as recalled."),
    Reference("practice", "Common engineering practice, no published source.",
              "Energy balance at the generator terminals; typical demand factors per duty (continuous 1.0, "
              "intermittent 0.5, standby 0) and screening limits. The project states its own factors; "
              "confirm them against the plant's operating modes."),
]

SPEC = CalcSpec(
    kind="auxiliary_load",
    discipline="auxiliary supply and transformers",
    title="Unit auxiliary load and maximum demand",
    purpose=(
        "Sum the unit's auxiliary load list per busbar section and for the unit: connected load, "
        "maximum demand in kW, kvar and kVA with duty-based demand factors, the auxiliary "
        "consumption as a share of gross output, the net export, the essential load that island "
        "operation and black start need, and the largest direct-on-line motor that the unit "
        "auxiliary transformer and the network must start."
    ),
    inputs=[
        Input("load_list", fields=LOAD_LIST_FIELDS, min_rows=1,
              note="CSV or XLSX in the project folder; one row per drive or service"),
        Input("generator_active_power", range="(0, 2000]", note="gross output at the generator terminals"),
        Input("generator_reactive_power", range="[-2000, 2000]",
              note="reactive power the generator delivers at the rated point (lagging positive)"),
        Input("demand_factor_continuous", range="[0, 1]", default=1.0, note="common practice 1.0"),
        Input("demand_factor_intermittent", range="[0, 1]", default=0.5, note="common practice 0.5"),
        Input("demand_factor_standby", range="[0, 1]", default=0.0,
              note="common practice 0: a standby drive runs only instead of its duty twin"),
        Input("emergency_supply_rating", range="(0, 100000]",
              note="rating of the black-start / emergency supply (e.g. a diesel set)"),
        Input("auxiliary_share_limit", range="(0, 50]", default=10.0,
              note="screening limit, common practice for a biomass steam unit"),
    ],
    outputs=[
        Output("connected_load", key=False),
        Output("maximum_demand_active", key=True),
        Output("maximum_demand_reactive"),
        Output("maximum_demand_apparent", key=True),
        Output("auxiliary_power_factor"),
        Output("auxiliary_share", key=True),
        Output("net_export_active_power", key=True),
        Output("net_export_reactive_power"),
        Output("essential_demand_active"),
        Output("essential_demand_apparent", key=True),
        Output("largest_motor_tag"),
        Output("largest_motor_rated_power"),
        Output("largest_motor_starting_power", key=True),
        Output("largest_motor_starting_power_factor"),
        Output("motor_start_base_active_load"),
        Output("motor_start_base_reactive_load"),
        Output("running_motor_apparent_power"),
        Output("motor_group_current_ratio"),
    ],
    steps=[
        Step("connected_load",
             r"\sum_{i=1}^{n} \begin{cases} P_{\mathrm{r},i}/\eta_i & \text{shaft rating (motor)} \\ "
             r"P_{\mathrm{r},i} & \text{electrical rating} \end{cases}",
             "iec60034_1", "a motor's rated output is its shaft power, its input P_r/η",
             note="n rows of the load list, each in the table below (connected load: IEEE Std 141 ch. 2)"),
        Step("maximum_demand_active",
             r"\sum_{i=1}^{n} g_{\mathrm{duty},i}\,\lambda_i\,P_{\mathrm{in},i}",
             "ieee141", "ch. 2, demand factor", note="g: demand factor of the row's duty "
             "(continuous, intermittent, standby); λ: load factor; per row in the table below"),
        Step("maximum_demand_reactive",
             r"\sum_{i=1}^{n} g_{\mathrm{duty},i}\,\lambda_i\,P_{\mathrm{in},i}\,\tan\varphi_i",
             "ieee141", "ch. 2, P and Q summed separately", note="power factor held at its rated value"),
        Step("maximum_demand_apparent",
             r"\sqrt{@maximum_demand_active^{2} + @maximum_demand_reactive^{2}}", "ieee141",
             "ch. 2 (power triangle)"),
        Step("auxiliary_power_factor", r"\frac{@maximum_demand_active}{@maximum_demand_apparent}",
             "ieee141", "ch. 2 (power triangle)"),
        Step("auxiliary_share",
             r"100\,\frac{@maximum_demand_active}{10^{3}\,@generator_active_power}", "practice",
             "auxiliary consumption as a share of gross output"),
        Step("net_export_active_power",
             r"@generator_active_power - \frac{@maximum_demand_active}{10^{3}}", "practice",
             "energy balance at the generator terminals"),
        Step("net_export_reactive_power",
             r"@generator_reactive_power - \frac{@maximum_demand_reactive}{10^{3}}", "practice",
             "reactive balance at the generator terminals"),
        Step("essential_demand_active",
             r"\sum_{i=1}^{n} e_i\,g_{\mathrm{duty},i}\,\lambda_i\,P_{\mathrm{in},i}",
             "ieee141", "ch. 2, demand of the essential rows", note="e_i = 1 for an essential row, else 0"),
        Step("essential_demand_apparent",
             r"\Big|\sum_{i=1}^{n} e_i\,g_{\mathrm{duty},i}\,\lambda_i\,P_{\mathrm{in},i}"
             r"\,(1 + j\tan\varphi_i)\Big|", "ieee141", "ch. 2 (P and Q summed separately)"),
        Step("largest_motor_rated_power", r"P_{\mathrm{r},k},\quad k = \arg\max_{i=1}^{n} S_{\mathrm{LR},i}", "ieee399", "ch. 9 (the largest motor start governs)"),
        Step("largest_motor_starting_power",
             r"\max_{i=1}^{n} d_i\,\frac{(I_\mathrm{LR}/I_\mathrm{r})_i\,P_{\mathrm{in},i}}"
             r"{\cos\varphi_{\mathrm{r},i}}", "ieee399", "ch. 9, locked-rotor kVA (as recalled)", note="d_i = 1 for a direct-on-line motor, else 0"),
        Step("largest_motor_starting_power_factor", r"\cos\varphi_{\mathrm{LR},k},\quad k = \arg\max_{i=1}^{n} S_{\mathrm{LR},i}",
             "ieee399", "ch. 9 (from the load list)"),
        Step("motor_start_base_active_load",
             r"@maximum_demand_active - g\,\lambda\,P_\mathrm{in}\big|_\text{largest motor}",
             "ieee399", "ch. 9: the load running while the largest motor starts"),
        Step("motor_start_base_reactive_load",
             r"@maximum_demand_reactive - g\,\lambda\,P_\mathrm{in}\tan\varphi\big|_\text{largest motor}",
             "ieee399", "ch. 9: the load running while the largest motor starts"),
        Step("running_motor_apparent_power",
             r"\sum_{i=1}^{n} m_i\,\frac{P_{\mathrm{in},i}}{\cos\varphi_{\mathrm{r},i}}",
             "ieee399", "rated kVA of the motors that can run together (for their short-circuit "
             "contribution)", note="m_i = 1 for a motor whose duty's demand factor is above 0, else 0"),
        Step("motor_group_current_ratio",
             r"\frac{\sum (I_\mathrm{LR}/I_\mathrm{r})_i\,S_{\mathrm{r},i}}{@running_motor_apparent_power}",
             "ieee399", "kVA-weighted mean of the running motors"),
    ],
    checks=[
        Check("auxiliary_share", "Auxiliary consumption within the screening share of gross output",
              "auxiliary_share", "<=", "auxiliary_share_limit", "practice", review_band=0.1),
        Check("emergency_supply", "Essential load within the emergency (black-start) supply rating",
              "essential_demand_apparent", "<=", "emergency_supply_rating", "practice",
              "largest-motor start on that supply not checked here", review_band=0.1),
    ],
    references=REFERENCES,
    cautions=[
        "Auxiliary switchboards, motor control centres and their cables carry lethal voltages and can "
        "release arc-flash energy on a fault: work only on isolated, proved-dead and earthed equipment.",
        "A standby drive can start automatically at any time; lock it out before work on it.",
        "Demand factors are a design-basis estimate, not a measurement: confirm them with the "
        "operating modes (start-up, island, trip) and defer to local codes and licensed engineering practice.",
    ],
    tables=[
        TableSpec("load_list_summary", "Load list with demand",
                  "Every row of the load list with its electrical input, running and demand power; "
                  "the last column links to the row in the source file."),
        TableSpec("bus_summary", "Demand per busbar section",
                  "Connected load and maximum demand per section, the essential share, and the largest "
                  "direct-on-line motor on the section."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def compute(v: Values) -> Result:
    warnings: list[str] = []
    factors = {"continuous": float(v.demand_factor_continuous),
               "intermittent": float(v.demand_factor_intermittent),
               "standby": float(v.demand_factor_standby)}
    records = v.load_list
    if not records:
        raise InputConflict("load_list", "the load list has no rows")
    rows = [evaluate_row(r, factors) for r in records]
    for r in rows:
        rec = r.record
        where = rec.source.label if hasattr(rec, "source") else r.tag
        if rec["power_basis"] == "electrical" and rec["efficiency"] != 1.0:
            warnings.append(f"{where} {r.tag}: efficiency {rec['efficiency']:g} ignored for an "
                            "electrical rating")
        if r.dol and not r.motor:
            raise InputConflict("load_list", f"{where}: {r.tag} is marked dol_start = yes but its "
                                "power_basis is electrical; a direct-on-line start needs a motor "
                                "(power_basis = shaft)")
        if rec["starting_power_factor"] > rec["power_factor"] and r.dol:
            warnings.append(f"{where} {r.tag}: starting power factor above the running one is unusual")

    total = summed_demand(rows)
    if total.active <= 0.0:
        raise InputConflict("load_list", "every row has zero demand (load or demand factors are 0)")
    essential = summed_demand([r for r in rows if r.essential])
    p_g = float(v.generator_active_power)
    q_g = float(v.generator_reactive_power)

    dol = [r for r in rows if r.dol]
    # the largest start governs; between equal motors the running (duty) one, as its start sees the
    # full running load (max keeps the first of equal keys: load-list order)
    largest = max(dol, key=lambda r: (r.starting_apparent, r.demand_active)) if dol else None
    running_motors = [r for r in rows if r.motor and factors[r.duty] > 0.0]
    s_m = sum(r.rated_apparent for r in running_motors)
    ratio_m = (sum(r.record["starting_current_ratio"] * r.rated_apparent for r in running_motors) / s_m
               if s_m > 0 else 0.0)
    if largest is None:
        warnings.append("no direct-on-line motor in the load list: no motor-start case")
    share = 100.0 * total.active / (1e3 * p_g)
    if share > 50.0:
        raise InputConflict("load_list", f"the auxiliary demand {total.active:g} kW is {share:.0f} % of the "
                            f"gross output {p_g:g} MW; check the units of rated_power")
    if share > 20.0:  # possible, but a reviewer must look (common practice, no source)
        warnings.append(f"auxiliary consumption {share:.1f} % of gross output is above 20 %: unusual for a "
                        "generating unit; check the load list and the demand factors")

    outputs: dict[str, float | str] = {
        "connected_load": total.connected,
        "maximum_demand_active": total.active,
        "maximum_demand_reactive": total.reactive,
        "maximum_demand_apparent": total.apparent,
        "auxiliary_power_factor": total.active / total.apparent,
        "auxiliary_share": share,
        "net_export_active_power": p_g - total.active / 1e3,
        "net_export_reactive_power": q_g - total.reactive / 1e3,
        "essential_demand_active": essential.active,
        "essential_demand_apparent": essential.apparent,
        "largest_motor_tag": largest.tag if largest else "none",
        "largest_motor_rated_power": largest.shaft_power if largest else 0.0,
        "largest_motor_starting_power": largest.starting_apparent if largest else 0.0,
        "largest_motor_starting_power_factor": largest.starting_power_factor if largest else 0.3,
        "motor_start_base_active_load": total.active - (largest.demand_active if largest else 0.0),
        "motor_start_base_reactive_load": total.reactive - (largest.demand_reactive if largest else 0.0),
        "running_motor_apparent_power": s_m,
        "motor_group_current_ratio": ratio_m,
    }

    load_table = Table(
        # power basis and demand factor follow from P_in vs P_r and from the duty: left out for width
        columns=[("Tag", "text"), ("Description", "text"), ("Bus", "text"), ("Duty", "text"),
                 ("Essential", "text"), ("Rated power", "kW"), ("Input P_in", "kW"),
                 ("Load factor", ""), ("Demand P", "kW"), ("Demand Q", "kvar"),
                 ("DOL start S_LR", "kVA"), ("Source row", "text")],
        rows=[[r.tag, r.record["description"], r.bus, r.duty, "yes" if r.essential else "no",
               r.record["rated_power"], r.rated_input, r.record["load_factor"],
               r.demand_active, r.demand_reactive,
               r.starting_apparent if r.dol else "", getattr(r.record, "source", "")] for r in rows],
    )
    bus_rows = []
    for bus in BUSES:
        on_bus = [r for r in rows if r.bus == bus]
        if not on_bus:
            continue
        d = summed_demand(on_bus)
        e = summed_demand([r for r in on_bus if r.essential])
        big = max((r for r in on_bus if r.dol), key=lambda r: (r.starting_apparent, r.demand_active),
                  default=None)
        bus_rows.append([bus, len(on_bus), d.connected, d.active, d.reactive, d.apparent, e.active,
                         big.tag if big else "none", big.starting_apparent if big else 0.0])
    bus_rows.append(["unit total", len(rows), total.connected, total.active, total.reactive,
                     total.apparent, essential.active, largest.tag if largest else "none",
                     largest.starting_apparent if largest else 0.0])
    bus_table = Table(
        columns=[("Busbar section", "text"), ("Rows", ""), ("Connected", "kW"), ("Demand P", "kW"),
                 ("Demand Q", "kvar"), ("Demand S", "kVA"), ("Essential P", "kW"),
                 ("Largest DOL motor", "text"), ("its S_LR", "kVA")],
        rows=bus_rows,
    )
    return Result(outputs=outputs, tables={"load_list_summary": load_table, "bus_summary": bus_table},
                  warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers
# ---------------------------------------------------------------------------

_SMALL_LIST = (
    # tag, basis, P_r kW, eta, pf, load factor, duty: a hand-summed case (common practice)
    {"tag": "P1", "bus": "section_a", "rated_power": 100.0, "power_basis": "shaft", "efficiency": 0.8,
     "power_factor": 0.8, "load_factor": 1.0, "duty": "continuous", "essential": "yes", "dol_start": "yes",
     "starting_current_ratio": 6.0, "starting_power_factor": 0.3},
    {"tag": "P2", "bus": "section_b", "rated_power": 100.0, "power_basis": "shaft", "efficiency": 0.8,
     "power_factor": 0.8, "load_factor": 1.0, "duty": "standby", "essential": "no", "dol_start": "yes",
     "starting_current_ratio": 6.0, "starting_power_factor": 0.3},
    {"tag": "L1", "bus": "section_a", "rated_power": 40.0, "power_basis": "electrical", "efficiency": 1.0,
     "power_factor": 1.0, "load_factor": 0.5, "duty": "intermittent", "essential": "no", "dol_start": "no",
     "starting_current_ratio": 6.0, "starting_power_factor": 0.3},
)


def _small_demand() -> Demand:
    f = {"continuous": 1.0, "intermittent": 0.5, "standby": 0.0}
    return summed_demand([evaluate_row(r, f) for r in _SMALL_LIST])


_HAND = ("hand-summed three-row list (common practice, no source): pump 100 kW shaft, eta 0.8, pf 0.8 "
         "continuous; its standby twin; 40 kW lighting at load factor 0.5, intermittent 0.5")

PUBLISHED_CASES = [
    PublishedCase("connected load of the three-row list", _HAND, 290.0, "kW", 1e-9,
                  "exact arithmetic: 125 + 125 + 40", lambda: _small_demand().connected),
    PublishedCase("maximum demand P of the three-row list", _HAND, 135.0, "kW", 1e-9,
                  "exact arithmetic: 125 x 1 + 0 + 40 x 0.5 x 0.5", lambda: _small_demand().active),
    PublishedCase("maximum demand Q of the three-row list", _HAND, 93.75, "kvar", 1e-9,
                  "exact arithmetic: 125 x 0.75 (tan phi = 0.75 at pf 0.8)", lambda: _small_demand().reactive),
    PublishedCase("locked-rotor kVA, 6 x 125 kW / 0.8", "IEEE Std 399-1997 ch. 9 definition (as recalled)",
                  937.5, "kVA", 1e-9, "exact arithmetic", lambda: starting_apparent_power(125.0, 0.8, 6.0)),
]
