"""Incremental rebuilds (as in ``basisbook serve``) and scaling, measured in one run.

Prints, never asserts (the machines are noisy; compare ratios within one run):

1. in one process: a cold in-process build, then a rebuild after changing one
   value of the load list, then a rebuild after changing nothing, and their
   ratios to the cold build (targets: <= 10 % and <= 2 %);
2. scaling: generated projects with a load list of 10, 100, 1 000 and 10 000 rows
   and with 1, 5 and 20 generating units, each built cold in a fresh process:
   wall time and peak memory per size, and the growth exponent
   (d log t / d log n between the smallest and largest size).

    python bench/serve_and_scale.py [--project project] [--json] [--quick]
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import math
import re
import shutil
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(Path(__file__).resolve().parent))
from _measure import precompile, run_tree  # noqa: E402


def _child(cmd: list[str]) -> tuple[float, float]:
    """Wall time (s) and the peak memory (MB) of the whole process tree (PSS summed,
    so the figure helper counts; bench/_measure.py)."""
    sample = run_tree(cmd, ROOT)
    return sample.wall_s, sample.tree_peak_mb


def _load_list(project: Path) -> Path | None:
    """The first records file an instance names (the demo's auxiliary load list)."""
    for toml in sorted((project / "inputs").glob("*.toml")):
        m = re.search(r'^load_list\s*=\s*"([^"]+\.csv)"', toml.read_text(encoding="utf-8"), re.M)
        if m and (project / m.group(1)).is_file():
            return project / m.group(1)
    return None


def incremental(project: Path) -> dict[str, Any]:
    from basisbook.commands.build import Builder

    with tempfile.TemporaryDirectory() as tmp:
        proj = Path(tmp) / "project"
        shutil.copytree(project, proj, ignore=shutil.ignore_patterns("archive"))
        builder = Builder(proj, Path(tmp) / "site")
        t0 = time.perf_counter()
        builder.build()
        cold = time.perf_counter() - t0
        loads = _load_list(proj)
        changed = "no load list in this project: changed one TOML value instead"
        if loads is not None:
            rows = list(csv.reader(io.StringIO(loads.read_text(encoding="utf-8"))))
            h = next(i for i, r in enumerate(rows) if r and not r[0].startswith("#"))
            head = [x.strip() for x in rows[h]]
            col = head.index("load_factor") if "load_factor" in head else 2
            first = next(i for i, r in enumerate(rows) if i > h and r and not r[0].startswith("#"))
            rows[first][col] = str(round(float(re.sub(r"[^\d.]", "", rows[first][col]) or 0.8) * 0.97, 4))
            buf = io.StringIO()
            csv.writer(buf, lineterminator="\n").writerows(rows)
            loads.write_text(buf.getvalue(), encoding="utf-8")
            changed = f"{loads.relative_to(proj)}: {head[col]} of {rows[first][0]}"
        else:
            gen = proj / "inputs" / "generators.toml"
            gen.write_text(gen.read_text().replace("winding_factor = 0.915", "winding_factor = 0.916"))
        t0 = time.perf_counter()
        one = builder.build()
        one_s = time.perf_counter() - t0
        t0 = time.perf_counter()
        none = builder.build()
        none_s = time.perf_counter() - t0
    return {"cold_in_process_s": cold, "one_value_s": one_s, "nothing_s": none_s,
            "one_value_ratio": one_s / cold, "nothing_ratio": none_s / cold, "changed": changed,
            "one_value_rerun": one.rerun, "one_value_files_written": one.files_written,
            "nothing_files_written": none.files_written}


def _rows_project(project: Path, rows: int, dest: Path) -> Path:
    shutil.copytree(project, dest, ignore=shutil.ignore_patterns("archive"))
    loads = _load_list(dest)
    if loads is None:
        raise SystemExit("the project has no CSV load list to scale")
    table = [r for r in csv.reader(io.StringIO(loads.read_text(encoding="utf-8"))) if r and not r[0].startswith("#")]
    head, body = table[0], table[1:]
    out = [head]
    col = head.index("rated_power") if "rated_power" in head else None
    scale = len(body) / rows  # the total demand stays that of the demo, whatever the row count
    for i in range(rows):
        r = list(body[i % len(body)])
        r[0] = f"{r[0]}-{i:05d}"  # tags stay unique
        if col is not None:
            m = re.match(r"\s*([\d.]+)\s*(.*)", r[col])
            if m:
                r[col] = f"{float(m.group(1)) * scale:.6g} {m.group(2)}".strip()
        out.append(r)
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerows(out)
    loads.write_text(buf.getvalue(), encoding="utf-8")
    return dest


def _units_project(project: Path, units: int, dest: Path) -> Path:
    """The demo's generators file alone, with the steam turbine generator repeated."""
    dest.mkdir(parents=True)
    for f in ("project.toml", "revisions.toml"):
        shutil.copyfile(project / f, dest / f)
    (dest / "inputs").mkdir()
    text = (project / "inputs" / "generators.toml").read_text(encoding="utf-8")
    starts = [m.start() for m in re.finditer(r"^\[\[instance\]\]", text, re.M)] + [len(text)]
    block = text[starts[0]:starts[1]]
    blocks = [block.replace('id = "stg1"', f'id = "unit{i:02d}"') for i in range(units)]
    (dest / "inputs" / "generators.toml").write_text("\n".join(blocks), encoding="utf-8")
    return dest


def _exponent(sizes: list[int], times: list[float]) -> float:
    return math.log(times[-1] / times[0]) / math.log(sizes[-1] / sizes[0])


def scaling(project: Path, quick: bool) -> dict[str, Any]:
    cmd = [sys.executable, "-m", "basisbook", "build"]
    out: dict[str, Any] = {"rows": [], "units": []}
    with tempfile.TemporaryDirectory() as tmp:
        tmpd = Path(tmp)
        if _load_list(project) is not None:
            for n in ([10, 100, 1000] if quick else [10, 100, 1000, 10000]):
                p = _rows_project(project, n, tmpd / f"rows{n}")
                wall, rss = _child(cmd + [str(p), "--out", str(tmpd / f"site-rows{n}")])
                out["rows"].append({"size": n, "wall_s": wall, "peak_mb": rss})
        for n in ([1, 5] if quick else [1, 5, 20]):
            p = _units_project(project, n, tmpd / f"units{n}")
            wall, rss = _child(cmd + [str(p), "--out", str(tmpd / f"site-units{n}")])
            out["units"].append({"size": n, "wall_s": wall, "peak_mb": rss})
    for key in ("rows", "units"):
        pts = out[key]
        if len(pts) >= 2:
            out[f"{key}_exponent"] = _exponent([p["size"] for p in pts], [p["wall_s"] for p in pts])
            out[f"{key}_largest_over_smallest"] = pts[-1]["wall_s"] / pts[0]["wall_s"]
    return out


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--project", type=Path, default=ROOT / "project")
    ap.add_argument("--json", action="store_true")
    ap.add_argument("--quick", action="store_true", help="smaller sizes, for a smoke run")
    args = ap.parse_args(argv)
    precompile(ROOT)  # before anything of ours is imported (see bench/_measure.py)
    doc = {"incremental": incremental(args.project), "scaling": scaling(args.project, args.quick)}
    if args.json:
        print(json.dumps(doc, indent=1))
        return 0
    inc = doc["incremental"]
    print("incremental rebuild in one process (as basisbook serve does)")
    print(f"  cold in-process build            {inc['cold_in_process_s']:7.3f} s")
    print(f"  after changing one value         {inc['one_value_s']:7.3f} s   ratio {inc['one_value_ratio']:.3f}"
          f"  (target <= 0.10)  [{inc['changed']}; re-ran {', '.join(inc['one_value_rerun']) or 'nothing'}; "
          f"{inc['one_value_files_written']} files written]")
    print(f"  after changing nothing           {inc['nothing_s']:7.3f} s   ratio {inc['nothing_ratio']:.3f}"
          f"  (target <= 0.02)  [{inc['nothing_files_written']} files written]")
    sc = doc["scaling"]
    for key, label in (("rows", "load-list rows"), ("units", "generating units")):
        if not sc[key]:
            continue
        print(f"scaling with {label} (cold build in a fresh process)")
        for p in sc[key]:
            print(f"  {p['size']:>6}  {p['wall_s']:7.3f} s  {p['peak_mb']:7.1f} MB")
        print(f"  growth exponent {sc[key + '_exponent']:.3f} (1 = linear); largest/smallest "
              f"{sc[key + '_largest_over_smallest']:.2f}x")
    return 0


if __name__ == "__main__":
    sys.exit(main())
