//! Days per second of the network solver (`kernstep::network`) on invented lane networks.
//!
//! `cargo bench --bench network_days` builds networks of 10 x 50, 20 x 100 and 50 x 500
//! depots x zones (3 to 5 lanes per zone from distinct depots, every lane with a capacity,
//! surplus kept at the depots), draws 1,000 days from a fixed-seed generator (each day changes
//! the demands of 3 zones and the costs of 3 lanes of the day before), and solves every day
//! cold and chained (each day warm-started from the day before's optimum). It prints days per
//! second for both, the mean augmentations and searches per day, and how many days the two
//! runs agree on (they must agree on all). Sizes given as arguments (`-- 20x100`) run alone.

use std::time::Instant;

use kernstep::network::{FlowNumbers, FlowOptions, FlowOutcome, FlowSolution, Network, Warm};
use kernstep::IntMatrix;

const DAYS: usize = 1_000;

/// A small deterministic generator (SplitMix64, Steele, Lea, Flood 2014).
struct Draw(u64);

impl Draw {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }

    /// Uniform in `lo..=hi`.
    fn range(&mut self, lo: i64, hi: i64) -> i64 {
        lo + (self.next() % (hi - lo + 1) as u64) as i64
    }
}

/// One lane network with its fixed bounds and a first day.
struct Plan {
    matrix: IntMatrix,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
    lanes: usize,
    depots: usize,
}

/// A day's right-hand side and costs.
struct Day {
    rhs: Vec<i64>,
    cost: Vec<i64>,
}

fn plan(depots: usize, zones: usize, draw: &mut Draw) -> Plan {
    let mut lanes = Vec::new();
    for z in 0..zones {
        let count = draw.range(3, 5) as usize;
        let mut chosen: Vec<usize> = Vec::new();
        while chosen.len() < count {
            let d = draw.range(0, depots as i64 - 1) as usize;
            if !chosen.contains(&d) {
                chosen.push(d);
            }
        }
        lanes.extend(chosen.into_iter().map(|d| (d, z, draw.range(8, 30))));
    }
    let mut matrix = IntMatrix::zeros(depots + zones, lanes.len() + depots);
    for (j, &(d, z, _)) in lanes.iter().enumerate() {
        matrix.set(d, j, 1);
        matrix.set(depots + z, j, 1);
    }
    for d in 0..depots {
        matrix.set(d, lanes.len() + d, 1);
    }
    let upper = lanes
        .iter()
        .map(|&(_, _, c)| Some(c))
        .chain(std::iter::repeat_n(None, depots))
        .collect();
    Plan {
        lower: vec![Some(0); lanes.len() + depots],
        upper,
        lanes: lanes.len(),
        depots,
        matrix,
    }
}

fn days(plan: &Plan, zones: usize, draw: &mut Draw) -> Vec<Day> {
    let per_depot = (zones as i64 * 25) / plan.depots as i64;
    let mut rhs = vec![per_depot; plan.depots];
    rhs.extend((0..zones).map(|_| draw.range(5, 20)));
    let mut cost: Vec<i64> = (0..plan.lanes).map(|_| draw.range(1, 12)).collect();
    cost.extend((0..plan.depots).map(|_| draw.range(0, 3)));
    (0..DAYS)
        .map(|_| {
            for _ in 0..3 {
                let z = plan.depots + draw.range(0, zones as i64 - 1) as usize;
                rhs[z] = (rhs[z] + draw.range(-4, 4)).clamp(0, 24);
                let j = draw.range(0, plan.lanes as i64 - 1) as usize;
                cost[j] = (cost[j] + draw.range(-3, 3)).max(1);
            }
            Day {
                rhs: rhs.clone(),
                cost: cost.clone(),
            }
        })
        .collect()
}

fn numbers<'a>(plan: &'a Plan, day: &'a Day) -> FlowNumbers<'a> {
    FlowNumbers {
        rhs: &day.rhs,
        cost: &day.cost,
        lower: &plan.lower,
        upper: &plan.upper,
    }
}

fn objective(s: &FlowSolution) -> Option<i128> {
    match &s.outcome {
        FlowOutcome::Optimal { objective, .. } => Some(*objective),
        _ => None,
    }
}

fn main() {
    let options = FlowOptions::default();
    let chosen: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| !a.starts_with("--"))
        .collect();
    println!("depots x zones  arcs  nodes  cold days/s  chained days/s  steps/day cold  chained  searches/day cold  chained  agree  optimal");
    for (depots, zones) in [(10, 50), (20, 100), (50, 500)] {
        if !chosen.is_empty() && !chosen.contains(&format!("{depots}x{zones}")) {
            continue;
        }
        let mut draw = Draw(0x6b65_726e + depots as u64);
        let plan = plan(depots, zones, &mut draw);
        let days = days(&plan, zones, &mut draw);
        let net = Network::detect(&plan.matrix).expect("a lanes matrix is a network");

        let start = Instant::now();
        let cold: Vec<FlowSolution> = days
            .iter()
            .map(|d| {
                net.solve(numbers(&plan, d), None, &options, &|| false)
                    .expect("solves")
            })
            .collect();
        let cold_s = start.elapsed().as_secs_f64();

        let start = Instant::now();
        let mut chained = Vec::with_capacity(DAYS);
        let mut yesterday: Option<(Vec<i64>, Vec<i64>)> = None;
        for d in &days {
            let warm = yesterday.as_ref().map(|(flow, potentials)| Warm {
                flow,
                potentials: Some(potentials),
            });
            let s = net
                .solve(numbers(&plan, d), warm, &options, &|| false)
                .expect("solves");
            if let FlowOutcome::Optimal {
                flow, potentials, ..
            } = &s.outcome
            {
                yesterday = Some((flow.clone(), potentials.clone()));
            }
            chained.push(s);
        }
        let chained_s = start.elapsed().as_secs_f64();

        let agree = cold
            .iter()
            .zip(&chained)
            .filter(|(a, b)| objective(a) == objective(b))
            .count();
        let optimal = cold.iter().filter(|s| objective(s).is_some()).count();
        let mean = |v: &[FlowSolution], f: fn(&FlowSolution) -> u64| {
            v.iter().map(f).sum::<u64>() as f64 / DAYS as f64
        };
        println!(
            "{:>6} x {:<5} {:>5} {:>6} {:>12.0} {:>15.0} {:>15.1} {:>8.1} {:>18.1} {:>8.1} {:>6} {:>8}",
            depots,
            zones,
            plan.matrix.cols(),
            net.nodes(),
            DAYS as f64 / cold_s,
            DAYS as f64 / chained_s,
            mean(&cold, FlowSolution::steps),
            mean(&chained, FlowSolution::steps),
            mean(&cold, |s| s.searches),
            mean(&chained, |s| s.searches),
            agree,
            optimal,
        );
    }
}
