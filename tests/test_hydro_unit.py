"""Tests of calcs/hydro_unit.py against published values and independent computations.
Each check names its source beside it."""

from __future__ import annotations

import math
import re
from pathlib import Path

import basisbook.calcs.hydro_unit as hy
import pytest
from scipy.optimize import brentq

from basisbook.commands.cli import main
from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Result, Values

# The demo's weir unit (invented numbers, as in project/inputs/chp_and_plant.toml).
FDC = ((0, 60), (5, 40), (10, 30), (20, 21), (30, 16), (40, 13), (50, 10.5), (60, 8.5), (70, 6.8),
       (80, 5.2), (90, 3.6), (95, 2.8), (100, 1.5))
BASE = {
    "hydro_design_flow": 14.0,
    "gross_head": 7.5,
    "water_temperature": 10.0,
    "penstock_loss_basis": "roughness",
    "penstock_head_loss_given": 0.0,
    "penstock_length": 35.0,
    "penstock_diameter": 2.6,
    "penstock_friction_factor_given": 0.0,
    "penstock_roughness": 0.1,
    "penstock_minor_loss_coefficient": 0.8,
    "hydro_turbine_efficiency": 0.90,
    "mechanical_efficiency": 0.98,
    "generator_efficiency": 0.96,
    "hydro_transformer_efficiency": 0.99,
    "flow_duration_curve": FDC,
    "minimum_turbine_flow_fraction": 0.20,
    "hydro_availability": 0.95,
}


def run(**changes) -> Result:
    return hy.compute(Values({**BASE, **changes}))


def test_hydraulic_power_identity() -> None:
    # P = rho g Q H (IEC 60041), standard gravity 9.80665 m/s2 (CGPM 1901): exact
    assert hy.hydraulic_power(1000.0, 1.0, 100.0) == pytest.approx(980.665, abs=1e-9)


def test_water_properties_at_10_degC() -> None:
    # White, Fluid Mechanics 7th ed., Table A.1 (from memory): rho = 999.7 kg/m3, nu = 1.307e-6 m2/s at 10 degC;
    # 4 digits -> +-0.1 kg/m3 and +-0.003 mm2/s.
    rho, nu = hy.water_properties(10.0)
    assert rho == pytest.approx(999.7, abs=0.1)
    assert nu == pytest.approx(1.307, abs=0.003)


@pytest.mark.parametrize("re_", [1e4, 1e5, 1e6, 1e7, 1e8])
@pytest.mark.parametrize("rr", [0.0, 1e-5, 1e-4, 1e-3, 1e-2])
def test_swamee_jain_against_colebrook(re_: float, rr: float) -> None:
    # Swamee & Jain 1976 (as recalled): within about 1 % of Colebrook over most of this range, about 2 % at
    # the corner Re = 1e4, eps/D = 1e-2; the Colebrook root is found independently with scipy's brentq
    # (a general-purpose library); 2.5 % allowed.
    def g(inv: float) -> float:
        return inv + 2.0 * math.log10(rr / 3.7 + 2.51 * inv / re_)
    inv = brentq(g, 1.0, 100.0, xtol=1e-14)
    f_cb = 1.0 / inv**2
    assert hy.colebrook(re_, rr) == pytest.approx(f_cb, rel=1e-9)
    assert hy.swamee_jain(re_, rr) == pytest.approx(f_cb, rel=0.025)


def test_moody_chart_values() -> None:
    # Moody chart / White 7th ed. Fig. 6.13 (from memory): smooth pipe f = 0.0180 at Re = 1e5;
    # fully rough eps/D = 0.001: f = 0.0196. Read to 3 digits -> +-0.0003.
    assert hy.swamee_jain(1e5, 0.0) == pytest.approx(0.0180, abs=0.0003)
    assert hy.colebrook(1e8, 0.001) == pytest.approx(0.0196, abs=0.0003)
    with pytest.raises(ValueError, match="turbulent"):
        hy.swamee_jain(2000.0, 0.0)


def test_darcy_weisbach_hand_case() -> None:
    # h_f = f L/D v^2/(2 g): f = 0.02, L = 100 m, D = 0.5 m, v = 2 m/s -> 0.02 * 200 * 4 / 19.6133 = 0.81577 m
    assert hy.darcy_weisbach(0.02, 100.0, 0.5, 2.0) == pytest.approx(0.8 * 2.0 / 1.961330, rel=1e-6)


def test_chain_step_by_step() -> None:
    r = run().outputs
    v = 4 * 14.0 / (math.pi * 2.6**2)
    assert r["penstock_velocity"] == pytest.approx(v)
    f = hy.swamee_jain(r["penstock_reynolds_number"], 0.1e-3 / 2.6)
    assert r["penstock_head_loss"] == pytest.approx((f * 35 / 2.6 + 0.8) * v * v / (2 * 9.80665))
    assert r["net_head"] == pytest.approx(7.5 - r["penstock_head_loss"])
    p_net = r["water_density"] * 9.80665 * 14.0 * r["net_head"] / 1e3
    assert r["net_hydraulic_power"] == pytest.approx(p_net)
    # the chain product (issue 5): grid = hydraulic x eta_T x eta_m x eta_G x eta_tr
    assert r["hydro_grid_output"] == pytest.approx(p_net * 0.90 * 0.98 * 0.96 * 0.99)
    assert r["water_to_wire_efficiency"] == pytest.approx(r["hydraulic_efficiency"] * 0.90 * 0.98 * 0.96 * 0.99)
    table = run().tables["efficiency_chain"]
    assert table.rows[-1][2] == pytest.approx(r["hydro_grid_output"])
    flow = run().charts["energy_flow"]
    assert sum(v for _, v in flow.inflows) == pytest.approx(sum(v for _, v, _k in flow.outflows))


def test_demo_plausibility() -> None:
    # Common practice, no source: a large generator is about 97 % efficient (a sub-MW one a little less),
    # and a hydro plant's water-to-wire efficiency sits in the 70s to 80s of percent.
    assert 0.95 <= BASE["generator_efficiency"] <= 0.98
    assert 0.70 <= run().outputs["water_to_wire_efficiency"] < 0.90


def test_head_loss_bases() -> None:
    given = run(penstock_loss_basis="head_loss", penstock_head_loss_given=0.5).outputs
    assert given["net_head"] == pytest.approx(7.0)
    ff = run(penstock_loss_basis="friction_factor", penstock_friction_factor_given=0.012,
             penstock_minor_loss_coefficient=0.0).outputs
    assert ff["penstock_head_loss"] == pytest.approx(hy.darcy_weisbach(0.012, 35.0, 2.6, ff["penstock_velocity"]))


def test_annual_energy_limits() -> None:
    p = run().outputs["hydro_grid_output"]
    # river always above design flow: the unit runs flat out for 8760 h x availability
    full = run(flow_duration_curve=((0, 50.0), (100, 20.0))).outputs
    assert full["hydro_annual_energy"] == pytest.approx(p * 8760 * 0.95 / 1e3)
    assert full["hydro_capacity_factor"] == pytest.approx(0.95)
    # river always below the minimum turbine flow: nothing
    none = run(flow_duration_curve=((0, 2.0), (100, 1.0))).outputs
    assert none["hydro_annual_energy"] == 0.0
    # no curve: 0 with a warning
    r = run(flow_duration_curve=())
    assert r.outputs["hydro_annual_energy"] == 0.0 and any("flow-duration" in w for w in r.warnings)


def test_annual_energy_trapezoid_on_a_linear_curve() -> None:
    # no losses, no minimum: P linear in Q, so the mean power is P at the mean flow (trapezoid exact)
    def p(q: float) -> float:
        return 100.0 * q
    e = hy.annual_energy(((0, 10.0), (100, 0.0)), p, 20.0, 0.0, 1.0)
    assert e == pytest.approx(100.0 * 5.0 * 8760 / 1e3)


def test_conflicts() -> None:
    with pytest.raises(InputConflict, match="not below the gross head"):
        run(penstock_loss_basis="head_loss", penstock_head_loss_given=7.5)
    with pytest.raises(InputConflict, match="diameter is needed"):
        run(penstock_diameter=0.0)
    with pytest.raises(InputConflict, match="no friction factor is given"):
        run(penstock_loss_basis="friction_factor")


def test_checks() -> None:
    r = run(penstock_diameter=1.8).outputs  # v = 5.5 m/s: big loss
    assert r["penstock_velocity"] > 5.0 and r["hydraulic_efficiency"] < 0.90


def test_bad_input_exit_2(demo_copy: Path, capsys) -> None:
    rel = "inputs/chp_and_plant.toml"
    p = demo_copy / rel
    p.write_text(p.read_text(encoding="utf-8").replace('penstock_diameter = "2.6 m"', 'penstock_diameter = "0.6 m"'),
                 encoding="utf-8")
    line = next(n for n, s in enumerate(p.read_text(encoding="utf-8").splitlines(), start=1) if '"0.6 m"' in s)
    code = main(["check", str(demo_copy)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert f"{rel}:{line}:" in err
    assert re.search(r"\[hydro1\.penstock_diameter\] the penstock head loss \d+\.\d+ m is not below the gross head 7\.5 m", err), err


# --- found by the property tests (tests/test_properties.py) --------------------------------


def test_a_penstock_losing_over_a_third_of_the_head_is_warned() -> None:
    # P ~ q (H - h_f (q/q_d)^2) peaks where H = 3 h_f (q/q_d)^2; past a loss of H/3 the design
    # flow gives less power than a smaller one (the capacity factor can then exceed 1)
    r = run(penstock_loss_basis="head_loss", penstock_head_loss_given=0.5 * BASE["gross_head"])
    assert any("more than a third of the gross head" in w for w in r.warnings)
    r = run(penstock_loss_basis="head_loss", penstock_head_loss_given=0.3 * BASE["gross_head"])
    assert not any("third of the gross head" in w for w in r.warnings)


def test_a_penstock_diameter_in_the_wrong_unit_is_refused() -> None:
    # 4e-120 m overflowed the velocity (OverflowError) before
    with pytest.raises(InputConflict, match="penstock diameter 4e-120 m is below 50 mm"):
        run(penstock_diameter=4e-120)
