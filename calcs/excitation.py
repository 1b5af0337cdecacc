"""Excitation demand of a synchronous generator with a static (thyristor) exciter.

From the machine's test characteristics (open-circuit curve with saturation, air-gap
line, short-circuit characteristic, Potier reactance) this module fixes the field
current at no load and at rated load by two methods of the test standards, the
field voltage and power at operating temperature, the ceiling the exciter must
reach, the three-phase thyristor bridge and its excitation transformer, and the
open-circuit step response of a simple proportional voltage regulator.

Conventions: per unit on the generator's rated values, terminal voltage 1 pu,
lagging (over-excited) reactive power positive.  The Potier and saturation-allowance
constructions are the cylindrical-rotor forms; for a salient-pole rotor they are
used as an approximation (see the warning compute() gives).
"""

from __future__ import annotations

import bisect
import math
from collections.abc import Callable, Sequence
from typing import NamedTuple

import numpy as np
from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import (
    CalcSpec,
    Chart,
    Check,
    Column,
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
# Monotone cubic interpolation (Fritsch & Carlson 1980)
# ---------------------------------------------------------------------------


def fritsch_carlson_slopes(x: Sequence[float], y: Sequence[float]) -> np.ndarray:
    """Node derivatives of the monotone piecewise cubic Hermite interpolant.

    F. N. Fritsch and R. E. Carlson, SIAM J. Numer. Anal. 17(2), 1980, 238-246:
    start from the three-point (average of secants) slopes, one-sided secants at
    the ends; zero slope where the data turn or are flat; then, interval by
    interval, pull (alpha, beta) = (m_k, m_k+1)/Delta_k back into the circle
    alpha^2 + beta^2 <= 9, a sufficient condition for monotonicity (their
    region, as recalled).  The circle is the paper's own choice; scipy's pchip
    uses the Fritsch-Butland harmonic mean instead.
    """
    xs = np.asarray(x, dtype=float)
    ys = np.asarray(y, dtype=float)
    h = np.diff(xs)
    delta = np.diff(ys) / h
    n = len(xs)
    m = np.empty(n)
    m[0], m[-1] = delta[0], delta[-1]
    if n > 2:
        m[1:-1] = 0.5 * (delta[:-1] + delta[1:])
        turn = delta[:-1] * delta[1:] <= 0.0  # local extremum or flat: keep it flat
        m[1:-1][turn] = 0.0
    for k in range(n - 1):
        if delta[k] == 0.0:
            m[k] = m[k + 1] = 0.0
            continue
        a, b = m[k] / delta[k], m[k + 1] / delta[k]
        if a < 0.0:  # end slopes of opposite sign to the data (cannot happen inside)
            m[k], a = 0.0, 0.0
        if b < 0.0:
            m[k + 1], b = 0.0, 0.0
        r = a * a + b * b
        if r > 9.0:
            tau = 3.0 / math.sqrt(r)
            m[k] = tau * a * delta[k]
            m[k + 1] = tau * b * delta[k]
    return m


class MonotoneCubic:
    """Piecewise cubic Hermite curve through (x, y) with Fritsch-Carlson slopes.

    Outside the data it continues as a straight line with the end slope (an
    extrapolation, flagged by the caller where it matters).  ``inverse`` needs
    strictly increasing y.
    """

    def __init__(self, x: Sequence[float], y: Sequence[float]):
        self.x = [float(v) for v in x]
        self.y = [float(v) for v in y]
        if len(self.x) < 2 or any(b <= a for a, b in zip(self.x, self.x[1:], strict=False)):
            raise ValueError("x must hold two or more strictly increasing values")
        self.m = [float(v) for v in fritsch_carlson_slopes(self.x, self.y)]

    def _segment(self, xq: float) -> int:
        return min(max(bisect.bisect_right(self.x, xq) - 1, 0), len(self.x) - 2)

    def value(self, xq: float) -> float:
        """Scalar evaluation (fast path for the time integration)."""
        x, y, m = self.x, self.y, self.m
        if xq <= x[0]:
            return y[0] + m[0] * (xq - x[0])
        if xq >= x[-1]:
            return y[-1] + m[-1] * (xq - x[-1])
        k = self._segment(xq)
        h = x[k + 1] - x[k]
        t = (xq - x[k]) / h
        t2, t3 = t * t, t * t * t
        # cubic Hermite basis functions
        return ((2 * t3 - 3 * t2 + 1) * y[k] + (t3 - 2 * t2 + t) * h * m[k]
                + (-2 * t3 + 3 * t2) * y[k + 1] + (t3 - t2) * h * m[k + 1])

    def slope(self, xq: float) -> float:
        x, y, m = self.x, self.y, self.m
        if xq <= x[0]:
            return m[0]
        if xq >= x[-1]:
            return m[-1]
        k = self._segment(xq)
        h = x[k + 1] - x[k]
        t = (xq - x[k]) / h
        return ((6 * t * t - 6 * t) * y[k] / h + (3 * t * t - 4 * t + 1) * m[k]
                + (-6 * t * t + 6 * t) * y[k + 1] / h + (3 * t * t - 2 * t) * m[k + 1])

    def __call__(self, xq: float | Sequence[float] | np.ndarray) -> float | np.ndarray:
        if np.ndim(xq) == 0:
            return self.value(float(xq))  # type: ignore[arg-type]
        return np.array([self.value(float(v)) for v in np.asarray(xq, dtype=float)])

    def inverse(self, yq: float) -> float:
        """x at which the curve reaches yq (bisection on the bracketing segment;
        the Fritsch-Carlson curve is monotone there, so the root is unique)."""
        x, y, m = self.x, self.y, self.m
        if yq <= y[0]:
            return x[0] + (yq - y[0]) / m[0] if m[0] > 0 else x[0]
        if yq >= y[-1]:
            return x[-1] + (yq - y[-1]) / m[-1] if m[-1] > 0 else x[-1]
        k = min(max(bisect.bisect_right(y, yq) - 1, 0), len(y) - 2)
        lo, hi = x[k], x[k + 1]
        for _ in range(80):  # 80 halvings: far below double precision of the span
            mid = 0.5 * (lo + hi)
            if self.value(mid) < yq:
                lo = mid
            else:
                hi = mid
        return 0.5 * (lo + hi)


# ---------------------------------------------------------------------------
# Open-circuit curve, air-gap line, short-circuit characteristic
# ---------------------------------------------------------------------------


class OpenCircuitCurve(NamedTuple):
    curve: MonotoneCubic          # corrected OCC: terminal voltage (kV) of field current (A)
    residual_shift: float         # A added to every measured field current
    first_segment_slope: float    # kV/A, through the origin after correction
    field_currents: list[float]   # corrected points (A), origin included
    voltages: list[float]         # kV


def open_circuit_curve(points: Sequence[Sequence[float]]) -> OpenCircuitCurve:
    """Validate the OCC points and correct them for residual voltage.

    Points are (field current A, terminal line voltage kV), strictly increasing in
    both.  If the first point is (0, U_res > 0), the curve is shifted along the
    field-current axis by the intercept of its first (straight) segment, so that it
    passes through the origin: the residual-magnetism correction of IEEE Std 115
    (as recalled).  Otherwise the origin is added as the first point.
    """
    pts = [(float(a), float(b)) for a, b in points]
    for n in range(1, len(pts)):
        if pts[n][0] <= pts[n - 1][0] or pts[n][1] <= pts[n - 1][1]:
            raise InputConflict(
                "open_circuit_characteristic",
                f"non-monotonic: row {n + 1} ({pts[n][0]:g} A, {pts[n][1]:g} kV) does not rise above "
                f"row {n} ({pts[n - 1][0]:g} A, {pts[n - 1][1]:g} kV); field current and voltage "
                "must both increase strictly")
    i0, u0 = pts[0]
    if i0 > 0.0 and u0 == 0.0:
        raise InputConflict("open_circuit_characteristic",
                            f"row 1: zero voltage at {i0:g} A field current; the curve starts at "
                            "zero field current (with or without residual voltage)")
    if i0 == 0.0 and u0 > 0.0:
        slope = (pts[1][1] - u0) / (pts[1][0] - i0)
        shift = u0 / slope
        currents = [0.0] + [a + shift for a, _ in pts]
        volts = [0.0] + [b for _, b in pts]
    elif i0 == 0.0:
        shift = 0.0
        currents = [a for a, _ in pts]
        volts = [b for _, b in pts]
    else:
        shift = 0.0
        currents = [0.0] + [a for a, _ in pts]
        volts = [0.0] + [b for _, b in pts]
    first_slope = volts[1] / currents[1]
    return OpenCircuitCurve(MonotoneCubic(currents, volts), shift, first_slope, currents, volts)


def copper_resistance_at(r1: float, theta1: float, theta2: float) -> float:
    """R2 = R1 (234.5 + theta2) / (234.5 + theta1), copper, temperatures in degC.

    IEEE Std 115-2009 (resistance corrected to a specified temperature, k = 234.5
    for copper; as recalled).  234.5 = 1/alpha_20 - 20 with alpha_20 = 0.00393 /K
    of annealed copper; IEC 60034-1 rounds it to 235 (as recalled).
    """
    return r1 * (234.5 + theta2) / (234.5 + theta1)


# ---------------------------------------------------------------------------
# Field current at load: Potier and saturation-allowance methods
# ---------------------------------------------------------------------------


class PotierResult(NamedTuple):
    emf: float                # E_p, pu
    emf_angle: float          # delta_p, deg
    resultant_current: float  # I_fr, A (from the OCC at E_p)
    armature_current: float   # I_fa, A
    field_current: float      # I_f, A


def potier_emf(current: float, phi_deg: float, x_p: float, voltage: float = 1.0) -> tuple[float, float]:
    """(|E_p|, angle in deg) of E_p = V + j x_p I, V on the real axis, I lagging V
    by phi (phi < 0: leading).  Armature resistance neglected (common practice for
    field-current work).  Potier diagram, IEC 60034-4-1 (as recalled)."""
    phi = math.radians(phi_deg)
    re = voltage + x_p * current * math.sin(phi)
    im = x_p * current * math.cos(phi)
    return math.hypot(re, im), math.degrees(math.atan2(im, re))


def potier_field_current(current: float, phi_deg: float, x_p: float, occ_inverse: Callable[[float], float],
                         i_fg: float, i_fk: float, voltage: float = 1.0) -> PotierResult:
    """Field current at a load by the Potier construction.

    The resultant MMF for E_p is read from the OCC (I_fr, 90 deg ahead of E_p); the
    armature-reaction MMF at rated current is I_fa = I_fk - x_p I_fg (on short
    circuit E_p = x_p I lies on the straight part), in phase with I and scaled with
    it; the field MMF is the phasor difference:
    I_f^2 = I_fr^2 + I_fa^2 + 2 I_fr I_fa sin(delta_p + phi).
    IEC 60034-4-1:2018, Potier diagram (as recalled).
    """
    e_p, d_p = potier_emf(current, phi_deg, x_p, voltage)
    i_fr = occ_inverse(e_p)
    i_fa = (i_fk - x_p * i_fg) * current
    s = math.sin(math.radians(d_p + phi_deg))
    i_f = math.sqrt(max(i_fr * i_fr + i_fa * i_fa + 2.0 * i_fr * i_fa * s, 0.0))
    return PotierResult(e_p, d_p, i_fr, i_fa, i_f)


def unsaturated_field_current(current: float, phi_deg: float, i_fg: float, i_fk: float,
                              voltage: float = 1.0) -> float:
    """I_fu = |I_fg V + I_fk I at (90 deg + phi)|
    = sqrt((I_fg V + I_fk I sin phi)^2 + (I_fk I cos phi)^2).

    Saturation-allowance ("ASA") method, IEEE Std 115-2009 (field current at
    specified load for cylindrical-rotor machines, as recalled)."""
    phi = math.radians(phi_deg)
    return math.hypot(i_fg * voltage + i_fk * current * math.sin(phi), i_fk * current * math.cos(phi))


def saturation_allowance_field_current(current: float, phi_deg: float, x_p: float,
                                       occ_inverse: Callable[[float], float], i_fg: float, i_fk: float,
                                       voltage: float = 1.0) -> tuple[float, float, float]:
    """(I_fu, I_fs, I_f): I_f = I_fu + I_fs, with the saturation increment I_fs read
    between the OCC and the air-gap line at the Potier EMF (IEEE Std 115-2009 as recalled)."""
    i_fu = unsaturated_field_current(current, phi_deg, i_fg, i_fk, voltage)
    e_p, _ = potier_emf(current, phi_deg, x_p, voltage)
    i_fs = occ_inverse(e_p) - e_p * i_fg
    return i_fu, i_fs, i_fu + i_fs


def stability_limit_q(power: float, margin: float, x_d: float) -> float:
    """Reactive power (pu) on the practical stability limit of a cylindrical rotor at
    active power ``power``: Q = sqrt((P + m)^2 - P^2) - 1/x_d (Kundur 1994, §5.4
    construction with a margin m; common practice).  Conservative for a salient pole."""
    return math.sqrt((power + margin) ** 2 - power**2) - 1.0 / x_d


# ---------------------------------------------------------------------------
# Three-phase fully controlled thyristor bridge
# ---------------------------------------------------------------------------

BRIDGE_FACTOR = 3.0 * math.sqrt(2.0) / math.pi  # U_di0 / U_LL = 1.3505 (Mohan 3rd ed., ch. 6)


def bridge_dc_voltage(u_ll: float, alpha_deg: float, x_c: float, i_d: float) -> float:
    """U_d = (3 sqrt 2/pi) U_LL cos alpha - (3/pi) X_c I_d.

    Mohan, Undeland, Robbins, Power Electronics, 3rd ed., Wiley 2003, ch. 6
    (three-phase thyristor converter with line inductance; as recalled)."""
    return BRIDGE_FACTOR * u_ll * math.cos(math.radians(alpha_deg)) - 3.0 / math.pi * x_c * i_d


def firing_angle(u_d: float, u_ll: float, x_c: float, i_d: float) -> float:
    """Firing angle (deg) for a d.c. voltage u_d at current i_d: the equation above
    solved for alpha; NaN if the bridge cannot deliver it."""
    c = (u_d + 3.0 / math.pi * x_c * i_d) / (BRIDGE_FACTOR * u_ll)
    return math.degrees(math.acos(c)) if -1.0 <= c <= 1.0 else math.nan


def required_secondary_voltage(u_fc: float, i_fc: float, alpha_min_deg: float, u_k_percent: float,
                               s_kva: float) -> float:
    """Smallest transformer secondary voltage U whose bridge reaches u_fc at i_fc and
    alpha_min, with the commutation reactance X_c = u_k U^2 / S of that transformer:
    b U - a U^2 = u_fc, b = 1.35 cos(alpha_min), a = (3/pi) u_k i_fc / S (the U_d
    equation of Mohan 3rd ed. ch. 6).  Smaller root in the cancellation-free form
    2c / (b + sqrt(b^2 - 4ac)); NaN if no voltage reaches the ceiling."""
    b = BRIDGE_FACTOR * math.cos(math.radians(alpha_min_deg))
    a = 3.0 / math.pi * (u_k_percent / 100.0) * i_fc / (s_kva * 1e3)
    disc = b * b - 4.0 * a * u_fc
    return 2.0 * u_fc / (b + math.sqrt(disc)) if disc >= 0.0 else math.nan


def bridge_line_current(i_d: float) -> float:
    """R.m.s. a.c. line current of a six-pulse bridge with smooth d.c. current:
    120-degree rectangular blocks, I_ac = sqrt(2/3) I_d (Mohan 3rd ed., ch. 5/6,
    overlap neglected; as recalled)."""
    return math.sqrt(2.0 / 3.0) * i_d


# ---------------------------------------------------------------------------
# Voltage-regulator step response (open circuit)
# ---------------------------------------------------------------------------


class StepResponse(NamedTuple):
    t: np.ndarray         # s
    u: np.ndarray         # terminal voltage, pu
    e_fd: np.ndarray      # exciter output, pu of air-gap field voltage
    u_final: float        # steady state after the step, pu
    i_max: float          # largest field current reached, pu


def regulator_step_response(occ_pu: Callable[[float], float], i_0: float, k_a: float, t_a: float,
                            t_d0: float, du_ref: float, e_min: float, e_max: float,
                            t_end: float, n_steps: int) -> StepResponse:
    """Terminal-voltage response of the open-circuit generator to a reference step.

    Block diagram (IEEE Std 421.5 per-unit base: 1 pu field voltage/current gives
    rated voltage on the air-gap line; Kundur 1994 ch. 8):
        error = u_ref - u;  T_A de/dt = K_A error - e  (regulator + static exciter,
        output e limited to [e_min, e_max], the bridge's ceilings);
        T'_d0 di/dt = e - i  (field winding on open circuit);  u = OCC(i).
    T_A = 0 makes the exciter algebraic.  Fixed-step classical RK4; the limit is
    applied after each step and blocks the derivative at the limit (non-windup).
    Starts from steady state at u = u(i_0).
    """
    u_0 = occ_pu(i_0)
    u_ref = u_0 + i_0 / k_a + du_ref  # proportional AVR: e = K_A (u_ref - u) in steady state
    dt = t_end / n_steps

    def exciter(i: float, e: float) -> float:
        return min(max(k_a * (u_ref - occ_pu(i)), e_min), e_max) if t_a == 0.0 else e

    def rhs(i: float, e: float) -> tuple[float, float]:
        ex = exciter(i, e)
        di = (ex - i) / t_d0
        if t_a == 0.0:
            return di, 0.0
        de = (k_a * (u_ref - occ_pu(i)) - e) / t_a
        if (e >= e_max and de > 0.0) or (e <= e_min and de < 0.0):
            de = 0.0
        return di, de

    t = np.linspace(0.0, t_end, n_steps + 1)
    u = np.empty(n_steps + 1)
    ef = np.empty(n_steps + 1)
    i, e = i_0, i_0
    i_max = i_0
    for k in range(n_steps + 1):
        u[k] = occ_pu(i)
        ef[k] = exciter(i, e)
        if k == n_steps:
            break
        k1 = rhs(i, e)
        k2 = rhs(i + 0.5 * dt * k1[0], e + 0.5 * dt * k1[1])
        k3 = rhs(i + 0.5 * dt * k2[0], e + 0.5 * dt * k2[1])
        k4 = rhs(i + dt * k3[0], e + dt * k3[1])
        i += dt / 6.0 * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0])
        e += dt / 6.0 * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1])
        e = min(max(e, e_min), e_max)
        i_max = max(i_max, i)
    ef[0] = i_0  # the step is applied just after t = 0
    # steady state: i = clip(K_A (u_ref - OCC(i))), increasing in i -> bisection
    lo, hi = min(e_min, 0.0), max(e_max, i_0) * 2.0 + 1.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if mid - min(max(k_a * (u_ref - occ_pu(mid)), e_min), e_max) < 0.0:
            lo = mid
        else:
            hi = mid
    return StepResponse(t, u, ef, occ_pu(0.5 * (lo + hi)), i_max)


def _crossing(t: np.ndarray, y: np.ndarray, level: float) -> float:
    """First time y reaches level (linear interpolation between samples)."""
    idx = np.nonzero(y >= level)[0]
    if len(idx) == 0:
        return math.nan
    k = int(idx[0])
    if k == 0:
        return float(t[0])
    return float(t[k - 1] + (level - y[k - 1]) / (y[k] - y[k - 1]) * (t[k] - t[k - 1]))


def step_metrics(t: np.ndarray, y: np.ndarray, y_0: float, y_final: float,
                 band: float = 0.02) -> tuple[float, float, float]:
    """(10-90 % rise time, overshoot % of the change, settling time into +/- band of
    the change) for a rising step.  Definitions: Ogata, Modern Control Engineering,
    5th ed., 2010, §5-3 (as recalled)."""
    change = y_final - y_0
    yn = (np.asarray(y) - y_0) / change
    rise = _crossing(t, yn, 0.9) - _crossing(t, yn, 0.1)
    overshoot = max(0.0, float(np.max(yn)) - 1.0) * 100.0
    outside = np.nonzero(np.abs(yn - 1.0) > band)[0]
    if len(outside) == 0:
        settle = 0.0
    elif outside[-1] == len(t) - 1:
        settle = math.nan  # never settled within the simulated time
    else:
        k = int(outside[-1])
        # interpolate where |yn - 1| falls to the band between samples k and k+1
        a, b = abs(yn[k] - 1.0), abs(yn[k + 1] - 1.0)
        frac = (a - band) / (a - b) if a != b else 0.0
        settle = float(t[k] + frac * (t[k + 1] - t[k]))
    return rise, overshoot, settle


def simulation_span(k: float, t_a: float, t_d0: float, slew_time: float) -> tuple[float, int]:
    """(end time, steps): 8 time constants of the slowest linearised closed-loop pole
    plus the time spent on the ceiling; at least 4000 steps and 40 per fastest time
    constant (RK4 accuracy well inside the 1 % of the reported figures)."""
    if t_a == 0.0:
        poles = np.array([-(1.0 + k) / t_d0])
    else:
        poles = np.roots([t_a * t_d0, t_a + t_d0, 1.0 + k])
    sigma = -np.real(poles)
    t_end = 8.0 / float(np.min(sigma)) + 4.0 * slew_time
    fastest = float(np.max(np.abs(poles)))
    n = int(max(4000, math.ceil(40.0 * t_end * fastest)))
    return t_end, min(n, 200_000)


# ---------------------------------------------------------------------------
# Declaration
# ---------------------------------------------------------------------------

REFERENCES = [
    Reference("iec60034_4", "IEC 60034-4-1:2018, Rotating electrical machines - Part 4-1: Methods "
              "for determining electrically excited synchronous machine quantities from tests, "
              "International Electrotechnical Commission, Geneva.",
              "Open-circuit and short-circuit characteristics, air-gap line, short-circuit ratio, "
              "Potier reactance and the Potier diagram for the excitation current at load; "
              "clause numbers as recalled, check the issued edition."),
    Reference("ieee115", "IEEE Std 115-2009, IEEE Guide for Test Procedures for Synchronous "
              "Machines, IEEE, New York, 2010.",
              "Saturation curves and their residual-voltage correction, field current at specified "
              "load by the saturation-allowance (ASA) method, resistance correction to a specified "
              "temperature with k = 234.5 for copper; clauses as recalled."),
    Reference("iec60034_1", "IEC 60034-1:2022, Rotating electrical machines - Part 1: Rating and "
              "performance, International Electrotechnical Commission, Geneva.",
              "Definition of the short-circuit ratio; resistance method for winding temperature "
              "(235 for copper, as recalled)."),
    Reference("fritsch", "F. N. Fritsch and R. E. Carlson, Monotone piecewise cubic interpolation, "
              "SIAM Journal on Numerical Analysis 17(2), 1980, pp. 238-246.",
              "Monotone cubic interpolation of the open-circuit points (no overshoot between points)."),
    Reference("mohan", "N. Mohan, T. M. Undeland, W. P. Robbins, Power Electronics: Converters, "
              "Applications, and Design, 3rd ed., Wiley, New York, 2003.",
              "Ch. 6, three-phase thyristor converters: U_d = 1.35 U_LL cos(alpha) - (3/pi) X_c I_d, "
              "line current sqrt(2/3) I_d; equation numbers as recalled."),
    Reference("ieee421_5", "IEEE Std 421.5-2016, IEEE Recommended Practice for Excitation System "
              "Models for Power System Stability Studies, IEEE, New York, 2016.",
              "Per-unit base of field voltage and current (1 pu gives rated voltage on the air-gap "
              "line) and the proportional static-exciter structure K_A/(1 + s T_A) with ceiling "
              "limits; as recalled."),
    Reference("kundur", "P. Kundur, Power System Stability and Control, McGraw-Hill, New York, 1994.",
              "Ch. 8 excitation systems and the open-circuit generator block 1/(1 + s T'_d0); "
              "§5.4 capability (stability limit); sections as recalled."),
    Reference("ogata", "K. Ogata, Modern Control Engineering, 5th ed., Prentice Hall, 2010.",
              "§5-3 transient-response specifications: rise time, maximum overshoot, settling time "
              "(2 % criterion); as recalled."),
    Reference("practice", "Common engineering practice, no published source: screening values "
              "chosen in basisbook 0.1.0 (this module).",
              "Ceiling factor, minimum firing angle, continuous rating factor, transformer impedance "
              "and response limits; confirm with the excitation-system supplier."),
]

_PHI = r"\arccos\left(@generator_power_factor\right)"  # rated power-factor angle, lagging
_SIN_PHI = r"\,\sqrt{1 - @generator_power_factor^{2}}"  # sin(phi_r), lagging

SPEC = CalcSpec(
    kind="excitation_system",
    discipline="excitation",
    title="Excitation demand and static exciter",
    purpose=(
        "Fix how much field current and voltage the generator needs from no load to rated load "
        "and at ceiling, what the thyristor bridge and its excitation transformer must deliver, and "
        "how fast the voltage regulator restores terminal voltage. The open-circuit characteristic "
        "(interpolated monotonically), the air-gap line and the linear short-circuit characteristic "
        "give the saturation factor and short-circuit ratio; the rated-load field current follows "
        "from the Potier diagram and from the saturation-allowance method, both shown. The regulator "
        "model is a chain of blocks: the voltage error u_ref - u feeds a proportional regulator and "
        "static exciter K_A/(1 + s T_A), limited to the bridge's positive and negative ceilings; its "
        "output drives the field on open circuit, 1/(1 + s T'_d0), whose current gives the terminal "
        "voltage through the open-circuit characteristic, fed back to the error."
    ),
    inputs=[
        Input("generator_voltage", range="[0.1, 30]", note="link to the generator"),
        Input("generator_current", range="[1, 100000]", note="link to the generator"),
        Input("generator_apparent_power", range="[0.01, 2000]", note="link to the generator"),
        Input("generator_power_factor", range="[0.5, 1]", note="link to the generator"),
        Input("direct_axis_reactance", range="[0.1, 10]", note="link to the generator (saturated value)"),
        Input("rotor_type", default="cylindrical", choices=("cylindrical", "salient"),
              note="link to the generator"),
        Input("stability_margin", range="[0, 0.5]", default=0.10,
              note="link to the generator; bounds the leading end of the field-current figure"),
        Input("open_circuit_characteristic",
              columns=(Column("field current", "A", "[0, inf)"),
                       Column("terminal voltage", "kV", "[0, inf)")),
              min_rows=4,
              note="rows [field current, line voltage] from the open-circuit test, both strictly "
                   "increasing, up to at least the Potier EMF; a first row (0, residual) is corrected"),
        Input("air_gap_slope", range="[0, inf)", default=0.0,
              note="0: slope of the first (straight) OCC segment through the origin"),
        Input("short_circuit_field_current", range="(0, inf)",
              note="sustained three-phase short-circuit test at rated current"),
        Input("potier_reactance", range="(0, 1)", note="IEC 60034-4-1 (zero-power-factor test)"),
        Input("field_resistance_reference", range="[0.001, 100]",
              note="field windings: from about 0.05 ohm (large machines) to tens of ohms (small ones)"),
        Input("field_reference_temperature", range="[-40, 200]"),
        Input("field_operating_temperature", range="[-40, 200]",
              note="e.g. the temperature of the insulation class's rise above the coolant"),
        Input("ceiling_factor", range="(1, 5]", default=2.0,
              note="common practice 1.6-2.5 for static exciters; the grid code may set it"),
        Input("excitation_transformer_secondary_voltage", range="(0, 5000]"),
        Input("excitation_transformer_rating", range="(0, 20000]"),
        Input("excitation_transformer_impedance", range="(0, 20]", default=6.0,
              note="common practice 4-8 %"),
        Input("minimum_firing_angle", range="[0, 90)", default=10.0,
              note="common practice; a fully controlled bridge rectifies only below 90 deg"),
        Input("maximum_regulating_firing_angle", range="(0, 90)", default=80.0,
              note="common practice"),
        Input("inverter_firing_angle_limit", range="[90, 170]", default=150.0,
              note="common practice (margin for commutation in inverter operation)"),
        Input("continuous_current_factor", range="[1, 2]", default=1.1, note="common practice"),
        Input("ceiling_margin_required", range="[0, 100]", default=5.0, note="common practice"),
        Input("avr_gain", range="[10, 2000]",
              note="proportional gain of a static exciter regulator, typically 50-400 pu/pu"),
        Input("avr_time_constant", range="[0, 10]",
              note="0 for an ideal (instantaneous) exciter; static exciters about 0.01-0.05 s"),
        Input("open_circuit_time_constant", range="[0.3, 30]",
              note="real machines: from about 1 s (small) to 12 s (large)"),
        Input("reference_step", range="[0.01, 0.2]", default=0.05,
              note="step tests on the voltage reference use 1-10 %"),
        Input("voltage_rise_time_limit", range="(0, 60]", default=0.5, note="common practice"),
        Input("voltage_overshoot_limit", range="[0, 100]", default=15.0, note="common practice"),
        Input("voltage_settling_time_limit", range="(0, 120]", default=2.0, note="common practice"),
    ],
    outputs=[
        Output("residual_correction_current"),
        Output("air_gap_slope_used"),
        Output("air_gap_field_current"),
        Output("no_load_field_current", key=True),
        Output("saturation_factor"),
        Output("short_circuit_ratio", key=True),
        Output("unsaturated_direct_axis_reactance"),
        Output("short_circuit_current_slope"),
        Output("occ_slope_at_rated_voltage"),
        Output("incremental_generator_gain"),
        Output("potier_emf"),
        Output("potier_emf_angle"),
        Output("potier_resultant_field_current"),
        Output("armature_reaction_field_current"),
        Output("potier_field_current"),
        Output("unsaturated_load_field_current"),
        Output("saturation_increment_current"),
        Output("saturation_allowance_field_current"),
        Output("field_current_method_difference"),
        Output("rated_load_field_current", key=True),
        Output("field_resistance_operating"),
        Output("rated_field_voltage", key=True),
        Output("rated_field_power"),
        Output("no_load_field_voltage"),
        Output("ceiling_voltage", key=True),
        Output("ceiling_current"),
        Output("bridge_ideal_dc_voltage"),
        Output("commutation_reactance"),
        Output("no_load_firing_angle"),
        Output("rated_firing_angle", key=True),
        Output("ceiling_firing_angle"),
        Output("bridge_maximum_dc_voltage"),
        Output("ceiling_voltage_margin"),
        Output("required_secondary_voltage"),
        Output("negative_ceiling_voltage"),
        Output("bridge_ac_current"),
        Output("required_transformer_rating", key=True),
        Output("excitation_transformer_loading"),
        Output("exciter_ceiling_per_unit"),
        Output("voltage_rise_time", key=True),
        Output("voltage_overshoot"),
        Output("voltage_settling_time"),
    ],
    steps=[
        # --- characteristics
        Step("residual_correction_current",
             r"\frac{U_\mathrm{res}}{(U_2 - U_\mathrm{res})/I_{\mathrm{f},2}}",
             "ieee115", "correction of the open-circuit curve for residual voltage (as recalled)",
             note="U_res and (I_f2, U_2): first two OCC rows; zero when the first row is not "
                  "(0, U_res). Every measured field current is shifted by this amount."),
        Step("air_gap_slope_used",
             r"\begin{cases} @air_gap_slope & @air_gap_slope > 0 \\ "
             r"U_1 / I_{\mathrm{f},1} & \text{otherwise (first OCC segment)} \end{cases}",
             "iec60034_4", "air-gap line: straight part of the open-circuit characteristic extended",
             note="(I_f1, U_1): first corrected OCC point above the origin."),
        Step("air_gap_field_current", r"\frac{@generator_voltage}{@air_gap_slope_used}",
             "iec60034_4", "air-gap line at rated voltage"),
        Step("no_load_field_current",
             r"\mathrm{OCC}^{-1}\left(@generator_voltage\right)",
             "fritsch", "monotone cubic through the corrected OCC points, inverted by bisection",
             note="On the residual-corrected curve (see step 1); IEC 60034-4-1 no-load field current."),
        Step("saturation_factor", r"\frac{@no_load_field_current}{@air_gap_field_current}",
             "ieee115", "saturation factor at rated voltage (as recalled; also IEC 60034-4-1)"),
        Step("short_circuit_ratio",
             r"\frac{@no_load_field_current}{@short_circuit_field_current}",
             "iec60034_1", "definition of short-circuit ratio (as recalled; IEC 60034-4-1 test)"),
        Step("unsaturated_direct_axis_reactance",
             r"\frac{@short_circuit_field_current}{@air_gap_field_current}",
             "iec60034_4", "x_d (unsaturated) from the air-gap line and short-circuit characteristic"),
        Step("short_circuit_current_slope",
             r"\frac{@generator_current}{@short_circuit_field_current}",
             "iec60034_4", "short-circuit characteristic, linear through the origin"),
        Step("occ_slope_at_rated_voltage",
             r"\left.\frac{\mathrm{d}\,\mathrm{OCC}}{\mathrm{d}I_\mathrm{f}}\right|_{@no_load_field_current}",
             "fritsch", "derivative of the monotone cubic"),
        Step("incremental_generator_gain",
             r"@occ_slope_at_rated_voltage\,\frac{@air_gap_field_current}{@generator_voltage}",
             "kundur", "ch. 8, small-signal gain of the open-circuit generator in the regulator loop, "
             "field current on the air-gap base (as recalled)",
             note="1 on the straight part; below 1 where the machine saturates."),
        # --- Potier diagram
        Step("potier_emf",
             r"\sqrt{\left(1 + @potier_reactance" + _SIN_PHI + r"\right)^{2}"
             r" + \left(@potier_reactance\,@generator_power_factor\right)^{2}}",
             "iec60034_4", "Potier diagram: E_p = U + j x_p I, U = I = 1 pu (as recalled)"),
        Step("potier_emf_angle",
             r"\arctan\frac{@potier_reactance\,@generator_power_factor}"
             r"{1 + @potier_reactance" + _SIN_PHI + r"}",
             "iec60034_4", "Potier diagram (as recalled)"),
        Step("potier_resultant_field_current",
             r"\mathrm{OCC}^{-1}\left(@potier_emf\,@generator_voltage\right)",
             "iec60034_4", "Potier diagram: resultant MMF from the open-circuit curve at E_p (as recalled)",
             note="Read on the corrected, interpolated OCC (Fritsch-Carlson)."),
        Step("armature_reaction_field_current",
             r"@short_circuit_field_current - @potier_reactance\,@air_gap_field_current",
             "iec60034_4", "Potier triangle: short-circuit field current less the leakage part (as recalled)"),
        Step("potier_field_current",
             r"\sqrt{@potier_resultant_field_current^{2} + @armature_reaction_field_current^{2}"
             r" + 2\,@potier_resultant_field_current\,@armature_reaction_field_current"
             r"\sin\left(@potier_emf_angle + " + _PHI + r"\right)}",
             "iec60034_4", "Potier diagram: field MMF = resultant MMF minus armature MMF (as recalled)",
             note="I_fr leads E_p by 90 deg, I_fa is in phase with the current; cosine rule."),
        # --- saturation allowance
        Step("unsaturated_load_field_current",
             r"\sqrt{\left(@air_gap_field_current + @short_circuit_field_current"
             + _SIN_PHI + r"\right)^{2} + \left(@short_circuit_field_current\,"
             r"@generator_power_factor\right)^{2}}",
             "ieee115", "saturation-allowance (ASA) method, unsaturated part (as recalled)"),
        Step("saturation_increment_current",
             r"@potier_resultant_field_current - @potier_emf\,@air_gap_field_current",
             "ieee115", "saturation increment between OCC and air-gap line at the Potier EMF (as recalled)"),
        Step("saturation_allowance_field_current",
             r"@unsaturated_load_field_current + @saturation_increment_current",
             "ieee115", "saturation-allowance (ASA) method (as recalled)"),
        Step("field_current_method_difference",
             r"100\,\frac{@saturation_allowance_field_current - @potier_field_current}{@potier_field_current}",
             "practice", "comparison of the two methods"),
        Step("rated_load_field_current",
             r"\max\left(@potier_field_current,\ @saturation_allowance_field_current\right)",
             "practice", "the larger result sizes the exciter"),
        # --- field winding
        Step("field_resistance_operating",
             r"@field_resistance_reference\,\frac{234.5 + @field_operating_temperature}"
             r"{234.5 + @field_reference_temperature}",
             "ieee115", "resistance corrected to a specified temperature, copper k = 234.5 (as recalled)"),
        Step("rated_field_voltage", r"@rated_load_field_current\,@field_resistance_operating",
             "ieee115", "Ohm's law at operating temperature (brush drop neglected)"),
        Step("rated_field_power",
             r"\frac{@rated_field_voltage\,@rated_load_field_current}{10^{3}}",
             "ieee115", "d.c. field power"),
        Step("no_load_field_voltage", r"@no_load_field_current\,@field_resistance_operating",
             "ieee115", "hot resistance used (a cold field needs less voltage)"),
        Step("ceiling_voltage", r"@ceiling_factor\,@rated_field_voltage", "practice",
             "ceiling factor on rated-load field voltage"),
        Step("ceiling_current", r"\frac{@ceiling_voltage}{@field_resistance_operating}", "practice",
             "steady current the ceiling voltage drives through the hot field (short-time duty)"),
        # --- bridge and transformer
        Step("bridge_ideal_dc_voltage",
             r"\frac{3\sqrt{2}}{\pi}\,@excitation_transformer_secondary_voltage",
             "mohan", "ch. 6, U_d0 = 1.35 U_LL (as recalled)"),
        Step("commutation_reactance",
             r"@excitation_transformer_impedance\,"
             r"\frac{@excitation_transformer_secondary_voltage^{2}}{@excitation_transformer_rating\cdot 10^{3}}",
             "mohan", "ch. 6, commutation (line) reactance = transformer leakage reactance (as recalled)",
             note="u_k in percent is a fraction (6 % = 0.06); the transformer's resistance is neglected, so "
                  "the whole u_k is taken as reactance"),
        Step("no_load_firing_angle",
             r"\arccos\frac{@no_load_field_voltage + \frac{3}{\pi}@commutation_reactance\,"
             r"@no_load_field_current}{@bridge_ideal_dc_voltage}",
             "mohan", "ch. 6, U_d = U_d0 cos(alpha) - (3/pi) X_c I_d solved for alpha"),
        Step("rated_firing_angle",
             r"\arccos\frac{@rated_field_voltage + \frac{3}{\pi}@commutation_reactance\,"
             r"@rated_load_field_current}{@bridge_ideal_dc_voltage}",
             "mohan", "ch. 6, as above"),
        Step("ceiling_firing_angle",
             r"\arccos\frac{@ceiling_voltage + \frac{3}{\pi}@commutation_reactance\,"
             r"@ceiling_current}{@bridge_ideal_dc_voltage}",
             "mohan", "ch. 6, as above"),
        Step("bridge_maximum_dc_voltage",
             r"@bridge_ideal_dc_voltage\cos @minimum_firing_angle - \frac{3}{\pi}@commutation_reactance\,"
             r"@ceiling_current",
             "mohan", "ch. 6, at the minimum firing angle"),
        Step("ceiling_voltage_margin",
             r"100\left(\frac{@bridge_maximum_dc_voltage}{@ceiling_voltage} - 1\right)",
             "practice", "ceiling margin"),
        Step("required_secondary_voltage",
             r"\frac{2\,@ceiling_voltage}{b + \sqrt{b^{2} - 4\,a\,@ceiling_voltage}},\quad "
             r"b = \frac{3\sqrt{2}}{\pi}\cos @minimum_firing_angle,\quad "
             r"a = \frac{3}{\pi}\,\frac{@excitation_transformer_impedance\,@ceiling_current}"
             r"{@excitation_transformer_rating\cdot 10^{3}}",
             "mohan", "ch. 6, U_d(alpha_min, I_fc) = U_fc solved for U_LL (as recalled)",
             note="X_c = u_k U_T2^2/S_ET grows with the secondary voltage, so U_d = b U - a U^2 = U_fc "
                  "is a quadratic; the smaller root, written without cancellation."),
        Step("negative_ceiling_voltage",
             r"-\left(@bridge_ideal_dc_voltage\cos @inverter_firing_angle_limit - \frac{3}{\pi}"
             r"@commutation_reactance\,@rated_load_field_current\right)",
             "mohan", "ch. 6, inverter operation (alpha > 90 deg) for de-excitation; shown as a magnitude"),
        Step("bridge_ac_current",
             r"\sqrt{\frac{2}{3}}\,@continuous_current_factor\,@rated_load_field_current",
             "mohan", "ch. 6, 120-degree rectangular line current (overlap neglected; as recalled)"),
        Step("required_transformer_rating",
             r"\frac{\sqrt{3}\,@excitation_transformer_secondary_voltage\,@bridge_ac_current}{10^{3}}",
             "mohan", "ch. 6, apparent power at the bridge's a.c. side (= 1.047 U_d0 I_d)"),
        Step("excitation_transformer_loading",
             r"100\,\frac{@required_transformer_rating}{@excitation_transformer_rating}",
             "practice", "continuous loading"),
        # --- regulator step response
        Step("exciter_ceiling_per_unit",
             r"\frac{@bridge_maximum_dc_voltage}{@field_resistance_operating\,@air_gap_field_current}",
             "ieee421_5", "per-unit base of exciter output: the field voltage giving rated voltage on the "
             "air-gap line (as recalled)",
             note="The regulator's upper limit in the step response; the lower limit is the negative "
                  "ceiling on the same base."),
        Step("voltage_rise_time", r"t_{90\,\%} - t_{10\,\%}", "ogata",
             "§5-3 rise time (10-90 %, as recalled)",
             note="From the integrated response (RK4, fixed step) of the block model in the purpose: "
                  "K_A/(1 + s T_A) with ceilings, then 1/(1 + s T'_d0), then the OCC; step of Δu_ref "
                  "in the reference at rated voltage, open circuit."),
        Step("voltage_overshoot",
             r"100\,\frac{u_\mathrm{peak} - u_\infty}{u_\infty - u_0}", "ogata",
             "§5-3 maximum overshoot (as recalled)",
             note="u_∞: steady state after the step (a proportional regulator leaves an error)."),
        Step("voltage_settling_time",
             r"\min\left\{t_\mathrm{s}: \left|u(t) - u_\infty\right| \le 0.02\left|u_\infty - u_0\right|"
             r"\ \forall t \ge t_\mathrm{s}\right\}",
             "ogata", "§5-3 settling time, 2 % criterion (as recalled)"),
    ],
    checks=[
        Check("ceiling_margin", "Bridge reaches the ceiling voltage with margin at the minimum firing angle",
              "ceiling_voltage_margin", ">=", "ceiling_margin_required", "practice", review_band=0.5),
        Check("firing_window", "Rated-load firing angle below the largest regulating angle "
              "(transformer secondary voltage not oversized)",
              "rated_firing_angle", "<=", "maximum_regulating_firing_angle", "practice",
              review_band=0.05),
        Check("transformer_loading", "Excitation transformer carries the continuous field current",
              "excitation_transformer_loading", "<=", 100.0, "practice", review_band=0.1),
        Check("rise_time", "Voltage rise time after a reference step within the limit",
              "voltage_rise_time", "<=", "voltage_rise_time_limit", "ogata", "§5-3"),
        Check("overshoot", "Voltage overshoot after a reference step within the limit",
              "voltage_overshoot", "<=", "voltage_overshoot_limit", "ogata", "§5-3"),
        Check("settling_time", "Voltage settling time (2 %) within the limit",
              "voltage_settling_time", "<=", "voltage_settling_time_limit", "ogata", "§5-3"),
    ],
    references=REFERENCES,
    cautions=[
        "A field winding stores magnetic energy: never open a field circuit that carries current; "
        "de-excite through the field breaker and discharge resistor (or the bridge in inverter "
        "operation) first.",
        "Exciter, slip-ring and field terminals carry dangerous voltages, with transients well above "
        "the ceiling voltage during faults and field switching; the excitation transformer is fed "
        "from the generator terminals and is live whenever the machine turns.",
        "These figures are a design basis for review, not the excitation-system supplier's design. "
        "Work to the local codes and licensed engineering practice, and confirm every value against "
        "the machine's test report and the supplier's guaranteed data.",
    ],
    figures=[
        FigureSpec("characteristics", "Open-circuit, air-gap and short-circuit characteristics",
                   "Open-circuit curve corrected for residual voltage and interpolated monotonically "
                   "(Fritsch-Carlson) through the test points, air-gap line through the origin, and the "
                   "linear short-circuit characteristic (armature current in pu of rated current), with "
                   "the no-load, short-circuit, Potier-EMF and rated-load field currents marked."),
        FigureSpec("field_current_vs_q", "Field current against reactive power at rated active power",
                   "Field current needed at rated active power and rated voltage from the "
                   "under-excited end (stator current or practical stability limit, cylindrical-rotor "
                   "approximation, whichever is reached first) to the rated point, by both methods."),
        FigureSpec("step_response", "Terminal voltage after a step in the regulator reference",
                   "Open-circuit response at rated voltage of the block model described above, "
                   "integrated with a fixed-step Runge-Kutta method; dotted lines: the 2 % band "
                   "around the final value."),
        FigureSpec("field_voltage_response", "Exciter output after the reference step",
                   "Exciter output in pu of the air-gap field voltage (1 pu gives rated voltage on the "
                   "air-gap line); flat parts are the bridge's ceiling."),
    ],
    tables=[
        TableSpec("bridge_points", "Bridge operating points",
                  "Field current and voltage at the operating temperature, firing angle, a.c. line "
                  "current and transformer apparent power."),
    ],
    glossary=GLOSSARY,
)


# ---------------------------------------------------------------------------
# compute
# ---------------------------------------------------------------------------


def _characteristics_chart(occ: OpenCircuitCurve, u_r: float, k_ag: float, i_fk: float,
                           i_f0: float, i_fr: float, e_p: float, i_fn: float) -> Chart:
    x_top = max(occ.field_currents[-1], i_fn) * 1.08
    xs = np.linspace(0.0, occ.field_currents[-1], 161)
    occ_u = [round(float(occ.curve.value(float(x))) / u_r, 9) for x in xs]
    ag_top = min(x_top, 1.5 * u_r / k_ag)  # air-gap line up to 1.5 pu voltage
    sc_top = min(x_top, 1.5 * i_fk)
    return Chart(
        x_label="Field current I_f (A)",
        y_label="Voltage U/U_r and short-circuit current I/I_r (pu)",
        series=[
            Series("Open-circuit characteristic (corrected)", [round(float(x), 9) for x in xs], occ_u),
            Series("Air-gap line", [0.0, ag_top], [0.0, round(ag_top * k_ag / u_r, 9)], style="dashed"),
            Series("Short-circuit characteristic (I/I_r)", [0.0, sc_top],
                   [0.0, round(sc_top / i_fk, 9)], style="dashdot"),
        ],
        markers=[
            Marker("No load", i_f0, 1.0),
            Marker("Potier EMF", i_fr, e_p),
            Marker("SC at I_r", i_fk, 1.0),
            Marker("Rated load", i_fn, 1.0),
        ],
        x_range=(0.0, x_top),
        y_range=(0.0, max(1.5, occ_u[-1] * 1.05)),
    )


def compute(v: Values) -> Result:
    warnings: list[str] = []
    u_r = float(v.generator_voltage)
    i_r = float(v.generator_current)
    s_r = float(v.generator_apparent_power)
    pf = float(v.generator_power_factor)
    x_d = float(v.direct_axis_reactance)
    x_p = float(v.potier_reactance)
    i_fk = float(v.short_circuit_field_current)
    phi = math.degrees(math.acos(pf))

    # --- characteristics
    occ = open_circuit_curve(v.open_circuit_characteristic)
    k_ag = float(v.air_gap_slope) or occ.first_segment_slope
    i_fg = u_r / k_ag
    e_p, d_p = potier_emf(1.0, phi, x_p)
    u_top = occ.voltages[-1]
    if u_top < e_p * u_r:
        raise InputConflict(
            "open_circuit_characteristic",
            f"the points reach only {u_top:g} kV; the Potier EMF at rated load needs "
            f"{e_p * u_r:.4g} kV ({e_p:.3f} pu): add test points up to at least that voltage")
    i_f0 = occ.curve.inverse(u_r)
    k_sat = i_f0 / i_fg
    if k_sat < 1.0 - 1e-9:
        who = "air_gap_slope" if float(v.air_gap_slope) else "open_circuit_characteristic"
        raise InputConflict(who, f"the open-circuit curve lies above the air-gap line at rated voltage "
                            f"(saturation factor {k_sat:.3f} < 1): a saturating curve bends below its "
                            "straight part; check the points or the given slope")
    x_du = i_fk / i_fg
    if x_p >= x_du:
        raise InputConflict("potier_reactance",
                            f"x_p = {x_p:g} pu is not below the unsaturated x_d = I_fk/I_fg = {x_du:.3f} pu "
                            "from the short-circuit and air-gap data; the armature reaction would vanish")
    scr = i_f0 / i_fk
    if abs(x_d * scr - 1.0) > 0.2:
        warnings.append(f"linked x_d = {x_d:g} pu differs by more than 20 % from 1/SCR = {1 / scr:.3f} pu "
                        "given by the open- and short-circuit data; check that they describe the same machine")
    if v.rotor_type == "salient":
        warnings.append("salient-pole rotor: the Potier and saturation-allowance constructions used here are "
                        "the cylindrical-rotor forms; they overstate the field current slightly (conservative)")
    k_occ = occ.curve.slope(i_f0)
    k_g = k_occ * i_fg / u_r

    def occ_inverse_pu(e: float) -> float:
        return occ.curve.inverse(e * u_r)

    # --- rated-load field current, both methods
    pot = potier_field_current(1.0, phi, x_p, occ_inverse_pu, i_fg, i_fk)
    i_fu, i_fs, i_f_sat = saturation_allowance_field_current(1.0, phi, x_p, occ_inverse_pu, i_fg, i_fk)
    i_fn = max(pot.field_current, i_f_sat)
    diff = 100.0 * (i_f_sat - pot.field_current) / pot.field_current
    if abs(diff) > 10.0:
        warnings.append(f"the two field-current methods differ by {diff:.1f} %; check x_p and the curves")

    # --- field winding
    r_f2 = copper_resistance_at(float(v.field_resistance_reference), float(v.field_reference_temperature),
                                float(v.field_operating_temperature))
    u_fn = i_fn * r_f2
    u_f0 = i_f0 * r_f2
    u_fc = float(v.ceiling_factor) * u_fn
    i_fc = u_fc / r_f2

    # --- bridge and transformer
    u_2 = float(v.excitation_transformer_secondary_voltage)
    s_et = float(v.excitation_transformer_rating)
    a_min = float(v.minimum_firing_angle)
    a_max = float(v.maximum_regulating_firing_angle)
    if a_min >= a_max:
        raise InputConflict("maximum_regulating_firing_angle",
                            f"{a_max:g} deg is not above the minimum firing angle {a_min:g} deg: "
                            "the firing-angle window is empty")
    x_c = float(v.excitation_transformer_impedance) / 100.0 * u_2**2 / (s_et * 1e3)
    u_di0 = BRIDGE_FACTOR * u_2
    u_dmax = bridge_dc_voltage(u_2, a_min, x_c, i_fc)
    u_2_req = required_secondary_voltage(u_fc, i_fc, a_min, float(v.excitation_transformer_impedance), s_et)
    if u_dmax < u_fc:
        need = (f"a secondary voltage of at least {u_2_req:.1f} V is needed" if math.isfinite(u_2_req) else
                "no secondary voltage reaches it with this transformer rating and impedance "
                "(the commutation drop grows faster): raise the rating or lower u_k")
        raise InputConflict(
            "excitation_transformer_secondary_voltage",
            f"{u_2:g} V cannot reach the ceiling: the bridge gives at most {u_dmax:.1f} V at "
            f"alpha_min = {a_min:g} deg and {i_fc:.0f} A, the ceiling needs {u_fc:.1f} V; {need}")
    alpha_0 = firing_angle(u_f0, u_2, x_c, i_f0)
    alpha_n = firing_angle(u_fn, u_2, x_c, i_fn)
    alpha_c = firing_angle(u_fc, u_2, x_c, i_fc)
    u_neg = bridge_dc_voltage(u_2, float(v.inverter_firing_angle_limit), x_c, i_fn)
    k_cont = float(v.continuous_current_factor)
    i_ac = bridge_line_current(k_cont * i_fn)
    s_req = math.sqrt(3.0) * u_2 * i_ac / 1e3

    # --- regulator step response (pu on the air-gap base: field voltage R_f2 I_fg)
    k_a = float(v.avr_gain)
    t_a = float(v.avr_time_constant)
    if 0.0 < t_a < 1e-3:
        # below a millisecond the lag is far inside the bridge's own firing delay; the stiff
        # system would also need millions of integration steps
        raise InputConflict("avr_time_constant", f"T_A = {t_a:g} s is below 1 ms; give 0 for an ideal "
                            "(instantaneous) exciter")
    t_d0 = float(v.open_circuit_time_constant)
    du = float(v.reference_step)
    e_base = r_f2 * i_fg
    e_max = u_dmax / e_base
    e_min = u_neg / e_base
    i_0 = i_f0 / i_fg

    def occ_pu(i: float) -> float:
        return occ.curve.value(i * i_fg) / u_r

    k_loop = k_a * k_g
    di_need = du * k_loop / (1.0 + k_loop) / k_g
    slew = max(e_max - i_0, 1e-9) / t_d0
    t_end, n_steps = simulation_span(k_loop, t_a, t_d0, di_need / slew)
    resp = regulator_step_response(occ_pu, i_0, k_a, t_a, t_d0, du, e_min, e_max, t_end, n_steps)
    rise, overshoot, settle = step_metrics(resp.t, resp.u, 1.0, resp.u_final)
    if not math.isfinite(settle):
        settle = float(resp.t[-1])
        warnings.append("the voltage did not settle within the simulated time; settling time shown is "
                        "the simulated span")
    if resp.i_max * i_fg > occ.field_currents[-1]:
        warnings.append("the step response runs beyond the last open-circuit point; the curve is "
                        "extended with its end slope there")

    outputs: dict[str, float | str] = {
        "residual_correction_current": occ.residual_shift,
        "air_gap_slope_used": k_ag,
        "air_gap_field_current": i_fg,
        "no_load_field_current": i_f0,
        "saturation_factor": k_sat,
        "short_circuit_ratio": scr,
        "unsaturated_direct_axis_reactance": x_du,
        "short_circuit_current_slope": i_r / i_fk,
        "occ_slope_at_rated_voltage": k_occ,
        "incremental_generator_gain": k_g,
        "potier_emf": pot.emf,
        "potier_emf_angle": pot.emf_angle,
        "potier_resultant_field_current": pot.resultant_current,
        "armature_reaction_field_current": pot.armature_current,
        "potier_field_current": pot.field_current,
        "unsaturated_load_field_current": i_fu,
        "saturation_increment_current": i_fs,
        "saturation_allowance_field_current": i_f_sat,
        "field_current_method_difference": diff,
        "rated_load_field_current": i_fn,
        "field_resistance_operating": r_f2,
        "rated_field_voltage": u_fn,
        "rated_field_power": u_fn * i_fn / 1e3,
        "no_load_field_voltage": u_f0,
        "ceiling_voltage": u_fc,
        "ceiling_current": i_fc,
        "bridge_ideal_dc_voltage": u_di0,
        "commutation_reactance": x_c,
        "no_load_firing_angle": alpha_0,
        "rated_firing_angle": alpha_n,
        "ceiling_firing_angle": alpha_c,
        "bridge_maximum_dc_voltage": u_dmax,
        "ceiling_voltage_margin": 100.0 * (u_dmax / u_fc - 1.0),
        "required_secondary_voltage": u_2_req,
        "negative_ceiling_voltage": -u_neg,  # magnitude: the bridge voltage itself is negative
        "bridge_ac_current": i_ac,
        "required_transformer_rating": s_req,
        "excitation_transformer_loading": 100.0 * s_req / s_et,
        "exciter_ceiling_per_unit": e_max,
        "voltage_rise_time": rise,
        "voltage_overshoot": overshoot,
        "voltage_settling_time": settle,
    }

    # --- figures
    charts: dict[str, Chart] = {
        "characteristics": _characteristics_chart(occ, u_r, k_ag, i_fk, i_f0, pot.resultant_current,
                                                  pot.emf, i_fn),
    }
    p_pu = pf
    q_r = math.sqrt(1.0 - pf * pf)
    q_lo = max(-q_r, stability_limit_q(p_pu, float(v.stability_margin), x_d))
    qs = np.linspace(min(q_lo, q_r), q_r, 61)
    pot_q, sat_q = [], []
    for q in qs:
        cur = math.hypot(p_pu, float(q))
        ang = math.degrees(math.atan2(float(q), p_pu))
        pot_q.append(round(potier_field_current(cur, ang, x_p, occ_inverse_pu, i_fg, i_fk).field_current, 9))
        sat_q.append(round(saturation_allowance_field_current(cur, ang, x_p, occ_inverse_pu, i_fg, i_fk)[2], 9))
    q_mvar = [round(float(q) * s_r, 9) for q in qs]
    charts["field_current_vs_q"] = Chart(
        x_label="Reactive power Q (Mvar), lagging positive",
        y_label="Field current I_f (A)",
        series=[Series("Potier method", q_mvar, pot_q),
                Series("Saturation-allowance method", q_mvar, sat_q, style="dashed")],
        markers=[Marker("Rated point", q_r * s_r, i_fn),
                 Marker("Unity power factor", 0.0,
                        potier_field_current(p_pu, 0.0, x_p, occ_inverse_pu, i_fg, i_fk).field_current)]
        if q_lo < 0.0 else [Marker("Rated point", q_r * s_r, i_fn)],
    )
    # thin the time series for the figure (every k-th sample keeps the shape)
    stride = max(1, len(resp.t) // 600)
    tt = [round(float(x), 9) for x in resp.t[::stride]]
    band_hi = resp.u_final + 0.02 * (resp.u_final - 1.0)
    band_lo = resp.u_final - 0.02 * (resp.u_final - 1.0)
    ends = [tt[0], tt[-1]]
    charts["step_response"] = Chart(
        x_label="Time t (s)",
        y_label="Terminal voltage u (pu)",
        series=[Series("Terminal voltage", tt, [round(float(x), 9) for x in resp.u[::stride]]),
                Series("2 % band, upper", ends, [band_hi, band_hi], style="dotted"),
                Series("2 % band, lower", ends, [band_lo, band_lo], style="dotted")],
        markers=[Marker(f"t_s = {settle:.3g} s", settle, float(np.interp(settle, resp.t, resp.u)))],
        y_range=(1.0 - 0.1 * du, max(1.0 + 1.25 * du, float(resp.u.max()) + 0.1 * du)),
    )
    charts["field_voltage_response"] = Chart(
        x_label="Time t (s)",
        y_label="Exciter output e_fd (pu of air-gap field voltage)",
        series=[Series("Exciter output", tt, [round(float(x), 9) for x in resp.e_fd[::stride]]),
                Series("Positive ceiling", ends, [e_max, e_max], style="dotted"),
                Series("Negative ceiling", ends, [e_min, e_min], style="dotted")],
    )
    cont = k_cont * i_fn
    rows = []
    for label, i_d, u_d in (("no load", i_f0, u_f0), ("rated load", i_fn, u_fn),
                            ("continuous rating", cont, cont * r_f2), ("ceiling", i_fc, u_fc)):
        rows.append([label, i_d, u_d, firing_angle(u_d, u_2, x_c, i_d), bridge_line_current(i_d),
                     math.sqrt(3.0) * u_2 * bridge_line_current(i_d) / 1e3])
    table = Table(columns=[("Operating point", ""), ("Field current", "A"), ("Field voltage", "V"),
                           ("Firing angle", "deg"), ("A.c. line current", "A"),
                           ("Transformer apparent power", "kVA")], rows=rows)
    return Result(outputs=outputs, charts=charts, tables={"bridge_points": table}, warnings=warnings)


# ---------------------------------------------------------------------------
# Checks against published numbers (run by the tests and shown in the handbook's
# verification appendix)
# ---------------------------------------------------------------------------

_FITZGERALD = ("A. E. Fitzgerald, C. Kingsley, S. D. Umans, Electric Machinery, 6th ed., Example 5.4 "
               "(from memory): 45 kVA, 220 V; air-gap line 202 V at 2.20 A, OCC 220 V at 2.84 A, "
               "SCC 118 A at 2.20 A")
_FITZGERALD_OCC = ((0, 0), (1.1, 0.101), (2.2, 0.202), (2.84, 0.220), (4.0, 0.240))


def _fitzgerald_scr() -> float:
    occ = open_circuit_curve(_FITZGERALD_OCC)
    return occ.curve.inverse(0.220) / 2.20


def _fitzgerald_xsu_ohm() -> float:
    occ = open_circuit_curve(_FITZGERALD_OCC)
    i_fg = 0.220 / occ.first_segment_slope
    return 2.20 / i_fg * 220.0**2 / 45e3  # x_du in pu times the base impedance


def _second_order_overshoot() -> float:
    # K_A = 50, T_A = 0.1 s, T'_d0 = 2 s, straight OCC: zeta = 0.329
    r = regulator_step_response(lambda i: i, 1.0, 50.0, 0.1, 2.0, 0.05, -1e9, 1e9, 1.9, 8000)
    return step_metrics(r.t, r.u, 1.0, r.u_final)[1]


_WN = math.sqrt(51.0 / 0.2)
_ZETA = 2.1 / 0.2 / (2.0 * _WN)

PUBLISHED_CASES = [
    PublishedCase("six-pulse bridge: U_d0 / U_LL", "Mohan, Undeland, Robbins, Power Electronics, 3rd ed., "
                  "ch. 6 (from memory): U_d0 = 1.35 U_LL", 1.35, "", 0.0006,
                  "the book prints 3 digits (exact 3 sqrt 2 / pi = 1.35047)", lambda: BRIDGE_FACTOR),
    PublishedCase("copper resistance from 20 to 75 degC", "IEC 60028 annealed copper, alpha_20 = 0.00393 /K "
                  "(from memory): R75/R20 = 1 + 0.00393 x 55", 1.21615, "", 1e-4,
                  "alpha_20 is printed to 3 digits; the 234.5 K constant rounds it",
                  lambda: copper_resistance_at(1.0, 20.0, 75.0)),
    PublishedCase("short-circuit ratio of the example machine", _FITZGERALD, 1.29, "", 0.005,
                  "the book prints 3 digits", _fitzgerald_scr),
    PublishedCase("unsaturated synchronous reactance of the example machine", _FITZGERALD, 0.987, "ohm",
                  0.0015, "the book prints 3 digits", _fitzgerald_xsu_ohm),
    PublishedCase("overshoot of the second-order regulator loop", "Ogata, Modern Control Engineering, "
                  "5th ed., §5-3 (from memory): M_p = exp(-zeta pi / sqrt(1 - zeta^2)), zeta = 0.329",
                  100.0 * math.exp(-_ZETA * math.pi / math.sqrt(1.0 - _ZETA**2)), "%", 0.02,
                  "closed form, exact; 0.02 points allows the fixed time step",
                  _second_order_overshoot),
]
