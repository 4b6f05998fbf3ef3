#!/usr/bin/env python3
"""Every command listed by 'isthmus --help' has a section in the man page, and every long
option its --help shows appears in that section. Prints TAP.

usage: check_manpage.py ISTHMUS_BINARY MAN_PAGE"""
import re
import subprocess
import sys


def help_text(binary, *args):
    p = subprocess.run([binary, *args], capture_output=True, text=True)
    if p.returncode != 0:
        sys.exit(f"{binary} {' '.join(args)} exited {p.returncode}")
    return p.stdout


def commands(binary):
    text = help_text(binary, "--help")
    block = text.split("Commands:", 1)[1].split("\n\n", 1)[0]
    return [l.split()[0] for l in block.splitlines() if l.strip() and l.split()[0] != "help"]


def sections(man):
    """Map command name -> text of its '.SS isthmus NAME' section (roff escapes removed)."""
    out, name, buf = {}, None, []
    for line in man.splitlines():
        m = re.match(r"\.SS\s+isthmus\s+(\S+)", line)
        if m or line.startswith(".SH"):
            if name:
                out[name] = "\n".join(buf)
            name, buf = (m.group(1) if m else None), []
            continue
        if name:
            buf.append(line.replace("\\-", "-").replace("\\fB", "").replace("\\fR", "")
                       .replace("\\fI", ""))
    if name:
        out[name] = "\n".join(buf)
    return out


def main():
    binary, man_path = sys.argv[1], sys.argv[2]
    man = open(man_path, encoding="utf-8").read()
    secs = sections(man)
    glob = man.split(".SH COMMANDS")[0].replace("\\-", "-")
    results = []
    for opt in set(re.findall(r"--[a-z][a-z0-9-]*", help_text(binary, "--help"))):
        results.append((f"global option {opt} in the man page", opt in glob))
    for cmd in commands(binary):
        sec = secs.get(cmd)
        results.append((f"man page has a section for '{cmd}'", sec is not None))
        if sec is None:
            continue
        for opt in sorted(set(re.findall(r"--[a-z][a-z0-9-]*", help_text(binary, "help", cmd)))):
            if opt == "--help":
                continue
            results.append((f"{cmd} {opt} in the man page", opt in sec))
    print(f"1..{len(results)}")
    failed = 0
    for i, (name, ok) in enumerate(results, 1):
        print(("ok" if ok else "not ok") + f" {i} - {name}")
        failed += not ok
    print(f"# manpage: {len(results) - failed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
