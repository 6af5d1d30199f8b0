//! The flux control estimate from the thermodynamics (science.md §7),
//! through pathway files loaded like any user's: the worked case, the
//! summation theorem on random routes with turns, splits and carriers, the
//! closed form of chains against the matrix method, finite differences on
//! small kinetic models written here, the saturation range, and no estimate
//! when a step cannot run forward.

use crate::support::{Pw, analyze, close, prepare_str, step};
use dgpath::analysis::{Analysis, mca};
use dgpath::thermo;
use proptest::prelude::*;

/// RT at 25 °C in J/mol, from the exact constant (science.md §1 [S]).
fn rt25() -> f64 {
    thermo::rt(298.15)
}

/// A pathway file at 25 °C: compounds (id, conc in M, role) and steps (id, reaction, dg0 in J/mol).
fn file(compounds: &[(String, f64, Option<&str>)], steps: &[(String, String, f64)]) -> String {
    let p = compounds
        .iter()
        .fold(Pw::new("estimate test (invented)"), |p, (id, c, role)| {
            let role = role.map_or(String::new(), |r| format!("role = \"{r}\""));
            p.compound_with(id, &format!("{c:e} M"), &role)
        });
    steps
        .iter()
        .fold(p, |p, (id, rx, dg0)| {
            p.step(id, rx, &format!("{} kJ/mol", dg0 / 1e3))
        })
        .text()
}

fn coefficients(a: &Analysis) -> Vec<f64> {
    a.control_estimate
        .coefficients
        .clone()
        .expect("an estimate exists")
}

/// science.md §7 check [C]: X0 -> S1 -> S2 -> X3 with dG'1 = RT ln(13/28),
/// dG'2 = RT ln(11/26), dG'3 = RT ln(7/22) at 298.15 K gives C^J = (4/7, 2/7, 1/7).
#[test]
fn worked_case_in_dg_form() {
    let one = |id: &str| (id.to_string(), 1.0, None);
    let rt = rt25();
    let text = file(
        &[one("x0"), one("s1"), one("s2"), one("x3")],
        &[
            ("v1".into(), "x0 -> s1".into(), rt * (13.0f64 / 28.0).ln()),
            ("v2".into(), "s1 -> s2".into(), rt * (11.0f64 / 26.0).ln()),
            ("v3".into(), "s2 -> x3".into(), rt * (7.0f64 / 22.0).ln()),
        ],
    );
    let prep = prepare_str(&text, "worked.toml");
    let a = analyze(&prep);
    let c = coefficients(&a);
    for (x, want) in c.iter().zip([4.0 / 7.0, 2.0 / 7.0, 1.0 / 7.0]) {
        close(*x, want, 1e-9);
    }
    // The step closest to equilibrium (v1) carries the most control.
    assert_eq!(a.control_estimate.top(), Some(0));
}

/// The example [C, closed form of science.md §7]: a mass-action
/// chain with dG' = −1, −5, −20 kJ/mol: the far (last) step carries the least.
#[test]
fn the_far_last_step_of_a_short_chain_carries_little() {
    let one = |id: &str| (id.to_string(), 1.0, None);
    let text = file(
        &[one("x0"), one("a"), one("b"), one("x3")],
        &[
            ("s1".into(), "x0 -> a".into(), -1e3),
            ("s2".into(), "a -> b".into(), -5e3),
            ("s3".into(), "b -> x3".into(), -20e3),
        ],
    );
    let a = analyze(&prepare_str(&text, "t.toml"));
    let c = coefficients(&a);
    // Closed form by hand: ρ = e^{dG'/RT}; ε_S = 1/(1−ρ), −ε_P = ρ/(1−ρ).
    let rho: Vec<f64> = [-1e3, -5e3, -20e3]
        .iter()
        .map(|g: &f64| (g / rt25()).exp())
        .collect();
    let es = |k: usize| 1.0 / (1.0 - rho[k]);
    let ep = |k: usize| rho[k] / (1.0 - rho[k]);
    let n = [es(1) * es(2), ep(0) * es(2), ep(0) * ep(1)];
    let sum: f64 = n.iter().sum();
    for k in 0..3 {
        close(c[k], n[k] / sum, 1e-12);
    }
    close(c[2], 0.089, 0.0005);
    assert!(c[2] < c[1] && c[2] < c[0]);
}

/// Steady state of a small mass-action model by Newton's method in log
/// concentrations; `f` gives the residuals and J.
fn newton(x0: &[f64], f: &dyn Fn(&[f64]) -> Vec<f64>) -> Vec<f64> {
    let n = x0.len();
    let mut x: Vec<f64> = x0.iter().map(|v| v.ln()).collect();
    let eval = |x: &[f64]| f(&x.iter().map(|v| v.exp()).collect::<Vec<_>>());
    for _ in 0..200 {
        let r = eval(&x);
        let norm = r.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        if norm < 1e-17 {
            break;
        }
        // Numeric Jacobian.
        let mut jac = vec![vec![0.0; n]; n];
        for j in 0..n {
            let mut xp = x.clone();
            xp[j] += 1e-7;
            let rp = eval(&xp);
            for i in 0..n {
                jac[i][j] = (rp[i] - r[i]) / 1e-7;
            }
        }
        // Gaussian elimination.
        let mut b: Vec<f64> = r.iter().map(|v| -v).collect();
        for k in 0..n {
            let p = (k..n)
                .max_by(|&i, &j| jac[i][k].abs().total_cmp(&jac[j][k].abs()))
                .unwrap();
            jac.swap(k, p);
            b.swap(k, p);
            let pivot_row = jac[k].clone();
            for i in k + 1..n {
                let m = jac[i][k] / pivot_row[k];
                for (x, y) in jac[i][k..].iter_mut().zip(&pivot_row[k..]) {
                    *x -= m * y;
                }
                b[i] -= m * b[k];
            }
        }
        let mut dx = vec![0.0; n];
        for k in (0..n).rev() {
            let s: f64 = (k + 1..n).map(|j| jac[k][j] * dx[j]).sum();
            dx[k] = (b[k] - s) / jac[k][k];
        }
        for k in 0..n {
            x[k] += dx[k].clamp(-2.0, 2.0);
        }
    }
    x.iter().map(|v| v.exp()).collect()
}

/// A split with turns of two, as a kinetic model written here:
/// s1 X0 -> A, s2 A -> B + C, s3 B -> C, s4 C -> X4 (turns 1, 1, 1, 2),
/// v = k (substrates − products / K). The file gets the steady state and
/// dG'° = −RT ln K; the estimate must match d ln J / d ln k by central
/// differences.
#[test]
fn matches_finite_differences_on_a_split_with_turns() {
    let kk = [50.0, 0.02, 4.0, 30.0]; // invented equilibrium constants (M^Δn)
    let (x0, x4) = (5e-3, 1e-4); // invented held concentrations, M
    let rates = |k: &[f64; 4], s: &[f64]| {
        let (a, b, c) = (s[0], s[1], s[2]);
        [
            k[0] * (x0 - a / kk[0]),
            k[1] * (a - b * c / kk[1]),
            k[2] * (b - c / kk[2]),
            k[3] * (c - x4 / kk[3]),
        ]
    };
    let steady = |k: [f64; 4]| {
        let s = newton(&[1e-3, 1e-3, 1e-3], &|s| {
            let v = rates(&k, s);
            vec![v[0] - v[1], v[1] - v[2], v[1] + v[2] - v[3]]
        });
        let v = rates(&k, &s);
        (s, v[0])
    };
    let k0 = [1.0, 2.0, 3.0, 1.5];
    let (s, j) = steady(k0);
    assert!(j > 0.0);
    let ids = ["a", "b", "c"];
    let mut comps: Vec<(String, f64, Option<&str>)> =
        vec![("x0".into(), x0, None), ("x4".into(), x4, None)];
    for (i, id) in ids.iter().enumerate() {
        comps.push((id.to_string(), s[i], None));
    }
    let dg0 = |k: f64| -rt25() * k.ln();
    let text = file(
        &comps,
        &[
            ("s1".into(), "x0 -> a".into(), dg0(kk[0])),
            ("s2".into(), "a -> b + c".into(), dg0(kk[1])),
            ("s3".into(), "b -> c".into(), dg0(kk[2])),
            ("s4".into(), "c -> x4".into(), dg0(kk[3])),
        ],
    );
    let prep = prepare_str(&text, "split.toml");
    let a = analyze(&prep);
    close(step(&prep, &a, "s4").times, 2.0, 1e-12);
    assert!(!a.control_estimate.model.as_ref().unwrap().is_chain());
    let c = coefficients(&a);
    let h = 1e-5;
    for i in 0..4 {
        let (mut up, mut down) = (k0, k0);
        up[i] *= 1.0 + h;
        down[i] *= 1.0 - h;
        let fd = (steady(up).1.ln() - steady(down).1.ln()) / ((1.0 + h).ln() - (1.0 - h).ln());
        close(c[i], fd, 1e-6);
    }
}

/// Carriers on the route only (not marked currency) are intermediates with
/// conserved totals: s1 X + c -> A + d, s2 A + d -> Y + c. The estimate
/// (through the link matrix) must match finite differences on the kinetic
/// model with c + d and A + c held.
#[test]
fn matches_finite_differences_with_conserved_carriers() {
    let (kk1, kk2) = (20.0, 8.0); // invented equilibrium constants
    let (x, y) = (2e-3, 1e-3); // invented held concentrations, M
    let (t_cd, t_ac) = (3e-3, 2.5e-3); // invented totals, M
    let steady = |k: [f64; 2]| {
        let rates = |a: f64| {
            let c = t_ac - a;
            let d = t_cd - c;
            (k[0] * (x * c - a * d / kk1), k[1] * (a * d - y * c / kk2))
        };
        // A between t_ac − t_cd (d = 0) and t_ac (c = 0): bisection on v1 − v2.
        let (mut lo, mut hi) = ((t_ac - t_cd).max(0.0), t_ac);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            let (v1, v2) = rates(mid);
            if v1 - v2 > 0.0 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        let a = 0.5 * (lo + hi);
        (a, rates(a).0)
    };
    let k0 = [1.0, 0.5];
    let (a_ss, j) = steady(k0);
    assert!(j > 0.0);
    let c = t_ac - a_ss;
    let d = t_cd - c;
    let comps = vec![
        ("x".to_string(), x, None),
        ("y".to_string(), y, None),
        ("a".to_string(), a_ss, None),
        ("c".to_string(), c, None),
        ("d".to_string(), d, None),
    ];
    let dg0 = |k: f64| -rt25() * k.ln();
    let text = file(
        &comps,
        &[
            ("s1".into(), "x + c -> a + d".into(), dg0(kk1)),
            ("s2".into(), "a + d -> y + c".into(), dg0(kk2)),
        ],
    );
    let a = analyze(&prepare_str(&text, "carriers.toml"));
    assert_eq!(a.control_estimate.model.as_ref().unwrap().independent(), 1);
    let cc = coefficients(&a);
    let h = 1e-6;
    for i in 0..2 {
        let (mut up, mut down) = (k0, k0);
        up[i] *= 1.0 + h;
        down[i] *= 1.0 - h;
        let fd = (steady(up).1.ln() - steady(down).1.ln()) / ((1.0 + h).ln() - (1.0 - h).ln());
        close(cc[i], fd, 1e-6);
    }
}

#[test]
fn a_step_that_cannot_run_forward_gives_no_estimate_and_a_note() {
    let one = |id: &str| (id.to_string(), 1e-3, None);
    let text = file(
        &[one("x0"), one("a"), one("b"), one("x3")],
        &[
            ("s1".into(), "x0 -> a".into(), -10e3),
            ("s2".into(), "a -> b".into(), 2e3),
            ("s3".into(), "b -> x3".into(), -20e3),
        ],
    );
    let mut a = analyze(&prepare_str(&text, "up.toml"));
    assert!(a.control_estimate.coefficients.is_none());
    assert!(
        a.notes
            .iter()
            .any(|n| n.contains("no flux control estimate") && n.contains("s2")),
        "{:?}",
        a.notes
    );
    mca::add_ranges(&mut a, 100);
    assert!(a.control_estimate.ranges.is_none());
    assert_eq!(a.control_estimate.range(0), None);
}

#[test]
fn the_range_is_reproducible_and_well_formed() {
    let one = |id: &str| (id.to_string(), 1e-3, None);
    let text = file(
        &[one("x0"), one("a"), one("b"), one("c"), one("x4")],
        &[
            ("s1".into(), "x0 -> a".into(), -3e3),
            ("s2".into(), "a -> b".into(), -15e3),
            ("s3".into(), "b -> c".into(), -1e3),
            ("s4".into(), "c -> x4".into(), -8e3),
        ],
    );
    let prep = prepare_str(&text, "range.toml");
    let mut a1 = analyze(&prep);
    let mut a2 = analyze(&prep);
    mca::add_ranges(&mut a1, mca::DEFAULT_DRAWS);
    mca::add_ranges(&mut a2, mca::DEFAULT_DRAWS);
    let r = a1.control_estimate.ranges.clone().expect("a range");
    assert_eq!(Some(&r), a2.control_estimate.ranges.as_ref());
    assert_eq!(a1.control_estimate.draws, mca::DEFAULT_DRAWS);
    for &(lo, hi) in &r {
        assert!(lo.is_finite() && hi.is_finite() && 0.0 <= lo && lo <= hi && hi <= 1.0);
    }
    // Saturation only lowers elasticities: ranges are not all points.
    assert!(r.iter().any(|(lo, hi)| hi - lo > 0.01), "{r:?}");
    // The far step s2 (−15 kJ/mol) is nearly blind to its product, so the
    // steps after it carry little control at mass action [C, closed form:
    // N = (3.14, 1.33, 0.0010, 0.0020) up to a factor].
    let c = coefficients(&a1);
    assert!(c[2] < 0.001 && c[3] < 0.001 && c[0] > c[1], "{c:?}");
}

/// A random route: a main chain c0 -> c1 -> ... whose steps are plain,
/// double (c -> 2 c'), carrier-coupled (with atp/adp currencies) or splits
/// (c -> c' + e, then e -> c'), with a target dG' per step; the file's dg0 is
/// chosen so each step has that dG' at the file's concentrations.
#[derive(Debug, Clone)]
struct Gen {
    kinds: Vec<u8>,
    dg: Vec<f64>,
    conc: Vec<f64>,
}

fn gen_route() -> impl Strategy<Value = Gen> {
    (1usize..9).prop_flat_map(|n| {
        (
            prop::collection::vec(0u8..4, n),
            prop::collection::vec(-30e3f64..-0.05e3, 2 * n),
            prop::collection::vec(-11.0f64..-4.0, 2 * n + 3),
        )
            .prop_map(|(kinds, dg, conc)| Gen {
                kinds,
                dg,
                conc: conc.iter().map(|l| l.exp()).collect(),
            })
    })
}

fn write_gen(g: &Gen) -> String {
    let n = g.kinds.len();
    let mut comps: Vec<(String, f64, Option<&str>)> = Vec::new();
    let mut ci = 0;
    let mut conc = |id: String, role: Option<&'static str>| {
        let c = g.conc[ci % g.conc.len()];
        ci += 1;
        (id, c, role)
    };
    comps.push(conc("atp".into(), Some("currency")));
    comps.push(conc("adp".into(), Some("currency")));
    for i in 0..=n {
        comps.push(conc(format!("c{i}"), None));
    }
    for i in 0..n {
        if g.kinds[i] == 3 {
            comps.push(conc(format!("e{i}"), None));
        }
    }
    let lnc = |id: &str| comps.iter().find(|c| c.0 == id).unwrap().1.ln();
    let mut steps = Vec::new();
    let mut k = 0;
    let mut add = |id: String, left: Vec<(f64, String)>, right: Vec<(f64, String)>| {
        let ln_q: f64 = right.iter().map(|(nu, c)| nu * lnc(c)).sum::<f64>()
            - left.iter().map(|(nu, c)| nu * lnc(c)).sum::<f64>();
        let side = |v: &[(f64, String)]| {
            v.iter()
                .map(|(nu, c)| format!("{nu} {c}"))
                .collect::<Vec<_>>()
                .join(" + ")
        };
        let dg0 = g.dg[k] - rt25() * ln_q;
        k += 1;
        steps.push((id, format!("{} -> {}", side(&left), side(&right)), dg0));
    };
    for i in 0..n {
        let (a, b) = (format!("c{i}"), format!("c{}", i + 1));
        match g.kinds[i] {
            0 => add(format!("s{i}"), vec![(1.0, a)], vec![(1.0, b)]),
            1 => add(format!("s{i}"), vec![(1.0, a)], vec![(2.0, b)]),
            2 => add(
                format!("s{i}"),
                vec![(1.0, a), (1.0, "atp".into())],
                vec![(1.0, b), (1.0, "adp".into())],
            ),
            _ => {
                let e = format!("e{i}");
                add(
                    format!("s{i}"),
                    vec![(1.0, a)],
                    vec![(1.0, b.clone()), (1.0, e.clone())],
                );
                add(format!("t{i}"), vec![(1.0, e)], vec![(1.0, b)]);
            }
        }
    }
    file(&comps, &steps)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]

    /// Summation theorem: the coefficients sum to 1 on random routes with
    /// turns, splits and carriers; chains agree with the matrix method, with
    /// and without saturation; every range holds its step between 0 and 1.
    #[test]
    fn coefficients_sum_to_one(g in gen_route(), sat in prop::collection::vec((0.0f64..1.0, 0.0f64..1.0), 24)) {
        let text = write_gen(&g);
        let prep = prepare_str(&text, "random.toml");
        let mut a = analyze(&prep);
        let c = coefficients(&a);
        prop_assert_eq!(c.len(), a.steps.len());
        prop_assert!((c.iter().sum::<f64>() - 1.0).abs() < 1e-9, "{:?}", c);
        let model = a.control_estimate.model.clone().unwrap();
        // A split before the last step makes a compound with two makers; at
        // the last step its product is an output, so the route stays a chain.
        let n = g.kinds.len();
        prop_assert_eq!(model.is_chain(), !g.kinds[..n - 1].contains(&3));
        let m = model.matrix_method(None).unwrap();
        for (x, y) in c.iter().zip(&m) {
            prop_assert!((x - y).abs() < 1e-9, "{:?} vs {:?}", c, m);
        }
        // Saturation on the triangle θ_S + θ_P < 1.
        let sat: Vec<(f64, f64)> = sat
            .iter()
            .take(c.len())
            .map(|&(x, y)| if x + y < 1.0 { (x, y) } else { (1.0 - x, 1.0 - y) })
            .collect();
        let cs = model.coefficients(Some(&sat)).unwrap();
        let ms = model.matrix_method(Some(&sat)).unwrap();
        prop_assert!((cs.iter().sum::<f64>() - 1.0).abs() < 1e-9);
        for (x, y) in cs.iter().zip(&ms) {
            prop_assert!((x - y).abs() < 1e-8, "{:?} vs {:?}", cs, ms);
        }
        mca::add_ranges(&mut a, 200);
        for (lo, hi) in a.control_estimate.ranges.clone().unwrap() {
            prop_assert!(-1e-12 <= lo && lo <= hi && hi <= 1.0 + 1e-12);
        }
    }
}

/// A chain whose first step is moderately displaced (−8 kJ/mol, no
/// verdict) and hardly feels its product, before the control point (−20):
/// the estimate puts nearly all control on the first step [C, closed form:
/// C1/C2 = ε2,S/(−ε1,P) ≈ 1.0/0.041], and a note says the two disagree.
#[test]
fn a_sentence_says_when_the_verdict_and_the_estimate_disagree() {
    let one = |id: &str| (id.to_string(), 1e-3, None);
    let text = file(
        &[one("x0"), one("a"), one("b"), one("c"), one("x4")],
        &[
            ("s1".into(), "x0 -> a".into(), -8e3),
            ("s2".into(), "a -> b".into(), -20e3),
            ("s3".into(), "b -> c".into(), -5e3),
            ("s4".into(), "c -> x4".into(), -3e3),
        ],
    );
    let prep = prepare_str(&text, "disagree.toml");
    let a = analyze(&prep);
    assert_eq!(a.control[0].position, 1, "s2 is the control point");
    let c = coefficients(&a);
    let rho = |g: f64| (g / rt25()).exp();
    let ratio = (1.0 / (1.0 - rho(-20e3))) / (rho(-8e3) / (1.0 - rho(-8e3)));
    close(c[0] / c[1], ratio, 1e-9 * ratio);
    assert!(c[0] > 0.9 && c[1] < 0.05, "{c:?}");
    let said: Vec<&String> = a.notes.iter().filter(|n| n.contains("disagree")).collect();
    assert_eq!(said.len(), 1, "{:?}", a.notes);
    assert!(
        said[0].contains("control point s2") && said[0].contains("s1, a step without a verdict"),
        "{}",
        said[0]
    );
    // The detail explains s1's share against s2 by their elasticities.
    let lines = mca::explain(&prep.pathway, &a, 0);
    assert!(
        lines[0].starts_with(&format!("flux control (estimate): {:.3}", c[0])),
        "{lines:?}"
    );
    assert!(
        lines[1].contains("a -0.041") || lines[1].contains("a −0.041"),
        "{lines:?}"
    );
    assert!(lines[2].contains(&format!("{ratio:.3} times")), "{lines:?}");
}

/// The binary on tests/data/chain.toml (worked in tests/cli.rs: dG' = −10.708010
/// and −3.708010 kJ/mol at 25 °C): two steps, C1 = ε2,S / (ε2,S − ε1,P)
/// [C, closed form of science.md §7].
#[test]
fn report_formats_carry_the_estimate_and_its_range() {
    let c = crate::support::path("data/chain.toml");
    let c = c.to_str().unwrap();
    let out = crate::support::run(&["report", c, "--format", "json"]);
    let (so, err) = crate::support::texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    let again = crate::support::run(&["report", c, "--format", "json"]);
    assert_eq!(
        so,
        String::from_utf8_lossy(&again.stdout),
        "two runs, same JSON"
    );
    let d: serde_json::Value = serde_json::from_str(&so).unwrap();
    let rho = |g: f64| (g * 1e3 / rt25()).exp();
    let (r1, r2) = (rho(-10.708010), rho(-3.708010));
    let c1 = (1.0 / (1.0 - r2)) / (1.0 / (1.0 - r2) + r1 / (1.0 - r1));
    let steps = d["steps"].as_array().unwrap();
    close(steps[0]["control_coefficient"].as_f64().unwrap(), c1, 1e-6);
    close(
        steps[1]["control_coefficient"].as_f64().unwrap(),
        1.0 - c1,
        1e-6,
    );
    for s in steps {
        let r = s["control_coefficient_range"].as_array().unwrap();
        let (lo, hi) = (r[0].as_f64().unwrap(), r[1].as_f64().unwrap());
        assert!(0.0 <= lo && lo <= hi && hi <= 1.0, "{r:?}");
    }
    // Fewer draws: another (still well-formed) range; the estimate itself is the same.
    let few = crate::support::run(&["report", c, "--format", "json", "--draws", "50"]);
    let f: serde_json::Value = serde_json::from_slice(&few.stdout).unwrap();
    assert_eq!(
        f["steps"][0]["control_coefficient"],
        d["steps"][0]["control_coefficient"]
    );
    assert_ne!(
        f["steps"][0]["control_coefficient_range"],
        d["steps"][0]["control_coefficient_range"]
    );
    let bad = crate::support::run(&["report", c, "--draws", "0"]);
    assert_eq!(bad.status.code(), Some(2), "--draws 0 is a usage error");
    // Table, Markdown and CSV show it too.
    // Three significant figures in the table and Markdown.
    let c1_text = dgpath::present::fig3(c1);
    let (t, _) = crate::support::texts(&crate::support::run(&["report", c]));
    assert!(t.contains("control") && t.contains(&c1_text), "{t}");
    assert!(
        t.contains(&format!("flux control estimate {c1_text}")),
        "{t}"
    );
    let (m, _) = crate::support::texts(&crate::support::run(&["report", c, "--format", "md"]));
    assert!(
        m.contains("| control | control 5–95 % |") && m.contains(&c1_text),
        "{m}"
    );
    let (v, _) = crate::support::texts(&crate::support::run(&["report", c, "--format", "csv"]));
    let mut rd = csv::Reader::from_reader(v.as_bytes());
    let head = rd.headers().unwrap().clone();
    let col = head
        .iter()
        .position(|h| h == "control_coefficient")
        .unwrap();
    let row = rd.records().next().unwrap().unwrap();
    close(row[col].parse::<f64>().unwrap(), c1, 1e-6);
    // A backward step (c raised 1000-fold: s2 at +13.4 kJ/mol): null and a note.
    let up = crate::support::run(&["report", c, "--format", "json", "--set", "c=10mM"]);
    let u: serde_json::Value = serde_json::from_slice(&up.stdout).unwrap();
    for s in u["steps"].as_array().unwrap() {
        assert!(s["control_coefficient"].is_null() && s["control_coefficient_range"].is_null());
    }
    assert!(
        u["notes"]
            .as_array()
            .unwrap()
            .iter()
            .any(|n| n.as_str().unwrap().contains("no flux control estimate: s2")),
        "{}",
        u["notes"]
    );
}

/// The samples summary carries the median estimate per step; a sample with
/// a backward step has none and is counted out.
#[test]
fn samples_summary_has_the_median_estimate() {
    let dir = tempfile::tempdir().unwrap();
    let table = dir.path().join("s.csv");
    // b as in the file, ten times lower, and c so high that s2 runs backward.
    std::fs::write(
        &table,
        "sample,b [mM],c [mM]\nt1,0.1,0.01\nt2,0.01,0.001\nt3,0.1,10\n",
    )
    .unwrap();
    let c = crate::support::path("data/chain.toml");
    let out = crate::support::run(&[
        "report",
        c.to_str().unwrap(),
        "--samples",
        table.to_str().unwrap(),
        "--format",
        "json",
    ]);
    let (so, err) = crate::support::texts(&out);
    assert_eq!(out.status.code(), Some(0), "{err}");
    let d: serde_json::Value = serde_json::from_str(&so).unwrap();
    // Each sample's steps carry their own estimate (null for t3).
    let per = d["samples"].as_array().unwrap();
    assert!(per[0]["steps"][0]["control_coefficient"].is_number());
    assert!(per[2]["steps"][0]["control_coefficient"].is_null());
    let s1 = &d["summary"]["steps"][0];
    assert_eq!(s1["control_samples"], 2);
    // Median of two values is their mean; t1 is the file's state (worked in
    // tests/cli.rs), t2 has b and c ten times lower: s1 −10.708 − 5.708, s2 −3.708.
    let rho = |g: f64| (g * 1e3 / rt25()).exp();
    let c1 = |g1: f64, g2: f64| {
        let (r1, r2) = (rho(g1), rho(g2));
        (1.0 / (1.0 - r2)) / (1.0 / (1.0 - r2) + r1 / (1.0 - r1))
    };
    let want = 0.5 * (c1(-10.708010, -3.708010) + c1(-16.416020, -3.708010));
    close(
        s1["control_coefficient_median"].as_f64().unwrap(),
        want,
        1e-6,
    );
    let t = crate::support::run(&[
        "report",
        c.to_str().unwrap(),
        "--samples",
        table.to_str().unwrap(),
    ]);
    let (t, _) = crate::support::texts(&t);
    assert!(
        t.contains("median control") && t.contains(&format!("{want:.3} (2)")),
        "{t}"
    );
}

/// The explorer computes the range between keys, in parts, and gets the
/// same numbers as the report; an edit starts it again; the step list shows
/// a bar and the detail the estimate with its range.
#[test]
fn the_explorer_shows_the_estimate_and_fills_in_the_range_between_keys() {
    use dgpath::tui::app::{App, IDLE_DRAWS, Options, Source};
    use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("pathways/succinate.toml");
    let text = std::fs::read_to_string(&path).unwrap();
    let prep = prepare_str(&text, "succinate.toml");
    let state = dgpath::scenario::State::from_pathway(&prep.pathway);
    let src = Source {
        path: None,
        name: "succinate.toml".into(),
        text: text.clone(),
    };
    let opts = Options {
        ascii: false,
        color: false,
        unit: dgpath::present::EnergyUnit::KJ,
    };
    let draws = 3 * IDLE_DRAWS + 7;
    let mut app = App::new(prep.clone(), state, src, opts)
        .unwrap()
        .with_draws(draws);
    assert!(app.busy() && app.analysis.control_estimate.coefficients.is_some());
    // A tall screen, so the detail shows everything below the verdict.
    let screen =
        |app: &App| dgpath::tui::export::to_text(&dgpath::tui::export::render_buffer(app, 120, 70));
    let first = screen(&app);
    let c0 = app.analysis.control_estimate.coefficient(0).unwrap();
    assert!(
        first.contains("◆ control") && first.contains(&format!("point  ctrl {c0:.3}")),
        "{first}"
    );
    assert!(
        screen(&app).contains("range: computing"),
        "{}",
        screen(&app)
    );
    let mut calls = 0;
    while app.busy() {
        app.idle_work();
        calls += 1;
        assert!(calls < 100);
    }
    assert_eq!(calls, 4, "three full parts and a short one");
    let mut fresh = analyze(&prep);
    mca::add_ranges(&mut fresh, draws);
    assert_eq!(
        app.analysis.control_estimate.ranges,
        fresh.control_estimate.ranges
    );
    let shown = screen(&app);
    let (lo, hi) = fresh.control_estimate.range(0).unwrap();
    assert!(
        shown.contains(&format!(
            "flux control (estimate): {c0:.3}, 5–95 % {lo:.3}–{hi:.3}"
        )),
        "{shown}"
    );
    assert!(shown.chars().any(|ch| "▁▂▃▄▅▆▇█".contains(ch)), "{shown}");
    // An edit of a concentration recomputes the estimate and asks for the range again.
    app.handle_key(KeyEvent::new(KeyCode::Tab, KeyModifiers::NONE));
    app.handle_key(KeyEvent::new(KeyCode::Char('>'), KeyModifiers::NONE));
    assert!(app.busy());
    app.finish_idle_work();
    assert!(!app.busy() && app.analysis.control_estimate.ranges.is_some());
}

/// A long route with splits (150 blocks c -> e + f, e -> f, 2 f -> c', so
/// 449 intermediates, past the dense limit) is solved as a banded system:
/// the coefficients sum to 1, and the range is left out with a note.
#[test]
fn a_long_route_with_splits_gets_an_estimate() {
    let k = 150;
    let mut comps: Vec<(String, f64, Option<&str>)> = Vec::new();
    for i in 0..=k {
        comps.push((format!("c{i}"), 1e-3, None));
    }
    for i in 0..k {
        comps.push((format!("e{i}"), 1e-3, None));
        comps.push((format!("f{i}"), 1e-3, None));
    }
    let rt = rt25();
    let ln_mm = (1e-3f64).ln();
    let mut steps = Vec::new();
    for i in 0..k {
        // Invented dG' targets between −0.5 and −8 kJ/mol; dg0 = dG' − RT ln Q at 1 mM.
        let dg = |j: usize| -500.0 - ((3 * i + j) * 37 % 75) as f64 * 100.0;
        steps.push((
            format!("a{i}"),
            format!("c{i} -> e{i} + f{i}"),
            dg(0) - rt * ln_mm,
        ));
        steps.push((format!("b{i}"), format!("e{i} -> f{i}"), dg(1)));
        steps.push((
            format!("d{i}"),
            format!("2 f{i} -> c{}", i + 1),
            dg(2) + rt * ln_mm,
        ));
    }
    let prep = prepare_str(&file(&comps, &steps), "long.toml");
    let mut a = analyze(&prep);
    for s in &a.steps {
        close(s.times, 1.0, 1e-12);
        assert!(s.dg < 0.0);
    }
    let model = a.control_estimate.model.clone().unwrap();
    assert!(
        !model.is_chain() && model.vars.len() == 3 * k - 1 && model.vars.len() > mca::DENSE_MAX
    );
    let c = coefficients(&a);
    close(c.iter().sum::<f64>(), 1.0, 1e-9);
    assert!(
        c.iter().all(|x| (-1e-12..=1.0 + 1e-12).contains(x)),
        "{c:?}"
    );
    mca::add_ranges(&mut a, 100);
    assert!(a.control_estimate.ranges.is_none());
    assert!(
        a.notes
            .iter()
            .any(|n| n.starts_with("no range for the flux control estimate"))
    );
}

/// A chain too long for the default draws within the memory bound gets a
/// range from fewer draws, and a note says how many.
#[test]
fn a_long_chain_gets_a_range_from_fewer_draws() {
    let n = 200;
    let comps: Vec<(String, f64, Option<&str>)> =
        (0..=n).map(|i| (format!("c{i}"), 1e-3, None)).collect();
    // Invented dG' between −0.5 and −8 kJ/mol (1:1 steps at equal concentrations: dG' = dG'°).
    let steps: Vec<(String, String, f64)> = (0..n)
        .map(|i| {
            (
                format!("s{i}"),
                format!("c{i} -> c{}", i + 1),
                -500.0 - (i * 37 % 75) as f64 * 100.0,
            )
        })
        .collect();
    let prep = prepare_str(&file(&comps, &steps), "chain200.toml");
    let mut a = analyze(&prep);
    mca::add_ranges(&mut a, mca::DEFAULT_DRAWS);
    let used = mca::RANGE_MAX_VALUES / n;
    assert!(used < mca::DEFAULT_DRAWS);
    assert_eq!(a.control_estimate.draws, used);
    assert_eq!(a.control_estimate.ranges.as_ref().map(Vec::len), Some(n));
    assert!(
        a.notes.iter().any(|t| t.contains(&format!(
            "comes from {used} draws, not {}",
            mca::DEFAULT_DRAWS
        ))),
        "{:?}",
        a.notes
    );
}
