#!/bin/bash
# The CPU-time measurement of testdata/bench_throughput.txt. Build the two test binaries first:
#   go test -c -o /tmp/rb/new.test ./robust   (and the same in an export of the older commit -> /tmp/rb/old.test)
# and run from robust/. Prints user+sys and wall time of the throughput benchmark at -cpu 1 and 2.
for rep in 1 2 3; do
  echo "== repetition $rep $(date -u +%H:%M:%S) loadavg $(cat /proc/loadavg)"
  for v in old new; do for o in 2 4 6 8 10; do for c in 1 2; do
    /usr/bin/time -f "$v order=$o cpu=$c user=%U sys=%S wall=%e" /tmp/rb/$v.test -test.run '^$' -test.bench "Throughput/order=$o\$" -test.cpu $c -test.benchtime 40x -test.benchmem 2>&1 | grep -E "user=|Benchmark" | tr '\n' ' ' | tr -s ' \t' ' '; echo
  done; done; done
  echo "   loadavg after $(cat /proc/loadavg)"
done
