"""Per-fault detail of one (symptom, family) pair: p/c walk against written walk.

python tests/benchmarks/pair_detail.py SYMPTOM FAMILY [KNOWLEDGE_DIR]
"""
import sys
from pathlib import Path

from faultwise.core.workspace import bundled_knowledge_dir
from faultwise.graph import load_knowledge
from faultwise.graph.nodes import Suspects
from faultwise.shop.sweep import load_demo_sets, run_sweep
from faultwise.walk.rank import rank_investigations

symptom, family = sys.argv[1], sys.argv[2]
kd = Path(sys.argv[3]) if len(sys.argv) > 3 else bundled_knowledge_dir()
k = load_knowledge(kd)
r = run_sweep(k, load_demo_sets(kd / "sets", kd), family=family, symptom=symptom)
pair = r.pairs[0]
bw = {w.fault: w for w in r.baseline_walks["written"]}


def tree(sid, depth=0, seen=()):
    if sid in seen:
        return
    node = k.nodes[sid]
    if not isinstance(node, Suspects):
        return
    written = [i.target for i in node.investigations]
    for rk in rank_investigations(k, sid, symptom, family):
        print("  " * depth + f"{written.index(rk.target):2d} {rk.target:45s} p={rk.p:.3f} c={rk.cost:5.1f} r={rk.ratio:.3f} own_min={rk.investigation.minutes}")
        if isinstance(k.nodes.get(rk.target), Suspects):
            tree(rk.target, depth + 1, seen + (sid,))


tree(k.entry(symptom, family))
print()
tot = 0
for w in sorted(r.walks, key=lambda w: -pair.weights.get(w.fault, 0)):
    b = bw[w.fault]
    wt = pair.weights.get(w.fault, 0)
    d = wt * (w.minutes - b.minutes)
    tot += d
    print(f"{w.fault:45s} w={wt:.3f} pc={w.checks}/{w.minutes:.1f} wr={b.checks}/{b.minutes:.1f} dmin*w={d:+.2f}")
    if abs(w.minutes - b.minutes) > 0.01:
        print("    pc:", " ".join(s.node.split('.')[-1] for s in w.path))
        print("    wr:", " ".join(s.node.split('.')[-1] for s in b.path))
print("total", round(tot, 2))
