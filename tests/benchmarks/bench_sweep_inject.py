"""Benchmark: ``sweep --inject`` over the demo sets, as a ratio to loading the knowledge.

The issue's target: the whole injected sweep over the ten demo sets (every modelled fault
injected and walked twice -- nominal and band pass --, every complaint on every healthy set,
and the optimal-order bound per complaint and set) under 30 s on the project machine. Prints
the time of ``run_inject`` (demo sets' expectations loaded once, outside), of the optimal
bound alone, and of the whole ``faultwise sweep --inject --json`` command, each as seconds and
as a ratio to ``load_knowledge`` of the same folder (best of N runs).

Usage: python tests/benchmarks/bench_sweep_inject.py [KNOWLEDGE_DIR] [--runs N]
"""

from __future__ import annotations

import argparse
import subprocess
import sys
from pathlib import Path

from timing import best_s


def main() -> int:
    from faultwise.graph import load_knowledge
    from faultwise.shop.sweep import load_demo_sets
    from faultwise.shop.sweep_inject import run_inject
    from faultwise.core.workspace import bundled_knowledge_dir

    ap = argparse.ArgumentParser()
    ap.add_argument("knowledge", nargs="?")
    ap.add_argument("--runs", type=int, default=3)
    args = ap.parse_args()
    root = Path(args.knowledge) if args.knowledge else bundled_knowledge_dir()
    load = best_s(lambda: load_knowledge(root), args.runs)
    k = load_knowledge(root)
    sets = load_demo_sets(root / "sets", root)
    n_sets = sum(len(v) for v in sets.values())
    walks = best_s(lambda: run_inject(k, sets, optimal=False), args.runs)
    whole = best_s(lambda: run_inject(k, sets), args.runs)
    cmd = [sys.executable, "-m", "faultwise", "sweep", "--inject", "--json"]
    if args.knowledge:
        cmd += ["--knowledge", str(root)]
    command = best_s(lambda: subprocess.run(cmd, capture_output=True, check=False), args.runs)
    print(f"load_knowledge:                {load * 1000:8.1f} ms (1.0)")
    print(f"injected walks, {n_sets} sets:      {walks:8.2f} s  ({walks / load:.0f} x load)")
    print(f"with the optimal bound:        {whole:8.2f} s  ({whole / load:.0f} x load)")
    print(f"faultwise sweep --inject:      {command:8.2f} s  ({command / load:.0f} x load); "
          f"target under 30 s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
