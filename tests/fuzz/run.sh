#!/bin/sh
# run.sh FUZZBUILD SECONDS NAME... - run each libFuzzer target
# FUZZBUILD/bin/NAME for SECONDS, starting from the seeds in
# tests/fuzz/corpus/NAME (read only) and the inputs it found before in
# FUZZBUILD/corpus/NAME, where it adds what it finds.  FUZZ_FRESH=1 (the
# smoke run) starts from the seeds alone, so that replaying a grown corpus
# never outlasts SECONDS.  A crash, leak, timeout or sanitizer report
# fails; the input is saved as FUZZBUILD/artifacts/NAME-*.  Prints one
# line per target (runs, executions per second) and a closing line.
set -u
build=$1
secs=$2
shift 2
root=$(pwd)
case $build in /*) ;; *) build=$root/$build ;; esac
# a tmpfs keeps saves (fsync) cheap; the targets clean up after themselves
scratch=$build/tmp
if [ -d /dev/shm ] && [ -w /dev/shm ]; then scratch=/dev/shm/ionmix-fuzz-$$; fi
mkdir -p "$scratch" "$build/artifacts" "$build/log"
fail=0
for name in "$@"; do
	bin=$build/bin/$name
	seeds=$root/tests/fuzz/corpus/$name
	work=$build/corpus/$name
	[ "${FUZZ_FRESH:-0}" = 1 ] && work=$scratch/corpus-$name
	log=$build/log/$name.txt
	mkdir -p "$work"
	case $name in
	fuzz_units) maxlen=128 ;;
	fuzz_correct) maxlen=8192 ;;
	*) maxlen=6000 ;;
	esac
	# quarantine_size_mb=64 (ASan's default is 256, from memory): a freed
	# block still stays poisoned for the next 64 MB freed, about 130
	# inputs of fuzz_recipe (its seeds allocate 0.5 MB each on average:
	# ASan's print_stats over 300 of them), so a use after free within an
	# input or across the last ones is caught as before; cycling through
	# 256 MB kept allocations on cold pages (62 page faults per seed
	# against 27) and fuzz_recipe ran about 7 % slower (698 against
	# 652 us of CPU per run, 60 s each)
	# allocator_release_to_os_interval_ms=-1: ASan keeps the memory it
	# frees mapped for reuse instead of returning it with madvise every
	# few seconds (5 % of a run's samples in the madvise call alone, perf,
	# and page faults after it); no check is weakened, the RSS settles near
	# 330 MB instead of 250.
	# -reload=0: the corpus directory is written by this one process, so
	# rereading it every second (libFuzzer's default, to share a corpus
	# between parallel jobs) only listed thousands of files (3 % late in a
	# run).
	# -entropic_scale_per_exec_time=1: the entropic schedule gives an input
	# more turns the faster it runs (libFuzzer's own option).  Without it
	# the inputs chosen for mutation grew heavier through a run (more
	# junction, iv and target lines: 2,600 runs/s after a minute, 1,400 at
	# the tenth) while the faster ones reach new code as well: in ten
	# minutes fuzz_recipe ran 5,495 runs/s and ended with 4,569 edges
	# covered (21,972 features), against 1,777 to 2,087 runs/s and 4,414
	# edges (21,718) without it (one run each on a 2-core machine).
	TMPDIR=$scratch ASAN_OPTIONS=detect_leaks=1:allocator_may_return_null=0:quarantine_size_mb=64:allocator_release_to_os_interval_ms=-1 \
	UBSAN_OPTIONS=halt_on_error=1:print_stacktrace=1 \
		"$bin" -max_total_time="$secs" -timeout=10 -rss_limit_mb=2048 -reload=0 -entropic_scale_per_exec_time=1 \
		-max_len=$maxlen -print_final_stats=1 \
		-artifact_prefix="$build/artifacts/$name-" "$work" "$seeds" >"$log" 2>&1
	rc=$?
	runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -n 1)
	eps=$(sed -n 's/^stat::average_exec_per_sec: *//p' "$log" | tail -n 1)
	if [ "$rc" -eq 0 ]; then
		echo "$name: ${runs:-?} runs in ${secs} s, ${eps:-?} exec/s, no crash"
	else
		fail=$((fail + 1))
		echo "$name: FAILED (exit $rc); log $log:"
		grep -aE 'ERROR|fuzz check failed|SUMMARY|runtime error|Test unit written' "$log" |
			head -n 20
	fi
done
rm -rf "$scratch"
echo "fuzz: $(($# - fail)) passed, $fail failed"
[ "$fail" -eq 0 ]
