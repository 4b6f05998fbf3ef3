#!/usr/bin/env python3
"""tools/dev/count-results.py, which prints CI's closing line: it counts TAP cases inside meson's
JSON test logs and plain TAP files, counts a crash without a failing case as one failure, and
names every failing test (with its run) on a 'failing:' line just above 'N passed, N failed'.
The logs here are made up for the test; their layout is meson's testlog JSON (one object a line,
with name, suite, result and stdout), as meson writes it in build/meson-logs (common practice:
the fields read are those meson documents for its JSON test log). TAP output."""
import json
import os
import subprocess
import sys
import tempfile

here = os.path.dirname(os.path.abspath(__file__))
counter = os.path.join(os.path.dirname(here), "tools", "dev", "count-results.py")
checks = []


def check(what, ok):
    checks.append((what, bool(ok)))


def run(*paths):
    r = subprocess.run([sys.executable, counter, *paths], capture_output=True, text=True)
    return r.returncode, r.stdout.splitlines()


with tempfile.TemporaryDirectory() as d:
    logs = os.path.join(d, "build-ci", "meson-logs")
    os.makedirs(logs)
    good = os.path.join(logs, "testlog-all.json")
    with open(good, "w") as f:
        for t in ({"name": "store", "suite": ["isthmus:unit"], "result": "OK",
                   "stdout": "1..2\nok 1 - a\nok 2 - b\n"},
                  {"name": "reference", "suite": ["isthmus:cli"], "result": "OK", "stdout": ""},
                  {"name": "ref-linalg", "suite": ["isthmus:ref"], "result": "SKIP", "stdout": ""}):
            f.write(json.dumps(t) + "\n")
    rc, out = run(good)
    check("all green: exit 0", rc == 0)
    check("all green: closing line '3 passed, 0 failed, 1 skipped'",
          out[-1:] == ["3 passed, 0 failed, 1 skipped"])
    check("all green: no 'failing:' line", not any(l.startswith("failing") for l in out))

    bad = os.path.join(d, "build-san", "meson-logs", "testlog-sanitize.json")
    os.makedirs(os.path.dirname(bad))
    with open(bad, "w") as f:
        for t in ({"name": "real-neighbours", "suite": ["isthmus:slow", "isthmus:trained"],
                   "result": "FAIL", "stdout": "ok 1 - x\nnot ok 2 - en: three is #13\n"},
                  {"name": "align", "suite": ["isthmus:unit"], "result": "ERROR",
                   "stdout": "ok 1 - y\n"},
                  {"name": "headers", "suite": ["isthmus:headers"], "result": "TIMEOUT",
                   "stdout": ""}):
            f.write(json.dumps(t) + "\n")
    tap = os.path.join(d, "build-fuzz.tap")
    with open(tap, "w") as f:
        f.write("1..2\nok 1 - fuzz_json for 30s\nnot ok 2 - fuzz_map for 30s: crash\n")
    rc, out = run(good, bad, tap)
    check("red: exit 1", rc == 1)
    # passed: 2+1 (good) + 1 (x) + 1 (y) + 1 (fuzz_json) = 6; failed: not ok 2, the crash of
    # 'align' with no failing case, the timeout of 'headers', the fuzz case = 4
    check("red: closing line '6 passed, 4 failed, 1 skipped' (got %r)" % out[-1:],
          out[-1:] == ["6 passed, 4 failed, 1 skipped"])
    fl = [l for l in out if l.startswith("failing: ")]
    check("red: one 'failing:' line just above the closing line",
          len(fl) == 1 and out[-2] == fl[0])
    line = fl[0] if fl else ""
    for name in ("build-san (sanitize): slow/real-neighbours", "build-san (sanitize): unit/align",
                 "build-san (sanitize): headers/headers", "build-fuzz: fuzz_map"):
        check("red: the failing line names %s" % name, name in line)
    check("red: the failing case itself is listed",
          any("not ok 2 - en: three is #13" in l for l in out))
    rc, out = run(good, os.path.join(d, "nowhere", "meson-logs", "testlog-all.json"))
    check("a missing log fails and is named", rc == 1 and "log missing" in "\n".join(out))

print("1..%d" % len(checks))
failed = 0
for i, (what, ok) in enumerate(checks, 1):
    print("%s %d - %s" % ("ok" if ok else "not ok", i, what))
    failed += not ok
print("# count-results: %d passed, %d failed" % (len(checks) - failed, failed))
sys.exit(1 if failed else 0)
