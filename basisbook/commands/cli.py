"""Command line: ``basisbook build PROJECT [--out DIR]`` and ``basisbook check PROJECT``.

Exit codes: 0 done, 2 bad input (every problem printed, file:line [key] message), 1 a failed
``verify`` or a failure of the machine (full disk, read-only folder, port in use), in one line.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from basisbook import __version__
from basisbook.contract.errors import EnvironmentFailure, ProjectError


def _port(text: str) -> int:
    """A TCP port number, 0 to 65535 (0: the system picks a free one)."""
    try:
        n = int(text, 10)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number from 0 to 65535, got {text!r}") from None
    if not 0 <= n <= 65535:
        raise argparse.ArgumentTypeError(f"expected a port from 0 to 65535, got {n}")
    return n


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
    c.add_argument("--inputs-only", action="store_true",
                   help="validate files, units, ranges and links without running the calcs (fastest)")
    a = sub.add_parser("archive", help="freeze the current revision into PROJECT/archive/rev-<id>/")
    a.add_argument("project", type=Path, help="project folder (holds project.toml)")
    v = sub.add_parser("verify", help="prove an archived revision unchanged (exit 1 on any mismatch)")
    v.add_argument("snapshot", type=Path, help="snapshot folder PROJECT/archive/rev-<id> or its .zip")
    v.add_argument("--rebuild", action="store_true",
                   help="also recompute from the archived inputs and report every result that moved")
    v.add_argument("--seal", metavar="SHA256", default=None,
                   help="the manifest seal recorded when the revision was issued (archive prints it); "
                        "verify fails unless the manifest matches it")
    w = sub.add_parser("serve", help="build, serve on 127.0.0.1 and rebuild on every save")
    w.add_argument("project", type=Path, help="project folder (holds project.toml)")
    w.add_argument("--out", type=Path, default=Path("site"), help="site folder (default: ./site)")
    w.add_argument("--port", type=_port, default=8765, help="port on 127.0.0.1 (default: 8765; 0 picks one)")
    f = sub.add_parser("pdf", help="build, then print the one-document view to PDF (headless chromium)")
    f.add_argument("project", type=Path, help="project folder (holds project.toml)")
    f.add_argument("--out", type=Path, default=Path("site"), help="site folder (default: ./site)")
    f.add_argument("--pdf", type=Path, default=None,
                   help="PDF file (default: handbook-rev<id>.pdf beside the site folder)")
    f.add_argument("--paper", choices=("a4", "letter"), default="a4", help="paper size (default: a4)")
    d = sub.add_parser("diff", help="what changed between two revisions")
    d.add_argument("project", type=Path, help="project folder (holds project.toml)")
    d.add_argument("old", help="revision id (archived)")
    d.add_argument("new", help="revision id (archived, or the current revision)")
    return p


def _run(args: argparse.Namespace) -> int:
    if args.command == "check":
        from basisbook.commands.build import check

        runs = check(args.project, run_calcs=not args.inputs_only)
        if args.inputs_only:
            print(f"{args.project}: inputs and links valid (calcs not run: `check` without "
                  "--inputs-only also catches conflicts found while computing)")
            return 0
        fails = sum(1 for r in runs for c in r.checks if c.verdict == "fails")
        review = sum(1 for r in runs for c in r.checks if c.verdict == "review")
        warnings = sum(len(r.warnings) for r in runs)
        print(f"{args.project}: inputs valid; {len(runs)} calcs ran; design checks: "
              f"{fails} fail, {review} to review; {warnings} plausibility warnings")
        return 0
    if args.command == "build":
        from basisbook.commands.build import build

        pages, out = build(args.project, args.out)
        print(f"built {pages} pages into {out}")
        return 0
    if args.command == "serve":
        from basisbook.commands.serve import serve

        return serve(args.project, args.out, args.port)
    if args.command == "pdf":
        from basisbook.commands.build import build
        from basisbook.commands.pdf import print_pdf
        from basisbook.reading.project import load

        pages, out = build(args.project, args.out)
        target = args.pdf or out.parent / f"handbook-rev{load(args.project).revision.id}.pdf"
        print(f"built {pages} pages into {out}; printed {print_pdf(out, target, paper=args.paper)}")
        return 0
    if args.command == "archive":
        from basisbook.commands.build import snapshot_site
        from basisbook.revisions.archive import archive
        from basisbook.revisions.snapshot import MANIFEST, seal_path, sha256

        dest = archive(args.project, make_site=snapshot_site)
        print(f"archived revision {dest.name.removeprefix('rev-')} into {dest} (and {dest.name}.zip); "
              f"manifest seal {sha256(dest / MANIFEST)} (in {seal_path(dest).name}: record it with the "
              "issue, `basisbook verify --seal` checks it)")
        return 0
    if args.command == "verify":
        from basisbook.revisions.verify import verify

        v = verify(args.snapshot, rebuild=args.rebuild, expect_seal=args.seal)
        for label, names in (("added", v.added), ("missing", v.missing), ("changed", v.changed)):
            for n in names:
                print(f"{label}: {n}")
        for line in v.result_changes:
            print(f"result moved on rebuild: {line}")
        for why in v.problems:
            print(f"{args.snapshot}: not verified: {why}", file=sys.stderr)
        if v.ok:
            beside = "; its zip verified too" if v.zip_checked else "; no zip beside it to check"
            also = ((beside if args.snapshot.is_dir() else "")
                    + ("; rebuild gives the same results" if args.rebuild else ""))
            if v.format == 1:
                given = "matches the seal given" if args.seal else \
                    "carries no seal, so the approver, dates and versions in it cannot be proven unchanged"
                print(f"{args.snapshot}: revision {v.revision} verified (format 1, unsealed: its {v.checked} "
                      f"files unchanged, but the manifest {given}; manifest SHA-256 {v.seal}){also}")
            else:
                print(f"{args.snapshot}: revision {v.revision} verified, {v.checked} files unchanged, "
                      f"manifest sealed (seal {v.seal}){also}")
            return 0
        if v.added or v.missing or v.changed:
            print(f"{args.snapshot}: revision {v.revision} does NOT match its manifest", file=sys.stderr)
        return 1
    if args.command == "diff":
        from basisbook.reading.project import load
        from basisbook.revisions.diff import compare, report, results_for

        tol = load(args.project).change_tolerance
        print(report(compare(results_for(args.project, args.old), results_for(args.project, args.new), tol)))
        return 0
    raise AssertionError(args.command)


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        return _run(args)
    except ProjectError as exc:
        n = len(exc.problems)
        where = getattr(args, "project", None) or getattr(args, "snapshot", "")
        print(f"{where}: {n} problem{'s' if n != 1 else ''}:", file=sys.stderr)
        for p in exc.problems:
            print(f"  {p}", file=sys.stderr)
        return 2
    except EnvironmentFailure as exc:
        print(f"basisbook {args.command}: {exc}", file=sys.stderr)
        return 1
    except OSError as exc:
        # the machine, not the input: a full disk, a read-only folder, a vanished file
        where = f" ({exc.filename})" if exc.filename else ""
        print(f"basisbook {args.command}: {exc.strerror or exc}{where}; nothing was replaced", file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print("interrupted; the previous site and archives are unchanged", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
