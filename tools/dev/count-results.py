#!/usr/bin/env python3
"""Count test cases in meson testlog JSON files (and plain TAP files, *.tap) and print
'N passed, N failed'.

A TAP test counts each of its 'ok' / 'not ok' lines; any other test counts once.
A test binary that failed without reporting a failing case (crash, sanitizer
report, timeout) counts as one more failure. Skipped tests (exit 77) count as
skipped. Exit status 1 when anything failed or a log is missing.

Before the closing line, one line 'failing: ...' names every failing test with its run (the
build directory or TAP file it came from), so a red CI run is read at a glance; the failing
cases themselves ('not ok' lines) are listed above it."""
import json
import os
import re
import sys

passed = failed = skipped = 0
problems = []
failing = []        # "run: test" for every test with a failure
cases = []          # its 'not ok' lines


def run_label(path):
    """build-ci/meson-logs/testlog-all.json -> build-ci (all); build-fuzz.tap -> build-fuzz"""
    parts = os.path.normpath(path).split(os.sep)
    if len(parts) >= 3 and parts[-2] == "meson-logs":
        setup = os.path.basename(path)[len("testlog-"):-len(".json")] if \
            os.path.basename(path).startswith("testlog-") else ""
        return parts[-3] + (" (%s)" % setup if setup else "")
    return os.path.splitext(os.path.basename(path))[0]


def note_failure(path, name, out):
    failing.append("%s: %s" % (run_label(path), name))
    for line in re.findall(r"^not ok \d+.*$", out, re.M):
        cases.append("  %s %s: %s" % (run_label(path), name, line))


for path in sys.argv[1:]:
    if path.endswith(".tap"):
        try:
            out = open(path, encoding="utf-8").read()
        except OSError as e:
            problems.append(f"{path}: {e.strerror}")
            failing.append(f"{path}: log missing")
            failed += 1
            continue
        oks = len(re.findall(r"^ok \d+", out, re.M))
        bad = len(re.findall(r"^not ok \d+", out, re.M))
        passed += oks
        failed += bad
        for line in re.findall(r"^not ok \d+ - (\S+).*$", out, re.M):
            failing.append("%s: %s" % (run_label(path), line))
        if oks + bad == 0:
            problems.append(f"{path}: no test result")
            failing.append(f"{run_label(path)}: no test result")
            failed += 1
        continue
    try:
        lines = open(path, encoding="utf-8").read().splitlines()
    except OSError as e:
        problems.append(f"{path}: {e.strerror}")
        failing.append(f"{path}: log missing")
        failed += 1
        continue
    for line in lines:
        if not line.strip():
            continue
        t = json.loads(line)
        result = t.get("result", "")
        out = t.get("stdout", "") or ""
        if result == "SKIP":
            skipped += 1
            continue
        oks = len(re.findall(r"^ok \d+", out, re.M))
        bad = len(re.findall(r"^not ok \d+", out, re.M))
        name = "%s/%s" % ((t.get("suite") or ["?"])[0].split(":")[-1], t.get("name"))
        if bad or result not in ("OK", "EXPECTEDFAIL"):
            note_failure(path, name, out)
        if oks or bad:
            passed += oks
            failed += bad
            if result not in ("OK", "EXPECTEDFAIL") and bad == 0:
                failed += 1
                problems.append(f"{t.get('name')}: {result} with no failing case reported")
        elif result in ("OK", "EXPECTEDFAIL"):
            passed += 1
        else:
            failed += 1
            problems.append(f"{t.get('name')}: {result}")
for p in problems:
    print(p)
if cases:
    print("failing cases:")
    for c in cases:
        print(c)
if failing:
    print("failing: " + "; ".join(failing))
tail = f", {skipped} skipped" if skipped else ""
print(f"{passed} passed, {failed} failed{tail}")
sys.exit(1 if failed else 0)
