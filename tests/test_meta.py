"""Meta-tests: the calc contract is honoured by every module, and layers do not cross."""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

from basisbook import catalog
from basisbook.spec import PLACEHOLDER
from calcs.glossary import GLOSSARY

ROOT = Path(__file__).resolve().parent.parent
KINDS = catalog.kinds()


def test_there_is_at_least_one_calc() -> None:
    assert "synchronous_generator" in KINDS


@pytest.mark.parametrize("kind", KINDS)
def test_every_input_and_output_has_unit_symbol_and_meaning(kind: str) -> None:
    spec = catalog.spec(kind)
    assert spec.title and spec.purpose
    for item in list(spec.inputs) + list(spec.outputs):
        assert item.symbol, f"{kind}.{item.name}: no symbol"
        assert len(item.meaning) > 10, f"{kind}.{item.name}: no real description"
        assert item.unit is not None
    for i in spec.inputs:
        if i.kind == "number":
            assert i.range, f"{kind}.{i.name}: a number input declares its allowed range"
            if i.default is not None:
                assert i.allowed.contains(float(i.default)), f"{kind}.{i.name}: default outside range"


@pytest.mark.parametrize("kind", KINDS)
def test_every_module_cites_and_cautions(kind: str) -> None:
    spec = catalog.spec(kind)
    assert spec.references, f"{kind}: no references"
    assert spec.cautions, f"{kind}: no cautions"
    for r in spec.references:
        if "no published source" in r.citation.lower():
            continue  # a rule of thumb, declared as such
        # edition or year in every citation, so a reviewer can find the same text
        assert any(ch.isdigit() for ch in r.citation), r.citation
    cited = {s.source for s in spec.steps} | {c.source for c in spec.checks}
    unused = {r.key for r in spec.references} - cited
    assert not unused, f"{kind}: references never cited: {unused}"


@pytest.mark.parametrize("kind", KINDS)
def test_every_numeric_output_has_a_step_or_is_echoed(kind: str) -> None:
    spec = catalog.spec(kind)
    stepped = {s.output for s in spec.steps}
    for o in spec.outputs:
        if o.unit != "text":
            assert o.name in stepped, f"{kind}.{o.name}: no calculation step shows how it is obtained"


@pytest.mark.parametrize("kind", KINDS)
def test_steps_use_only_declared_names(kind: str) -> None:
    spec = catalog.spec(kind)
    declared = set(spec.input_names) | set(spec.output_names)
    for s in spec.steps:
        assert set(PLACEHOLDER.findall(s.expression)) <= declared


def test_glossary_units_parse() -> None:
    from basisbook.units import registry

    ureg = registry()
    for name, term in GLOSSARY.items():
        if term.unit in ("", "text", "table", "records"):
            continue
        ureg.Quantity(1, term.unit)  # raises if the unit is unknown
        assert term.symbol, name


def _imports(path: Path) -> set[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    names: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom) and node.module:
            names.add(node.module.split(".")[0] if not node.module.startswith("basisbook.") else node.module)
    return names


def test_calcs_know_nothing_of_rendering() -> None:
    forbidden = {"jinja2", "markupsafe", "markdown_it", "matplotlib", "basisbook.render",
                 "basisbook.figures", "basisbook.mathfmt", "latex2mathml"}
    for path in sorted((ROOT / "calcs").glob("*.py")):
        assert not (_imports(path) & forbidden), f"{path.name} imports {_imports(path) & forbidden}"


def test_renderer_knows_no_physics() -> None:
    for name in ("render.py", "mathfmt.py", "figures.py"):
        imported = _imports(ROOT / "basisbook" / name)
        assert not any(i == "calcs" or i.startswith("calcs") for i in imported), name
        assert "CoolProp" not in imported


@pytest.mark.parametrize(("run_calcs", "forbidden"), [
    (True, ("matplotlib", "jinja2", "markdown_it", "latex2mathml")),  # a full check renders nothing
    (False, ("matplotlib", "jinja2", "markdown_it", "latex2mathml", "CoolProp")),  # inputs only
])
def test_check_does_not_pay_for_rendering(run_calcs: bool, forbidden: tuple[str, ...]) -> None:
    code = (
        f"import sys; from basisbook.build import check; check(sys.argv[1], run_calcs={run_calcs});"
        f"heavy = [m for m in {forbidden!r} if m in sys.modules];"
        "print(heavy); assert not heavy, heavy"
    )
    subprocess.run([sys.executable, "-c", code, str(ROOT / "project")], check=True)


def test_templates_hold_no_logic_beyond_loops_and_conditionals() -> None:
    # filters and calls would put formatting or physics in templates: forbid them
    import re

    for path in sorted((ROOT / "templates").glob("*.html")):
        text = path.read_text(encoding="utf-8")
        for expr in re.findall(r"\{\{(.*?)\}\}", text, flags=re.S):
            assert "|" not in expr and "(" not in expr, f"{path.name}: {expr.strip()}"
        for stmt in re.findall(r"\{%-?\s*(\w+)", text):
            assert stmt in {"for", "endfor", "if", "elif", "else", "endif", "extends", "block",
                            "endblock"}, f"{path.name}: {stmt}"


def test_missing_template_variable_is_an_error(tmp_path: Path) -> None:
    import jinja2

    from basisbook.render import environment

    env = environment(tmp_path)
    with pytest.raises(jinja2.UndefinedError, match="calc"):
        env.get_template("calc.html").render(root="", page="x")


def test_glossary_declares_each_name_once() -> None:
    # a repeated key in a dict literal silently replaces the first meaning (and unit)
    tree = ast.parse((ROOT / "calcs" / "glossary.py").read_text(encoding="utf-8"))
    keys = [k.value for node in ast.walk(tree) if isinstance(node, ast.Dict)
            for k in node.keys if isinstance(k, ast.Constant)]
    repeated = sorted({k for k in keys if keys.count(k) > 1})
    assert not repeated, f"glossary names declared twice: {repeated}"
