#!/bin/sh
# run.sh BUILD TESTBIN... - run every test of ionmix: the cmocka programs,
# the golden command scripts (tests/golden/*.cmd beside *.out), and the
# Python reference checks (tests/ref/check_*.py; the other modules there
# are shared by them).  Prints one closing line
# "check: N passed, N failed" and exits non-zero when anything failed.
set -u
build=$1
shift
pass=0
fail=0
failed=""
log=$build/tests/log
mkdir -p "$log"
for t in "$@"; do
	name=$(basename "$t")
	if "$t" >"$log/$name.txt" 2>&1; then
		pass=$((pass + 1))
		tail -n 1 "$log/$name.txt" | sed "s|^|$name: |"
	else
		fail=$((fail + 1))
		failed="$failed $name"
		cat "$log/$name.txt"
	fi
done
if [ -x "$build/ionmix" ]; then
	if sh tests/golden.sh "$build/ionmix" >"$log/golden.txt" 2>&1; then
		pass=$((pass + 1))
	else
		fail=$((fail + 1))
		failed="$failed golden"
	fi
	tail -n 1 "$log/golden.txt"
	grep '^FAIL' "$log/golden.txt" || true
fi
for py in tests/ref/check_*.py; do
	[ -f "$py" ] || continue
	name=$(basename "$py" .py)
	if IONMIX=$build/ionmix "${PYTHON:-/usr/bin/python3}" "$py" >"$log/$name.txt" 2>&1; then
		pass=$((pass + 1))
		tail -n 1 "$log/$name.txt"
	else
		fail=$((fail + 1))
		failed="$failed $name"
		cat "$log/$name.txt"
	fi
done
[ -n "$failed" ] && echo "failed:$failed"
echo "check ($build)"
echo "check: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
