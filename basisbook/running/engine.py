"""Resolve links between calc instances, run them in dependency order.

The engine knows the contract (spec.py) and the project model, nothing of the
physics and nothing of HTML.  Its product is a list of ``CalcRun`` objects in
the order the calcs ran, which the renderer turns into pages.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

from basisbook.contract.errors import InputConflict, Problem, ProjectError
from basisbook.contract.spec import Chart, CheckResult, Table, Values, evaluate_check
from basisbook.reading import catalog
from basisbook.reading.project import InputValue, Instance, Project, Source, check_range


@dataclass
class CalcRun:
    instance: Instance
    inputs: dict[str, InputValue]
    outputs: dict[str, float | str]
    checks: list[CheckResult]
    charts: dict[str, Chart]
    tables: dict[str, Table]
    warnings: list[str]
    used_by: dict[str, list[tuple[str, str]]] = field(default_factory=dict)
    cache_key: str = ""

    @property
    def id(self) -> str:
        return self.instance.id

    @property
    def spec(self):  # noqa: ANN201 - CalcSpec, kept short for templates
        return self.instance.spec


def dependency_order(project: Project) -> list[Instance]:
    """Instances sorted so each runs after the ones it links to.

    Rejects dangling links (unknown instance or output) and cycles, with the
    file and line of each offending input.  Ties keep file order (deterministic).
    """
    problems: list[Problem] = []
    by_id = {i.id: i for i in project.instances}
    deps: dict[str, list[str]] = {i.id: [] for i in project.instances}
    site_names = set(project.site)
    for inst in project.instances:
        for iv in inst.inputs.values():
            if not iv.source.link:
                continue
            target, out = iv.source.link
            where = (inst.file, iv.source.line, f"{inst.id}.{iv.name}")
            if target == "site":
                if out not in site_names:
                    problems.append(Problem(*where, f"link to site.{out}: the site has no such value; "
                                            f"available: {', '.join(sorted(site_names))}"))
                continue
            if target not in by_id:
                problems.append(Problem(*where, f"link to {target}.{out}: no instance {target!r}; "
                                        f"instances: {', '.join(by_id)}"))
                continue
            spec = by_id[target].spec
            if out not in spec.output_names and out not in spec.input_names:
                from basisbook.reading.project import _suggest

                problems.append(Problem(*where, f"link to {target}.{out}: {spec.kind} has no output "
                                        f"or input {out!r}"
                                        f"{_suggest(out, spec.output_names + spec.input_names)}"))
                continue
            deps[inst.id].append(target)
    if problems:
        raise ProjectError(problems)

    order: list[Instance] = []
    state: dict[str, int] = {}  # 1 visiting, 2 done

    def visit(iid: str, path: list[str]) -> None:
        if state.get(iid) == 2:
            return
        if state.get(iid) == 1:
            cycle = path[path.index(iid):] + [iid]
            inst = by_id[cycle[0]]
            nxt = cycle[1]
            iv = next(v for v in inst.inputs.values() if v.source.link and v.source.link[0] == nxt)
            raise ProjectError([Problem(inst.file, iv.source.line, f"{inst.id}.{iv.name}",
                                        "link cycle: " + " -> ".join(cycle))])
        state[iid] = 1
        for d in deps[iid]:
            visit(d, path + [iid])
        state[iid] = 2
        order.append(by_id[iid])

    for inst in project.instances:
        visit(inst.id, [])
    return order


def _link_value(project: Project, runs: dict[str, CalcRun], iv: InputValue) -> tuple[float | str, str]:
    target, out = iv.source.link  # type: ignore[misc]
    if target == "site":
        sv = project.site[out]
        return sv.value, sv.unit  # type: ignore[return-value]
    run = runs[target]
    if out in run.outputs:
        return run.outputs[out], run.spec.output(out).unit
    # an upstream input (a machine constant such as x_d) may be shared the same way
    upstream = run.inputs[out]
    return upstream.value, upstream.unit  # type: ignore[return-value]


def _convert_link(value: float | str, unit: str, iv: InputValue) -> float | str:
    if isinstance(value, str) or unit == iv.unit:
        return value
    from basisbook.reading.units import to_unit

    return to_unit(f"{value!r} {unit}" if unit else repr(value), iv.unit)


def _cache_key(kind: str, inputs: dict[str, InputValue]) -> str:
    # repr of floats is exact, and a Record's repr includes its source row
    return kind + "|" + "|".join(f"{k}={v.value!r}" for k, v in sorted(inputs.items()))


def run(project: Project, cache: dict[str, object] | None = None,
        on_run: Callable[[CalcRun], None] | None = None) -> list[CalcRun]:
    """Run every instance; raise ProjectError for any input problem found on the way.

    ``cache`` (kept by a long-lived process) maps a calc kind and its exact input
    values to the Result computed before: an unchanged calc is not run again.
    Entries the run did not use are dropped, so the cache stays small.
    ``on_run`` is told of each finished run at once (a build sends its figures to
    the drawing helper while later calcs are still running).
    """
    used: dict[str, object] = {}
    order = dependency_order(project)
    runs: dict[str, CalcRun] = {}
    problems: list[Problem] = []
    for inst in order:
        spec = inst.spec
        inputs: dict[str, InputValue] = {}
        bad = False
        for decl in spec.inputs:
            iv = inst.inputs[decl.name]
            if iv.source.link:
                if iv.source.link[0] != "site" and iv.source.link[0] not in runs:
                    bad = True  # upstream failed; its own problem is reported
                    continue
                raw, unit = _link_value(project, runs, iv)
                where = (inst.file, iv.source.line, f"{inst.id}.{decl.name}")
                target = ".".join(iv.source.link)
                if decl.kind == "choice":
                    if raw not in decl.choices:
                        problems.append(Problem(*where, f"linked value {raw!r} from {target} is not one of "
                                                f"{', '.join(decl.choices)}"))
                        bad = True
                        continue
                    value: float | str = raw
                else:
                    if isinstance(raw, str):
                        problems.append(Problem(*where, f"linked value from {target} is text, expected a "
                                                f"number in {decl.unit}"))
                        bad = True
                        continue
                    try:
                        value = _convert_link(raw, unit, iv)
                    except ValueError as exc:
                        problems.append(Problem(*where, f"link to {target} ({unit}): {exc}"))
                        bad = True
                        continue
                    msg = check_range(decl, value)  # type: ignore[arg-type]
                    if msg:
                        problems.append(Problem(*where, f"{msg} (linked from {target})"))
                        bad = True
                        continue
                iv = InputValue(decl.name, value, decl.unit, iv.source)
            inputs[decl.name] = iv
        if bad:
            continue
        module = catalog.module(inst.calc)
        key = _cache_key(inst.calc, inputs)
        try:
            if cache is not None and key in cache:
                result = cache[key]
            else:
                result = module.compute(Values({k: v.value for k, v in inputs.items()}))
            used[key] = result
        except InputConflict as exc:
            name = exc.key
            src = inputs[name].source if name in inputs else Source(inst.file, inst.line)
            problems.append(Problem(inst.file, src.line or inst.line, f"{inst.id}.{name}", exc.message))
            continue
        except ArithmeticError as exc:
            # a safety net, not a design: values at the far edge of their ranges can overflow or
            # divide by zero; the user gets a clean message instead of a traceback
            problems.append(Problem(inst.file, inst.line, inst.id, f"the inputs of {inst.id} lead to "
                                    f"{type(exc).__name__} ({exc}) in {inst.calc}; check values near the "
                                    "limits of their ranges"))
            continue
        missing = [o for o in spec.output_names if o not in result.outputs]
        if missing:
            raise RuntimeError(f"{inst.calc}.compute did not return {missing}")  # a bug, not input
        bad = sorted(k for k, v in result.outputs.items() if isinstance(v, float) and not math.isfinite(v))
        if bad:
            problems.append(Problem(inst.file, inst.line, inst.id, f"the inputs of {inst.id} give no finite "
                                    f"value for {', '.join(bad)}; check values near the limits of their ranges"))
            continue
        checks = []
        known = {**{k: v.value for k, v in inputs.items()}, **result.outputs}
        for c in spec.checks:
            limit = known[c.limit] if isinstance(c.limit, str) else c.limit
            checks.append(evaluate_check(c, float(result.outputs[c.value]), float(limit)))
        runs[inst.id] = CalcRun(inst, inputs, dict(result.outputs), checks, dict(result.charts),
                                dict(result.tables), list(result.warnings), cache_key=key)
        if on_run is not None and not problems:
            on_run(runs[inst.id])
    if cache is not None:
        cache.clear()
        cache.update(used)
    if problems:
        raise ProjectError(problems)
    ordered = [runs[i.id] for i in order]
    for r in ordered:
        for iv in r.inputs.values():
            if iv.source.link and iv.source.link[0] in runs:
                runs[iv.source.link[0]].used_by.setdefault(iv.source.link[1], []).append((r.id, iv.name))
    return ordered


@dataclass
class PublishedResult:
    kind: str
    title: str
    case: str
    source: str
    expected: float
    computed: float
    unit: str
    tolerance: float
    basis: str
    agrees: bool


def run_published_cases() -> list[PublishedResult]:
    """Run every module's checks against published numbers (the verification appendix)."""
    out = []
    for kind, case in catalog.published_cases():
        value, ok = case.run()
        out.append(PublishedResult(kind, catalog.spec(kind).title, case.case, case.source, case.expected,
                                   value, case.unit, case.tolerance, case.basis, ok))
    return out
