#!/usr/bin/python3
"""make-bin.py - write the malformed command lines that a text file cannot
hold well (control bytes, NUL bytes, invalid UTF-8, more than 4096 bytes)
as tests/malformed/NAME.bin, one line per file, no line end.  Run it from
the repository root after changing a case here; the .bin files are kept in
the tree so that the tests need no generator.  Each must fail like the
lines of lines.txt (see tests/test_malformed.c)."""

import os

HERE = os.path.dirname(os.path.abspath(__file__))

CASES = {
    # over-long lines (CMD_LINE_MAX is 4096 bytes)
    "long-4097": b"a" * 4097,
    "long-show": b"show " + b"b" * 5000,
    "long-comment": b"# " + b"x" * 5000,
    "long-add": b"add NaCl " + b"1" * 4100,
    "long-quoted": b'add "' + b"N" * 4200 + b'" 10',
    "long-20k": b"temp 30 " + b"z" * 20000,
    "many-words": b"add NaCl" + b" 1" * 70,
    "many-words-quoted": b"help" + b' ""' * 80,
    # control bytes
    "ctrl-soh": b"add NaCl\x01 10",
    "ctrl-esc": b"show \x1b[2J",
    "ctrl-bel": b"\x07",
    "ctrl-del": b"add NaCl 10\x7f",
    "ctrl-bs": b"add NaCl 1\x08 10",
    "ctrl-vt": b"add\x0bNaCl 10",
    "ctrl-ff": b"temp 30\x0c",
    "ctrl-us": b"add NaCl 10 \x1f",
    "ctrl-quoted": b'add "Na\x02Cl" 10',
    "ctrl-after-comment": b"temp 30 # \x1b",
    "ctrl-eot": b"\x04",
    "ctrl-sub": b"add KCl 1\x1a",
    "newline-in-quotes": b'add NaCl 10 "m\nM"',
    "cr-in-quotes": b"add 'Na\rCl' 10",
    # invalid UTF-8
    "utf8-ff-fe": b"\xff\xfe",
    "utf8-bad-pair": b"add \xc3\x28 10",
    "utf8-overlong-slash": b"add NaCl 10 \xc0\xaf",
    "utf8-surrogate": b"solution \xed\xa0\x80",
    "utf8-truncated": b"add Na\xe2\x82 10",
    "utf8-five-byte": b"\xf8\x88\x80\x80\x80",
    "utf8-latin1-micro": b"add NaCl 1 \xb5M",
    "utf8-stray-continuation": b"temp \x8030",
    # a byte-order mark starts a script harmlessly (it is skipped), but
    # inside a line it is a stray character before the command
    "utf8-bom-command": b"show \xef\xbb\xbfbath",
    "utf8-beyond-10ffff": b"info \xf4\x90\x80\x80",
    # NUL bytes (fed as a script line: a C string would end at the NUL)
    "nul-middle": b"add NaCl\x0010",
    "nul-only": b"\x00",
    "nul-after-command": b"show\x00",
    "nul-hides-rest": b"temp 30\x00 extra",
    "nul-in-quotes": b'add "NaCl\x00" 10',
}


def main():
    for name, data in sorted(CASES.items()):
        with open(os.path.join(HERE, name + ".bin"), "wb") as f:
            f.write(data)
    print(f"make-bin: wrote {len(CASES)} files")


if __name__ == "__main__":
    main()
