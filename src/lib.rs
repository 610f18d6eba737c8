//! quiddity: deduce the functional-group combinations an unknown compound can hold from its
//! molecular formula, IR bands and mass-spectrum evidence, rank them and explain why.
//!
//! Data flows one way (see DEVELOPERS.md): `chem` and `ir` and `ms` turn raw inputs into
//! evidence, `rules` holds the correlation catalogue, `engine` is the only place that
//! combines evidence with rules, `case` and `report` sit on top, and `cli` is the only
//! module that touches files and the terminal.

pub mod budget;
pub mod case;
pub mod chem;
pub mod cli;
pub mod diag;
pub mod engine;
pub mod ir;
pub mod library;
pub mod ms;
pub mod report;
pub mod rules;
pub mod structure;
pub mod verdict;
pub mod yaml;
