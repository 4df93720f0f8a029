//! Parts: stiffness, law, ends, free elongation sources and limits.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// A part's settings besides its ends and law.
struct PartLimits {
    misfit: Length,
    slack: Length,
    buckling_length: Option<Length>,
    buckling_factor: Option<f64>,
    slenderness_limit: f64,
    euler_fraction: f64,
}

/// The keys of a `part` block.
pub(crate) const PART_KEYS: &[&str] = &[
    "ends",
    "material",
    "area",
    "section",
    "inertia",
    "stiffness",
    "misfit",
    "carries",
    "slack",
    "buckling_length",
    "buckling_factor",
    "slenderness_limit",
    "euler_fraction",
];

/// The keys of a `beam` block.
pub(crate) const BEAM_KEYS: &[&str] = &[
    "ends",
    "material",
    "area",
    "section",
    "inertia",
    "depth",
    "bending",
    "hinge",
    "misfit",
    "buckling_length",
    "buckling_factor",
    "slenderness_limit",
    "euler_fraction",
];

impl Builder {
    /// Every part: a part needs only the names, materials and nodes.
    pub(super) fn parts(
        &mut self,
        decls: &[(&ast::NamedBlock, bool)],
        scope: &LetScope<'_, '_>,
        names: &Names<'_>,
        materials: Materials<'_>,
        nodes: &[Node],
        kind: Kind,
    ) -> Vec<Part> {
        self.in_runs(decls, |b, &(nb, beam)| {
            b.part(nb, beam, scope, names, materials, nodes, kind)
        })
    }

    /// `work` on each item, in file order. From 20,000 items on, on every
    /// core: contiguous runs, each with a builder of its own, joined in file
    /// order with their errors and unit counts.
    pub(super) fn in_runs<I: Sync, T: Send>(
        &mut self,
        items: &[I],
        work: impl Fn(&mut Builder, &I) -> Option<T> + Sync,
    ) -> Vec<T> {
        let runs = crate::parallel::runs_for(items.len(), 20_000);
        if runs == 1 {
            return items.iter().filter_map(|i| work(self, i)).collect();
        }
        let (limits, total) = (self.limits, items.len());
        let runs: Vec<(Vec<T>, Builder)> = crate::parallel::in_runs(items, runs, |k, run| {
            let mut b = Builder::new(limits);
            // the first run's list has room for all: the others are moved
            // onto it without growing it
            let mut out = Vec::with_capacity(if k == 0 { total } else { run.len() });
            out.extend(run.iter().filter_map(|i| work(&mut b, i)));
            (out, b)
        });
        let mut out: Vec<T> = Vec::new();
        for (k, (o, b)) in runs.into_iter().enumerate() {
            if k == 0 {
                out = o;
            } else {
                out.extend(o);
            }
            self.errors.extend(b.errors);
        }
        out
    }

    #[allow(clippy::too_many_lines, clippy::too_many_arguments)]
    pub(super) fn part(
        &mut self,
        nb: &ast::NamedBlock,
        beam: bool,
        scope: &dyn Scope,
        names: &Names<'_>,
        materials: Materials<'_>,
        nodes: &[Node],
        kind: Kind,
    ) -> Option<Part> {
        let (materials, material_at) = materials;
        let pname = &nb.name.name;
        let what = What::named(if beam { "beam" } else { "part" }, pname);
        if beam && kind == Kind::Axial {
            self.errors.push(ModelError::BendingInAxial {
                what: format!("`beam {pname}`"),
                span: nb.name.span,
            });
            return None;
        }
        let f = Fields::new(
            &nb.block,
            what,
            if beam { BEAM_KEYS } else { PART_KEYS },
            &mut self.errors,
        );
        let before = self.errors.len();
        let ends = self.part_ends(&f, nb, names);
        // a spring (`stiffness`), or a member (material and area or section)
        let law = if f.has("stiffness") {
            self.spring_law(&f, what, scope)
        } else {
            self.member_law(&f, what, scope, names, material_at)
        };
        let limits = self.part_limits(&f, what, scope, nb, law.as_ref());
        let carries = self.part_carries(&f);
        let bend = if beam {
            self.beam_bending(&f, nb, names, scope, ends, nodes)
        } else {
            None
        };
        let ends = ends?;
        let law = law?;
        if beam && bend.is_none() {
            return None;
        }
        if self.errors.len() > before {
            return None;
        }
        let (a, b) = (&nodes[ends[0]], &nodes[ends[1]]);
        let dx = (b.x - a.x).value;
        let dy = (b.y - a.y).value;
        let length = dx.hypot(dy);
        if length.is_nan() {
            // an end's position failed and was reported
            return None;
        }
        let scale =
            a.x.value
                .abs()
                .max(b.x.value.abs())
                .max(a.y.value.abs())
                .max(b.y.value.abs())
                .max(1e-300);
        if length <= 1e-12 * scale || length < range::range_of(Dimension::LENGTH).0 {
            let allowed = matches!(law, Law::Spring { .. }) && kind == Kind::Axial;
            if !allowed {
                self.errors.push(ModelError::ZeroLength {
                    part: pname.to_string(),
                    a: a.name.to_string(),
                    b: b.name.to_string(),
                    span: f.map.get("ends").map_or(nb.span, |e| e.span),
                });
                return None;
            }
        }
        let part = Part {
            name: pname.clone(),
            ends,
            law,
            length: Length::new::<meter>(length),
            misfit: limits.misfit,
            carries,
            slack: limits.slack,
            buckling_length: limits.buckling_length.or_else(|| {
                limits
                    .buckling_factor
                    .map(|k| Length::new::<meter>(k * length))
            }),
            slenderness_limit: limits.slenderness_limit,
            euler_fraction: limits.euler_fraction,
            bend,
            span: nb.span,
        };
        self.stiffness_ok(&part, materials, what, nb.name.span)?;
        Some(part)
    }

    /// A part's E·A/L finite, positive and within the sane range of a
    /// stiffness (checked again when only its material changes).
    pub(super) fn stiffness_ok(
        &mut self,
        part: &Part,
        materials: &[Material],
        what: What<'_>,
        span: Span,
    ) -> Option<()> {
        let k = part.stiffness(materials).value;
        if !k.is_finite() || k <= 0.0 {
            self.errors.push(ModelError::NotFinite {
                what: format!("the stiffness E·A/L of {what}"),
                reason: "it overflows or vanishes".into(),
                span,
            });
            return None;
        }
        let k = Quantity::new(k, Dimension::STIFFNESS);
        self.ok(ModelError::guard(
            k,
            || format!("the stiffness E·A/L of {what}"),
            span,
        ))?;
        Some(())
    }

    /// A beam's bending: its second moment and extreme fibre about the axis
    /// it bends about (a section's strong axis unless `bending = weak`, or
    /// `inertia` and `depth`), and its hinges, which must be its ends.
    fn beam_bending(
        &mut self,
        f: &Fields<'_>,
        nb: &ast::NamedBlock,
        names: &Names<'_>,
        scope: &dyn Scope,
        ends: Option<[usize; 2]>,
        nodes: &[Node],
    ) -> Option<Bend> {
        let weak = match self.opt(f.names("bending")) {
            None => false,
            Some(list) => match list.as_slice() {
                [w] if w.name == "weak" => true,
                [s] if s.name == "strong" => false,
                _ => {
                    self.errors.push(ModelError::Expected {
                        expected: "`strong` or `weak`".into(),
                        span: f.map.get("bending").map_or(nb.block.span, |e| e.span),
                        found: "something else".into(),
                        help: Some(
                            "a section bends about its strong axis unless `bending = weak`".into(),
                        ),
                    });
                    return None;
                }
            },
        };
        let section =
            f.expr("section")
                .and_then(Result::ok)
                .and_then(|e| match eval_val(e, scope) {
                    Ok(Val::Section(s)) => Some(s),
                    _ => None,
                });
        let (mut inertia, mut fibre) = match section {
            Some(s) if weak => (Some(s.iy), Some(s.cy)),
            Some(s) => (Some(s.ix), Some(s.cx)),
            None => (None, None),
        };
        if let Some(q) = self.opt(f.quantity("inertia", Dimension::SECOND_MOMENT, scope)) {
            inertia = Some(q.value);
        }
        if let Some(q) = self.opt(f.quantity("depth", Dimension::LENGTH, scope)) {
            fibre = Some(q.value / 2.0);
        }
        let mut hinge = [false; 2];
        if let (Some(list), Some(ends)) = (self.opt(f.names("hinge")), ends) {
            for id in list {
                let Some(i) = self.ok(names.resolve(id, NameKind::Node)) else {
                    continue;
                };
                match ends.iter().position(|&e| e == i) {
                    Some(k) => hinge[k] = true,
                    None => {
                        let end = |k: usize| nodes[ends[k]].name.to_string();
                        self.errors.push(ModelError::HingeNotEnd {
                            beam: nb.name.name.to_string(),
                            node: id.name.to_string(),
                            a: end(0),
                            b: end(1),
                            span: id.span,
                        });
                    }
                }
            }
        }
        match (inertia, fibre) {
            (Some(i), Some(c)) if i > 0.0 && c > 0.0 => Some(Bend {
                inertia: i,
                fibre: c,
                hinge,
            }),
            _ => {
                self.errors.push(ModelError::BeamBending {
                    beam: nb.name.name.to_string(),
                    span: nb.name.span,
                });
                None
            }
        }
    }

    /// `ends`: two different nodes.
    fn part_ends(
        &mut self,
        f: &Fields<'_>,
        nb: &ast::NamedBlock,
        names: &Names<'_>,
    ) -> Option<[usize; 2]> {
        let pname = &nb.name.name;
        let mut ends = None;
        match self.opt(f.names("ends")) {
            Some(list) if list.len() == 2 => {
                let a = self.ok(names.resolve(list[0], NameKind::Node));
                let b = self.ok(names.resolve(list[1], NameKind::Node));
                if let (Some(a), Some(b)) = (a, b) {
                    if a == b {
                        self.errors.push(ModelError::SameNode {
                            part: pname.to_string(),
                            node: list[0].name.to_string(),
                            span: list[0].span.to(list[1].span),
                        });
                    } else {
                        ends = Some([a, b]);
                    }
                }
            }
            Some(list) => self.errors.push(ModelError::ends_count(
                list.len(),
                list.first()
                    .map_or(nb.block.span, |i| i.span)
                    .to(list.last().map_or(nb.block.span, |i| i.span)),
            )),
            None => {
                if !f.has("ends") {
                    self.errors.push(f.missing("ends"));
                }
            }
        }
        ends
    }

    fn spring_law(&mut self, f: &Fields<'_>, what: What<'_>, scope: &dyn Scope) -> Option<Law> {
        for other in ["material", "area", "section", "inertia"] {
            if let Some(e) = f.map.get(other) {
                self.errors.push(ModelError::conflict(
                    other,
                    "stiffness",
                    what.to_string(),
                    e.key.span,
                ));
            }
        }
        let k = self.opt(f.quantity("stiffness", Dimension::STIFFNESS, scope));
        k.and_then(|k| {
            if k.value > 0.0 {
                Some(Law::Spring {
                    stiffness: Stiffness::new::<newton_per_meter>(k.value),
                })
            } else {
                self.errors.push(ModelError::NotPositive {
                    what: format!("`stiffness` of {what}"),
                    value: "zero or less".into(),
                    span: f.map.get("stiffness").map(|e| e.span).unwrap_or_default(),
                    help: None,
                });
                None
            }
        })
    }

    fn member_law(
        &mut self,
        f: &Fields<'_>,
        what: What<'_>,
        scope: &dyn Scope,
        names: &Names<'_>,
        material_at: &[Option<usize>],
    ) -> Option<Law> {
        let material = match f.map.get("material") {
            None => {
                self.errors.push(f.missing("material"));
                None
            }
            Some(_) => match self.opt(f.names("material")) {
                Some(list) if list.len() == 1 => {
                    let i = self.ok(names.resolve(list[0], NameKind::Material));
                    // only materials that built are in `materials`
                    i.and_then(|i| place(material_at, i))
                }
                Some(list) => {
                    self.errors.push(ModelError::Expected {
                        expected: "one material".into(),
                        span: list[0].span.to(list[list.len() - 1].span),
                        found: format!("{} names", list.len()),
                        help: None,
                    });
                    None
                }
                None => None,
            },
        };
        if let (Some(a), Some(s)) = (f.map.get("area"), f.map.get("section")) {
            self.errors.push(ModelError::conflict(
                "section",
                "area",
                what.to_string(),
                s.key.span.to(a.key.span),
            ));
        }
        let mut area = None;
        let mut inertia = None;
        let mut shape = None;
        for key in ["area", "section"] {
            let Some(e) = self.opt(f.expr(key)) else {
                continue;
            };
            let guard = |b: &mut Self, v: f64, dim: Dimension, of: &str| {
                let q = Quantity::new(v, dim);
                b.ok(ModelError::guard(
                    q,
                    || format!("the {of} of {what}"),
                    e.span,
                ))
                .map(|q| q.value)
            };
            match self.ok(eval_val(e, scope)) {
                Some(Val::Section(s)) => {
                    area = guard(self, s.area, Dimension::AREA, "area");
                    shape = Some(s.shape);
                    if key == "section" {
                        inertia =
                            guard(self, s.inertia(), Dimension::SECOND_MOMENT, "second moment");
                    }
                }
                Some(Val::Q(q)) if key == "area" && q.dim == Dimension::AREA => {
                    area = guard(self, q.value, Dimension::AREA, "area");
                }
                Some(Val::Q(q)) => self.errors.push(ModelError::WrongDimension {
                    what: format!("`{key}` of {what}"),
                    expected: if key == "area" {
                        "an area".into()
                    } else {
                        "a section such as `ring(d = 10.75 in, t = 0.365 in)`".into()
                    },
                    found: q.dim.describe(),
                    span: e.span,
                    help: if key == "area" {
                        example_for(Dimension::AREA)
                    } else {
                        Some("the section helpers are circle, ring, rect, box, ishape".into())
                    },
                }),
                None => {}
            }
        }
        if let Some(q) = self.opt(f.quantity("inertia", Dimension::SECOND_MOMENT, scope)) {
            inertia = Some(q.value);
        }
        if area.is_none() && !f.has("area") && !f.has("section") {
            self.errors.push(f.missing("area"));
        }
        match (material, area) {
            (Some(m), Some(a)) if a > 0.0 => Some(Law::Member {
                material: m,
                area: Area::new::<square_meter>(a),
                inertia,
                section: shape,
            }),
            (_, Some(_)) => {
                let sp = f
                    .map
                    .get("area")
                    .or_else(|| f.map.get("section"))
                    .map(|e| e.span)
                    .unwrap_or_default();
                if material.is_some() {
                    self.errors.push(ModelError::NotPositive {
                        what: format!("the area of {what}"),
                        value: "zero or less".into(),
                        span: sp,
                        help: None,
                    });
                }
                None
            }
            _ => None,
        }
    }

    /// Misfit, gap, and the buckling and slenderness settings.
    fn part_limits(
        &mut self,
        f: &Fields<'_>,
        what: What<'_>,
        scope: &dyn Scope,
        nb: &ast::NamedBlock,
        law: Option<&Law>,
    ) -> PartLimits {
        // `Some(help)`: the value must be zero or more (`Some(None)`: more
        // than zero), with that help.
        let length_key = |key: &str, b: &mut Self, sign: Option<Option<&str>>| -> Option<Length> {
            let q = b.opt(f.quantity(key, Dimension::LENGTH, scope))?;
            let bad = match sign {
                None => false,
                Some(Some(_)) => q.value < 0.0,
                Some(None) => q.value <= 0.0,
            };
            if bad {
                b.errors.push(ModelError::NotPositive {
                    what: format!("`{key}` of {what}"),
                    value: if q.value < 0.0 { "negative" } else { "zero" }.into(),
                    span: f.map.get(key).map(|e| e.span).unwrap_or_default(),
                    help: sign.flatten().map(str::to_string),
                });
                return None;
            }
            Some(si_length(q))
        };
        let misfit = length_key("misfit", self, None).unwrap_or_default();
        let slack = length_key(
            "slack",
            self,
            Some(Some("a gap is zero or more; `carries` gives its sense")),
        )
        .unwrap_or_default();
        let buckling_length = length_key("buckling_length", self, Some(None));
        let ratio_key = |key: &str, default: f64, b: &mut Self| -> f64 {
            match b.opt(f.quantity(key, Dimension::NONE, scope)) {
                Some(q) if q.value > 0.0 => q.value,
                Some(_) => {
                    b.errors.push(ModelError::NotPositive {
                        what: format!("`{key}` of {what}"),
                        value: "zero or less".into(),
                        span: f.map.get(key).map(|e| e.span).unwrap_or_default(),
                        help: None,
                    });
                    default
                }
                None => default,
            }
        };
        // AISC 360-16 E2 (user note): KL/r preferably not over 200 (from memory).
        let slenderness_limit = ratio_key("slenderness_limit", 200.0, self);
        let euler_fraction = ratio_key("euler_fraction", 1.0, self);
        // K, the effective-length factor: K·L from the part's own length
        let buckling_factor = f
            .has("buckling_factor")
            .then(|| ratio_key("buckling_factor", 1.0, self));
        if let (Some(_), Some(e)) = (buckling_factor, f.map.get("buckling_length")) {
            self.errors.push(ModelError::conflict(
                "buckling_length",
                "buckling_factor",
                what.to_string(),
                e.key.span,
            ));
        }
        if (buckling_length.is_some() || buckling_factor.is_some())
            && !matches!(
                law,
                Some(&Law::Member {
                    inertia: Some(_),
                    ..
                })
            )
        {
            let sp = f
                .map
                .get("buckling_length")
                .or_else(|| f.map.get("buckling_factor"))
                .map_or(nb.span, |e| e.span);
            self.errors
                .push(ModelError::missing_key(what.to_string(), "inertia", sp));
        }
        PartLimits {
            misfit,
            slack,
            buckling_length,
            buckling_factor,
            slenderness_limit,
            euler_fraction,
        }
    }

    /// `carries`: both senses, or tension or compression only.
    fn part_carries(&mut self, f: &Fields<'_>) -> Carries {
        match self.opt(f.names("carries")) {
            Some(list) if list.len() == 1 => match list[0].name.as_str() {
                "both" => Carries::Both,
                "tension" => Carries::Tension,
                "compression" => Carries::Compression,
                other => {
                    self.errors.push(ModelError::Expected {
                        expected: "`both`, `tension` or `compression`".into(),
                        span: list[0].span,
                        found: format!("`{other}`"),
                        help: did_you_mean(other, ["both", "tension", "compression"]),
                    });
                    Carries::Both
                }
            },
            Some(list) => {
                self.errors.push(ModelError::Expected {
                    expected: "one of `both`, `tension`, `compression`".into(),
                    span: list[0].span.to(list[list.len() - 1].span),
                    found: format!("{} names", list.len()),
                    help: None,
                });
                Carries::Both
            }
            None => Carries::Both,
        }
    }
}
