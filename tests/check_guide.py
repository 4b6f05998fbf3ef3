#!/usr/bin/env python3
"""Run the commands of the user guide in order, as a reader would, on the shipped demo data.

docs/guide.md marks each block to run with the line
    <!-- run: tests/check_guide.py runs the next block, in order -->
before an indented code block. Every command of those blocks (a line ending in '\\' goes on
with the next) runs with sh in one fresh directory that holds data-samples/ and has isthmus
on PATH, in the order of the guide. Each must exit 0, and every file it says it writes
(-o FILE, --output=FILE, --*-out=FILE, the target of cp, a '> FILE' redirection) must then
exist and not be empty. TAP, one test per command and one per file.

usage: check_guide.py ISTHMUS SOURCE_ROOT [WORK_DIR]"""
import os
import re
import shlex
import shutil
import subprocess
import sys
import tempfile

MARK = "<!-- run: tests/check_guide.py runs the next block, in order -->"


def marked_commands(path):
    """The commands of the marked blocks, with the guide's line number of each."""
    lines = open(path, encoding="utf-8").read().split("\n")
    out, i = [], 0
    while i < len(lines):
        if lines[i].strip() != MARK:
            i += 1
            continue
        i += 1
        while i < len(lines) and not lines[i].strip():
            i += 1
        if i >= len(lines) or not lines[i].startswith("    "):
            sys.exit("%s:%d: a run marker not followed by an indented code block" % (path, i))
        cur, start = "", None
        while i < len(lines) and (lines[i].startswith("    ") or not lines[i].strip()):
            text = lines[i][4:]
            if text.strip() and not text.lstrip().startswith("#"):
                if start is None:
                    start = i + 1
                if text.rstrip().endswith("\\"):
                    cur += text.rstrip()[:-1] + " "
                else:
                    out.append((start, " ".join((cur + text).split())))
                    cur, start = "", None
            i += 1
    return out


def claimed_outputs(cmd):
    """Files a command says it writes."""
    words = shlex.split(cmd, comments=True)
    found = []
    for k, w in enumerate(words):
        if w in ("-o", "--output") and k + 1 < len(words):
            found.append(words[k + 1])
        elif re.match(r"^--(output|[a-z-]+-out)=", w):
            found.append(w.split("=", 1)[1])
        elif w == ">" and k + 1 < len(words):
            found.append(words[k + 1])
    if words and words[0] == "cp" and len(words) >= 3:
        found.append(words[-1])
    return [f for f in found if f != "-"]


def main():
    if len(sys.argv) < 3:
        sys.exit(__doc__)
    exe, root = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
    guide = os.path.join(root, "docs", "guide.md")
    work = sys.argv[3] if len(sys.argv) > 3 else tempfile.mkdtemp(prefix="isthmus-guide-")
    shutil.rmtree(work, ignore_errors=True)
    os.makedirs(os.path.join(work, ".bin"))
    os.symlink(os.path.join(root, "data-samples"), os.path.join(work, "data-samples"))
    os.symlink(exe, os.path.join(work, ".bin", "isthmus"))
    env = dict(os.environ, PATH=os.path.join(work, ".bin") + os.pathsep + os.environ["PATH"],
               LC_ALL="C.UTF-8")
    cmds = marked_commands(guide)
    checks = []   # (ok, name, detail)
    if len(cmds) < 10:
        checks.append((False, "the guide marks at least 10 commands to run, found %d" % len(cmds),
                       ""))
    stopped = False
    for line, cmd in cmds:
        name = "guide.md:%d: %s" % (line, cmd if len(cmd) < 90 else cmd[:87] + "...")
        if stopped:
            checks.append((False, name + " (not run: an earlier command failed)", ""))
            continue
        p = subprocess.run(["sh", "-c", cmd], cwd=work, env=env, capture_output=True,
                           timeout=1200)
        err = p.stderr.decode("utf-8", "replace").strip().splitlines()
        checks.append((p.returncode == 0, "%s (exit %d)" % (name, p.returncode),
                       "\n".join(err[-8:])))
        if p.returncode != 0:
            stopped = True   # the later steps read what this one should have written
            continue
        for f in claimed_outputs(cmd):
            path = os.path.join(work, f)
            ok = os.path.isfile(path) and os.path.getsize(path) > 0
            checks.append((ok, "guide.md:%d: it wrote %s" % (line, f), ""))
    print("1..%d" % len(checks))
    failed = 0
    for n, (ok, name, detail) in enumerate(checks, 1):
        print("%s %d - %s" % ("ok" if ok else "not ok", n, name))
        if not ok:
            failed += 1
            for d in detail.splitlines():
                print("#   " + d)
    if len(sys.argv) <= 3:
        shutil.rmtree(work, ignore_errors=True)
    print("# guide: %d passed, %d failed" % (len(checks) - failed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
