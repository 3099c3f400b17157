//! Cholesky factor of the free (passive) block of the Gram matrix, grown and shrunk one variable at a time.
//!
//! Q_FF = L·Lᵀ with L lower triangular, rows in the order variables were added.
//! Appending costs O(k²) (one forward solve); removing costs O(k²) (Givens rotations).

/// Result of trying to append a variable.
pub(crate) enum Append {
    /// The variable is now free.
    Added,
    /// Its column is numerically dependent on the free ones; `null` holds d_P with
    /// Q_PP·d_P = −Q_Pj (so (d_P, 1) is a null direction of the enlarged block).
    Dependent { null: Vec<f64> },
}

/// Relative pivot threshold: a new pivot below this fraction of the column's own diagonal
/// means the column is (numerically) a combination of the free ones.
const DEPENDENCE: f64 = 1e-11;

#[derive(Clone, Debug, Default)]
pub(crate) struct Factor {
    /// Variables in factor order.
    pub order: Vec<usize>,
    /// Row-major lower triangle, `cap` columns per row.
    l: Vec<f64>,
    cap: usize,
}

impl Factor {
    pub fn new(cap: usize) -> Self {
        Factor {
            order: Vec::with_capacity(cap),
            l: vec![0.0; cap * cap],
            cap,
        }
    }

    pub fn len(&self) -> usize {
        self.order.len()
    }

    pub fn clear(&mut self) {
        self.order.clear();
    }

    fn at(&self, r: usize, c: usize) -> f64 {
        self.l[r * self.cap + c]
    }

    /// Forward solve L·y = b in place (b in factor order).
    pub fn forward(&self, b: &mut [f64]) {
        for r in 0..b.len() {
            let row = &self.l[r * self.cap..r * self.cap + r];
            let s: f64 = row.iter().zip(&b[..r]).map(|(a, v)| a * v).sum();
            b[r] = (b[r] - s) / self.at(r, r);
        }
    }

    /// Back solve Lᵀ·x = y in place.
    pub fn backward(&self, y: &mut [f64]) {
        let k = y.len();
        for r in (0..k).rev() {
            let v = y[r] / self.at(r, r);
            y[r] = v;
            for (c, yc) in y.iter_mut().enumerate().take(r) {
                *yc -= self.l[r * self.cap + c] * v;
            }
        }
    }

    /// Solves Q_FF·x = b in place.
    pub fn solve(&self, b: &mut [f64]) {
        self.forward(b);
        self.backward(b);
    }

    /// Tries to append variable `j` with column `col` (Q_Pj for P = current order) and diagonal `diag`.
    pub fn append(&mut self, j: usize, col: &[f64], diag: f64) -> Append {
        let k = self.len();
        let mut l = col.to_vec();
        self.forward(&mut l);
        let d2 = diag - l.iter().map(|v| v * v).sum::<f64>();
        if d2.is_nan() || d2 <= DEPENDENCE * diag || diag <= 0.0 {
            let mut null = l;
            self.backward(&mut null);
            null.iter_mut().for_each(|v| *v = -*v);
            return Append::Dependent { null };
        }
        let base = k * self.cap;
        self.l[base..base + k].copy_from_slice(&l);
        self.l[base + k] = d2.sqrt();
        self.order.push(j);
        Append::Added
    }

    /// Appends variable `j` whose new squared pivot `d2` (the squared norm of its column's part
    /// outside the span of the others) the caller has computed more accurately than the
    /// subtraction in [`Factor::append`] would; `col` as there.
    pub fn append_pivot(&mut self, j: usize, col: &[f64], d2: f64) {
        let k = self.len();
        let mut l = col.to_vec();
        self.forward(&mut l);
        let base = k * self.cap;
        self.l[base..base + k].copy_from_slice(&l);
        self.l[base + k] = d2.sqrt();
        self.order.push(j);
    }

    /// Removes the variable at factor position `p`.
    pub fn remove(&mut self, p: usize) {
        let k = self.len();
        let cap = self.cap;
        // Drop row p; rows below shift up and gain one entry right of the diagonal.
        for r in p..k - 1 {
            let (dst, src) = (r * cap, (r + 1) * cap);
            self.l.copy_within(src..src + r + 2, dst);
        }
        let kn = k - 1;
        for c in p..kn {
            let a = self.l[c * cap + c];
            let b = self.l[c * cap + c + 1];
            let r = a.hypot(b);
            let (cs, sn) = if r == 0.0 { (1.0, 0.0) } else { (a / r, b / r) };
            for i in c..kn {
                let x = self.l[i * cap + c];
                let y = self.l[i * cap + c + 1];
                self.l[i * cap + c] = cs * x + sn * y;
                self.l[i * cap + c + 1] = -sn * x + cs * y;
            }
            if self.l[c * cap + c] < 0.0 {
                for i in c..kn {
                    self.l[i * cap + c] = -self.l[i * cap + c];
                }
            }
        }
        self.order.remove(p);
    }

    /// Position of variable `j` in factor order.
    pub fn position(&self, j: usize) -> Option<usize> {
        self.order.iter().position(|&v| v == j)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spd(n: usize) -> Vec<Vec<f64>> {
        // A Lehmer matrix: symmetric positive definite, min(i,j)/max(i,j).
        (0..n)
            .map(|i| {
                (0..n)
                    .map(|j| ((i.min(j) + 1) as f64) / ((i.max(j) + 1) as f64))
                    .collect()
            })
            .collect()
    }

    fn build(q: &[Vec<f64>], vars: &[usize]) -> Factor {
        let mut f = Factor::new(q.len());
        for &j in vars {
            let col: Vec<f64> = f.order.iter().map(|&i| q[i][j]).collect();
            assert!(matches!(f.append(j, &col, q[j][j]), Append::Added));
        }
        f
    }

    fn check_solves(f: &Factor, q: &[Vec<f64>]) {
        let k = f.len();
        let x_true: Vec<f64> = (0..k).map(|i| 1.0 + i as f64).collect();
        let mut b: Vec<f64> = (0..k)
            .map(|r| (0..k).map(|c| q[f.order[r]][f.order[c]] * x_true[c]).sum())
            .collect();
        f.solve(&mut b);
        for (a, e) in b.iter().zip(&x_true) {
            assert!((a - e).abs() < 1e-9, "{a} vs {e}");
        }
    }

    #[test]
    fn append_and_remove_keep_the_factor_exact() {
        let q = spd(7);
        let mut f = build(&q, &[3, 0, 6, 1, 5]);
        check_solves(&f, &q);
        f.remove(1);
        check_solves(&f, &q);
        f.remove(0);
        check_solves(&f, &q);
        let col: Vec<f64> = f.order.iter().map(|&i| q[i][2]).collect();
        assert!(matches!(f.append(2, &col, q[2][2]), Append::Added));
        check_solves(&f, &q);
        f.remove(f.len() - 1);
        check_solves(&f, &q);
    }

    #[test]
    fn duplicate_column_is_reported_dependent_with_its_null_direction() {
        // Gram of columns a, a (duplicate): [[1,1],[1,1]].
        let q = vec![vec![1.0, 1.0], vec![1.0, 1.0]];
        let mut f = build(&q, &[0]);
        match f.append(1, &[q[0][1]], q[1][1]) {
            Append::Dependent { null } => assert!((null[0] + 1.0).abs() < 1e-12),
            Append::Added => panic!("duplicate column accepted"),
        }
    }
}
