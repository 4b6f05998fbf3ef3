#!/usr/bin/env python3
"""Render the HTML report in headless Chromium (Debian package `chromium`) and check it.

Usage: check_report.py ISTHMUS_BINARY FIXTURE_DIR

The fixture (result.json, verdict.json) is a demo result with two runs; its "ci"
intervals are placeholders shaped like the ones the gate writes, and one worst miss
holds markup-like words so escaping is exercised. Checks, printed as TAP:
  - `isthmus report` writes the page;
  - every inline <svg> parses as XML (xml.etree), and the checker itself rejects
    a page whose SVG is broken;
  - Chromium makes a screenshot (a PNG file, by its signature);
  - the DOM Chromium builds (--dump-dom) has the expected headings, the same number of
    svg elements as the page source, and the markup-like words as text, not elements.
Skips (1..0 # SKIP) when chromium is not installed.
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

HEADINGS = ["Alignment report", "Headline figures", "Gate verdict",
            "Precision by frequency band", "Similarity of gold and random pairs",
            "Hubness", "Isometry", "Worst misses", "Inputs and provenance"]

CHROMIUM_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                  "--no-first-run", "--disable-background-networking",
                  "--disable-component-update", "--disable-sync"]


def svg_problems(html):
    """Return (number of <svg> elements, list of parse errors)."""
    blocks = re.findall(r"<svg\b.*?</svg>", html, re.S)
    opened = len(re.findall(r"<svg\b", html))
    errors = []
    if opened != len(blocks):
        errors.append(f"{opened} <svg> opened but {len(blocks)} closed")
    for i, b in enumerate(blocks):
        try:
            root = ET.fromstring(b)
            if root.tag != "{http://www.w3.org/2000/svg}svg":
                errors.append(f"svg {i}: root element {root.tag}")
        except ET.ParseError as e:
            errors.append(f"svg {i}: {e}")
    return len(blocks), errors


def chromium(binary, args, url, timeout=120):
    with tempfile.TemporaryDirectory() as profile:
        cmd = [binary] + CHROMIUM_FLAGS + [f"--user-data-dir={profile}"] + args + [url]
        return subprocess.run(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                              timeout=timeout)


def main():
    isthmus, fixtures = sys.argv[1], sys.argv[2]
    browser = shutil.which("chromium") or shutil.which("chromium-browser")
    if not browser:
        print("1..0 # SKIP chromium is not installed (Debian package chromium)")
        return 0
    n, failed = 0, 0

    def check(ok, name, detail=""):
        nonlocal n, failed
        n += 1
        failed += not ok
        print(f"{'ok' if ok else 'not ok'} {n} - {name}")
        if not ok and detail:
            for line in str(detail).splitlines()[:20]:
                print(f"# {line}")

    print("1..7")
    with tempfile.TemporaryDirectory() as tmp:
        page = os.path.join(tmp, "report.html")
        r = subprocess.run([isthmus, "report", os.path.join(fixtures, "result.json"),
                            "--verdict", os.path.join(fixtures, "verdict.json"), "-o", page],
                           stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        check(r.returncode == 0 and os.path.exists(page), "isthmus report writes the page",
              r.stderr)
        if r.returncode != 0:
            return 1
        html = open(page, encoding="utf-8").read()
        count, errors = svg_problems(html)
        check(count >= 4 and not errors, f"all {count} inline svg elements parse as XML",
              "\n".join(errors))
        broken = html.replace("</rect>", "</rectangle>", 1)
        check(svg_problems(broken)[1] != [], "a page with broken SVG is rejected")

        shot = os.path.join(tmp, "shot.png")
        r = chromium(browser, [f"--screenshot={shot}", "--window-size=1200,3000"],
                     "file://" + page)
        ok = os.path.exists(shot) and open(shot, "rb").read(8) == b"\x89PNG\r\n\x1a\n"
        check(ok and os.path.getsize(shot) > 10000, "chromium makes a screenshot",
              r.stderr.decode(errors="replace")[-2000:])

        r = chromium(browser, ["--dump-dom"], "file://" + page)
        dom = r.stdout.decode("utf-8", errors="replace")
        heads = [re.sub(r"<[^>]+>", "", h).strip()
                 for h in re.findall(r"<h[12][^>]*>(.*?)</h[12]>", dom, re.S)]
        missing = [h for h in HEADINGS if h not in heads]
        check(r.returncode == 0 and not missing, "the DOM has the expected headings",
              f"missing {missing}; found {heads}")
        dom_svgs = len(re.findall(r"<svg\b", dom))
        check(dom_svgs == count, f"the DOM has the page's {count} svg elements",
              f"DOM has {dom_svgs}")
        check("&lt;b&gt;mug&lt;/b&gt;" in dom and "<b>mug</b>" not in dom and
              "<i>" not in dom, "words that look like markup stay text")
    print(f"# report-chromium: {n - failed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
