"""Command line: ``basisbook build PROJECT [--out DIR]`` and ``basisbook check PROJECT``.

Exit codes: 0 done, 2 bad input (every problem printed, file:line [key] message).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from basisbook import __version__
from basisbook.errors import ProjectError


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="basisbook",
        description="Build an offline, cross-linked design-basis handbook from a project folder.",
    )
    p.add_argument("--version", action="version", version=f"basisbook {__version__}")
    sub = p.add_subparsers(dest="command", required=True)
    b = sub.add_parser("build", help="validate, run every calc and write the handbook")
    b.add_argument("project", type=Path, help="project folder (holds project.toml)")
    b.add_argument("--out", type=Path, default=Path("site"), help="site folder (default: ./site)")
    c = sub.add_parser("check", help="validate inputs and links, run the calcs, write nothing")
    c.add_argument("project", type=Path, help="project folder (holds project.toml)")
    return p


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        if args.command == "check":
            from basisbook.build import check

            runs = check(args.project)
            fails = sum(1 for r in runs for c in r.checks if c.verdict == "fails")
            review = sum(1 for r in runs for c in r.checks if c.verdict == "review")
            print(f"{args.project}: inputs valid; {len(runs)} calcs ran; design checks: "
                  f"{fails} fail, {review} to review")
            return 0
        from basisbook.build import build

        pages, out = build(args.project, args.out)
        print(f"built {pages} pages into {out}")
        return 0
    except ProjectError as exc:
        n = len(exc.problems)
        print(f"{args.project}: {n} problem{'s' if n != 1 else ''} in the inputs:", file=sys.stderr)
        for p in exc.problems:
            print(f"  {p}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("interrupted; the previous site is unchanged", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
