"""Auxiliary load: demand factors and summation against a hand-summed list (common practice,
no source), locked-rotor kVA (IEEE Std 399 definition, as recalled), traceable rows, bad load lists."""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
from basisbook.calcs import auxiliary_load as al

from basisbook.commands.cli import main
from basisbook.contract.errors import InputConflict
from basisbook.contract.spec import Record, SourceRow, Values

DEFAULTS = {f.key: f.default for f in al.LOAD_LIST_FIELDS if f.default is not None}


def _rec(line: int, **cells) -> Record:
    return Record({**DEFAULTS, **cells}, SourceRow("loads/test.csv", line))


# hand-summed list (common practice, no source): every number below is worked by hand
ROWS = (
    _rec(2, tag="P1", bus="section_a", rated_power=100.0, power_basis="shaft", efficiency=0.8, power_factor=0.8,
         load_factor=1.0, duty="continuous", essential="yes", dol_start="yes", starting_current_ratio=6.0),
    _rec(3, tag="P2", bus="section_b", rated_power=100.0, power_basis="shaft", efficiency=0.8, power_factor=0.8,
         load_factor=1.0, duty="standby", dol_start="yes", starting_current_ratio=6.0),
    _rec(4, tag="L1", bus="section_a", rated_power=40.0, power_factor=1.0, load_factor=0.5, duty="intermittent"),
    _rec(5, tag="U1", bus="essential", rated_power=30.0, power_factor=0.6, load_factor=1.0, duty="continuous",
         essential="yes"),
)


def _values(rows=ROWS, **over) -> Values:
    v = dict(load_list=rows, generator_active_power=2.0, generator_reactive_power=1.5,
             demand_factor_continuous=1.0, demand_factor_intermittent=0.5, demand_factor_standby=0.0,
             emergency_supply_rating=500.0, auxiliary_share_limit=10.0)
    v.update(over)
    return Values(v)


def test_hand_summed_list_step_by_step() -> None:
    out = al.compute(_values()).outputs
    # connected: 100/0.8 + 100/0.8 + 40 + 30 = 320 kW
    assert out["connected_load"] == pytest.approx(320.0)
    # demand P: 125 x 1 + 125 x 0 (standby) + 40 x 0.5 x 0.5 + 30 x 1 = 165 kW
    assert out["maximum_demand_active"] == pytest.approx(165.0)
    # demand Q: 125 x 0.75 + 0 + 0 (pf 1) + 30 x 4/3 = 93.75 + 40 = 133.75 kvar
    assert out["maximum_demand_reactive"] == pytest.approx(133.75)
    assert out["maximum_demand_apparent"] == pytest.approx(math.hypot(165.0, 133.75))
    assert out["auxiliary_power_factor"] == pytest.approx(165.0 / math.hypot(165.0, 133.75))
    assert out["auxiliary_share"] == pytest.approx(100 * 165 / 2000)
    assert out["net_export_active_power"] == pytest.approx(2.0 - 0.165)
    assert out["net_export_reactive_power"] == pytest.approx(1.5 - 0.13375)
    # essential: P1 and U1: 155 kW, 133.75 kvar
    assert out["essential_demand_active"] == pytest.approx(155.0)
    assert out["essential_demand_apparent"] == pytest.approx(math.hypot(155.0, 133.75))
    # largest DOL motor: P1 and P2 tie at 6 x 125 / 0.8 = 937.5 kVA; the running one (P1) governs
    assert out["largest_motor_tag"] == "P1"
    assert out["largest_motor_starting_power"] == pytest.approx(937.5)
    assert out["largest_motor_rated_power"] == 100.0
    assert out["motor_start_base_active_load"] == pytest.approx(165.0 - 125.0)
    assert out["motor_start_base_reactive_load"] == pytest.approx(133.75 - 93.75)
    # running motors: P1 only (standby factor 0): 125 / 0.8 kVA, its ratio 6
    assert out["running_motor_apparent_power"] == pytest.approx(156.25)
    assert out["motor_group_current_ratio"] == pytest.approx(6.0)


def test_demand_factor_limits() -> None:
    # every factor 1: demand = sum of running loads (125 + 125 + 20 + 30)
    out = al.compute(_values(demand_factor_standby=1.0, demand_factor_intermittent=1.0)).outputs
    assert out["maximum_demand_active"] == pytest.approx(300.0)
    with pytest.raises(InputConflict, match="zero demand"):
        al.compute(_values(demand_factor_continuous=0.0, demand_factor_intermittent=0.0))


def test_tables_link_every_row_to_its_source() -> None:
    res = al.compute(_values())
    t = res.tables["load_list_summary"]
    assert [r[-1] for r in t.rows] == [SourceRow("loads/test.csv", n) for n in (2, 3, 4, 5)]
    bus = {r[0]: r for r in res.tables["bus_summary"].rows}
    assert bus["section_a"][3] == pytest.approx(135.0) and bus["section_b"][3] == 0.0
    assert bus["unit total"][3] == pytest.approx(165.0)
    # the per-section demands add up to the unit's
    assert sum(r[3] for k, r in bus.items() if k != "unit total") == pytest.approx(165.0)


def test_dol_start_on_an_electrical_rating_names_the_row() -> None:
    rows = ROWS + (_rec(9, tag="H1", bus="section_a", rated_power=10.0, power_factor=0.9, load_factor=1.0,
                        duty="continuous", dol_start="yes"),)
    with pytest.raises(InputConflict, match=r"loads/test.csv:9: H1 is marked dol_start = yes"):
        al.compute(_values(rows))


def test_published_cases() -> None:
    for case in al.PUBLISHED_CASES:
        value, ok = case.run()
        assert ok, (case.case, value)


AUX = "loads/stg1-auxiliaries.csv"


def _line(root: Path, rel: str, needle: str) -> int:
    return next(n for n, s in enumerate((root / rel).read_text(encoding="utf-8").splitlines(), 1) if needle in s)


# (id, old text, new text, needle for the row, expected key and message)
BAD = [
    ("unknown-duty", "0.85,continuous,yes,yes", "0.85,contnuous,yes,yes", "contnuous", "duty",
     "expected one of continuous, intermittent, standby; got 'contnuous'; did you mean 'continuous'"),
    ("unknown-bus", "P-102A,Condensate extraction pump A,condensate,section_a",
     "P-102A,Condensate extraction pump A,condensate,section_c", "section_c", "bus",
     "expected one of section_a, section_b, essential; got 'section_c'"),
    ("pf-above-one", "0.955,0.88,0.85,continuous", "0.955,1.2,0.85,continuous", "1.2,0.85", "power_factor",
     "out of range: 1.2 given, allowed (0, 1]"),
    ("pf-zero", "0.955,0.88,0.85,continuous", "0.955,0,0.85,continuous", "0.955,0,0.85", "power_factor",
     "out of range: 0 given, allowed (0, 1]"),
    ("duplicate-tag", "P-102B,", "P-102A,", None, "tag", "duplicate tag 'P-102A' (first at loads/stg1-auxiliaries.csv:"),
    ("missing-cell", "P-103A,Cooling-water pump A (2 x 50 %),cooling water,section_a,132 kW",
     "P-103A,Cooling-water pump A (2 x 50 %),cooling water,section_a,", "P-103A", "rated_power",
     "missing value: expected rated power"),
    ("non-numeric-cell", "section_a,22 kW", "section_a,twenty kW", "twenty", "rated_power", "could not read 'twenty kW'"),
]


@pytest.mark.parametrize("case", BAD, ids=[c[0] for c in BAD])
def test_bad_load_list_exit_2_names_file_and_row(case, demo_copy: Path, capsys) -> None:
    _id, old, new, needle, key, message = case
    p = demo_copy / AUX
    text = p.read_text(encoding="utf-8")
    assert old in text
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    assert main(["check", str(demo_copy)]) == 2
    err = capsys.readouterr().err
    line = _line(demo_copy, AUX, needle) if needle else \
        [n for n, s in enumerate(p.read_text().splitlines(), 1) if s.startswith("P-102A,")][-1]
    assert re.search(re.escape(f"{AUX}:{line}: [{key}] ") + ".*" + re.escape(message), err), err
    assert "Traceback" not in err


def test_empty_load_list_exit_2(demo_copy: Path, capsys) -> None:
    p = demo_copy / AUX
    header = [s for s in p.read_text(encoding="utf-8").splitlines() if s.startswith("tag,")][0]
    p.write_text("# invented, emptied\n" + header + "\n", encoding="utf-8")
    assert main(["check", str(demo_copy)]) == 2
    assert "expected at least 1 data row, got 0" in capsys.readouterr().err


def test_xlsx_list_of_the_demo_reads(demo_copy: Path) -> None:
    from basisbook.reading import project
    from basisbook.running import engine

    runs = {r.id: r for r in engine.run(project.load(demo_copy))}
    aux2 = runs["aux2"]
    rows = aux2.tables["load_list_summary"].rows
    assert rows[0][-1] == SourceRow("loads/gen2-auxiliaries.xlsx", 3)  # sheet row 3: after note and header
    assert aux2.outputs["maximum_demand_active"] == pytest.approx(
        sum(r[8] for r in rows))  # the summary rows add up to the demand
