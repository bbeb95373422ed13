"""Run every tests/benchmarks/bench_*.py script and print their ratios in one table.

Each script runs as a subprocess with this interpreter (so one slow or broken script does
not stop the others); its output is kept, and the figures DESIGN section 12 sets targets
for are picked out of it. A script this runner does not know still shows every line of its
output that names a ratio or a target.

    python tests/benchmarks/run_all.py [--quick] [--results FILE]

``--quick`` passes smaller run counts (fewer TUI starts, 2,000 review cases) for a fast
look; the figures to publish come from a run without it. ``--results FILE`` also writes the
table, the command and each script's full output as Markdown (tests/benchmarks/RESULTS.md).
"""

from __future__ import annotations

import argparse
import platform
import re
import subprocess
import sys
import time
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]

#: per script: the arguments of a quick run
QUICK_ARGS = {"bench_tui_start.py": ["5"], "bench_review.py": ["2000"], "bench_walk_step.py": ["10"],
              "bench_lint.py": ["--runs", "3"], "bench_sweep.py": ["--runs", "3"]}

_NUM = r"([0-9]+(?:\.[0-9]+)?)"


@dataclass(frozen=True)
class Figure:
    """One measured figure: what it is, its value as printed, and its target."""

    bench: str
    measure: str
    value: str
    target: str


#: per script: (measure, regex with one group for the value, target)
EXTRACT = {
    "bench_tui_start.py": [
        ("TUI start / bare Textual app", rf"^ratio: {_NUM}", "<= 1.5 (aim 1.2)"),
    ],
    "bench_lint.py": [
        ("lint / C-loader parse, warm", rf"^warm:.*ratio {_NUM}", "<= 2"),
        ("lint / C-loader parse, cold", rf"^cold.*ratio {_NUM}", "none (dropped)"),
    ],
    "bench_review.py": [
        ("review: closed cases generated", rf"^cases: {_NUM}", "10,000"),
        ("review first run / json parse", rf"^review, first run.*ratio {_NUM}x", "<= 2"),
        ("review second run in-process (index only), s", rf"^review, second run.*: {_NUM} s",
         ""),
        ("review --json second run, whole process, s", rf"whole process: {_NUM} s", "< 0.5 s"),
        ("  the same, CPU s", rf"whole process: .*CPU {_NUM} s;", ""),
        ("  bare 'python -c pass', s", rf"python -c pass': {_NUM} s", ""),
    ],
    "bench_walk_step.py": [
        ("walk step, key to next check, p95 ms", rf"^95th percentile: {_NUM} ms", "< 50 ms"),
        ("walk step, median ms", rf"^median: {_NUM} ms", ""),
        ("pilot floor (unbound key), median ms", rf"harness floor\): median {_NUM} ms", ""),
    ],
    "bench_expect.py": [
        ("slowest expect(), ms", rf"^slowest expect\(\): {_NUM} ms", "well under 100 ms"),
    ],
    "bench_sweep_inject.py": [
        ("injected walks, 10 sets, s", rf"^injected walks, 10 sets:\s+{_NUM} s", ""),
        ("the same with the optimal bound, s", rf"^with the optimal bound:\s+{_NUM} s", ""),
        ("'faultwise sweep --inject', s", rf"^faultwise sweep --inject:\s+{_NUM} s", "< 30 s"),
    ],
    "bench_sweep.py": [
        ("sweep / load_knowledge", rf"^ratio sweep / load: {_NUM}", "none set"),
        ("sweep mean checks / entropy bits", rf"^mean checks .* ratio {_NUM}", "<= 1.5 (aim 1.3)"),
        ("'faultwise sweep --json', s", rf"^'faultwise sweep --json', whole process: {_NUM} s", ""),
    ],
}


def bench_scripts() -> list[Path]:
    return sorted(HERE.glob("bench_*.py"))


def run_script(path: Path, quick: bool, timeout_s: float) -> tuple[int, str, float]:
    """Run one script; (exit status, combined output, seconds). Status 124 on a timeout."""
    args = QUICK_ARGS.get(path.name, []) if quick else []
    t0 = time.perf_counter()
    try:
        out = subprocess.run([sys.executable, str(path), *args], capture_output=True, text=True,
                             cwd=ROOT, timeout=timeout_s, check=False)
        code, text = out.returncode, out.stdout + out.stderr
    except subprocess.TimeoutExpired as exc:
        code, text = 124, f"{exc.stdout or ''}timed out after {timeout_s:.0f} s"
    return code, text if isinstance(text, str) else text.decode(), time.perf_counter() - t0


def expect_worst_ratio(text: str) -> str | None:
    """bench_expect prints a ratio per set (expect ms / parse ms): the largest."""
    ratios = [float(m.group(1)) for m in re.finditer(r"\s([0-9.]+)\s+\d+\s*$", text, re.MULTILINE)]
    return f"{max(ratios):.1f}" if ratios else None


def figures_of(name: str, code: int, text: str) -> list[Figure]:
    bench = name.removesuffix(".py")
    out: list[Figure] = []
    for measure, pattern, target in EXTRACT.get(name, []):
        m = re.search(pattern, text, re.MULTILINE)
        out.append(Figure(bench, measure, m.group(1) if m else "n/a", target))
    if name == "bench_expect.py":
        worst = expect_worst_ratio(text)
        out.append(Figure(bench, "expect / profile YAML parse, worst set", worst or "n/a", ""))
    if name not in EXTRACT:
        for line in text.splitlines():
            if "ratio" in line or "target" in line:
                out.append(Figure(bench, line.strip()[:60], "", ""))
    if code != 0:
        last = text.strip().splitlines()[-1] if text.strip() else ""
        out.append(Figure(bench, f"FAILED (exit {code})", last[:60], ""))
    return out


def table(figures: list[Figure]) -> list[str]:
    wb = max([len("bench")] + [len(f.bench) for f in figures])
    wm = max([len("measure")] + [len(f.measure) for f in figures])
    wv = max([len("value")] + [len(f.value) for f in figures])
    lines = [f"| {'bench':<{wb}} | {'measure':<{wm}} | {'value':>{wv}} | target |",
             f"|{'-' * (wb + 2)}|{'-' * (wm + 2)}|{'-' * (wv + 1)}:|--------|"]
    lines += [f"| {f.bench:<{wb}} | {f.measure:<{wm}} | {f.value:>{wv}} | {f.target} |"
              for f in figures]
    return lines


def results_markdown(command: str, figures: list[Figure], outputs: list[tuple[str, str]],
                     seconds: float) -> str:
    when = datetime.now(UTC).astimezone().isoformat(timespec="seconds")
    cpu = platform.processor() or platform.machine()
    parts = ["# Benchmark results", "",
             "Written by `tests/benchmarks/run_all.py`; do not edit by hand.", "",
             f"- command: `{command}` (from the repository root)",
             f"- when: {when}; {seconds:.0f} s in all",
             (f"- machine: {platform.system()} {cpu}, Python {platform.python_version()}; "
              "the machine is shared, so figures vary by some tens of per cent run to run"), "",
             *table(figures), "", "## Output of each script", ""]
    for name, text in outputs:
        parts += [f"### {name}", "", "```", text.rstrip(), "```", ""]
    return "\n".join(parts)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="smaller run counts")
    ap.add_argument("--results", metavar="FILE", help="also write a Markdown results file")
    ap.add_argument("--timeout", type=float, default=1200, metavar="S",
                    help="seconds allowed per script (default 1200)")
    args = ap.parse_args(argv)
    t0 = time.perf_counter()
    figures: list[Figure] = []
    outputs: list[tuple[str, str]] = []
    failed = 0
    for path in bench_scripts():
        print(f"running {path.name} ...", file=sys.stderr, flush=True)
        code, text, secs = run_script(path, args.quick, args.timeout)
        failed += code != 0
        figures += figures_of(path.name, code, text)
        outputs.append((path.name, text + f"\n[{secs:.1f} s, exit {code}]"))
    print("\n".join(table(figures)))
    if args.results:
        command = "python tests/benchmarks/run_all.py" + (" --quick" if args.quick else "") + \
            f" --results {args.results}"
        Path(args.results).write_text(
            results_markdown(command, figures, outputs, time.perf_counter() - t0), encoding="utf-8")
        print(f"\nwritten to {args.results}")
    return 1 if failed else 0


if __name__ == "__main__":
    raise SystemExit(main())
