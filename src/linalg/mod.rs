//! Linear algebra kernels: the banded LDLᵀ with inertia used in production,
//! and a dense reference path (nalgebra) used to check it.

pub mod band;
pub mod dense;
