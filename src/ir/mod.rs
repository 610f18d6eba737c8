//! Infrared spectra: file readers (JCAMP-DX, two-column text), preprocessing and band
//! picking. Produces a band list; knows nothing of functional groups.

pub mod band;

pub use band::{Band, Shape, Strength};
