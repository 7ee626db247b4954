#!/usr/bin/env bash
# run.sh: the scaling table of docs/benchmarks.md, one benchmark cell per
# process so that /usr/bin/time -v gives each its own peak memory (maximum
# resident set size).
#
#   bash testdata/scaling/run.sh PLANNER_TEST_BINARY CELL...
#
# PLANNER_TEST_BINARY is `go test -c -o FILE ./planner/` of the tree to
# measure (build the old commit's next to the new one to compare them in one
# run); each CELL is a -test.bench pattern, e.g.
# 'Scale/^windows$/^bench$/^targets=1000$/^nights=365$'. Prints one
# tab-separated line per cell: the benchmark's line (wall ns/op, cpu-ms/op,
# peak-heap-MB, ...), the process's wall time and its peak RSS in MB.
set -euo pipefail
bin="$1"
shift
for cell in "$@"; do
	log="$(mktemp)"
	PHASECAST_BENCH_LARGE=1 /usr/bin/time -v "$bin" -test.run '^$' -test.bench "$cell" -test.benchtime 1x -test.timeout 3h >"$log.out" 2>"$log" || true
	line="$(grep -E '^Benchmark' "$log.out" | tr -s ' \t' ' ' || echo "$cell FAILED")"
	rss="$(awk -F: '/Maximum resident set size/ {printf "%.0f", $2/1024}' "$log")"
	wall="$(awk -F': ' '/Elapsed \(wall clock\)/ {print $2}' "$log")"
	printf '%s\twall %s\tpeak-RSS %s MB\n' "$line" "$wall" "$rss"
	rm -f "$log" "$log.out"
done
