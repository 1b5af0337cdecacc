"""Property-based tests (hypothesis) on the loader and every calc module.

Any generated input either gives a clean error (an InputConflict naming an
input, which the CLI turns into exit 2) or a result that keeps the module's
physical invariants.  Anything else (a ZeroDivisionError, a NaN, a negative
current) is a bug.  BASISBOOK_EXAMPLES sets the examples per module (CI: 1000).
"""

from __future__ import annotations

import math
import os
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from basisbook import catalog
from basisbook.errors import InputConflict
from basisbook.spec import CalcSpec, Input, Values

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


def inputs_for(spec: CalcSpec, demo: dict[str, Any]) -> st.SearchStrategy[dict[str, Any]]:
    """Each input either its demo value or anything its declaration allows."""
    parts = {}
    for decl in spec.inputs:
        if decl.kind == "choice":
            parts[decl.name] = st.sampled_from(decl.choices)
        elif decl.kind == "number":
            parts[decl.name] = st.one_of(st.just(demo[decl.name]), _number(decl)) if decl.name in demo \
                else _number(decl)
        elif decl.kind == "table":
            parts[decl.name] = st.one_of(st.just(demo[decl.name]), _table(decl)) if decl.name in demo \
                else _table(decl)
        else:  # records: keep the demo's rows (their own loader has its own tests)
            parts[decl.name] = st.just(demo[decl.name])
    return st.fixed_dictionaries(parts)


def _demo_inputs() -> dict[str, dict[str, Any]]:
    """The first demo instance of each kind, resolved (links followed)."""
    from pathlib import Path

    from basisbook import engine
    from basisbook.project import load

    runs = engine.run(load(Path(__file__).resolve().parent.parent / "project"))
    out: dict[str, dict[str, Any]] = {}
    for r in runs:
        out.setdefault(r.spec.kind, {k: v.value for k, v in r.inputs.items()})
    return out


DEMO = _demo_inputs()


def invariants(kind: str, v: dict[str, Any], out: dict[str, Any]) -> None:
    """Physical invariants every result must keep, whatever the inputs."""
    spec = catalog.spec(kind)
    for name, value in out.items():
        if isinstance(value, float):
            assert math.isfinite(value), f"{name} = {value}"
        unit = spec.output(name).unit
        if unit in ("MVA", "A", "rpm", "Wb", "ms") and isinstance(value, float):
            assert value > 0, f"{name} = {value} {unit} must be positive"
        if "efficiency" in name and isinstance(value, float) and "reference" not in name:
            assert 0 < value <= 1.0 + 1e-12, f"{name} = {value}"
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
        # the chosen pole count's synchronous speed is the nearest one to the shaft speed
        assert out["pole_count"] >= 2 and out["pole_count"] % 2 == 0
    if kind == "steam_cycle":
        assert 0 < out["cycle_thermal_efficiency"] < out["carnot_efficiency"]
        assert abs(out["energy_balance_residual"]) < 1e-3
    if kind == "engine_chp":
        assert out["chp_total_efficiency"] <= 1.0 + 1e-9
    if kind == "plant_balance":
        assert out["plant_net_export"] <= out["plant_gross_output"] + 1e-9


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
    assert outcome["results"] > 0, f"{kind}: no generated input gave a result: {outcome}"
