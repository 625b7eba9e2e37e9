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
 - in place: the same file (inode) changed, every data byte kept; a
   write that fails during the commit (test hook IONMIX_TEST_NWB_FAULT)
   leaves the file byte-identical and no journal; a crash at any write
   (the hook ends the process) is undone by the next `list` or `correct`
   to the original bytes; a journal that does not match the file (another
   inode, bytes changed since) is left alone with an error, one cut short
   is removed;
 - a second correction refused, `again` accepted; NWB 2.4 (no offset)
   refused with a message naming 2.5; truncated and non-HDF5 files, a
   missing series, a series of another kind and a read-only file without
   `to` give a one-line error, exit status 1, the original untouched and
   no file left behind.
"""
import fcntl
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

    # -- in place: the same inode changed, data bytes and values kept,
    # offsets by exactly -LJP (float32), no journal left
    E = os.path.join(WORK, "e.nwb")
    shutil.copy(A, E)
    ino = os.stat(E).st_ino
    r = run("correct e.nwb by 7.5")
    check(r.returncode == 0, "in place, every potential series: %s" % r.stderr)
    check(os.stat(E).st_ino == ino, "in place changes the file itself (same inode)")
    check(data_hashes(E) == (a_vals, a_raw), "in place, all series: data bytes unchanged")
    for s in (CCS, IZ, VCSS):
        want = np.float32(float(before[s]["offset"]) - 0.0075)
        check(attrs(E, s)["offset"] == want, "in place: %s offset %r, want %r"
              % (s, attrs(E, s)["offset"], want))
    for s in (VCS, CCSS):
        check(attrs(E, s) == before[s], "in place: %s (a current) untouched" % s)
    check(not [f for f in listing() if f.endswith(".ionmix-undo")], "in place: no journal left")

    # -- a write that fails during the commit (the test hook fails the
    # N-th write into the file): the file byte-identical, no journal
    def fault(cmd, env_value):
        os.environ["IONMIX_TEST_NWB_FAULT"] = env_value
        try:
            return run(cmd)
        finally:
            del os.environ["IONMIX_TEST_NWB_FAULT"]

    F = os.path.join(WORK, "f.nwb")
    JF = os.path.join(WORK, ".f.nwb.ionmix-undo")
    fired = 0
    for n in range(1, 40):
        shutil.copy(A, F)
        r = fault("correct f.nwb by 7.5", "fail:%d" % n)
        if r.returncode == 0:
            break
        fired += 1
        one_line_error(r, "injected failure of write %d" % n, "undone")
        check(sha(F) == a_sha, "failure at write %d: f.nwb byte-identical" % n)
        check(not os.path.exists(JF), "failure at write %d: no journal left" % n)
    check(fired >= 2, "the failure hook fired at several writes (%d)" % fired)
    nwrites = fired
    print("in place: %d writes into the file per correction, each failed and crashed once" % nwrites)
    check(r.returncode == 0 and attrs(F, CCS)["offset"] == np.float32(-0.0075),
          "past the last write the hook does not fire and the correction is made")

    # -- a crash in the middle (the hook ends the process before the N-th
    # write, after the journal): the next `list` or `correct` undoes it
    for n in range(1, nwrites + 1):
        shutil.copy(A, F)
        r = fault("correct f.nwb by 7.5", "crash:%d" % n)
        check(r.returncode == 99, "crash before write %d: the process ended (%d)"
              % (n, r.returncode))
        check(os.path.exists(JF), "crash before write %d: the journal is left" % n)
        if n == nwrites:
            check(sha(F) != a_sha, "crash before the last write: the file was half-changed")
        r = run("list f.nwb")
        check(r.returncode == 0 and "interrupted correction was undone" in r.stdout,
              "list after a crash at write %d says it undid it: %r %r" % (n, r.stdout, r.stderr))
        check(sha(F) == a_sha, "crash at write %d undone: f.nwb byte-identical" % n)
        check(not os.path.exists(JF), "crash at write %d undone: the journal removed" % n)
    # SIGTERM in the middle of the commit waits for its end: the process
    # ends by the signal with every change made and no journal
    shutil.copy(A, F)
    r = fault("correct f.nwb by 7.5", "signal:%d" % max(2, nwrites // 2))
    check(r.returncode == -15, "SIGTERM during the commit ends the process (%d)" % r.returncode)
    check(not os.path.exists(JF) and attrs(F, VCSS)["offset"] == np.float32(-0.0075) and
          attrs(F, CCS)["offset"] == np.float32(-0.0075),
          "SIGTERM during the commit: held back until every change was written")
    shutil.copy(A, F)
    fault("correct f.nwb by 7.5", "crash:2")
    r = run("correct f.nwb by 3", json_out=True)
    check(r.returncode == 0, "correct after a crash: %s" % r.stderr)
    check(any("interrupted correction was undone" in n
              for n in json.loads(r.stdout).get("notes", [])),
          "correct after a crash notes the undo in JSON: %r" % r.stdout)
    check(attrs(F, CCS)["offset"] == np.float32(-0.003) and
          attrs(F, CCS)["comments"].count("ionmix LJP correction:") == 1,
          "correct after a crash: one correction, from the original offset")
    check(data_hashes(F) == (a_vals, a_raw), "correct after a crash: data bytes unchanged")

    # -- a journal that does not match the file: error, both left alone
    shutil.copy(A, F)
    fault("correct f.nwb by 7.5", "crash:1")
    G = os.path.join(WORK, "g.nwb")
    JG = os.path.join(WORK, ".g.nwb.ionmix-undo")
    shutil.copy(A, G)
    shutil.copy(JF, JG)  # another file's journal (another inode)
    jg = sha(JG)
    r = run("list g.nwb")
    one_line_error(r, "another file's journal", "does not match")
    check(sha(G) == a_sha and sha(JG) == jg, "another file's journal: both left alone")
    os.unlink(JG)
    with open(JF, "rb") as fp:  # the first range of f's journal: offset, length
        head = fp.read(16 + 7 * 8)
    off, ln = np.frombuffer(head[56:72], dtype="<u8")
    with open(F, "r+b") as fp:  # changed since: neither the old nor the new bytes
        fp.seek(int(off))
        fp.write(bytes([0xA5]) * int(ln))
    f_sha, jf = sha(F), sha(JF)
    r = run("correct f.nwb by 1")
    one_line_error(r, "a journal that no longer matches", "does not match")
    check(sha(F) == f_sha and sha(JF) == jf, "a mismatched journal: file and journal left alone")
    os.unlink(JF)
    # a journal cut short (a crash while it was written): the file was not
    # touched yet, the journal is removed with a note
    shutil.copy(A, F)
    fault("correct f.nwb by 7.5", "crash:1")
    with open(JF, "r+b") as fp:
        fp.truncate(os.path.getsize(JF) - 5)
    r = run("list f.nwb")
    check(r.returncode == 0 and "incomplete undo journal" in r.stdout and
          not os.path.exists(JF) and sha(F) == a_sha,
          "an incomplete journal removed with a note: %r %r" % (r.stdout, r.stderr))
    # an HDF5 reader holding the file (HDF5's file lock, when the library
    # takes one): in place is refused in one line, the file untouched
    shutil.copy(A, F)
    with h5py.File(F, "r"):
        with open(F, "rb") as fp:
            try:
                fcntl.flock(fp, fcntl.LOCK_EX | fcntl.LOCK_NB)
                held = False
            except BlockingIOError:
                held = True
        if held:
            r = run("correct f.nwb by 1")
            one_line_error(r, "in place while another program holds the file", "another program")
            check(sha(F) == a_sha and not os.path.exists(JF), "a locked file untouched")
    os.unlink(F)
    os.unlink(E)

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
