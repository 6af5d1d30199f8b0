//! `dgpath plot`: the SVG parses back with the expected labels, the PNG
//! decodes with text drawn, and the example plot in pathways/ is current.

use crate::support::{root, run_in_root as dgpath};
use resvg::{tiny_skia, usvg};

const PW: &str = "pathways/fermenter.toml";
const DEMO: &str = "pathways/fermenter-samples.csv";
const STEPS: [&str; 12] = [
    "hxk", "pgi", "pfk", "ald", "tpi", "gapdh", "pgk", "pgm", "eno", "pyk", "pdc", "adh",
];

fn options() -> usvg::Options<'static> {
    let mut opt = usvg::Options::default();
    opt.fontdb_mut()
        .load_font_data(dgpath::plot::FONT_DATA.to_vec());
    opt
}

fn texts(g: &usvg::Group, out: &mut Vec<String>) {
    for n in g.children() {
        match n {
            usvg::Node::Group(g) => texts(g, out),
            usvg::Node::Text(t) => out.push(t.chunks().iter().map(|c| c.text()).collect()),
            _ => {}
        }
    }
}

fn plot_svg(extra: &[&str]) -> (String, Vec<String>) {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("p.svg");
    let mut args = vec!["plot", PW, "-o", out.to_str().unwrap()];
    args.extend_from_slice(extra);
    let o = dgpath(&args);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let svg = std::fs::read_to_string(&out).unwrap();
    let tree = usvg::Tree::from_str(&svg, &options()).expect("the SVG parses");
    let mut t = Vec::new();
    texts(tree.root(), &mut t);
    (svg, t)
}

#[test]
fn svg_parses_back_with_the_labels() {
    let (_, t) = plot_svg(&[]);
    for id in STEPS {
        assert_eq!(
            t.iter().filter(|x| *x == id).count(),
            2,
            "{id} labels both panels: {t:?}"
        );
    }
    for want in [
        "largest drop",
        "coupled",
        "actual dG'",
        "standard dG'° (1 M each)",
        "far",
        "near ×2",
    ] {
        assert!(t.iter().any(|x| x == want), "'{want}' in {t:?}");
    }
    // One coupled group (gapdh + pgk): one bracket label per panel.
    assert_eq!(t.iter().filter(|x| *x == "coupled").count(), 2);
    assert!(
        !t.iter().any(|x| x.contains("samples")),
        "no samples panel without --samples"
    );
}

#[test]
fn samples_add_the_spread_panel() {
    let (_, t) = plot_svg(&["--samples", DEMO]);
    assert!(
        t.iter()
            .any(|x| x.starts_with("dG' per step across 12 samples")),
        "{t:?}"
    );
    // Every step gets a far count; hxk is far in all twelve demo samples.
    assert_eq!(
        t.iter()
            .filter(|x| x.starts_with("far ") && x.ends_with("/12"))
            .count(),
        12,
        "{t:?}"
    );
    assert!(t.iter().any(|x| x == "far 12/12"));
    for id in STEPS {
        assert_eq!(t.iter().filter(|x| *x == id).count(), 3, "{id}");
    }
}

#[test]
fn png_decodes_and_has_text() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("p.png");
    let o = dgpath(&["plot", PW, "-o", out.to_str().unwrap()]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let bytes = std::fs::read(&out).unwrap();
    let png = tiny_skia::Pixmap::decode_png(&bytes).expect("a valid PNG");
    let (svg, _) = plot_svg(&[]);
    let tree = usvg::Tree::from_str(&svg, &options()).unwrap();
    assert_eq!(
        (png.width(), png.height()),
        (tree.size().width() as u32, tree.size().height() as u32)
    );
    // The title is the only thing in the top 40 pixel rows: dark pixels there
    // mean the bundled font was found and text was drawn.
    let dark = (0..40)
        .flat_map(|y| (0..png.width()).map(move |x| (x, y)))
        .filter(|&(x, y)| {
            png.pixel(x, y)
                .is_some_and(|p| p.red() < 100 && p.alpha() > 200)
        })
        .count();
    assert!(dark > 200, "title pixels: {dark}");
}

#[test]
fn wrong_output_extension_is_a_clear_error() {
    let o = dgpath(&["plot", PW, "-o", "profile.pdf"]);
    assert_eq!(o.status.code(), Some(1));
    let e = String::from_utf8_lossy(&o.stderr);
    assert!(
        e.contains("profile.pdf: the output must end in .svg or .png"),
        "{e}"
    );
    assert!(!root().join("profile.pdf").exists());
}

/// Regenerates pathways/fermenter-profile.svg when it is stale, and fails so the change is seen.
#[test]
fn example_plot_is_current() {
    let committed = root().join("pathways/fermenter-profile.svg");
    let dir = tempfile::tempdir().unwrap();
    let fresh = dir.path().join("fermenter-profile.svg");
    let o = dgpath(&["plot", PW, "--samples", DEMO, "-o", fresh.to_str().unwrap()]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let new = std::fs::read_to_string(&fresh).unwrap();
    let old = std::fs::read_to_string(&committed).unwrap_or_default();
    if new != old {
        std::fs::write(&committed, &new).unwrap();
        panic!(
            "pathways/fermenter-profile.svg was stale and has been regenerated; review it and commit it"
        );
    }
}

/// The points of each polyline with this stroke and width.
fn polylines(svg: &str, stroke: &str, width: &str) -> Vec<Vec<(f64, f64)>> {
    let want = format!("stroke=\"{stroke}\" stroke-width=\"{width}\" points=\"");
    svg.match_indices(&want)
        .map(|(i, m)| {
            let rest = &svg[i + m.len()..];
            let pts = &rest[..rest.find('"').unwrap()];
            pts.split_whitespace()
                .map(|p| {
                    let (x, y) = p.split_once(',').unwrap();
                    (x.parse().unwrap(), y.parse().unwrap())
                })
                .collect()
        })
        .collect()
}

#[test]
fn far_steps_are_thick_and_dark_neutral_and_stay_inside() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("p.svg");
    let o = dgpath(&["plot", PW, "-o", out.to_str().unwrap()]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let svg = std::fs::read_to_string(&out).unwrap();
    // No red: the far steps are #222222 at width 5, the others light and thin.
    assert!(
        !svg.to_ascii_uppercase().contains("#C42020"),
        "the old red is gone"
    );
    let far = polylines(&svg, "#222222", "5");
    // hxk, pfk, pyk, pdc on the demo, plus the legend's sample line.
    assert_eq!(far.len(), 5, "{far:?}");
    assert!(
        !polylines(&svg, "#96A0AF", "1").is_empty(),
        "thin light lines"
    );
    // The legend line lies above every point of the curve (smaller y in SVG)
    // within the left panel.
    let curve: Vec<(f64, f64)> = far[..4].iter().flatten().copied().collect();
    let legend = &far[4];
    let top = curve.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
    assert!(
        legend.iter().all(|p| p.1 < top - 10.0),
        "{legend:?} vs {top}"
    );
    // The last plateau (pdc's end) ends before the panel's right edge, where
    // the thin line of the last step still follows.
    let last_far_x = curve.iter().map(|p| p.0).fold(0.0, f64::max);
    let thin = polylines(&svg, "#96A0AF", "1");
    let right = thin.iter().flatten().map(|p| p.0).fold(0.0, f64::max);
    assert!(last_far_x < right, "{last_far_x} < {right}");
}

#[test]
fn a_long_route_makes_a_picture_of_capped_size_with_thinned_labels() {
    // 5,000 steps drew a 248,220 px wide picture before; the width is now
    // that of 40 steps and every k-th step is labelled.
    let prep = dgpath::analysis::prepare(
        dgpath::model::load_str(&dgpath::synthetic::route(5000), "long.toml").unwrap(),
    )
    .unwrap();
    let state = dgpath::scenario::State::from_pathway(&prep.pathway);
    let a = dgpath::analysis::analyze(&prep, &state).unwrap();
    let svg = dgpath::plot::svg(&prep, &a, None, dgpath::report::EnergyUnit::KJ).unwrap();
    let width: u32 = svg
        .split("width=\"")
        .nth(1)
        .and_then(|r| r.split('"').next())
        .and_then(|w| w.parse().ok())
        .expect("an svg width");
    assert_eq!(width, 2 * (110 + 62 * 40), "two panels of 40 steps' width");
    assert!(
        svg.contains("(every 125th step labelled)"),
        "the caption says so"
    );
    assert!(svg.contains("\ns125\n") && !svg.contains("\ns124\n"));
}
