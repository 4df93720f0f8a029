#![allow(
    clippy::cast_possible_truncation,
    clippy::cast_sign_loss,
    clippy::range_plus_one
)]
//! Random connected assemblies solved by tandem and again by a dense LU
//! solve (nalgebra) as a general-purpose reference; plus equilibrium,
//! superposition and reciprocity (Maxwell–Betti) on the same models.

use crate::common;

use nalgebra::{DMatrix, DVector};

use common::Rng;

struct Assembly {
    plane: bool,
    pos: Vec<(f64, f64)>,
    fixed: Vec<[bool; 2]>,
    /// (a, b, E·A) in SI
    parts: Vec<(usize, usize, f64)>,
    loads: Vec<(usize, [f64; 2])>,
}

impl Assembly {
    fn text(&self, extra_cases: &str) -> String {
        // E·A is split as 1 MPa times an area of 10 to 500 m², within the
        // sane ranges of both
        let mut t = String::from("material unit_e { E = 1 MPa }\n");
        for (i, (x, y)) in self.pos.iter().enumerate() {
            if self.plane {
                t.push_str(&format!("node n{i} at ({x:e} m, {y:e} m)\n"));
            } else {
                t.push_str(&format!("node n{i} at {x:e} m\n"));
            }
            match (self.fixed[i], self.plane) {
                ([true, true], _) | ([true, false], false) => t.push_str(&format!("fix n{i}\n")),
                ([true, false], true) => t.push_str(&format!("fix n{i} x\n")),
                ([false, true], true) => t.push_str(&format!("fix n{i} y\n")),
                _ => {}
            }
        }
        for (k, (a, b, ea)) in self.parts.iter().enumerate() {
            t.push_str(&format!(
                "part p{k} {{ material = unit_e; area = {:e} m^2; ends = n{a}, n{b} }}\n",
                ea / 1e6
            ));
        }
        if extra_cases.is_empty() {
            for (n, f) in &self.loads {
                if self.plane {
                    t.push_str(&format!("load n{n} = ({:e} N, {:e} N)\n", f[0], f[1]));
                } else {
                    t.push_str(&format!("load n{n} = {:e} N\n", f[0]));
                }
            }
        } else {
            t.push_str(extra_cases);
        }
        t
    }

    /// The unit vector from a part's first end to its second (on the axis,
    /// ±1 by their order).
    fn cosines(&self, dx: f64, dy: f64) -> Vec<f64> {
        let l = dx.hypot(dy);
        if self.plane {
            vec![dx / l, dy / l]
        } else {
            vec![dx.signum()]
        }
    }

    /// Each part's force from the reference displacements: E·A/L times its
    /// elongation along its own axis (two-force member, direct stiffness
    /// method).
    fn forces(&self, u: &[f64]) -> Vec<f64> {
        let nd = if self.plane { 2 } else { 1 };
        self.parts
            .iter()
            .map(|&(a, b, ea)| {
                let (dx, dy) = (self.pos[b].0 - self.pos[a].0, self.pos[b].1 - self.pos[a].1);
                let c = self.cosines(dx, dy);
                let elong: f64 = (0..nd)
                    .map(|d| c[d] * (u[b * nd + d] - u[a * nd + d]))
                    .sum();
                ea / dx.hypot(dy) * elong
            })
            .collect()
    }

    /// Dense reference: node displacements by LU on the reduced matrix.
    fn dense(&self) -> Vec<f64> {
        let nd = if self.plane { 2 } else { 1 };
        let n = self.pos.len() * nd;
        let mut k = DMatrix::<f64>::zeros(n, n);
        let mut f = DVector::<f64>::zeros(n);
        for &(a, b, ea) in &self.parts {
            let (dx, dy) = (self.pos[b].0 - self.pos[a].0, self.pos[b].1 - self.pos[a].1);
            let l = dx.hypot(dy);
            let c = self.cosines(dx, dy);
            let kk = ea / l;
            for i in 0..nd {
                for j in 0..nd {
                    let v = kk * c[i] * c[j];
                    k[(a * nd + i, a * nd + j)] += v;
                    k[(b * nd + i, b * nd + j)] += v;
                    k[(a * nd + i, b * nd + j)] -= v;
                    k[(b * nd + i, a * nd + j)] -= v;
                }
            }
        }
        for (node, load) in &self.loads {
            for d in 0..nd {
                f[node * nd + d] += load[d];
            }
        }
        let free: Vec<usize> = (0..n).filter(|&i| !self.fixed[i / nd][i % nd]).collect();
        let kr = DMatrix::from_fn(free.len(), free.len(), |i, j| k[(free[i], free[j])]);
        let fr = DVector::from_fn(free.len(), |i, _| f[free[i]]);
        let u = kr.lu().solve(&fr).expect("the reference system is regular");
        let mut out = vec![0.0; n];
        for (i, &g) in free.iter().enumerate() {
            out[g] = u[i];
        }
        out
    }
}

fn random_axial(rng: &mut Rng) -> Assembly {
    let n = 3 + rng.below(12);
    let mut xs: Vec<f64> = (0..n)
        .map(|i| i as f64 * 2.0 + rng.range(0.1, 1.5))
        .collect();
    xs.sort_by(f64::total_cmp);
    let mut parts: Vec<(usize, usize, f64)> =
        (1..n).map(|i| (i - 1, i, rng.range(1e7, 5e8))).collect();
    for _ in 0..rng.below(n) {
        let a = rng.below(n);
        let b = rng.below(n);
        if a != b {
            parts.push((a.min(b), a.max(b), rng.range(1e7, 5e8)));
        }
    }
    // ends in either order along the axis: forces must not depend on it
    for p in &mut parts {
        if rng.next() < 0.5 {
            *p = (p.1, p.0, p.2);
        }
    }
    let mut fixed = vec![[false; 2]; n];
    fixed[0][0] = true;
    if rng.next() < 0.5 {
        fixed[n - 1][0] = true;
    }
    let loads = (0..1 + rng.below(3))
        .map(|_| (rng.below(n), [rng.range(-5e4, 5e4), 0.0]))
        .collect();
    Assembly {
        plane: false,
        pos: xs.iter().map(|&x| (x, 0.0)).collect(),
        fixed,
        parts,
        loads,
    }
}

/// A braced strip: two rows of nodes with verticals, chords and diagonals,
/// jittered, pinned at one end and on a roller at the other.
fn random_plane(rng: &mut Rng) -> Assembly {
    let bays = 2 + rng.below(6);
    let mut pos = Vec::new();
    for i in 0..=bays {
        pos.push((i as f64 * 3.0 + rng.range(-0.4, 0.4), rng.range(-0.3, 0.3)));
        pos.push((
            i as f64 * 3.0 + rng.range(-0.4, 0.4),
            2.5 + rng.range(-0.3, 0.3),
        ));
    }
    let mut parts = Vec::new();
    for i in 0..=bays {
        parts.push((2 * i, 2 * i + 1, rng.range(1e7, 5e8)));
        if i < bays {
            parts.push((2 * i, 2 * i + 2, rng.range(1e7, 5e8)));
            parts.push((2 * i + 1, 2 * i + 3, rng.range(1e7, 5e8)));
            parts.push((2 * i, 2 * i + 3, rng.range(1e7, 5e8)));
            if rng.next() < 0.5 {
                parts.push((2 * i + 1, 2 * i + 2, rng.range(1e7, 5e8)));
            }
        }
    }
    let n = pos.len();
    let mut fixed = vec![[false; 2]; n];
    fixed[0] = [true, true];
    fixed[2 * bays] = [false, true];
    let loads = (0..1 + rng.below(3))
        .map(|_| (rng.below(n), [rng.range(-5e4, 5e4), rng.range(-5e4, 5e4)]))
        .collect();
    Assembly {
        plane: true,
        pos,
        fixed,
        parts,
        loads,
    }
}

fn compare(a: &Assembly) {
    let (m, s) = common::solve(&a.text(""));
    let reference = a.dense();
    let nd = if a.plane { 2 } else { 1 };
    let scale = reference.iter().fold(0.0f64, |x, v| x.max(v.abs()));
    let r = &s.combinations[0];
    for (i, node) in r.nodes.iter().enumerate() {
        for d in 0..nd {
            let got = node.displacement[d].value;
            let want = reference[i * nd + d];
            assert!(
                (got - want).abs() <= 1e-9 * scale,
                "node n{i} dir {d}: {got} vs {want}\n{}",
                a.text("")
            );
        }
    }
    let fscale = r.force_scale.value;
    for (k, want) in a.forces(&reference).iter().enumerate() {
        let got = r.parts[k].force.value;
        assert!(
            (got - want).abs() <= 1e-8 * fscale,
            "part p{k}: {got} N vs {want} N\n{}",
            a.text("")
        );
    }
    assert!(
        r.equilibrium_residual.value <= 1e-9 * r.force_scale.value,
        "residual {} of {}",
        r.equilibrium_residual.value,
        r.force_scale.value
    );
    assert_eq!(m.nodes.len(), a.pos.len());
}

#[test]
fn random_axial_assemblies_match_dense_lu() {
    let mut rng = Rng(0x1234_5678_9abc_def1);
    for _ in 0..60 {
        compare(&random_axial(&mut rng));
    }
}

#[test]
fn random_plane_assemblies_match_dense_lu() {
    let mut rng = Rng(0x0fed_cba9_8765_4321);
    for _ in 0..60 {
        compare(&random_plane(&mut rng));
    }
}

/// Linear models: the combination of two cases equals the sum of the cases.
#[test]
fn superposition_holds() {
    let mut rng = Rng(42);
    for _ in 0..20 {
        let a = random_plane(&mut rng);
        let n = a.pos.len();
        let cases = format!(
            "case one {{ load n{} = (3 kN, -2 kN) }}\ncase two {{ load n{} = (-1 kN, 4 kN) }}\ncombine both = 1.5 one + 0.5 two\ncombine first = one\ncombine second = two\n",
            n - 1,
            n / 2
        );
        let (m, s) = common::solve(&a.text(&cases));
        for p in 0..m.parts.len() {
            let f = |c: usize| s.combinations[c].parts[p].force.value;
            let sum = 1.5 * f(1) + 0.5 * f(2);
            let scale = f(1).abs().max(f(2).abs()).max(1.0);
            assert!((f(0) - sum).abs() <= 1e-9 * scale);
        }
    }
}

/// Maxwell–Betti: the displacement at j under a unit load at i equals the
/// displacement at i under a unit load at j.
#[test]
fn reciprocity_holds() {
    let mut rng = Rng(7);
    for _ in 0..20 {
        let a = random_plane(&mut rng);
        let n = a.pos.len();
        let (i, j) = (n - 1, 1 + rng.below(n - 2));
        let cases = format!(
            "case at_i {{ load n{i} = (0 N, 1 N) }}\ncase at_j {{ load n{j} = (1 N, 0 N) }}\n"
        );
        let (_, s) = common::solve(&a.text(&cases));
        let uj = s.combinations[0].nodes[j].displacement[0].value;
        let ui = s.combinations[1].nodes[i].displacement[1].value;
        assert!(
            (uj - ui).abs() <= 1e-9 * uj.abs().max(ui.abs()),
            "{uj} vs {ui}"
        );
    }
}
