"""tap.py - the TAP that the suite's Python checks print: 'ok N - what' or 'not ok N - what'
for each check (a failure's detail follows as comment lines), then the plan and the closing
line '# LABEL: N passed, N failed' that tools/dev/count-results.py reads."""


class Tap:
    def __init__(self, label, detail_lines=None):
        self.label = label
        self.detail_lines = detail_lines   # how many lines of a failure's detail; None: all
        self.passed = self.failed = 0

    def check(self, cond, what, detail=""):
        if cond:
            self.passed += 1
            print("ok %d - %s" % (self.passed + self.failed, what))
        else:
            self.failed += 1
            print("not ok %d - %s" % (self.passed + self.failed, what))
            for line in str(detail).splitlines()[:self.detail_lines]:
                print("# " + line)

    def end(self):
        """Print the plan and the closing line; the exit status."""
        print("1..%d" % (self.passed + self.failed))
        print("# %s: %d passed, %d failed" % (self.label, self.passed, self.failed))
        return 1 if self.failed else 0
