//! Where each node and part is drawn: plane models at true geometry and one
//! scale; axial models as a schematic column, nodes in position order from
//! the bottom up and parts that span the same levels side by side.

use super::svg::P;
use crate::model::{Kind, Model};

/// Room around the drawing for supports, loads and labels.
pub const MARGIN: f64 = 90.0;
/// Largest extent of a plane model's geometry on the drawing.
const PLANE_WIDTH: f64 = 560.0;
const PLANE_HEIGHT: f64 = 420.0;
/// Axial schematic: between node levels, and between side-by-side parts.
const LEVEL: f64 = 72.0;
const LANE: f64 = 96.0;
/// Many side-by-side parts share this width between them, down to a
/// narrowest lane (their names are then left to the tables).
const LANES_WIDTH: f64 = 576.0;
const NARROWEST_LANE: f64 = 14.0;

pub struct Layout {
    pub kind: Kind,
    /// Where each node is drawn; in an axial model, the right end of its line.
    pub node: Vec<P>,
    /// Each node's line in an axial model (left, right); the node twice in
    /// a plane model.
    pub node_line: Vec<(P, P)>,
    /// Each part's ends on the drawing.
    pub part: Vec<(P, P)>,
    /// Position order of each node (axial), 0 at the bottom.
    pub rank: Vec<usize>,
    pub width: f64,
    /// The bottom of the drawing proper; the key is drawn below.
    pub height: f64,
    /// Drawing units per metre (plane models; 0 for the axial schematic).
    pub scale: f64,
    /// The width of a lane of the axial schematic (0 in plane models).
    pub lane: f64,
}

impl Layout {
    pub fn of(model: &Model) -> Self {
        match model.kind {
            Kind::Plane => plane(model),
            Kind::Axial => axial(model),
        }
    }

    /// The screen direction of a model vector (x right, y up).
    pub fn screen(&self, v: [f64; 2]) -> (f64, f64) {
        match self.kind {
            Kind::Plane => (v[0], -v[1]),
            Kind::Axial => (0.0, -v[0]),
        }
    }

    /// Whether part names and forces fit beside the parts: in an axial
    /// schematic of many side-by-side parts they are left to the tables.
    pub fn labels_fit(&self) -> bool {
        self.kind == Kind::Plane || self.lane >= 60.0
    }

    /// A point moved by a node displacement drawn `k` drawing units per metre.
    pub fn moved(&self, p: P, u: [f64; 2], k: f64) -> P {
        let (dx, dy) = self.screen(u);
        p.add(dx * k, dy * k)
    }
}

fn plane(model: &Model) -> Layout {
    let xs: Vec<f64> = model.nodes.iter().map(|n| n.x.value).collect();
    let ys: Vec<f64> = model.nodes.iter().map(|n| n.y.value).collect();
    let (x0, x1) = bounds(&xs);
    let (y0, y1) = bounds(&ys);
    let (dx, dy) = (x1 - x0, y1 - y0);
    let fit = |span: f64, room: f64| {
        if span > 0.0 {
            room / span
        } else {
            f64::INFINITY
        }
    };
    let mut scale = fit(dx, PLANE_WIDTH).min(fit(dy, PLANE_HEIGHT));
    if !scale.is_finite() {
        scale = 1.0;
    }
    let width = (dx * scale + 2.0 * MARGIN).max(360.0);
    let left = (width - dx * scale) / 2.0;
    let node: Vec<P> = model
        .nodes
        .iter()
        .map(|n| {
            P::new(
                left + (n.x.value - x0) * scale,
                MARGIN + (y1 - n.y.value) * scale,
            )
        })
        .collect();
    let part = model
        .parts
        .iter()
        .map(|p| (node[p.ends[0]], node[p.ends[1]]))
        .collect();
    Layout {
        kind: Kind::Plane,
        node_line: node.iter().map(|&p| (p, p)).collect(),
        node,
        part,
        rank: Vec::new(),
        width,
        height: dy * scale + 2.0 * MARGIN,
        scale,
        lane: 0.0,
    }
}

fn bounds(v: &[f64]) -> (f64, f64) {
    v.iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &x| {
            (lo.min(x), hi.max(x))
        })
}

fn axial(model: &Model) -> Layout {
    let n = model.nodes.len();
    // position order, ties in the order written
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&a, &b| {
        model.nodes[a]
            .x
            .value
            .total_cmp(&model.nodes[b].x.value)
            .then(a.cmp(&b))
    });
    let mut rank = vec![0; n];
    for (r, &i) in order.iter().enumerate() {
        rank[i] = r;
    }
    // lanes: a part takes the first lane free over its span of levels
    let mut parts: Vec<usize> = (0..model.parts.len()).collect();
    let span = |i: usize| {
        let [a, b] = model.parts[i].ends;
        (rank[a].min(rank[b]), rank[a].max(rank[b]))
    };
    parts.sort_by_key(|&i| (span(i), i));
    let mut lane_end: Vec<usize> = Vec::new();
    let mut lane = vec![0; model.parts.len()];
    for &i in &parts {
        let (lo, hi) = span(i);
        let free = lane_end.iter().position(|&end| end <= lo);
        let k = free.unwrap_or(lane_end.len());
        if k == lane_end.len() {
            lane_end.push(hi);
        } else {
            lane_end[k] = hi;
        }
        lane[i] = k;
    }
    let lanes = lane_end.len().max(1);
    let lane_w = (LANES_WIDTH / lanes as f64).clamp(NARROWEST_LANE, LANE);
    let lane_x = |k: usize| MARGIN + lane_w / 2.0 + lane_w * k as f64;
    let level_y = |r: usize| MARGIN + LEVEL * (n.saturating_sub(1) - r) as f64;
    // each node's line spans the lanes of the parts that end there
    let mut reach: Vec<Option<(usize, usize)>> = vec![None; n];
    for (i, p) in model.parts.iter().enumerate() {
        for &e in &p.ends {
            let r = reach[e].get_or_insert((lane[i], lane[i]));
            r.0 = r.0.min(lane[i]);
            r.1 = r.1.max(lane[i]);
        }
    }
    let node_line: Vec<(P, P)> = (0..n)
        .map(|i| {
            let (a, b) = reach[i].unwrap_or((0, 0));
            let y = level_y(rank[i]);
            let reach = (lane_w / 2.0).min(22.0);
            (P::new(lane_x(a) - reach, y), P::new(lane_x(b) + reach, y))
        })
        .collect();
    let part = model
        .parts
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let x = lane_x(lane[i]);
            (
                P::new(x, level_y(rank[p.ends[0]])),
                P::new(x, level_y(rank[p.ends[1]])),
            )
        })
        .collect();
    Layout {
        kind: Kind::Axial,
        node: node_line.iter().map(|l| l.1).collect(),
        node_line,
        part,
        rank,
        width: 2.0 * MARGIN + lane_w * lanes as f64 + 110.0,
        lane: lane_w,
        height: 2.0 * MARGIN + LEVEL * n.saturating_sub(1) as f64,
        scale: 0.0,
    }
}
