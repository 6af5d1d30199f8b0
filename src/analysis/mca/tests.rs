//! Checks of the estimate: the worked case, finite differences, the
//! summation theorem, the solvers against each other, the range.

use super::range::quantile;
use super::solve::solve;
use super::*;

/// The worked case of science.md §7 [C]: X0 -> S1 -> S2 -> X3 with
/// Γ/K' = 13/28, 11/26, 7/22 gives C^J = (4/7, 2/7, 1/7).
fn worked() -> Model {
    let g = [
        (13.0f64 / 28.0).ln(),
        (11.0f64 / 26.0).ln(),
        (7.0f64 / 22.0).ln(),
    ];
    let terms = vec![vec![(0, 1.0)], vec![(0, -1.0), (1, 1.0)], vec![(1, -1.0)]];
    Model::from_parts(
        vec![10, 11],
        &[13.0 / 14.0, 11.0 / 14.0],
        terms,
        vec![1.0; 3],
        &g,
    )
    .unwrap()
}

#[test]
fn worked_case_by_both_methods() {
    let m = worked();
    assert!(m.is_chain());
    for c in [
        m.coefficients(None).unwrap(),
        m.matrix_method(None).unwrap(),
    ] {
        for (x, want) in c.iter().zip([4.0 / 7.0, 2.0 / 7.0, 1.0 / 7.0]) {
            assert!((x - want).abs() < 1e-12, "{c:?}");
        }
    }
}

#[test]
fn a_conserved_pair_uses_the_link_matrix() {
    // s1: X + c -> A + d, s2: A + d -> Y + c, with c and d on the route
    // only: A + c and c + d are conserved, one independent variable.
    let terms = vec![
        vec![(0, 1.0), (1, -1.0), (2, 1.0)],
        vec![(0, -1.0), (1, 1.0), (2, -1.0)],
    ];
    let m = Model::from_parts(
        vec![0, 1, 2],
        &[1e-3, 2e-3, 5e-4],
        terms,
        vec![1.0, 1.0],
        &[-1.0, -2.0],
    )
    .unwrap();
    assert!(!m.is_chain());
    assert_eq!(m.independent(), 1);
    let c = m.coefficients(None).unwrap();
    assert!((c[0] + c[1] - 1.0).abs() < 1e-12);
    assert!(c.iter().all(|x| (0.0..=1.0).contains(x)), "{c:?}");
}

#[test]
fn solve_refuses_singular_and_nearly_singular_systems() {
    // x + 2y = 5, 3x + 4y = 6 -> x = -4, y = 4.5 (by hand).
    let x = solve(vec![1.0, 2.0, 3.0, 4.0], 2, vec![5.0, 6.0]).unwrap();
    assert!((x[0] + 4.0).abs() < 1e-12 && (x[1] - 4.5).abs() < 1e-12);
    assert!(solve(vec![1.0, 1.0, 1.0, 1.0], 2, vec![1.0, 1.0]).is_none());
    assert!(solve(vec![1.0, 1.0, 1.0, 1.0 + 1e-15], 2, vec![1.0, 0.0]).is_none());
    assert_eq!(solve(vec![2.0], 1, vec![0.0]), Some(vec![0.0]));
}

/// k blocks of a split in the manner of an aldolase and an isomerase:
/// c_i -> e_i + f_i, e_i -> f_i, 2 f_i -> c_{i+1} (no conserved total);
/// invented dG'/RT between −0.1 and −6.
fn split_chain(k: usize) -> Model {
    let mut terms: Vec<Vec<(usize, f64)>> = Vec::new();
    // Variables: c_i = 3i − 1 (i ≥ 1), e_i = 3i, f_i = 3i + 1.
    let (c, e, f) = (|i: usize| 3 * i - 1, |i: usize| 3 * i, |i: usize| 3 * i + 1);
    for i in 0..k {
        let mut split = vec![(e(i), 1.0), (f(i), 1.0)];
        if i > 0 {
            split.push((c(i), -1.0));
        }
        terms.push(split);
        terms.push(vec![(e(i), -1.0), (f(i), 1.0)]);
        let mut join = vec![(f(i), -2.0)];
        if i + 1 < k {
            join.push((c(i + 1), 1.0));
        }
        terms.push(join);
    }
    let nv = 3 * k - 1;
    let n = terms.len();
    let g: Vec<f64> = (0..n).map(|j| -0.1 - (j * 37 % 60) as f64 / 10.0).collect();
    Model::from_parts((0..nv).collect(), &vec![1e-3; nv], terms, vec![1.0; n], &g).unwrap()
}

#[test]
fn the_banded_solve_agrees_with_the_dense_one_and_the_closed_form() {
    // A long route with splits, past DENSE_MAX: banded by default.
    let m = split_chain(120);
    assert!(!m.is_chain() && m.vars.len() > DENSE_MAX);
    let sat: Vec<(f64, f64)> = (0..m.len())
        .map(|j| ((j % 7) as f64 / 10.0, (j % 3) as f64 / 10.0))
        .collect();
    for s in [None, Some(sat.as_slice())] {
        let band = m.coefficients(s).unwrap();
        let dense = m.matrix_coefficients_by(s, true).unwrap();
        assert!((band.iter().sum::<f64>() - 1.0).abs() < 1e-9);
        for (x, y) in band.iter().zip(&dense) {
            assert!((x - y).abs() < 1e-10, "{x} {y}");
        }
    }
    // A long chain: the banded matrix method against the closed form.
    let n = 1500;
    let terms: Vec<Vec<(usize, f64)>> = (0..n)
        .map(|k| {
            let mut t = Vec::new();
            if k > 0 {
                t.push((k - 1, -1.0));
            }
            if k + 1 < n {
                t.push((k, if k % 250 == 0 { 2.0 } else { 1.0 }));
            }
            t
        })
        .collect();
    let g: Vec<f64> = (0..n).map(|j| -0.2 - (j * 13 % 40) as f64 / 10.0).collect();
    // Turns double after each step that makes two.
    let times: Vec<f64> = (0..n)
        .map(|k| 2f64.powi((0..k).filter(|j| j % 250 == 0).count() as i32))
        .collect();
    let m = Model::from_parts((0..n - 1).collect(), &vec![1e-3; n - 1], terms, times, &g).unwrap();
    let closed = m.coefficients(None).unwrap();
    let band = m.matrix_method(None).unwrap();
    for (x, y) in closed.iter().zip(&band) {
        assert!((x - y).abs() < 1e-10, "{x} {y}");
    }
}

#[test]
fn quantile_interpolates_between_order_statistics() {
    let v: Vec<f64> = (0..=100).map(f64::from).collect();
    assert_eq!(quantile(&v, 0.05), 5.0);
    assert_eq!(quantile(&v, 0.95), 95.0);
    assert_eq!(quantile(&[1.0, 2.0], 0.5), 1.5);
    assert_eq!(quantile(&[3.0], 0.95), 3.0);
}

#[test]
fn ranges_are_reproducible_and_hold_the_coefficients_between_zero_and_one() {
    let m = worked();
    let r1 = m.ranges(500, SEED).unwrap();
    let r2 = m.ranges(500, SEED).unwrap();
    assert_eq!(r1, r2);
    for &(lo, hi) in &r1 {
        assert!(0.0 <= lo && lo <= hi && hi <= 1.0, "{r1:?}");
    }
    // Another seed gives other numbers (the seed is used).
    assert_ne!(m.ranges(500, SEED + 1).unwrap(), r1);
}

#[test]
fn a_step_a_rounding_error_from_equilibrium_gives_no_numbers() {
    // dG'/RT = −1e-320 makes 1/(1 − e^{dG'/RT}) overflow.
    let terms = vec![vec![(0, 1.0)], vec![(0, -1.0)]];
    let m = Model::from_parts(vec![0], &[1e-3], terms, vec![1.0; 2], &[-1e-320, -1.0]).unwrap();
    assert_eq!(m.coefficients(None), Err(Failure::Singular));
}

#[test]
fn a_step_at_or_above_equilibrium_has_no_model() {
    let terms = vec![vec![(0, 1.0)], vec![(0, -1.0)]];
    assert!(
        Model::from_parts(vec![0], &[1e-3], terms.clone(), vec![1.0; 2], &[-1.0, 0.0]).is_none()
    );
    assert!(Model::from_parts(vec![0], &[1e-3], terms, vec![1.0; 2], &[-1.0, 0.5]).is_none());
}
