//! A square matrix stored by its band, and Gaussian elimination with partial pivoting in
//! that band: the Jacobian of a network whose links join nodes at most `kl` apart
//! ([`super::Network::bandwidth`]).
//!
//! Storage follows LAPACK's general band layout (Anderson et al., *LAPACK Users' Guide*,
//! 3rd ed., 1999, §5.3.3 and routine `dgbtrf`): column-major, `3·kl + 1` rows per column,
//! entry (i, j) at row `2·kl + i − j` of column j. The top `kl` rows hold the fill-in that
//! row interchanges create (the upper band widens from `kl` to `2·kl` under pivoting). A
//! tridiagonal network (`kl` = 1) keeps 4 numbers per node instead of n, so clearing,
//! copying and eliminating cost O(n) rather than O(n²).

/// Where entry (i, j) of a [`BandMatrix`] sits in its storage: 2·kl + i − j + j·ld =
/// 2·kl + i + j·(ld − 1).
#[derive(Debug, Clone, Copy)]
pub(crate) struct BandIndex {
    offset: usize,
    step: usize,
}

impl BandIndex {
    /// Storage position of entry (i, j).
    #[inline(always)]
    pub(crate) fn at(self, i: usize, j: usize) -> usize {
        debug_assert!(
            i.abs_diff(j) <= self.offset / 2,
            "({i}, {j}) outside the band"
        );
        self.offset + i + j * self.step
    }
}

/// A square matrix of order `n` with `kl` sub- and super-diagonals, plus room for the
/// fill-in of pivoting.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct BandMatrix {
    n: usize,
    kl: usize,
    /// Rows per stored column, 3·kl + 1.
    ld: usize,
    ab: Vec<f64>,
}

impl BandMatrix {
    /// A zero matrix of order `n` with half-bandwidth `kl` (clamped to n − 1, which is
    /// dense).
    pub(crate) fn zeros(n: usize, kl: usize) -> Self {
        let kl = kl.min(n.saturating_sub(1));
        let ld = 3 * kl + 1;
        BandMatrix {
            n,
            kl,
            ld,
            ab: vec![0.0; ld * n],
        }
    }

    /// Position of entry (i, j) in the storage; requires |i − j| ≤ kl below the diagonal
    /// and j − i ≤ 2·kl above it.
    #[inline(always)]
    fn at(&self, i: usize, j: usize) -> usize {
        2 * self.kl + i + j * (self.ld - 1)
    }

    /// Set every entry to zero.
    pub(crate) fn clear(&mut self) {
        self.ab.fill(0.0);
    }

    /// Add `v` to entry (i, j). Entries outside the band are a caller's error: they panic
    /// in debug builds and are never written (the network guarantees |i − j| ≤ kl).
    #[cfg(test)]
    pub(crate) fn add(&mut self, i: usize, j: usize, v: f64) {
        debug_assert!(i.abs_diff(j) <= self.kl && i < self.n && j < self.n);
        let k = self.at(i, j);
        self.ab[k] += v;
    }

    /// The storage and its index map, for filling many entries in a hot loop without
    /// re-reading the shape for each (the caller keeps to the band, as for [`Self::add`]).
    #[inline(always)]
    pub(crate) fn parts(&mut self) -> (BandIndex, &mut [f64]) {
        (
            BandIndex {
                offset: 2 * self.kl,
                step: self.ld - 1,
            },
            &mut self.ab,
        )
    }

    /// Entry (i, j); zero outside the band.
    pub(crate) fn get(&self, i: usize, j: usize) -> f64 {
        if i >= self.n || j >= self.n || i > j + self.kl || j > i + self.kl {
            return 0.0;
        }
        self.ab[self.at(i, j)]
    }

    /// Copy `other` (of the same shape) into this matrix.
    pub(crate) fn copy_from(&mut self, other: &BandMatrix) {
        if self.ab.len() == other.ab.len() {
            self.ab.copy_from_slice(&other.ab);
        } else {
            self.clone_from(other);
        }
    }

    /// Solve A·x = b in place (`b` becomes x), destroying A: Gaussian elimination with
    /// partial pivoting restricted to the band (LAPACK `dgbtrf`/`dgbtrs` in one pass).
    /// Returns false when `b` has the wrong length, an entry is NaN or infinite, or a pivot
    /// is below 1e-14 of the largest entry (singular to working precision).
    pub(crate) fn solve_in_place(&mut self, b: &mut [f64]) -> bool {
        let (n, kl, ld) = (self.n, self.kl, self.ld);
        if b.len() != n {
            return false;
        }
        if n == 0 {
            return true;
        }
        let a = &mut self.ab;
        // Largest magnitude (a NaN fails the finiteness test below: `>` is false for it,
        // so it is tracked separately).
        let mut amax = 0.0_f64;
        let mut nan = false;
        for v in a.iter() {
            let v = v.abs();
            nan |= v.is_nan();
            if v > amax {
                amax = v;
            }
        }
        if nan || !(amax.is_finite() && amax > 0.0) {
            return false;
        }
        let tiny = amax * 1e-14;
        if kl == 1 {
            return tridiagonal_solve(a, b, tiny);
        }
        // Entry (i, j) at 2kl + i − j + j·ld; within column k the rows below the diagonal
        // follow it directly, and along row k one column right is ld − 1 further on.
        // (Exclusive ranges throughout: inclusive ones cost a flag test per turn.)
        let step = ld - 1;
        for k in 0..n {
            let rows = kl.min(n - 1 - k) + 1;
            let cols = (2 * kl).min(n - 1 - k) + 1;
            let dk = 2 * kl + k * ld;
            let mut p = 0;
            let mut best = a[dk].abs();
            for i in 1..rows {
                let v = a[dk + i].abs();
                if v > best {
                    best = v;
                    p = i;
                }
            }
            if best <= tiny {
                return false;
            }
            if p != 0 {
                // Swap rows k and k + p over columns k … k + cols − 1.
                for j in 0..cols {
                    let at_k = dk + j * step;
                    a.swap(at_k, at_k + p);
                }
                b.swap(k, k + p);
            }
            let piv = a[dk];
            for i in 1..rows {
                let f = a[dk + i] / piv;
                if f != 0.0 {
                    for j in 1..cols {
                        let at_k = dk + j * step;
                        a[at_k + i] -= f * a[at_k];
                    }
                    b[k + i] -= f * b[k];
                }
            }
        }
        for k in (0..n).rev() {
            let dk = 2 * kl + k * ld;
            let mut s = b[k];
            for j in 1..(2 * kl).min(n - 1 - k) + 1 {
                s -= a[dk + j * step] * b[k + j];
            }
            b[k] = s / a[dk];
        }
        true
    }
}

/// The band solve for one sub- and one super-diagonal (`kl` = 1, 4 stored rows per column:
/// second super-diagonal (fill-in), super-diagonal, diagonal, sub-diagonal), written out:
/// the same elimination with partial pivoting as the general loop, as LAPACK's `dgtsv`
/// does it for tridiagonal systems.
fn tridiagonal_solve(a: &mut [f64], b: &mut [f64], tiny: f64) -> bool {
    let n = b.len();
    if a.len() != 4 * n {
        return false;
    }
    for k in 0..n {
        // (k, k) at 2 + 4k; (k + 1, k) one below; (k, k + 1) at +3, (k + 1, k + 1) at +4;
        // (k, k + 2) at +6, (k + 1, k + 2) at +7.
        let dk = 2 + 4 * k;
        if k + 1 == n {
            if a[dk].abs() <= tiny {
                return false;
            }
            break;
        }
        if a[dk + 1].abs() > a[dk].abs() {
            a.swap(dk, dk + 1);
            a.swap(dk + 3, dk + 4);
            if k + 2 < n {
                a.swap(dk + 6, dk + 7);
            }
            b.swap(k, k + 1);
        }
        let piv = a[dk];
        if piv.abs() <= tiny {
            return false;
        }
        let f = a[dk + 1] / piv;
        if f != 0.0 {
            a[dk + 4] -= f * a[dk + 3];
            if k + 2 < n {
                a[dk + 7] -= f * a[dk + 6];
            }
            b[k + 1] -= f * b[k];
        }
    }
    for k in (0..n).rev() {
        let dk = 2 + 4 * k;
        let mut s = b[k];
        if k + 1 < n {
            s -= a[dk + 3] * b[k + 1];
        }
        if k + 2 < n {
            s -= a[dk + 6] * b[k + 2];
        }
        b[k] = s / a[dk];
    }
    true
}

#[cfg(test)]
mod tests {
    use super::BandMatrix;

    /// A deterministic, pivoting-heavy band matrix: small diagonal, larger neighbours.
    #[allow(clippy::needless_range_loop)] // (i, j) index both the band and the dense copy
    fn sample(n: usize, kl: usize) -> (BandMatrix, Vec<Vec<f64>>) {
        let mut m = BandMatrix::zeros(n, kl);
        let mut dense = vec![vec![0.0; n]; n];
        let mut seed = 12345_u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
        };
        for i in 0..n {
            for j in i.saturating_sub(kl)..=(i + kl).min(n - 1) {
                let v = if i == j { 0.01 * next() } else { next() };
                m.add(i, j, v);
                dense[i][j] += v;
            }
        }
        (m, dense)
    }

    #[test]
    #[allow(clippy::needless_range_loop)] // (i, j) index both the band and the dense copy
    fn band_solve_matches_the_matrix_product() {
        // The solution x of A·x = b must give back b when multiplied by A (tolerance 1e-10
        // relative: round-off of a well-conditioned 30 × 30 elimination; a defining
        // identity, no outside source needed).
        for (n, kl) in [(1, 0), (2, 1), (7, 1), (30, 1), (30, 2), (12, 11), (5, 9)] {
            let (mut m, dense) = sample(n, kl);
            for i in 0..n {
                for j in 0..n {
                    assert_eq!(m.get(i, j).to_bits(), dense[i][j].to_bits());
                }
            }
            let b: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
            let mut x = b.clone();
            assert!(m.solve_in_place(&mut x), "n {n} kl {kl}");
            for i in 0..n {
                let ax: f64 = (0..n).map(|j| dense[i][j] * x[j]).sum();
                assert!(
                    (ax - b[i]).abs() < 1e-10 * b[i].abs().max(1.0),
                    "n {n} kl {kl}"
                );
            }
        }
    }

    #[test]
    fn singular_and_non_finite_matrices_are_refused() {
        let mut zero = BandMatrix::zeros(3, 1);
        assert!(!zero.solve_in_place(&mut [1.0, 2.0, 3.0]));
        let (mut m, _) = sample(4, 1);
        m.add(1, 1, f64::NAN);
        assert!(!m.solve_in_place(&mut [1.0; 4]));
        let (mut wrong, _) = sample(4, 1);
        assert!(!wrong.solve_in_place(&mut [1.0; 3]));
        // Two equal rows: singular.
        let mut twin = BandMatrix::zeros(2, 1);
        for (i, j) in [(0, 0), (0, 1), (1, 0), (1, 1)] {
            twin.add(i, j, 1.0);
        }
        assert!(!twin.solve_in_place(&mut [1.0, 1.0]));
    }
}
