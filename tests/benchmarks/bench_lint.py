"""Benchmark: ``lint`` of a knowledge folder against parsing the same YAML with PyYAML's C loader.

DESIGN section 12 target: lint at most 2x the parse. Prints both ratios:
- warm: in one process, best of N runs each (networkx already imported);
- cold: a fresh interpreter each, which includes importing networkx and faultwise.

Usage: python tests/benchmarks/bench_lint.py [KNOWLEDGE_DIR] [--runs N]
(default: the bundled knowledge, or tests/fixtures/kb_small while that is still empty).
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import time
from pathlib import Path

import yaml

HERE = Path(__file__).resolve().parent


def yaml_files(root: Path) -> list[Path]:
    from faultwise.graph.knowledge import knowledge_files

    return knowledge_files(root)


def parse_only(root: Path) -> None:
    for path in yaml_files(root):
        yaml.load(path.read_bytes(), Loader=yaml.CSafeLoader)


def run_lint(root: Path) -> None:
    from faultwise.graph.lint import lint

    report = lint(root)
    assert report.summary.get("loaded"), [f.text() for f in report.errors[:5]]


def best_of(fn, root: Path, runs: int) -> float:
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        fn(root)
        times.append(time.perf_counter() - t0)
    return min(times)


def cold(code: str, runs: int) -> float:
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-c", code], check=True)
        times.append(time.perf_counter() - t0)
    return min(times)


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("knowledge", nargs="?")
    ap.add_argument("--runs", type=int, default=5)
    args = ap.parse_args()
    if args.knowledge:
        root = Path(args.knowledge)
    else:
        from faultwise.core.workspace import bundled_knowledge_dir

        root = bundled_knowledge_dir()
        if not (root / "symptoms.yaml").is_file():
            root = HERE.parent / "fixtures" / "kb_small"
    size = sum(p.stat().st_size for p in yaml_files(root))
    print(f"knowledge: {root} ({len(yaml_files(root))} files, {size / 1024:.0f} KiB)")
    run_lint(root)                              # warm the imports
    parse_s = best_of(parse_only, root, args.runs)
    lint_s = best_of(run_lint, root, args.runs)
    print(f"warm: parse {parse_s * 1000:.1f} ms, lint {lint_s * 1000:.1f} ms, "
          f"ratio {lint_s / parse_s:.2f} (target <= 2)")
    setup = f"import sys; sys.path.insert(0, {str(HERE)!r}); import bench_lint as b; " \
            f"from pathlib import Path; r = Path({str(root)!r}); "
    base_s = cold("pass", args.runs)
    cparse = cold(setup + "b.parse_only(r)", args.runs) - base_s
    clint = cold(setup + "b.run_lint(r)", args.runs) - base_s
    print(f"cold (interpreter start {base_s * 1000:.0f} ms subtracted): parse "
          f"{cparse * 1000:.0f} ms, lint {clint * 1000:.0f} ms, ratio {clint / cparse:.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
