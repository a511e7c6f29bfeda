//! Small dense least squares on the stack: Householder QR, the parameter covariance from
//! R, and the condition number from the singular values of R (one-sided Jacobi).
//!
//! Sizes are fixed: at most [`MAX_ROWS`] observations and [`MAX_COLS`] parameters, the
//! largest a station network and the full quadratic need. No allocation, no panics: an
//! out-of-shape call returns `None`.

// Matrix code reads best with explicit indices.
#![allow(clippy::needless_range_loop)]

use libm::sqrt;

/// Largest number of rows (observations).
pub const MAX_ROWS: usize = 32;
/// Largest number of columns (parameters).
pub const MAX_COLS: usize = 6;

/// A weighted least-squares problem, min ‖A c − b‖², rows already multiplied by √w.
#[derive(Debug, Clone)]
pub struct LeastSquares {
    a: [[f64; MAX_COLS]; MAX_ROWS],
    b: [f64; MAX_ROWS],
    rows: usize,
    cols: usize,
}

/// The solution of a least-squares problem.
#[derive(Debug, Clone, Copy)]
pub struct Solution {
    /// Parameters c (first `cols` entries used).
    pub params: [f64; MAX_COLS],
    /// Covariance (AᵀA)⁻¹ of the parameters (first `cols`×`cols` used).
    pub cov: [[f64; MAX_COLS]; MAX_COLS],
    /// Residual sum of squares ‖A c − b‖² (of the weighted rows).
    pub rss: f64,
    /// 2-norm condition number of A after scaling its columns to unit length.
    pub condition: f64,
    /// Number of parameters.
    pub cols: usize,
}

impl LeastSquares {
    /// An empty problem with `cols` parameters (`None` if `cols` is 0 or too many).
    pub fn new(cols: usize) -> Option<Self> {
        if cols == 0 || cols > MAX_COLS {
            return None;
        }
        Some(LeastSquares {
            a: [[0.0; MAX_COLS]; MAX_ROWS],
            b: [0.0; MAX_ROWS],
            rows: 0,
            cols,
        })
    }

    /// Add one row `row · c ≈ rhs` with weight `w` (= 1/σ²). `None` when full.
    pub fn push(&mut self, row: &[f64], rhs: f64, w: f64) -> Option<()> {
        if self.rows >= MAX_ROWS || row.len() != self.cols || w.is_nan() || w <= 0.0 {
            return None;
        }
        let s = sqrt(w);
        for (dst, &v) in self.a[self.rows].iter_mut().zip(row) {
            *dst = v * s;
        }
        self.b[self.rows] = rhs * s;
        self.rows += 1;
        Some(())
    }

    /// Rows so far.
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Solve by Householder QR. `None` when there are fewer rows than columns or R is
    /// exactly singular (the caller then reports the geometry via the condition number).
    pub fn solve(&self) -> Option<Solution> {
        let (m, n) = (self.rows, self.cols);
        if m < n {
            return None;
        }
        let mut a = self.a;
        let mut b = self.b;
        // Column scaling for the condition number only; the solve uses the raw columns
        // (Householder QR is invariant to it in exact arithmetic and stable without it).
        let mut colnorm = [0.0; MAX_COLS];
        for (j, cn) in colnorm.iter_mut().enumerate().take(n) {
            *cn = sqrt((0..m).map(|i| a[i][j] * a[i][j]).sum::<f64>());
            if *cn == 0.0 {
                return None;
            }
        }
        for k in 0..n {
            let norm = sqrt((k..m).map(|i| a[i][k] * a[i][k]).sum::<f64>());
            if norm == 0.0 {
                return None;
            }
            let alpha = if a[k][k] > 0.0 { -norm } else { norm };
            // v = x − alpha e1, stored in place below the diagonal.
            let mut v = [0.0; MAX_ROWS];
            for i in k..m {
                v[i] = a[i][k];
            }
            v[k] -= alpha;
            let vnorm2: f64 = (k..m).map(|i| v[i] * v[i]).sum();
            if vnorm2 > 0.0 {
                for j in k..n {
                    let dot: f64 = (k..m).map(|i| v[i] * a[i][j]).sum();
                    let s = 2.0 * dot / vnorm2;
                    for i in k..m {
                        a[i][j] -= s * v[i];
                    }
                }
                let dot: f64 = (k..m).map(|i| v[i] * b[i]).sum();
                let s = 2.0 * dot / vnorm2;
                for i in k..m {
                    b[i] -= s * v[i];
                }
            }
        }
        // R is the upper n×n block of a; Qᵀb is b.
        let mut r = [[0.0; MAX_COLS]; MAX_COLS];
        for i in 0..n {
            for j in i..n {
                r[i][j] = a[i][j];
            }
            if r[i][i] == 0.0 || !r[i][i].is_finite() {
                return None;
            }
        }
        let mut c = [0.0; MAX_COLS];
        for i in (0..n).rev() {
            let s: f64 = ((i + 1)..n).map(|j| r[i][j] * c[j]).sum();
            c[i] = (b[i] - s) / r[i][i];
        }
        let rss: f64 = (n..m).map(|i| b[i] * b[i]).sum();
        // R⁻¹ (upper triangular), then cov = R⁻¹ R⁻ᵀ.
        let mut rinv = [[0.0; MAX_COLS]; MAX_COLS];
        for j in 0..n {
            rinv[j][j] = 1.0 / r[j][j];
            for i in (0..j).rev() {
                let s: f64 = ((i + 1)..=j).map(|k| r[i][k] * rinv[k][j]).sum();
                rinv[i][j] = -s / r[i][i];
            }
        }
        let mut cov = [[0.0; MAX_COLS]; MAX_COLS];
        for i in 0..n {
            for j in 0..n {
                cov[i][j] = (i.max(j)..n).map(|k| rinv[i][k] * rinv[j][k]).sum();
            }
        }
        // Condition of the column-scaled A = singular values of R D⁻¹.
        let mut rs = [[0.0; MAX_COLS]; MAX_COLS];
        for i in 0..n {
            for j in i..n {
                rs[i][j] = r[i][j] / colnorm[j];
            }
        }
        let condition = condition_number(&rs, n);
        if !c[..n].iter().all(|x| x.is_finite()) {
            return None;
        }
        Some(Solution {
            params: c,
            cov,
            rss,
            condition,
            cols: n,
        })
    }
}

impl Solution {
    /// Value of the linear combination gᵀc.
    pub fn combine(&self, g: &[f64]) -> f64 {
        g.iter()
            .zip(&self.params[..self.cols])
            .map(|(a, b)| a * b)
            .sum()
    }

    /// Variance of the linear combination gᵀc: gᵀ C g.
    ///
    /// C is symmetric, so each pair i < j is taken once, doubled, and zero entries of g
    /// (most combinations pick one or two parameters) are skipped: 21 products at most
    /// for six parameters instead of 36, which the device does in software f64.
    pub fn variance(&self, g: &[f64]) -> f64 {
        let n = self.cols.min(g.len());
        let mut v = 0.0;
        for i in 0..n {
            if g[i] == 0.0 {
                continue;
            }
            let mut s = 0.0;
            for j in (i + 1)..n {
                if g[j] != 0.0 {
                    s += self.cov[i][j] * g[j];
                }
            }
            v += g[i] * (g[i] * self.cov[i][i] + 2.0 * s);
        }
        v.max(0.0)
    }
}

/// 2-norm condition number of the n×n matrix `m` (one-sided Jacobi SVD). Infinite when
/// a singular value vanishes.
fn condition_number(m: &[[f64; MAX_COLS]; MAX_COLS], n: usize) -> f64 {
    // Work on columns of U = M; rotate pairs until they are orthogonal.
    let mut u = *m;
    for _sweep in 0..60 {
        let mut off = 0.0f64;
        for p in 0..n {
            for q in (p + 1)..n {
                let (mut alpha, mut beta, mut gamma) = (0.0, 0.0, 0.0);
                for row in u.iter().take(n) {
                    alpha += row[p] * row[p];
                    beta += row[q] * row[q];
                    gamma += row[p] * row[q];
                }
                if gamma == 0.0 {
                    continue;
                }
                off = off.max(gamma.abs() / sqrt(alpha * beta));
                let zeta = (beta - alpha) / (2.0 * gamma);
                let t = zeta.signum() / (zeta.abs() + sqrt(1.0 + zeta * zeta));
                let t = if zeta == 0.0 { 1.0 } else { t };
                let c = 1.0 / sqrt(1.0 + t * t);
                let s = c * t;
                for row in u.iter_mut().take(n) {
                    let (up, uq) = (row[p], row[q]);
                    row[p] = c * up - s * uq;
                    row[q] = s * up + c * uq;
                }
            }
        }
        // The column norms' error is of the order of the square of the largest
        // remaining cosine, so 1e-8 already gives them to ~1e-16: further sweeps would
        // only cost time (each about 150 000 instructions on the device's soft f64).
        if off < 1e-8 {
            break;
        }
    }
    let mut smax = 0.0f64;
    let mut smin = f64::INFINITY;
    for j in 0..n {
        let s = sqrt((0..n).map(|i| u[i][j] * u[i][j]).sum::<f64>());
        smax = smax.max(s);
        smin = smin.min(s);
    }
    if smin > 0.0 {
        smax / smin
    } else {
        f64::INFINITY
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn exact_line_fit() {
        let mut ls = LeastSquares::new(2).unwrap();
        for x in 0..5 {
            let x = x as f64;
            ls.push(&[1.0, x], 3.0 + 2.0 * x, 1.0).unwrap();
        }
        let s = ls.solve().unwrap();
        assert_relative_eq!(s.params[0], 3.0, epsilon = 1e-12);
        assert_relative_eq!(s.params[1], 2.0, epsilon = 1e-12);
        assert!(s.rss < 1e-20);
        // Covariance of a straight-line fit at x = 0..4, unit weights (textbook OLS):
        // var(slope) = 1/Σ(x − x̄)² = 1/10.
        assert_relative_eq!(s.cov[1][1], 0.1, epsilon = 1e-12);
    }

    #[test]
    fn singular_and_short_problems_are_none() {
        let mut ls = LeastSquares::new(2).unwrap();
        ls.push(&[1.0, 1.0], 1.0, 1.0).unwrap();
        assert!(ls.solve().is_none());
        ls.push(&[2.0, 2.0], 2.0, 1.0).unwrap();
        let s = ls.solve();
        assert!(s.is_none() || s.unwrap().condition > 1e12);
        assert!(LeastSquares::new(0).is_none());
        assert!(LeastSquares::new(7).is_none());
        let mut ls = LeastSquares::new(1).unwrap();
        assert!(ls.push(&[1.0], 1.0, 0.0).is_none());
        assert!(ls.push(&[1.0, 2.0], 1.0, 1.0).is_none());
    }

    #[test]
    fn variance_is_the_full_quadratic_form() {
        // gᵀ C g summed over every i, j (the textbook form) against the symmetric,
        // zero-skipping sum, on a fitted quadratic's covariance.
        let mut ls = LeastSquares::new(6).unwrap();
        for i in 0..12 {
            let (x, y) = ((i as f64 * 0.7).sin() * 3.0, (i as f64 * 1.3).cos() * 2.0);
            ls.push(&[1.0, x, y, x * x, x * y, y * y], 5600.0 + x, 0.01)
                .unwrap();
        }
        let s = ls.solve().unwrap();
        for g in [
            [1.0, 0.5, -2.0, 0.25, 1.5, -0.75],
            [0.0, 0.0, 1.0, 0.0, 0.0, 0.0],
            [0.0, 0.0, 0.0, 2.0, 0.0, 2.0],
            [0.0, -3.0, 0.0, 0.0, 0.0, 0.0],
        ] {
            let mut full = 0.0;
            for i in 0..6 {
                for j in 0..6 {
                    full += g[i] * s.cov[i][j] * g[j];
                }
            }
            assert_relative_eq!(s.variance(&g), full, max_relative = 1e-12);
        }
    }

    #[test]
    fn condition_of_a_diagonal_matrix() {
        // Orthogonal columns of lengths 1 and 100: scaled, the condition is 1.
        let mut ls = LeastSquares::new(2).unwrap();
        ls.push(&[1.0, 0.0], 1.0, 1.0).unwrap();
        ls.push(&[0.0, 100.0], 1.0, 1.0).unwrap();
        let s = ls.solve().unwrap();
        assert_relative_eq!(s.condition, 1.0, epsilon = 1e-12);
        let mut m = [[0.0; MAX_COLS]; MAX_COLS];
        m[0][0] = 1.0;
        m[1][1] = 1e-3;
        assert_relative_eq!(condition_number(&m, 2), 1e3, max_relative = 1e-12);
    }
}
