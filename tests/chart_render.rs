//! Chart rendering: well-formed SVG, the expected series, points and legend
//! entries, axis ranges covering the data, hatching where a rule is
//! unconservative, schematics that follow the case, deterministic bytes.
//!
//! The inputs are hand-made test data (no engineering values are checked
//! here except the flange displacement u = v − z·φ of the domain notes).

use ltb_atlas::chart::mode::{self, ModeShape};
use ltb_atlas::chart::ratio_map::{self, Cell, RatioMap, Verdict};
use ltb_atlas::chart::schematic::{self, Schematic};
use ltb_atlas::chart::style;
use ltb_atlas::chart::xy::{self, Series, XyChart};
use ltb_atlas::model::{Fixity, Load, Member, Restraint, Support};

fn hex(c: plotters::style::RGBColor) -> String {
    format!("#{:02X}{:02X}{:02X}", c.0, c.1, c.2)
}

/// Write the chart to `$LTB_ATLAS_SAVE_CHARTS/<name>.svg` when that variable
/// is set (for looking at the test charts; off by default).
fn save(name: &str, svg: &str) {
    if let Some(d) = std::env::var_os("LTB_ATLAS_SAVE_CHARTS") {
        std::fs::create_dir_all(&d).unwrap();
        std::fs::write(std::path::Path::new(&d).join(format!("{name}.svg")), svg).unwrap();
    }
}

/// Parse (fails on malformed XML) and return the document.
fn parse(svg: &str) -> roxmltree::Document<'_> {
    roxmltree::Document::parse(svg).expect("well-formed SVG")
}

fn elements<'a>(doc: &'a roxmltree::Document<'a>, tag: &str) -> Vec<roxmltree::Node<'a, 'a>> {
    doc.descendants()
        .filter(|n| n.is_element() && n.tag_name().name() == tag)
        .collect()
}

fn texts(doc: &roxmltree::Document<'_>) -> Vec<String> {
    elements(doc, "text")
        .iter()
        .map(|n| {
            n.descendants()
                .filter(|d| d.is_text())
                .filter_map(|d| d.text())
                .collect::<String>()
                .trim()
                .to_string()
        })
        .collect()
}

fn fonts_are_explicit(doc: &roxmltree::Document<'_>) {
    for t in elements(doc, "text") {
        assert_eq!(t.attribute("font-family"), Some("DejaVu Sans"));
    }
}

fn family_chart(caution: bool) -> XyChart {
    let ks = [0.1, 0.2, 0.5, 1.0, 2.0, 3.0];
    let series = (0..3)
        .map(|j| Series {
            label: format!("test series {j}"),
            points: ks.iter().map(|&k| (k, 3.0 + j as f64 + k * k)).collect(),
            curve: (j == 1).then(|| {
                (0..40)
                    .map(|i| {
                        let k = 0.1 * 30f64.powf(i as f64 / 39.0);
                        (k, 4.0 + k * k)
                    })
                    .collect()
            }),
        })
        .collect();
    XyChart {
        title: "test: μ_{cr} against κ".into(),
        subtitle: "hand-made data".into(),
        x_label: "κ (dimensionless)".into(),
        y_label: "μ_{cr} (dimensionless)".into(),
        x_log: true,
        y_from_zero: true,
        series,
        legend_title: "Load height".into(),
        valid_x: Some((0.2, 2.0)),
        notes: vec!["test note".into()],
        caution,
        style_offset: 0,
    }
}

#[test]
fn family_chart_has_its_series_points_and_legend() {
    let c = family_chart(true);
    let svg = xy::render(&c).unwrap();
    let doc = parse(&svg);
    fonts_are_explicit(&doc);
    assert!(!svg.contains("sans-serif"));
    // Subscripts became tspans.
    assert!(
        svg.contains("M<tspan baseline-shift=\"sub\"")
            || svg.contains("μ<tspan baseline-shift=\"sub\"")
    );
    let t = texts(&doc);
    for j in 0..3 {
        let label = format!("test series {j}");
        assert_eq!(
            t.iter().filter(|x| **x == label).count(),
            1,
            "legend entry {label}"
        );
        let colour = hex(style::series(j).colour);
        // Markers: one per point plus one in the legend.
        let marks = doc
            .descendants()
            .filter(|n| n.is_element() && n.attribute("fill") == Some(colour.as_str()))
            .count();
        assert_eq!(marks, c.series[j].points.len() + 1, "markers of series {j}");
        // Lines: at least the series line and the legend sample, dashed as the style says.
        let lines: Vec<_> = elements(&doc, "polyline")
            .into_iter()
            .filter(|n| n.attribute("stroke") == Some(colour.as_str()))
            .collect();
        assert!(lines.len() >= 2);
        let dash = style::series(j).dash;
        if !dash.is_empty() {
            assert!(
                lines
                    .iter()
                    .all(|l| l.attribute("stroke-dasharray") == Some(dash))
            );
        }
    }
    // The caution is printed (wrapped over lines): its first words appear.
    assert!(t.iter().any(|x| x.starts_with("Design aid only")));
    let without = xy::render(&family_chart(false)).unwrap();
    assert!(!without.contains("Design aid only"));
}

#[test]
fn axis_ranges_cover_the_data() {
    let c = family_chart(true);
    let ((x0, x1), (y0, y1)) = xy::ranges(&c).unwrap();
    for s in &c.series {
        for &(x, y) in s.points.iter().chain(s.curve.iter().flatten()) {
            assert!(
                x >= x0 && x <= x1 && y >= y0 && y <= y1,
                "({x}, {y}) outside"
            );
        }
    }
    assert_eq!(y0, 0.0, "μcr axis starts at 0");
}

#[test]
fn renders_are_byte_identical() {
    let c = family_chart(true);
    assert_eq!(xy::render(&c).unwrap(), xy::render(&c).unwrap());
    let m = test_map();
    assert_eq!(
        ratio_map::render(&m).unwrap(),
        ratio_map::render(&m).unwrap()
    );
}

fn test_map() -> RatioMap {
    // Hand-made ratios: r > 1 (unconservative) in the upper left corner.
    let mut cells = Vec::new();
    for i in 0..6 {
        let k = 0.1 * 2f64.powi(i);
        for j in -2..=2 {
            let z = 0.5 * j as f64;
            let r = 1.0 + 0.05 * z - 0.03 * i as f64;
            let verdict = if i == 5 && j == -2 {
                Verdict::NotApplicable
            } else if (r - 1.0).abs() < 0.005 {
                Verdict::Indeterminate
            } else if r > 1.0 {
                Verdict::Unconservative
            } else {
                Verdict::Conservative
            };
            let ratio = (verdict != Verdict::NotApplicable).then_some(r);
            cells.push(Cell {
                kappa: k,
                zeta: z,
                ratio,
                verdict,
            });
        }
    }
    RatioMap {
        title: "test map".into(),
        subtitle: String::new(),
        kappa_log: true,
        cells,
        frontier: vec![vec![(0.1, -0.0), (0.4, 1.2), (0.8, 2.0)]],
        notes: vec![],
        caution: true,
    }
}

#[test]
fn ratio_map_hatches_unconservative_cells() {
    let m = test_map();
    let svg = ratio_map::render(&m).unwrap();
    save("ratio-map", &svg);
    let doc = parse(&svg);
    fonts_are_explicit(&doc);
    let hatched = elements(&doc, "rect")
        .into_iter()
        .filter(|n| n.attribute("fill") == Some("url(#ltb-hatch)"))
        .count();
    let unconservative = m
        .cells
        .iter()
        .filter(|c| c.verdict == Verdict::Unconservative)
        .count();
    assert!(unconservative > 0);
    // One per unconservative cell, one on the colour bar above r = 1, one in the key.
    assert_eq!(hatched, unconservative + 2);
    assert_eq!(elements(&doc, "pattern").len(), 1);
    // Every cell drawn (patches), the not-applicable one blank.
    assert_eq!(ratio_map::patches(&m.cells, true).len(), m.cells.len());
    let t = texts(&doc);
    assert!(t.iter().any(|x| x == "top flange ζ = κ"));
    assert!(t.iter().any(|x| x == "bottom flange ζ = −κ"));
    assert!(
        t.iter()
            .any(|x| x.starts_with("blank: rule not applicable"))
    );
}

#[test]
fn ratio_map_without_unconservative_cells_hatches_only_the_key() {
    let mut m = test_map();
    for c in &mut m.cells {
        if let Some(r) = c.ratio.as_mut() {
            *r = r.min(0.99);
            c.verdict = Verdict::Conservative;
        }
    }
    let svg = ratio_map::render(&m).unwrap();
    let doc = parse(&svg);
    let hatched = elements(&doc, "rect")
        .into_iter()
        .filter(|n| n.attribute("fill") == Some("url(#ltb-hatch)"))
        .count();
    assert_eq!(hatched, 1);
}

fn cantilever() -> Member {
    let mut m = Member::new(1.0, Support::BUILT_IN, Support::FREE);
    m.loads.push(Load::Point {
        at: 1.0,
        fz: -1.0,
        zeta: 1.0,
    });
    m
}

fn schematic_of(m: Member) -> String {
    schematic::render(&Schematic {
        title: "test case".into(),
        subtitle: String::new(),
        member: m,
        load_heights: vec![],
        both_directions: false,
        notes: vec![],
        caution: true,
    })
    .unwrap()
}

fn count_stroke(doc: &roxmltree::Document<'_>, tag: &str, colour: &str) -> usize {
    elements(doc, tag)
        .into_iter()
        .filter(|n| n.attribute("stroke") == Some(colour))
        .count()
}

#[test]
fn schematic_shows_an_added_restraint() {
    let base = schematic_of(cantilever());
    let mut braced = cantilever();
    braced.restraints.push(Restraint {
        at: 0.5,
        zeta: 1.0,
        lateral: Fixity::Fixed,
        twist: Fixity::Free,
    });
    let with = schematic_of(braced);
    save("schematic-braced", &with);
    let (d0, d1) = (parse(&base), parse(&with));
    fonts_are_explicit(&d1);
    let brace = hex(style::BRACE);
    // A lateral brace is a crossed circle: once in the elevation, once on the section.
    assert_eq!(
        count_stroke(&d1, "circle", &brace),
        count_stroke(&d0, "circle", &brace) + 2
    );
    let t1 = texts(&d1);
    assert!(t1.iter().any(|x| x == "x = 0.5L"));
    assert!(t1.iter().any(|x| x == "brace ζ = 1"));
    assert_eq!(
        schematic::columns(&cantilever()).len() + 1,
        schematic::columns(&with_member()).len()
    );
}

fn with_member() -> Member {
    let mut m = cantilever();
    m.restraints.push(Restraint {
        at: 0.5,
        zeta: 1.0,
        lateral: Fixity::Fixed,
        twist: Fixity::Free,
    });
    m
}

#[test]
fn schematic_marks_each_held_component() {
    let held = hex(style::HELD);
    let count = |m: Member| {
        let svg = schematic_of(m);
        let doc = parse(&svg);
        elements(&doc, "rect")
            .into_iter()
            .filter(|n| n.attribute("fill") == Some(held.as_str()))
            .count()
    };
    // Built-in root: four held components (plus the key's held and spring
    // swatches; a spring is a held-coloured square with a white core).
    assert_eq!(count(cantilever()), 4 + 2);
    let mut free_warping = cantilever();
    free_warping.start.warping = Fixity::Free;
    assert_eq!(count(free_warping), 3 + 2);
}

#[test]
fn mode_shape_flanges_follow_v_minus_z_phi() {
    // Domain notes, "Axes and signs": a point at height z moves v − z·φ.
    let x: Vec<f64> = (0..=10).map(|i| i as f64 / 10.0).collect();
    let v: Vec<f64> = x.iter().map(|x| 0.2 * x).collect();
    let phi: Vec<f64> = x.iter().map(|x| x * x).collect();
    let m = ModeShape {
        title: "test mode".into(),
        subtitle: String::new(),
        x: x.clone(),
        v: v.clone(),
        phi: phi.clone(),
        flanges: Some((0.3, -0.3)),
        notes: vec![],
        caution: false,
    };
    let (lat, twist) = mode::series(&m).unwrap();
    assert_eq!(lat.len(), 3);
    let top = lat[0].curve.as_ref().unwrap();
    let bot = lat[2].curve.as_ref().unwrap();
    // Normalised by the largest |u|: the bottom flange at x = 1, 0.2 + 0.3.
    let s = 0.5;
    for i in 0..x.len() {
        assert!((top[i].1 - (v[i] - 0.3 * phi[i]) / s).abs() < 1e-12);
        assert!((bot[i].1 - (v[i] + 0.3 * phi[i]) / s).abs() < 1e-12);
    }
    assert!((twist.curve.unwrap()[10].1 - 1.0).abs() < 1e-12);
    let svg = mode::render(&m).unwrap();
    let doc = parse(&svg);
    let t = texts(&doc);
    for l in ["top flange", "shear centre", "bottom flange", "twist φ"] {
        assert_eq!(t.iter().filter(|x| *x == l).count(), 1, "{l}");
    }
}

#[test]
fn resistance_chart_has_one_curve_per_section() {
    // Hand-made curves (not a resistance calculation).
    let sections: Vec<(String, Vec<(f64, f64)>)> = (0..3)
        .map(|i| {
            let m0 = 100.0 * (i + 1) as f64;
            (
                format!("test section {i}"),
                (0..=20)
                    .map(|j| {
                        let l = 0.5 + 0.5 * j as f64;
                        (l, m0 / (1.0 + 0.1 * l * l).sqrt())
                    })
                    .collect(),
            )
        })
        .collect();
    let units = xy::ResistanceUnits {
        length: "m".into(),
        resistance: "kN·m".into(),
    };
    let c = xy::resistance_chart("test resistance", "", sections, &units, vec![], true);
    let svg = xy::render(&c).unwrap();
    save("resistance", &svg);
    let doc = parse(&svg);
    fonts_are_explicit(&doc);
    let t = texts(&doc);
    assert!(t.iter().any(|x| x.contains("(kN·m)")));
    assert!(t.iter().any(|x| x.contains("(m)")));
    for j in 0..3 {
        assert!(t.iter().any(|x| *x == format!("test section {j}")));
        let colour = hex(style::series(j).colour);
        let lines = elements(&doc, "polyline")
            .into_iter()
            .filter(|n| n.attribute("stroke") == Some(colour.as_str()))
            .count();
        assert_eq!(lines, 2, "curve and legend sample of section {j}");
        // Curves only: no markers.
        let marks = doc
            .descendants()
            .filter(|n| n.is_element() && n.attribute("fill") == Some(colour.as_str()))
            .count();
        assert_eq!(marks, 0);
    }
}

#[test]
fn schematic_draws_supports_springs_continuous_restraint_and_end_moments() {
    use ltb_atlas::model::{ContinuousRestraint, PointSupport};
    let mut m = Member::new(0.8, Support::FORK, Support::FORK);
    m.supports.push(PointSupport {
        at: 0.4,
        support: Support {
            warping: Fixity::Spring(2.0),
            ..Support::FORK
        },
    });
    m.continuous.push(ContinuousRestraint {
        from: 0.0,
        to: 1.0,
        zeta: 0.8,
        lateral: 5.0,
        twist: 0.0,
    });
    m.restraints.push(Restraint {
        at: 0.75,
        zeta: -0.8,
        lateral: Fixity::Spring(10.0),
        twist: Fixity::Fixed,
    });
    m.loads.push(Load::EndMoments {
        start: 1.0,
        end: -0.5,
    });
    m.loads.push(Load::Distributed {
        from: 0.0,
        to: 1.0,
        fz_from: -1.0,
        fz_to: -0.5,
        zeta: 0.8,
    });
    let svg = schematic_of(m.clone());
    save("schematic-features", &svg);
    let doc = parse(&svg);
    let t = texts(&doc);
    assert!(t.iter().any(|x| x == "continuous lateral spring"));
    assert_eq!(t.iter().filter(|x| *x == "M").count(), 2, "two end moments");
    assert!(t.iter().any(|x| x == "x = 0.4L"));
    assert!(t.iter().any(|x| x == "brace ζ = −0.8"));
    // Columns: start, support, restraint, end.
    assert_eq!(schematic::columns(&m).len(), 4);
    // Springs are marked "k": the support's warping, the brace's lateral
    // spring (table and elevation), and the key.
    assert!(t.iter().filter(|x| *x == "k").count() >= 4);
}

#[test]
fn a_single_kappa_still_gets_an_axis() {
    let mut c = family_chart(true);
    for s in &mut c.series {
        s.points.truncate(1);
        s.curve = None;
    }
    let ((x0, x1), _) = xy::ranges(&c).unwrap();
    assert!(x0 < 0.1 && x1 > 0.1 && x1 / x0 > 2.0);
    parse(&xy::render(&c).unwrap());
}
