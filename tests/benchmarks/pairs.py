from faultwise.graph import load_knowledge
from faultwise.core.workspace import bundled_knowledge_dir
from faultwise.shop.sweep import run_sweep, load_demo_sets, weighted_mean, _per_fault
import sys
kd = bundled_knowledge_dir() if len(sys.argv) < 2 else __import__("pathlib").Path(sys.argv[1])
k = load_knowledge(kd)
sets = load_demo_sets(kd / "sets", kd)
r = run_sweep(k, sets)
bws = r.baseline_walks["written"]
rows=[]
for p in r.pairs:
    mine=[w for w in bws if (w.symptom,w.family)==(p.symptom,p.family)]
    wm = weighted_mean(_per_fault(mine,"minutes"), p.weights)
    rows.append((p.mean_minutes-wm, p.symptom, p.family, round(p.mean_minutes,2), round(wm,2), round(p.mean_checks,2), round(p.baselines["written"],2)))
for row in sorted(rows, reverse=True)[:12]:
    print(row)
n = len(rows)
print(f"overall minutes: p/c {sum(r[3] for r in rows) / n:.3f}, written {sum(r[4] for r in rows) / n:.3f};"
      f" checks: p/c {sum(r[5] for r in rows) / n:.3f}, written {sum(r[6] for r in rows) / n:.3f}")
for name, walks in r.baseline_walks.items():
    per = [weighted_mean(_per_fault([w for w in walks if (w.symptom, w.family) == (p.symptom, p.family)],
                                    "minutes"), p.weights) for p in r.pairs]
    print(f"baseline {name}: mean minutes {sum(per) / len(per):.3f}, mean checks "
          f"{sum(p.baselines[name] for p in r.pairs) / len(r.pairs):.3f}")
