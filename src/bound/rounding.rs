//! Rational multipliers from a floating-point guess.
//!
//! Two roundings are tried, since either may be the better one:
//! - a fixed binary denominator `2^FIXED_BITS`: the bound then loses at most about
//!   `sum_i (u_i - l_i) sum_j |a_ji| / 2^(FIXED_BITS + 1)` against the guess, which keeps
//!   an integral LP optimum's ceiling;
//! - per-entry best approximations with small denominators (the convergents of continued
//!   fractions; Khinchin 1964, "Continued fractions", chapter II), which recover a vertex dual exactly: its
//!   entries have the basis determinant as denominator, small for the matrices planners use.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::ToPrimitive;

use super::lagrangian::Multipliers;

/// Bits of the fixed binary denominator.
const FIXED_BITS: u32 = 24;
/// Largest denominator of a per-entry approximation.
const SMALL_DENOMINATOR: i64 = 720;
/// The common denominator of the per-entry approximations is given up above this.
const COMMON_LIMIT: i64 = 1 << 40;
/// Entries farther than this (relative) from their approximation are not taken as exact: an
/// arbitrary number lies about `1 / (2 q^2)`, near `1e-6`, from its best approximations.
const CLOSE: f64 = 1e-8;

/// The candidate multipliers for the guess `y`, most exact first; empty when an entry is not
/// finite.
pub(super) fn candidates(y: &[f64]) -> Vec<Multipliers> {
    if y.iter().any(|v| !v.is_finite()) {
        return Vec::new();
    }
    small_fractions(y).into_iter().chain(fixed(y)).collect()
}

/// `y` rounded to multiples of `2^-FIXED_BITS`.
fn fixed(y: &[f64]) -> Option<Multipliers> {
    let scale = f64::from(1u32 << FIXED_BITS);
    let numerators = y
        .iter()
        .map(|v| (v * scale).round().to_i128().map(BigInt::from))
        .collect::<Option<Vec<BigInt>>>()?;
    Some(Multipliers {
        numerators,
        denominator: BigInt::from(1u64 << FIXED_BITS),
    })
}

/// Every entry of `y` as its best approximation with denominator at most
/// [`SMALL_DENOMINATOR`], over their common denominator; `None` when an entry is not that
/// close to such a fraction or the common denominator grows past [`COMMON_LIMIT`].
fn small_fractions(y: &[f64]) -> Option<Multipliers> {
    let fractions = y
        .iter()
        .map(|&v| {
            let (p, q) = best_approximation(v)?;
            ((v - p as f64 / q as f64).abs() <= CLOSE * v.abs().max(1.0)).then_some((p, q))
        })
        .collect::<Option<Vec<(i64, i64)>>>()?;
    let common = fractions.iter().try_fold(1i64, |acc, &(_, q)| {
        Some(acc.lcm(&q)).filter(|&l| l <= COMMON_LIMIT)
    })?;
    let numerators = fractions
        .iter()
        .map(|&(p, q)| BigInt::from(p) * (common / q))
        .collect();
    Some(Multipliers {
        numerators,
        denominator: BigInt::from(common),
    })
}

/// The last convergent `p / q` of `v`'s continued fraction with `q <= SMALL_DENOMINATOR`;
/// `None` when `v` is too large for exact numerators.
fn best_approximation(v: f64) -> Option<(i64, i64)> {
    if v.abs() > 1e15 {
        return None;
    }
    // Convergents p_k / q_k with p_k = a_k p_{k-1} + p_{k-2}, likewise q_k.
    let (mut p0, mut q0, mut p1, mut q1) = (0i64, 1i64, 1i64, 0i64);
    let mut rest = v;
    loop {
        let a = rest.floor();
        let a_int = a.to_i64()?;
        let q2 = a_int.checked_mul(q1)?.checked_add(q0)?;
        if q2 > SMALL_DENOMINATOR {
            break;
        }
        let p2 = a_int.checked_mul(p1)?.checked_add(p0)?;
        (p0, q0, p1, q1) = (p1, q1, p2, q2);
        let fraction = rest - a;
        if fraction < 1e-12 {
            break;
        }
        rest = 1.0 / fraction;
    }
    (q1 > 0).then_some((p1, q1))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn near_fractions_are_recovered_exactly() {
        let found = small_fractions(&[2.0 / 3.0 + 1e-9, -1.5, 4.0 - 1e-10]).unwrap();
        // The common denominator is 6: 2/3 = 4/6, -3/2 = -9/6, 4 = 24/6.
        assert_eq!(found.denominator, BigInt::from(6));
        let numerators: Vec<BigInt> = [4, -9, 24].into_iter().map(BigInt::from).collect();
        assert_eq!(found.numerators, numerators);
    }

    #[test]
    fn an_irrational_looking_entry_falls_back_to_the_fixed_denominator() {
        let all = candidates(&[std::f64::consts::PI / 10.0]);
        assert_eq!(all.len(), 1);
        assert_eq!(all[0].denominator, BigInt::from(1u64 << FIXED_BITS));
        let y = all[0].numerators[0].to_f64().unwrap() / f64::from(1u32 << FIXED_BITS);
        assert!((y - std::f64::consts::PI / 10.0).abs() < 1e-7);
    }

    #[test]
    fn infinite_guesses_give_no_candidate() {
        assert!(candidates(&[f64::NAN]).is_empty());
    }
}
