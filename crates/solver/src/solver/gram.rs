//! The cache behind warm solves: the Gram matrix, b and Σ w·t² of the cells outside their bands,
//! kept in line with the specification and the classes by low-rank corrections, rebuilt when
//! that is cheaper or rounding is due a refresh.

use super::classes::{Change, Class, classify, contribution};
use super::{DwellSolver, REBUILD_AFTER};
use crate::kkt;
use crate::problem::Spec;
use nalgebra::DMatrix;

impl DwellSolver {
    pub(super) fn negated(&mut self, spec: &Spec, c: usize) -> Change {
        let old = contribution(self.class[c], spec.weights[c], spec.lo[c], spec.hi[c]);
        let w = spec.weights[c];
        let a = self.rates.matrix();
        for j in 0..self.rates.configs() {
            self.colnorm2[j] -= w * a[(c, j)] * a[(c, j)];
        }
        Change::between(c, old, (0.0, 0.0, 0.0))
    }

    /// Brings the cached classification, Gram matrix and b in line with `spec` by diffing against the last one.
    /// `changed` lists the cells that may differ from the last specification (unused on the first
    /// call, which builds the cache).
    pub(super) fn sync_spec(&mut self, spec: &Spec, changed: &[usize]) {
        let Some(old) = self.spec.take() else {
            self.rebuild(spec);
            self.spec = Some(spec.clone());
            self.y_scale = kkt::target_scale(spec);
            return;
        };
        let n = self.rates.configs();
        let mut changes = Vec::new();
        for &i in changed {
            let same = old.lo[i] == spec.lo[i]
                && old.hi[i] == spec.hi[i]
                && old.weights[i] == spec.weights[i];
            if same {
                continue;
            }
            let before = contribution(self.class[i], old.weights[i], old.lo[i], old.hi[i]);
            // Only band cells need the prediction to be classified.
            let z = if spec.lo[i] != spec.hi[i] {
                self.z_at(i, &self.vars.x)
            } else {
                0.0
            };
            let class = classify(z, spec.lo[i], spec.hi[i]);
            let after = contribution(class, spec.weights[i], spec.lo[i], spec.hi[i]);
            self.class[i] = class;
            let dw = spec.weights[i] - old.weights[i];
            if dw != 0.0 {
                for j in 0..n {
                    let aij = self.rates.get(i, j);
                    self.colnorm2[j] += dw * aij * aij;
                }
            }
            changes.push(Change::between(i, before, after));
        }
        self.apply_changes(&changes, spec);
        // Keep our copy without reallocating (the common case: same sizes).
        let mut kept = old;
        kept.clone_from(spec);
        self.spec = Some(kept);
        self.y_scale = kkt::target_scale(spec);
    }

    /// Builds the Gram matrix and b of the active cells from scratch.
    pub(super) fn rebuild(&mut self, spec: &Spec) {
        if spec.lo != spec.hi {
            self.ensure_z();
        }
        let (m, n) = (self.rates.cells(), self.rates.configs());
        let a = self.rates.matrix();
        for i in 0..m {
            self.class[i] = classify(self.z[i], spec.lo[i], spec.hi[i]);
        }
        let active: Vec<usize> = (0..m).filter(|&i| self.class[i] != Class::Inside).collect();
        let parts: Vec<(f64, f64, f64)> = active
            .iter()
            .map(|&i| contribution(self.class[i], spec.weights[i], spec.lo[i], spec.hi[i]))
            .collect();
        if active.len() == m && parts.iter().all(|p| p.0 == 1.0) {
            // Every cell active with unit weight (point targets, the common case): G = AᵀA straight
            // from A, b = Aᵀt by one product, no copy of A.
            self.gram = gram_of(a);
            let t = nalgebra::DVector::from_iterator(m, parts.iter().map(|p| p.1));
            let b = a.tr_mul(&t);
            self.b.copy_from_slice(b.as_slice());
            self.yy = parts.iter().map(|p| p.2).sum();
            self.colnorm2 = (0..n).map(|j| self.gram[(j, j)]).collect();
            self.updates_since_rebuild = 0;
            self.vars.factor_valid = false;
            return;
        }
        // One product gives everything: with B = [W½·A_active, W½·t], BᵀB holds the Gram matrix
        // (top left), b = AᵀW·t (last column) and Σ w·t² (corner).
        let mut ext = DMatrix::zeros(active.len(), n + 1);
        let root_w: Vec<f64> = parts.iter().map(|p| p.0.sqrt()).collect();
        let all_active = active.len() == m;
        for j in 0..n {
            let col = a.column(j);
            let col = col.as_slice();
            let mut out_col = ext.column_mut(j);
            let out = out_col.as_mut_slice();
            if all_active {
                for ((o, &c), &r) in out.iter_mut().zip(col).zip(&root_w) {
                    *o = r * c;
                }
            } else {
                for ((o, &i), &r) in out.iter_mut().zip(&active).zip(&root_w) {
                    *o = r * col[i];
                }
            }
        }
        for (r, p) in parts.iter().enumerate() {
            // √w·t = (w·t)/√w; every active cell has w > 0.
            ext[(r, n)] = p.1 / root_w[r];
        }
        let full = gram_of(&ext);
        self.gram = full.view((0, 0), (n, n)).into_owned();
        for j in 0..n {
            self.b[j] = full[(j, n)];
        }
        self.yy = full[(n, n)];
        // Σ over all cells of w·a²: the Gram diagonal plus the cells inside their bands.
        for j in 0..n {
            self.colnorm2[j] = self.gram[(j, j)];
        }
        for i in (0..m).filter(|&i| self.class[i] == Class::Inside) {
            for j in 0..n {
                let v = a[(i, j)];
                self.colnorm2[j] += spec.weights[i] * v * v;
            }
        }
        self.updates_since_rebuild = 0;
        self.vars.factor_valid = false;
    }

    /// Applies contribution changes as one low-rank update, or rebuilds when that is cheaper or due.
    pub(super) fn apply_changes(&mut self, changes: &[Change], spec: &Spec) {
        if changes.is_empty() {
            return;
        }
        let grams = changes.iter().filter(|c| c.dg != 0.0).count();
        if self.updates_since_rebuild + grams > REBUILD_AFTER || grams * 4 > self.rates.cells() {
            self.rebuild(spec);
            return;
        }
        self.low_rank(changes);
    }

    /// Gram and b corrections for `changes` with the rows as they stand, never a rebuild.
    pub(super) fn low_rank(&mut self, changes: &[Change]) {
        let n = self.rates.configs();
        let a = self.rates.matrix();
        for ch in changes {
            self.yy += ch.dyy;
            if ch.db != 0.0 {
                for j in 0..n {
                    self.b[j] += ch.db * a[(ch.cell, j)];
                }
            }
        }
        let grams: Vec<&Change> = changes.iter().filter(|c| c.dg != 0.0).collect();
        if grams.is_empty() {
            return;
        }
        self.vars.factor_valid = false;
        self.updates_since_rebuild += grams.len();
        if grams.len() == 1 {
            let c = grams[0];
            for j in 0..n {
                self.row[j] = a[(c.cell, j)];
            }
            let row = nalgebra::DVectorView::from_slice(&self.row, n);
            self.gram.ger(c.dg, &row, &row, 1.0);
            return;
        }
        // G += Rᵀ·D·R with R the changed rows: one matrix product (n × k times k × n).
        let rows_t = DMatrix::from_fn(n, grams.len(), |j, r| a[(grams[r].cell, j)]);
        let weighted = DMatrix::from_fn(grams.len(), n, |r, j| grams[r].dg * rows_t[(j, r)]);
        self.gram.gemm(1.0, &rows_t, &weighted, 1.0);
    }

    /// Re-classifies every cell at the predictions z (which must be exact at x).
    pub(super) fn reclassify(&mut self, spec: &Spec) {
        let cells: Vec<(usize, f64)> = self.z.iter().copied().enumerate().collect();
        self.reclassify_cells(spec, &cells);
    }

    /// Re-classifies the given cells at the given predictions and corrects the cache.
    pub(super) fn reclassify_cells(&mut self, spec: &Spec, cells: &[(usize, f64)]) {
        let mut changes = Vec::new();
        for &(i, z) in cells {
            let class = classify(z, spec.lo[i], spec.hi[i]);
            if class != self.class[i] {
                let before = contribution(self.class[i], spec.weights[i], spec.lo[i], spec.hi[i]);
                let after = contribution(class, spec.weights[i], spec.lo[i], spec.hi[i]);
                self.class[i] = class;
                changes.push(Change::between(i, before, after));
            }
        }
        self.apply_changes(&changes, spec);
    }
}

/// BᵀB. Large products go through nalgebra's blocked kernel (matrixmultiply) with B viewed as Bᵀ by
/// strides (no copy), one column panel at a time and only on and below the diagonal, then mirrored:
/// about 60 % of a full product's work. Small ones use the plain loop (nalgebra's small path wants
/// unit strides).
fn gram_of(b: &DMatrix<f64>) -> DMatrix<f64> {
    const PANEL: usize = 32;
    let (m, n) = b.shape();
    if m <= 5 || n <= 5 {
        return b.tr_mul(b);
    }
    let mut g = DMatrix::zeros(n, n);
    let bt = nalgebra::DMatrixView::from_slice_with_strides(b.as_slice(), n, m, m, 1);
    let mut j0 = 0;
    while j0 < n {
        let nj = PANEL.min(n - j0);
        let ni = n - j0;
        if ni > 5 && nj > 5 {
            let mut out = g.view_mut((j0, j0), (ni, nj));
            out.gemm(1.0, &bt.rows(j0, ni), &b.columns(j0, nj), 0.0);
        } else {
            let tail = b.columns(j0, nj);
            let block = b.columns(j0, ni).tr_mul(&tail);
            g.view_mut((j0, j0), (ni, nj)).copy_from(&block);
        }
        j0 += nj;
    }
    for j in 0..n {
        for i in 0..j {
            g[(i, j)] = g[(j, i)];
        }
    }
    g
}
