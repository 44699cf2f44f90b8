//! The step between the ℓ1 norms of kernel vectors.
//!
//! `|x_i| ≡ x_i (mod 2)`, so `||x||_1 ≡ Σ x_i (mod 2)`, and the entry sum is linear: every
//! vector of `ker_Z(A)` has even ℓ1 norm exactly when every vector of a basis of it has an even
//! entry sum (equivalently, the all-ones vector lies in the row space of `A` modulo 2). Then
//! no move has odd norm, and a norm limit `2k + 1` keeps the same set as `2k`. Tables with 0/1
//! line sums (every row a 0/1 vector, every column in two or more rows) are the common case.

use crate::error::Result;
use crate::lattice::reduced_kernel_basis;
use crate::matrix::IntMatrix;

/// 2 when every vector of `ker_Z(a)` has even ℓ1 norm, otherwise 1.
pub fn norm_step(a: &IntMatrix) -> Result<u64> {
    let basis = reduced_kernel_basis(a)?;
    let even = basis
        .iter()
        .all(|b| b.iter().map(|&x| x.rem_euclid(2)).sum::<i64>() % 2 == 0);
    Ok(if even { 2 } else { 1 })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn transport_tables_have_even_norms_and_a_knapsack_row_does_not() {
        // The 2 x 2 transport matrix: its kernel is spanned by (1, -1, -1, 1), norm 4.
        let transport = IntMatrix::from_rows(&[
            vec![1, 1, 0, 0],
            vec![0, 0, 1, 1],
            vec![1, 0, 1, 0],
            vec![0, 1, 0, 1],
        ])
        .unwrap();
        assert_eq!(norm_step(&transport).unwrap(), 2);
        // The single row (1, 2, 3): its kernel holds (2, -1, 0), of norm 3.
        let odd = IntMatrix::from_rows(&[vec![1, 2, 3]]).unwrap();
        assert_eq!(norm_step(&odd).unwrap(), 1);
    }
}
