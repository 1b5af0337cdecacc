"""Tests of calcs/gas_turbine.py against published values and independent computations.
Each check names its source beside it."""

from __future__ import annotations

import basisbook.calcs.gas_turbine as gt
import pytest

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Result, Values, evaluate_check

K = 273.15
# The demo's study-option turbine (invented numbers, as in project/inputs/chp_and_plant.toml).
BASE = {
    "gas_turbine_electrical_output": 5.0,
    "compressor_inlet_temperature": 15.0,
    "compressor_inlet_pressure": 1.01325,
    "compressor_pressure_ratio": 14.0,
    "compressor_isentropic_efficiency": 0.86,
    "turbine_inlet_temperature": 1150.0,
    "gas_turbine_isentropic_efficiency": 0.88,
    "combustor_pressure_loss": 3.0,
    "combustion_efficiency": 0.99,
    "gas_turbine_fuel_lhv": 47.1,
    "mechanical_efficiency": 0.985,
    "generator_efficiency": 0.975,
    "air_heat_capacity_ratio": 1.4,
}


def run(**changes) -> Result:
    return gt.compute(Values({**BASE, **changes}))


def test_air_enthalpy_against_ideal_gas_air_table() -> None:
    # Cengel & Boles 8th ed., Table A-17 (from memory): h(300 K) = 300.19, h(400 K) = 400.98 kJ/kg;
    # only differences are comparable (other reference state); 5 digits -> +-0.1 kJ/kg, plus real-gas 0.1.
    dh = gt.air_h(400 - K, 1.01325) - gt.air_h(300 - K, 1.01325)
    assert dh == pytest.approx(400.98 - 300.19, abs=0.2)


def test_cengel_example_9_5_ideal_brayton() -> None:
    # Cengel & Boles, Thermodynamics 8th ed., Example 9-5 (from memory): r = 8, T1 = 300 K, T3 = 1300 K,
    # air tables: T2 = 540 K, T4 = 770 K, back work ratio 0.403, eta = 0.426. 3 printed digits.
    st = gt.brayton_states(300 - K, 1.0, 8.0, 1.0, 1300 - K, 1.0)
    assert st.t2 + K == pytest.approx(540.0, abs=2.0)
    assert st.t4 + K == pytest.approx(770.0, abs=2.0)
    assert (st.h2 - st.h1) / (st.h3 - st.h4) == pytest.approx(0.403, abs=0.002)
    assert gt.air_standard_cycle_efficiency(st) == pytest.approx(0.426, abs=0.002)


def test_cengel_example_9_6_real_brayton() -> None:
    # Cengel & Boles 8th ed., Example 9-6 (from memory): Example 9-5 with eta_C = 0.80, eta_T = 0.85:
    # back work ratio 0.592, eta = 0.266, T4a = 853 K. 3 printed digits.
    st = gt.brayton_states(300 - K, 1.0, 8.0, 0.80, 1300 - K, 0.85)
    assert (st.h2 - st.h1) / (st.h3 - st.h4) == pytest.approx(0.592, abs=0.002)
    assert gt.air_standard_cycle_efficiency(st) == pytest.approx(0.266, abs=0.002)
    assert st.t4 + K == pytest.approx(853.0, abs=2.0)


def test_cold_air_standard_efficiency() -> None:
    # 1 - r^(-(k-1)/k), Cengel & Boles 8th ed. eq. 9-17 (from memory): r = 8, k = 1.4 -> 0.448 (exact to 3 digits)
    assert gt.air_standard_efficiency(8.0) == pytest.approx(0.4480, abs=5e-4)
    assert gt.air_standard_efficiency(1.0) == 0.0


def test_ideal_limit_is_not_beaten() -> None:
    # the ideal cycle (eta_C = eta_T = 1, variable cp) stays below the cold air standard value at r = 8 (Ex. 9-5:
    # 0.426 < 0.448), and every real cycle below that
    r = run().outputs
    assert r["gas_turbine_thermal_efficiency"] < r["air_standard_brayton_efficiency"]
    c = next(c for c in gt.SPEC.checks if c.id == "below_ideal")
    assert evaluate_check(c, r["gas_turbine_thermal_efficiency"], r["air_standard_brayton_efficiency"]).verdict == "meets"
    better = run(compressor_isentropic_efficiency=0.95, gas_turbine_isentropic_efficiency=0.95).outputs
    assert better["gas_turbine_thermal_efficiency"] > r["gas_turbine_thermal_efficiency"]


def test_combustor_and_overall_energy_balance() -> None:
    r = run(combustion_efficiency=1.0).outputs
    f = r["fuel_air_ratio"]
    h_ref = gt.air_h(25.0, 1.01325)
    # combustor: (h2 - h_ref) + f LHV = (1 + f)(h3 - h_ref)
    assert (r["compressor_outlet_enthalpy"] - h_ref) + f * 47.1e3 == pytest.approx(
        (1 + f) * (r["turbine_inlet_enthalpy"] - h_ref))
    # whole machine (first law): w_net = (h1 - h_ref) + f LHV - (1 + f)(h4 - h_ref)
    assert r["gas_turbine_net_specific_work"] == pytest.approx(
        (r["compressor_inlet_enthalpy"] - h_ref) + f * 47.1e3 - (1 + f) * (r["turbine_outlet_enthalpy"] - h_ref))


def test_chain_step_by_step() -> None:
    r = run().outputs
    assert r["compressor_outlet_pressure"] == pytest.approx(14 * 1.01325)
    assert r["turbine_inlet_pressure"] == pytest.approx(14 * 1.01325 * 0.97)
    assert r["compressor_outlet_enthalpy"] == pytest.approx(
        r["compressor_inlet_enthalpy"] + (r["compressor_isentropic_outlet_enthalpy"] - r["compressor_inlet_enthalpy"]) / 0.86)
    assert r["turbine_outlet_enthalpy"] == pytest.approx(
        r["turbine_inlet_enthalpy"] - 0.88 * (r["turbine_inlet_enthalpy"] - r["turbine_isentropic_outlet_enthalpy"]))
    assert r["gas_turbine_electrical_efficiency"] == pytest.approx(0.985 * 0.975 * r["gas_turbine_thermal_efficiency"])
    assert r["gas_turbine_heat_rate"] == pytest.approx(3600 / r["gas_turbine_electrical_efficiency"])
    assert r["gas_turbine_fuel_input"] == pytest.approx(
        r["gas_turbine_fuel_flow"] / 3600 * 47.1)  # MW from kg/h and MJ/kg, on net calorific value
    assert r["gas_turbine_exhaust_flow"] == pytest.approx(r["gas_turbine_air_flow"] * (1 + r["fuel_air_ratio"]))
    flow = run().charts["energy_flow"]
    assert sum(v for _, v in flow.inflows) == pytest.approx(sum(v for _, v, _k in flow.outflows))


def test_demo_plausibility() -> None:
    # Common practice, no source: a 5 MW industrial gas turbine runs at 30-36 % electrical efficiency,
    # 10,000-12,000 kJ/kWh, with a 450-560 degC exhaust and a fuel-air ratio near 0.02.
    r = run().outputs
    assert 0.30 <= r["gas_turbine_electrical_efficiency"] <= 0.36
    assert 10000 <= r["gas_turbine_heat_rate"] <= 12000
    assert 450 <= r["turbine_exhaust_temperature"] <= 560
    assert 0.015 <= r["fuel_air_ratio"] <= 0.025


def test_conflicts() -> None:
    with pytest.raises(InputConflict, match="nothing would drive the turbine"):
        run(compressor_pressure_ratio=1.02)
    with pytest.raises(InputConflict, match="not above the compressor outlet"):
        run(turbine_inlet_temperature=300.0)
    with pytest.raises(InputConflict, match="no net work"):
        run(compressor_pressure_ratio=4.0, turbine_inlet_temperature=400.0, compressor_isentropic_efficiency=0.6)
