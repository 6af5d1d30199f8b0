//! Invented routes of any length, written as pathway files, for benchmarks
//! and tests of scale (nothing here is data about a real pathway). Every
//! generator is deterministic: the same length gives the same text.

use std::fmt::Write;

/// A linear route c0 -> c1 -> ... -> cn of `n` steps with a carrier pair
/// (atp + c_i -> c_{i+1} + adp) on every seventh step, measurement spreads
/// and dg0 uncertainties, at 30 °C.
pub fn route(n: usize) -> String {
    let mut s = String::with_capacity(160 * n + 400);
    s.push_str(
        "# Generated; invented values.\nformat = 1\n[pathway]\nname = \"long route\"\n[conditions]\ntemperature = \"30 C\"\nph = 7\n[compounds]\natp = { conc = \"3 mM\", role = \"currency\", cv = 0.1 }\nadp = { conc = \"1 mM\", role = \"currency\", cv = 0.1 }\n",
    );
    for i in 0..=n {
        let conc = 10.0 + (i % 17) as f64 * 7.0;
        let _ = writeln!(s, "c{i} = {{ conc = \"{conc} uM\", cv = 0.2 }}");
    }
    for i in 0..n {
        let dg0 = -3.0 - (i % 11) as f64 * 1.3 + if i % 5 == 0 { 6.0 } else { 0.0 };
        let rx = if i % 7 == 0 {
            format!("c{i} + atp -> c{} + adp", i + 1)
        } else {
            format!("c{i} -> c{}", i + 1)
        };
        let _ = write!(
            s,
            "[[steps]]\nid = \"s{i}\"\nenzyme = \"enzyme {i}\"\nreaction = \"{rx}\"\ndg0 = \"{dg0:.2} kJ/mol\"\ndg0_sd = \"1 kJ/mol\"\n"
        );
    }
    s
}

/// A 1:1 chain s0 -> ... -> sn with standard energies between −12 and
/// +8 kJ/mol in a fixed pseudo-random pattern; with `carrier`, a carrier
/// pair (x + s_i -> s_{i+1} + y) on every second step.
pub fn chain(n: usize, carrier: bool) -> String {
    let mut t = String::with_capacity(80 * n + 300);
    t.push_str(
        "format = 1\n[pathway]\nname = \"long chain (invented)\"\n[conditions]\ntemperature = \"30 C\"\n[compounds]\n",
    );
    if carrier {
        t.push_str("x = { conc = \"1 mM\", role = \"currency\" }\ny = { conc = \"1 mM\", role = \"currency\" }\n");
    }
    for i in 0..=n {
        let _ = writeln!(t, "s{i} = {{ conc = \"0.1 mM\" }}");
    }
    for i in 0..n {
        let g = -12.0 + ((i * 7919) % 2000) as f64 / 100.0;
        let rx = if carrier && i % 2 == 0 {
            format!("x + s{i} -> s{} + y", i + 1)
        } else {
            format!("s{i} -> s{}", i + 1)
        };
        let _ = write!(
            t,
            "[[steps]]\nid = \"r{i}\"\nreaction = \"{rx}\"\ndg0 = \"{g} kJ/mol\"\n"
        );
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn generated_routes_load_and_have_the_asked_length() {
        for text in [route(30), chain(30, false), chain(30, true)] {
            let p = crate::model::load_str(&text, "gen.toml").expect("loads");
            assert_eq!(p.steps.len(), 30);
            assert_eq!(p.route.len(), 30);
        }
        assert_eq!(route(5), route(5));
    }
}
