#!/usr/bin/python3
"""The bash completion of isthmus, run through bash's own completion machinery (the
function 'complete -F' names, with COMP_WORDS and COMP_CWORD set as bash sets them when Tab
is pressed), printed as TAP.

usage: check_completion.py ISTHMUS COMPLETION_FILE WORK_DIR

Every option it offers is tried on the program ('isthmus CMD --opt[=VALUE] --help' must be
accepted), so an option renamed or dropped in the program and still offered fails here;
every command of 'isthmus --help' and every option of 'isthmus help CMD' must be offered, so
nothing the program has is missing. Files are offered by kind, read from their first bytes."""
import os
import re
import shutil
import subprocess
import sys

exe, comp, work = (os.path.abspath(a) for a in sys.argv[1:4])
bash = shutil.which("bash") or "/bin/bash"
sys.dont_write_bytecode = True          # leave no __pycache__ in the source tree
sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
from tap import Tap  # noqa: E402
tap = Tap("completion", detail_lines=30)
check = tap.check


def program(*args):
    return subprocess.run([exe, *args], capture_output=True, text=True, cwd=work)


SCRIPT = r'''
source "$1" || exit 9
[[ $(complete -p isthmus) == "complete -F _isthmus isthmus" ]] || exit 8
shift
COMP_LINE="$1"; COMP_POINT=${#COMP_LINE}; shift
COMP_WORDS=("$@"); COMP_CWORD=$((${#COMP_WORDS[@]} - 1))
_isthmus 2>/dev/null
printf '%s\n' "${COMPREPLY[@]}"
'''


def words_of(line, split_eq=True):
    """COMP_WORDS as bash builds them with the default COMP_WORDBREAKS (which holds '='):
    "--map=x" is three words, "--map", "=" and "x"."""
    out = []
    for w in line.split(" "):
        if split_eq and "=" in w and w.startswith("-"):
            a, b = w.split("=", 1)
            out += [a, "="] + ([b] if b else [])
        else:
            out.append(w)
    return out


def complete(line, split_eq=True):
    p = subprocess.run([bash, "--norc", "--noprofile", "-c", SCRIPT, "bash", comp, line] +
                       words_of(line, split_eq), capture_output=True, text=True, cwd=work)
    if p.returncode != 0:
        return ["(bash exit %d: %s)" % (p.returncode, p.stderr.strip())]
    return [w for w in p.stdout.split("\n") if w]


def long_options(text):
    """The long options of a help text's option lists (left column), independently of the
    completion's generator: {name: takes_value}."""
    found = {}
    text = re.split(r"^Examples?:", text, flags=re.M)[0]
    for line in text.splitlines():
        if not re.match(r"^ {2,}-", line):
            continue
        for word in line.split():
            m = re.match(r"^(--[a-z][\w-]*)(=\S+)?,?$", word)
            if not m:
                if not word.startswith("-"):
                    break
                continue
            found[m.group(1)] = bool(m.group(2))
    return found


shutil.rmtree(work, ignore_errors=True)
os.makedirs(work)
top = program("--help").stdout
commands = [l.split()[0] for l in top.split("Commands:", 1)[1].split("\n\n", 1)[0].splitlines()
            if l.strip()]

# --- commands and global options -------------------------------------------------------
got = complete("isthmus ")
check(sorted(got) == sorted(commands), "'isthmus <Tab>' offers every command of 'isthmus "
      "--help' (%d)" % len(commands), "offered %s\nhelp %s" % (got, commands))
check(complete("isthmus sc") == ["score"], "'isthmus sc<Tab>' completes to score",
      complete("isthmus sc"))
check(complete("isthmus help al") == ["align"], "'isthmus help al<Tab>' completes to align")
glob = long_options(top.split("Global options:", 1)[1])
got = complete("isthmus --")
want = sorted(n + ("=" if v else "") for n, v in glob.items())
check(sorted(got) == want, "'isthmus --<Tab>' offers the global options", got)
vals = complete("isthmus --progress=")
check(len(vals) >= 2 and all(program("--progress=" + v, "--version").returncode == 0
                             for v in vals),
      "--progress=<Tab> offers values the program accepts: %s" % " ".join(vals))
check(complete("isthmus -q --progress always sc") == ["score"],
      "global options and their values before the command are skipped")

# --- every option of every command -----------------------------------------------------
SAMPLES = ["2", "0.5", "1", "1000", "1048576", "length", "100,200", "1,1", "x.txt"]
for cmd in commands:
    if cmd == "help":
        continue
    offered = complete("isthmus %s --" % cmd)
    helped = long_options(program("help", cmd).stdout)
    # the global options but --help and --version are taken after the command too
    helped.update({n: v for n, v in glob.items() if n not in ("--help", "--version")})
    want = sorted(n + ("=" if v else "") for n, v in helped.items())
    check(sorted(offered) == want, "%s: offers exactly the long options of 'isthmus help %s' "
          "and the global -q, -v, --progress (%d)" % (cmd, cmd, len(want)),
          "missing %s\nextra %s" % (sorted(set(want) - set(offered)),
                                    sorted(set(offered) - set(want))))
    refused = []
    for o in offered:
        if o.endswith("="):
            # the work folder is still empty: what is offered here are listed values
            values = complete("isthmus %s %s" % (cmd, o))
            tries = values[:1] + SAMPLES if values else SAMPLES
            if not any(program(cmd, o + t, "--help").returncode == 0 for t in tries):
                refused.append(o + "VALUE")
            for v in values:
                if program(cmd, o + v, "--help").returncode != 0:
                    refused.append(o + v)
        elif program(cmd, o, "--help").returncode != 0:
            refused.append(o)
    check(not refused, "%s: the program accepts every option (and value) offered" % cmd,
          "refused: %s" % refused)
p = program("score", "--no-such-option", "--help")
check(p.returncode == 2, "control: the program refuses an option it does not have (exit 2)",
      p.stderr)

# --- files by kind ---------------------------------------------------------------------
root = os.path.dirname(os.path.dirname(os.path.dirname(comp)))
fx = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "cli", "fixtures")
for f in ("align-en.txt", "align-es.txt", "align-seeds.pairs", "align-test.pairs"):
    shutil.copy(os.path.join(fx, f), work)
os.makedirs(os.path.join(work, "sub"))
for args in (["convert", "align-en.txt", "en.isv"], ["convert", "align-es.txt", "es.isv"],
             ["align", "en.isv", "es.isv", "--seeds=align-seeds.pairs", "-o", "m.map",
              "--test=align-test.pairs", "--json-out=r.json"],
             ["prepare", "--min-freq=1", "-o", "c.prep", "align-seeds.pairs"],
             ["propose", "en.isv", "es.isv", "--map=m.map", "-o", "cand.tsv"]):
    p = program("-q", *args)
    if p.returncode != 0:
        sys.exit("isthmus %s: %s" % (" ".join(args), p.stderr))
with open(os.path.join(work, "min.thresholds"), "w") as f:
    f.write("min coverage 0.5\n")
program("-q", "gate", "--thresholds=min.thresholds", "--verdict-out=v.json", "r.json")
kinds = {"en.isv", "es.isv", "m.map", "c.prep", "r.json", "v.json", "cand.tsv"}


def offers(line, want, avoid, split_eq=True):
    got = set(complete(line, split_eq))
    check(want <= got and not (avoid & got), "'%s<Tab>' offers %s, not %s"
          % (line, " ".join(sorted(want)), " ".join(sorted(avoid))), sorted(got))


offers("isthmus score --map=", {"m.map", "sub"}, kinds - {"m.map"})
offers("isthmus score --map m", {"m.map"}, kinds - {"m.map"})
offers("isthmus score ", {"en.isv", "es.isv", "align-en.txt", "sub"}, kinds - {"en.isv", "es.isv"})
offers("isthmus score en.isv --map=m.map e", {"en.isv", "es.isv"}, {"m.map"})
offers("isthmus gate --thresholds=min.thresholds ", {"r.json", "en.isv"},
       {"v.json", "m.map", "c.prep"})
offers("isthmus gate --baseline ", {"r.json"}, kinds - {"r.json"})
offers("isthmus report ", {"r.json"}, kinds - {"r.json"})
offers("isthmus report r.json --verdict=", {"v.json"}, kinds - {"v.json"})
offers("isthmus train -o x.isv ", {"c.prep", "align-en.txt"}, kinds - {"c.prep"})
offers("isthmus merge-pairs align-seeds.pairs ", {"cand.tsv"}, kinds - {"cand.tsv"})
offers("isthmus inspect ", {"en.isv"}, kinds - {"en.isv", "es.isv"})
got = complete("isthmus score --map=m", split_eq=False)
check(got == ["--map=m.map"], "with '=' not a word break, the option stays in front of the "
      "value", got)
got = complete("isthmus lookup en.isv es.isv --map=m.map kett")
check(got == [], "words to look up are not completed as files", got)
got = complete("isthmus score --rank-by=c")
check(sorted(got) == ["cosine", "csls"] or not got and "--rank-by" not in
      program("help", "score").stdout, "--rank-by=c<Tab> offers cosine and csls", got)

sys.exit(tap.end())
