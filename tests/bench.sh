#!/bin/sh
# bench.sh BUILD - run every benchmark of ionmix (the programs
# BUILD/tests/bench_* and the scripts tests/bench_*.sh) and print one
# table: what, figure, goal, ratio against the comparison program.
# Each benchmark prints lines "bench|WHAT|FIGURE|GOAL|RATIO".
set -u
build=$1
out=$(mktemp)
trap 'rm -f "$out"' EXIT
for b in "$build"/tests/bench_*; do
	[ -x "$b" ] || continue
	echo "running $(basename "$b") ..." >&2
	"$b" >>"$out" || echo "bench|$(basename "$b") FAILED|-|-|-" >>"$out"
done
for s in tests/bench_*.sh; do
	[ -f "$s" ] || continue
	echo "running $(basename "$s") ..." >&2
	IONMIX=${IONMIX:-$build/ionmix} sh "$s" >>"$out" || echo "bench|$s FAILED|-|-|-" >>"$out"
done
grep '^bench|' "$out" | awk -F'|' '
	BEGIN { printf "%-72s %-18s %-14s %s\n", "what", "figure", "goal", "ratio";
		printf "%-72s %-18s %-14s %s\n", "----", "------", "----", "-----" }
	{ printf "%-72s %-18s %-14s %s\n", $2, $3, $4, $5 }'
