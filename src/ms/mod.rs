//! Mass-spectrum evidence: ion types, formulas from a measured m/z, isotope fit, fragments.
