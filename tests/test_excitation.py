"""Tests of calcs/excitation.py against published values, textbook relations and
independent libraries (scipy).  Each check names its source beside it; values
recalled rather than looked up say "from memory"."""

from __future__ import annotations

import cmath
import math
import re
import subprocess
import sys
from pathlib import Path

import basisbook.calcs.excitation as ex
import numpy as np
import pytest
from scipy.interpolate import CubicHermiteSpline, PchipInterpolator
from scipy.signal import lti, step

from basisbook.commands.cli import main
from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Result, Values, evaluate_check

# STG-1 of the demo project (invented data), with the generator values written out.
BASE: dict[str, object] = {
    "generator_voltage": 11.0,
    "generator_current": 820.1,
    "generator_apparent_power": 15.625,
    "generator_power_factor": 0.8,
    "direct_axis_reactance": 2.05,
    "rotor_type": "cylindrical",
    "stability_margin": 0.10,
    "open_circuit_characteristic": ((0, 0.12), (100, 3.75), (200, 7.30), (260, 9.25), (300, 10.30),
                                    (340, 11.10), (400, 11.95), (480, 12.75), (560, 13.30), (650, 13.75)),
    "air_gap_slope": 0.0,
    "short_circuit_field_current": 700.0,
    "potier_reactance": 0.18,
    "field_resistance_reference": 0.105,
    "field_reference_temperature": 20.0,
    "field_operating_temperature": 95.0,
    "ceiling_factor": 2.0,
    "excitation_transformer_secondary_voltage": 250.0,
    "excitation_transformer_rating": 450.0,
    "excitation_transformer_impedance": 6.0,
    "minimum_firing_angle": 10.0,
    "maximum_regulating_firing_angle": 80.0,
    "inverter_firing_angle_limit": 150.0,
    "continuous_current_factor": 1.1,
    "ceiling_margin_required": 5.0,
    "avr_gain": 200.0,
    "avr_time_constant": 0.02,
    "open_circuit_time_constant": 6.5,
    "reference_step": 0.05,
    "voltage_rise_time_limit": 0.5,
    "voltage_overshoot_limit": 15.0,
    "voltage_settling_time_limit": 2.0,
}


def run(**changes: object) -> Result:
    return ex.compute(Values({**BASE, **changes}))


def verdict(check_id: str, result: Result, **changes: object) -> str:
    c = next(c for c in ex.SPEC.checks if c.id == check_id)
    known = {**BASE, **changes, **result.outputs}
    limit = known[c.limit] if isinstance(c.limit, str) else c.limit
    return evaluate_check(c, float(result.outputs[c.value]), float(limit)).verdict  # type: ignore[arg-type]


# ---------------------------------------------------------------------------
# Monotone cubic (Fritsch & Carlson 1980) against scipy
# ---------------------------------------------------------------------------

# The "RPN 14" test data of Fritsch & Carlson 1980 (from memory; a steep, then flat,
# monotone set on which ordinary cubic splines overshoot).
RPN_X = [7.99, 8.09, 8.19, 8.7, 9.2, 10.0, 12.0, 15.0, 20.0]
RPN_Y = [0.0, 2.76429e-5, 4.37498e-2, 0.169183, 0.469428, 0.943740, 0.998636, 0.999919, 0.999994]
DEMO_OCC_X = [0, 103.3, 203.3, 263.3, 303.3, 343.3, 403.3, 483.3, 563.3, 653.3]
DEMO_OCC_Y = [0, 3.75, 7.30, 9.25, 10.30, 11.10, 11.95, 12.75, 13.30, 13.75]


@pytest.mark.parametrize(("x", "y"), [(RPN_X, RPN_Y), (DEMO_OCC_X, DEMO_OCC_Y)], ids=["rpn14", "occ"])
def test_monotone_cubic_guarantees_shared_with_scipy_pchip(x: list[float], y: list[float]) -> None:
    # scipy's PchipInterpolator is an independent monotone cubic (Fritsch-Butland
    # harmonic-mean slopes, not the Fritsch-Carlson circle), so only what both
    # guarantee is compared: exact at the nodes, monotone, no overshoot.
    fc = ex.MonotoneCubic(x, y)
    pchip = PchipInterpolator(x, y)
    assert np.allclose(fc(np.array(x)), y, rtol=0, atol=1e-12)
    assert np.allclose(pchip(x), y, rtol=0, atol=1e-12)
    for k in range(len(x) - 1):
        xs = np.linspace(x[k], x[k + 1], 201)
        for f in (fc, pchip):
            ys = np.asarray(f(xs))
            assert np.all(np.diff(ys) >= -1e-12), "monotone"
            assert ys.min() >= y[k] - 1e-12 and ys.max() <= y[k + 1] + 1e-12, "no overshoot"
        # the two interpolants differ only inside the data's own step (same envelope)
        assert np.max(np.abs(np.asarray(fc(xs)) - pchip(xs))) <= (y[k + 1] - y[k]) + 1e-12


def test_hermite_evaluation_matches_scipy_cubic_hermite_spline() -> None:
    # independent library: given the same node slopes, scipy's CubicHermiteSpline must
    # give the same values and derivatives (checks our Hermite basis and slope code)
    fc = ex.MonotoneCubic(RPN_X, RPN_Y)
    ref = CubicHermiteSpline(RPN_X, RPN_Y, fc.m)
    xs = np.linspace(RPN_X[0], RPN_X[-1], 997)
    assert np.allclose(fc(xs), ref(xs), rtol=0, atol=1e-13)
    assert np.allclose([fc.slope(float(v)) for v in xs], ref(xs, 1), rtol=0, atol=1e-10)


def test_fritsch_carlson_slopes_by_hand() -> None:
    # Hand arithmetic of the Fritsch-Carlson steps (1980 paper, steps 1-5, from memory):
    # x = 0, 1, 2; y = 0, 0.1, 10 -> secants 0.1 and 9.9; start slopes 0.1, 5.0, 9.9.
    # interval 1: alpha = 1, beta = 50, alpha^2 + beta^2 = 2501 > 9 -> tau = 3/sqrt(2501),
    # m0 = tau * 0.1, m1 = tau * 50 * 0.1; interval 2: (m1/9.9, 1) is inside the circle.
    m = ex.fritsch_carlson_slopes([0, 1, 2], [0, 0.1, 10])
    tau = 3 / math.sqrt(2501)
    assert m == pytest.approx([tau * 0.1, tau * 5.0, 9.9], rel=1e-12)
    # flat data stay flat (the paper's zero-slope rule at a flat interval)
    fc = ex.MonotoneCubic([0, 1, 2, 3], [0, 1, 1, 2])
    assert np.allclose(fc(np.linspace(1, 2, 11)), 1.0, atol=1e-15)
    # straight-line data are reproduced exactly (all secants equal)
    line = ex.MonotoneCubic([0, 1, 3, 7], [1, 3, 7, 15])
    assert line(5.5) == pytest.approx(12.0, abs=1e-12)


def test_inverse_round_trip_and_extrapolation() -> None:
    fc = ex.MonotoneCubic(DEMO_OCC_X, DEMO_OCC_Y)
    for yq in (0.5, 3.75, 9.9, 11.0, 13.6):
        assert fc(fc.inverse(yq)) == pytest.approx(yq, abs=1e-12)
    # beyond the last point: straight line with the end slope (documented behaviour)
    assert fc(700.0) == pytest.approx(13.75 + fc.m[-1] * (700.0 - 653.3), rel=1e-12)


# ---------------------------------------------------------------------------
# Open-circuit curve, air-gap line, short-circuit characteristic
# ---------------------------------------------------------------------------


def test_residual_voltage_correction_by_hand() -> None:
    # First segment (0, 0.12 kV) -> (100 A, 3.75 kV): slope 0.0363 kV/A; its intercept
    # on the current axis is -0.12/0.0363 = -3.3058 A, so every current shifts by +3.3058 A
    # (IEEE Std 115 correction for residual magnetism, as recalled).  Hand arithmetic.
    occ = ex.open_circuit_curve(BASE["open_circuit_characteristic"])  # type: ignore[arg-type]
    assert occ.residual_shift == pytest.approx(0.12 / 0.0363, rel=1e-12)
    assert occ.first_segment_slope == pytest.approx(0.0363, rel=1e-12)
    assert occ.field_currents[:3] == pytest.approx([0.0, 3.3058, 103.3058], abs=1e-4)
    # no residual: the origin is added, nothing shifts
    occ0 = ex.open_circuit_curve(((50, 2.0), (100, 4.0), (150, 5.5), (200, 6.2)))
    assert occ0.residual_shift == 0.0 and occ0.field_currents[0] == 0.0
    assert occ0.first_segment_slope == pytest.approx(0.04)


@pytest.mark.parametrize("bad", [((0, 0), (100, 4), (90, 5), (200, 6)),
                                 ((0, 0), (100, 4), (150, 4), (200, 6)),
                                 ((0, 0), (100, 4), (150, 3.9), (200, 6))])
def test_non_monotonic_points_are_refused(bad: tuple) -> None:
    with pytest.raises(InputConflict, match="non-monotonic: row 3") as exc:
        ex.open_circuit_curve(bad)
    assert exc.value.key == "open_circuit_characteristic"


def test_open_circuit_curve_saturates_demo_property() -> None:
    # property (IEC 60034-4-1: the air-gap line is the extended straight part): the
    # corrected, interpolated OCC never lies above the air-gap line, and its slope
    # falls as the iron saturates.  Tolerance 0.1 % of U_r: on the straight part a cubic
    # whose end slopes differ slightly from the secant bulges by a few volts (6 V here),
    # well inside the 3 significant digits of the test points.
    occ = ex.open_circuit_curve(BASE["open_circuit_characteristic"])  # type: ignore[arg-type]
    xs = np.linspace(0, occ.field_currents[-1], 400)
    ys = np.asarray(occ.curve(xs))
    assert np.all(ys <= occ.first_segment_slope * xs + 0.011)
    assert np.all(ys[xs > 250] < occ.first_segment_slope * xs[xs > 250])  # clearly below once saturating
    # the data's secants and the node slopes fall beyond the straight part (a monotone
    # cubic need not be concave inside an interval, so only the nodes are compared)
    secants = np.diff(occ.voltages) / np.diff(occ.field_currents)
    assert np.all(np.diff(secants[1:]) < 0)
    assert np.all(np.diff(occ.curve.m[2:]) < 0)


def test_non_saturating_curve_is_refused() -> None:
    convex = ((0, 0.0), (100, 3.0), (200, 7.0), (300, 12.0), (400, 18.0))
    with pytest.raises(InputConflict, match="above the air-gap line"):
        run(open_circuit_characteristic=convex)


def test_short_circuit_characteristic_is_linear() -> None:
    # property (IEC 60034-4-1, sustained short circuit: the iron is unsaturated, so the
    # armature current is proportional to field current): at U = 0 the Potier construction
    # needs I_fk times the per-unit current, for any current (the Potier EMF x_p I then
    # lies on the straight part, modelled here by the air-gap line itself)
    i_fg = 11.0 / 0.0363

    def inv(e: float) -> float:
        return e * i_fg

    for i in (0.25, 0.5, 1.0, 1.5):
        r = ex.potier_field_current(i, 90.0, 0.18, inv, i_fg, 700.0, voltage=0.0)
        assert r.field_current == pytest.approx(700.0 * i, rel=1e-9)
    chart = run().charts["characteristics"]
    sc = next(s for s in chart.series if s.label.startswith("Short-circuit"))
    assert sc.x[0] == 0.0 and sc.y[0] == 0.0 and sc.y[1] / sc.x[1] == pytest.approx(1 / 700.0)


def test_textbook_scr_and_unsaturated_reactance() -> None:
    # A. E. Fitzgerald, C. Kingsley, S. D. Umans, Electric Machinery, 6th ed., Example 5.4
    # (from memory): 45 kVA, 220 V, Y, 6 poles, 60 Hz.  Air-gap line 202 V at 2.20 A;
    # OCC 220 V at 2.84 A; SCC 118 A at 2.20 A.  Book: SCR = 1.29, X_s,u = 0.987 ohm/phase.
    pts = ((0, 0), (1.1, 0.101), (2.2, 0.202), (2.84, 0.220), (4.0, 0.240))
    r = run(generator_voltage=0.220, generator_current=118.1, generator_apparent_power=0.045,
            open_circuit_characteristic=pts, short_circuit_field_current=2.20, potier_reactance=0.1,
            field_resistance_reference=1.0, excitation_transformer_secondary_voltage=300.0,
            excitation_transformer_rating=5.0, avr_gain=50.0).outputs
    assert r["no_load_field_current"] == pytest.approx(2.84, abs=1e-9)  # a test point
    assert r["short_circuit_ratio"] == pytest.approx(1.29, abs=0.005)  # book prints 3 digits
    z_base = 220.0**2 / 45e3
    assert r["unsaturated_direct_axis_reactance"] * z_base == pytest.approx(0.987, abs=0.0015)  # 3 digits
    assert r["air_gap_field_current"] == pytest.approx(2.20 * 220 / 202, rel=1e-12)


# ---------------------------------------------------------------------------
# Potier and saturation-allowance methods
# ---------------------------------------------------------------------------

# Worked example constructed for these tests (numbers chosen so every reading falls on
# a test point and the angles are exact; verified by hand below): U_r = 10 kV, air-gap
# slope 0.1 kV/A (I_fg = 100 A), I_fk = 250 A, x_p = 0.2 pu, cos(phi) = 0.8 lagging.
# E_p = |1 + j0.2 (0.8 - j0.6)| = |1.12 + j0.16| = sqrt(1.28) = 1.131371 pu,
# delta_p = atan(1/7); tan(delta_p + phi) = (1/7 + 3/4)/(1 - 3/28) = 1 -> 45 deg exactly.
HAND_OCC = ((0, 0), (50, 5.0), (80, 8.0), (110, 10.0), (160, 10 * math.sqrt(1.28)), (220, 12.0))


def _hand_inverse():
    occ = ex.open_circuit_curve(HAND_OCC)
    return lambda e: occ.curve.inverse(e * 10.0)


def test_potier_worked_example_by_hand() -> None:
    # Hand arithmetic: I_fr = 160 A (a test point); I_fa = 250 - 0.2*100 = 230 A;
    # I_f^2 = 160^2 + 230^2 + 2*160*230*sin 45 deg = 25600 + 52900 + 52043.06
    # -> I_f = 361.307 A.  Potier diagram, IEC 60034-4-1 (as recalled).
    r = ex.potier_field_current(1.0, math.degrees(math.acos(0.8)), 0.2, _hand_inverse(), 100.0, 250.0)
    assert r.emf == pytest.approx(math.sqrt(1.28), rel=1e-12)
    assert r.emf_angle == pytest.approx(math.degrees(math.atan(1 / 7)), rel=1e-12)
    assert r.resultant_current == pytest.approx(160.0, abs=1e-9)
    assert r.armature_current == pytest.approx(230.0, rel=1e-12)
    assert r.field_current == pytest.approx(361.307, abs=0.001)  # hand value to 6 digits
    # independent construction with complex phasors: resultant MMF leads E_p by 90 deg,
    # armature MMF in phase with I; field MMF = resultant - armature
    e_p = 1 + 1j * 0.2 * cmath.rect(1.0, -math.acos(0.8))
    f_r = 160.0 * 1j * e_p / abs(e_p)
    f_a = 230.0 * cmath.rect(1.0, -math.acos(0.8))
    assert r.field_current == pytest.approx(abs(f_r - f_a), rel=1e-12)


def test_saturation_allowance_worked_example_by_hand() -> None:
    # IEEE Std 115 saturation-allowance (ASA) method (as recalled), hand arithmetic:
    # I_fu = sqrt((100 + 250*0.6)^2 + (250*0.8)^2) = sqrt(250^2 + 200^2) = 320.156 A;
    # I_fs = 160 - 1.131371*100 = 46.863 A; I_f = 367.019 A (1.58 % above Potier).
    i_fu, i_fs, i_f = ex.saturation_allowance_field_current(1.0, math.degrees(math.acos(0.8)), 0.2,
                                                            _hand_inverse(), 100.0, 250.0)
    assert i_fu == pytest.approx(320.156, abs=0.001)
    assert i_fs == pytest.approx(46.863, abs=0.001)
    assert i_f == pytest.approx(367.019, abs=0.001)


def test_methods_agree_at_zero_power_factor() -> None:
    # The Potier triangle of the zero-power-factor test (IEC 60034-4-1, as recalled):
    # at cos(phi) = 0 lagging, I_f = OCC^-1(1 + x_p) + (I_fk - x_p I_fg).  The
    # saturation-allowance sum I_fg + I_fk + I_fs gives the same by algebra; both exact.
    inv = _hand_inverse()
    x_p, i_fg, i_fk = 0.2, 100.0, 250.0
    zpf = inv(1 + x_p) + i_fk - x_p * i_fg
    pot = ex.potier_field_current(1.0, 90.0, x_p, inv, i_fg, i_fk)
    sat = ex.saturation_allowance_field_current(1.0, 90.0, x_p, inv, i_fg, i_fk)[2]
    assert pot.field_current == pytest.approx(zpf, rel=1e-12)
    assert sat == pytest.approx(zpf, rel=1e-12)


@pytest.mark.parametrize("phi", [-30.0, 0.0, 25.84, 36.87, 60.0])
def test_methods_reduce_to_synchronous_impedance_when_unsaturated(phi: float) -> None:
    # Limiting case: a straight OCC (no saturation).  Both methods must give the
    # synchronous-impedance result I_f = I_fg |1 + j x_du I| (Chapman, Electric Machinery
    # Fundamentals, 5th ed., ch. 4 phasor diagram, from memory); exact.
    i_fg, i_fk, x_p = 100.0, 230.0, 0.15

    def inv(e: float) -> float:
        return e * i_fg

    x_du = i_fk / i_fg
    expected = i_fg * abs(1 + 1j * x_du * cmath.rect(1.0, -math.radians(phi)))
    assert ex.potier_field_current(1.0, phi, x_p, inv, i_fg, i_fk).field_current == pytest.approx(expected)
    assert ex.saturation_allowance_field_current(1.0, phi, x_p, inv, i_fg, i_fk)[2] == pytest.approx(expected)


def test_compute_chain_step_by_step() -> None:
    # each step of the page recomputed from the previous outputs (independent arithmetic)
    o = run().outputs
    u_r, pf, x_p, i_fk = 11.0, 0.8, 0.18, 700.0
    sin_phi = 0.6
    assert o["air_gap_field_current"] == pytest.approx(u_r / o["air_gap_slope_used"])
    assert o["saturation_factor"] == pytest.approx(o["no_load_field_current"] / o["air_gap_field_current"])
    assert o["short_circuit_ratio"] == pytest.approx(o["no_load_field_current"] / i_fk)
    assert o["potier_emf"] == pytest.approx(math.hypot(1 + x_p * sin_phi, x_p * pf))
    assert o["armature_reaction_field_current"] == pytest.approx(i_fk - x_p * o["air_gap_field_current"])
    i_fr, i_fa = o["potier_resultant_field_current"], o["armature_reaction_field_current"]
    s = math.sin(math.radians(o["potier_emf_angle"]) + math.acos(pf))
    assert o["potier_field_current"] == pytest.approx(math.sqrt(i_fr**2 + i_fa**2 + 2 * i_fr * i_fa * s))
    assert o["saturation_increment_current"] == pytest.approx(i_fr - o["potier_emf"] * o["air_gap_field_current"])
    assert o["saturation_allowance_field_current"] == pytest.approx(
        o["unsaturated_load_field_current"] + o["saturation_increment_current"])
    assert o["rated_load_field_current"] == max(o["potier_field_current"], o["saturation_allowance_field_current"])
    # Potier EMF read on the OCC: the curve at I_fr gives E_p U_r
    occ = ex.open_circuit_curve(BASE["open_circuit_characteristic"])  # type: ignore[arg-type]
    assert occ.curve(i_fr) == pytest.approx(o["potier_emf"] * u_r, rel=1e-10)
    # typical magnitudes for a two-pole turbogenerator (common practice, no source):
    # SCR 0.4-0.7, rated-load field current 2.5-3.5 times no-load
    assert 0.4 < o["short_circuit_ratio"] < 0.7
    assert 2.5 < o["rated_load_field_current"] / o["no_load_field_current"] < 3.5


# ---------------------------------------------------------------------------
# Field winding: copper temperature correction
# ---------------------------------------------------------------------------


def test_copper_resistance_correction() -> None:
    # IEEE Std 115 (as recalled): R2/R1 = (234.5 + t2)/(234.5 + t1); 25 -> 75 degC
    # gives 309.5/259.5 = 1.192678 (exact arithmetic)
    assert ex.copper_resistance_at(1.0, 25.0, 75.0) == pytest.approx(309.5 / 259.5, rel=1e-15)
    # IEC 60028 international annealed copper standard (from memory): alpha_20 = 0.00393 /K,
    # so 1/alpha_20 - 20 = 234.45; the linear law R20 (1 + alpha_20 (t - 20)) agrees within
    # 0.01 % over 20-150 degC (the 234.5 constant is that coefficient rounded)
    for t in (40.0, 75.0, 95.0, 150.0):
        assert ex.copper_resistance_at(1.0, 20.0, t) == pytest.approx(1 + 0.00393 * (t - 20), rel=1e-4)
        # IEC 60034-1 uses 235 (as recalled): the two differ by well under 0.1 %
        assert ex.copper_resistance_at(1.0, 20.0, t) == pytest.approx((235 + t) / 255, rel=1e-3)


# ---------------------------------------------------------------------------
# Three-phase fully controlled bridge
# ---------------------------------------------------------------------------


def test_bridge_factor() -> None:
    # Mohan, Undeland, Robbins, Power Electronics, 3rd ed., ch. 5-6 (from memory):
    # U_d0 = (3 sqrt 2 / pi) U_LL = 1.35 U_LL; exact value 1.35047, 4 digits asserted
    assert ex.BRIDGE_FACTOR == pytest.approx(1.3505, abs=5e-5)
    assert ex.bridge_dc_voltage(400.0, 0.0, 0.0, 100.0) == pytest.approx(540.19, abs=0.01)


@pytest.mark.parametrize("alpha", [0.0, 15.0, 30.0, 60.0, 89.0, 120.0])
def test_bridge_voltage_from_waveform(alpha: float) -> None:
    # independent numeric check: with no overlap the bridge output follows the largest
    # line-to-line voltage, delayed by alpha; average it over one 60-degree interval
    # (U_LL sqrt 2 sin(wt + 60 deg + alpha) on wt in [0, 60 deg], per-unit U_LL = 1)
    wt = np.linspace(0.0, math.pi / 3, 20001)
    v = math.sqrt(2) * np.sin(wt + math.pi / 3 + math.radians(alpha))
    avg = float(np.trapezoid(v, wt) / (math.pi / 3))
    assert ex.bridge_dc_voltage(1.0, alpha, 0.0, 0.0) == pytest.approx(avg, abs=1e-8)


def test_commutation_drop_matches_overlap_relations() -> None:
    # Mohan 3rd ed. ch. 5-6 (from memory): overlap mu from
    # cos(alpha) - cos(alpha + mu) = 2 w L_s I_d / (sqrt 2 U_LL), and
    # U_d = (1.35 U_LL / 2)(cos alpha + cos(alpha + mu)); this must equal
    # 1.35 U_LL cos alpha - (3/pi) X_c I_d (two forms of the same textbook result)
    u_ll, x_c, i_d = 250.0, 0.0083, 1100.0
    for alpha in (10.0, 40.0, 65.0):
        a = math.radians(alpha)
        cos_am = math.cos(a) - 2 * x_c * i_d / (math.sqrt(2) * u_ll)
        u_overlap = ex.BRIDGE_FACTOR * u_ll / 2 * (math.cos(a) + cos_am)
        assert ex.bridge_dc_voltage(u_ll, alpha, x_c, i_d) == pytest.approx(u_overlap, rel=1e-12)
        # and the firing angle inverts it
        assert ex.firing_angle(u_overlap, u_ll, x_c, i_d) == pytest.approx(alpha, abs=1e-9)
    assert math.isnan(ex.firing_angle(400.0, 250.0, 0.0, 0.0))  # above U_d0 = 337.6 V


def test_line_current_and_transformer_rating() -> None:
    # independent numeric check: r.m.s. of +I_d for 120 deg, 0 for 60, -I_d for 120,
    # 0 for 60 (six-pulse line current, overlap neglected; Mohan ch. 5-6 from memory)
    th = np.linspace(0.0, 2 * math.pi, 360_001)
    wave = np.where(th < 2 * math.pi / 3, 1.0, 0.0) - np.where((th >= math.pi) & (th < 5 * math.pi / 3), 1.0, 0.0)
    rms = math.sqrt(float(np.trapezoid(wave**2, th)) / (2 * math.pi))
    assert ex.bridge_line_current(1.0) == pytest.approx(rms, rel=1e-4)  # grid resolution
    # transformer apparent power = sqrt 3 U I_ac = (pi/3) U_d0 I_d = 1.047 U_d0 I_d
    # (the familiar "1.05 P_d0" of six-pulse converter transformers; from memory)
    o = run().outputs
    u_di0, i_d = o["bridge_ideal_dc_voltage"], 1.1 * o["rated_load_field_current"]
    assert o["required_transformer_rating"] == pytest.approx(math.pi / 3 * u_di0 * i_d / 1e3, rel=1e-12)


def test_bridge_outputs_and_conflicts() -> None:
    o = run().outputs
    # firing angles fall as the demand rises: no load > rated > ceiling >= alpha_min
    assert o["no_load_firing_angle"] > o["rated_firing_angle"] > o["ceiling_firing_angle"] >= 10.0
    # the required secondary voltage gives exactly the ceiling at alpha_min, with the
    # commutation reactance of a transformer of that voltage (X_c = u_k U^2/S)
    u_req = o["required_secondary_voltage"]
    x_c_req = 0.06 * u_req**2 / 450e3
    assert ex.bridge_dc_voltage(u_req, 10.0, x_c_req, o["ceiling_current"]) == pytest.approx(
        o["ceiling_voltage"], rel=1e-12)
    assert math.isnan(ex.required_secondary_voltage(274.5, 2020.0, 10.0, 20.0, 10.0))  # tiny, stiff transformer
    # inverter operation: U_d = U_d0 cos 150 deg - (3/pi) X_c I_fN < 0, reported as a magnitude
    u_neg = ex.bridge_dc_voltage(250.0, 150.0, o["commutation_reactance"], o["rated_load_field_current"])
    assert u_neg < 0.0 and o["negative_ceiling_voltage"] == pytest.approx(-u_neg, rel=1e-12)
    with pytest.raises(InputConflict, match="cannot reach the ceiling") as exc:
        run(excitation_transformer_secondary_voltage=200.0)
    assert exc.value.key == "excitation_transformer_secondary_voltage"
    with pytest.raises(InputConflict, match="window is empty"):
        run(minimum_firing_angle=60.0, maximum_regulating_firing_angle=55.0)


# ---------------------------------------------------------------------------
# Regulator step response against closed forms and scipy.signal
# ---------------------------------------------------------------------------

BIG = 1e9  # limits far away: the linear cases


def test_first_order_response_closed_form() -> None:
    # T_A = 0, straight OCC: T'_d0 di/dt = K_A (u_ref - i) - i is first order with
    # tau = T'_d0/(1 + K_A), gain K_A/(1 + K_A).  Closed form (Ogata 5th ed. §5-2, from
    # memory): u = u0 + du_ss (1 - exp(-t/tau)); rise 10-90 % = tau ln 9; 2 % settling =
    # tau ln 50; no overshoot.
    k_a, t_d0, du = 9.0, 5.0, 0.05
    tau = t_d0 / (1 + k_a)
    r = ex.regulator_step_response(lambda i: i, 1.0, k_a, 0.0, t_d0, du, -BIG, BIG, 10 * tau, 4000)
    du_ss = du * k_a / (1 + k_a)
    assert r.u_final - 1.0 == pytest.approx(du_ss, rel=1e-9)
    assert np.allclose(r.u - 1.0, du_ss * (1 - np.exp(-r.t / tau)), rtol=0, atol=1e-9)
    rise, over, settle = ex.step_metrics(r.t, r.u, 1.0, r.u_final)
    dt = r.t[1] - r.t[0]
    assert rise == pytest.approx(tau * math.log(9), abs=dt)  # sampling: one step
    assert settle == pytest.approx(tau * math.log(50), abs=dt)
    assert over == 0.0


def test_second_order_response_closed_form_and_scipy() -> None:
    # T_A > 0, straight OCC: K/(T_A T s^2 + (T_A + T) s + 1 + K), K = K_A.
    # w_n^2 = (1 + K)/(T_A T), 2 zeta w_n = (T_A + T)/(T_A T).  Standard underdamped
    # step response and overshoot exp(-zeta pi / sqrt(1 - zeta^2)) (Ogata 5th ed. §5-3,
    # from memory); scipy.signal.step as an independent integrator.
    k_a, t_a, t_d0, du = 50.0, 0.1, 2.0, 0.05
    wn = math.sqrt((1 + k_a) / (t_a * t_d0))
    zeta = (t_a + t_d0) / (t_a * t_d0) / (2 * wn)
    assert 0.3 < zeta < 0.35
    wd = wn * math.sqrt(1 - zeta**2)
    t_end = 10 / (zeta * wn)
    r = ex.regulator_step_response(lambda i: i, 1.0, k_a, t_a, t_d0, du, -BIG, BIG, t_end, 20000)
    du_ss = du * k_a / (1 + k_a)
    closed = du_ss * (1 - np.exp(-zeta * wn * r.t) * (np.cos(wd * r.t)
                                                      + zeta / math.sqrt(1 - zeta**2) * np.sin(wd * r.t)))
    assert np.allclose(r.u - 1.0, closed, rtol=0, atol=1e-8 * du_ss / 0.05)
    _, y_scipy = step(lti([k_a * du], [t_a * t_d0, t_a + t_d0, 1 + k_a]), T=r.t)
    assert np.allclose(r.u - 1.0, y_scipy, rtol=0, atol=1e-6)
    rise, over, settle = ex.step_metrics(r.t, r.u, 1.0, r.u_final)
    assert over == pytest.approx(100 * math.exp(-zeta * math.pi / math.sqrt(1 - zeta**2)), abs=0.01)
    # rise and settling times of the closed form, found on a 1e6-point grid
    tf = np.linspace(0, t_end, 1_000_001)
    yf = 1 - np.exp(-zeta * wn * tf) * (np.cos(wd * tf) + zeta / math.sqrt(1 - zeta**2) * np.sin(wd * tf))
    t10, t90 = tf[np.argmax(yf >= 0.1)], tf[np.argmax(yf >= 0.9)]
    t_set = tf[np.nonzero(np.abs(yf - 1) > 0.02)[0][-1]]
    dt = r.t[1] - r.t[0]
    assert rise == pytest.approx(t90 - t10, abs=dt)
    assert settle == pytest.approx(t_set, abs=dt)


def test_ceiling_limits_the_forcing() -> None:
    # property: with a low ceiling the exciter output never exceeds it and the field
    # current rises at (e_max - i)/T'_d0 at first (the field block alone); slower response
    k_a, t_d0, e_max = 200.0, 6.0, 3.0
    lim = ex.regulator_step_response(lambda i: i, 1.0, k_a, 0.0, t_d0, 0.05, -BIG, e_max, 1.0, 4000)
    free = ex.regulator_step_response(lambda i: i, 1.0, k_a, 0.0, t_d0, 0.05, -BIG, BIG, 1.0, 4000)
    assert lim.e_fd.max() <= e_max + 1e-12
    dt = lim.t[1]
    assert (lim.u[1] - lim.u[0]) / dt == pytest.approx((e_max - 1.0) / t_d0, rel=1e-3)
    assert ex.step_metrics(lim.t, lim.u, 1.0, lim.u_final)[0] > ex.step_metrics(free.t, free.u, 1.0,
                                                                                 free.u_final)[0]


def test_demo_response_metrics_and_checks() -> None:
    r = run()
    o = r.outputs
    assert 0.0 < o["voltage_rise_time"] < o["voltage_settling_time"]
    assert o["voltage_overshoot"] >= 0.0
    # a proportional regulator leaves an error: final voltage below 1 + du_ref
    step_chart = r.charts["step_response"]
    assert max(step_chart.series[0].y) < 1.05 + 0.05 * o["voltage_overshoot"] / 100 + 1e-9
    assert {c.id: verdict(c.id, r) for c in ex.SPEC.checks} == {
        "ceiling_margin": "meets", "firing_window": "meets", "transformer_loading": "meets",
        "rise_time": "meets", "overshoot": "meets", "settling_time": "meets"}
    # a sluggish regulator fails the rise-time limit
    slow = run(avr_gain=5.0)
    assert verdict("rise_time", slow) == "fails"
    # a grossly oversized transformer leaves the rated point at a large firing angle
    big = run(excitation_transformer_secondary_voltage=700.0, excitation_transformer_rating=1200.0)
    assert verdict("firing_window", big) == "fails"
    # a smaller transformer is overloaded
    assert verdict("transformer_loading", run(excitation_transformer_rating=350.0)) == "fails"


# ---------------------------------------------------------------------------
# compute() end to end, conflicts and warnings
# ---------------------------------------------------------------------------


def test_compute_returns_every_declared_output_chart_and_table() -> None:
    r = run()
    assert set(r.outputs) == set(ex.SPEC.output_names)
    assert all(isinstance(x, float) and math.isfinite(x) for x in r.outputs.values())
    assert set(r.charts) == {f.name for f in ex.SPEC.figures}
    assert set(r.tables) == {t.name for t in ex.SPEC.tables}
    assert {s.output for s in ex.SPEC.steps} == set(ex.SPEC.output_names)
    assert r.warnings == []
    # the field-current figure ends at the rated point, both methods
    fq = r.charts["field_current_vs_q"]
    assert fq.series[0].y[-1] == pytest.approx(r.outputs["potier_field_current"], rel=1e-9)
    assert fq.series[1].y[-1] == pytest.approx(r.outputs["saturation_allowance_field_current"], rel=1e-9)
    assert fq.series[0].x[-1] == pytest.approx(15.625 * 0.6, rel=1e-9)
    # field current grows with lagging reactive power (more excitation, over-excited)
    assert np.all(np.diff(fq.series[0].y) > 0)
    # leading end: the practical stability limit, round rotor: sqrt(0.9^2 - 0.8^2) - 1/2.05
    assert fq.series[0].x[0] == pytest.approx(15.625 * (math.sqrt(0.9**2 - 0.8**2) - 1 / 2.05), rel=1e-9)


def test_input_conflicts_and_warnings() -> None:
    short = BASE["open_circuit_characteristic"][:7]  # type: ignore[index]
    with pytest.raises(InputConflict, match="reach only 11.95 kV; the Potier EMF"):
        run(open_circuit_characteristic=short)
    # I_fg = 2 A, I_fk = 1.7 A -> x_du = 0.85 pu, below x_p = 0.9 pu
    pts = ((0, 0), (1.0, 0.1), (2.0, 0.2), (3.0, 0.25), (5.0, 0.3), (9.0, 0.36))
    with pytest.raises(InputConflict, match="not below the unsaturated x_d") as exc:
        run(generator_voltage=0.2, open_circuit_characteristic=pts, short_circuit_field_current=1.7,
            potier_reactance=0.9)
    assert exc.value.key == "potier_reactance"
    with pytest.raises(InputConflict, match="above the air-gap line") as exc:
        run(air_gap_slope=0.02)
    assert exc.value.key == "air_gap_slope"
    assert any("salient-pole" in w for w in run(rotor_type="salient").warnings)
    assert any("1/SCR" in w for w in run(direct_axis_reactance=1.2).warnings)


def test_module_import_is_light() -> None:
    code = ("import sys, basisbook.calcs.excitation; "
            "bad = [m for m in ('matplotlib', 'pint', 'scipy', 'CoolProp') if m in sys.modules]; "
            "assert not bad, bad")
    subprocess.run([sys.executable, "-c", code], check=True)


# ---------------------------------------------------------------------------
# Bad input through the CLI: exit 2, file:line [instance.key] message
# ---------------------------------------------------------------------------

EXC = "inputs/excitation.toml"
OCC_EXC1 = ("  [0, 0.12], [100, 3.75], [200, 7.30], [260, 9.25], [300, 10.30],\n"
            "  [340, 11.10], [400, 11.95], [480, 12.75], [560, 13.30], [650, 13.75],\n")


def _first_line(root: Path, rel: str, needle: str) -> int:
    for n, line in enumerate((root / rel).read_text(encoding="utf-8").splitlines(), start=1):
        if needle in line:
            return n
    raise AssertionError(needle)


BAD_CASES = [
    ("non-monotonic", OCC_EXC1, OCC_EXC1.replace("[300, 10.30]", "[300, 9.10]"),
     r"\[exc1\.open_circuit_characteristic\] non-monotonic: row 5 \(300 A, 9\.1 kV\)", "open_circuit_characteristic ="),
    ("too-few-points", OCC_EXC1, "  [0, 0.12], [100, 3.75], [300, 10.30],\n",
     r"\[exc1\.open_circuit_characteristic\] expected at least 4 rows", "open_circuit_characteristic ="),
    ("occ-too-low", OCC_EXC1, "  [0, 0.12], [100, 3.75], [200, 7.30], [260, 9.25], [300, 10.30], [340, 11.10],\n",
     r"\[exc1\.open_circuit_characteristic\] the points reach only 11\.1 kV", "open_circuit_characteristic ="),
    ("short-circuit-point-missing", 'short_circuit_field_current = "700 A"\n', "",
     r"\[exc1\.short_circuit_field_current\] missing input: expected field current giving rated armature current",
     None),
    ("firing-angle-beyond-bridge", 'avr_gain = 200\n', 'avr_gain = 200\nminimum_firing_angle = "95 deg"\n',
     r"\[exc1\.minimum_firing_angle\] out of range: 95 deg given, allowed \[0, 90\) deg", "minimum_firing_angle"),
    # hand check: b = 1.35047 cos 10 deg = 1.32995, a = (3/pi) 0.06 * 2020 / 450e3 = 2.572e-4;
    # U = 2 * 274.5 / (b + sqrt(b^2 - 4 a 274.5)) = 215.4 V
    ("ceiling-unreachable", 'excitation_transformer_secondary_voltage = "250 V"',
     'excitation_transformer_secondary_voltage = "180 V"',
     r"\[exc1\.excitation_transformer_secondary_voltage\] 180 V cannot reach the ceiling: .* at least 215\.4 V",
     'excitation_transformer_secondary_voltage = "180 V"'),
]


@pytest.mark.parametrize("case", BAD_CASES, ids=[c[0] for c in BAD_CASES])
def test_bad_input_exit_2(case: tuple, demo_copy: Path, tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    _id, old, new, pattern, needle = case
    p = demo_copy / EXC
    text = p.read_text(encoding="utf-8")
    assert old in text, old
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    site = tmp_path / "site"
    code = main(["build", str(demo_copy), "--out", str(site)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    assert re.search(pattern, err), err
    if needle is not None:
        assert f"{EXC}:{_first_line(demo_copy, EXC, needle)}:" in err, err
    else:
        assert EXC in err
    assert not site.exists()


# --- found by the property tests (tests/test_properties.py) --------------------------------


def test_a_regulator_lag_below_a_millisecond_is_refused() -> None:
    # 2e-309 s made the linearised poles infinite (numpy LinAlgError) before
    with pytest.raises(InputConflict, match="below 1 ms; give 0 for an ideal"):
        run(avr_time_constant=2e-309)
    assert math.isfinite(run(avr_time_constant=0.0).outputs["voltage_rise_time"])
