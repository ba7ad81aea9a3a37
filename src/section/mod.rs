//! Cross-section properties from dimensions (mm). No I/O.
//!
//! INTERFACE FIXED BY THE ENGINE (do not rename): [`Shape`], [`Properties`],
//! [`properties`], [`SectionError`]. Heights are measured upward and given
//! relative to the shear centre, in mm.

/// A cross-section described by its dimensions, all in mm.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Shape {
    /// Doubly symmetric I-section: depth h, flange width b, flange thickness
    /// tf, web thickness tw, root radius r (r = 0 for welded).
    I { h: f64, b: f64, tf: f64, tw: f64, r: f64 },
    /// Monosymmetric I-section with different flanges: overall depth h, top
    /// flange b_top × tf_top, bottom flange b_bottom × tf_bottom, web tw,
    /// root radius r (both web–flange junctions; 0 for welded).
    MonoI { h: f64, b_top: f64, tf_top: f64, b_bottom: f64, tf_bottom: f64, tw: f64, r: f64 },
    /// Solid rectangle: depth h (vertical) and width b.
    Rectangle { h: f64, b: f64 },
}

/// Section properties (mm-based units) and reference heights.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Properties {
    /// Area A, mm².
    pub area: f64,
    /// Second moment about the major (horizontal) axis, Iy, mm⁴.
    pub iy: f64,
    /// Second moment about the minor (vertical) axis, Iz, mm⁴.
    pub iz: f64,
    /// St Venant torsion constant It, mm⁴.
    pub it: f64,
    /// Warping constant Iw about the shear centre, mm⁶.
    pub iw: f64,
    /// Height of the shear centre above the centroid, zs, mm.
    pub zs: f64,
    /// Monosymmetry constant βy = (1/Iy)∫z(y²+z²)dA − 2·zs, mm (domain notes; < 0 when the larger flange is on top).
    pub beta_y: f64,
    /// Height above the shear centre of the top flange centroid, mm.
    pub top_flange: f64,
    /// Height above the shear centre of the top surface, mm.
    pub top_surface: f64,
    /// Height above the shear centre of the bottom flange centroid, mm (negative).
    pub bottom_flange: f64,
    /// Height above the shear centre of the bottom surface, mm (negative).
    pub bottom_surface: f64,
}

/// Bad dimensions.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{field}: {message}")]
pub struct SectionError {
    /// The offending dimension's key (for example `tf_top`).
    pub field: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

/// Compute the properties of a shape.
pub fn properties(shape: &Shape) -> Result<Properties, SectionError> {
    let _ = shape;
    Err(SectionError { field: String::new(), message: "section properties are being implemented".into() })
}
