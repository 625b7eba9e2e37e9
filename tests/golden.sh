#!/bin/sh
# golden.sh IONMIX - run each tests/golden/NAME.cmd through ionmix (with
# a fresh database, C locale, --json when the first line is '#json') and
# compare standard output, standard error and the exit status with
# tests/golden/NAME.out.  UPDATE=1 rewrites the .out files instead.
set -u
bin=$1
abs=$(cd "$(dirname "$bin")" && pwd)/$(basename "$bin")
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
pass=0
fail=0
for cmd in tests/golden/*.cmd; do
	name=$(basename "$cmd" .cmd)
	exp=tests/golden/$name.out
	flags=""
	head -n 1 "$cmd" | grep -q '^#json' && flags="--json"
	rm -rf "$tmp/work"
	mkdir "$tmp/work"
	cp "$cmd" recipes/*.ionmix "$tmp/work/"
	(cd "$tmp/work" && LC_ALL=C HOME="$tmp/work" XDG_DATA_HOME="$tmp/work" \
		"$abs" $flags --db user.db "$name.cmd" >"$tmp/out" 2>&1
	 echo "exit $?" >>"$tmp/out")
	if [ "${UPDATE:-0}" = 1 ]; then
		cp "$tmp/out" "$exp"
	fi
	if [ -f "$exp" ] && cmp -s "$tmp/out" "$exp"; then
		pass=$((pass + 1))
	else
		fail=$((fail + 1))
		echo "FAIL $name"
		[ -f "$exp" ] && diff -u "$exp" "$tmp/out" | head -40
	fi
done
echo "golden: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
