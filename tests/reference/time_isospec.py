#!/usr/bin/env python3
"""Times IsoSpecPy on the formula of benches/isotopes.rs, for the speed ratio.

    pip install IsoSpecPy==2.6.0
    python3 tests/reference/time_isospec.py

Two IsoSpecPy calls comparable to quiddity's two patterns:
  fine structure: IsoThreshold(threshold=1e-12, absolute=False) — every isotopologue down
                  to 1e-12 of the most probable, quiddity's default cut-off — then the
                  peaks are merged at R = 100 000 the way quiddity does (chained gaps
                  below m/R), since IsoSpecPy itself returns unmerged isotopologues;
  aggregated:     the same isotopologues summed by nominal mass offset (IsoSpecPy has no
                  nominal-mass mode, so this is the fairest equivalent).
The median of repeated runs is printed in microseconds.
"""
import importlib.metadata
import statistics
import time

import IsoSpecPy

FORMULA = "C100H150N20O30S5Cl2"
RESOLVING_POWER = 100_000.0


def fine():
    iso = IsoSpecPy.IsoThreshold(threshold=1e-12, absolute=False, formula=FORMULA)
    peaks = sorted(zip(iso.masses, iso.probs))
    merged = []
    last = None
    for m, p in peaks:
        if merged and m - last < m / RESOLVING_POWER:
            mm, pp = merged[-1]
            merged[-1] = ((mm * pp + m * p) / (pp + p), pp + p)
        else:
            merged.append((m, p))
        last = m
    return merged


def aggregated():
    iso = IsoSpecPy.IsoThreshold(threshold=1e-12, absolute=False, formula=FORMULA)
    mono = min(iso.masses)
    bins = {}
    for m, p in zip(iso.masses, iso.probs):
        k = round(m - mono)
        bins[k] = bins.get(k, 0.0) + p
    return bins


def threshold_only():
    return IsoSpecPy.IsoThreshold(threshold=1e-12, absolute=False, formula=FORMULA)


def median_us(fn, repeats=50):
    fn()
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return statistics.median(times) * 1e6


if __name__ == "__main__":
    print(f"IsoSpecPy {importlib.metadata.version('IsoSpecPy')}, formula {FORMULA}")
    print(f"isotopologues >= 1e-12 of max: {len(threshold_only().masses)}")
    print(f"IsoThreshold only:               {median_us(threshold_only):10.1f} us")
    print(f"fine structure, merged at R=1e5: {median_us(fine):10.1f} us")
    print(f"aggregated by nominal mass:      {median_us(aggregated):10.1f} us")
