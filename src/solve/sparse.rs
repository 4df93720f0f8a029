//! The sparse stiffness system: a fixed pattern, numeric assembly into it,
//! symmetric diagonal scaling and a supernodal Cholesky factorisation (faer)
//! whose symbolic part is computed once per model.
//!
//! A pivot that falls below a small fraction of its diagonal means the
//! assembly can move without straining any part (a mechanism). The
//! factorisation then regularises that pivot, and one solve with a generic
//! right-hand side shows the free motion, from which the caller names the
//! node and direction.

use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::cholesky::llt::factor::LltRegularization;
use faer::sparse::linalg::cholesky::LltRef;
use faer::sparse::linalg::cholesky::{
    factorize_symbolic_cholesky, CholeskySymbolicParams, SymbolicCholesky, SymmetricOrdering,
};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par, Side, Spec};

/// Pivots below this fraction of their (unit, after scaling) diagonal mark a mechanism.
const PIVOT_FLOOR: f64 = 1e-13;
/// The value a regularised pivot is given: far below any sound pivot.
const REGULARISED: f64 = 1e-15;

/// The natural order is kept when its factor has at most this many times
/// the entries of the matrix's upper triangle (common practice: a little
/// fill is cheaper than an ordering pass).
const NATURAL_FILL: usize = 2;

/// The upper-triangle pattern of the stiffness matrix.
pub(crate) struct Pattern {
    pub n: usize,
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
    diag: Vec<usize>,
    symbolic: SymbolicCholesky<usize>,
}

/// Why a factorisation failed.
pub(crate) enum Failure {
    /// Unknown `index` has no stiffness at all.
    Unsupported(usize),
    /// The free motion of a mechanism, per unknown (physical, unnormalised).
    Mechanism(Vec<f64>),
    Other(String),
}

impl Pattern {
    /// Build the pattern from the (row, col) pairs each element touches:
    /// `pairs` calls its argument with every pair (in either order, repeats
    /// allowed); it is called twice, to count and to fill. The diagonal is
    /// always present. Linear in the pairs: columns are filled by counting
    /// and each column's few rows sorted alone.
    pub fn new(n: usize, pairs: impl Fn(&mut dyn FnMut(usize, usize))) -> Result<Self, String> {
        let mut start = vec![0usize; n + 1];
        for s in &mut start[1..] {
            *s = 1; // the diagonal
        }
        pairs(&mut |a, b| start[a.max(b) + 1] += 1);
        for j in 0..n {
            start[j + 1] += start[j];
        }
        let mut rows = vec![0usize; start[n]];
        let mut next: Vec<usize> = start[..n].to_vec();
        for (j, at) in next.iter_mut().enumerate() {
            rows[*at] = j;
            *at += 1;
        }
        pairs(&mut |a, b| {
            let c = a.max(b);
            rows[next[c]] = a.min(b);
            next[c] += 1;
        });
        drop(next);
        // Sort and deduplicate each column, compacting in place.
        let mut col_ptr = vec![0usize; n + 1];
        let mut len = 0;
        for j in 0..n {
            let (a, b) = (start[j], start[j + 1]);
            rows[a..b].sort_unstable();
            let mut last = usize::MAX;
            for p in a..b {
                let r = rows[p];
                if r != last {
                    rows[len] = r;
                    len += 1;
                    last = r;
                }
            }
            col_ptr[j + 1] = len;
        }
        rows.truncate(len);
        let row_idx = rows;
        let mut diag = vec![0usize; n];
        for (j, d) in diag.iter_mut().enumerate() {
            // rows within a column are sorted; the diagonal is the last of the upper part
            *d = col_ptr[j + 1] - 1;
        }
        let sym = SymbolicSparseColMatRef::new_checked(n, n, &col_ptr, None, &row_idx);
        let symbolic = |ordering| {
            factorize_symbolic_cholesky(
                sym,
                Side::Upper,
                ordering,
                CholeskySymbolicParams::default(),
            )
            .map_err(|e| format!("{e:?}"))
        };
        // The file's own numbering when it already fills little (chains and
        // strips numbered along their length); else the approximate minimum
        // degree ordering, which costs more than the factorisation there.
        let natural = symbolic(SymmetricOrdering::Identity)?;
        let symbolic = if natural.len_val() <= NATURAL_FILL * row_idx.len() {
            natural
        } else {
            symbolic(SymmetricOrdering::Amd)?
        };
        Ok(Self {
            n,
            col_ptr,
            row_idx,
            diag,
            symbolic,
        })
    }

    /// Position of entry (a, b) in the value array.
    pub fn position(&self, a: usize, b: usize) -> usize {
        let (r, c) = if a <= b { (a, b) } else { (b, a) };
        let start = self.col_ptr[c];
        let rows = &self.row_idx[start..self.col_ptr[c + 1]];
        start + rows.partition_point(|&x| x < r)
    }

    pub fn nnz(&self) -> usize {
        self.row_idx.len()
    }

    /// Factorise the matrix with these values.
    pub fn factor(&self, values: &[f64]) -> Result<Factor<'_>, Failure> {
        self.factor_by(values, false)
    }

    /// [`Pattern::factor`]; `library`: by the library even for one unknown.
    fn factor_by(&self, values: &[f64], library: bool) -> Result<Factor<'_>, Failure> {
        let n = self.n;
        let mut scale = vec![0.0; n];
        for (j, s) in scale.iter_mut().enumerate() {
            let d = values[self.diag[j]];
            if d.is_nan() || d <= 0.0 || !d.is_finite() {
                return Err(Failure::Unsupported(j));
            }
            *s = 1.0 / d.sqrt();
        }
        let mut scaled = values.to_vec();
        for j in 0..n {
            for p in self.col_ptr[j]..self.col_ptr[j + 1] {
                scaled[p] *= scale[self.row_idx[p]] * scale[j];
            }
        }
        if n == 1 && !library {
            // One unknown (two parts sharing one movement: a filled pipe, a
            // bolt and its sleeve) needs no factorisation library: after
            // the scaling its matrix is [1] up to round-off, L = [√1], and
            // no pivot can be small. The same arithmetic as the library's.
            return Ok(Factor {
                pattern: self,
                l: vec![scaled[0].sqrt()],
                scale,
                mem: std::cell::RefCell::new(MemBuffer::new(faer::dyn_stack::StackReq::EMPTY)),
                one: true,
            });
        }
        let mut l = vec![0.0; self.symbolic.len_val()];
        let par = Par::Seq;
        // one scratch for the factorisation and every later solve
        let mut mem = MemBuffer::new(
            self.symbolic
                .factorize_numeric_llt_scratch::<f64>(par, Spec::default())
                .or(self.symbolic.solve_in_place_scratch::<f64>(1, par)),
        );
        let sym = SymbolicSparseColMatRef::new_checked(n, n, &self.col_ptr, None, &self.row_idx);
        let a = SparseColMatRef::new(sym, &scaled);
        let info = self
            .symbolic
            .factorize_numeric_llt(
                &mut l,
                a,
                Side::Upper,
                LltRegularization {
                    dynamic_regularization_delta: REGULARISED,
                    dynamic_regularization_epsilon: PIVOT_FLOOR,
                },
                par,
                MemStack::new(&mut mem),
                Spec::default(),
            )
            .map(|_| ());
        if let Err(e) = info {
            return Err(Failure::Other(format!("{e:?}")));
        }
        // faer does not hand back the count of regularised pivots, so the
        // factor's diagonal is read instead (a regularised pivot is exactly
        // the tiny value given above).
        let factor = Factor {
            pattern: self,
            l,
            scale,
            mem: std::cell::RefCell::new(mem),
            one: false,
        };
        if let Some(mode) = factor.mechanism_mode() {
            return Err(Failure::Mechanism(mode));
        }
        Ok(factor)
    }
}

/// A numeric factorisation ready to solve.
pub(crate) struct Factor<'p> {
    pattern: &'p Pattern,
    l: Vec<f64>,
    scale: Vec<f64>,
    /// Scratch for the solves (made once with the factorisation).
    mem: std::cell::RefCell<MemBuffer>,
    /// One unknown, factorised and solved without the library.
    one: bool,
}

impl Factor<'_> {
    /// Solve K x = b in place.
    pub fn solve(&self, b: &mut [f64]) {
        for (x, s) in b.iter_mut().zip(&self.scale) {
            *x *= s;
        }
        self.solve_scaled(b);
        for (x, s) in b.iter_mut().zip(&self.scale) {
            *x *= s;
        }
    }

    /// Solve with the scaled matrix, in place.
    fn solve_scaled(&self, b: &mut [f64]) {
        let n = self.pattern.n;
        if self.one {
            // L y = b, then Lᵀ x = y, each by the pivot's reciprocal
            let r = 1.0 / self.l[0];
            b[0] = b[0] * r * r;
            return;
        }
        let llt = LltRef::new(&self.pattern.symbolic, &self.l);
        let par = Par::Seq;
        let rhs = MatMut::from_column_major_slice_mut(b, n, 1);
        let mut mem = self.mem.borrow_mut();
        llt.solve_in_place_with_conj(Conj::No, rhs, par, MemStack::new(&mut mem));
    }

    /// Whether a pivot of L was regularised (its diagonal, in the factor's
    /// permuted order, holds the tiny value given it).
    fn regularised(&self) -> bool {
        use faer::sparse::linalg::cholesky::SymbolicCholeskyRaw;
        let tiny = |d: f64| d * d <= 2.0 * REGULARISED;
        let sym = &self.pattern.symbolic;
        match sym.raw() {
            SymbolicCholeskyRaw::Simplicial(s) => {
                let cp = s.col_ptr();
                (0..s.nrows()).any(|j| tiny(self.l[cp[j]]))
            }
            SymbolicCholeskyRaw::Supernodal(s) => {
                let begin = s.supernode_begin();
                let end = s.supernode_end();
                let vp = s.col_ptr_for_val();
                (0..s.n_supernodes()).any(|k| {
                    let ncols = end[k] - begin[k];
                    let len = vp[k + 1] - vp[k];
                    let nrows = len / ncols.max(1);
                    (0..ncols).any(|c| tiny(self.l[vp[k] + c * nrows + c]))
                })
            }
        }
    }

    /// When a pivot was regularised, the free motion it stands for: one
    /// solve with a generic right-hand side, dominated by that motion.
    fn mechanism_mode(&self) -> Option<Vec<f64>> {
        if !self.regularised() {
            return None;
        }
        // Deterministic pseudo-random right-hand side in scaled coordinates.
        let mut seed: u64 = 0x2545_F491_4F6C_DD1D;
        let mut y: Vec<f64> = (0..self.pattern.n)
            .map(|_| {
                seed ^= seed << 13;
                seed ^= seed >> 7;
                seed ^= seed << 17;
                ((seed >> 11) as f64 / (1u64 << 53) as f64) - 0.5
            })
            .collect();
        self.solve_scaled(&mut y);
        Some(y.iter().zip(&self.scale).map(|(v, s)| v * s).collect())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The one-unknown path gives the library's numbers to the last bit
    /// (the reference: faer's own factorisation and solve of the same
    /// 1 × 1 matrix).
    #[test]
    fn one_unknown_matches_the_library_bit_for_bit() {
        let Ok(pattern) = Pattern::new(1, |pair| pair(0, 0)) else {
            panic!("a 1 × 1 pattern");
        };
        let mut seed: u64 = 0x9E37_79B9_7F4A_7C15;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        for _ in 0..2000 {
            // stiffnesses from 1e3 to 1e12 N/m, loads of either sign
            let k = 10f64.powf(3.0 + 9.0 * next());
            let b = (next() - 0.5) * 10f64.powf(6.0 * next());
            let (Ok(fast), Ok(lib)) = (pattern.factor(&[k]), pattern.factor_by(&[k], true)) else {
                panic!("k = {k} factorises");
            };
            assert!(fast.one && !lib.one);
            let (mut x, mut y) = ([b], [b]);
            fast.solve(&mut x);
            lib.solve(&mut y);
            assert_eq!(x[0].to_bits(), y[0].to_bits(), "k = {k}, b = {b}");
        }
    }
}
