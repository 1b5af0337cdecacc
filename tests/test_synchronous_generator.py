"""Tests of calcs/synchronous_generator.py against published values and
independent computations.  Each check names its source beside it."""

from __future__ import annotations

import cmath
import math
import subprocess
import sys

import basisbook.calcs.synchronous_generator as sg
import numpy as np
import pytest
from scipy.optimize import brentq, minimize_scalar

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Result, Values, evaluate_check

# A 10 MW, 11 kV, 50 Hz, 4-pole turbine generator; invented numbers for the tests only.
BASE = {
    "generator_active_power": 10.0,
    "generator_power_factor": 0.8,
    "generator_voltage": 11.0,
    "rated_frequency": 50.0,
    "prime_mover_speed": 1500.0,
    "prime_mover_rating": 10.5,
    "rotor_type": "cylindrical",
    "direct_axis_reactance": 2.0,
    "quadrature_axis_reactance": 0.0,
    "armature_resistance": 0.0,
    "turns_per_phase": 24.0,
    "winding_factor": 0.92,
    "stability_margin": 0.10,
    "load_angle_limit": 70.0,
}


def run(**changes: float | str) -> Result:
    return sg.compute(Values({**BASE, **changes}))


def check(check_id: str, result: Result, **changes: float | str) -> str:
    """Verdict the engine would give, limits looked up among inputs and outputs."""
    c = next(c for c in sg.SPEC.checks if c.id == check_id)
    known = {**BASE, **changes, **result.outputs}
    limit = known[c.limit] if isinstance(c.limit, str) else c.limit
    return evaluate_check(c, float(result.outputs[c.value]), float(limit)).verdict


# ---------------------------------------------------------------------------
# Speed, poles, period
# ---------------------------------------------------------------------------

# n = 120 f / p: the synchronous-speed table printed in every machines text
# (e.g. Chapman, Electric Machinery Fundamentals, 5th ed., §4.2, from memory); exact.
SPEED_TABLE = [(2, 3000, 3600), (4, 1500, 1800), (6, 1000, 1200),
               (8, 750, 900), (10, 600, 720), (12, 500, 600)]


@pytest.mark.parametrize(("poles", "n50", "n60"), SPEED_TABLE)
def test_synchronous_speed_table(poles: int, n50: int, n60: int) -> None:
    assert sg.synchronous_speed(50.0, poles) == pytest.approx(n50, abs=1e-9)
    assert sg.synchronous_speed(60.0, poles) == pytest.approx(n60, abs=1e-9)
    # the inverse recovers the pole count from the speed
    assert sg.pole_count_for_speed(50.0, n50) == poles
    assert sg.pole_count_for_speed(60.0, n60) == poles


def test_pole_count_rejects_odd_poles() -> None:
    with pytest.raises(ValueError, match="even number"):
        sg.synchronous_speed(50.0, 3)


def test_pole_count_nearest_even_and_at_least_two() -> None:
    # independent arithmetic: 428.6 rpm hydro set at 50 Hz -> 3000/428.6 = 7.0 -> 14 poles
    assert sg.pole_count_for_speed(50.0, 428.6) == 14
    # a 6000 rpm shaft cannot be matched at 50 Hz; the count stays at the physical minimum
    assert sg.pole_count_for_speed(50.0, 6000.0) == 2


def test_period_and_phase_displacement() -> None:
    # common practice, no source: T = 20 ms at 50 Hz, 16.67 ms at 60 Hz (4 digits -> +-0.005 ms)
    assert sg.electrical_period_ms(50.0) == pytest.approx(20.0, abs=1e-12)
    assert sg.electrical_period_ms(60.0) == pytest.approx(16.67, abs=0.005)
    # 120 deg = one third of a period: 6.667 ms at 50 Hz (4 digits -> +-0.0005 ms)
    t, alpha = sg.phase_displacement(50.0, 1)
    assert t == pytest.approx(6.667, abs=5e-4)
    assert alpha == pytest.approx(120.0)
    # 4-pole machine: 120 electrical deg = 60 mechanical deg (theta_e = p theta_m,
    # Chapman 5th ed. ch. 3, from memory); exact
    assert sg.phase_displacement(50.0, 2)[1] == pytest.approx(60.0, abs=1e-12)
    assert sg.phase_displacement(60.0, 2)[0] == pytest.approx(1000.0 / 180.0, abs=1e-12)


# ---------------------------------------------------------------------------
# Rating
# ---------------------------------------------------------------------------


def test_apparent_power_and_current() -> None:
    # independent arithmetic: 10 MW / 0.8 = 12.5 MVA; 12.5e6 / (sqrt(3) 11e3) = 656.08 A
    assert sg.apparent_power(10.0, 0.8) == pytest.approx(12.5, rel=1e-12)
    assert sg.rated_current(12.5, 11.0) == pytest.approx(656.08, abs=0.005)
    # Chapman 5th ed. Example 4-2 (from memory): 1200 A line current at 480 V -> 997.7 kVA
    assert sg.rated_current(math.sqrt(3) * 480 * 1200 / 1e6, 0.48) == pytest.approx(1200.0)


def test_apparent_power_rejects_zero_power_factor() -> None:
    with pytest.raises(ValueError, match="power factor"):
        sg.apparent_power(10.0, 0.0)


# ---------------------------------------------------------------------------
# EMF equation
# ---------------------------------------------------------------------------


def test_emf_equation_textbook_example() -> None:
    # B. L. Theraja, A Textbook of Electrical Technology Vol. II, alternators chapter,
    # worked example (from memory): 16 poles, 144 slots, 10 conductors/slot, star,
    # Phi = 0.03 Wb, 375 rpm -> f = 50 Hz; 480 conductors = 240 turns per phase;
    # k_d ~ 0.96, full pitch; E_ph ~ 1534 V, E_line ~ 2658 V.
    assert sg.synchronous_speed(50.0, 16) == pytest.approx(375.0)
    # independent check of the book's k_d: 9 slots/pole, 3 slots/pole/phase, 20 deg slot pitch
    k_d = math.sin(math.radians(3 * 20 / 2)) / (3 * math.sin(math.radians(20 / 2)))
    assert k_d == pytest.approx(0.96, abs=0.005)  # the book prints 2 digits
    e_ph = sg.induced_emf(50.0, 240, 0.03, 0.96)
    # the book uses 4.44 for sqrt(2) pi = 4.4429 (0.065 % low) and prints 4 digits:
    # allow 0.2 %
    assert e_ph == pytest.approx(1534.0, rel=2e-3)
    assert math.sqrt(3) * e_ph == pytest.approx(2658.0, rel=2e-3)


def test_flux_per_pole_inverts_emf_equation() -> None:
    # independent identity: flux needed for an EMF reproduces that EMF
    phi = sg.flux_per_pole_for_emf(6350.85, 50.0, 24, 0.92)
    assert sg.induced_emf(50.0, 24, phi, 0.92) == pytest.approx(6350.85, rel=1e-12)


# ---------------------------------------------------------------------------
# Phasor diagram, cylindrical rotor
# ---------------------------------------------------------------------------


def test_internal_emf_textbook_example() -> None:
    # S. J. Chapman, Electric Machinery Fundamentals, 5th ed., Example 4-2 (4th ed.
    # Example 5-2), from memory: 480 V, 60 Hz, delta, 4 poles, X_s = 0.1 ohm,
    # R_A = 0.015 ohm, 1200 A at 0.8 pf lagging -> E_A = 532 /_ 5.3 deg V per phase.
    # Hand check: I_A = 692.8 A; 480 + 10.39/_-36.87 + 69.28/_53.13
    #           = 529.88 + j49.19 -> 532.2 V, 5.30 deg.
    e, delta = sg.internal_emf_cylindrical(480.0, 1200 / math.sqrt(3), 0.8, 0.1, 0.015)
    assert e == pytest.approx(532.0, abs=0.5)     # book gives 3 digits
    assert delta == pytest.approx(5.3, abs=0.05)  # book gives 2 digits
    assert sg.synchronous_speed(60.0, 4) == pytest.approx(1800.0)


def test_limiting_cases_cylindrical() -> None:
    # zero reactance and resistance: E = V, delta = 0 (exact)
    assert sg.internal_emf_cylindrical(1.0, 1.0, 0.8, 0.0) == pytest.approx((1.0, 0.0), abs=1e-15)
    # unity pf: right triangle, E = sqrt(1 + x^2), delta = atan(x) (independent geometry)
    e, d = sg.internal_emf_cylindrical(1.0, 1.0, 1.0, 1.5)
    assert e == pytest.approx(math.hypot(1.0, 1.5), rel=1e-12)
    assert d == pytest.approx(math.degrees(math.atan(1.5)), rel=1e-12)


def test_emf_rises_as_power_factor_drops_lagging() -> None:
    # property (Chapman 5th ed. §4.7, from memory: lagging loads need more excitation)
    pfs = np.linspace(1.0, 0.1, 19)
    lag = [sg.internal_emf_cylindrical(1.0, 1.0, pf, 1.8, 0.005)[0] for pf in pfs]
    lead = [sg.internal_emf_cylindrical(1.0, 1.0, pf, 1.8, 0.005, lagging=False)[0] for pf in pfs]
    assert np.all(np.diff(lag) > 0)
    assert np.all(np.diff(lead) < 0)


# ---------------------------------------------------------------------------
# Two-reaction method, salient pole
# ---------------------------------------------------------------------------

SALIENT_CASES = [(0.8, 1.1, 0.7, True), (0.9, 1.0, 0.65, True), (0.5, 1.2, 0.8, True),
                 (1.0, 0.9, 0.6, True), (0.95, 1.1, 0.7, False)]


@pytest.mark.parametrize(("pf", "x_d", "x_q", "lagging"), SALIENT_CASES)
def test_two_reaction_power_matches_terminal_power(pf: float, x_d: float, x_q: float,
                                                   lagging: bool) -> None:
    # independent identity: with r_a = 0 the power-angle equations at (E_0, delta)
    # must return the terminal power V I cos(phi) and V I sin(phi) (V = I = 1 pu)
    r = sg.internal_emf_salient(1.0, 1.0, pf, x_d, x_q, lagging=lagging)
    p, q = sg.two_reaction_power(r.emf, r.load_angle, 1.0, x_d, x_q)
    sin_phi = math.sqrt(1 - pf * pf) * (1 if lagging else -1)
    assert p == pytest.approx(pf, abs=1e-12)
    assert q == pytest.approx(sin_phi, abs=1e-12)


def test_two_reaction_phasor_equation_with_resistance() -> None:
    # independent decomposition: split I into d and q parts about the returned rotor
    # axis and rebuild V + r_a I + j x_d I_d + j x_q I_q; it must equal E_0 on the q-axis
    # (Kundur 1994 §3.6, from memory)
    v, pf, x_d, x_q, r_a = 1.0, 0.85, 1.05, 0.68, 0.01
    r = sg.internal_emf_salient(v, 1.0, pf, x_d, x_q, r_a)
    i = cmath.rect(1.0, -math.acos(pf))
    q_axis = cmath.rect(1.0, math.radians(r.load_angle))
    i_q = (i * q_axis.conjugate()).real * q_axis
    i_d = i - i_q
    e = v + r_a * i + 1j * x_d * i_d + 1j * x_q * i_q
    assert abs(e - r.emf * q_axis) < 1e-12


def test_salient_equals_cylindrical_when_xq_equals_xd() -> None:
    # limiting case: no saliency -> two-reaction result = cylindrical result (exact)
    r = sg.internal_emf_salient(1.0, 1.0, 0.8, 1.7, 1.7, 0.004)
    e, d = sg.internal_emf_cylindrical(1.0, 1.0, 0.8, 1.7, 0.004)
    assert (r.emf, r.load_angle) == pytest.approx((e, d), rel=1e-12)


# ---------------------------------------------------------------------------
# Capability chart
# ---------------------------------------------------------------------------


def test_field_limit_cylindrical_circle() -> None:
    # Kundur 1994 §5.4 (from memory): field limit is a circle of radius V E/x_d centred
    # at Q = -V^2/x_d; crosses P = 0 at Q = (V E - V^2)/x_d.  Independent closed form.
    e, x_d = 2.72, 2.0
    assert sg.field_limit_q(0.0, e, x_d, x_d) == pytest.approx((e - 1) / x_d, abs=1e-12)
    for p in (0.2, 0.5, 0.8, 1.2):
        q = -1 / x_d + math.sqrt((e / x_d) ** 2 - p * p)
        assert sg.field_limit_q(p, e, x_d, x_d) == pytest.approx(q, abs=1e-12)
    # beyond the peak of the power-angle curve that excitation cannot carry the load
    assert math.isnan(sg.field_limit_q(e / x_d + 0.01, e, x_d, x_d))


@pytest.mark.parametrize(("x_d", "x_q"), [(2.0, 2.0), (1.1, 0.7)])
def test_rated_point_on_stator_and_field_limits(x_d: float, x_q: float) -> None:
    # by construction (Kundur 1994 §5.4): the rated point is where the stator circle
    # |S| = 1 pu and the rated-excitation field curve meet
    pf = 0.8
    e0 = sg.internal_emf_salient(1.0, 1.0, pf, x_d, x_q).emf
    lim = sg.capability_limits(pf, e0, x_d, x_q, 0.1)
    assert lim.stator_lagging == pytest.approx(0.6, abs=1e-12)
    assert lim.field == pytest.approx(0.6, abs=1e-9)
    assert lim.q_max == pytest.approx(0.6, abs=1e-9)


def test_practical_stability_cylindrical_closed_form() -> None:
    # Classical construction (common practice, no source): E circle of radius
    # E/x_d = P + m, at height P -> Q = sqrt((P + m)^2 - P^2) - 1/x_d.
    x_d, m = 2.0, 0.1
    for p in (0.0, 0.3, 0.7, 1.0):
        q = math.sqrt((p + m) ** 2 - p * p) - 1 / x_d
        assert sg.practical_stability_q(p, m, x_d, x_d) == pytest.approx(q, abs=1e-12)
    # theoretical limit of a round rotor: delta = 90 deg, P_max = V E / x_d
    assert sg.stability_limit_angle(2.5, 1.0, x_d, x_d) == 90.0
    assert sg.maximum_power(2.5, 1.0, x_d, x_d) == pytest.approx(1.25, abs=1e-15)


@pytest.mark.parametrize("e", [0.0, 0.5, 1.3, 2.0])
def test_salient_stability_limit_against_scipy(e: float) -> None:
    # independent: maximise the power-angle curve numerically with scipy
    x_d, x_q = 1.1, 0.7

    def neg_p(d: float) -> float:
        return -sg.two_reaction_power(e, d, 1.0, x_d, x_q)[0]

    opt = minimize_scalar(neg_p, bounds=(0.0, 90.0), method="bounded",
                          options={"xatol": 1e-10})
    assert sg.stability_limit_angle(e, 1.0, x_d, x_q) == pytest.approx(opt.x, abs=1e-4)
    assert sg.maximum_power(e, 1.0, x_d, x_q) == pytest.approx(-opt.fun, abs=1e-12)


def test_salient_reluctance_peak_at_45_degrees() -> None:
    # zero excitation: P = V^2/2 (1/x_q - 1/x_d) sin 2d peaks at 45 deg (Chapman 5th ed.
    # App. C, from memory); exact
    assert sg.stability_limit_angle(0.0, 1.0, 1.1, 0.7) == pytest.approx(45.0, abs=1e-12)
    assert sg.maximum_power(0.0, 1.0, 1.1, 0.7) == pytest.approx(0.5 * (1 / 0.7 - 1 / 1.1), rel=1e-12)


@pytest.mark.parametrize(("x_d", "x_q"), [(2.0, 2.0), (1.1, 0.7), (1.8, 1.7)])
def test_practical_limit_is_margin_below_theoretical(x_d: float, x_q: float) -> None:
    # For an excitation E, the practical point lies on the same E curve at
    # P = P_max(E) - m (construction: common practice, no source).  Independent: scipy
    # finds P_max and the angle where P(d) = P_max - m, then Q(d) is compared.
    m = 0.1
    for e in (1.5, 2.0, 2.8):
        neg = minimize_scalar(lambda d, e=e: -sg.two_reaction_power(e, d, 1.0, x_d, x_q)[0],
                              bounds=(0.0, 90.0), method="bounded", options={"xatol": 1e-10})
        p_max, d_max = -neg.fun, neg.x
        target = p_max - m
        d = brentq(lambda d, e=e, t=target: sg.two_reaction_power(e, d, 1.0, x_d, x_q)[0] - t,
                   0.0, d_max, xtol=1e-13)
        q_expected = sg.two_reaction_power(e, d, 1.0, x_d, x_q)[1]
        assert sg.practical_stability_q(target, m, x_d, x_q) == pytest.approx(q_expected, abs=1e-7)
        # and it is less under-excited than the theoretical limit at the same P
        q_theo = sg.two_reaction_power(e, d_max, 1.0, x_d, x_q)[1]
        assert q_expected > q_theo


# ---------------------------------------------------------------------------
# compute() end to end
# ---------------------------------------------------------------------------


def test_compute_returns_every_declared_output_and_chart() -> None:
    r = run()
    assert set(r.outputs) == set(sg.SPEC.output_names)
    assert all(isinstance(x, float) and math.isfinite(x) for x in r.outputs.values())
    assert set(r.charts) == {f.name for f in sg.SPEC.figures}
    assert set(r.tables) == {t.name for t in sg.SPEC.tables}
    assert r.warnings == []
    # every numeric output has a step
    assert {s.output for s in sg.SPEC.steps} == set(sg.SPEC.output_names)


def test_compute_values_cylindrical() -> None:
    r = run().outputs
    # independent arithmetic for the base case
    assert r["generator_apparent_power"] == pytest.approx(12.5)
    assert r["generator_current"] == pytest.approx(656.08, abs=0.005)
    assert r["generator_reactive_power"] == pytest.approx(7.5, rel=1e-12)
    assert (r["pole_count"], r["pole_pairs"], r["synchronous_speed"]) == (4.0, 2.0, 1500.0)
    assert r["speed_deviation"] == 0.0
    assert r["phase_displacement_angle"] == pytest.approx(60.0)
    assert r["phase_voltage"] == pytest.approx(11e3 / math.sqrt(3))
    assert r["flux_per_pole"] == pytest.approx(11e3 / math.sqrt(3) / (4.44288 * 50 * 24 * 0.92), rel=1e-5)
    # phasor by hand: E = 1 + j2 (0.8 - j0.6) = 2.2 + j1.6 -> 2.7203 /_ 36.03 deg
    assert r["internal_emf"] == pytest.approx(math.hypot(2.2, 1.6), rel=1e-12)
    assert r["load_angle"] == pytest.approx(math.degrees(math.atan2(1.6, 2.2)), rel=1e-12)
    assert r["internal_emf_line"] == pytest.approx(11.0 * math.hypot(2.2, 1.6))
    # stability margin for a round rotor: S (E/x_d - m) - P (closed form)
    assert r["stability_limit_margin"] == pytest.approx(12.5 * (math.hypot(2.2, 1.6) / 2 - 0.1) - 10)
    assert r["prime_mover_margin"] == pytest.approx(0.5)


def test_compute_unity_power_factor() -> None:
    r = run(generator_power_factor=1.0).outputs
    assert r["generator_reactive_power"] == 0.0
    assert r["generator_apparent_power"] == 10.0


def test_compute_salient_and_60_hz() -> None:
    r = run(rotor_type="salient", direct_axis_reactance=1.1, quadrature_axis_reactance=0.7,
            rated_frequency=60.0, prime_mover_speed=720.0)
    o = r.outputs
    assert (o["pole_count"], o["synchronous_speed"]) == (10.0, 720.0)
    assert o["effective_quadrature_reactance"] == 0.7
    # the same identity as above: terminal power from the power-angle equations
    p, q = sg.two_reaction_power(o["internal_emf"], o["load_angle"], 1.0, 1.1, 0.7)
    assert (p, q) == pytest.approx((0.8, 0.6), abs=1e-12)
    assert o["electrical_period"] == pytest.approx(16.67, abs=0.005)


def test_chart_and_table_contents() -> None:
    r = run()
    chart = r.charts["capability_chart"]
    assert chart.markers[0].x == pytest.approx(7.5) and chart.markers[0].y == pytest.approx(10.0)
    stator = next(s for s in chart.series if s.label.startswith("Stator"))
    radius = np.hypot(stator.x, stator.y)
    assert np.allclose(radius, 12.5, atol=1e-8)  # stator circle radius = S_r
    field = next(s for s in chart.series if s.label.startswith("Field"))
    # field curve ends at the rated point, starts at Q = S (E - 1)/x_d on P = 0
    assert (field.x[-1], field.y[-1]) == pytest.approx((7.5, 10.0), abs=1e-6)
    assert field.x[0] == pytest.approx(12.5 * (math.hypot(2.2, 1.6) - 1) / 2, abs=1e-6)
    rows = {round(row[0], 6): row for row in r.tables["capability_table"].rows}
    assert rows[10.0][3] == pytest.approx(7.5, abs=1e-6)
    # at P = 0 the leading limit is the practical stability limit: S (m - 1/x_d)
    assert rows[0.0][1] == pytest.approx(12.5 * (0.1 - 0.5), abs=1e-9)
    assert rows[0.0][2] == "stability"


def test_speed_check_verdicts() -> None:
    # 1450 rpm is an induction-machine speed: nearest synchronous speed 1500 rpm, 3.3 % off
    r = run(prime_mover_speed=1450.0)
    assert r.outputs["speed_deviation"] == pytest.approx(100 * 50 / 1500)
    assert check("speed_match", r) == "fails"
    assert check("speed_match", run(prime_mover_speed=1495.5)) == "review"  # 0.3 % (band 0.25-0.5 %)
    assert check("speed_match", run()) == "meets"


def test_other_check_verdicts() -> None:
    r = run()
    assert check("load_angle", r) == "meets"      # 36 deg < 70 deg
    assert check("stability", r) == "meets"
    assert check("prime_mover", r) == "meets"
    assert check("prime_mover", run(prime_mover_rating=9.5)) == "fails"
    # a weak machine at a low pf limit: x_d = 3.5 pu pushes the load angle up
    weak = {"direct_axis_reactance": 3.5, "generator_power_factor": 0.95, "load_angle_limit": 45.0}
    r = run(**weak)
    assert r.outputs["load_angle"] > 45.0
    assert check("load_angle", r, **weak) == "fails"


def test_input_conflicts() -> None:
    with pytest.raises(InputConflict, match="exceeds x_d"):
        run(rotor_type="salient", direct_axis_reactance=1.0, quadrature_axis_reactance=1.2)
    with pytest.raises(InputConflict, match="needs x_q"):
        run(rotor_type="salient", direct_axis_reactance=1.0)


def test_warnings() -> None:
    assert any("neither 50 nor 60" in w for w in run(rated_frequency=55.0,
                                                      prime_mover_speed=1650.0).warnings)
    assert any("ignored" in w for w in run(quadrature_axis_reactance=1.9).warnings)


def test_module_import_is_light() -> None:
    # the module must not pull in plotting or unit libraries (brief: cheap import)
    code = ("import sys, basisbook.calcs.synchronous_generator; "
            "bad = [m for m in ('matplotlib', 'pint', 'scipy', 'sympy') if m in sys.modules]; "
            "assert not bad, bad")
    subprocess.run([sys.executable, "-c", code], check=True)


# --- found by the property tests (tests/test_properties.py) --------------------------------


def test_a_salient_pole_quadrature_reactance_below_0_1_pu_is_refused() -> None:
    with pytest.raises(InputConflict, match=r"x_q = 1e-300 pu is below 0\.1 pu"):
        run(rotor_type="salient", quadrature_axis_reactance=1e-300)


def test_negative_load_angle_with_resistance_and_near_zero_power_factor() -> None:
    # E = V + (r + jx) I with I lagging by phi: Im E = I (x cos phi - r sin phi) < 0 when
    # r sin phi > x cos phi (a physical result; Chapman 5th ed., ch. 4 phasor diagram, from memory)
    e, delta = sg.internal_emf_cylindrical(1.0, 1.0, 0.002, 0.5, 0.01)
    assert delta < 0
    assert math.tan(math.radians(delta)) == pytest.approx(
        (0.5 * 0.002 - 0.01 * math.sqrt(1 - 0.002**2)) / (1 + 0.5 * math.sqrt(1 - 0.002**2) + 0.01 * 0.002),
        rel=1e-12)
