#!/usr/bin/env python3
"""Summarise BenchmarkRatio runs (median over -count repetitions):

    go test -run '^$' -bench Ratio -benchtime 20x -count 3 ./response/ > ratio.txt
    python3 response/testdata/summarize_ratio.py ratio.txt
"""
import collections
import re
import statistics
import sys

runs = collections.defaultdict(list)
for line in open(sys.argv[1]):
    m = re.match(r"BenchmarkRatio/order=(\d+)/spacing=(\w+)(?:-\d+)?\s+\d+\s+\d+ ns/op\s*(.*)", line)
    if m:
        runs[(m.group(2), int(m.group(1)))].append({u: float(v) for v, u in re.findall(r"([\d.e+-]+) (\S+)", m.group(3))})

cols = ["samples/cpu-s", "err/peak*1e15", "speedup-vs-rk4-1e-8", "rk4-substeps", "speedup-vs-rk4-equal", "rk4-equal-substeps", "cost/floor", "loop/floor"]
print("| spacing | order | " + " | ".join(cols) + " |")
print("|---" * (len(cols) + 2) + "|")
for key in sorted(runs):
    row = []
    for c in cols:
        vals = [r[c] for r in runs[key] if c in r]
        row.append("%.3g" % statistics.median(vals) if vals else "–")
    print("| %s | %d | " % key + " | ".join(row) + " |")
