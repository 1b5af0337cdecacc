"""Property-based tests (hypothesis) on the loader and every calc module.

Any generated input either gives a clean error (an InputConflict naming an
input, which the CLI turns into exit 2) or a result that keeps the module's
physical invariants.  Anything else (a ZeroDivisionError, a NaN, a negative
current) is a bug.  BASISBOOK_EXAMPLES sets the examples per module (CI: 1000).
"""

from __future__ import annotations

import json
import math
import os
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import CalcSpec, Input, Values
from basisbook.reading import catalog

pytestmark = pytest.mark.slow  # the quick loop leaves these out; `--full` runs them

EXAMPLES = int(os.environ.get("BASISBOOK_EXAMPLES", "200"))
SETTINGS = settings(max_examples=EXAMPLES, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])


def _number(decl: Input) -> st.SearchStrategy[float]:
    r = decl.allowed
    lo = r.low if r.low is not None else -1e6
    hi = r.high if r.high is not None else 1e6
    # keep to magnitudes a project could hold; the loader has already refused the rest
    lo, hi = max(lo, -1e6), min(hi, 1e6)
    s = st.floats(min_value=lo, max_value=hi, allow_nan=False, allow_infinity=False,
                  exclude_min=not r.low_closed, exclude_max=not r.high_closed)
    return s


def _table(decl: Input) -> st.SearchStrategy[tuple]:
    def rows(n: int) -> st.SearchStrategy[tuple]:
        cols = [st.floats(min_value=max(c.allowed.low if c.allowed.low is not None else 0.0, -1e6),
                          max_value=min(c.allowed.high if c.allowed.high is not None else 1e4, 1e6),
                          allow_nan=False, allow_infinity=False) for c in decl.columns]
        return st.lists(st.tuples(*cols), min_size=n, max_size=n + 8).map(tuple)

    return rows(max(decl.min_rows, 1))


def _near(decl: Input, value: float) -> st.SearchStrategy[float]:
    """The demo value scaled by 0.7-1.3 and kept in range: a neighbouring real project, so
    that enough examples pass the consistency checks and reach the invariants."""
    r = decl.allowed
    return st.floats(min_value=0.7, max_value=1.3).map(lambda f: value * f).filter(r.contains)


def inputs_for(spec: CalcSpec, demo: dict[str, Any]) -> st.SearchStrategy[dict[str, Any]]:
    """Each input its demo value, a neighbour of it, or anything its declaration allows."""
    parts = {}
    for decl in spec.inputs:
        if decl.kind == "choice":
            parts[decl.name] = st.sampled_from(decl.choices)
        elif decl.kind == "number":
            # demo : neighbour : anything = 4 : 4 : 1; with twenty inputs most examples then hold
            # one or two wild values among realistic ones instead of all wild ones
            branches = (st.just(demo[decl.name]), _near(decl, demo[decl.name]), _number(decl))
            parts[decl.name] = st.integers(0, 8).flatmap(
                lambda k, b=branches: b[0] if k < 4 else b[1] if k < 8 else b[2]) \
                if decl.name in demo else _number(decl)
        elif decl.kind == "table":
            parts[decl.name] = st.one_of(st.just(demo[decl.name]), _table(decl)) if decl.name in demo \
                else _table(decl)
        else:  # records: keep the demo's rows (their own loader has its own tests)
            parts[decl.name] = st.just(demo[decl.name])
    return st.fixed_dictionaries(parts)


def _demo_inputs() -> dict[str, dict[str, Any]]:
    """The first demo instance of each kind, resolved (links followed)."""
    from pathlib import Path

    from basisbook.reading.project import load
    from basisbook.running import engine

    runs = engine.run(load(Path(__file__).resolve().parent.parent / "project"))
    out: dict[str, dict[str, Any]] = {}
    for r in runs:
        out.setdefault(r.spec.kind, {k: v.value for k, v in r.inputs.items()})
    return out


DEMO = _demo_inputs()


# currents that are physically zero in a legitimate case (checked >= 0 per module below)
MAY_BE_ZERO = {
    "saturation_increment_current",  # zero while the rated point lies on the straight part of the OCC
}


def invariants(kind: str, v: dict[str, Any], out: dict[str, Any]) -> None:
    """Physical invariants every result must keep, whatever the inputs."""
    spec = catalog.spec(kind)
    for name, value in out.items():
        if isinstance(value, float):
            assert math.isfinite(value), f"{name} = {value}"
        unit = spec.output(name).unit
        if unit in ("MVA", "A", "rpm", "Wb", "ms") and isinstance(value, float) \
                and name not in MAY_BE_ZERO:
            assert value > 0, f"{name} = {value} {unit} must be positive"
        if "efficiency" in name and isinstance(value, float) and "reference" not in name:
            # some modules state an efficiency in per cent (the unit says which)
            top = 100.0 if unit == "%" else 1.0
            # a transformer carrying only reactive power delivers no active power: efficiency 0
            # (below 1 W against kilowatts of loss it is 0 to float precision)
            idle = kind == "power_transformer" and v["transformer_active_load"] < 1e-6
            low_ok = value >= 0.0 if idle else value > 0
            assert low_ok and value <= top * (1.0 + 1e-12), f"{name} = {value} {unit}"
    if kind == "synchronous_generator":
        # S >= P, and the phasor diagram gives a lagging machine more EMF than 1 pu
        assert out["generator_apparent_power"] >= v["generator_active_power"] * (1 - 1e-12)
        assert out["internal_emf"] >= 1.0 - 1e-9 or v["armature_resistance"] > 0
        # E_Q = V + (r_a + j x_q) I: its imaginary part is I (x_q cos phi - r_a sin phi), so the
        # load angle is negative (and physically so) when r_a sin phi exceeds x_q cos phi
        pf = v["generator_power_factor"]
        x_q, r_a = out["effective_quadrature_reactance"], v["armature_resistance"]
        assert -90 < out["load_angle"] < 90
        if x_q * pf > r_a * math.sqrt(1 - pf * pf):
            assert out["load_angle"] >= 0
        # power triangle closes: S^2 = P^2 + Q^2
        s_r, p_r, q_r = (out["generator_apparent_power"], v["generator_active_power"],
                         out["generator_reactive_power"])
        assert math.isclose(s_r * s_r, p_r * p_r + q_r * q_r, rel_tol=1e-9)
        # poles come in pairs
        assert out["pole_count"] >= 2 and out["pole_count"] % 2 == 0
    if kind == "steam_cycle":
        assert 0 < out["cycle_thermal_efficiency"] < out["carnot_efficiency"]
        assert abs(out["energy_balance_residual"]) < 1e-3
    if kind == "engine_chp":
        assert out["chp_total_efficiency"] <= 1.0 + 1e-9
        # first law: every stream of the fuel input is accounted for, the residual included
        streams = (v["engine_electrical_output"] + out["jacket_water_heat"] + out["lube_oil_heat"]
                   + out["charge_air_heat"] + out["exhaust_heat_recovered"] + out["exhaust_stack_loss"]
                   + out["unaccounted_heat_loss"])
        assert math.isclose(streams, out["chp_fuel_input"], rel_tol=1e-9)
        assert out["excess_air_ratio"] >= 1.0
        assert out["chp_thermal_output"] >= 0 and out["heating_water_flow"] >= 0
    if kind == "excitation_system":
        # the saturation increment is read between the OCC and the air-gap line: zero (to
        # round-off) for a curve that does not yet saturate, never below
        assert out["saturation_increment_current"] >= -1e-6 * out["rated_load_field_current"]
        assert out["rated_load_field_current"] > out["no_load_field_current"] > 0
        _field_current_rises_with_reactive_power(v)
    if kind == "plant_balance":
        assert out["plant_net_export"] <= out["plant_gross_output"] + 1e-9
        # first law: fuel and water power in = electricity, heat and losses out
        inflow = out["plant_fuel_input"] + v["hydro_unit_water_power"]
        outflow = out["plant_gross_output"] + out["plant_heat_export"] + out["plant_conversion_losses"]
        assert math.isclose(inflow, outflow, rel_tol=1e-9, abs_tol=1e-9)
        assert 0 < out["plant_fuel_utilisation"] <= 1.0
    if kind == "hydro_unit":
        # each stage of the water-to-wire chain can only lose power
        chain = [out[k] for k in ("gross_hydraulic_power", "net_hydraulic_power", "hydro_shaft_power",
                                  "hydro_generator_output", "hydro_grid_output")]
        assert all(a >= b > 0 for a, b in zip(chain[:-1], chain[1:], strict=True)), chain
        assert 0 < out["net_head"] <= v["gross_head"]
        # P(q) ~ q (h_g - h_f (q/q_d)^2) rises up to the design flow only while h_f <= h_g/3;
        # past that a lower flow gives more power than the design point and a capacity factor
        # above 1 is real (the module warns)
        assert out["hydro_capacity_factor"] >= 0
        if out["penstock_head_loss"] <= v["gross_head"] / 3:
            assert out["hydro_capacity_factor"] <= 1.0 + 1e-12
    if kind == "gas_turbine":
        # no cycle between the compressor inlet and the turbine inlet temperatures beats Carnot
        t1, t3 = v["compressor_inlet_temperature"] + 273.15, v["turbine_inlet_temperature"] + 273.15
        assert 0 < out["gas_turbine_thermal_efficiency"] < 1.0 - t1 / t3
        assert out["gas_turbine_electrical_efficiency"] <= out["gas_turbine_thermal_efficiency"]
        assert out["compressor_outlet_temperature"] > v["compressor_inlet_temperature"]
        assert 0 < out["back_work_ratio"] < 1 and out["gas_turbine_net_specific_work"] > 0
    if kind == "power_transformer":
        if v["stated_rated_power"] == 0.0:
            # a rating the module chooses carries the (derated, grown) load
            assert out["transformer_rated_power"] >= out["required_rated_power"] * (1 - 1e-9)
        assert out["transformer_losses"] > 0 and out["through_fault_current_lv"] > 0
        assert out["lv_rated_current"] > out["hv_rated_current"]
    if kind == "fault_levels":
        # fault current at every bus positive; i_p = kappa sqrt(2) I''_k with 1.02 <= kappa <= 2
        # (IEC 60909-0:2016 eq. 55), also for a sum of branches
        for bus in ("hv", "generator_bus", "auxiliary_bus"):
            i_k, i_p = out[f"{bus}_fault_current"], out[f"{bus}_peak_current"]
            assert i_k > 0
            assert 1.02 * math.sqrt(2) * (1 - 1e-9) <= i_p / i_k <= 2.0 * math.sqrt(2) * (1 + 1e-9)
        assert out["voltage_during_motor_start"] > 0
    if kind == "auxiliary_load":
        assert out["maximum_demand_apparent"] >= out["maximum_demand_active"] > 0
        assert out["essential_demand_active"] <= out["maximum_demand_active"] * (1 + 1e-12)
        assert 0 < out["auxiliary_power_factor"] <= 1
    if kind == "steam_cycle":
        # each stage of the plant chain can only lose: cycle > gross >= net efficiency (equal
        # when no auxiliary load is declared, which the module warns about)
        assert out["net_electrical_efficiency"] <= out["gross_electrical_efficiency"] \
            < out["cycle_thermal_efficiency"]
        assert 0 < out["net_electrical_output"] <= v["gross_electrical_output"]
        for frac in ("heater_extraction_fraction", "deaerator_extraction_fraction", "condenser_steam_fraction"):
            assert 0 <= out[frac] <= 1, (frac, out[frac])


def _field_current_rises_with_reactive_power(v: dict[str, Any]) -> None:
    """At rated current, a more lagging power factor (more reactive power delivered) needs
    more field current (Potier construction of the module, IEC 60034-4-1)."""
    from basisbook.calcs import excitation as ex

    occ = ex.open_circuit_curve(v["open_circuit_characteristic"])
    u_r = v["generator_voltage"]
    i_fg = u_r / (v["air_gap_slope"] or occ.first_segment_slope)

    def occ_inverse_pu(e: float) -> float:
        return occ.curve.inverse(e * u_r)

    phi = math.degrees(math.acos(v["generator_power_factor"]))
    currents = []
    for angle in (phi, phi + 0.5 * (90.0 - phi)):
        try:
            currents.append(ex.potier_field_current(1.0, angle, v["potier_reactance"], occ_inverse_pu,
                                                    i_fg, v["short_circuit_field_current"]).field_current)
        except InputConflict:  # the more lagging point runs off the top of the curve
            return
    assert currents[1] > currents[0], f"field current {currents} does not rise with reactive power"


KINDS = [k for k in catalog.kinds() if k in DEMO]


@pytest.mark.parametrize("kind", KINDS)
def test_any_allowed_input_gives_a_clean_error_or_a_physical_result(kind: str) -> None:
    spec = catalog.spec(kind)
    module = catalog.module(kind)
    outcome = {"results": 0, "conflicts": 0}

    @SETTINGS
    @given(inputs_for(spec, DEMO[kind]))
    def check(v: dict[str, Any]) -> None:
        try:
            result = module.compute(Values(v))
        except InputConflict as exc:
            assert exc.key in spec.input_names, f"InputConflict names {exc.key!r}, not an input"
            outcome["conflicts"] += 1
            return
        assert set(spec.output_names) <= set(result.outputs)
        invariants(kind, v, result.outputs)
        outcome["results"] += 1

    check()
    print(f"{kind}: {outcome}")
    assert outcome["results"] > 0, f"{kind}: no generated input gave a result: {outcome}"


# ---------------------------------------------------------------------------
# The loader: any TOML value for a demo input loads or gives a located ProjectError
# ---------------------------------------------------------------------------

LOADER_EXAMPLES = min(EXAMPLES, 200)  # each example reads the whole demo project (~30 ms)

# (file, the demo line to replace, instance id, input name): a unit-bearing number, a plain
# number, a choice and a link, so that each kind of declared input meets the generated values
LOADER_TARGETS = [
    ("inputs/generators.toml", 'generator_voltage = "11 kV"', "stg1", "generator_voltage"),
    ("inputs/generators.toml", "turns_per_phase = 20", "stg1", "turns_per_phase"),
    ("inputs/generators.toml", 'rotor_type = "cylindrical"', "stg1", "rotor_type"),
    ("inputs/generators.toml", 'rated_frequency = { from = "site.grid_frequency" }', "stg1",
     "rated_frequency"),
]

_UNITS = ["kV", "V", "MW", "kW", "pu", "rpm", "Hz", "%", "degC", "m", "furlong", "kV/s", "1/0",
          "**", "", " ", "kV kV", "e3", "nan", "inf"]
_text = st.text(st.characters(blacklist_categories=("Cs",)), max_size=12)


def _toml_string(s: str) -> str:
    # JSON string escapes are valid TOML basic-string escapes (surrogates excluded above)
    return json.dumps(s, ensure_ascii=False)


_scalar = st.one_of(
    st.integers(min_value=-(2**63), max_value=2**63 - 1).map(str),
    st.floats(allow_nan=True, allow_infinity=True).map(
        lambda x: "nan" if math.isnan(x) else ("inf" if x > 0 else "-inf") if math.isinf(x) else repr(x)),
    st.booleans().map(lambda b: "true" if b else "false"),
    st.tuples(st.floats(allow_nan=True, allow_infinity=True), st.sampled_from(_UNITS))
    .map(lambda t: _toml_string(f"{t[0]} {t[1]}")),
    st.sampled_from(["NaN kV", "nan", "inf kV", "-inf", "1e999 kV", "11 kV kV", "11kV", "eleven kV",
                     "0x10", "", "cylindrical", "salient", "site.grid_frequency"]).map(_toml_string),
    _text.map(_toml_string),
)


def _toml_value(depth: int = 2) -> st.SearchStrategy[str]:
    if depth == 0:
        return _scalar
    inner = _toml_value(depth - 1)
    keys = st.sampled_from(["from", "value", "unit", "x", "from2"])
    return st.one_of(
        _scalar,
        st.lists(inner, max_size=4).map(lambda xs: "[" + ", ".join(xs) + "]"),
        st.dictionaries(keys, inner, max_size=3).map(
            lambda d: "{ " + ", ".join(f"{k} = {x}" for k, x in d.items()) + " }"),
        st.sampled_from(["stg1.generator_voltage", "site.grid_frequency", "nowhere.nothing", "stg1.",
                         "site.", "stg1.generator_current", "gen2.turns_per_phase"])
        .map(lambda target: "{ from = " + _toml_string(target) + " }"),
    )


ORIGINALS: dict[str, str] = {}  # each target file's demo text, read once


@settings(max_examples=LOADER_EXAMPLES, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(target=st.sampled_from(LOADER_TARGETS), value=_toml_value())
def test_loader_gives_a_project_or_located_problems(demo_copy, target: tuple[str, str, str, str],
                                                     value: str) -> None:
    from basisbook.contract.errors import ProjectError
    from basisbook.reading.project import load

    rel, line, instance_id, name = target
    path = demo_copy / rel
    original = ORIGINALS.setdefault(rel, path.read_text(encoding="utf-8"))
    assert line in original
    path.write_text(original.replace(line, f"{name} = {value}", 1), encoding="utf-8")
    try:
        try:
            project = load(demo_copy)
        except ProjectError as exc:
            assert exc.problems
            for p in exc.problems:
                assert p.file and p.key, f"problem without file or key: {p}"
            return
        # loaded: whatever was written became a finite number or a declared text, never NaN
        got = project.instance(instance_id).inputs[name].value
        if isinstance(got, float):
            assert math.isfinite(got), f"{name} = {value} loaded as {got}"
    finally:
        path.write_text(original, encoding="utf-8")

