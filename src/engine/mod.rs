//! The deduction engine: constraint model, enumeration, scoring, explanation and conflicts.
//! The only module that combines evidence with the rules catalogue; pure (no I/O).
