//! Node displacements as linear functions of the free unknowns.
//!
//! Supports, ties and rigid bodies are eliminated exactly (a master–slave
//! transformation): every node displacement component is
//! `u = Σ c_j q_j + u0`, with at most three free unknowns `q_j` and a
//! constant `u0` from prescribed support movements. Plain nodes map to their
//! own components; a tie group shares one translation; a rigid body in a
//! plane has two translations and a small rotation about its first node. A
//! support on a member of a group is a linear constraint on the group's
//! coordinates, reduced by a tiny dense elimination per group.

use super::error::SolveError;
use crate::model::{Kind, Model};

/// A node component in terms of the free unknowns.
#[derive(Clone, Copy, Debug, Default)]
pub(crate) struct Terms {
    pub idx: [u32; 3],
    pub coef: [f64; 3],
    pub len: u8,
}

impl Terms {
    fn push(&mut self, i: usize, c: f64) {
        if c == 0.0 {
            return;
        }
        let n = usize::from(self.len);
        // A model has far fewer than 2^32 unknowns: the builder's limits keep it so.
        #[allow(clippy::cast_possible_truncation)]
        {
            self.idx[n] = i as u32;
        }
        self.coef[n] = c;
        self.len += 1;
    }

    pub fn iter(&self) -> impl Iterator<Item = (usize, f64)> + '_ {
        (0..usize::from(self.len)).map(|k| (self.idx[k] as usize, self.coef[k]))
    }
}

/// What a free unknown moves, for messages.
#[derive(Clone, Debug)]
pub(crate) enum Unknown {
    /// Node, direction (0 = x or the axis, 1 = y).
    Node(usize, usize),
    /// Tie group (its first node), direction.
    Tie(usize, usize),
    /// Rigid body, coordinate (0 = x, 1 = y, 2 = rotation).
    Rigid(usize, usize),
    /// The rotation of a node a beam end is rigidly joined to.
    Rotation(usize),
}

/// A tie group or rigid body with its constraint reduction.
#[derive(Clone, Debug)]
pub(crate) struct Body {
    pub rigid: Option<usize>,
    pub coords: usize,
    pub reference: (f64, f64),
    /// Member nodes with the position their kinematics use.
    pub members: Vec<(usize, f64, f64)>,
    /// Constraints `row · q = movement of (node, dir)`.
    pub constraints: Vec<(usize, usize, [f64; 3])>,
    /// Indices into `constraints` of independent rows, and their pivot columns.
    pub pivot_rows: Vec<usize>,
    pub pivot_cols: Vec<usize>,
    /// Inverse of the pivot block (row-major, `pivot_rows.len()` square).
    pub inv: [[f64; 3]; 3],
    /// For each free coordinate: the coordinate vector it moves.
    pub null: Vec<[f64; 3]>,
    /// Global index of the first free unknown of this body.
    pub first_free: usize,
}

impl Body {
    /// Kinematic row: component `dir` of a point at (px, py) per coordinate.
    pub fn kin(&self, dir: usize, px: f64, py: f64) -> [f64; 3] {
        if self.rigid.is_some() && self.coords == 3 {
            let (x0, y0) = self.reference;
            if dir == 0 {
                [1.0, 0.0, -(py - y0)]
            } else {
                [0.0, 1.0, px - x0]
            }
        } else {
            let mut r = [0.0; 3];
            r[dir] = 1.0;
            r
        }
    }

    /// Coordinates fixed by the constraints for given movements (one per
    /// constraint row), or the index of a constraint that conflicts.
    pub fn particular(&self, movement: &[f64]) -> Result<[f64; 3], usize> {
        let mut q = [0.0; 3];
        let r = self.pivot_rows.len();
        for (a, &col) in self.pivot_cols.iter().enumerate() {
            let mut v = 0.0;
            for b in 0..r {
                v += self.inv[a][b] * movement[self.pivot_rows[b]];
            }
            q[col] = v;
        }
        let scale = movement.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        for (k, (_, _, row)) in self.constraints.iter().enumerate() {
            let got: f64 = row.iter().zip(q).map(|(a, b)| a * b).sum();
            let reach = self.members_extent().max(1.0);
            if (got - movement[k]).abs() > 1e-9 * scale.max(1e-300) * reach {
                return Err(k);
            }
        }
        Ok(q)
    }

    fn members_extent(&self) -> f64 {
        let (x0, y0) = self.reference;
        self.members.iter().fold(0.0f64, |m, (_, x, y)| {
            m.max((x - x0).abs()).max((y - y0).abs())
        })
    }
}

/// The map from node components to free unknowns.
#[derive(Clone, Debug)]
pub(crate) struct DofMap {
    pub ndof: usize,
    pub n: usize,
    /// Per node component (`node * ndof + dir`).
    pub terms: Vec<Terms>,
    /// Body of each node, if it belongs to one.
    pub node_body: Vec<Option<u32>>,
    pub bodies: Vec<Body>,
    pub unknowns: Vec<Unknown>,
    /// Each node's rotation component (after the translations), where a
    /// beam end is rigidly joined to it.
    pub rot: Vec<Option<usize>>,
    /// Node components: translations, then rotations.
    pub ncomp: usize,
    /// Each node's rigid body, if it is one of a body's listed nodes (it
    /// then turns with the body).
    pub rigid_of: Vec<Option<usize>>,
}

struct UnionFind(Vec<usize>);

impl UnionFind {
    fn find(&mut self, mut a: usize) -> usize {
        while self.0[a] != a {
            self.0[a] = self.0[self.0[a]];
            a = self.0[a];
        }
        a
    }
    fn union(&mut self, a: usize, b: usize) {
        let (ra, rb) = (self.find(a), self.find(b));
        if ra != rb {
            let (lo, hi) = if ra < rb { (ra, rb) } else { (rb, ra) };
            self.0[hi] = lo;
        }
    }
}

/// Reduce `c · q = s` (m rows, `nc` columns) by elimination with complete
/// pivoting; fills the pivot rows, columns, inverse and null space of `body`.
fn reduce(body: &mut Body) {
    let nc = body.coords;
    let rows: Vec<[f64; 3]> = body.constraints.iter().map(|c| c.2).collect();
    let scale = rows
        .iter()
        .flat_map(|r| r.iter())
        .fold(0.0f64, |m, v| m.max(v.abs()))
        .max(1e-300);
    // Work on a copy, tracking which original rows make each reduced row.
    let mut work: Vec<[f64; 3]> = rows.clone();
    let mut combo: Vec<Vec<f64>> = (0..rows.len())
        .map(|i| {
            let mut v = vec![0.0; rows.len()];
            v[i] = 1.0;
            v
        })
        .collect();
    let mut used_rows: Vec<usize> = Vec::new();
    let mut pivot_cols: Vec<usize> = Vec::new();
    for _ in 0..nc {
        let mut best = (0.0, usize::MAX, usize::MAX);
        for (i, r) in work.iter().enumerate() {
            if used_rows.contains(&i) {
                continue;
            }
            for (j, v) in r.iter().enumerate().take(nc) {
                if pivot_cols.contains(&j) {
                    continue;
                }
                if v.abs() > best.0 {
                    best = (v.abs(), i, j);
                }
            }
        }
        if best.0 <= 1e-12 * scale {
            break;
        }
        let (_, pi, pj) = best;
        let p = work[pi][pj];
        for i in 0..work.len() {
            if i == pi {
                continue;
            }
            let f = work[i][pj] / p;
            if f != 0.0 {
                let pivot_row = work[pi];
                for (w, pv) in work[i].iter_mut().zip(pivot_row).take(nc) {
                    *w -= f * pv;
                }
                let src = combo[pi].clone();
                for (c, s) in combo[i].iter_mut().zip(src) {
                    *c -= f * s;
                }
            }
        }
        used_rows.push(pi);
        pivot_cols.push(pj);
    }
    // The pivot block of the original rows and its inverse (r ≤ 3).
    let r = used_rows.len();
    let mut a = [[0.0; 3]; 3];
    for (x, &ri) in used_rows.iter().enumerate() {
        for (y, &cj) in pivot_cols.iter().enumerate() {
            a[x][y] = rows[ri][cj];
        }
    }
    let inv = invert(a, r);
    // Null space: each free column moves itself and the pivot coordinates.
    let mut null = Vec::new();
    for f in 0..nc {
        if pivot_cols.contains(&f) {
            continue;
        }
        let mut q = [0.0; 3];
        q[f] = 1.0;
        for (x, &pc) in pivot_cols.iter().enumerate() {
            let mut v = 0.0;
            for (y, &ri) in used_rows.iter().enumerate() {
                v -= inv[x][y] * rows[ri][f];
            }
            q[pc] = v;
        }
        null.push(q);
    }
    body.pivot_rows = used_rows;
    body.pivot_cols = pivot_cols;
    body.inv = inv;
    body.null = null;
}

/// Inverse of the leading `r`×`r` block by Gauss–Jordan (r ≤ 3, nonsingular
/// by construction of the pivots).
fn invert(a: [[f64; 3]; 3], r: usize) -> [[f64; 3]; 3] {
    let mut m = a;
    let mut inv = [[0.0; 3]; 3];
    for (i, row) in inv.iter_mut().enumerate().take(r) {
        row[i] = 1.0;
    }
    for c in 0..r {
        let p = (c..r)
            .max_by(|&x, &y| m[x][c].abs().total_cmp(&m[y][c].abs()))
            .unwrap_or(c);
        m.swap(c, p);
        inv.swap(c, p);
        let d = m[c][c];
        if d == 0.0 {
            continue;
        }
        for j in 0..r {
            m[c][j] /= d;
            inv[c][j] /= d;
        }
        for i in 0..r {
            if i != c {
                let f = m[i][c];
                for j in 0..r {
                    m[i][j] -= f * m[c][j];
                    inv[i][j] -= f * inv[c][j];
                }
            }
        }
    }
    inv
}

/// Number the free unknowns of a model.
pub(crate) fn number(model: &Model) -> Result<DofMap, SolveError> {
    let ndof = model.kind.dofs();
    let nn = model.nodes.len();
    let mut uf = UnionFind((0..nn).collect());
    for t in &model.ties {
        for w in t.nodes.windows(2) {
            uf.union(w[0], w[1]);
        }
    }
    // In an axial model a rigid body is a tie: every node moves the same.
    let plane = model.kind == Kind::Plane;
    if !plane {
        for r in &model.rigids {
            for w in r.nodes.windows(2) {
                uf.union(w[0], w[1]);
            }
        }
    }
    let mut rigid_of = vec![None; nn];
    if plane {
        for (ri, r) in model.rigids.iter().enumerate() {
            for &n in &r.nodes {
                rigid_of[n] = Some(ri);
            }
        }
    }
    // Group nodes by tie class; count class sizes.
    let mut root = vec![0usize; nn];
    let mut size = vec![0u32; nn];
    for (i, r) in root.iter_mut().enumerate() {
        *r = uf.find(i);
        size[*r] += 1;
    }
    let mut bodies: Vec<Body> = Vec::new();
    let mut node_body: Vec<Option<u32>> = vec![None; nn];
    let mut class_body: foldhash::HashMap<usize, usize> = foldhash::HashMap::default();
    let new_body = |rigid: Option<usize>, reference: (f64, f64)| Body {
        rigid,
        coords: if rigid.is_some() { 3 } else { ndof },
        reference,
        members: Vec::new(),
        constraints: Vec::new(),
        pivot_rows: Vec::new(),
        pivot_cols: Vec::new(),
        inv: [[0.0; 3]; 3],
        null: Vec::new(),
        first_free: 0,
    };
    let pos = |i: usize| (model.nodes[i].x.value, model.nodes[i].y.value);
    // Rigid bodies first (plane models), then the tie classes attached to them.
    let mut rigid_body = vec![usize::MAX; model.rigids.len()];
    for (ri, r) in model.rigids.iter().enumerate() {
        if !plane {
            break;
        }
        rigid_body[ri] = bodies.len();
        bodies.push(new_body(Some(ri), pos(r.nodes[0])));
    }
    let class_anchor = class_anchors(model, &rigid_of, &root)?;
    for i in 0..nn {
        let c = root[i];
        let b = if let Some(&(ri, anchor)) = class_anchor.get(&c) {
            let b = rigid_body[ri];
            let (px, py) = pos(anchor);
            bodies[b].members.push((i, px, py));
            b
        } else if size[c] > 1 {
            let b = *class_body.entry(c).or_insert_with(|| {
                bodies.push(new_body(None, pos(c)));
                bodies.len() - 1
            });
            let (px, py) = pos(i);
            bodies[b].members.push((i, px, py));
            b
        } else {
            continue;
        };
        #[allow(clippy::cast_possible_truncation)]
        {
            node_body[i] = Some(b as u32);
        }
    }
    let has_rot = model.rotating_nodes();
    // Constraints from supports on body members; a held rotation at a node
    // of a rigid body that a beam turns holds the body's rotation
    // (direction 2).
    for body in &mut bodies {
        let members = body.members.clone();
        for (i, px, py) in members {
            for d in 0..ndof {
                if model.nodes[i].fixed[d] {
                    let row = body.kin(d, px, py);
                    body.constraints.push((i, d, row));
                }
            }
            if body.coords == 3
                && rigid_of[i].is_some()
                && has_rot[i]
                && model.nodes[i].fixed_rotation
            {
                body.constraints.push((i, 2, [0.0, 0.0, 1.0]));
            }
        }
        reduce(body);
    }
    // Rotations: a node gets one where a beam end is rigidly joined. Its
    // component comes after every translation; its unknown is numbered
    // with the node's translations, so that the factorisation of a long
    // beam stays banded.
    let mut rot = vec![None; nn];
    let mut ncomp = nn * ndof;
    for i in 0..nn {
        if !has_rot[i] {
            continue;
        }
        rot[i] = Some(ncomp);
        ncomp += 1;
    }
    let number_rotation = |i: usize, terms: &mut Vec<Terms>, unknowns: &mut Vec<Unknown>| {
        if let Some(c) = rot[i] {
            if !model.nodes[i].fixed_rotation {
                terms[c].push(unknowns.len(), 1.0);
                unknowns.push(Unknown::Rotation(i));
            }
        }
    };
    // Number the unknowns: plain nodes in node order, each body at its first node.
    let mut terms = vec![Terms::default(); ncomp];
    let mut unknowns = Vec::new();
    let mut body_done = vec![false; bodies.len()];
    for i in 0..nn {
        match node_body[i] {
            None => {
                for d in 0..ndof {
                    if !model.nodes[i].fixed[d] {
                        terms[i * ndof + d].push(unknowns.len(), 1.0);
                        unknowns.push(Unknown::Node(i, d));
                    }
                }
                number_rotation(i, &mut terms, &mut unknowns);
            }
            Some(b) => {
                let b = b as usize;
                if body_done[b] {
                    continue;
                }
                body_done[b] = true;
                let body = &mut bodies[b];
                body.first_free = unknowns.len();
                for c in 0..body.coords {
                    if body.pivot_cols.contains(&c) {
                        continue;
                    }
                    unknowns.push(match body.rigid {
                        Some(ri) => Unknown::Rigid(ri, c),
                        None => Unknown::Tie(i, c),
                    });
                }
                for &(m, px, py) in &body.members {
                    for d in 0..ndof {
                        let row = body.kin(d, px, py);
                        let t = &mut terms[m * ndof + d];
                        for (k, nv) in body.null.iter().enumerate() {
                            let c: f64 = row.iter().zip(nv).map(|(a, b)| a * b).sum();
                            t.push(body.first_free + k, c);
                        }
                    }
                }
                // a node of a rigid body turns with it; a tied node (a pin)
                // keeps a rotation of its own
                let members: Vec<usize> = body.members.iter().map(|m| m.0).collect();
                for m in members {
                    match (rigid_of[m], rot[m]) {
                        (Some(_), Some(c)) => {
                            for (k, nv) in body.null.iter().enumerate() {
                                terms[c].push(body.first_free + k, nv[2]);
                            }
                        }
                        _ => number_rotation(m, &mut terms, &mut unknowns),
                    }
                }
            }
        }
    }
    Ok(DofMap {
        ndof,
        n: unknowns.len(),
        terms,
        node_body,
        bodies,
        unknowns,
        rot,
        ncomp,
        rigid_of,
    })
}

/// For each tie class that touches a rigid body: the body and the node
/// whose position the class takes. A tie between two bodies, or between
/// two separated nodes of one body, is an error.
fn class_anchors(
    model: &Model,
    rigid_of: &[Option<usize>],
    root: &[usize],
) -> Result<foldhash::HashMap<usize, (usize, usize)>, SolveError> {
    let nn = model.nodes.len();
    let pos = |i: usize| (model.nodes[i].x.value, model.nodes[i].y.value);
    let mut class_anchor: foldhash::HashMap<usize, (usize, usize)> = foldhash::HashMap::default();
    for i in 0..nn {
        if let Some(ri) = rigid_of[i] {
            let c = root[i];
            match class_anchor.get(&c) {
                None => {
                    class_anchor.insert(c, (ri, i));
                }
                Some(&(rj, j)) => {
                    let (xi, yi) = pos(i);
                    let (xj, yj) = pos(j);
                    if rj != ri {
                        return Err(SolveError::Link {
                            message: format!(
                                "a tie joins rigid bodies `{}` and `{}` at a point",
                                model.rigids[rj].name, model.rigids[ri].name
                            ),
                            span: model.nodes[i].span,
                            help: Some("a pin between two rigid bodies is not supported; merge them into one rigid body, or join them with a stiff part".into()),
                        });
                    }
                    if (xi - xj).abs() + (yi - yj).abs() > 0.0 {
                        return Err(SolveError::Link {
                            message: format!(
                                "a tie joins nodes `{}` and `{}` of rigid body `{}`, which are at different places",
                                model.nodes[j].name, model.nodes[i].name, model.rigids[ri].name
                            ),
                            span: model.nodes[i].span,
                            help: Some("nodes of one rigid body already move together; remove the tie".into()),
                        });
                    }
                }
            }
        }
    }
    Ok(class_anchor)
}
