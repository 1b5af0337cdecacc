"""Synchronous generator: rating, speed, EMF, phasor diagram and P-Q capability chart.

All phasor and chart work is per unit on the generator's rated values (rated
apparent power and rated phase voltage), with the terminal voltage at 1 pu.
Lagging (over-excited) reactive power is positive, as a generator delivers it.
"""

from __future__ import annotations

import cmath
import math
from collections.abc import Callable
from typing import NamedTuple

from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Chart,
    Check,
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

# ---------------------------------------------------------------------------
# Published models, one function each
# ---------------------------------------------------------------------------


def apparent_power(active_power: float, power_factor: float) -> float:
    """S = P / cos(phi).  IEC 60034-1:2022 cl. 5.5 (rated output of an a.c.
    generator is the apparent power at the terminals, stated with its power factor)."""
    if not 0.0 < power_factor <= 1.0:
        raise ValueError(f"power factor must lie in (0, 1], got {power_factor}")
    return active_power / power_factor


def rated_current(apparent_power_mva: float, line_voltage_kv: float) -> float:
    """I = S / (sqrt(3) U) in A from MVA and kV.  Chapman, Electric Machinery
    Fundamentals, 5th ed., Appendix A (three-phase power, S = sqrt(3) V_L I_L)."""
    return apparent_power_mva * 1e3 / (math.sqrt(3.0) * line_voltage_kv)


def synchronous_speed(frequency: float, pole_count: int) -> float:
    """n_s = 120 f / (2p) in rpm, 2p = number of poles.  Chapman 5th ed., §4.2, eq. (4-1)."""
    if pole_count < 2 or pole_count % 2:
        raise ValueError(f"pole count must be an even number >= 2, got {pole_count}")
    return 120.0 * frequency / pole_count


def pole_count_for_speed(frequency: float, speed_rpm: float) -> int:
    """Even pole count whose synchronous speed is nearest to ``speed_rpm``:
    2 round(60 f / n), at least 2 (inverse of Chapman 5th ed. eq. (4-1))."""
    return max(2, 2 * round(60.0 * frequency / speed_rpm))


def electrical_period_ms(frequency: float) -> float:
    """T = 1/f, in ms."""
    return 1e3 / frequency


def phase_displacement(frequency: float, pole_pairs: int) -> tuple[float, float]:
    """(time in ms, mechanical angle in deg) for the 120 electrical degrees between
    phases.  Electrical angle = p x mechanical angle: Chapman 5th ed., ch. 3."""
    return electrical_period_ms(frequency) / 3.0, 120.0 / pole_pairs


def induced_emf(frequency: float, turns_per_phase: float, flux_per_pole: float,
                winding_factor: float) -> float:
    """RMS EMF per phase E = sqrt(2) pi f N Phi k_w (the '4.44 f N Phi k_w' rule).
    Chapman 5th ed., Appendix B.2, eq. for distributed windings;
    Theraja, Textbook of Electrical Technology Vol. II, alternators, e.m.f. equation."""
    return math.sqrt(2.0) * math.pi * frequency * turns_per_phase * flux_per_pole * winding_factor


def flux_per_pole_for_emf(emf_phase: float, frequency: float, turns_per_phase: float,
                          winding_factor: float) -> float:
    """Phi = E / (sqrt(2) pi f N k_w): the EMF equation above solved for the flux."""
    return emf_phase / (math.sqrt(2.0) * math.pi * frequency * turns_per_phase * winding_factor)


def _current_phasor(current: float, power_factor: float, lagging: bool) -> complex:
    if not 0.0 <= power_factor <= 1.0:
        raise ValueError(f"power factor must lie in [0, 1], got {power_factor}")
    phi = math.acos(power_factor)
    return cmath.rect(current, -phi if lagging else phi)


def internal_emf_cylindrical(voltage: float, current: float, power_factor: float,
                             reactance: float, resistance: float = 0.0,
                             lagging: bool = True) -> tuple[float, float]:
    """(|E|, load angle in deg) from E = V + (R + jX) I, V on the real axis.

    Chapman 5th ed., ch. 4 (equivalent circuit and phasor diagram of a synchronous generator).
    Any consistent units: volts/ohms/amperes per phase, or per unit.
    """
    e = voltage + complex(resistance, reactance) * _current_phasor(current, power_factor, lagging)
    return abs(e), math.degrees(cmath.phase(e))


class SalientEmf(NamedTuple):
    emf: float            # E_0, magnitude
    load_angle: float     # delta, deg
    quadrature_emf: float  # |E_Q|, magnitude of V + (r_a + j x_q) I


def internal_emf_salient(voltage: float, current: float, power_factor: float,
                         x_d: float, x_q: float, resistance: float = 0.0,
                         lagging: bool = True) -> SalientEmf:
    """Two-reaction phasor diagram of a salient-pole machine.

    E_Q = V + (r_a + j x_q) I fixes the q-axis (its angle is the load angle);
    E_0 = |E_Q| + (x_d - x_q) I_d with I_d = I sin(delta + phi).
    Chapman 5th ed., Appendix C (salient-pole theory of synchronous machines);
    Kundur, Power System Stability and Control, 1994, §3.6.
    """
    i = _current_phasor(current, power_factor, lagging)
    e_q = voltage + complex(resistance, x_q) * i
    delta = cmath.phase(e_q)
    # angle by which I lags the q-axis; its sine gives the (demagnetising) d-axis current
    psi = delta - cmath.phase(i)
    i_d = abs(i) * math.sin(psi)
    return SalientEmf(abs(e_q) + (x_d - x_q) * i_d, math.degrees(delta), abs(e_q))


def two_reaction_power(emf: float, load_angle_deg: float, voltage: float,
                       x_d: float, x_q: float) -> tuple[float, float]:
    """(P, Q) at the terminals, armature resistance neglected.

    P = V E/x_d sin d + V^2/2 (1/x_q - 1/x_d) sin 2d,
    Q = V E/x_d cos d - V^2 (cos^2 d / x_d + sin^2 d / x_q).
    Kundur 1994, §3.6 / §5.4; Chapman 5th ed., Appendix C (power in a salient-pole
    machine).  With x_q = x_d these reduce to the cylindrical-rotor equations.
    """
    d = math.radians(load_angle_deg)
    p = voltage * emf / x_d * math.sin(d) + 0.5 * voltage**2 * (1 / x_q - 1 / x_d) * math.sin(2 * d)
    q = voltage * emf / x_d * math.cos(d) - voltage**2 * (math.cos(d)**2 / x_d + math.sin(d)**2 / x_q)
    return p, q


def stability_limit_angle(emf: float, voltage: float, x_d: float, x_q: float) -> float:
    """Load angle (deg) of the theoretical steady-state stability limit, dP/dd = 0.

    From the power-angle equation: (V E/x_d) cos d + k cos 2d = 0 with
    k = V^2 (1/x_q - 1/x_d), a quadratic in cos d (power-angle curve of Kundur 1994,
    §5.4; Chapman 5th ed., App. C); 90 deg for a cylindrical rotor.
    """
    a = voltage * emf / x_d
    k = voltage**2 * (1 / x_q - 1 / x_d)
    if k <= 0.0:
        return 90.0
    # positive root written without cancellation (stable as k -> 0)
    c = 2.0 * k / (a + math.sqrt(a * a + 8.0 * k * k))
    return math.degrees(math.acos(c))


def maximum_power(emf: float, voltage: float, x_d: float, x_q: float) -> float:
    """Theoretical steady-state stability limit (peak of the power-angle curve)."""
    return two_reaction_power(emf, stability_limit_angle(emf, voltage, x_d, x_q), voltage, x_d, x_q)[0]


def _bisect(f: Callable[[float], float], lo: float, hi: float) -> float:
    """Root of an increasing f on [lo, hi] (f(lo) <= 0 <= f(hi)); 60 halvings ~ 1e-18 of span."""
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if f(mid) < 0.0:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def _angle_for_power(power: float, emf: float, voltage: float, x_d: float, x_q: float) -> float:
    """Load angle (deg) on the stable branch [0, d_max] at which P(d) = power."""
    d_max = stability_limit_angle(emf, voltage, x_d, x_q)
    return _bisect(lambda d: two_reaction_power(emf, d, voltage, x_d, x_q)[0] - power, 0.0, d_max)


def field_limit_q(power: float, field_emf: float, x_d: float, x_q: float,
                  voltage: float = 1.0) -> float:
    """Reactive power on the field-current limit (E = field_emf) at active power
    ``power``; NaN where that excitation cannot carry the power.  Kundur 1994, §5.4."""
    if power > maximum_power(field_emf, voltage, x_d, x_q):
        return math.nan
    d = _angle_for_power(power, field_emf, voltage, x_d, x_q)
    return two_reaction_power(field_emf, d, voltage, x_d, x_q)[1]


def practical_stability_q(power: float, margin: float, x_d: float, x_q: float,
                          voltage: float = 1.0) -> float:
    """Reactive power on the practical steady-state stability limit at ``power``.

    Construction (common practice, no source): for an excitation E keep a margin
    below its theoretical peak, P = P_max(E) - margin, on the same E curve.  Where a
    salient-pole machine would need E < 0 for that, the zero-excitation curve
    (reluctance power alone) bounds instead.
    """
    p_zero = maximum_power(0.0, voltage, x_d, x_q)  # reluctance peak; 0 for a round rotor
    if power + margin >= p_zero:
        # P_max(E) grows with E and P_max(E) >= V E / x_d, so this bracket holds the root
        e_hi = (power + margin) * x_d / voltage
        emf = _bisect(lambda e: maximum_power(e, voltage, x_d, x_q) - (power + margin), 0.0, e_hi)
    else:
        emf = 0.0
    d = _angle_for_power(power, emf, voltage, x_d, x_q)
    return two_reaction_power(emf, d, voltage, x_d, x_q)[1]


class CapabilityLimits(NamedTuple):
    """Reactive-power limits (same per-unit base as the inputs) at one active power."""

    stator_lagging: float      # +sqrt(S^2 - P^2)
    field: float               # field-current limit
    stator_leading: float      # -sqrt(S^2 - P^2)
    under_excitation: float    # practical stability limit

    @property
    def q_max(self) -> float:
        return min(self.stator_lagging, self.field)

    @property
    def q_min(self) -> float:
        return max(self.stator_leading, self.under_excitation)


def capability_limits(power: float, field_emf: float, x_d: float, x_q: float,
                      margin: float, voltage: float = 1.0) -> CapabilityLimits:
    """All reactive limits at one active power, per unit on rated values.

    Stator-current limit: circle of radius V I_r = 1 pu about the origin; field
    limit: the E = E_0 curve of the power-angle equations (Kundur 1994, §5.4).
    """
    s = math.sqrt(1.0 - power**2) if power <= 1.0 else math.nan
    return CapabilityLimits(s, field_limit_q(power, field_emf, x_d, x_q, voltage), -s,
                            practical_stability_q(power, margin, x_d, x_q, voltage))


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iec60034_1", "IEC 60034-1:2022, Rotating electrical machines - Part 1: "
              "Rating and performance, International Electrotechnical Commission, Geneva.",
              "Rated output of a.c. generators; clause numbers as recalled, check the issued edition."),
    Reference("chapman", "S. J. Chapman, Electric Machinery Fundamentals, 5th ed., "
              "McGraw-Hill, New York, 2012.",
              "Speed-frequency relation, EMF equation, phasor diagrams (ch. 3, 4, App. A-C); "
              "section and equation numbers as recalled."),
    Reference("theraja", "B. L. Theraja and A. K. Theraja, A Textbook of Electrical "
              "Technology, Vol. II: AC and DC Machines, S. Chand, New Delhi (multicolour ed., 2005).",
              "E.m.f. equation of an alternator with distribution and pitch factors."),
    Reference("kundur", "P. Kundur, Power System Stability and Control, McGraw-Hill, "
              "New York, 1994.",
              "§3.6 steady-state phasor diagram; §5.4 capability curves (armature-current, "
              "field-current and stability limits); section numbers as recalled."),
    Reference("practice", "Common engineering practice, no published source: screening values "
              "chosen in basisbook 0.1.0 (this module).",
              "The project may override them; confirm with the machine supplier."),
]

SPEC = CalcSpec(
    kind="synchronous_generator",
    discipline="generation",
    title="Synchronous generator rating, phasor diagram and capability chart",
    purpose=(
        "Fix the generator's rated apparent power and current, pole count and speed, the "
        "flux its winding needs for rated voltage, the excitation EMF and load angle at "
        "the rated point, and the P-Q capability chart against stator, field, stability "
        "and prime-mover limits."
    ),
    inputs=[
        Input("generator_active_power", range="[0.01, 2000]"),
        Input("generator_power_factor", range="[0.5, 1]",
              note="lagging (over-excited); 1 for unity power factor; rated values lie "
                   "between about 0.7 and 1 (a lower one is a synchronous condenser's duty)"),
        Input("generator_voltage", range="[0.1, 30]"),
        Input("rated_frequency", range="[10, 400]", note="50 or 60 Hz in public grids"),
        Input("prime_mover_speed", range="[50, 10000]",
              note="speed of the generator shaft, i.e. after any gearbox; "
                   "the slowest large hydro generators run at about 60 rpm"),
        Input("prime_mover_rating", range="[0.01, 2000]"),
        Input("rotor_type", default="cylindrical", choices=("cylindrical", "salient")),
        Input("direct_axis_reactance", range="[0.1, 10]",
              note="as defined and tested in IEC 60034-4-1:2018; saturated value for steady-state "
                   "work (real machines: about 0.6 to 3 pu)"),
        Input("quadrature_axis_reactance", range="[0, 10]", default=0.0,
              note="IEC 60034-4-1:2018; needed for a salient-pole rotor; 0 means 'take x_q = x_d'"),
        Input("armature_resistance", range="[0, 0.1]", default=0.0,
              note="IEC 60034-4-1:2018 (d.c. resistance corrected to operating temperature)"),
        Input("turns_per_phase", range="[1, 5000]",
              note="series turns per phase; a few for large machines, a few thousand for small ones"),
        Input("winding_factor", range="[0.5, 1]",
              note="distribution x pitch factor; practical windings lie between about 0.8 and 0.97"),
        Input("stability_margin", range="[0, 0.5]", default=0.10,
              note="common practice 0.10 pu of rated apparent power"),
        Input("load_angle_limit", range="(0, 90]", default=70.0, note="common practice"),
    ],
    outputs=[
        Output("generator_apparent_power", key=True),
        Output("generator_current", key=True),
        Output("generator_reactive_power"),
        Output("pole_count", key=True),
        Output("pole_pairs"),
        Output("synchronous_speed", key=True),
        Output("speed_deviation"),
        Output("electrical_period"),
        Output("phase_displacement_time"),
        Output("phase_displacement_angle"),
        Output("phase_voltage"),
        Output("flux_per_pole"),
        Output("effective_quadrature_reactance"),
        Output("quadrature_axis_emf"),
        Output("load_angle", key=True),
        Output("internal_emf", key=True),
        Output("internal_emf_line"),
        Output("stability_limit_margin"),
        Output("prime_mover_margin"),
    ],
    steps=[
        Step("generator_apparent_power", r"\frac{@generator_active_power}{@generator_power_factor}",
             "iec60034_1", "cl. 5.5 (rated output)"),
        Step("generator_current",
             r"\frac{@generator_apparent_power \cdot 10^{3}}{\sqrt{3}\,@generator_voltage}",
             "chapman", "App. A (three-phase power)"),
        Step("generator_reactive_power",
             r"\sqrt{@generator_apparent_power^{2} - @generator_active_power^{2}}",
             "chapman", "App. A (power triangle)"),
        Step("pole_count",
             r"\max\left(2,\; 2\,\mathrm{round}\left("
             r"\frac{60\,@rated_frequency}{@prime_mover_speed}\right)\right)",
             "chapman", "§4.2, eq. (4-1) solved for the nearest even pole count"),
        Step("pole_pairs", r"\frac{@pole_count}{2}", "chapman", "ch. 3"),
        Step("synchronous_speed", r"\frac{120\,@rated_frequency}{@pole_count}", "chapman",
             "§4.2, eq. (4-1)"),
        Step("speed_deviation",
             r"100\,\frac{\left|@prime_mover_speed - @synchronous_speed\right|}{@synchronous_speed}",
             "practice", "relative speed mismatch"),
        Step("electrical_period", r"\frac{10^{3}}{@rated_frequency}", "chapman", "App. A.1"),
        Step("phase_displacement_time", r"\frac{120^{\circ}}{360^{\circ}}\,@electrical_period",
             "chapman", "App. A.1 (three-phase voltages 120° apart)"),
        Step("phase_displacement_angle", r"\frac{120^{\circ}}{@pole_pairs}", "chapman",
             "ch. 3, electrical angle = p x mechanical angle"),
        Step("phase_voltage", r"\frac{@generator_voltage \cdot 10^{3}}{\sqrt{3}}", "chapman",
             "App. A (star connection)"),
        Step("flux_per_pole",
             r"\frac{@phase_voltage}{\sqrt{2}\,\pi\,@rated_frequency\,@turns_per_phase\,@winding_factor}",
             "theraja", "alternators chapter, e.m.f. equation E = 4.44 k_w f Phi N, with E = U_ph "
             "at no load (also Chapman 5th ed., App. B.2)"),
        Step("effective_quadrature_reactance",
             r"\begin{cases} {@direct_axis_reactance} & \text{cylindrical rotor} \\ "
             r"{@quadrature_axis_reactance} & \text{salient pole} \end{cases}",
             "chapman", "App. C (a round rotor has x_q = x_d)"),
        Step("quadrature_axis_emf",
             r"\left|1 + \left(@armature_resistance + j\,@effective_quadrature_reactance\right)"
             r"\left(@generator_power_factor - j\sqrt{1 - @generator_power_factor^{2}}\right)\right|",
             "chapman", "App. C (E_Q = V + (r_a + j x_q) I), V = 1 pu, I = 1 pu at the rated point"),
        Step("load_angle",
             r"\arg\left(1 + \left(@armature_resistance + j\,@effective_quadrature_reactance\right)"
             r"\left(@generator_power_factor - j\sqrt{1 - @generator_power_factor^{2}}\right)\right)",
             "chapman", "App. C (E_Q lies on the q-axis)"),
        Step("internal_emf",
             r"@quadrature_axis_emf + \left(@direct_axis_reactance - @effective_quadrature_reactance\right)"
             r"\sin\left(@load_angle + \arccos @generator_power_factor\right)",
             "kundur", "§3.6, two-reaction phasor diagram, I = 1 pu"),
        Step("internal_emf_line", r"@internal_emf\,@generator_voltage", "kundur",
             "§3.6 (per-unit base is rated voltage)"),
        Step("stability_limit_margin",
             r"@generator_apparent_power\left(\max_{\delta}\left[\frac{@internal_emf}{@direct_axis_reactance}"
             r"\sin\delta + \frac{1}{2}\left(\frac{1}{@effective_quadrature_reactance}"
             r" - \frac{1}{@direct_axis_reactance}\right)\sin 2\delta\right] - @stability_margin\right)"
             r" - @generator_active_power",
             "kundur", "§5.4 power-angle curve; margin by common practice",
             note="maximum found from dP/dδ = 0 (closed form in cos δ)"),
        Step("prime_mover_margin", r"@prime_mover_rating - @generator_active_power", "kundur",
             "§5.4 (prime-mover limit)"),
    ],
    checks=[
        Check("speed_match", "Prime-mover speed equals a synchronous speed (even pole count)",
              "speed_deviation", "<=", 0.5, "practice", "0.5 % screening limit", review_band=0.5),
        Check("load_angle", "Load angle at rated point below the chosen limit",
              "load_angle", "<=", "load_angle_limit", "practice", review_band=0.1),
        Check("stability", "Rated point inside the practical stability limit",
              "stability_limit_margin", ">=", 0.0, "practice",
              "theoretical limit (Kundur §5.4) less the stability margin"),
        Check("prime_mover", "Rated active power within the prime-mover rating",
              "prime_mover_margin", ">=", 0.0, "kundur", "§5.4"),
    ],
    references=REFERENCES,
    cautions=[
        "Generator terminals, busbars and the excitation system carry dangerous voltages; "
        "a machine that is turning is excited by its own remanence and can be live.",
        "Rotating machinery and the energy stored in the rotor and shaft train can kill; "
        "isolate, lock and prove the prime mover at rest before any work.",
        "These figures are a design basis for review, not a manufacturer's data sheet. "
        "Defer to the local codes and to licensed engineering practice, and confirm every "
        "value against the supplier's guaranteed data and tests.",
    ],
    figures=[
        FigureSpec("capability_chart", "P-Q capability chart",
                   "Operating limits at rated voltage: stator current (circle), field current "
                   "(rated-point excitation), practical stability (margin below the theoretical "
                   "limit, common practice) and prime mover. Armature resistance neglected "
                   "(common practice). Lagging (over-excited) reactive power is positive."),
    ],
    tables=[
        TableSpec("capability_table", "Reactive-power range at rated voltage",
                  "Leading and lagging limits of the chart at selected active powers, and "
                  "which limit governs."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def _capability_chart(s_r: float, p_r: float, q_r: float, p_pm: float, e_0: float,
                      x_d: float, x_q: float, margin: float) -> tuple[Chart, Table]:
    """Chart and table in MW / Mvar from the per-unit construction."""
    p_rated = p_r / s_r

    def arc(qs: list[float], ps: list[float]) -> tuple[list[float], list[float]]:
        pairs = [(q, p) for q, p in zip(qs, ps, strict=True) if math.isfinite(q) and math.isfinite(p)]
        return [round(q * s_r, 9) for q, _ in pairs], [round(p * s_r, 9) for _, p in pairs]

    n = 61
    # stator circle, P >= 0
    th = [math.pi * k / (n - 1) for k in range(n)]
    stator = arc([math.cos(t) for t in th], [math.sin(t) for t in th])
    # field limit from P = 0 up to the rated point (where it meets the stator circle)
    pf = [p_rated * k / (n - 1) for k in range(n)]
    field = arc([field_limit_q(p, e_0, x_d, x_q) for p in pf], pf)
    # practical stability limit up to the stator circle
    pu = [1.0 * k / (n - 1) for k in range(n)]
    uel = arc([practical_stability_q(p, margin, x_d, x_q) for p in pu], pu)
    # theoretical limit: peak of each E curve, E from 0 until it passes P = 1 pu
    e_top = (1.0 + margin) * x_d * 1.2
    es = [e_top * k / (n - 1) for k in range(n)]
    theo_q, theo_p = [], []
    for e in es:
        d = stability_limit_angle(e, 1.0, x_d, x_q)
        p, q = two_reaction_power(e, d, 1.0, x_d, x_q)
        if p <= 1.1:
            theo_q.append(q)
            theo_p.append(p)
    theo = arc(theo_q, theo_p)
    q_left = min(-1.0, -1.0 / x_d) * s_r
    pm = ([q_left, s_r], [p_pm, p_pm])
    chart = Chart(
        x_label="Reactive power Q (Mvar), lagging positive",
        y_label="Active power P (MW)",
        series=[
            Series("Stator-current limit", *stator),
            Series("Field-current limit", *field),
            Series("Practical stability limit", *uel, style="dashed"),
            Series("Theoretical stability limit", *theo, style="dotted"),
            Series("Prime-mover limit", *pm),
        ],
        markers=[Marker("Rated point", q_r, p_r)],
        equal_aspect=True,
    )

    top = min(1.0, p_pm / s_r)
    candidates = [0.2 * k for k in range(6)] + [p_rated, top]
    # de-duplicate near-equal levels (rated power often is a round fraction of S_r)
    levels = sorted({round(x, 9): x for x in candidates if x <= top}.values())
    rows = []
    for p in levels:
        lim = capability_limits(p, e_0, x_d, x_q, margin)
        if not all(math.isfinite(v) for v in lim):
            continue
        lead_by = "stator" if lim.stator_leading >= lim.under_excitation else "stability"
        lag_by = "stator" if lim.stator_lagging <= lim.field else "field"
        rows.append([p * s_r, lim.q_min * s_r, lead_by, lim.q_max * s_r, lag_by])
    table = Table(
        columns=[("Active power P", "MW"), ("Leading limit Q_min", "Mvar"), ("set by", ""),
                 ("Lagging limit Q_max", "Mvar"), ("set by", "")],
        rows=rows,
    )
    return chart, table


def compute(v: Values) -> Result:
    warnings: list[str] = []
    p_r = float(v.generator_active_power)
    pf = float(v.generator_power_factor)
    u_r = float(v.generator_voltage)
    f = float(v.rated_frequency)
    x_d = float(v.direct_axis_reactance)
    x_q_in = float(v.quadrature_axis_reactance)
    r_a = float(v.armature_resistance)
    margin = float(v.stability_margin)

    if v.rotor_type == "salient":
        if x_q_in == 0.0:
            raise InputConflict("quadrature_axis_reactance",
                                "a salient-pole rotor needs x_q (typically 0.5-0.7 x_d); 0 was given")
        if x_q_in < 0.1:
            raise InputConflict("quadrature_axis_reactance",
                                f"x_q = {x_q_in:g} pu is below 0.1 pu, no salient-pole machine has "
                                "so small a synchronous reactance (0 means 'take x_q = x_d')")
        if x_q_in > x_d:
            raise InputConflict("quadrature_axis_reactance",
                                f"x_q = {x_q_in:g} pu exceeds x_d = {x_d:g} pu; a salient-pole rotor "
                                "has its larger reactance on the pole (direct) axis")
        x_q = x_q_in
    else:
        if x_q_in not in (0.0, x_d):
            warnings.append(f"cylindrical rotor: x_q = {x_q_in:g} pu ignored, x_q = x_d used")
        x_q = x_d
    if f not in (50.0, 60.0):
        warnings.append(f"rated frequency {f:g} Hz is neither 50 nor 60 Hz")

    s_r = apparent_power(p_r, pf)
    i_r = rated_current(s_r, u_r)
    q_r = s_r * math.sqrt(1.0 - pf * pf)  # = sqrt(S^2 - P^2) without round-off below zero

    poles = pole_count_for_speed(f, float(v.prime_mover_speed))
    n_s = synchronous_speed(f, poles)
    deviation = 100.0 * abs(float(v.prime_mover_speed) - n_s) / n_s
    t_120, alpha_m = phase_displacement(f, poles // 2)

    u_ph = u_r * 1e3 / math.sqrt(3.0)
    phi = flux_per_pole_for_emf(u_ph, f, float(v.turns_per_phase), float(v.winding_factor))

    emf = internal_emf_salient(1.0, 1.0, pf, x_d, x_q, r_a)
    p_max = maximum_power(emf.emf, 1.0, x_d, x_q)
    stab_margin = s_r * (p_max - margin) - p_r

    chart, table = _capability_chart(s_r, p_r, q_r, float(v.prime_mover_rating), emf.emf,
                                     x_d, x_q, margin)
    outputs: dict[str, float | str] = {
        "generator_apparent_power": s_r,
        "generator_current": i_r,
        "generator_reactive_power": q_r,
        "pole_count": float(poles),
        "pole_pairs": float(poles // 2),
        "synchronous_speed": n_s,
        "speed_deviation": deviation,
        "electrical_period": electrical_period_ms(f),
        "phase_displacement_time": t_120,
        "phase_displacement_angle": alpha_m,
        "phase_voltage": u_ph,
        "flux_per_pole": phi,
        "effective_quadrature_reactance": x_q,
        "quadrature_axis_emf": emf.quadrature_emf,
        "load_angle": emf.load_angle,
        "internal_emf": emf.emf,
        "internal_emf_line": emf.emf * u_r,
        "stability_limit_margin": stab_margin,
        "prime_mover_margin": float(v.prime_mover_rating) - p_r,
    }
    return Result(outputs=outputs, charts={"capability_chart": chart},
                  tables={"capability_table": table}, warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers (run by the tests and shown in the
# handbook's verification appendix)
# ---------------------------------------------------------------------------

_CHAPMAN_EX = ("S. J. Chapman, Electric Machinery Fundamentals, 5th ed., 2012, Example 4-2 "
               "(from memory): 480 V delta, X_s = 0.1 ohm, R_A = 0.015 ohm, 1200 A at 0.8 pf lagging")
_THERAJA_EX = ("B. L. Theraja, A Textbook of Electrical Technology Vol. II, alternator e.m.f. worked "
               "example (from memory): 240 turns/phase, 0.03 Wb, 50 Hz, k_w = 0.96")

PUBLISHED_CASES = [
    PublishedCase("synchronous speed, 2 poles at 50 Hz", "n = 120 f / p (synchronous speed table, "
                  "Chapman 5th ed. eq. 4-1)", 3000.0, "rpm", 1e-9, "exact",
                  lambda: synchronous_speed(50.0, 2)),
    PublishedCase("synchronous speed, 4 poles at 60 Hz", "n = 120 f / p (synchronous speed table, "
                  "Chapman 5th ed. eq. 4-1)", 1800.0, "rpm", 1e-9, "exact",
                  lambda: synchronous_speed(60.0, 4)),
    PublishedCase("synchronous speed, 10 poles at 60 Hz", "n = 120 f / p (synchronous speed table, "
                  "Chapman 5th ed. eq. 4-1)", 720.0, "rpm", 1e-9, "exact",
                  lambda: synchronous_speed(60.0, 10)),
    PublishedCase("electrical period at 50 Hz", "common practice, no source (T = 1/f)", 20.0, "ms",
                  1e-12, "exact", lambda: electrical_period_ms(50.0)),
    PublishedCase("phase EMF of the example alternator", _THERAJA_EX, 1534.0, "V", 3.1,
                  "0.2 %: the book rounds sqrt(2) pi to 4.44 and prints 4 digits",
                  lambda: induced_emf(50.0, 240, 0.03, 0.96)),
    PublishedCase("internal EMF per phase", _CHAPMAN_EX, 532.0, "V", 0.5, "the book prints 3 digits",
                  lambda: internal_emf_cylindrical(480.0, 1200 / math.sqrt(3), 0.8, 0.1, 0.015)[0]),
    PublishedCase("load angle", _CHAPMAN_EX, 5.3, "deg", 0.05, "the book prints 2 digits",
                  lambda: internal_emf_cylindrical(480.0, 1200 / math.sqrt(3), 0.8, 0.1, 0.015)[1]),
]
