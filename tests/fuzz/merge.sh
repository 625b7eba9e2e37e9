#!/bin/sh
# merge.sh FUZZBUILD NAME... - grow the committed seed corpora with what
# `make fuzz` found: for each libFuzzer target FUZZBUILD/bin/NAME, the
# inputs in FUZZBUILD/corpus/NAME that reach code the seeds in
# tests/fuzz/corpus/NAME do not are copied there (libFuzzer -merge=1,
# which keeps only coverage-increasing inputs, named by their SHA-1).
# Prints one line per target: seeds before, after.  Commit the new files.
set -u
build=$1
shift
root=$(pwd)
case $build in /*) ;; *) build=$root/$build ;; esac
fail=0
for name in "$@"; do
	bin=$build/bin/$name
	seeds=$root/tests/fuzz/corpus/$name
	found=$build/corpus/$name
	if [ ! -d "$found" ] || [ -z "$(ls -A "$found" 2>/dev/null)" ]; then
		echo "$name: nothing found yet (run make fuzz first)"
		continue
	fi
	before=$(ls "$seeds" | wc -l)
	log=$build/log/$name-merge.txt
	mkdir -p "$build/log"
	if ASAN_OPTIONS=detect_leaks=0 "$bin" -merge=1 -timeout=10 "$seeds" "$found" >"$log" 2>&1; then
		echo "$name: $before seeds, now $(ls "$seeds" | wc -l)"
	else
		fail=$((fail + 1))
		echo "$name: merge FAILED; log $log"
	fi
done
[ "$fail" -eq 0 ]
