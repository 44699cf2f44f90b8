//! Lattice basis reduction (Lenstra, Lenstra, Lovász 1982, "Factoring polynomials with rational
//! coefficients", with δ = 3/4), in the integral form of de Weger (1987) as given by Cohen,
//! "A Course in Computational Algebraic Number Theory" (1993), Algorithm 2.6.7.
//!
//! The Gram-Schmidt data are kept exactly as integers: `dd[i + 1]` is the Gram determinant of
//! the first `i + 1` vectors (`dd[0] = 1`) and `lambda[k][j] = dd[j + 1] * mu[k][j]`, so no
//! rational arithmetic and no rounding error occurs. The same data give Babai's nearest-plane
//! reduction of any further vector against the reduced basis ([`ReducedBasis::size_reduce`]).

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};

/// An LLL-reduced basis of a lattice together with its exact Gram-Schmidt data.
#[derive(Clone, Debug)]
pub(crate) struct ReducedBasis {
    vectors: Vec<Vec<BigInt>>,
    dd: Vec<BigInt>,
    lambda: Vec<Vec<BigInt>>,
}

fn dot(a: &[BigInt], b: &[BigInt]) -> BigInt {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// `x -= q * y`, entry by entry.
fn sub_multiple(x: &mut [BigInt], q: &BigInt, y: &[BigInt]) {
    for (a, b) in x.iter_mut().zip(y) {
        *a -= q * b;
    }
}

/// `2 |a|`.
fn twice_abs(a: &BigInt) -> BigInt {
    a.abs() << 1
}

/// The integer nearest to `a / b` for `b > 0` (halves round up).
pub(crate) fn round_div(a: &BigInt, b: &BigInt) -> BigInt {
    let two = BigInt::from(2);
    (a * &two + b).div_floor(&(b * &two))
}

impl ReducedBasis {
    /// LLL-reduces `basis`, whose vectors must be linearly independent and of equal length.
    ///
    /// # Panics
    /// If the vectors are linearly dependent (a Gram determinant is zero).
    pub(crate) fn new(basis: Vec<Vec<BigInt>>) -> Self {
        let d = basis.len();
        let mut s = Self {
            vectors: basis,
            dd: vec![BigInt::from(1); d + 1],
            lambda: (0..d).map(|k| vec![BigInt::zero(); k]).collect(),
        };
        if d == 0 {
            return s;
        }
        s.orthogonalise(0);
        let (mut k, mut kmax) = (1, 0);
        while k < d {
            if k > kmax {
                kmax = k;
                s.orthogonalise(k);
            }
            s.reduce_pair(k, k - 1);
            if s.lovasz_fails(k) {
                s.swap(k, kmax);
                k = (k - 1).max(1);
            } else {
                for l in (0..k - 1).rev() {
                    s.reduce_pair(k, l);
                }
                k += 1;
            }
        }
        s
    }

    /// The reduced basis vectors.
    pub(crate) fn vectors(&self) -> &[Vec<BigInt>] {
        &self.vectors
    }

    /// The coefficients `lambda[j]` (against the first `gram.len()` basis vectors, whose data
    /// must be known) of a vector with inner products `gram[j] = <x, b_j>` (Cohen,
    /// Algorithm 2.6.7, step 2).
    fn lambdas(&self, gram: Vec<BigInt>) -> Vec<BigInt> {
        let mut out: Vec<BigInt> = Vec::with_capacity(gram.len());
        for (j, mut u) in gram.into_iter().enumerate() {
            for (i, (oi, lji)) in out.iter().zip(&self.lambda[j]).enumerate() {
                u = (&self.dd[i + 1] * u - oi * lji) / &self.dd[i];
            }
            out.push(u);
        }
        out
    }

    /// Computes `lambda[k]` and `dd[k + 1]` for vector `k`.
    fn orthogonalise(&mut self, k: usize) {
        let b = &self.vectors[k];
        let gram = (0..k).map(|j| dot(b, &self.vectors[j])).collect();
        let l = self.lambdas(gram);
        let mut u = dot(b, b);
        for (i, li) in l.iter().enumerate() {
            u = (&self.dd[i + 1] * u - li * li) / &self.dd[i];
        }
        assert!(!u.is_zero(), "lattice basis vectors must be independent");
        self.dd[k + 1] = u;
        self.lambda[k] = l;
    }

    /// Size-reduces vector `k` against vector `l < k` (Cohen's sub-algorithm RED).
    fn reduce_pair(&mut self, k: usize, l: usize) {
        let den = self.dd[l + 1].clone();
        if twice_abs(&self.lambda[k][l]) <= den {
            return;
        }
        let q = round_div(&self.lambda[k][l], &den);
        let (low, high) = self.vectors.split_at_mut(k);
        sub_multiple(&mut high[0], &q, &low[l]);
        self.lambda[k][l] -= &q * den;
        let (low, high) = self.lambda.split_at_mut(k);
        sub_multiple(&mut high[0][..l], &q, &low[l][..l]);
    }

    /// The Lovász condition with δ = 3/4 fails for the pair `(k - 1, k)`.
    fn lovasz_fails(&self, k: usize) -> bool {
        let lhs = &self.dd[k + 1] * &self.dd[k - 1] * 4;
        let mu = &self.lambda[k][k - 1];
        let rhs = &self.dd[k] * &self.dd[k] * 3 - mu * mu * 4;
        lhs < rhs
    }

    /// Exchanges vectors `k - 1` and `k` and updates the Gram-Schmidt data of vectors up to
    /// `kmax` (Cohen's sub-algorithm SWAP).
    fn swap(&mut self, k: usize, kmax: usize) {
        self.vectors.swap(k, k - 1);
        let (low, high) = self.lambda.split_at_mut(k);
        low[k - 1].swap_with_slice(&mut high[0][..k - 1]);
        let lam = self.lambda[k][k - 1].clone();
        let b = (&self.dd[k - 1] * &self.dd[k + 1] + &lam * &lam) / &self.dd[k];
        for i in k + 1..=kmax {
            let t = self.lambda[i][k].clone();
            let new_k = (&self.dd[k + 1] * &self.lambda[i][k - 1] - &lam * &t) / &self.dd[k];
            let new_k1 = (&b * &t + &lam * &new_k) / &self.dd[k + 1];
            self.lambda[i][k] = new_k;
            self.lambda[i][k - 1] = new_k1;
        }
        self.dd[k] = b;
    }

    /// Babai's nearest-plane reduction of `x` against the basis: returns `x - sum q_j b_j`
    /// with every Gram-Schmidt coefficient against `b_j` in `[-1/2, 1/2]`. The result differs
    /// from `x` by a lattice vector and is short when `x` is close to the lattice.
    pub(crate) fn size_reduce(&self, x: &[BigInt]) -> Vec<BigInt> {
        let mut x = x.to_vec();
        let gram = self.vectors.iter().map(|b| dot(&x, b)).collect();
        let mut lam = self.lambdas(gram);
        for l in (0..self.vectors.len()).rev() {
            let den = &self.dd[l + 1];
            if twice_abs(&lam[l]) <= *den {
                continue;
            }
            let q = round_div(&lam[l], den);
            sub_multiple(&mut x, &q, &self.vectors[l]);
            lam[l] -= &q * den;
            sub_multiple(&mut lam[..l], &q, &self.lambda[l][..l]);
        }
        x
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_rational::BigRational;

    fn big(rows: &[&[i64]]) -> Vec<Vec<BigInt>> {
        rows.iter()
            .map(|r| r.iter().map(|&v| BigInt::from(v)).collect())
            .collect()
    }

    /// Plain rational Gram-Schmidt, the textbook definition, as an oracle.
    fn gram_schmidt(b: &[Vec<BigInt>]) -> (Vec<Vec<BigRational>>, Vec<Vec<BigRational>>) {
        let q = |v: &BigInt| BigRational::from_integer(v.clone());
        let mut star: Vec<Vec<BigRational>> = Vec::new();
        let mut mu = Vec::new();
        for bi in b {
            let mut v: Vec<BigRational> = bi.iter().map(q).collect();
            let mut row = Vec::new();
            for s in &star {
                let num: BigRational = bi.iter().zip(s).map(|(x, y)| q(x) * y).sum();
                let den: BigRational = s.iter().map(|y| y * y).sum();
                let m = num / den;
                for (vi, si) in v.iter_mut().zip(s) {
                    *vi -= &m * si;
                }
                row.push(m);
            }
            star.push(v);
            mu.push(row);
        }
        (star, mu)
    }

    #[test]
    fn output_satisfies_the_lll_conditions() {
        let basis = big(&[
            &[1, 1, 1, 7],
            &[-1, 0, 2, 31],
            &[3, 5, 6, -100],
            &[2, 9, -4, 55],
        ]);
        let red = ReducedBasis::new(basis);
        let (star, mu) = gram_schmidt(red.vectors());
        let half = BigRational::new(1.into(), 2.into());
        let norm = |v: &Vec<BigRational>| v.iter().map(|y| y * y).sum::<BigRational>();
        for (k, row) in mu.iter().enumerate() {
            // Size condition |mu_kj| <= 1/2 (Lenstra, Lenstra, Lovász 1982, (1.4)).
            assert!(row.iter().all(|m| m.abs() <= half), "mu row {k}: {row:?}");
            if k > 0 {
                // Lovász condition with delta = 3/4 (ibid., (1.5)).
                let lhs = norm(&star[k]) + &row[k - 1] * &row[k - 1] * norm(&star[k - 1]);
                assert!(lhs >= BigRational::new(3.into(), 4.into()) * norm(&star[k - 1]));
            }
        }
    }

    #[test]
    fn a_skewed_basis_of_z2_reduces_to_unit_length_vectors() {
        // (101, 1) and (100, 1) have determinant 1, so they span Z^2; every reduced basis of
        // Z^2 consists of two vectors of length one (by hand).
        let red = ReducedBasis::new(big(&[&[101, 1], &[100, 1]]));
        for v in red.vectors() {
            assert_eq!(v.iter().map(|x| x * x).sum::<BigInt>(), BigInt::from(1));
        }
    }

    #[test]
    fn size_reduce_moves_by_a_lattice_vector_and_bounds_the_coefficients() {
        let red = ReducedBasis::new(big(&[&[2, 0, 1], &[0, 3, 1]]));
        let x: Vec<BigInt> = [41, -17, 9].iter().map(|&v| BigInt::from(v)).collect();
        let y = red.size_reduce(&x);
        // x - y = p b_0 + q b_1 with integers p, q: solve from the first two coordinates.
        let diff: Vec<BigInt> = x.iter().zip(&y).map(|(a, b)| a - b).collect();
        let b = red.vectors();
        let mut all = b.to_vec();
        all.push(y.clone());
        let (_, mu) = gram_schmidt(&all);
        let half = BigRational::new(1.into(), 2.into());
        assert!(mu[2].iter().all(|m| m.abs() <= half));
        let det = &b[0][0] * &b[1][1] - &b[0][1] * &b[1][0];
        let p = &diff[0] * &b[1][1] - &diff[1] * &b[1][0];
        let q = &b[0][0] * &diff[1] - &b[0][1] * &diff[0];
        assert!((&p % &det).is_zero() && (&q % &det).is_zero());
        let (p, q) = (p / &det, q / &det);
        assert_eq!(diff[2], &p * &b[0][2] + &q * &b[1][2]);
    }

    #[test]
    fn round_div_rounds_to_nearest() {
        let r = |a: i64, b: i64| round_div(&BigInt::from(a), &BigInt::from(b));
        assert_eq!(r(7, 2), BigInt::from(4));
        assert_eq!(r(-7, 2), BigInt::from(-3));
        assert_eq!(r(5, 3), BigInt::from(2));
        assert_eq!(r(-5, 3), BigInt::from(-2));
        assert_eq!(r(0, 5), BigInt::from(0));
    }
}
