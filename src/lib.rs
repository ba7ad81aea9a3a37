//! ltb-atlas: elastic lateral–torsional buckling of beams and cantilevers,
//! and the design aids built on it.
//!
//! Numerics (`section`, `model`, `fe`, `linalg`, `eigen`, `solve`) do no I/O
//! and hold no global state. `case` turns a TOML case into a model; `report`
//! turns results into text, JSON and CSV; the binary in `main.rs` is a thin
//! CLI over them.

#![deny(missing_docs)]
// Numeric kernels index several arrays with one loop variable; iterator
// chains would hide the matrix algebra. `!(x > tol)` is deliberate: it is
// true for NaN as well.
#![allow(clippy::needless_range_loop, clippy::neg_cmp_op_on_partial_ord)]

pub mod case;
pub mod chart;
pub mod eigen;
pub mod fe;
pub mod fit;
pub mod handbook;
pub mod linalg;
pub mod model;
pub mod report;
pub mod resistance;
pub mod rules;
pub mod section;
pub mod solve;
pub mod stage;
pub mod sweep;

/// The caution printed with every output a person reads.
pub const CAUTION: &str = "Design aid only: elastic critical values for a rigid cross-section with the \
restraints stated, not a design resistance. Check against the governing code; a qualified engineer is \
responsible for its application; local codes and licensed practice prevail.";

/// The caution printed with every design resistance (resistance tables,
/// charts and the `[design]` block of `solve`), where the elastic caution's
/// "not a design resistance" would contradict the output.
pub const DESIGN_CAUTION: &str = "Design aid only: design resistances computed from the engine's elastic \
critical moments (rigid cross-section, restraints as stated) with the code, edition and nationally determined \
values stated. Check against the governing code and its national annex; a qualified engineer is responsible \
for its application; local codes and licensed practice prevail.";
