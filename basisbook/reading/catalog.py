"""The calc modules available to a project: every module in ``calcs/`` (``basisbook.calcs``) with a SPEC."""

from __future__ import annotations

import importlib
import pkgutil
from functools import lru_cache
from types import ModuleType

from basisbook.contract.spec import CalcSpec, PublishedCase

_NOT_CALCS = {"glossary"}


@lru_cache(maxsize=1)
def _modules() -> dict[str, ModuleType]:
    from basisbook import calcs

    found: dict[str, ModuleType] = {}
    for info in sorted(pkgutil.iter_modules(calcs.__path__), key=lambda i: i.name):
        if info.name in _NOT_CALCS or info.name.startswith("_"):
            continue
        mod = importlib.import_module(f"basisbook.calcs.{info.name}")
        spec = getattr(mod, "SPEC", None)
        if isinstance(spec, CalcSpec) and callable(getattr(mod, "compute", None)):
            found[spec.kind] = mod
    return found


def kinds() -> list[str]:
    return list(_modules())


def module(kind: str) -> ModuleType:
    return _modules()[kind]


def spec(kind: str) -> CalcSpec:
    return _modules()[kind].SPEC


def published_cases() -> list[tuple[str, PublishedCase]]:
    """Every module's checks against published numbers, as (kind, case)."""
    return [(kind, case) for kind, mod in _modules().items()
            for case in getattr(mod, "PUBLISHED_CASES", ())]
