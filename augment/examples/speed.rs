//! Times daily re-optimisation on an invented 5-depot, 6-shop transport plan (30 lanes) with
//! 200 moves: the 150 four-cycles of K_{5,6} and 50 six-cycles.
//!
//! Run with `cargo run --release -p augment --example speed`.

use std::time::{Duration, Instant};

use augment::{solve, Coverage, MoveSet, Objective, Options, Problem};

const DEPOTS: usize = 5;
const SHOPS: usize = 6;
const LANES: usize = DEPOTS * SHOPS;

/// The cycle visiting depots `rows` and shops `cols` in order.
fn cycle(rows: &[usize], cols: &[usize]) -> Vec<i64> {
    let mut g = vec![0; LANES];
    for t in 0..rows.len() {
        g[rows[t] * SHOPS + cols[t]] += 1;
        g[rows[t] * SHOPS + cols[(t + 1) % cols.len()]] -= 1;
    }
    g
}

fn moves() -> Vec<Vec<i64>> {
    let mut out = Vec::new();
    for (r0, r1) in (0..DEPOTS).flat_map(|a| (a + 1..DEPOTS).map(move |b| (a, b))) {
        for (c0, c1) in (0..SHOPS).flat_map(|a| (a + 1..SHOPS).map(move |b| (a, b))) {
            out.push(cycle(&[r0, r1], &[c0, c1]));
        }
    }
    'six: for r in 0..DEPOTS - 2 {
        for c0 in 0..SHOPS {
            for c1 in 0..SHOPS {
                for c2 in 0..SHOPS {
                    if c0 < c1.min(c2) && c1 != c2 {
                        out.push(cycle(&[r, r + 1, r + 2], &[c0, c1, c2]));
                        if out.len() == 200 {
                            break 'six;
                        }
                    }
                }
            }
        }
    }
    out
}

/// A small deterministic generator (linear congruential, Knuth's MMIX constants).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self, below: i64) -> i64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((self.0 >> 33) % below as u64) as i64
    }
}

fn main() -> Result<(), augment::AugmentError> {
    let moves = MoveSet::from_rows(LANES, &moves(), Coverage::NormTruncated { norm: 6 })?;
    let mut rng = Lcg(7);
    let variants = 2000;
    let (mut total, mut steps, mut worst) = (Duration::ZERO, 0u64, Duration::ZERO);
    for _ in 0..variants {
        let plan: Vec<i64> = (0..LANES).map(|_| rng.next(6)).collect();
        let costs: Vec<i64> = (0..LANES).map(|_| 1 + rng.next(20)).collect();
        let upper = plan.iter().map(|&x| Some(x + rng.next(4))).collect();
        let problem = Problem::new(Objective::linear(costs), vec![Some(0); LANES], upper)?;
        let started = Instant::now();
        let solution = solve(&problem, &moves, &plan, &Options::default())?;
        let elapsed = started.elapsed();
        total += elapsed;
        worst = worst.max(elapsed);
        steps += solution.steps();
    }
    println!(
        "{} moves x {} variables, {variants} variants: mean {:.1} us per solve, worst {:.1} us, mean {:.1} steps",
        moves.len(),
        LANES,
        total.as_secs_f64() * 1e6 / f64::from(variants),
        worst.as_secs_f64() * 1e6,
        steps as f64 / f64::from(variants)
    );
    Ok(())
}
