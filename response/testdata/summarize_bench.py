#!/usr/bin/env python3
"""Summarise a run of

    go test -run '^$' -bench 'Step|BaselineRK4|Floor' -benchtime 20x -count 5 ./response/ > bench.txt
    python3 response/testdata/summarize_bench.py bench.txt

taking the fastest of the repeated runs of each benchmark (the machine is
shared; the minimum is the least disturbed), and printing per order and
output spacing: samples/s and max error/peak of the exact recursion, of RK4
at 1e-8 and of RK4 at the exact recursion's accuracy, the throughput ratios,
and the cost of the exact recursion relative to the n² multiply-add floor.
"""
import collections
import re
import sys

best = {}
for line in open(sys.argv[1]):
    m = re.match(r"Benchmark(\w+)/order=(\d+)/spacing=(\w+)(?:/target=(\S+?))?-\d+\s+\d+\s+(\d+) ns/op\s*(.*)", line)
    if not m:
        continue
    kind, order, sp, target, ns, rest = m.group(1), int(m.group(2)), m.group(3), m.group(4), int(m.group(5)), m.group(6)
    vals = {u: float(v) for v, u in re.findall(r"([\d.e+-]+) (\S+)", rest)}
    vals["ns"] = ns
    key = (kind, order, sp, target)
    if key not in best or ns < best[key]["ns"]:
        best[key] = vals

print("| order | spacing | exact samples/s | exact err/peak | RK4(1e-8) samples/s | RK4 err/peak | substeps | speed-up | RK4(equal) samples/s | RK4 err/peak | substeps | speed-up | cost/floor |")
print("|---|---|---|---|---|---|---|---|---|---|---|---|---|")
for sp in ("auto", "10x"):
    for o in range(2, 25, 2):
        s = best.get(("Step", o, sp, None))
        r8 = best.get(("BaselineRK4", o, sp, "1e-8"))
        re_ = best.get(("BaselineRK4", o, sp, "exact"))
        fl = best.get(("Floor", o, sp, None))
        if not s:
            continue
        row = [str(o), sp, "%.3g" % s["samples/s"], "%.2g" % (s["err/peak*1e15"] * 1e-15)]
        for r in (r8, re_):
            if r:
                row += ["%.3g" % r["samples/s"], "%.2g" % (r["err/peak*1e15"] * 1e-15), "%d" % r["substeps"],
                        "%.1f×" % (s["samples/s"] / r["samples/s"])]
            else:
                row += ["–"] * 4
        row.append("%.2f" % (s["ns"] / fl["ns"]) if fl else "–")
        print("| " + " | ".join(row) + " |")
