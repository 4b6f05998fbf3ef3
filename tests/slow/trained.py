"""What every slow check on trained vectors shares, so that its figures do not depend on the
machine's thread scheduling: one training thread and a fixed seed (ISTHMUS_CHECK_SEED, default
1), and a work directory per kernel family (ISTHMUS_SIMD, default native) and seed, so the native
and the portable runs of the suite never reuse each other's vectors.

Thread count: only 1-thread training is bit-identical from run to run (docs/reliability.md,
"Determinism"); across machines even 1-thread vectors differ in the last bits where the kernels
use FMA or another summation order, so the checks judge figures against floors set below the
spread measured over 5 seeds and both kernel families (tools/dev/slow-spread.py), never exact
values."""
import os


def kernel():
    return os.environ.get("ISTHMUS_SIMD") or "native"


def seed():
    return os.environ.get("ISTHMUS_CHECK_SEED") or "1"


def workdir(base):
    path = os.path.join(base, "%s-seed%s" % (kernel(), seed()))
    os.makedirs(path, exist_ok=True)
    return path


def train_flags():
    """Options every slow check adds to 'isthmus train'."""
    return ["--threads", "1", "--seed", seed()]


def figure(name, value):
    """One measured figure on a line of its own, collected by tools/dev/slow-spread.py."""
    print("# figure %s %.2f" % (name, value))
