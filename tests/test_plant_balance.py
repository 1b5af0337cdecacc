"""Tests of calcs/plant_balance.py: exact identities of the first law, the links from the unit
pages in the demo project, and bad input."""

from __future__ import annotations

import re
from pathlib import Path

import basisbook.calcs.plant_balance as pb
import pytest

from basisbook.commands.cli import main
from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Result, Values

ZERO = {i.name: 0.0 for i in pb.SPEC.inputs}
BASE = {
    **ZERO,
    "steam_unit_gross_output": 12.5, "steam_unit_auxiliary_load": 1.1, "steam_unit_fuel_input": 42.0,
    "steam_unit_operating_hours": 8000.0,
    "chp_unit_electrical_output": 1.56, "chp_unit_auxiliary_load": 0.045, "chp_unit_fuel_input": 3.714,
    "chp_unit_heat_export": 1.5, "chp_unit_operating_hours": 8200.0,
    "hydro_unit_electrical_output": 0.82, "hydro_unit_auxiliary_load": 0.01, "hydro_unit_water_power": 1.03,
    "hydro_unit_operating_hours": 5750.0,
    "common_auxiliary_load": 0.15,
}


def run(**changes: float) -> Result:
    return pb.compute(Values({**BASE, **changes}))


def test_sums_step_by_step() -> None:
    # first law for the plant as a control volume (Cengel & Boles 8th ed., ch. 5, from memory): exact sums
    r = run().outputs
    assert r["plant_gross_output"] == pytest.approx(12.5 + 1.56 + 0.82)
    assert r["plant_auxiliary_load"] == pytest.approx(1.1 + 0.045 + 0.01 + 0.15)
    assert r["plant_net_export"] == pytest.approx(r["plant_gross_output"] - r["plant_auxiliary_load"])
    assert r["plant_fuel_input"] == pytest.approx(42.0 + 3.714)
    assert r["plant_conversion_losses"] == pytest.approx(45.714 + 1.03 - r["plant_gross_output"] - 1.5)
    net_hydro = 0.82 - 0.01
    assert r["fired_net_electrical_efficiency"] == pytest.approx((r["plant_net_export"] - net_hydro) / 45.714)
    assert r["plant_fuel_utilisation"] == pytest.approx(r["fired_net_electrical_efficiency"] + 1.5 / 45.714)


def test_annual_figures() -> None:
    # operating hours method: sum of P_i t_i; the common load runs all year (8760 h)
    r = run().outputs
    assert r["plant_annual_gross_generation"] == pytest.approx((12.5 * 8000 + 1.56 * 8200 + 0.82 * 5750) / 1e3)
    net = ((12.5 - 1.1) * 8000 + (1.56 - 0.045) * 8200 + (0.82 - 0.01) * 5750 - 0.15 * 8760) / 1e3
    assert r["plant_annual_net_export"] == pytest.approx(net)
    assert r["plant_annual_heat_export"] == pytest.approx(1.5 * 8200 / 1e3)
    assert r["plant_annual_fuel_input"] == pytest.approx((42.0 * 8000 + 3.714 * 8200) / 1e3)


def test_energy_flow_balances() -> None:
    flow = run().charts["energy_flow"]
    assert sum(v for _, v in flow.inflows) == pytest.approx(sum(v for _, v, _k in flow.outflows))
    labels = [lab for lab, _ in flow.inflows]
    assert labels == ["Fuel: solid biomass", "Fuel: biogas", "Water power (hydro)"]


def test_steam_unit_alone_and_optional_units_default_to_zero() -> None:
    only = {**ZERO, "steam_unit_gross_output": 10.0, "steam_unit_auxiliary_load": 1.0,
            "steam_unit_fuel_input": 40.0, "steam_unit_operating_hours": 8000.0}
    r = pb.compute(Values(only)).outputs
    assert r["plant_net_export"] == pytest.approx(9.0)
    assert r["fired_net_electrical_efficiency"] == pytest.approx(9.0 / 40.0)
    assert r["plant_annual_net_export"] == pytest.approx(72.0)


def test_gas_turbine_unit_counts_as_fired() -> None:
    r = run(gt_unit_electrical_output=5.0, gt_unit_fuel_input=14.4, gt_unit_operating_hours=2000.0).outputs
    assert r["plant_fuel_input"] == pytest.approx(42.0 + 3.714 + 14.4)
    assert r["plant_annual_fuel_input"] == pytest.approx((42.0 * 8000 + 3.714 * 8200 + 14.4 * 2000) / 1e3)


def test_conflicts() -> None:
    with pytest.raises(InputConflict, match="would make energy from nothing") as exc:
        run(chp_unit_fuel_input=3.0)
    assert exc.value.key == "chp_unit_fuel_input"
    with pytest.raises(InputConflict, match="no fuel input is given"):
        run(steam_unit_fuel_input=0.0)
    with pytest.raises(InputConflict, match="water power is not given"):
        run(hydro_unit_water_power=0.0)
    with pytest.raises(InputConflict, match="not below its water power"):
        run(hydro_unit_water_power=0.8)


def test_warnings() -> None:
    r = run(steam_unit_operating_hours=0.0)
    assert any("no operating hours" in w for w in r.warnings)


def test_demo_links_carry_the_unit_results() -> None:
    # the plant page takes CHP-2's fuel and heat (kW) in MW, HYD-1's output and hours, STG-1's rating
    from basisbook.commands.build import check

    runs = {r.id: r for r in check(Path(__file__).resolve().parent.parent / "project")}
    plant, chp2, hydro = runs["plant"], runs["chp2"], runs["hydro1"]
    assert plant.inputs["chp_unit_fuel_input"].value == pytest.approx(chp2.outputs["chp_fuel_input"] / 1e3)
    assert plant.inputs["chp_unit_heat_export"].value == pytest.approx(chp2.outputs["chp_thermal_output"] / 1e3)
    assert plant.inputs["chp_unit_electrical_output"].value == pytest.approx(1.56)
    assert plant.inputs["hydro_unit_operating_hours"].value == pytest.approx(hydro.outputs["hydro_full_load_hours"])
    assert plant.inputs["steam_unit_gross_output"].value == pytest.approx(12.5)
    assert {c.check.id: c.verdict for c in plant.checks}["net_export"] == "meets"


def test_bad_input_exit_2(demo_copy: Path, capsys) -> None:
    rel = "inputs/chp_and_plant.toml"
    p = demo_copy / rel
    old, new = 'steam_unit_fuel_input = { from = "cycle1.fuel_heat_input" }', 'steam_unit_fuel_input = "12 MW"'
    p.write_text(p.read_text(encoding="utf-8").replace(old, new), encoding="utf-8")
    line = next(n for n, s in enumerate(p.read_text(encoding="utf-8").splitlines(), start=1) if new in s)
    code = main(["check", str(demo_copy)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert f"{rel}:{line}:" in err
    assert re.search(r"\[plant\.steam_unit_fuel_input\] Steam turbine unit: gross output 12\.5 MW plus heat 0 MW "
                     r"is not below its fuel input 12 MW", err), err


# --- found by the property tests (tests/test_properties.py) --------------------------------


def test_a_unit_consuming_all_it_makes_is_refused() -> None:
    with pytest.raises(InputConflict, match=r"Steam turbine unit: auxiliary load 14 MW is not below its gross output 12\.5 MW"):
        run(steam_unit_auxiliary_load=14.0)


def test_a_common_load_above_the_fired_units_net_output_is_refused() -> None:
    # hydro covers it, but charged to the fired units the net efficiency would be negative
    # (it was -0.004 before)
    with pytest.raises(InputConflict, match="common services load 20 MW is not below the fired units"):
        run(common_auxiliary_load=20.0, hydro_unit_electrical_output=30.0, hydro_unit_water_power=35.0)
