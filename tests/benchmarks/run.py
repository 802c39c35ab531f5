"""realquad's benchmark runner: one table of workloads, each timed against its reference.

Run from the repository root::

    python tests/benchmarks/run.py                  # every workload
    python tests/benchmarks/run.py -k pell -k cfrac # names containing "pell" or "cfrac"
    python tests/benchmarks/run.py --pure           # also time the pure-Python kernels
    python tests/benchmarks/run.py --markdown       # the table as Markdown (docs/performance.md)
    python tests/benchmarks/run.py --best           # fastest repeat instead of the median
    python tests/benchmarks/run.py --list           # names only

Contract for workload modules
-----------------------------
Every module ``tests/benchmarks/bench_*.py`` defines ``workloads() -> list[dict]``;
each dict describes one workload with the keys

``name`` (str)
    unique, starting with the module's topic (``"pell: …"``, ``"forms: …"``);
``run`` (zero-argument callable)
    the realquad work to time;
``reference`` (zero-argument callable or None)
    the same job done another way (a general-purpose library, the pure twin, …);
``reference_name`` (str or None)
    what the reference is;
``repeat`` (int)
    how many times each callable runs; the table shows the median.

and optionally ``reference_repeat`` (int, default ``repeat``: a slow reference may
run fewer times), ``count`` (int) with ``unit`` (str), the number of items one
run handles (the table then shows the rate, e.g. steps per second), and
``target`` (str), the figure the workload must meet, printed beside it.

Everything is measured in one process run, on the machine described in the
table's header; ratios are reference time / realquad time. With ``--pure``
the same workloads run once more in a subprocess with ``REALQUAD_PURE=1`` and
the table gains the pure-Python time and the speed-up of the compiled
kernels. A module that fails to import, or a workload that raises, is
reported in the table and the others still run. The timings are wall-clock
(``time.perf_counter``); on a machine shared with other work they vary, which
the median damps but does not remove; ``--best`` reports the fastest repeat
instead, closer to what the code costs on an idle machine.
"""

from __future__ import annotations

import argparse
import importlib.util
import json
import os
import platform
import statistics
import subprocess
import sys
import time
import traceback
from collections.abc import Callable
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
REQUIRED_KEYS = {"name": str, "repeat": int}


def load_workloads(selectors: list[str]) -> tuple[list[dict[str, Any]], list[str]]:
    """All workloads of ``bench_*.py`` whose names contain one of ``selectors`` (all if none)."""
    found: list[dict[str, Any]] = []
    problems: list[str] = []
    for path in sorted(HERE.glob("bench_*.py")):
        try:
            spec = importlib.util.spec_from_file_location(f"realquad_bench_{path.stem}", path)
            assert spec is not None and spec.loader is not None
            module = importlib.util.module_from_spec(spec)
            spec.loader.exec_module(module)
            items = module.workloads()
        except Exception as exc:  # report, keep going: one broken module must not stop the rest
            problems.append(f"{path.name}: could not load workloads ({type(exc).__name__}: {exc})")
            continue
        for item in items:
            if any(
                not isinstance(item.get(k), t) for k, t in REQUIRED_KEYS.items()
            ) or not callable(item.get("run")):
                problems.append(f"{path.name}: a workload does not follow the contract: {item!r}")
                continue
            if not selectors or any(s.lower() in item["name"].lower() for s in selectors):
                found.append(item)
    return found, problems


#: How the repeated timings of one callable become one figure (``--best`` switches to ``min``).
SUMMARY: dict[str, Callable[[list[float]], float]] = {"summary": statistics.median}


def median_time(fn: Callable[[], Any], repeat: int) -> float:
    times = []
    for _ in range(max(1, repeat)):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return SUMMARY["summary"](times)


def measure(item: dict[str, Any], with_reference: bool) -> dict[str, Any]:
    """Time one workload (and its reference); errors become part of the row."""
    row: dict[str, Any] = {"name": item["name"], "reference_name": item.get("reference_name")}
    try:
        row["time"] = median_time(item["run"], item["repeat"])
    except Exception as exc:
        row["error"] = f"{type(exc).__name__}: {exc}"
        if os.environ.get("REALQUAD_DEBUG"):
            traceback.print_exc()
        return row
    reference = item.get("reference")
    if with_reference and reference is not None:
        try:
            row["reference_time"] = median_time(
                reference, item.get("reference_repeat", item["repeat"])
            )
        except Exception as exc:
            row["error"] = f"reference failed: {type(exc).__name__}: {exc}"
    if item.get("count"):
        row["rate"] = item["count"] / row["time"]
        row["unit"] = item.get("unit", "items")
    row["target"] = item.get("target")
    return row


def machine() -> str:
    """One line naming the machine, Python, GMP and the kernels in use."""
    import gmpy2

    from realquad._backend import BACKEND

    cpu = platform.processor() or platform.machine()
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    return (
        f"{cpu}, {os.cpu_count()} cores; Python {platform.python_version()}; "
        f"gmpy2 {gmpy2.version()} ({gmpy2.mp_version()}); kernels: {BACKEND}"
    )


def _seconds(t: float | None) -> str:
    if t is None:
        return "—"
    return f"{t:.4f}" if t < 10 else f"{t:.1f}"


def _rate(row: dict[str, Any]) -> str:
    if "rate" not in row:
        return ""
    r = row["rate"]
    scaled = f"{r / 1e6:.1f} M" if r >= 1e6 else f"{r / 1e3:.1f} k" if r >= 1e3 else f"{r:.1f}"
    return f"{scaled} {row['unit']}/s"


def table(
    rows: list[dict[str, Any]], pure: dict[str, dict[str, Any]] | None, markdown: bool
) -> str:
    head = ["workload", "realquad s", "reference", "reference s", "ratio", "rate", "target"]
    if pure is not None:
        head[2:2] = ["pure-Python s", "compiled speed-up"]
    lines = []
    for row in rows:
        if "error" in row and "time" not in row:
            cells = [row["name"], "error: " + row["error"]] + [""] * (len(head) - 2)
            lines.append(cells)
            continue
        t, ref = row.get("time"), row.get("reference_time")
        ratio = f"{ref / t:.1f}×" if ref and t else "—"
        cells = [
            row["name"],
            _seconds(t),
            row.get("reference_name") or "—",
            _seconds(ref) + (" (" + row["error"] + ")" if "error" in row else ""),
            ratio,
            _rate(row),
            row.get("target") or "",
        ]
        if pure is not None:
            p = pure.get(row["name"], {}).get("time")
            cells[2:2] = [_seconds(p), f"{p / t:.1f}×" if p and t else "—"]
        lines.append(cells)
    if markdown:
        out = ["| " + " | ".join(head) + " |", "|" + "---|" * len(head)]
        out += ["| " + " | ".join(c.replace("|", "\\|") for c in cells) + " |" for cells in lines]
        return "\n".join(out)
    widths = [
        max(len(h), *(len(c[i]) for c in lines)) if lines else len(h) for i, h in enumerate(head)
    ]
    fmt = "  ".join("{:<" + str(w) + "}" for w in widths)
    out = [fmt.format(*head), fmt.format(*("-" * w for w in widths))]
    out += [fmt.format(*cells) for cells in lines]
    return "\n".join(out)


def run_pure(selectors: list[str]) -> dict[str, dict[str, Any]]:
    """The same workloads in a subprocess on the pure-Python kernels (no references)."""
    args = [sys.executable, str(Path(__file__).resolve()), "--emit-json", "--no-reference"]
    if SUMMARY["summary"] is min:
        args.append("--best")
    for s in selectors:
        args += ["-k", s]
    env = dict(os.environ, REALQUAD_PURE="1")
    done = subprocess.run(args, env=env, capture_output=True, text=True, check=False)
    if done.returncode != 0:
        print(f"pure-Python run failed:\n{done.stderr}", file=sys.stderr)
        return {}
    return {row["name"]: row for row in json.loads(done.stdout)["rows"]}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument(
        "-k",
        dest="selectors",
        action="append",
        default=[],
        help="run workloads whose name contains this (repeatable)",
    )
    parser.add_argument(
        "--pure",
        action="store_true",
        help="also time the pure-Python kernels (subprocess, REALQUAD_PURE=1)",
    )
    parser.add_argument("--no-reference", action="store_true", help="skip the reference timings")
    parser.add_argument("--markdown", action="store_true", help="print the table as Markdown")
    parser.add_argument(
        "--best",
        action="store_true",
        help="report the fastest of the repeats instead of the median (for a machine shared with other work)",
    )
    parser.add_argument("--list", action="store_true", help="list the workloads and stop")
    parser.add_argument("--emit-json", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.best:
        SUMMARY["summary"] = min

    items, problems = load_workloads(args.selectors)
    if args.list:
        for item in items:
            print(item["name"])
        for p in problems:
            print(p, file=sys.stderr)
        return 0
    rows = []
    for item in items:
        if not args.emit_json:
            print(f"… {item['name']}", file=sys.stderr, flush=True)
        rows.append(measure(item, not args.no_reference))
    if args.emit_json:
        json.dump({"machine": machine(), "rows": rows}, sys.stdout)
        return 0
    pure = run_pure(args.selectors) if args.pure else None
    print(f"machine: {machine()}")
    kind = "fastest" if args.best else "medians"
    load = f"; load average {os.getloadavg()[0]:.1f}" if hasattr(os, "getloadavg") else ""
    stamp = time.strftime("%Y-%m-%d %H:%M UTC", time.gmtime())
    print(f"date: {stamp}{load}; times are {kind} of `repeat` runs in this process")
    print()
    print(table(rows, pure, args.markdown))
    for p in problems:
        print(f"note: {p}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
