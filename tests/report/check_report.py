#!/usr/bin/env python3
"""Render the HTML report in headless Chromium (Debian package `chromium`) and check it.

Usage: check_report.py ISTHMUS_BINARY FIXTURE_DIR

The fixture is a demo result with two runs (result.json, with the training provenance
of both vector files; one worst miss holds markup-like words so escaping is exercised)
and rules.thresholds, which `isthmus gate` turns into a verdict here with one rule
passing, one failing and one not checked. Checks, printed as TAP:
  - `isthmus gate` writes the verdict and `isthmus report` writes the page;
  - the answer to "can we ship these vectors?" comes before every section, and says no;
  - figures for people: the verdict table shows percents with one decimal, never a raw
    fraction (0.8163...) or null; the provenance table names the languages, the method,
    the dimension, the corpus, its tokens and the passes;
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

HEADINGS = ["Alignment report: English \u2192 Spanish", "Gate verdict",
            "How to read this report", "Headline figures",
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

    print("1..10")
    with tempfile.TemporaryDirectory() as tmp:
        page = os.path.join(tmp, "report.html")
        verdict = os.path.join(tmp, "verdict.json")
        result = os.path.join(fixtures, "result.json")
        g = subprocess.run([isthmus, "gate", "--thresholds",
                            os.path.join(fixtures, "rules.thresholds"), "--verdict-out", verdict,
                            result], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        r = subprocess.run([isthmus, "report", result, "--verdict", verdict,
                            "--source-language=English", "--target-language=Spanish",
                            "-o", page],
                           stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        check(g.returncode == 3 and r.returncode == 0 and os.path.exists(page),
              "isthmus gate writes the verdict (a rule fails: exit 3) and isthmus report the page",
              g.stderr + r.stderr)
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
        text = re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", dom))
        first = text.find("Can we ship these vectors?")
        check(0 <= first < text.find("Gate verdict") and
              re.search(r"Can we ship these vectors\? \S+ No 1 of 4 release rules fail", text)
              is not None, "the answer comes first and says no", text[:400])
        gate = dom[dom.find('id="verdict"'):dom.find('id="reading"')]
        raw = re.findall(r">\s*(-?0\.\d{3,}|null)\s*<", gate)
        check("81.6% " in gate and "[77.6, 85.1]" in gate and not raw,
              "the verdict table shows percents with intervals, no raw fraction", raw)
        prov = dom[dom.find('id="provenance"'):]
        want = ["English", "Spanish", "skip-gram negative sampling", "1,344,752 tokens",
                "data-samples/tillwick-es.txt.gz", ">100<", ">20<"]
        check(all(w in prov for w in want), "the provenance table says how both files were made",
              [w for w in want if w not in prov])
        check("&lt;b&gt;mug&lt;/b&gt;" in dom and "<b>mug</b>" not in dom and
              "<i>" not in dom, "words that look like markup stay text")
    print(f"# report-chromium: {n - failed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
