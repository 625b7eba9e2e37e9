#!/bin/sh
# ensure-deps.sh build|test - make sure what ionmix needs is installed.
# When something is missing and we are root with apt-get, install it;
# otherwise print the exact install line and fail.
set -u
what=${1:-build}
pkgs=""
command -v pkg-config >/dev/null 2>&1 || pkgs="$pkgs pkg-config"
command -v cc >/dev/null 2>&1 || pkgs="$pkgs gcc"
command -v make >/dev/null 2>&1 || pkgs="$pkgs make"
have() { command -v pkg-config >/dev/null 2>&1 && pkg-config --exists "$1"; }
have sqlite3 || pkgs="$pkgs libsqlite3-dev"
have readline || pkgs="$pkgs libreadline-dev"
have hdf5 || have hdf5-serial || pkgs="$pkgs libhdf5-dev"
# objdump: the Makefile reads the HDF5 library's run-time name with it
command -v objdump >/dev/null 2>&1 || pkgs="$pkgs binutils"
if [ "$what" = test ]; then
	have cmocka || pkgs="$pkgs libcmocka-dev"
	py=/usr/bin/python3
	[ -x "$py" ] || pkgs="$pkgs python3"
	[ -x "$py" ] && "$py" -c 'import periodictable' 2>/dev/null || pkgs="$pkgs python3-periodictable"
	[ -x "$py" ] && "$py" -c 'import scipy' 2>/dev/null || pkgs="$pkgs python3-scipy"
	[ -x "$py" ] && "$py" -c 'import h5py' 2>/dev/null || pkgs="$pkgs python3-h5py"
	command -v pdftotext >/dev/null 2>&1 || pkgs="$pkgs poppler-utils"
	# tests/ref/check_schemas.py: the JSON contract of every command (schemas/)
	[ -x "$py" ] && "$py" -c 'import jsonschema' 2>/dev/null || pkgs="$pkgs python3-jsonschema"
	command -v mawk >/dev/null 2>&1 || pkgs="$pkgs mawk"
	command -v xmllint >/dev/null 2>&1 || pkgs="$pkgs libxml2-utils"
	# robustness: `make check-valgrind`, and the libFuzzer targets of
	# `make fuzz-smoke` (clang with its fuzzer runtime)
	command -v valgrind >/dev/null 2>&1 || pkgs="$pkgs valgrind"
	# `make bench`: start-up instructions against the sqlite3 shell
	command -v sqlite3 >/dev/null 2>&1 || pkgs="$pkgs sqlite3"
	command -v clang >/dev/null 2>&1 || pkgs="$pkgs clang"
	command -v clang >/dev/null 2>&1 &&
		ls "$(clang -print-resource-dir 2>/dev/null)"/lib/linux/libclang_rt.fuzzer-*.a \
			>/dev/null 2>&1 || pkgs="$pkgs libclang-rt-14-dev"
fi
[ -z "$pkgs" ] && exit 0
if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then
	echo "ionmix: installing$pkgs"
	export DEBIAN_FRONTEND=noninteractive
	{ apt-get update -qq && apt-get install -y -qq --no-install-recommends $pkgs; } >/dev/null ||
		{ echo "ionmix: apt-get install$pkgs failed" >&2; exit 1; }
	exit 0
fi
echo "ionmix: missing build dependencies; install them with:" >&2
echo "  sudo apt-get install$pkgs" >&2
exit 1
