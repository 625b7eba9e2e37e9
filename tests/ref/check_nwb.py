#!/usr/bin/python3
"""check_nwb.py - `correct FILE.nwb` and `list FILE.nwb` against NWB files
written here with Debian's python3-h5py (tests/ref/nwbfiles.py, the NWB
2.x layout), read back independently with h5py.

What is checked, and against what:
 - every data byte unchanged: the SHA-256 of each dataset's values (h5py)
   and of the bytes stored on disk at the dataset's file offset;
 - the offset of each corrected series changed by exactly -LJP in the
   series' unit: NWB 2.5 defines value = data * conversion + offset
   (nwb.base TimeSeries.data, https://nwb-schema.readthedocs.io), the
   unit is volts, so -LJP_mV / 1000, stored in the attribute's float32
   (numpy float32 rounding of the double result);
 - the sign: Vm = Vrecorded - LJP (common practice, the trade's convention
   for whole-cell recording with the LJP of the bath relative to the
   pipette solution);
 - the LJP of `for PIPETTE BATH` is the one `correct value 0 for ...`
   subtracts (the program's one Henderson path), and the record carries
   the range `junction` gives for the same pair;
 - a second correction refused, `again` accepted; NWB 2.4 (no offset)
   refused with a message naming 2.5; truncated and non-HDF5 files, a
   missing series, a series of another kind and a read-only file without
   `to` give a one-line error, exit status 1, the original untouched and
   no file left behind.
"""
import hashlib
import json
import os
import re
import shutil
import stat
import subprocess
import sys
import tempfile

import h5py
import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import nwbfiles  # noqa: E402

IONMIX = os.path.abspath(os.environ.get("IONMIX", "build/ionmix"))
RECIPES = os.path.abspath("recipes")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(*cmds, json_out=False):
    args = [IONMIX, "--db", os.path.join(WORK, "user.db")]
    if json_out:
        args.append("--json")
    for c in cmds:
        args += ["-e", c]
    env = dict(os.environ, SOURCE_DATE_EPOCH="1767261600")  # 2026-01-01T10:00:00Z
    return subprocess.run(args, cwd=WORK, capture_output=True, text=True, env=env)


def sha(path):
    with open(path, "rb") as f:
        return hashlib.sha256(f.read()).hexdigest()


def data_hashes(path):
    """SHA-256 of every dataset's values, and of the on-disk bytes of
    every contiguous dataset (file offset and storage size from h5py)."""
    vals, raw = {}, {}
    with h5py.File(path, "r") as f:
        def visit(name, obj):
            if isinstance(obj, h5py.Dataset):
                vals[name] = hashlib.sha256(np.asarray(obj[()]).tobytes()).hexdigest()
                off = obj.id.get_offset()
                if off is not None:
                    with open(path, "rb") as fp:
                        fp.seek(off)
                        raw[name] = hashlib.sha256(fp.read(obj.id.get_storage_size())).hexdigest()
        f.visititems(visit)
    return vals, raw


def attrs(path, series):
    with h5py.File(path, "r") as f:
        g = f[series]
        d = g["data"]
        off = d.attrs.get("offset")
        return {"offset": None if off is None else off,
                "conversion": d.attrs["conversion"],
                "unit": d.attrs["unit"],
                "comments": g.attrs.get("comments", "")}


def one_line_error(r, what, needle=None):
    lines = r.stderr.strip().splitlines()
    check(r.returncode == 1, "%s: exit status 1 (got %d)" % (what, r.returncode))
    check(len(lines) == 1, "%s: one error line (got %r)" % (what, r.stderr))
    if needle:
        check(needle in r.stderr, "%s: message names %r (got %r)" % (what, needle, r.stderr))


def listing():
    return sorted(os.listdir(WORK))


WORK = tempfile.mkdtemp(prefix="ionmix-nwb-")
try:
    for r in ("k-pipette.ionmix", "bath-saline.ionmix"):
        shutil.copy(os.path.join(RECIPES, r), WORK)
    A = os.path.join(WORK, "a.nwb")
    nwbfiles.write(A)
    a_sha = sha(A)
    a_vals, a_raw = data_hashes(A)
    check(len(a_raw) >= 5, "the test file has contiguous data datasets")
    CCS, IZ = "acquisition/ccs_sweep1", "acquisition/izero_sweep3"
    VCS, VCSS = "acquisition/vcs_sweep2", "stimulus/presentation/vcss_sweep2"
    CCSS = "stimulus/presentation/ccss_sweep1"
    before = {s: attrs(A, s) for s in (CCS, IZ, VCS, VCSS, CCSS)}

    # -- the LJP the program's Henderson path gives for the pair
    r = run("run k-pipette.ionmix", "run bath-saline.ionmix",
            "correct value 0 for k-pipette bath", json_out=True)
    check(r.returncode == 0, "correct value for the demo pair: %s" % r.stderr)
    ljp = [json.loads(x) for x in r.stdout.splitlines() if '"ljp_mV"' in x][-1]["ljp_mV"]
    check(abs(ljp) > 1, "the demo pair has a sizeable LJP (%r mV)" % ljp)
    # its range: the one `junction` reports for the same pair (ljp_pair_mV)
    r = run("run k-pipette.ionmix", "run bath-saline.ionmix",
            "junction k-pipette bath", json_out=True)
    lo, hi = [json.loads(x) for x in r.stdout.splitlines() if '"ljp_range_mV"' in x][-1][
        "ljp_range_mV"]
    check(lo < ljp < hi, "the junction range %r..%r holds the LJP %r" % (lo, hi, ljp))

    # -- correct a.nwb for the pair, to b.nwb
    r = run("run k-pipette.ionmix", "run bath-saline.ionmix",
            "correct a.nwb for k-pipette bath to b.nwb", json_out=True)
    check(r.returncode == 0, "correct a.nwb to b.nwb: %s" % r.stderr)
    res = [json.loads(x) for x in r.stdout.splitlines() if '"series"' in x]
    check(len(res) == 1, "one JSON result for the NWB correction")
    B = os.path.join(WORK, "b.nwb")
    check(sha(A) == a_sha, "a.nwb untouched when writing to b.nwb")
    b_vals, b_raw = data_hashes(B)
    check(b_vals == a_vals, "every dataset's values unchanged (SHA-256)")
    check(b_raw == a_raw, "every stored data byte unchanged at its file offset (SHA-256)")
    if res:
        j = res[0]
        check(j["ljp_mV"] == ljp, "the NWB LJP is the one `correct value` subtracts")
        check(sorted(s["name"] for s in j["series"]) ==
              ["ccs_sweep1", "izero_sweep3", "vcss_sweep2"],
              "every membrane and command potential series changed, no current series")
    for s in (CCS, IZ, VCSS):
        old, new = before[s]["offset"], attrs(B, s)["offset"]
        want = np.float32(float(old) - ljp / 1000.0)
        check(new == want, "%s offset %r -> %r, want float32(old - LJP/1000) = %r"
              % (s, old, new, want))
        check(attrs(B, s)["conversion"] == before[s]["conversion"], "%s conversion kept" % s)
        c = attrs(B, s)["comments"]
        check(c.count("ionmix LJP correction:") == 1, "%s comments hold one record" % s)
        for needle in ("pipette solution k-pipette", "bath solution bath", "22.0 C",
                       "Henderson", "ionmix ", "2026-01-01T10:00:00Z", "LJP %+.1f mV" % ljp,
                       "range %.1f to %.1f mV" % (lo, hi)):
            check(needle in c, "%s record names %r: %r" % (s, needle, c))
    for s in (VCS, CCSS):
        check(attrs(B, s) == before[s], "%s (a current) untouched" % s)

    # -- a second correction is refused; `again` is accepted
    b_sha = sha(B)
    files = listing()
    r = run("correct b.nwb by 5")
    one_line_error(r, "second correction", "again")
    check(sha(B) == b_sha and listing() == files, "refused second correction leaves b.nwb alone")
    r = run("correct b.nwb by 5 series ccs_sweep1 again")
    check(r.returncode == 0, "`again` corrects once more: %s" % r.stderr)
    o1 = attrs(B, CCS)["offset"]
    want = np.float32(float(np.float32(0.0 - ljp / 1000.0)) - 0.005)
    check(o1 == want, "again: offset %r, want %r" % (o1, want))
    check(attrs(B, CCS)["comments"].count("ionmix LJP correction:") == 2, "two records")
    r = run("list b.nwb", json_out=True)
    check(r.returncode == 0, "list b.nwb")
    lst = {s["name"]: s for s in json.loads(r.stdout)["series"]}
    check(lst["ccs_sweep1"]["corrections"] == 2 and lst["ccs_sweep1"]["last_ljp_mV"] == 5,
          "list shows two corrections, the last of +5 mV")
    check(lst["vcs_sweep2"]["correctable"] is False, "list: a VoltageClampSeries is not correctable")
    check(len(lst) == 5, "list shows the five patch-clamp series")
    check(b_vals == data_hashes(B)[0], "data unchanged after `again`")

    # -- one series by name, in place; permissions kept
    C = os.path.join(WORK, "c.nwb")
    shutil.copy(A, C)
    os.chmod(C, 0o640)
    r = run("correct c.nwb by -2.5 series vcss_sweep2")
    check(r.returncode == 0, "in place, one series: %s" % r.stderr)
    check(attrs(C, VCSS)["offset"] == np.float32(0.0025), "in place: vcss offset +2.5 mV")
    check(attrs(C, CCS) == before[CCS], "in place: the series not named untouched")
    check(stat.S_IMODE(os.stat(C).st_mode) == 0o640, "in place keeps the permission bits")
    check(data_hashes(C) == (a_vals, a_raw), "in place: data bytes unchanged")
    check(not [f for f in listing() if f.startswith(".") or "tmp" in f],
          "no temporary file left: %r" % listing())

    # -- dispatch by the HDF5 signature, whatever the extension
    H = os.path.join(WORK, "rec.h5")
    shutil.copy(A, H)
    r = run("correct rec.h5 by 1 series ccs_sweep1")
    check(r.returncode == 0 and attrs(H, CCS)["offset"] == np.float32(-0.001),
          "an HDF5 file without .nwb is taken as NWB: %s" % r.stderr)

    # -- bad input: one line, nothing written, originals untouched
    def refused(cmd, what, path, needle=None):
        s0, f0 = sha(path), listing()
        r = run(cmd)
        one_line_error(r, what, needle)
        check(sha(path) == s0, "%s: %s untouched" % (what, os.path.basename(path)))
        check(listing() == f0, "%s: no file created (%r)" % (what, sorted(set(listing()) - set(f0))))

    refused("correct a.nwb by 3 series nosuch to d.nwb", "missing series", A, "nosuch")
    refused("correct a.nwb by 3 series vcs_sweep2 to d.nwb", "series of another kind", A,
            "VoltageClampSeries")
    refused("correct a.nwb by 3 series ccs_sweep1 ccss_sweep1 to d.nwb",
            "a current stimulus among the names", A, "CurrentClampStimulusSeries")
    O = os.path.join(WORK, "old.nwb")
    nwbfiles.write(O, version="2.4.0", with_offset=False)
    refused("correct old.nwb by 3 to d.nwb", "NWB 2.4 without offset", O, "2.5")
    refused("correct old.nwb by 3", "NWB 2.4 in place", O, "offset")
    T = os.path.join(WORK, "trunc.nwb")
    with open(A, "rb") as f:
        blob = f.read()
    with open(T, "wb") as f:
        f.write(blob[: len(blob) // 2])
    refused("correct trunc.nwb by 3", "truncated file", T, "trunc.nwb")
    refused("correct trunc.nwb by 3 to d.nwb", "truncated file with to", T, "trunc.nwb")
    refused("list trunc.nwb", "list a truncated file", T, "trunc.nwb")
    X = os.path.join(WORK, "text.nwb")
    with open(X, "w") as f:
        f.write("time,V\n0,-70\n")
    refused("correct text.nwb by 3", "non-HDF5 file", X, "not an HDF5 file")
    R = os.path.join(WORK, "ro.nwb")
    shutil.copy(A, R)
    os.chmod(R, 0o444)
    refused("correct ro.nwb by 3", "read-only file without to", R, "read-only")
    r = run("correct ro.nwb by 3 to ro-corrected.nwb")
    check(r.returncode == 0 and sha(R) == a_sha, "a read-only file corrected to a copy")
    refused("correct a.nwb by 3 to -", "NWB to standard output", A)
    refused("correct a.nwb by 3 series", "`series` without a name", A, "series")
finally:
    shutil.rmtree(WORK, ignore_errors=True)

if failures:
    print("check_nwb: %d failures" % len(failures))
    sys.exit(1)
print("check_nwb: NWB offsets, records and refusals as expected; data bytes unchanged")
