//! # rungs
//!
//! Bound vibrational-rotational levels, wavefunctions and spectroscopic quantities of diatomic
//! potential-energy curves.
//!
//! Data flow, one way: [`reader`] (curve files, points, analytic models, units, masses) ->
//! [`solver`] (levels and wavefunctions) -> post-processors ([`survey`], [`constants`], [`bands`], [`compare`], [`dissociation`], [`fit`], [`spectrum`]) -> [`report`] (tables,
//! CSV, JSON) and [`figures`] (SVG, PNG). Each stage knows nothing of the stages after it. Inside the library every number
//! is in Hartree atomic units (see [`units`]).

pub mod bands;
pub mod compare;
pub mod constants;
pub mod curve;
pub mod dissociation;
pub mod figures;
pub mod fit;
pub mod masses;
pub mod reader;
pub mod report;
pub mod solver;
pub mod spectrum;
pub mod survey;
pub mod units;
