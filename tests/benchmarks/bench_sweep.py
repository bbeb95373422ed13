"""Benchmark: ``sweep`` of the knowledge, as a ratio to loading the same knowledge.

DESIGN section 12 sets quality targets for the sweep (every signature isolated, mean checks
at most 1.5 x the entropy, better than every baseline) and no time target; this prints how
long a full sweep takes (every signature walked with the p/c order and the three baseline
orders, demo sets' expectations included) against ``load_knowledge`` of the same folder,
in one process, best of N runs each, plus the whole ``faultwise sweep --json`` command.

Usage: python tests/benchmarks/bench_sweep.py [KNOWLEDGE_DIR] [--runs N]
(default: the bundled knowledge, or tests/fixtures/kb_sweep when that does not load).
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import time
from pathlib import Path

from timing import best_s

HERE = Path(__file__).resolve().parent


def knowledge_dir(given: str | None) -> Path:
    from faultwise.core.errors import FaultwiseError
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.core.workspace import bundled_knowledge_dir

    if given:
        return Path(given)
    root = bundled_knowledge_dir()
    try:
        load_knowledge(root)
        return root
    except FaultwiseError as exc:
        print(f"bundled knowledge does not load ({exc}); using the test fixture")
        return HERE.parent / "fixtures" / "kb_sweep"


def main() -> int:
    from faultwise.calc.rectifier import simulate
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.shop.sweep import load_demo_sets, run_sweep

    ap = argparse.ArgumentParser()
    ap.add_argument("knowledge", nargs="?")
    ap.add_argument("--runs", type=int, default=5)
    args = ap.parse_args()
    root = knowledge_dir(args.knowledge)
    sets_dir = root / "sets"
    result = {}

    def sweep_once():
        simulate.cache_clear()
        knowledge = load_knowledge(root)
        result["report"] = run_sweep(knowledge, load_demo_sets(sets_dir, root))

    sweep_once()                                   # warm imports and file cache
    load_s = best_s(lambda: load_knowledge(root), args.runs)
    sweep_s = best_s(sweep_once, args.runs)
    rep = result["report"]
    walks = rep.signatures * (1 + len(rep.baselines or {}))
    print(f"knowledge: {root}")
    print(f"signatures: {rep.signatures} ({rep.isolated} isolated), {walks} walks with the "
          f"baselines")
    print(f"load_knowledge: {load_s * 1000:.1f} ms")
    print(f"sweep (load + sets + every walk): {sweep_s * 1000:.1f} ms, "
          f"{(sweep_s - load_s) / max(walks, 1) * 1000:.2f} ms per walk")
    print(f"ratio sweep / load: {sweep_s / load_s:.2f}")
    t0 = time.perf_counter()
    out = subprocess.run([sys.executable, "-m", "faultwise", "sweep", "--json",
                          "--knowledge", str(root), "--cases", str(HERE / "no-cases")],
                         capture_output=True, text=True, check=False)
    cli_s = time.perf_counter() - t0
    doc = json.loads(out.stdout) if out.stdout.strip() else {}
    print(f"'faultwise sweep --json', whole process: {cli_s:.2f} s (exit {out.returncode}, "
          f"{doc.get('isolated')}/{doc.get('signatures')} isolated)")
    print(f"mean checks {rep.mean_checks:.2f} over {rep.entropy_bits:.2f} bits: ratio "
          f"{(rep.ratio or 0):.2f} (target <= 1.5, aim 1.3)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
