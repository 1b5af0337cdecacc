"""Meta-tests: the calc contract is honoured by every module, and layers do not cross."""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest
from basisbook.calcs.glossary import GLOSSARY

from basisbook.contract.spec import PLACEHOLDER
from basisbook.reading import catalog

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
    from basisbook.reading.units import registry

    ureg = registry()
    for name, term in GLOSSARY.items():
        if term.unit in ("", "text", "table", "records"):
            continue
        ureg.Quantity(1, term.unit)  # raises if the unit is unknown
        assert term.symbol, name


def _imports(path: Path) -> set[str]:
    """Top-level names of third-party imports, full module paths of basisbook imports."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    names: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names |= {a.name.split(".")[0] if not a.name.startswith("basisbook.") else a.name
                      for a in node.names}
        elif isinstance(node, ast.ImportFrom) and node.module:
            names.add(node.module.split(".")[0] if not node.module.startswith("basisbook.") else node.module)
    return names


# --- the layers -------------------------------------------------------------------------------
# Each package of the installed namespace and the packages it may import (the package root
# ``basisbook`` itself, which holds only the version, may be imported by all).  The order is
# the layering: nothing imports a package above its own.
LAYERS: dict[str, set[str]] = {
    "basisbook.contract": set(),
    "basisbook.calcs": {"basisbook.contract"},
    "basisbook.reading": {"basisbook.contract", "basisbook.calcs"},
    "basisbook.running": {"basisbook.contract", "basisbook.reading"},
    "basisbook.rendering": {"basisbook.contract", "basisbook.reading", "basisbook.running"},
    "basisbook.revisions": {"basisbook.contract", "basisbook.reading", "basisbook.running",
                            "basisbook.rendering"},
    "basisbook.commands": {"basisbook.contract", "basisbook.reading", "basisbook.running",
                           "basisbook.rendering", "basisbook.revisions"},
    "basisbook.templates": set(),
}


def _module_files() -> dict[str, Path]:
    """Installed module name -> source file, for every module of the one namespace."""
    files: dict[str, Path] = {}
    for path in sorted((ROOT / "basisbook").rglob("*.py")):
        parts = list(path.relative_to(ROOT).with_suffix("").parts)
        files[".".join(parts[:-1] if parts[-1] == "__init__" else parts)] = path
    for folder in ("calcs", "templates"):  # installed as basisbook.calcs, basisbook.templates
        for path in sorted((ROOT / folder).glob("*.py")):
            name = f"basisbook.{folder}" + ("" if path.stem == "__init__" else f".{path.stem}")
            files[name] = path
    return files


MODULES = _module_files()


def _internal_imports(path: Path) -> set[str]:
    """The basisbook modules a file imports, at module level or inside a function (a lazy
    import is still a dependency): ``from basisbook.x import y`` counts as ``basisbook.x.y``
    when y is a module, else as ``basisbook.x``."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out |= {a.name for a in node.names if a.name.split(".")[0] == "basisbook"}
        elif isinstance(node, ast.ImportFrom) and node.module and node.module.split(".")[0] == "basisbook":
            for a in node.names:
                sub = f"{node.module}.{a.name}"
                out.add(sub if sub in MODULES else node.module)
    return {m for m in out if m != "basisbook"}


def _package(module: str) -> str:
    return ".".join(module.split(".")[:2])


def test_every_module_belongs_to_a_declared_layer() -> None:
    loose = sorted(m for m in MODULES if m.count(".") == 1 and m not in LAYERS
                   and m not in ("basisbook.__main__",))
    assert not loose, f"modules outside the layer packages: {loose} (put each in one of {sorted(LAYERS)})"


def test_no_import_crosses_the_layers_the_wrong_way() -> None:
    wrong = []
    for mod, path in MODULES.items():
        if mod in ("basisbook", "basisbook.__main__"):
            continue
        own = _package(mod)
        for target in sorted(_internal_imports(path)):
            pkg = _package(target)
            if pkg != own and pkg not in LAYERS[own]:
                wrong.append(f"{mod} imports {target} ({own} may import {sorted(LAYERS[own]) or 'nothing'})")
    assert not wrong, "\n".join(wrong)


def test_layer_map_catches_a_wrong_way_import() -> None:
    # the check above must be able to fail: the renderer importing revisions is refused
    assert "basisbook.revisions" not in LAYERS["basisbook.rendering"]
    assert "basisbook.calcs" not in LAYERS["basisbook.rendering"]  # the renderer knows no physics
    assert LAYERS["basisbook.calcs"] == {"basisbook.contract"}


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one member, or a self-import (Tarjan)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on: set[str] = set()
    found: list[list[str]] = []

    def visit(v: str) -> None:
        index[v] = low[v] = len(index)
        stack.append(v)
        on.add(v)
        for w in sorted(graph.get(v, ())):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1 or v in graph.get(v, ()):
                found.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return found


def test_no_import_cycles_between_modules() -> None:
    graph = {m: _internal_imports(p) for m, p in MODULES.items()}
    assert not _cycles(graph), f"import cycles: {_cycles(graph)}"


def test_no_import_cycles_between_packages() -> None:
    graph: dict[str, set[str]] = {}
    for m, p in MODULES.items():
        graph.setdefault(_package(m), set()).update(
            _package(t) for t in _internal_imports(p) if _package(t) != _package(m))
    assert not _cycles(graph), f"package cycles: {_cycles(graph)}"


def test_the_cycle_finder_finds_a_cycle() -> None:
    assert _cycles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]
    assert _cycles({"a": {"b"}, "b": set()}) == []


def test_one_installed_namespace() -> None:
    # calcs/ and templates/ install as basisbook.calcs and basisbook.templates: nothing may
    # import them by their folder names (that would load a second copy of every module)
    offenders = []
    for path in sorted(ROOT.glob("*/**/*.py")):
        if path.relative_to(ROOT).parts[0] not in ("basisbook", "calcs", "templates", "tests", "bench"):
            continue
        for name in _imports(path):
            if name in ("calcs", "templates"):
                offenders.append(f"{path.relative_to(ROOT)} imports {name}")
    assert not offenders, offenders
    import basisbook.calcs
    import basisbook.templates

    assert Path(basisbook.calcs.__file__).parent == ROOT / "calcs"
    assert Path(basisbook.templates.__file__).parent == ROOT / "templates"


def test_no_file_of_the_package_is_over_600_lines() -> None:
    long = {str(p.relative_to(ROOT)): n for p in (ROOT / "basisbook").rglob("*.py")
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > 600}
    assert not long, f"split these by topic: {long}"


def test_calcs_know_nothing_of_rendering() -> None:
    forbidden = {"jinja2", "markupsafe", "markdown_it", "matplotlib", "latex2mathml"}
    for path in sorted((ROOT / "calcs").glob("*.py")):
        third_party = _imports(path) & forbidden
        assert not third_party, f"{path.name} imports {third_party}"


def test_renderer_knows_no_physics() -> None:
    for path in sorted((ROOT / "basisbook" / "rendering").glob("*.py")):
        assert not any(_package(m) == "basisbook.calcs" for m in _internal_imports(path)), path.name
        assert "CoolProp" not in _imports(path), path.name


@pytest.mark.parametrize(("run_calcs", "forbidden"), [
    (True, ("matplotlib", "jinja2", "markdown_it", "latex2mathml")),  # a full check renders nothing
    (False, ("matplotlib", "jinja2", "markdown_it", "latex2mathml", "CoolProp")),  # inputs only
])
def test_check_does_not_pay_for_rendering(run_calcs: bool, forbidden: tuple[str, ...]) -> None:
    code = (
        f"import sys; from basisbook.commands.build import check; check(sys.argv[1], run_calcs={run_calcs});"
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

    from basisbook.rendering.templating import environment

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
