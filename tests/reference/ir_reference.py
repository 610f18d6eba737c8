"""Reference values for the IR module from general-purpose libraries (PyPI).

Writes three tables under tests/fixtures/ir/reference/ that the Rust tests read, so CI
needs no Python:

* jcamp_reference.tsv    - the `jcamp` package's reading of the JCAMP-DX test-suite files
* savgol_reference.tsv   - scipy.signal.savgol_coeffs (Savitzky-Golay weights)
* peaks_reference.tsv    - scipy.signal find_peaks / peak_prominences / peak_widths on an
                           invented noise-free spectrum (the same formula as
                           quiddity::ir::synth, Lorentzian and Gaussian bands)
* asls_reference.tsv     - pybaselines.whittaker.asls (asymmetric least squares baseline,
                           Eilers & Boelens 2005) on an invented trace

Run:  python3 -m venv /tmp/irref && /tmp/irref/bin/pip install scipy numpy jcamp==1.3.2 pybaselines==1.2.1
      /tmp/irref/bin/python tests/reference/ir_reference.py
"""

import contextlib
import importlib.metadata
import io
import math
import os
import sys

import jcamp
import numpy as np
import scipy
from scipy.signal import find_peaks, peak_prominences, peak_widths, savgol_coeffs

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
SUITE = os.path.join(ROOT, "tests", "fixtures", "ir", "jcamp-testsuite")
OUT = os.path.join(ROOT, "tests", "fixtures", "ir", "reference")


def version_line():
    return (
        f"# python {sys.version.split()[0]}, numpy {np.__version__}, scipy {scipy.__version__}, "
        f"jcamp {importlib.metadata.version('jcamp')}, "
        f"pybaselines {importlib.metadata.version('pybaselines')}\n"
    )


def jcamp_table():
    rows = []
    for name in sorted(os.listdir(SUITE)):
        path = os.path.join(SUITE, name)
        captured = io.StringIO()
        try:
            with contextlib.redirect_stdout(captured):
                d = jcamp.readfile(path)
            x = np.asarray(d["x"], dtype=float)
            y = np.asarray(d["y"], dtype=float)
        except Exception as e:  # the reference reader fails on some files
            rows.append((name, "failed", repr(e).replace("\t", " "), "", "", "", "", "", ""))
            continue
        complaints = " | ".join(l for l in captured.getvalue().splitlines() if l.strip())
        status = "ok" if not complaints and len(x) == len(y) else "complained"
        rows.append(
            (
                name,
                status,
                complaints.replace("\t", " "),
                str(len(y)),
                repr(float(x[0])),
                repr(float(x[-1])),
                repr(float(y[0])),
                repr(float(y[len(y) // 2])),
                repr(float(y[-1])),
            )
        )
    with open(os.path.join(OUT, "jcamp_reference.tsv"), "w") as f:
        f.write(version_line())
        f.write("file\tstatus\tcomplaints\tn\tx_first\tx_last\ty_first\ty_mid\ty_last\n")
        for r in rows:
            f.write("\t".join(r) + "\n")


def savgol_table():
    with open(os.path.join(OUT, "savgol_reference.tsv"), "w") as f:
        f.write(version_line())
        f.write("window\torder\tderiv\tweights (dot order, left to right)\n")
        for window, order, deriv in [(5, 2, 0), (7, 3, 0), (11, 3, 0), (9, 3, 2), (19, 3, 2), (7, 4, 1)]:
            w = savgol_coeffs(window, order, deriv=deriv, use="dot")
            f.write(f"{window}\t{order}\t{deriv}\t" + " ".join(repr(float(v)) for v in w) + "\n")


def lorentzian(x, c, fwhm, h):
    g = fwhm / 2.0
    return h * g * g / ((x - c) ** 2 + g * g)


def gaussian(x, c, fwhm, h):
    s = fwhm / (2.0 * math.sqrt(2.0 * math.log(2.0)))
    return h * np.exp(-0.5 * (x - c) ** 2 / (s * s))


# Invented, noise-free: overlapping bands so prominence and width at half prominence
# differ from height and FWHM. Must match peaks_spectrum() in tests/ir_reference.rs.
BANDS = [
    ("gaussian", 3300.0, 250.0, 0.5),
    ("lorentzian", 2960.0, 18.0, 0.8),
    ("lorentzian", 2930.0, 18.0, 0.7),
    ("lorentzian", 2870.0, 16.0, 0.4),
    ("lorentzian", 1715.0, 20.0, 1.0),
    ("lorentzian", 1690.0, 14.0, 0.45),
    ("gaussian", 1240.0, 40.0, 0.6),
    ("lorentzian", 760.0, 12.0, 0.55),
]


def peaks_table():
    x = 400.0 + np.arange(0, 7201) * 0.5
    y = np.zeros_like(x)
    for kind, c, w, h in BANDS:
        y += (lorentzian if kind == "lorentzian" else gaussian)(x, c, w, h)
    peaks, _ = find_peaks(y, prominence=0.01)
    prominences = peak_prominences(y, peaks)[0]
    widths = peak_widths(y, peaks, rel_height=0.5)[0] * 0.5
    with open(os.path.join(OUT, "peaks_reference.tsv"), "w") as f:
        f.write(version_line())
        f.write("at_cm1\theight\tprominence\twidth_at_half_prominence_cm1\n")
        for p, pr, wd in zip(peaks, prominences, widths):
            f.write(f"{float(x[p])!r}\t{float(y[p])!r}\t{float(pr)!r}\t{float(wd)!r}\n")


def asls_table():
    from pybaselines.whittaker import asls

    # Invented: a curved sloping baseline under two Gaussian bands, 400 points.
    x = np.arange(400, dtype=float)
    base = 0.1 + 0.0005 * x + 0.2 * np.sin(x / 150.0)
    y = base + 1.0 * np.exp(-0.5 * ((x - 120.0) / 8.0) ** 2) + 0.6 * np.exp(-0.5 * ((x - 260.0) / 20.0) ** 2)
    baseline, params = asls(y, lam=1e5, p=0.01, diff_order=2, max_iter=50, tol=0.0)
    with open(os.path.join(OUT, "asls_reference.tsv"), "w") as f:
        f.write(version_line())
        f.write("# asls(y, lam=1e5, p=0.01, diff_order=2, max_iter=50, tol=0)\n")
        f.write("x\ty\tbaseline\n")
        for xi, yi, bi in zip(x, y, baseline):
            f.write(f"{float(xi)!r}\t{float(yi)!r}\t{float(bi)!r}\n")


if __name__ == "__main__":
    os.makedirs(OUT, exist_ok=True)
    jcamp_table()
    savgol_table()
    peaks_table()
    asls_table()
