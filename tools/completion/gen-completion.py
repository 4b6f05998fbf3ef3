#!/usr/bin/python3
"""Write the bash completion of isthmus from the program's own help texts, so that its
lists of commands, options and option values cannot drift from what the program has.

usage: gen-completion.py ISTHMUS OUTPUT

Read from 'isthmus --help': the commands and the global options; from 'isthmus help CMD':
every long option of the option lists (the left column), whether it takes a value (=ARG),
the values of an option whose description lists them ("cosine, csls or both"), and the
arguments of the usage lines. Kinds of file (by their first bytes, docs/formats.md) come from
the argument names and a few option names (FILE_KINDS below). Bash-only: no helper of the
bash-completion package is needed."""
import os
import re
import subprocess
import sys

# what a placeholder in the usage line or an option's argument names
ARG_KINDS = {
    "SRC": "vectors", "TGT": "vectors", "IN": "vectors", "MAP": "map",
    "RESULT.json": "result", "INPUT": "corpus", "FILE": "any", "SEEDS": "any",
    "REVIEWED": "candidates", "OUT": "any", "CANDIDATES": "any", "REPORT.html": "any",
    "WORD": "none",
}
# options whose FILE is a particular kind; others take any file
FILE_KINDS = {"baseline": "result", "verdict": "verdict", "map": "map"}
# the positional FILE of these commands is a vector file, of prepare raw text
POSITIONAL_FILE = {"inspect": "vectors", "prepare": "text"}
# placeholders that never stand for a list of words
NOT_ENUM = {"FILE", "MAP", "OUT", "N", "MIB", "FRACTION", "X", "T", "A", "S", "P", "Q", "DIR"}


def help_text(exe, *args):
    p = subprocess.run([exe, *args], capture_output=True, text=True)
    if p.returncode != 0:
        sys.exit("gen-completion: %s %s: exit %d" % (exe, " ".join(args), p.returncode))
    return p.stdout


def option_lines(text):
    """(left column, description) of every option line, descriptions joined over their
    continuation lines."""
    out = []
    text = re.split(r"^Examples?:", text, flags=re.M)[0]   # example lines are not options
    for line in text.splitlines():
        m = re.match(r"^ {2,}(-.*)$", line)
        if m:
            # the left column: option words ("-o, --output=FILE", "--a, --b,") up to the first
            # word that is not one; a long one may run into its description after one space
            words = m.group(1).split()
            n = 0
            while n < len(words) and re.match(r"^--?[a-zA-Z]", words[n]):
                n += 1
            out.append([" ".join(words[:n]), " ".join(words[n:])])
        elif out and re.match(r"^ {10,}\S", line):
            out[-1][1] += " " + line.strip()
        elif not line.strip():
            continue
        elif out and not line.startswith(" "):
            out.append(["", ""])        # a new section: nothing continues across it
    return [o for o in out if o[0]]


def enum_values(desc):
    flat = desc.split("[default")[0]
    while re.search(r"\([^()]*\)", flat):                # innermost brackets first
        flat = re.sub(r"\([^()]*\)", " ", flat)
    flat = re.sub(r"\s+", " ", flat)
    m = re.search(r"([a-z][\w+-]*)((?:\s*, [a-z][\w+-]*)*),? or ([a-z][\w+-]*)", flat)
    if not m:
        return []
    words = [m.group(1)] + re.findall(r"[a-z][\w+-]*", m.group(2)) + [m.group(3)]
    return words


def options(text):
    """{--name: (takes_value, placeholder, values)}; short forms too (-o: value)."""
    found = {}
    for left, desc in option_lines(text):
        for m in re.finditer(r"(?<![\w-])(--?[a-zA-Z][\w-]*)(=(\S+?))?(?=,|\s|$)", left):
            name, arg = m.group(1), m.group(3)
            if name.startswith("--") or len(name) == 2:
                vals = enum_values(desc) if arg and arg not in NOT_ENUM else []
                found[name] = (bool(arg), arg or "", vals)
        # "-o, --output=FILE": the short form takes the value too
        short = re.match(r"(-\w), (--[\w-]+)=(\S+)", left)
        if short:
            found[short.group(1)] = (True, short.group(3), [])
    return found


def positionals(text, cmd):
    """Per usage line, the kinds of the positional arguments (the last may repeat)."""
    lines, in_usage = [], False
    for line in text.splitlines():
        m = re.match(r"^Usage: isthmus %s (.*)$" % re.escape(cmd), line)
        if not m and in_usage:
            m = re.match(r"^ +isthmus %s (.*)$" % re.escape(cmd), line)
        in_usage = bool(m)
        if not m:
            continue
        kinds, words = [], m.group(1).split()
        skip = False
        for w in words:
            if skip:
                skip = False
                continue
            if w.startswith("["):
                continue
            if w.startswith("-"):
                skip = "=" not in w and w in ("-o",)
                continue
            rep = w.endswith("...")
            name = w[:-3] if rep else w
            kind = ARG_KINDS.get(name, "any")
            if name == "FILE" and cmd in POSITIONAL_FILE:
                kind = POSITIONAL_FILE[cmd]
            kinds.append(kind + ("..." if rep else ""))
        lines.append(kinds)
    return lines


def value_kind(name, arg, vals):
    """What completes the value of option --name=ARG."""
    if vals:
        return "values:" + " ".join(vals)
    if name in ("output", "o") or arg in ("OUT", "CANDIDATES", "REPORT.html"):
        return "any"                     # a file to write: any name
    if arg in ("FILE", "MAP"):
        return FILE_KINDS.get(name, "map" if arg == "MAP" else "any")
    return "none"                        # a number or a list of numbers


def main():
    exe, out = sys.argv[1:3]
    top = help_text(exe, "--help")
    block = top.split("Commands:", 1)[1].split("\n\n", 1)[0]
    commands = [l.split()[0] for l in block.splitlines() if l.strip()]
    glob = options(top.split("Global options:", 1)[1])
    per = {c: options(help_text(exe, "help", c)) for c in commands if c != "help"}
    # -q, -v and --progress are taken after the command name too
    after = {n: v for n, v in glob.items() if n not in ("-h", "--help", "--version")}
    for c in per:
        per[c] = {**after, **per[c]}
    pos = {c: positionals(help_text(exe, "help", c), c) for c in commands if c != "help"}

    def q(s):
        return "'" + s.replace("'", "'\\''") + "'"

    def word_list(opts):
        return " ".join(sorted(n + ("=" if v[0] and n.startswith("--") else "")
                               for n, v in opts.items()))

    lines = [
        "# bash completion for isthmus: commands, options, option values and files by kind.",
        "# Generated by tools/completion/gen-completion.py from the program's help texts; do not edit.",
        "# Installed as share/bash-completion/completions/isthmus; or source it from ~/.bashrc.",
        "",
        "_isthmus_commands=%s" % q(" ".join(commands)),
        "_isthmus_global=%s" % q(word_list(glob)),
        "declare -gA _isthmus_opts=(",
    ]
    for c, o in per.items():
        lines.append("    [%s]=%s" % (c, q(word_list(o))))
    lines.append(")")
    lines.append("declare -gA _isthmus_argkind=(")
    for n, (takes, arg, vals) in sorted(glob.items()):
        if takes:
            lines.append("    [%s]=%s" % (q(" " + n), q(value_kind(n.lstrip("-"), arg, vals))))
    for c, o in per.items():
        for n, (takes, arg, vals) in sorted(o.items()):
            if not takes:
                continue
            lines_kind = value_kind(n.lstrip("-"), arg, vals)
            lines.append("    [%s]=%s" % (q(c + " " + n), q(lines_kind)))
    lines.append(")")
    lines.append("declare -gA _isthmus_positional=(")
    for c, usages in pos.items():
        width = max((len(u) for u in usages), default=0)
        for i in range(width):
            kinds = sorted({u[i] if i < len(u) else (u[-1] if u and u[-1].endswith("...")
                                                      else "") for u in usages} - {""})
            lines.append("    [%s]=%s" % (q("%s %d" % (c, i + 1)), q(" ".join(kinds))))
    lines.append(")")
    body = os.path.join(os.path.dirname(os.path.abspath(__file__)), "isthmus-body.bash")
    lines.append(open(body).read())
    text = "\n".join(lines)
    with open(out, "w") as f:
        f.write(text)


main()
