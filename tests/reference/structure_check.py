#!/usr/bin/env python3
"""Checks quiddity's generated structures with RDKit (a general-purpose cheminformatics
library from PyPI: `pip install rdkit`) and writes the checked table that the Rust test
`tests/structure_reference.rs` reads, so CI needs no Python.

For every query (a formula, optionally with a group multiset) it runs
`quiddity isomers FORMULA [--groups ...] --json --max 100000`, then for every SMILES:
  - RDKit must parse and sanitise it,
  - RDKit's molecular formula must equal the query formula,
and over the whole set: no two SMILES may give the same RDKit canonical SMILES
(no duplicates under RDKit's canonicalisation).
Each row also stores RDKit's canonical SMILES in Kekulé form; the Rust test reads that
back with quiddity's own parser and checks it gives the same canonical SMILES (a round
trip through an independent implementation).

Usage: python3 tests/reference/structure_check.py target/release/quiddity
"""
import json
import subprocess
import sys
from pathlib import Path

import rdkit
from rdkit import Chem, RDLogger
from rdkit.Chem.rdMolDescriptors import CalcMolFormula

RDLogger.DisableLog("rdApp.*")

# (formula, groups or "") -- plain constitutional isomers, then group-restricted sets.
QUERIES = [
    ("C6H14", ""), ("C7H16", ""), ("C8H18", ""), ("C4H10O", ""), ("C5H12O", ""),
    ("C4H8", ""), ("C5H10", ""), ("C6H12", ""), ("C6H6", ""), ("C4H4", ""),
    ("C3H6O", ""), ("C4H8O", ""), ("C4H6O", ""), ("C5H8", ""), ("C3H7NO", ""),
    ("C2H6OS", ""), ("C3H5Cl", ""), ("C2H4O2", ""), ("C4H8O2", ""), ("C4H9N", ""),
    ("C3H3N", ""), ("C2H3F3", ""), ("C3H4O2", ""),
    ("C10H12O", "ketone:1,aromatic_ring:1"),
    ("C8H10", "aromatic_ring:1"),
    ("C7H7Cl", "aromatic_ring:1,chloro:1"),
    ("C6H5NO2", "nitro:1,aromatic_ring:1"),
    ("C9H10O2", "ester:1,aromatic_ring:1"),
    ("C3H9O4P", "phosphate_ester:1"),
    ("C4H10O2S", "sulfone:1"),
    ("C8H9NO", "amide_secondary:1,aromatic_ring:1"),
    ("C6H7N", "pyridine_ring:1"),
    ("C8H7N", "nitrile:1,aromatic_ring:1"),
    ("C9H10", "alkene:1,aromatic_ring:1"),
    ("C6H10O", "ketone:1,ring:1"),
    ("C8H8O2", "carboxylic_acid:1,aromatic_ring:1"),
    ("C5H8O2", "ester:1,alkene:1"),
    ("C5H11NO", "amide_tertiary:1"),
    ("C4H7N", "nitrile:1"),
    ("C6H12O", "aldehyde:1"),
]


def main() -> int:
    binary = sys.argv[1] if len(sys.argv) > 1 else "target/release/quiddity"
    out = Path(__file__).with_name("structure_table.tsv")
    lines = [
        f"# checked with rdkit {rdkit.__version__} (PyPI) by tests/reference/structure_check.py",
        "# query\tsmiles\trdkit_kekule\tformula_ok",
    ]
    failures = 0
    for formula, groups in QUERIES:
        args = [binary, "isomers", formula, "--json", "--max", "100000"]
        if groups:
            args += ["--groups", groups]
        report = json.loads(subprocess.run(args, capture_output=True, check=False, text=True).stdout)
        if report["truncated"]:
            print(f"{formula} {groups}: truncated", file=sys.stderr)
            return 1
        query = f"{formula} {groups}".strip()
        seen = {}
        for s in report["structures"]:
            smiles = s["smiles"]
            mol = Chem.MolFromSmiles(smiles)
            if mol is None:
                print(f"{query}: RDKit cannot read {smiles}", file=sys.stderr)
                failures += 1
                lines.append(f"{query}\t{smiles}\t-\tno")
                continue
            canonical = Chem.MolToSmiles(mol)
            if canonical in seen:
                print(f"{query}: {smiles} duplicates {seen[canonical]}", file=sys.stderr)
                failures += 1
            seen[canonical] = smiles
            formula_ok = CalcMolFormula(mol) == formula
            if not formula_ok:
                print(f"{query}: {smiles} is {CalcMolFormula(mol)}", file=sys.stderr)
                failures += 1
            Chem.Kekulize(mol, clearAromaticFlags=True)
            kekule = Chem.MolToSmiles(mol, kekuleSmiles=True)
            lines.append(f"{query}\t{smiles}\t{kekule}\t{'yes' if formula_ok else 'no'}")
        print(f"{query}: {len(report['structures'])} structures, {len(seen)} distinct under RDKit")
    out.write_text("\n".join(lines) + "\n")
    print(f"wrote {out} ({failures} failures)")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
