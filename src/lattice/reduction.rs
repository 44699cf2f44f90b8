//! The kernel lattice basis that completion algorithms start from: LLL-reduced (Lenstra,
//! Lenstra, Lovász 1982) so that its entries are small, as machine integers.

use super::convert::to_i64_vec;
use super::hermite::HermiteForm;
use crate::error::Result;
use crate::matrix::IntMatrix;

/// A basis of `ker_Z(A) = {x in Z^n : A x = 0}` of `n - rank(A)` short vectors, LLL-reduced
/// with δ = 3/4 in exact arithmetic.
///
/// # Errors
/// [`crate::Error::Overflow`] when an entry does not fit in `i64`.
pub fn reduced_kernel_basis(a: &IntMatrix) -> Result<Vec<Vec<i64>>> {
    HermiteForm::new(a)
        .reduced_kernel()
        .iter()
        .enumerate()
        .map(|(k, v)| to_i64_vec(v, &format!("reduced kernel basis vector {k}")))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_single_equation_with_large_coefficients_gets_short_moves() {
        // 1000 x - 999 y - z = 0: the moves (1, 1, 1) and (0, 1, -999) span the kernel (by
        // hand: z = 1000 x - 999 y); reduction must find a basis whose first vector has norm
        // at most that of (1, 1, 1) up to the LLL factor 2^((d-1)/2) (Lenstra, Lenstra,
        // Lovász 1982, Prop. 1.11): squared length at most 2 * 3.
        let a = IntMatrix::from_rows(&[vec![1000, -999, -1]]).unwrap();
        let basis = reduced_kernel_basis(&a).unwrap();
        assert_eq!(basis.len(), 2);
        let norm2: i64 = basis[0].iter().map(|v| v * v).sum();
        assert!(norm2 <= 6, "{basis:?}");
        for v in &basis {
            assert_eq!(a.mul_vec(v), Some(vec![0]));
        }
    }
}
