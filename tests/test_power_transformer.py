"""Power transformer sizing against ISO 3 (R10), IEC 60076-5 Table 1 (from memory), a hand-worked
regulation case and an independent power-flow library (pandapower)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from basisbook.calcs import power_transformer as pt

from basisbook.commands.cli import main
from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Values


# ISO 3:1973, basic series R10, rounded values: exact by definition
@pytest.mark.parametrize(("required", "expected"), [
    (0.9, 1.0), (1.0, 1.0), (1.01, 1.25), (1.26, 1.6), (1.5635, 1.6), (2.4, 2.5), (2.6, 3.15), (3.2, 4.0),
    (4.1, 5.0), (5.1, 6.3), (6.4, 8.0), (8.1, 10.0), (14.348, 16.0), (16.0, 16.0), (31.0, 31.5),
    (0.63, 0.63), (0.631, 0.8), (250.0, 250.0),
])
def test_next_r10_rating_iso3(required: float, expected: float) -> None:
    assert pt.next_r10(required) == pytest.approx(expected, rel=1e-12)


def test_r10_series_is_the_iso3_list() -> None:
    # ISO 3 R10 rounded values, exact
    assert pt.R10 == (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)
    with pytest.raises(ValueError, match="positive"):
        pt.next_r10(0.0)


# IEC 60076-5:2006 Table 1, minimum short-circuit impedance (from memory)
@pytest.mark.parametrize(("kva", "uk"), [
    (100, 4.0), (630, 4.0), (631, 5.0), (1250, 5.0), (1251, 6.0), (1600, 6.0), (2500, 6.0), (2501, 7.0),
    (6300, 7.0), (6301, 8.0), (16000, 8.0), (25000, 8.0), (25001, 10.0), (40000, 10.0), (40001, 11.0),
    (63000, 11.0), (63001, 12.5), (100000, 12.5), (250000, 12.5),
])
def test_minimum_impedance_iec60076_5_table1(kva: float, uk: float) -> None:
    assert pt.minimum_short_circuit_impedance(kva) == uk


def test_regulation_hand_worked_case() -> None:
    # hand-worked (common practice, no source): e_r 1 %, e_x 8 %, full load, cos phi 0.8 lagging:
    # 1*0.8 + 8*0.6 + (8*0.8 - 1*0.6)^2/200 = 5.6 + 0.1682 = 5.7682 % (exact arithmetic)
    assert pt.voltage_regulation(1.0, 8.0, 0.8) == pytest.approx(5.7682, abs=1e-12)
    # unity pf: e_r + e_x^2/200 = 1 + 0.32; leading 0.8: 0.8 - 4.8 + (6.4 + 0.6)^2/200
    assert pt.voltage_regulation(1.0, 8.0, 1.0) == pytest.approx(1.32, abs=1e-12)
    assert pt.voltage_regulation(1.0, 8.0, 0.8, lagging=False) == pytest.approx(-4.0 + 0.245, abs=1e-12)
    # no load, no drop; half load halves the first-order term and quarters the second
    assert pt.voltage_regulation(1.0, 8.0, 0.8, 0.0) == 0.0
    assert pt.voltage_regulation(1.0, 8.0, 0.8, 0.5) == pytest.approx(2.8 + 0.1682 / 4, abs=1e-12)


def test_regulation_against_pandapower_power_flow() -> None:
    """pandapower (PyPI, independent power-flow library): LV voltage of a 16 MVA, u_k 8 %, u_R 1 %
    transformer carrying 12.8 MW + 9.6 Mvar from a 1 pu slack.  The IEC 60076-8 formula with the
    load current from the power flow gives the drop to ~2e-4 percentage points (third-order terms)."""
    pp = pytest.importorskip("pandapower")
    net = pp.create_empty_network(sn_mva=1.0)
    b0, b1 = pp.create_bus(net, 33.0), pp.create_bus(net, 11.0)
    pp.create_ext_grid(net, b0, vm_pu=1.0)
    pp.create_transformer_from_parameters(net, b0, b1, sn_mva=16, vn_hv_kv=33, vn_lv_kv=11, vkr_percent=1.0,
                                          vk_percent=8.0, pfe_kw=0, i0_percent=0)
    pp.create_load(net, b1, p_mw=12.8, q_mvar=9.6)
    pp.runpp(net)
    v_lv = float(net.res_bus.vm_pu[b1])
    b = 16.0 / 16.0 / v_lv  # current in pu of rated: S / (U S_r)
    u_r, u_x = pt.impedance_components(8.0, 160.0, 16.0)  # P_k = 160 kW gives u_R = 1 %
    assert u_r == pytest.approx(1.0)
    assert pt.voltage_regulation(u_r, u_x, 0.8, b) == pytest.approx(100 * (1 - v_lv), abs=1e-3)


def test_derating_limiting_cases_iec60076_2() -> None:
    # IEC 60076-2 cl. 6.2/6.3 as recalled: no reduction at 40 degC and 1000 m
    assert pt.temperature_rise_reduction(40.0, 1000.0, "ONAN") == 0.0
    assert pt.derating_factor(0.0, "ONAN") == 1.0
    assert pt.temperature_rise_reduction(45.0, 0.0, "ONAN") == 5.0
    assert pt.temperature_rise_reduction(30.0, 2000.0, "ONAN") == pytest.approx(2.5)   # 1 K / 400 m
    assert pt.temperature_rise_reduction(30.0, 2000.0, "ONAF") == pytest.approx(4.0)   # 1 K / 250 m
    # rise ~ K^1.6: a 5 K reduction of 65 K leaves (60/65)^(1/1.6) of the rating
    assert pt.derating_factor(5.0, "ONAN") == pytest.approx((60 / 65) ** 0.625)


def test_efficiency_and_through_fault_hand_worked() -> None:
    # eta = P / (P + P0 + b^2 Pk): 16 MVA at half load, pf 1, P0 10 kW, Pk 100 kW: 8000/(8000+35)
    losses, eta = pt.efficiency(8.0, 1.0, 16.0, 10.0, 100.0)
    assert losses == pytest.approx(35.0) and eta == pytest.approx(100 * 8000 / 8035)
    # infinite source: I = I_r / u_k (IEC 60076-5 cl. 4.1.2): 1.6 MVA, 0.69 kV, 6 %
    i_r = 1.6e3 / (math.sqrt(3) * 0.69) / 1e3
    assert pt.through_fault_current(1.6, 0.69, 6.0) == pytest.approx(i_r / 0.06)
    # a source as strong as the transformer halves it
    assert pt.through_fault_current(1.6, 0.69, 6.0, 1.6 / 0.06) == pytest.approx(i_r / 0.12)


def _uat(**over) -> dict:
    v = dict(transformer_role="unit_auxiliary", transformer_active_load=1.1711, transformer_reactive_load=0.5709,
             growth_margin=20.0, hv_rated_voltage=11.0, lv_rated_voltage=0.69, cooling_method="ONAN",
             ambient_temperature_max=36.0, altitude=145.0, stated_rated_power=0.0,
             stated_short_circuit_impedance=0.0, load_loss=14.5, no_load_loss=2.1, vector_group="Dyn11",
             tap_range=5.0, tap_step=2.5, tap_changer="off_circuit", source_fault_level=0.0)
    v.update(over)
    return v


def test_compute_chain_step_by_step() -> None:
    out = pt.compute(Values(_uat())).outputs
    s = math.hypot(1.1711, 0.5709)
    assert out["transformer_load_apparent_power"] == pytest.approx(s)
    assert out["required_rated_power"] == pytest.approx(s * 1.2)          # no derating at 36 degC, 145 m
    assert out["transformer_rated_power"] == 1.6                          # next R10 above 1.563
    assert out["short_circuit_impedance"] == 6.0                          # IEC 60076-5 Table 1 minimum
    assert out["resistive_impedance"] == pytest.approx(14.5 / 16)
    assert out["transformer_loading"] == pytest.approx(100 * s * 1.2 / 1.6)
    assert out["through_fault_current_lv"] == pytest.approx(out["lv_rated_current"] / 1e3 / 0.06)
    assert out["through_fault_current_hv"] == pytest.approx(out["through_fault_current_lv"] * 0.69 / 11)
    # a stated rating and impedance are taken as stated
    out = pt.compute(Values(_uat(stated_rated_power=2.0, stated_short_circuit_impedance=6.5))).outputs
    assert out["transformer_rated_power"] == 2.0 and out["short_circuit_impedance"] == 6.5


def test_input_conflicts() -> None:
    with pytest.raises(InputConflict, match="resistive part .* is not below the impedance"):
        pt.compute(Values(_uat(load_loss=200.0)))
    with pytest.raises(InputConflict, match="is not below HV"):
        pt.compute(Values(_uat(lv_rated_voltage=11.0)))
    with pytest.raises(InputConflict, match="no load"):
        pt.compute(Values(_uat(transformer_active_load=0.0, transformer_reactive_load=0.0)))


def test_bad_input_exit_2(demo_copy: Path, capsys) -> None:
    p = demo_copy / "inputs" / "electrical.toml"
    text = p.read_text(encoding="utf-8")
    p.write_text(text.replace('load_loss = "14.5 kW"', 'load_loss = "150 kW"'), encoding="utf-8")
    assert main(["check", str(demo_copy)]) == 2
    err = capsys.readouterr().err
    line = next(n for n, s in enumerate(p.read_text().splitlines(), 1) if 'load_loss = "150 kW"' in s)
    assert f"inputs/electrical.toml:{line}: [uat1.load_loss]" in err and "is not below the impedance" in err


# --- found by the property tests (tests/test_properties.py) --------------------------------


def test_a_stated_rating_far_below_the_load_is_refused() -> None:
    # 5e-324 MVA reached next_r10 with a zero decade (AssertionError) before
    with pytest.raises(InputConflict, match="below a twentieth of the load"):
        pt.compute(Values(_uat(stated_rated_power=5e-324)))


def test_efficiency_in_per_cent_and_zero_without_active_load() -> None:
    # eta = P / (P + losses): in per cent (the declared unit); 0 when only reactive power flows
    out = pt.compute(Values(_uat())).outputs
    assert 99.0 < out["transformer_efficiency"] < 100.0
    out = pt.compute(Values(_uat(transformer_active_load=0.0))).outputs
    assert out["transformer_efficiency"] == 0.0


def test_a_source_weaker_than_the_transformer_is_refused() -> None:
    # 2e-313 MVA made Z_s infinite and the through-fault current 0 before
    with pytest.raises(InputConflict, match="source fault level 2.23e-313 MVA is below the transformer rating"):
        pt.compute(Values(_uat(source_fault_level=2.2250738585e-313)))
