#!/usr/bin/env python3
"""Fine isotope structure, quiddity beside IsoSpecPy (a general-purpose isotope library
from PyPI with a C++ core), timed in one run on the same machine, with a check that the
numbers agree.

    pip install IsoSpecPy==2.6.0
    python3 tests/reference/isotope_side_by_side.py [FORMULA] [RESOLVING_POWER]

Same coverage on both sides: every isotopologue down to 1e-12 of the most probable one
(quiddity's default cut-off; IsoSpecPy.IsoThreshold(threshold=1e-12, absolute=False)).
IsoSpecPy is run twice: with its own isotope abundances, and with the abundances
quiddity uses (passed as atomCounts/isotopeMasses/isotopeProbabilities), so the second
run must list the same isotopologues. IsoSpecPy returns them unmerged; quiddity's time is
given both for the unmerged listing and for the whole pattern merged at the resolving
power (the merge is quiddity's extra work, not IsoSpecPy's). The timings alternate
between the two programs for several rounds and the median of each side is printed.
Exit status 1 when the numbers disagree.
"""
import importlib.metadata
import os
import statistics
import subprocess
import sys
import time

import IsoSpecPy

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
BINARY = os.path.join(ROOT, "target", "release", "examples", "fine_structure_timing")
CUT = 1e-12
ROUNDS = 5


def quiddity(formula, resolving_power):
    out = subprocess.run(
        [BINARY, formula, str(resolving_power)], check=True, capture_output=True, text=True
    ).stdout
    facts, isotopes, peaks = {}, [], []
    for line in out.splitlines():
        fields = line.split("\t")
        if fields[0] == "isotope":
            masses = [float(v) for v in fields[3].split(",")]
            abundances = [float(v) for v in fields[4].split(",")]
            isotopes.append((fields[1], int(fields[2]), masses, abundances))
        elif fields[0] == "peak":
            peaks.append((float(fields[1]), float(fields[2])))
        else:
            facts[fields[0]] = fields[1]
    return facts, isotopes, peaks


def isospec_own(formula):
    return IsoSpecPy.IsoThreshold(threshold=CUT, absolute=False, formula=formula)


def isospec_same_abundances(isotopes):
    return IsoSpecPy.IsoThreshold(
        threshold=CUT,
        absolute=False,
        atomCounts=[n for _, n, _, _ in isotopes],
        isotopeMasses=[m for _, _, m, _ in isotopes],
        isotopeProbabilities=[a for _, _, _, a in isotopes],
    )


def median_us(fn, repeats=200):
    fn()
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return statistics.median(times) * 1e6


def merged(masses, probs, resolving_power):
    """The chained merge quiddity applies: a peak joins the group when its gap to the
    previous peak is below m/R; probabilities normalised to the retained total."""
    groups, last = [], None
    for m, p in sorted(zip(masses, probs)):
        if groups and m - last < m / resolving_power:
            gm, gp = groups[-1]
            groups[-1] = ((gm * gp + m * p) / (gp + p), gp + p)
        else:
            groups.append((m, p))
        last = m
    total = sum(p for _, p in groups)
    return [(m, p / total) for m, p in groups]


def agreement(facts, peaks, same, resolving_power):
    """Problems found comparing quiddity with IsoSpecPy given the same abundances."""
    problems = []
    ours, theirs = int(facts["isotopologues"]), len(same.masses)
    # Ties at the cut-off may fall either way by a rounding; more is a real difference.
    if abs(ours - theirs) > max(2, theirs // 1000):
        problems.append(f"isotopologue count {ours} vs IsoSpecPy {theirs}")
    reference = merged(list(same.masses), list(same.probs), resolving_power)
    if len(reference) != len(peaks):
        problems.append(f"merged peaks {len(peaks)} vs IsoSpecPy {len(reference)}")
    for (m, p), (rm, rp) in zip(peaks, reference):
        if abs(m - rm) > 1e-6 or abs(p - rp) > 1e-9:
            problems.append(f"peak {m:.6f} ({p:.3e}) vs IsoSpecPy {rm:.6f} ({rp:.3e})")
    return problems


def main():
    formula = sys.argv[1] if len(sys.argv) > 1 else "C100H150N20O30S5Cl2"
    resolving_power = float(sys.argv[2]) if len(sys.argv) > 2 else 100_000.0
    subprocess.run(
        ["cargo", "build", "--quiet", "--release", "--example", "fine_structure_timing"],
        cwd=ROOT,
        check=True,
    )
    facts, isotopes, peaks = quiddity(formula, resolving_power)
    same = isospec_same_abundances(isotopes)
    own_t, same_t, list_t, pattern_t = [], [], [], []
    for _ in range(ROUNDS):
        own_t.append(median_us(lambda: isospec_own(formula)))
        same_t.append(median_us(lambda: isospec_same_abundances(isotopes)))
        round_facts, _, _ = quiddity(formula, resolving_power)
        list_t.append(float(round_facts["list_us"]))
        pattern_t.append(float(round_facts["pattern_us"]))
    own, fast = statistics.median(own_t), statistics.median(same_t)
    print(f"{formula} at R = {resolving_power:g}, cut-off {CUT:g} of the most probable")
    print(f"IsoSpecPy {importlib.metadata.version('IsoSpecPy')}, load {os.getloadavg()[0]:.1f}")
    print()
    print("| run | isotopologues | median time (us) |")
    print("|---|---|---|")
    print(f"| IsoSpecPy IsoThreshold, its own abundances | {len(isospec_own(formula).masses)} | {own:.1f} |")
    print(f"| IsoSpecPy IsoThreshold, quiddity's abundances | {len(same.masses)} | {fast:.1f} |")
    print(f"| quiddity, isotopologues listed (unmerged) | {facts['isotopologues']} | {statistics.median(list_t):.1f} |")
    print(
        f"| quiddity, whole pattern merged at R ({facts['merged_peaks']} peaks) "
        f"| {facts['isotopologues']} | {statistics.median(pattern_t):.1f} |"
    )
    print()
    print(f"quiddity pattern / IsoSpecPy (same abundances): {statistics.median(pattern_t) / fast:.2f}")
    problems = agreement(facts, peaks, same, resolving_power)
    for p in problems[:10]:
        print("DISAGREES:", p)
    print("numbers agree" if not problems else f"{len(problems)} disagreements")
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
