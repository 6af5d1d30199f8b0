//! Properties that hold for every pathway, checked on random ones: random
//! linear chains and small branched routes are written as pathway-file text,
//! loaded like any user's file and analysed. Each property is a law of the
//! thermodynamics or of the file format, so no expected numbers are needed:
//! running a route backward twice gives it back, backward flips every dG',
//! a coupled group is the sum of its reactions, units do not change values,
//! turns scale with the stated anchor, and printed quantities read back.

use dgpath::analysis::{self, Analysis, Direction, Prepared};
use dgpath::model::units::{self, Kind};
use dgpath::model::{self};
use dgpath::scenario::State;
use proptest::prelude::*;

/// Relative closeness with an absolute floor (energies in J/mol, turns).
fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1.0)
}

#[derive(Debug, Clone)]
struct Compound {
    id: String,
    /// The TOML value of `conc`, as written (None for the solvent).
    conc: Option<String>,
    role: Option<&'static str>,
}

#[derive(Debug, Clone)]
struct Step {
    id: String,
    left: Vec<(f64, usize)>,
    right: Vec<(f64, usize)>,
    /// kJ/mol at the reference conditions.
    dg0: f64,
    protons: f64,
    times: Option<f64>,
    couple: Option<String>,
}

#[derive(Debug, Clone)]
struct Spec {
    temp_c: f64,
    ph: f64,
    compounds: Vec<Compound>,
    steps: Vec<Step>,
}

/// One step's random choices; `build` turns a list of them into a route.
#[derive(Debug, Clone)]
struct Choice {
    pick: usize,
    coef_in: f64,
    n_out: usize,
    coef_out: [f64; 2],
    fresh_input: bool,
    currency: u8,
    water: u8,
    dg0: f64,
    protons: f64,
}

const ATP: usize = 0;
const ADP: usize = 1;
const H2O: usize = 2;

/// A route where every step consumes one compound made by an earlier step
/// (the latest one for a chain, any one for a branched route), so the mass
/// balance always has a positive solution; steps may also take a fresh
/// input, swap ATP/ADP and take up or give off water.
fn build(choices: &[Choice], branched: bool, temp_c: f64, ph: f64, log_conc: &[f64]) -> Spec {
    let conc = |i: usize| {
        Some(format!(
            "\"{:e} M\"",
            10f64.powf(log_conc[i % log_conc.len()])
        ))
    };
    let mut compounds = vec![
        Compound {
            id: "atp".into(),
            conc: conc(0),
            role: Some("currency"),
        },
        Compound {
            id: "adp".into(),
            conc: conc(1),
            role: Some("currency"),
        },
        Compound {
            id: "h2o".into(),
            conc: None,
            role: Some("solvent"),
        },
    ];
    let fresh = |compounds: &mut Vec<Compound>| {
        let i = compounds.len();
        compounds.push(Compound {
            id: format!("x{}", i - 3),
            conc: conc(i),
            role: None,
        });
        i
    };
    let mut avail: Vec<usize> = Vec::new();
    let mut steps = Vec::new();
    for (k, ch) in choices.iter().enumerate() {
        let consumed = if avail.is_empty() {
            fresh(&mut compounds)
        } else if branched {
            avail.remove(ch.pick % avail.len())
        } else {
            avail.pop().unwrap_or(0)
        };
        let mut left = vec![(ch.coef_in, consumed)];
        if ch.fresh_input && k > 0 {
            left.push((1.0, fresh(&mut compounds)));
        }
        let mut right = Vec::new();
        for &coef in ch.coef_out.iter().take(if branched { ch.n_out } else { 1 }) {
            let c = fresh(&mut compounds);
            right.push((coef, c));
            avail.push(c);
        }
        match ch.currency {
            1 => {
                left.push((1.0, ATP));
                right.push((1.0, ADP));
            }
            2 => {
                left.push((1.0, ADP));
                right.push((1.0, ATP));
            }
            _ => {}
        }
        match ch.water {
            1 => left.push((1.0, H2O)),
            2 => right.push((1.0, H2O)),
            _ => {}
        }
        steps.push(Step {
            id: format!("s{k}"),
            left,
            right,
            dg0: ch.dg0,
            protons: ch.protons,
            times: None,
            couple: None,
        });
    }
    Spec {
        temp_c,
        ph,
        compounds,
        steps,
    }
}

impl Spec {
    fn side(&self, terms: &[(f64, usize)]) -> String {
        terms
            .iter()
            .map(|&(c, i)| format!("{c} {}", self.compounds[i].id))
            .collect::<Vec<_>>()
            .join(" + ")
    }

    /// The pathway file for this spec.
    fn toml(&self) -> String {
        let mut s = format!(
            "format = 1\n[pathway]\nname = \"random route\"\n[conditions]\ntemperature = \"{} C\"\nph = {}\n[compounds]\n",
            self.temp_c, self.ph
        );
        for c in &self.compounds {
            let mut fields = Vec::new();
            if let Some(v) = &c.conc {
                fields.push(format!("conc = {v}"));
            }
            if let Some(r) = c.role {
                fields.push(format!("role = \"{r}\""));
            }
            s.push_str(&format!("{} = {{ {} }}\n", c.id, fields.join(", ")));
        }
        for st in &self.steps {
            s.push_str(&format!(
                "[[steps]]\nid = \"{}\"\nreaction = \"{} -> {}\"\ndg0 = \"{} kJ/mol\"\nprotons = {:?}\n",
                st.id,
                self.side(&st.left),
                self.side(&st.right),
                st.dg0,
                st.protons
            ));
            if let Some(t) = st.times {
                s.push_str(&format!("times = {t:?}\n"));
            }
            if let Some(c) = &st.couple {
                s.push_str(&format!("couple = \"{c}\"\n"));
            }
        }
        s
    }

    /// The route run backward, written as a forward pathway: steps in
    /// reverse order, sides swapped, dg0 and protons negated.
    fn reversed(&self) -> Spec {
        let steps = self
            .steps
            .iter()
            .rev()
            .map(|s| Step {
                left: s.right.clone(),
                right: s.left.clone(),
                dg0: -s.dg0,
                protons: -s.protons,
                couple: None,
                ..s.clone()
            })
            .collect();
        Spec {
            steps,
            ..self.clone()
        }
    }
}

fn prepared(text: &str) -> Prepared {
    let p = model::load_str(text, "random.toml")
        .unwrap_or_else(|e| panic!("{e}\n--- file ---\n{text}"));
    analysis::prepare(p).unwrap_or_else(|e| panic!("{e}\n--- file ---\n{text}"))
}

fn analyse(prep: &Prepared, direction: Direction) -> Analysis {
    let mut state = State::from_pathway(&prep.pathway);
    state.direction = direction;
    analysis::analyze(prep, &state).unwrap_or_else(|e| panic!("{e}"))
}

/// (step id, turns, dG'° as run, dG' per turn) along the route.
fn rows(prep: &Prepared, a: &Analysis) -> Vec<(String, f64, f64, f64)> {
    a.steps
        .iter()
        .map(|s| (prep.pathway.steps[s.step].id.clone(), s.times, s.dg0, s.dg))
        .collect()
}

fn choice() -> impl Strategy<Value = Choice> {
    (
        any::<usize>(),
        1u8..=3,
        1usize..=2,
        (1u8..=3, 1u8..=3),
        any::<bool>(),
        0u8..3,
        0u8..3,
        -40.0f64..40.0,
        -2i8..=2,
    )
        .prop_map(
            |(pick, ci, n_out, (o1, o2), fresh_input, currency, water, dg0, protons)| Choice {
                pick,
                coef_in: ci as f64,
                n_out,
                coef_out: [o1 as f64, o2 as f64],
                fresh_input,
                currency,
                water,
                dg0,
                protons: protons as f64,
            },
        )
}

/// A random chain or branched route of 1–6 steps at 20–40 °C, pH 6–8,
/// concentrations 1 µM–100 mM.
fn spec(branched: impl Strategy<Value = bool>) -> impl Strategy<Value = Spec> {
    (
        branched,
        prop::collection::vec(choice(), 1..=6),
        20.0f64..40.0,
        6.0f64..8.0,
        prop::collection::vec(-6.0f64..-1.0, 8),
    )
        .prop_map(|(b, ch, t, ph, lc)| build(&ch, b, t, ph, &lc))
}

const CASES: u32 = 256;

proptest! {
    #![proptest_config(ProptestConfig::with_cases(CASES))]

    /// Reversing twice is the identity: the reverse route of the reversed
    /// pathway runs the original steps in the original order with the same
    /// dG' per turn, turns in the same proportions, and the same total.
    #[test]
    fn reversing_twice_is_the_identity(s in spec(any::<bool>())) {
        let p = prepared(&s.toml());
        let fwd = analyse(&p, Direction::Forward);
        let rr_prep = prepared(&s.reversed().toml());
        let rr = analyse(&rr_prep, Direction::Reverse);
        let (a, b) = (rows(&p, &fwd), rows(&rr_prep, &rr));
        prop_assert_eq!(a.len(), b.len());
        let scale = b[0].1 / a[0].1;
        for (x, y) in a.iter().zip(&b) {
            prop_assert_eq!(&x.0, &y.0);
            prop_assert!(close(x.2, y.2, 1e-9), "dG'° of {}: {} vs {}", x.0, x.2, y.2);
            prop_assert!(close(x.3, y.3, 1e-9), "dG' of {}: {} vs {}", x.0, x.3, y.3);
            prop_assert!(close(y.1, scale * x.1, 1e-9), "turns of {}: {} vs {} × {}", x.0, y.1, scale, x.1);
        }
        prop_assert!(close(rr.total_dg, scale * fwd.total_dg, 1e-9), "{} vs {} × {}", rr.total_dg, scale, fwd.total_dg);
        for (x, y) in fwd.steps.iter().zip(&rr.steps) {
            prop_assert_eq!(x.class, y.class);
        }
    }

    /// Running a route backward (no bypasses) visits the steps in reverse
    /// order with the same turns and flips every dG'°, dG' and both totals.
    #[test]
    fn reversing_flips_every_energy_and_the_total(s in spec(any::<bool>())) {
        let p = prepared(&s.toml());
        let fwd = analyse(&p, Direction::Forward);
        let rev = analyse(&p, Direction::Reverse);
        let n = fwd.steps.len();
        prop_assert_eq!(rev.steps.len(), n);
        for (k, r) in rev.steps.iter().enumerate() {
            let f = &fwd.steps[n - 1 - k];
            prop_assert_eq!(r.step, f.step);
            prop_assert_eq!(r.sign, -1.0);
            prop_assert!(close(r.times, f.times, 1e-9), "turns {} vs {}", r.times, f.times);
            prop_assert!(close(r.dg0, -f.dg0, 1e-12), "dG'° {} vs {}", r.dg0, f.dg0);
            prop_assert!(close(r.dg, -f.dg, 1e-12), "dG' {} vs {}", r.dg, f.dg);
            prop_assert!(close(r.ln_q, -f.ln_q, 1e-12));
        }
        prop_assert!(close(rev.total_dg, -fwd.total_dg, 1e-9), "{} vs {}", rev.total_dg, fwd.total_dg);
        prop_assert!(close(rev.total_dg0, -fwd.total_dg0, 1e-9));
        for (c, amount) in &fwd.net {
            let back = rev.net.iter().find(|(cc, _)| cc == c).map(|x| x.1);
            prop_assert!(back.is_some_and(|b| close(b, -amount, 1e-9)), "net of compound {}: {} vs {:?}", c, amount, back);
        }
    }

    /// A coupled pair's group dG' equals the dG' of the summed reaction
    /// written as a one-step pathway (dg0 and protons added).
    #[test]
    fn coupled_group_is_the_summed_reaction(s in spec(Just(false)), at in any::<prop::sample::Index>()) {
        prop_assume!(s.steps.len() >= 2);
        let mut s = s;
        let i = at.index(s.steps.len() - 1);
        // Equal turns: the second step takes exactly what the first makes.
        let made = s.steps[i].right[0];
        s.steps[i + 1].left[0] = made;
        s.steps[i].couple = Some(s.steps[i + 1].id.clone());
        let p = prepared(&s.toml());
        let fwd = analyse(&p, Direction::Forward);
        prop_assert_eq!(fwd.groups.len(), 1);
        let g = &fwd.groups[0];
        prop_assert_eq!(&g.members, &vec![i, i + 1]);

        let mut net: Vec<f64> = vec![0.0; s.compounds.len()];
        for st in &s.steps[i..=i + 1] {
            for &(x, c) in &st.left { net[c] -= x; }
            for &(x, c) in &st.right { net[c] += x; }
        }
        let pick = |pos: bool| -> Vec<(f64, usize)> {
            net.iter().enumerate().filter(|(_, v)| if pos { **v > 0.0 } else { **v < 0.0 }).map(|(c, v)| (v.abs(), c)).collect()
        };
        let sum = Step {
            id: "sum".into(),
            left: pick(false),
            right: pick(true),
            dg0: s.steps[i].dg0 + s.steps[i + 1].dg0,
            protons: s.steps[i].protons + s.steps[i + 1].protons,
            times: None,
            couple: None,
        };
        let one = Spec { steps: vec![sum], ..s.clone() };
        let q = prepared(&one.toml());
        let a = analyse(&q, Direction::Forward);
        prop_assert!(close(a.steps[0].dg, g.dg, 1e-9), "summed {} vs group {}", a.steps[0].dg, g.dg);
        prop_assert!(close(a.steps[0].dg0, fwd.steps[i].dg0 + fwd.steps[i + 1].dg0, 1e-9));
    }

    /// A concentration written in M, mM, µM, nM or as a bare number (mM)
    /// gives the same results (values from 10 nM to 1 M, inside the limits).
    #[test]
    fn the_unit_of_a_concentration_changes_nothing(
        s in spec(any::<bool>()),
        which in any::<prop::sample::Index>(),
        mantissa in 1u32..100_000,
        exp in -5i32..=-2,
    ) {
        let mut s = s;
        let solutes: Vec<usize> = (0..s.compounds.len()).filter(|&c| s.compounds[c].conc.is_some()).collect();
        let c = solutes[which.index(solutes.len())];
        let variants = [
            format!("\"{mantissa}e{exp} mM\""),
            format!("\"{mantissa}e{} M\"", exp - 3),
            format!("\"{mantissa}e{}uM\"", exp + 3),
            format!("\"{mantissa}e{} µM\"", exp + 3),
            format!("\"{mantissa}e{} nM\"", exp + 6),
            format!("{mantissa}e{exp}"),
        ];
        let mut first: Option<(Vec<f64>, Analysis)> = None;
        for v in &variants {
            s.compounds[c].conc = Some(v.clone());
            let p = prepared(&s.toml());
            let a = analyse(&p, Direction::Forward);
            let conc = p.pathway.file_concentrations();
            match &first {
                None => first = Some((conc, a)),
                Some((c0, a0)) => {
                    for (x, y) in c0.iter().zip(&conc) {
                        prop_assert!((x - y).abs() <= 1e-14 * x.abs(), "{} written {}: {} vs {}", s.compounds[c].id, v, x, y);
                    }
                    for (x, y) in a0.steps.iter().zip(&a.steps) {
                        prop_assert!(close(x.dg, y.dg, 1e-12), "{}: dG' {} vs {}", v, x.dg, y.dg);
                        prop_assert_eq!(x.class, y.class);
                    }
                    prop_assert!(close(a0.total_dg, a.total_dg, 1e-12));
                    prop_assert_eq!(
                        a0.control.iter().map(|v| (v.position, v.kind)).collect::<Vec<_>>(),
                        a.control.iter().map(|v| (v.position, v.kind)).collect::<Vec<_>>()
                    );
                }
            }
        }
    }

    /// Stating `times = k` on the first step multiplies every step's turns,
    /// and the route's totals, by k; dG' per turn does not change.
    #[test]
    fn turns_scale_with_the_anchor(s in spec(any::<bool>()), quarters in 1u32..=40) {
        let k = quarters as f64 / 4.0;
        let p = prepared(&s.toml());
        let base = analyse(&p, Direction::Forward);
        prop_assert_eq!(base.steps[0].times, 1.0);
        let mut anchored = s.clone();
        anchored.steps[0].times = Some(k);
        let q = prepared(&anchored.toml());
        let a = analyse(&q, Direction::Forward);
        for (x, y) in base.steps.iter().zip(&a.steps) {
            prop_assert!(close(y.times, k * x.times, 1e-9), "{} vs {} × {}", y.times, k, x.times);
            prop_assert!(close(y.dg, x.dg, 1e-12));
        }
        prop_assert!(close(a.total_dg, k * base.total_dg, 1e-9));
        prop_assert!(close(a.total_dg0, k * base.total_dg0, 1e-9));
        for ((c, x), (c2, y)) in base.net.iter().zip(&a.net) {
            prop_assert_eq!(c, c2);
            prop_assert!(close(*y, k * x, 1e-9));
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(512))]

    /// Any finite number printed by Rust and given a unit reads back as
    /// that number converted to SI, or is refused when the conversion
    /// overflows; never a non-finite value.
    #[test]
    fn units_read_back_what_was_printed(v in any::<f64>().prop_filter("finite", |v| v.is_finite())) {
        let cases: [(String, Kind, f64); 9] = [
            (format!("{v} kJ/mol"), Kind::Energy, v * 1e3),
            (format!("{v}"), Kind::Energy, v * 1e3),
            (format!("{v} kcal/mol"), Kind::Energy, v * 4184.0),
            (format!("{v}J/mol"), Kind::Energy, v),
            (format!("{v} mM"), Kind::Concentration, v / 1e3),
            (format!("{v} nM"), Kind::Concentration, v / 1e9),
            (format!("{v} K"), Kind::Temperature, v),
            (format!("{v} C"), Kind::Temperature, v + 273.15),
            (format!("{v} mM"), Kind::IonicStrength, v / 1e3),
        ];
        for (text, kind, want) in cases {
            let got = units::parse(&text, kind);
            if want.is_finite() {
                prop_assert_eq!(got.clone(), Ok(want), "{}", text);
            } else {
                prop_assert!(got.is_err(), "{} gave {:?}", text, got);
            }
        }
    }

    /// A concentration printed in a human unit (three significant figures)
    /// reads back to within the rounding, and exactly when it had at most
    /// three significant figures to begin with.
    #[test]
    fn printed_concentrations_read_back(log_m in -14.0f64..1.0, n in 1u32..1000, e in -14i32..0, ascii in any::<bool>()) {
        let m = 10f64.powf(log_m);
        let shown = units::format_conc(m, ascii);
        let back = units::parse(&shown, Kind::Concentration).unwrap();
        prop_assert!((back - m).abs() <= 5e-3 * m, "{} shown as {} read back {}", m, shown, back);

        let exact: f64 = format!("{n}e{e}").parse().unwrap();
        let shown = units::format_conc(exact, ascii);
        let back = units::parse(&shown, Kind::Concentration).unwrap();
        prop_assert!((back - exact).abs() <= 1e-12 * exact, "{} shown as {} read back {}", exact, shown, back);
    }
}
