//! The objective `c.x + sum_i p_i(x_i)` of a model file with `convex_cost`, read from the file
//! with the `toml` crate and evaluated here, without kernstep's own code, by the closed form
//! documented in `src/model/convex.rs`:
//! `p(x) = s_0 x + sum_k (s_k - s_{k-1}) (max(0, x - b_k) - max(0, -b_k))`.

use std::path::Path;

/// A model's linear cost and its convex costs `(variable, breaks, slopes)`.
pub struct ConvexObjective {
    /// The linear cost, one entry per variable.
    pub cost: Vec<i64>,
    /// The convex costs, by variable index.
    pub pieces: Vec<(usize, Vec<i64>, Vec<i64>)>,
}

fn integers(value: &toml::Value) -> Vec<i64> {
    value
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_integer().unwrap())
        .collect()
}

impl ConvexObjective {
    /// The objective of the TOML model file at `path` (it must name its variables).
    pub fn read(path: &Path) -> Self {
        let text = std::fs::read_to_string(path).unwrap();
        let model: toml::Table = text.parse().unwrap();
        let names: Vec<&str> = model["names"]["variables"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_str().unwrap())
            .collect();
        let pieces = model["convex_cost"]
            .as_table()
            .unwrap()
            .iter()
            .map(|(name, spec)| {
                let variable = names.iter().position(|n| n == name).unwrap();
                (
                    variable,
                    integers(&spec["breaks"]),
                    integers(&spec["slopes"]),
                )
            })
            .collect();
        ConvexObjective {
            cost: integers(&model["cost"]),
            pieces,
        }
    }

    /// The same convex costs under another linear cost.
    pub fn with_cost(&self, cost: &[i64]) -> Self {
        ConvexObjective {
            cost: cost.to_vec(),
            pieces: self.pieces.clone(),
        }
    }

    /// `c.x + sum_i p_i(x_i)` by the closed form.
    pub fn value(&self, x: &[i64]) -> i128 {
        let linear: i128 = self
            .cost
            .iter()
            .zip(x)
            .map(|(&c, &v)| i128::from(c) * i128::from(v))
            .sum();
        let convex: i128 = self
            .pieces
            .iter()
            .map(|(i, breaks, slopes)| {
                let v = i128::from(x[*i]);
                let mut p = i128::from(slopes[0]) * v;
                for (k, &b) in breaks.iter().enumerate() {
                    let (b, rise) = (i128::from(b), i128::from(slopes[k + 1] - slopes[k]));
                    p += rise * ((v - b).max(0) - (-b).max(0));
                }
                p
            })
            .sum();
        linear + convex
    }
}
