#!/usr/bin/env python3
"""Count test cases in meson testlog JSON files (and plain TAP files, *.tap) and print
'N passed, N failed'.

A TAP test counts each of its 'ok' / 'not ok' lines; any other test counts once.
A test binary that failed without reporting a failing case (crash, sanitizer
report, timeout) counts as one more failure. Skipped tests (exit 77) count as
skipped. Exit status 1 when anything failed or a log is missing."""
import json
import re
import sys

passed = failed = skipped = 0
problems = []
for path in sys.argv[1:]:
    if path.endswith(".tap"):
        try:
            out = open(path, encoding="utf-8").read()
        except OSError as e:
            problems.append(f"{path}: {e.strerror}")
            failed += 1
            continue
        oks = len(re.findall(r"^ok \d+", out, re.M))
        bad = len(re.findall(r"^not ok \d+", out, re.M))
        passed += oks
        failed += bad
        if oks + bad == 0:
            problems.append(f"{path}: no test result")
            failed += 1
        continue
    try:
        lines = open(path, encoding="utf-8").read().splitlines()
    except OSError as e:
        problems.append(f"{path}: {e.strerror}")
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
tail = f", {skipped} skipped" if skipped else ""
print(f"{passed} passed, {failed} failed{tail}")
sys.exit(1 if failed else 0)
