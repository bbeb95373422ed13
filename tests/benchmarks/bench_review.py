"""Review of 10,000 closed cases: first run against plain json parsing, and a second run.

Prints (DESIGN section 12 targets): the first review's time over the time to read and
parse the same files with the standard json module (target at most 2x), and the second
review's seconds with nothing changed, in-process (index only) and as a command; the
command's second run is answered from the review cache (faultwise.shop.review_cache), and
its whole-process time is the one with the 0.5 s target.

    python tests/benchmarks/bench_review.py [N]
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from make_cases import make_cases  # noqa: E402


def plain_parse_s(folder: Path) -> float:
    """Read and json.loads every case file, as a reader without an index would."""
    t0 = time.perf_counter()
    for name in sorted(os.listdir(folder)):
        if name.endswith(".json"):
            with open(folder / name, "rb") as fh:
                json.loads(fh.read().decode("utf-8"))
    return time.perf_counter() - t0


def _timed_child(cmd: list[str]) -> tuple[float, float]:
    """(wall seconds, CPU seconds of the child) for one run of ``cmd``."""
    before = os.times()
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, capture_output=True)
    wall = time.perf_counter() - t0
    after = os.times()
    return wall, (after.children_user - before.children_user
                  + after.children_system - before.children_system)


def knowledge_for_bench():
    from faultwise.core.errors import FaultwiseError
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.core.workspace import bundled_knowledge_dir

    try:
        return load_knowledge(bundled_knowledge_dir())
    except FaultwiseError:
        return load_knowledge(HERE.parent / "fixtures" / "kb_review")


def main(n: int) -> None:
    from faultwise.cases.index import INDEX_NAME
    from faultwise.shop.review import review_folder

    knowledge = knowledge_for_bench()
    # Fixed costs that do not grow with the cases (paid by any run of the command, and
    # included in the whole-process figure below): the libraries the review imports.
    import networkx  # noqa: F401
    import rapidfuzz.process  # noqa: F401
    import sqlite3  # noqa: F401

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "cases"
        make_cases(folder, n)
        plain_parse_s(folder)                       # warm the page cache for both
        base = min(plain_parse_s(folder) for _ in range(3))
        t0 = time.perf_counter()
        first = review_folder(folder, knowledge)
        t_first = time.perf_counter() - t0
        t0 = time.perf_counter()
        second = review_folder(folder, knowledge)
        t_second = time.perf_counter() - t0
        assert second.parsed == 0 and second.cases == first.cases
        cmd = [sys.executable, "-m", "faultwise", "review", "--cases", str(folder),
               "--knowledge", str(knowledge.root), "--json"]
        subprocess.run(cmd, check=True, capture_output=True)     # computes, fills the cache
        t_cli, cpu_cli = _timed_child(cmd)                      # nothing changed: the cache
        t_bare, cpu_bare = _timed_child([sys.executable, "-c", "pass"])
        size = (folder / INDEX_NAME).stat().st_size
    print(f"cases: {n} ({first.cases} closed read), knowledge {knowledge.root.name}")
    print(f"plain json parse: {base:.3f} s")
    print(f"review, first run (index built): {t_first:.3f} s  ratio {t_first / base:.2f}x "
          f"(target <= 2x)")
    print(f"review, second run (index only): {t_second:.3f} s")
    print(f"'faultwise review --json', second run, whole process: {t_cli:.3f} s "
          f"(target < 0.5 s; CPU {cpu_cli:.3f} s; a bare 'python -c pass': {t_bare:.3f} s, "
          f"CPU {cpu_bare:.3f} s)")
    print(f"index size: {size / 1e6:.1f} MB")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 10_000)
