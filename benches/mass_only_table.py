#!/usr/bin/env python3
"""The growth table of mass-only cases, measured on the release binary as a user runs it:
for nominal m/z 200, 300, ... 1000, an invented case with only `ms: { molecular_ion: N,
ion: "M+." }` and one strong band at 1715 cm-1 (ATR) is solved with `quiddity solve` at
the default budget, and the wall time, the peak resident memory of the process (from
os.wait4) and the exit status are printed as a Markdown table.

    cargo build --release
    python3 benches/mass_only_table.py [FIRST LAST STEP]
"""
import os
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BINARY = os.path.join(ROOT, "target", "release", "quiddity")


def case_text(mz):
    return (
        f"# invented benchmark case\ncase: BENCH-MASS-{mz}\n"
        f'ms: {{ molecular_ion: {mz}, ion: "M+." }}\n'
        "ir:\n  technique: ATR\n  bands:\n    - { at: 1715, strength: strong }\n"
    )


def main():
    first, last, step = (int(v) for v in (sys.argv[1:4] if len(sys.argv) >= 4 else (200, 1000, 100)))
    print(f"load {os.getloadavg()[0]:.1f}")
    print("| nominal m/z | exit | wall time (s) | peak memory (MB) | first line |")
    print("|---|---|---|---|---|")
    with tempfile.TemporaryDirectory() as folder:
        for mz in range(first, last + 1, step):
            path = os.path.join(folder, f"mass-{mz}.yaml")
            with open(path, "w") as f:
                f.write(case_text(mz))
            # Output goes to files so that a long report cannot fill a pipe while waiting.
            with open(path + ".out", "w+b") as out_f, open(path + ".err", "w+b") as err_f:
                start = time.perf_counter()
                child = subprocess.Popen([BINARY, "solve", path], stdout=out_f, stderr=err_f)
                # wait4 reports this child's own peak resident size (kilobytes on Linux).
                _, status, usage = os.wait4(child.pid, 0)
                wall = time.perf_counter() - start
                out_f.seek(0)
                err_f.seek(0)
                out = out_f.read().decode()
                err = err_f.read().decode()
            code = os.waitstatus_to_exitcode(status)
            line = (out or err).strip().splitlines()[0] if (out or err).strip() else ""
            print(f"| {mz} | {code} | {wall:.2f} | {usage.ru_maxrss / 1024:.0f} | {line[:70]} |")


if __name__ == "__main__":
    main()
