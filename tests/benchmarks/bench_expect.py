"""Benchmark: expect() on each demo set, as a ratio to parsing the same profile YAML.

Run: /work/.venv/bin/python tests/benchmarks/bench_expect.py   (not collected by pytest)

DESIGN section 12: expect for one profile, every worst-case corner included, well under
100 ms. The rectifier cache is cleared before every run, so each timing includes every
simulation; the tube table is loaded once beforehand, as in a running session.
"""

from __future__ import annotations

import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
SETS = ROOT / "knowledge" / "sets"
REPEAT = 7


def best_ms(fn) -> float:
    """Best of REPEAT runs, in milliseconds."""
    best = float("inf")
    for _ in range(REPEAT):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best * 1000.0


def main() -> int:
    from faultwise.calc.rectifier import simulate
    from faultwise.expect.expected import expect
    from faultwise.profile.load import load_profile
    from faultwise.profile.tubes import load_tube_table
    from faultwise.core.yamlload import load_yaml_text

    table = load_tube_table()
    sets = sorted(SETS.glob("*.yaml"))
    if not sets:
        print("no demo sets in", SETS)
        return 1
    print(f"{'set':<34} {'parse ms':>9} {'expect ms':>10} {'ratio':>7} {'names':>6}")
    worst = 0.0
    for path in sets:
        text = path.read_text(encoding="utf-8")
        profile = load_profile(path)
        parse = best_ms(lambda text=text, path=path: load_yaml_text(text, str(path)))

        def run(profile=profile):
            simulate.cache_clear()
            return expect(profile, tube_table=table)

        ms = best_ms(run)
        worst = max(worst, ms)
        print(f"{path.name:<34} {parse:9.2f} {ms:10.2f} {ms / parse:7.1f} {len(run()):6d}")
    print(f"slowest expect(): {worst:.1f} ms (target: well under 100 ms)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
