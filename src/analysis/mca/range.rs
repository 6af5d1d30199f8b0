//! The saturation draws behind the range: a job that can be run in parts
//! between keys, and the percentiles of its values.

use super::limits::*;
use super::model::Model;
use rand_chacha::ChaCha8Rng;
use rand_chacha::rand_core::{RngCore, SeedableRng};

/// A range computation that can run in parts (the explorer runs it between
/// keys); the result is the same however it is split.
#[derive(Debug, Clone)]
pub struct RangeJob {
    rng: ChaCha8Rng,
    sat: Vec<(f64, f64)>,
    values: Vec<Vec<f64>>,
    done: usize,
    pub(super) total: usize,
}

impl RangeJob {
    /// A job of `draws` draws for a route of `steps` steps.
    pub fn new(steps: usize, draws: usize, seed: u64) -> Self {
        RangeJob {
            rng: ChaCha8Rng::seed_from_u64(seed),
            sat: vec![(0.0, 0.0); steps],
            values: (0..steps).map(|_| Vec::with_capacity(draws)).collect(),
            done: 0,
            total: draws,
        }
    }

    /// Runs up to `budget` more draws; true when all are done.
    pub fn run(&mut self, model: &Model, budget: usize) -> bool {
        let end = self.total.min(self.done.saturating_add(budget));
        while self.done < end {
            for s in self.sat.iter_mut() {
                let (x, y) = (unit(&mut self.rng), unit(&mut self.rng));
                *s = if x + y < 1.0 {
                    (x, y)
                } else {
                    (1.0 - x, 1.0 - y)
                };
            }
            if let Ok(c) = model.coefficients(Some(&self.sat)) {
                for (v, x) in self.values.iter_mut().zip(c) {
                    v.push(x);
                }
            }
            self.done += 1;
        }
        self.finished()
    }

    /// True when every draw is done.
    pub fn finished(&self) -> bool {
        self.done >= self.total
    }

    /// The percentiles, once finished; None before, or when every draw was singular.
    pub fn result(&mut self) -> Option<Vec<(f64, f64)>> {
        if !self.finished() || self.values.first().is_none_or(|v| v.is_empty()) {
            return None;
        }
        let (lo, hi) = RANGE_PERCENTILES;
        Some(
            self.values
                .iter_mut()
                .map(|v| {
                    v.sort_by(f64::total_cmp);
                    (quantile(v, lo), quantile(v, hi))
                })
                .collect(),
        )
    }
}

/// A uniform number in [0, 1) from the top 53 bits of one 64-bit output.
pub(super) fn unit(rng: &mut ChaCha8Rng) -> f64 {
    (rng.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}

/// Quantile of sorted values by linear interpolation between order statistics (h = (n − 1)p).
pub(super) fn quantile(sorted: &[f64], p: f64) -> f64 {
    let h = (sorted.len() - 1) as f64 * p;
    let i = h.floor() as usize;
    let f = h - i as f64;
    match sorted.get(i + 1) {
        Some(&next) => sorted[i] + f * (next - sorted[i]),
        None => sorted[i],
    }
}

impl Model {
    /// The 5th and 95th percentiles of each coefficient over `draws`
    /// saturation draws (θ_S, θ_P uniform on θ_S + θ_P < 1 per step, ChaCha8
    /// seeded with `seed`). Draws whose system is singular are left out; None
    /// when none is left.
    pub fn ranges(&self, draws: usize, seed: u64) -> Option<Vec<(f64, f64)>> {
        let mut job = RangeJob::new(self.len(), draws, seed);
        job.run(self, draws);
        job.result()
    }
}
