//! Euler buckling: the Euler load π²·E·I/(K·L)² and slenderness K·L/r of
//! every part with a buckling length, and of parallel groups of them, with
//! the largest compression each takes over the combinations.

use crate::model::Model;

use super::Solution;

/// The Euler load π²·E·I/(K·L)² and slenderness K·L/r of one part, when it
/// has a buckling length and a second moment.
pub(crate) fn euler(model: &Model, i: usize) -> Option<(f64, f64)> {
    let p = &model.parts[i];
    let (kl, inertia, m, area) = (p.buckling_length?, p.inertia()?, p.material()?, p.area()?);
    let kl = kl.value;
    let pe = std::f64::consts::PI.powi(2) * model.materials[m].e.value * inertia / (kl * kl);
    Some((pe, kl / (inertia / area.value).sqrt()))
}

/// Euler buckling of one compression part or parallel group.
#[derive(Clone, Debug, PartialEq)]
pub struct Buckling {
    /// The part, or the parts of a parallel group.
    pub parts: Vec<usize>,
    /// Effective length K·L (m).
    pub kl: f64,
    /// Radius of gyration sqrt(I/A) (m), for a single part.
    pub r: Option<f64>,
    /// Σ E·I (N·m²).
    pub ei: f64,
    /// Euler load π² Σ E·I / (K·L)² (N).
    pub euler: f64,
    /// Largest compression over the combinations (N, positive) and where.
    pub compression: f64,
    pub combination: usize,
    pub slenderness_limit: f64,
    pub euler_fraction: f64,
}

impl Buckling {
    pub fn slenderness(&self) -> Option<f64> {
        self.r.map(|r| self.kl / r)
    }

    /// "part `strut`" or "the parallel group `core` + `shell`".
    pub fn what(&self, model: &Model) -> String {
        let names: Vec<String> = self
            .parts
            .iter()
            .map(|&i| format!("`{}`", model.parts[i].name))
            .collect();
        if self.parts.len() == 1 {
            format!("part {}", names[0])
        } else {
            format!("the parallel group {}", names.join(" + "))
        }
    }

    /// Warnings for this part or group (the slenderness limit; compression
    /// past the Euler load is a failing check, see [`evaluate`]).
    pub fn warnings(&self, model: &Model) -> Vec<crate::warning::Warning> {
        let mut w = Vec::new();
        if let Some(s) = self.slenderness() {
            if s > self.slenderness_limit {
                w.push(crate::warning::Warning::Slender {
                    what: self.what(model),
                    slenderness: s,
                    limit: self.slenderness_limit,
                });
            }
        }
        w
    }
}

/// Euler loads and slenderness of every part with a `buckling_length`, and
/// of parallel groups of them (parts spanning the same two nodes, such as a
/// filled pipe), with their largest compression.
pub fn buckling(model: &Model, solution: &Solution) -> Vec<Buckling> {
    let pi2 = std::f64::consts::PI * std::f64::consts::PI;
    let worst = |parts: &[usize]| {
        let mut best = (0.0f64, 0usize);
        for (k, r) in solution.combinations.iter().enumerate() {
            let c = -parts.iter().map(|&i| r.parts[i].force.value).sum::<f64>();
            if c > best.0 {
                best = (c, k);
            }
        }
        best
    };
    let mut out = Vec::new();
    let mut groups: Vec<((usize, usize), Vec<usize>)> = Vec::new();
    let mut group_of: crate::FixedMap<(usize, usize), usize> = crate::FixedMap::default();
    let mut single_of: crate::FixedMap<usize, usize> = crate::FixedMap::default();
    for (i, p) in model.parts.iter().enumerate() {
        let (Some(kl), Some(inertia), Some(m), Some(area)) =
            (p.buckling_length, p.inertia(), p.material(), p.area())
        else {
            continue;
        };
        let ei = model.materials[m].e.value * inertia;
        let kl = kl.value;
        let (compression, combination) = worst(&[i]);
        single_of.insert(i, out.len());
        out.push(Buckling {
            parts: vec![i],
            kl,
            r: Some((inertia / area.value).sqrt()),
            ei,
            euler: pi2 * ei / (kl * kl),
            compression,
            combination,
            slenderness_limit: p.slenderness_limit,
            euler_fraction: p.euler_fraction,
        });
        let key = (p.ends[0].min(p.ends[1]), p.ends[0].max(p.ends[1]));
        match group_of.get(&key) {
            Some(&g) => groups[g].1.push(i),
            None => {
                group_of.insert(key, groups.len());
                groups.push((key, vec![i]));
            }
        }
    }
    for (_, g) in groups.into_iter().filter(|g| g.1.len() > 1) {
        let single: Vec<&Buckling> = g
            .iter()
            .filter_map(|&i| single_of.get(&i).map(|&k| &out[k]))
            .collect();
        let kl = single.iter().map(|b| b.kl).fold(0.0, f64::max);
        let ei: f64 = single.iter().map(|b| b.ei).sum();
        let (compression, combination) = worst(&g);
        let fraction = single
            .iter()
            .map(|b| b.euler_fraction)
            .fold(f64::INFINITY, f64::min);
        out.push(Buckling {
            parts: g,
            kl,
            r: None,
            ei,
            euler: pi2 * ei / (kl * kl),
            compression,
            combination,
            slenderness_limit: f64::INFINITY,
            euler_fraction: fraction,
        });
    }
    out
}
