#!/usr/bin/env python3
"""Writes tests/reference/formula_table.tsv: masses, DBE and the first isotope peaks of real
compounds, computed by general-purpose libraries from PyPI, for tests/formula_reference.rs.

    pip install pyteomics==5.0.1 molmass==2026.1.8 IsoSpecPy==2.6.0
    python3 tests/reference/make_formula_table.py > tests/reference/formula_table.tsv

Columns:
  name            common chemical name
  written         the formula as quiddity parses it (condensed structural notation where
                  one is usual, so the parser's groups and free order are exercised too)
  hill            the flat formula handed to the libraries
  mono_molmass    molmass.Formula(hill).monoisotopic_mass (u; AME2020-era masses)
  mono_pyteomics  pyteomics.mass.calculate_mass(formula=hill) (u; its NIST table predates
                  AME2020: I 126.904473 against 126.9044719, so agreement is ~1e-6 per atom)
  avg_pyteomics   pyteomics.mass.calculate_mass(formula=hill, average=True) (u; isotope
                  masses weighted by abundance, the definition quiddity uses)
  avg_molmass     molmass.Formula(hill).mass (u; from standard atomic weights)
  dbe             C - H/2 - X/2 + N/2 + P/2 + 1 over the counts pyteomics parses (the
                  textbook C,H,N,O,S,P,halogen form; common practice)
  m0..m4          molmass.Formula(hill).spectrum(): aggregated pattern at nominal masses
                  M..M+4, most abundant = 100 (molmass uses the IUPAC 2013 representative
                  isotopic compositions, like quiddity, so this checks the arithmetic)
  mz0..mz2        molmass: abundance-weighted mass of the M, M+1, M+2 bins (u)
  iso0..iso4      IsoSpecPy.IsoTotalProb(prob_to_cover=0.9999999): probabilities summed by
                  nominal offset from the monoisotopic mass, most abundant bin = 100
                  (IsoSpecPy ships slightly different abundances, e.g. 13C 0.010788
                  against 0.0107, so this is the looser, independent-data check)
"""
import importlib.metadata
import platform

import IsoSpecPy
import molmass
from pyteomics import mass

# name, written (as quiddity reads it), flat formula for the libraries
COMPOUNDS = [
    ("caffeine", "C8H10N4O2", "C8H10N4O2"),
    ("benzene", "C6H6", "C6H6"),
    ("ethanol", "CH3CH2OH", "C2H6O"),
    ("acetone", "(CH3)2CO", "C3H6O"),
    ("hexane", "CH3(CH2)4CH3", "C6H14"),
    ("pentan-1-ol", "CH3(CH2)4OH", "C5H12O"),
    ("chloroform", "CHCl3", "CHCl3"),
    ("dichloromethane", "CH2Cl2", "CH2Cl2"),
    ("tetrachloromethane", "CCl4", "CCl4"),
    ("tetrachloroethene", "Cl2C=CCl2".replace("=", ""), "C2Cl4"),
    ("vinyl chloride", "CH2CHCl", "C2H3Cl"),
    ("bromoform", "CHBr3", "CHBr3"),
    ("1,2-dibromoethane", "BrCH2CH2Br", "C2H4Br2"),
    ("iodomethane", "CH3I", "CH3I"),
    ("chlorobenzene", "C6H5Cl", "C6H5Cl"),
    ("bromobenzene", "C6H5Br", "C6H5Br"),
    ("iodobenzene", "C6H5I", "C6H5I"),
    ("fluorobenzene", "C6H5F", "C6H5F"),
    ("trifluoroacetic acid", "CF3COOH", "C2HF3O2"),
    ("halothane", "CF3CHBrCl", "C2HBrClF3"),
    ("perfluorooctanoic acid", "CF3(CF2)6COOH", "C8HF15O2"),
    ("dimethyl sulfoxide", "(CH3)2SO", "C2H6OS"),
    ("thiophene", "C4H4S", "C4H4S"),
    ("carbon disulfide", "CS2", "CS2"),
    ("sulfolane", "C4H8SO2", "C4H8O2S"),
    ("dimethyl sulfate", "(CH3O)2SO2", "C2H6O4S"),
    ("thiourea", "SC(NH2)2", "CH4N2S"),
    ("urea", "OC(NH2)2", "CH4N2O"),
    ("pyridine", "C5H5N", "C5H5N"),
    ("acetonitrile", "CH3CN", "C2H3N"),
    ("nitrobenzene", "C6H5NO2", "C6H5NO2"),
    ("triphenylphosphine", "(C6H5)3P", "C18H15P"),
    ("triethyl phosphate", "(C2H5O)3PO", "C6H15O4P"),
    ("tributyl phosphate", "(CH3(CH2)3O)3PO", "C12H27O4P"),
    ("tris(2-chloroethyl) phosphate", "(ClCH2CH2O)3PO", "C6H12Cl3O4P"),
    ("glyphosate", "C3H8NO5P", "C3H8NO5P"),
    ("malathion", "C10H19O6PS2", "C10H19O6PS2"),
    ("parathion", "C10H14NO5PS", "C10H14NO5PS"),
    ("chlorpyrifos", "C9H11Cl3NO3PS", "C9H11Cl3NO3PS"),
    ("lindane", "C6H6Cl6", "C6H6Cl6"),
    ("2,4-dichlorophenoxyacetic acid", "C8H6Cl2O3", "C8H6Cl2O3"),
    ("triclosan", "C12H7Cl3O2", "C12H7Cl3O2"),
    ("bromoxynil", "C7H3Br2NO", "C7H3Br2NO"),
    ("ioxynil", "C7H3I2NO", "C7H3I2NO"),
    ("thyroxine", "C15H11I4NO4", "C15H11I4NO4"),
    ("fipronil", "C12H4Cl2F6N4OS", "C12H4Cl2F6N4OS"),
    ("bromacil", "C9H13BrN2O2", "C9H13BrN2O2"),
    ("chloramphenicol", "C11H12Cl2N2O5", "C11H12Cl2N2O5"),
    ("sulfamethoxazole", "C10H11N3O3S", "C10H11N3O3S"),
    ("paracetamol", "C8H9NO2", "C8H9NO2"),
    ("acetylsalicylic acid", "C9H8O4", "C9H8O4"),
    ("ibuprofen", "C13H18O2", "C13H18O2"),
    ("diazepam", "C16H13ClN2O", "C16H13ClN2O"),
    ("fluoxetine", "C17H18F3NO", "C17H18F3NO"),
    ("glucose", "C6H12O6", "C6H12O6"),
    ("sucrose", "C12H22O11", "C12H22O11"),
    ("copper(II) sulfate pentahydrate", "CuSO4·5H2O", "CuH10O9S"),
    ("ethanol monohydrate adduct", "C2H6O·H2O", "C2H8O2"),
]

HALOGENS = ("F", "Cl", "Br", "I")


def dbe(counts):
    c = counts.get("C", 0)
    h = counts.get("H", 0)
    x = sum(counts.get(s, 0) for s in HALOGENS)
    n = counts.get("N", 0) + counts.get("P", 0)
    return c - h / 2 - x / 2 + n / 2 + 1


def first_peaks(formula, monoisotopic, n=5):
    iso = IsoSpecPy.IsoTotalProb(formula=formula, prob_to_cover=0.9999999)
    bins = [0.0] * n
    for m, p in zip(iso.masses, iso.probs):
        k = round(m - monoisotopic)
        if 0 <= k < n:
            bins[k] += p
    top = max(bins)
    return [100.0 * b / top for b in bins]


def molmass_peaks(hill, n=5):
    formula = molmass.Formula(hill)
    spectrum = formula.spectrum(min_intensity=1e-12)
    nominal = formula.nominal_mass
    entries = [spectrum[nominal + k] if (nominal + k) in spectrum else None for k in range(n)]
    intensities = [e.intensity if e else 0.0 for e in entries]
    masses = [e.mass if e else 0.0 for e in entries[:3]]
    return intensities, masses


def main():
    versions = {
        lib: importlib.metadata.version(lib)
        for lib in ("pyteomics", "molmass", "IsoSpecPy")
    }
    print(
        "# generated by tests/reference/make_formula_table.py with "
        + ", ".join(f"{k} {v}" for k, v in versions.items())
        + f", Python {platform.python_version()}"
    )
    print("# masses in u; m0..m4 in percent of the most abundant nominal-mass bin")
    header = ["name", "written", "hill", "mono_molmass", "mono_pyteomics"]
    header += ["avg_pyteomics", "avg_molmass", "dbe"]
    header += [f"m{k}" for k in range(5)] + [f"mz{k}" for k in range(3)]
    header += [f"iso{k}" for k in range(5)]
    print("\t".join(header))
    for name, written, hill in COMPOUNDS:
        counts = dict(mass.Composition(formula=hill))
        mono = mass.calculate_mass(formula=hill)
        avg = mass.calculate_mass(formula=hill, average=True)
        mm = molmass.Formula(hill)
        intensities, masses = molmass_peaks(hill)
        isospec = first_peaks(hill, mono)
        print(
            "\t".join(
                [name, written, hill, f"{mm.monoisotopic_mass:.9f}", f"{mono:.9f}"]
                + [f"{avg:.6f}", f"{mm.mass:.6f}", f"{dbe(counts):g}"]
                + [f"{p:.8f}" for p in intensities]
                + [f"{m:.9f}" for m in masses]
                + [f"{p:.6f}" for p in isospec]
            )
        )


if __name__ == "__main__":
    main()
