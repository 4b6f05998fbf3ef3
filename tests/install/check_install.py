#!/usr/bin/python3
"""The installed library, as a C program outside the tree sees it, printed as TAP.

'meson install' into a staging directory, then: the headers, shared and static libraries,
pkg-config file, man page, program and shell completion are where they belong and say the
right things; docs/examples/fit_and_score.c is compiled outside the tree with nothing but
'pkg-config --cflags --libs isthmus' and prints the precision@1 that 'isthmus score' prints
for the same vectors and lists; the exported symbols are exactly src/libisthmus.symbols
and cover every IST_API function of the public headers.

usage: check_install.py BUILD_DIR SOURCE_ROOT WORK_DIR PREFIX LIBDIR INCLUDEDIR MANDIR
                        DATADIR VERSION CC SANITIZE

The vectors are synthetic (standard library only): a random source table and a target that
is a signed permutation of it (an orthogonal map) plus noise, so precision@1 is neither 0
nor 1 and the map is far from the identity."""
import os
import random
import re
import shutil
import subprocess
import sys

(build, root, work, prefix, libdir, includedir, mandir, datadir, version, cc,
 sanitize) = sys.argv[1:12]
build, root, work = (os.path.abspath(p) for p in (build, root, work))
sys.dont_write_bytecode = True          # leave no __pycache__ in the source tree
sys.path.insert(0, os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
from tap import Tap  # noqa: E402
tap = Tap("install", detail_lines=40)
check = tap.check


def sh(args, env=None, cwd=None):
    e = dict(os.environ)
    e.update(env or {})
    return subprocess.run(args, capture_output=True, text=True, env=e, cwd=cwd)


def under(d):
    """An install directory below the staging root (relative dirs are below the prefix)."""
    d = d if os.path.isabs(d) else os.path.join(prefix, d)
    return stage + d


shutil.rmtree(work, ignore_errors=True)
os.makedirs(work)
stage = os.path.join(work, "stage")
p = sh(["meson", "install", "-C", build, "--no-rebuild", "--quiet", "--destdir", stage])
check(p.returncode == 0, "meson install into a staging directory", p.stdout + p.stderr)
if p.returncode != 0:
    sys.exit(tap.end())
lib, inc, man, data = under(libdir), under(includedir), under(mandir), under(datadir)
bindir = under("bin")

# --- files -----------------------------------------------------------------------------
# the headers include/isthmus/meson.build installs (a header for tests only may stay out)
headers = sorted(set(re.findall(r"'([\w-]+\.h)'", open(os.path.join(
    root, "include", "isthmus", "meson.build")).read())))
inst = sorted(os.listdir(os.path.join(inc, "isthmus"))) if os.path.isdir(
    os.path.join(inc, "isthmus")) else []
check(inst == headers, "every public header is installed under include/isthmus (%d)"
      % len(headers), "installed %s\nsource %s" % (inst, headers))
check("testing.h" not in inst, "the test-only header testing.h is not installed", str(inst))
major = version.split(".")[0]
so = os.path.join(lib, "libisthmus.so")
check(os.path.islink(so) and os.readlink(so) == "libisthmus.so." + major and
      os.path.isfile(os.path.join(lib, "libisthmus.so." + version)) and
      os.path.isfile(os.path.join(lib, "libisthmus.a")),
      "shared library libisthmus.so -> .so.%s -> .so.%s, and the static library"
      % (major, version))
p = sh(["objdump", "-p", so])
soname = re.search(r"SONAME\s+(\S+)", p.stdout)
check(soname and soname.group(1) == "libisthmus.so." + major,
      "the shared library's SONAME is libisthmus.so.%s" % major, p.stdout[:400])
pc = os.path.join(lib, "pkgconfig", "isthmus.pc")
text = open(pc).read() if os.path.exists(pc) else ""
fields = dict(re.findall(r"^([A-Za-z.]+):\s*(.*)$", text, re.M))
var = dict(re.findall(r"^(\w+)=(.*)$", text, re.M))
check(fields.get("Name") == "isthmus" and fields.get("Version") == version and
      "-listhmus" in fields.get("Libs", "") and fields.get("Cflags") == "-I${includedir}" and
      var.get("prefix") == prefix,
      "pkg-config file: name, version %s, -listhmus, -I${includedir}, prefix %s"
      % (version, prefix), text)
req = [r.strip() for r in fields.get("Requires.private", "").split(",")]
check({"zlib", "openblas", "lapacke", "libutf8proc"} <= set(req),
      "pkg-config file: the private requirements name zlib, OpenBLAS, LAPACKE and utf8proc",
      req)
man1 = os.path.join(man, "man1", "isthmus.1")
check(os.path.exists(man1) and open(man1, "rb").read() ==
      open(os.path.join(root, "docs", "isthmus.1"), "rb").read(),
      "the man page is installed as man1/isthmus.1, the same as docs/isthmus.1")
p = sh(["man", "-l", man1], env={"MANPAGER": "cat", "MANWIDTH": "100"}) \
    if shutil.which("man") else None
if p is not None:
    shown = re.sub(".\b", "", p.stdout)       # drop the overstrike of bold text
    check(p.returncode == 0 and "isthmus gate" in shown and "--junit-out" in shown,
          "man -l renders it (the gate section and its options)", p.stderr + shown[:300])
p = sh([os.path.join(bindir, "isthmus"), "--version"])
check(p.returncode == 0 and version in p.stdout, "the installed program runs: " +
      p.stdout.strip(), p.stderr)
comp = os.path.join(data, "bash-completion", "completions", "isthmus")
check(os.path.exists(comp) and "complete -F" in open(comp).read(),
      "bash completion installed as share/bash-completion/completions/isthmus")

# --- pkg-config and an out-of-tree program ---------------------------------------------
# the staged .pc says prefix=/usr/local: the sysroot variable moves its -I and -L under the
# staging directory, as for any package built for a staged install (pkg-config(1))
env = {"PKG_CONFIG_PATH": os.path.join(lib, "pkgconfig"), "PKG_CONFIG_SYSROOT_DIR": stage}
p = sh(["pkg-config", "--modversion", "isthmus"], env=env)
check(p.stdout.strip() == version, "pkg-config --modversion isthmus: " + p.stdout.strip(),
      p.stderr)
p = sh(["pkg-config", "--cflags", "--libs", "isthmus"], env=env)
flags = p.stdout.split()
check(p.returncode == 0 and "-I" + inc in flags and "-L" + lib in flags and "-listhmus" in flags
      and "-I" + os.path.join(root, "include") not in flags,
      "pkg-config --cflags --libs points into the staged tree only: " + " ".join(flags),
      p.stderr)
ex = os.path.join(work, "example")
os.makedirs(ex)
shutil.copy(os.path.join(root, "docs", "examples", "fit_and_score.c"), ex)
san = ["-fsanitize=" + sanitize] if sanitize not in ("", "none") else []
p = sh([cc, "-std=c11", "-Wall", "-Wextra", "-Werror", "-pedantic", "fit_and_score.c"] + san +
       flags + ["-o", "fit_and_score"], cwd=ex)
check(p.returncode == 0, "docs/examples/fit_and_score.c builds out of tree with -Wall -Wextra "
      "-Werror -pedantic against the installed headers", p.stderr)

rng = random.Random(20261202)
rows, dim = 400, 16
perm = list(range(dim))
rng.shuffle(perm)
sign = [rng.choice((-1.0, 1.0)) for _ in range(dim)]
with open(os.path.join(ex, "src.txt"), "w") as fs, open(os.path.join(ex, "tgt.txt"), "w") as ft:
    for i in range(rows):
        x = [rng.gauss(0, 1) + (0.6 if j == 0 else 0) for j in range(dim)]
        z = [sign[j] * x[perm[j]] + rng.gauss(0, 0.9) for j in range(dim)]
        fs.write("w%03d %s\n" % (i, " ".join("%.6f" % v for v in x)))
        ft.write("p%03d %s\n" % (i, " ".join("%.6f" % v for v in z)))
with open(os.path.join(ex, "seeds.pairs"), "w") as f:
    f.writelines("w%03d p%03d\n" % (i, i) for i in range(150))
with open(os.path.join(ex, "test.pairs"), "w") as f:
    f.writelines("w%03d p%03d\n" % (i, i) for i in range(150, 300))
prog = os.path.join(bindir, "isthmus")
for a, b in (("src.txt", "src.isv"), ("tgt.txt", "tgt.isv")):
    sh([prog, "-q", "convert", a, b], cwd=ex)
run_env = {"LD_LIBRARY_PATH": lib}
p = sh(["./fit_and_score", "src.isv", "tgt.isv", "seeds.pairs", "test.pairs"], env=run_env,
       cwd=ex)
out = p.stdout
print("# fit_and_score output:")
for line in out.splitlines():
    print("#   " + line)
check(p.returncode == 0 and re.search(r"^csls +p@1 ", out, re.M), "the example runs", p.stderr)
p2 = sh(["ldd", "./fit_and_score"], env=run_env, cwd=ex)
check(so + "." + major in p2.stdout.replace(os.path.realpath(lib), lib) or
      (lib + "/libisthmus.so." + major) in p2.stdout,
      "it loads the staged libisthmus.so.%s" % major, p2.stdout)
sh([prog, "-q", "align", "src.isv", "tgt.isv", "--seeds=seeds.pairs", "-o", "m.map"], cwd=ex)
sc = sh([prog, "score", "src.isv", "tgt.isv", "--map=m.map", "--test=test.pairs"], cwd=ex).stdout
want = {}
for line in sc.splitlines():
    f = line.split()
    if len(f) >= 7 and f[0] == "refined" and f[3].endswith("%"):
        want[f[1]] = (f[4].rstrip("%"), f[2])
got = dict((m.group(1), (m.group(2), m.group(3))) for m in
           re.finditer(r"^(\w+) +p@1 +([\d.]+)% of (\d+) test words", out, re.M))
check(want and got == want and 0 < float(want["csls"][0]) < 100,
      "its p@1 under cosine and CSLS is what 'isthmus align' then 'isthmus score' print: %s"
      % want, "example %s\nscore %s\n%s" % (got, want, sc))

# --- exported symbols ------------------------------------------------------------------
p = sh(["nm", "-D", "--defined-only", so])
exported = sorted(f[2] for f in (l.split() for l in p.stdout.splitlines())
                  if len(f) == 3 and f[1] in "TDBRVWiu")
listed = [l.strip() for l in open(os.path.join(root, "src", "libisthmus.symbols"))
          if l.strip() and not l.startswith("#")]
gone = sorted(set(listed) - set(exported))
new = sorted(set(exported) - set(listed))
check(not gone and not new and listed == sorted(listed),
      "the exported symbols are exactly src/libisthmus.symbols (%d)" % len(exported),
      "no longer exported (an incompatible ABI change): %s\nnewly exported: %s\n"
      "if the change is meant, run tools/dev/list-symbols BUILD/src/libisthmus.so and say so "
      "in the commit" % (gone, new))
declared = set()
for h in headers:
    src = open(os.path.join(root, "include", "isthmus", h)).read()
    src = re.sub(r"/\*.*?\*/", " ", src, flags=re.S)
    for m in re.finditer(r"\bIST_API\b([^;{]*?)\b(ist_\w+)\s*\(", src):
        declared.add(m.group(2))
missing = sorted(declared - set(exported))
check(declared and not missing, "every IST_API function of the public headers is exported (%d)"
      % len(declared), "declared but not exported: %s" % missing)

sys.exit(tap.end())
