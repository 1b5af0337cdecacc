"""Tests of calcs/engine_chp.py against published values and independent computations.
Each check names its source beside it."""

from __future__ import annotations

import re
from pathlib import Path

import basisbook.calcs.engine_chp as chp
import pytest

from basisbook.commands.cli import main
from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Result, Values, evaluate_check

# The demo's biogas set (invented numbers, as in project/inputs/chp_and_plant.toml).
BASE = {
    "engine_electrical_output": 1560.0,
    "fuel_input_basis": "electrical_efficiency",
    "engine_electrical_efficiency_given": 0.42,
    "fuel_gas_flow": 0.0,
    "engine_fuel_input_given": 0.0,
    "methane_fraction": 0.60,
    "methane_net_calorific_value": 50.03,
    "jacket_water_heat_share": 0.15,
    "lube_oil_heat_share": 0.055,
    "charge_air_heat_share": 0.06,
    "charge_air_heat_recovery": "not_recovered",
    "exhaust_mass_flow": 8200.0,
    "exhaust_temperature": 465.0,
    "exhaust_outlet_temperature": 180.0,
    "exhaust_dew_point_limit": 120.0,
    "heating_supply_temperature": 90.0,
    "heating_return_temperature": 70.0,
    "reference_electrical_efficiency": 0.42,
    "reference_heat_efficiency": 0.80,
}


def run(**changes: float | str) -> Result:
    return chp.compute(Values({**BASE, **changes}))


def verdict(check_id: str, result: Result, **changes: float | str) -> str:
    c = next(c for c in chp.SPEC.checks if c.id == check_id)
    known = {**BASE, **changes, **result.outputs}
    limit = known[c.limit] if isinstance(c.limit, str) else c.limit
    return evaluate_check(c, float(result.outputs[c.value]), float(limit)).verdict


# ---------------------------------------------------------------------------
# Fuel properties
# ---------------------------------------------------------------------------


def test_methane_net_calorific_value_per_normal_cubic_metre() -> None:
    # DVGW G 260 / ISO 6976 tables: methane H_i,n = 35.88 MJ/m3 at 0 degC, 101.325 kPa (from memory).
    # 4 printed digits: +-0.05 MJ/m3 covers the last digit.
    assert chp.gas_net_calorific_value(1.0, chp.normal_density("Methane"), 50.03) == pytest.approx(35.88, abs=0.05)


def test_methane_mass_calorific_value_default_from_molar_table() -> None:
    # ISO 6976:2016 Table 3 (from memory): net 802.69 kJ/mol at 25 degC; M = 16.043 g/mol (Table 1).
    # The default input is that quotient to 4 digits.
    default = chp.SPEC.input("methane_net_calorific_value").default
    assert default == pytest.approx(802.69 / 16.043, abs=0.005)


def test_methane_normal_density() -> None:
    # Gas handbooks / ISO 6976 tables: 0.7175 kg/m3 at 0 degC, 101.325 kPa (from memory), 4 digits.
    assert chp.normal_density("Methane") == pytest.approx(0.7175, abs=0.0005)
    # and the ideal-gas value M p / (R T) lies 0.2 % below it (methane Z = 0.9976, from memory)
    ideal = 16.043e-3 * 101325 / (8.314462618 * 273.15)
    assert chp.normal_density("Methane") / ideal == pytest.approx(1 / 0.9976, abs=5e-4)


def test_biogas_calorific_value_scales_with_methane_fraction() -> None:
    # the CO2 is inert: H_i,n is linear in x_CH4 (ISO 6976 mixture rule)
    rho = chp.normal_density("Methane")
    assert chp.gas_net_calorific_value(0.6, rho, 50.03) == pytest.approx(0.6 * chp.gas_net_calorific_value(1.0, rho, 50.03))
    with pytest.raises(ValueError, match=r"methane fraction must lie in \(0, 1\]"):
        chp.gas_net_calorific_value(0.0, rho, 50.03)


def test_stoichiometric_air_fuel_ratio_of_methane() -> None:
    # Heywood, Internal Combustion Engine Fundamentals, 1988, App. D: methane (A/F)s = 17.2 (from memory);
    # 3 digits -> +-0.05.
    assert chp.stoichiometric_air_fuel_ratio(1.0) == pytest.approx(17.2, abs=0.05)


def test_exhaust_composition() -> None:
    w = chp.exhaust_mass_fractions(0.6, 1.0)
    assert sum(w.values()) == pytest.approx(1.0, abs=1e-12)
    assert w["O2"] == pytest.approx(0.0, abs=1e-12)  # stoichiometric: all oxygen used
    w2 = chp.exhaust_mass_fractions(0.6, 1.8)
    assert w2["O2"] > 0 and w2["H2O"] < w["H2O"]
    with pytest.raises(ValueError, match="excess air ratio below 1"):
        chp.exhaust_mass_fractions(0.6, 0.9)


def test_nitrogen_specific_heat_from_mixture_enthalpy() -> None:
    # Cengel & Boles 8th ed., Table A-2 (from memory): N2 cp = 1.039 kJ/(kg K) at 300 K; 4 digits.
    cp = chp.mixture_enthalpy({"N2": 1.0}, 27.35) - chp.mixture_enthalpy({"N2": 1.0}, 26.35)
    assert cp == pytest.approx(1.039, abs=0.002)


def test_exhaust_as_air_would_understate_the_enthalpy_drop() -> None:
    # Why the module uses the mixture: lean-burn biogas exhaust holds ~10 % H2O by volume, whose cp is
    # about twice air's, so air understates the drop by several percent (common practice, no source).
    w = chp.exhaust_mass_fractions(0.6, 1.6)
    mix = chp.mixture_enthalpy(w, 465.0) - chp.mixture_enthalpy(w, 180.0)
    air = chp.air_enthalpy(465.0) - chp.air_enthalpy(180.0)
    assert 1.03 < mix / air < 1.10


# ---------------------------------------------------------------------------
# The chain, step by step
# ---------------------------------------------------------------------------


def test_chain_step_by_step() -> None:
    r = run().outputs
    fuel = 1560.0 / 0.42
    assert r["chp_fuel_input"] == pytest.approx(fuel)
    assert r["chp_fuel_gas_flow"] == pytest.approx(3.6 * fuel / r["fuel_gas_net_calorific_value"])
    assert r["jacket_water_heat"] == pytest.approx(0.15 * fuel)
    assert r["lube_oil_heat"] == pytest.approx(0.055 * fuel)
    assert r["charge_air_heat_recovered"] == 0.0
    assert r["exhaust_heat_recovered"] == pytest.approx(8200 / 3600 * r["exhaust_enthalpy_drop"])
    assert r["chp_thermal_output"] == pytest.approx(
        r["jacket_water_heat"] + r["lube_oil_heat"] + r["exhaust_heat_recovered"])
    assert r["chp_total_efficiency"] == pytest.approx(r["chp_electrical_efficiency"] + r["chp_thermal_efficiency"])
    assert r["power_to_heat_ratio"] == pytest.approx(1560.0 / r["chp_thermal_output"])
    # excess air from the mass balance
    m_air = 8200.0 - r["chp_fuel_mass_flow"]
    assert r["excess_air_ratio"] == pytest.approx(m_air / (r["stoichiometric_air_fuel_ratio"] * r["chp_fuel_mass_flow"]))


def test_energy_balance_closes_exactly() -> None:
    r = run().outputs
    out = (1560.0 + r["jacket_water_heat"] + r["lube_oil_heat"] + r["charge_air_heat"]
           + r["exhaust_heat_recovered"] + r["exhaust_stack_loss"] + r["unaccounted_heat_loss"])
    assert out == pytest.approx(r["chp_fuel_input"], rel=1e-12)
    flow = run().charts["energy_flow"]
    assert sum(v for _, v in flow.inflows) == pytest.approx(sum(v for _, v, _k in flow.outflows))


def test_demo_plausibility() -> None:
    # Common practice, no source: a MW-class biogas engine gives 40-44 % electrical, 80-90 % total,
    # a power-to-heat ratio near 1 and 1-3 % radiation loss.
    r = run().outputs
    assert 0.80 <= r["chp_total_efficiency"] <= 0.90
    assert 0.8 <= r["power_to_heat_ratio"] <= 1.2
    assert 0.0 <= r["unaccounted_loss_share"] <= 3.0
    assert 1.4 <= r["excess_air_ratio"] <= 2.0
    for c in chp.SPEC.checks:
        assert verdict(c.id, run()) == "meets", c.id


def test_fuel_bases_agree() -> None:
    ref = run().outputs
    by_flow = run(fuel_input_basis="gas_flow", fuel_gas_flow=ref["chp_fuel_gas_flow"]).outputs
    by_fuel = run(fuel_input_basis="fuel_input", engine_fuel_input_given=ref["chp_fuel_input"]).outputs
    for r in (by_flow, by_fuel):
        assert r["chp_fuel_input"] == pytest.approx(ref["chp_fuel_input"])
        assert r["chp_electrical_efficiency"] == pytest.approx(0.42)


def test_charge_air_recovery_adds_its_heat() -> None:
    a, b = run().outputs, run(charge_air_heat_recovery="recovered").outputs
    assert b["chp_thermal_output"] - a["chp_thermal_output"] == pytest.approx(a["charge_air_heat"])
    assert b["unaccounted_heat_loss"] == pytest.approx(a["unaccounted_heat_loss"])


def test_heating_water_flow_against_constant_specific_heat() -> None:
    # Steam tables (e.g. Cengel & Boles 8th ed., Table A-3, from memory): liquid water cp = 4.197 kJ/(kg K)
    # at 80 degC, the circuit's mean; 4 digits -> 0.1 %.
    r = run().outputs
    assert r["heating_water_flow"] == pytest.approx(3.6 * r["chp_thermal_output"] / (4.197 * 20.0), rel=1e-3)


def test_exhaust_heat_grows_as_the_outlet_is_cooled() -> None:
    hot, cold = run(exhaust_outlet_temperature=200.0).outputs, run(exhaust_outlet_temperature=130.0).outputs
    assert cold["exhaust_heat_recovered"] > hot["exhaust_heat_recovered"]
    # what the exhaust loses in the exchanger the stack no longer carries
    assert (cold["exhaust_heat_recovered"] + cold["exhaust_stack_loss"]
            == pytest.approx(hot["exhaust_heat_recovered"] + hot["exhaust_stack_loss"]))


def test_heat_vs_return_chart_passes_the_design_point() -> None:
    chart = run().charts["heat_vs_return"]
    total = chart.series[0]
    design = chart.markers[0]
    assert design.x == 70.0
    i = min(range(len(total.x)), key=lambda k: abs(total.x[k] - 70.0))
    assert abs(total.x[i] - 70.0) < 1.5
    assert all(a >= b for a, b in zip(total.y, total.y[1:], strict=False))  # colder return, more heat


# ---------------------------------------------------------------------------
# Primary energy savings (Directive 2012/27/EU Annex II)
# ---------------------------------------------------------------------------


def test_pes_worked_case() -> None:
    # Annex II (b) formula evaluated by hand (from memory of the formula):
    # 0.45/0.90 + 0.40/0.525 = 1.261905; PES = 1 - 1/1.261905 = 20.75 %.
    assert 100 * chp.primary_energy_savings(0.45, 0.40, 0.90, 0.525) == pytest.approx(20.75, abs=0.005)


def test_pes_limits() -> None:
    # identities of the formula: equal to separate production -> 0; twice -> 50 %
    assert chp.primary_energy_savings(0.0, 0.53, 0.92, 0.53) == pytest.approx(0.0, abs=1e-15)
    assert chp.primary_energy_savings(0.46, 0.265, 0.92, 0.53) == pytest.approx(0.0, abs=1e-15)
    assert chp.primary_energy_savings(0.92, 0.53, 0.92, 0.53) == pytest.approx(0.5)


def test_pes_threshold_by_unit_size() -> None:
    # Directive 2012/27/EU Annex II (a) (as recalled): 10 % from 1 MWe, positive below
    assert run().outputs["pes_threshold"] == 10.0
    assert run(engine_electrical_output=800.0).outputs["pes_threshold"] == 0.0


def test_natural_gas_references_give_lower_pes() -> None:
    # Regulation (EU) 2015/2402 values as recalled: natural gas 53 % / 92 %, biogas 42 % / 80 %
    bio = run().outputs["primary_energy_savings"]
    gas = run(methane_fraction=1.0, reference_electrical_efficiency=0.53,
              reference_heat_efficiency=0.92).outputs["primary_energy_savings"]
    assert gas < bio
    assert verdict("high_efficiency", run()) == "meets"


# ---------------------------------------------------------------------------
# Input conflicts and checks
# ---------------------------------------------------------------------------


def test_shares_above_hundred_percent() -> None:
    with pytest.raises(InputConflict, match=r"sum to 107\.5 % of the fuel input, at or above 100 %") as exc:
        run(jacket_water_heat_share=0.54)
    assert exc.value.key == "jacket_water_heat_share"


def test_exhaust_outlet_below_return() -> None:
    with pytest.raises(InputConflict, match="not above the heating return temperature"):
        run(exhaust_outlet_temperature=65.0)
    with pytest.raises(InputConflict, match="not below the exhaust inlet"):
        run(exhaust_outlet_temperature=470.0)


def test_missing_basis_values() -> None:
    with pytest.raises(InputConflict, match="no efficiency is given"):
        run(engine_electrical_efficiency_given=0.0)
    with pytest.raises(InputConflict, match="no gas flow is given"):
        run(fuel_input_basis="gas_flow")
    with pytest.raises(InputConflict, match="electrical efficiency would be 100 % or more"):
        run(fuel_input_basis="fuel_input", engine_fuel_input_given=1500.0)


def test_too_little_exhaust_for_the_fuel() -> None:
    with pytest.raises(InputConflict, match=r"excess air ratio would be 0\.\d+ < 1"):
        run(exhaust_mass_flow=4000.0)


def test_checks_fail_where_they_should() -> None:
    r = run(exhaust_outlet_temperature=110.0)
    assert verdict("exhaust_dew_point", r) == "fails"
    r = run(exhaust_mass_flow=12000.0)  # more exhaust heat than the fuel can hold
    assert verdict("energy_balance", r) == "fails"
    assert any("exceed the fuel input" in w for w in r.warnings)


# ---------------------------------------------------------------------------
# Bad input through the CLI on a copy of the demo project
# ---------------------------------------------------------------------------

REL = "inputs/chp_and_plant.toml"
BAD = [
    ("shares-above-100", "jacket_water_heat_share = 0.15", "jacket_water_heat_share = 0.55",
     r"\[chp2\.jacket_water_heat_share\] electrical efficiency 0\.420 .* sum to 108\.5 % of the fuel input"),
    ("exhaust-below-return", 'exhaust_outlet_temperature = "180 degC"', 'exhaust_outlet_temperature = "60 degC"',
     r"\[chp2\.exhaust_outlet_temperature\] exhaust outlet 60 °C is not above the heating return temperature 70 °C"),
    ("methane-above-one", "methane_fraction = 0.60", "methane_fraction = 1.2",
     r"\[chp2\.methane_fraction\] out of range: 1\.2 given, allowed \[0\.3, 1\]"),
    ("methane-zero", "methane_fraction = 0.60", "methane_fraction = 0",
     r"\[chp2\.methane_fraction\] out of range: 0 given, allowed \[0\.3, 1\]"),
]


@pytest.mark.parametrize("case", BAD, ids=[c[0] for c in BAD])
def test_bad_input_exit_2(case, demo_copy: Path, capsys) -> None:
    _id, old, new, pattern = case
    p = demo_copy / REL
    text = p.read_text(encoding="utf-8")
    assert old in text
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    line = next(n for n, s in enumerate(p.read_text(encoding="utf-8").splitlines(), start=1) if new in s)
    code = main(["check", str(demo_copy)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    assert re.search(pattern, err), err
    assert f"{REL}:{line}:" in err, err


# --- found by the property tests (tests/test_properties.py) --------------------------------


def test_exhaust_data_that_recover_more_than_the_fuel_gives_are_refused() -> None:
    # 1 kW of electricity with 8200 kg/h of exhaust gave a thermal efficiency of 287 before
    with pytest.raises(InputConflict, match="exceed the fuel input"):
        run(engine_electrical_output=10.0)


def test_an_implausibly_low_electrical_efficiency_is_refused() -> None:
    with pytest.raises(InputConflict, match="electrical efficiency would be 0.0 %"):
        run(fuel_input_basis="electrical_efficiency", engine_electrical_efficiency_given=1e-6)
