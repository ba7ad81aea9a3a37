//! Finite elements for lateral–torsional buckling: the element matrices, the
//! pre-buckling in-plane analysis, the a-priori mesh and the assembly.
//! Pure numerics: no I/O, no global state.

pub mod assembly;
pub mod element;
pub mod inplane;
pub mod mesh;
