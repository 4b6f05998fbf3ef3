#!/usr/bin/env python3
"""A stop between two outputs: SIGTERM sent to 'isthmus train -o V --text-copy=T' at times
spread over a whole run. Every run must end with both files complete (exit 0) or neither
(exit 130, "no output file was written"), and no temporary file. Prints TAP and the count
of signals that arrived while the files were being written.

usage: stop_outputs.py ISTHMUS WORKDIR [SIGNALS]"""
import os
import random
import shutil
import signal
import subprocess
import sys
import time


def main():
    exe, work = os.path.abspath(sys.argv[1]), sys.argv[2]
    nsig = int(sys.argv[3]) if len(sys.argv) > 3 else 24
    shutil.rmtree(work, ignore_errors=True)
    os.makedirs(work)
    rnd = random.Random(1)
    words = ["w%05d" % i for i in range(12000)]
    with open(os.path.join(work, "c.txt"), "w") as f:   # invented words, demo data only
        for _ in range(4000):
            f.write(" ".join(rnd.choice(words) for _ in range(10)) + "\n")
    cmd = [exe, "train", "--min-freq=1", "--passes=1", "--threads=1", "--dim=100",
           "-o", "v.isv", "--text-copy=t.txt", "c.txt"]
    t0 = time.monotonic()
    subprocess.run(cmd, cwd=work, check=True, capture_output=True)
    full = time.monotonic() - t0
    print("1..%d" % nsig)
    failed = 0
    kinds = {"training": 0, "writing": 0, "before the renames": 0, "after": 0}
    for i in range(nsig):
        for n in os.listdir(work):
            if n != "c.txt":
                os.remove(os.path.join(work, n))
        p = subprocess.Popen(cmd, cwd=work, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                             text=True)
        time.sleep(full * (0.3 + 0.75 * i / nsig))
        p.send_signal(signal.SIGTERM)
        out, err = p.communicate()
        left = sorted(n for n in os.listdir(work) if n != "c.txt")
        if p.returncode == 130:
            ok = left == [] and "no output file was written" in err
            kinds["writing" if "while writing" in err else
                  "before the renames" if "moved into place" in err else "training"] += 1
        else:
            ok = p.returncode == 0 and left == ["t.txt", "v.isv"]
            kinds["after"] += 1
        failed += not ok
        print("%s %d - signal at %.0f%% of a run: exit %d, files %s" %
              ("ok" if ok else "not ok", i + 1, 100 * (0.3 + 0.75 * i / nsig), p.returncode,
               left or "none"))
        if not ok:
            print("# " + err.replace("\n", "\n# "))
    print("# signals during training %(training)d, while writing %(writing)d, between the "
          "files and their renames %(before the renames)d, after everything was written "
          "%(after)d" % kinds)
    print("# stop_outputs: %d passed, %d failed" % (nsig - failed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
