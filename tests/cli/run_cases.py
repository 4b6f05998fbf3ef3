#!/usr/bin/env python3
"""Golden CLI cases for isthmus, printed as TAP.

A case file holds blocks:

    ### name of the case
    $ shell command (run in a fresh directory holding the fixtures; isthmus on PATH)
    ? expected exit status
    > pattern that some stdout line must match (fnmatch glob), in order
    ! pattern that some stderr line must match (fnmatch glob), in order
    - path that must NOT exist afterwards (no partial output)
    + path that must exist afterwards

Usage: run_cases.py ISTHMUS_BINARY FIXTURE_DIR CASE_FILE...
"""
import fnmatch
import filecmp
import os
import re
import shutil
import subprocess
import sys
import tempfile


def parse(path):
    cases, cur = [], None
    with open(path, encoding="utf-8") as f:
        for n, raw in enumerate(f, 1):
            line = raw.rstrip("\n")
            if line.startswith("### "):
                cur = {"name": line[4:], "cmds": [], "exit": 0, "out": [], "err": [],
                       "absent": [], "present": [], "where": f"{path}:{n}"}
                cases.append(cur)
            elif not line.strip() or line.startswith("#"):
                continue
            elif cur is None:
                sys.exit(f"{path}:{n}: text before the first '### name' line")
            else:
                tag, rest = line[:1], line[2:]
                if tag == "$":
                    cur["cmds"].append(rest)
                elif tag == "?":
                    cur["exit"] = int(rest)
                elif tag == ">":
                    cur["out"].append(rest)
                elif tag == "!":
                    cur["err"].append(rest)
                elif tag == "-":
                    cur["absent"].append(rest)
                elif tag == "+":
                    cur["present"].append(rest)
                else:
                    sys.exit(f"{path}:{n}: unknown tag {tag!r}")
    return cases


def match_in_order(patterns, lines):
    i = 0
    for p in patterns:
        while i < len(lines) and not fnmatch.fnmatchcase(lines[i], p):
            i += 1
        if i == len(lines):
            return p
        i += 1
    return None


RESULTS_LOADED = [0]


def load_results(work, fixtures):
    """Every result file isthmus wrote in this case loads back (ISTHMUS_RESULT_LOADER);
    the fixtures copied in, and files a case damages on purpose (named bad-*), are not
    counted."""
    loader = os.environ.get("ISTHMUS_RESULT_LOADER")
    if not loader:
        return []
    found = []
    for root, _, names in os.walk(work):
        for n in names:
            path = os.path.join(root, n)
            try:
                with open(path, "rb") as f:
                    head = f.read(64)
            except OSError:
                continue
            if n.startswith("bad-"):
                continue
            fixture = os.path.join(fixtures, n)
            if root == work and os.path.isfile(fixture) and filecmp.cmp(path, fixture, False):
                continue
            if re.match(rb'\{\s*"format": "isthmus result",\s*"version"', head):
                found.append(path)
    if not found:
        return []
    RESULTS_LOADED[0] += len(found)
    p = subprocess.run([loader] + found, capture_output=True, timeout=120)
    if p.returncode != 0:
        return ["a result file it wrote does not load back: " +
                p.stderr.decode("utf-8", "replace").strip()]
    return []


def run_case(case, binary, fixtures):
    work = tempfile.mkdtemp(prefix="isthmus-cli-")
    try:
        if os.path.isdir(fixtures):
            for name in os.listdir(fixtures):
                src = os.path.join(fixtures, name)
                if os.path.isfile(src):
                    shutil.copy(src, work)
        bindir = os.path.join(work, ".bin")
        os.mkdir(bindir)
        os.symlink(os.path.abspath(binary), os.path.join(bindir, "isthmus"))
        env = dict(os.environ, PATH=bindir + os.pathsep + os.environ.get("PATH", ""),
                   LC_ALL="C.UTF-8")
        script = "\n".join(case["cmds"])
        p = subprocess.run(["sh", "-c", script], cwd=work, env=env, capture_output=True,
                           timeout=600)
        out = p.stdout.decode("utf-8", "replace").splitlines()
        err = p.stderr.decode("utf-8", "replace").splitlines()
        problems = []
        if p.returncode != case["exit"]:
            problems.append(f"exit {p.returncode}, expected {case['exit']}")
        miss = match_in_order(case["out"], out)
        if miss:
            problems.append(f"no stdout line matches {miss!r}")
        miss = match_in_order(case["err"], err)
        if miss:
            problems.append(f"no stderr line matches {miss!r}")
        for a in case["absent"]:
            if os.path.exists(os.path.join(work, a)):
                problems.append(f"{a} exists but must not")
        leftovers = [n for n in os.listdir(work) if ".tmp-" in n]
        if leftovers:
            problems.append(f"temporary files left: {leftovers}")
        for a in case["present"]:
            if not os.path.exists(os.path.join(work, a)):
                problems.append(f"{a} is missing")
        problems += load_results(work, fixtures)
        return problems, out, err
    finally:
        shutil.rmtree(work, ignore_errors=True)


def main():
    if len(sys.argv) < 4:
        sys.exit(__doc__)
    binary, fixtures = sys.argv[1], sys.argv[2]
    cases = []
    for path in sys.argv[3:]:
        cases += parse(path)
    print(f"1..{len(cases)}")
    failed = 0
    for i, c in enumerate(cases, 1):
        problems, out, err = run_case(c, binary, fixtures)
        if problems:
            failed += 1
            print(f"not ok {i} - {c['name']}")
            print(f"# at {c['where']}")
            for pr in problems:
                print(f"#   {pr}")
            for l in out[:15]:
                print(f"#   stdout: {l}")
            for l in err[:15]:
                print(f"#   stderr: {l}")
        else:
            print(f"ok {i} - {c['name']}")
    if os.environ.get("ISTHMUS_RESULT_LOADER"):
        print(f"# result files written by the cases and loaded back: {RESULTS_LOADED[0]}")
    print(f"# cli: {len(cases) - failed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
