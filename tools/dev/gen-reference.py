#!/usr/bin/env python3
"""Write docs/reference.md from the program's own help texts, so the reference cannot drift
from the code. With --check, compare instead and exit 1 on a difference (a test does that).

usage: gen-reference.py ISTHMUS OUT.md [--check]"""
import subprocess
import sys


def helptext(binary, *args):
    return subprocess.run([binary, *args], capture_output=True, text=True, check=True).stdout


def build(binary):
    top = helptext(binary, "--help")
    block = top.split("Commands:", 1)[1].split("\n\n", 1)[0]
    cmds = [l.split()[0] for l in block.splitlines() if l.strip() and l.split()[0] != "help"]
    out = ["# Command reference", "",
           "Generated from `isthmus --help` and `isthmus help COMMAND` by",
           "`tools/dev/gen-reference.py`; the test suite checks that it matches the program.", "",
           "## isthmus", "", "```", top.rstrip(), "```", ""]
    for c in cmds:
        out += [f"## isthmus {c}", "", "```", helptext(binary, "help", c).rstrip(), "```", ""]
    return "\n".join(out)


def main():
    binary, path = sys.argv[1], sys.argv[2]
    text = build(binary)
    if "--check" in sys.argv[3:]:
        try:
            old = open(path, encoding="utf-8").read()
        except OSError:
            old = ""
        ok = old == text
        print("1..1")
        print(("ok" if ok else "not ok") + " 1 - docs/reference.md matches the help texts"
              + ("" if ok else " (run tools/dev/gen-reference.py build/tools/isthmus docs/reference.md)"))
        print(f"# reference: {int(ok)} passed, {int(not ok)} failed")
        return 0 if ok else 1
    with open(path + ".tmp", "w", encoding="utf-8") as f:
        f.write(text)
    import os
    os.replace(path + ".tmp", path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
