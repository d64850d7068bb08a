#!/bin/bash
# The wall-clock 1→2-core speed-up of BenchmarkThroughput (testdata/speedup.txt).
# The host's single-core speed jumps between two levels (about 21 and 40 ms
# per order-6 batch seen on 2026-12-06), so one -cpu 1,2 pair proves nothing:
# this script runs PAIRS interleaved pairs per order in one process each and
# prints the median of the pair ratios (wall time at 1 core / at 2 cores).
# Run from robust/ on an otherwise idle machine:  bash testdata/speedup.sh [PAIRS]
set -e
pairs=${1:-10}
go test -c -o /tmp/robust-speedup.test . >/dev/null
cpus=$(for _ in $(seq "$pairs"); do printf '1,2,'; done); cpus=${cpus%,}
echo "== $(date -u '+%Y-%m-%d %H:%M:%S') UTC, $(nproc) CPUs, loadavg $(cut -d' ' -f1-3 /proc/loadavg), $pairs pairs per order"
for o in 2 4 6 8 10; do
  /tmp/robust-speedup.test -test.run '^$' -test.bench "Throughput/order=$o\$" -test.cpu "$cpus" -test.benchtime 40x |
    awk -v o="$o" '/^Benchmark/ { if ($1 ~ /-2$/) { two[++n2] = $3 } else { one[++n1] = $3 } }
      END {
        for (i = 1; i <= n2; i++) r[i] = one[i] / two[i]
        for (i = 2; i <= n2; i++) { x = r[i]; for (j = i - 1; j >= 1 && r[j] > x; j--) r[j + 1] = r[j]; r[j + 1] = x }; m = (n2 % 2) ? r[(n2 + 1) / 2] : (r[n2 / 2] + r[n2 / 2 + 1]) / 2
        s = ""; for (i = 1; i <= n2; i++) s = s sprintf(" %.2f", r[i])
        printf "order %2d: median speed-up %.2f over %d pairs; sorted ratios%s\n", o, m, n2, s }'
done
echo "== end $(date -u '+%H:%M:%S'), loadavg $(cut -d' ' -f1-3 /proc/loadavg)"
