//! Load cases and their statements: loads, temperatures, free strains,
//! settlements.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// What every statement of a case is read against.
struct InCase<'s, 'n, 'b> {
    name: &'s str,
    scope: &'s dyn Scope,
    names: &'s Names<'n>,
    built: Built<'b>,
}

impl InCase<'_, '_, '_> {
    fn typed(&self, e: &Expr, dim: Dimension, what: &str, b: &mut Builder) -> Option<Quantity> {
        b.ok(typed(e, dim, || what.to_string(), self.scope))
    }

    /// Whether a beam end is rigidly joined at node `i` (so it turns and
    /// carries a moment).
    fn turns(&self, i: usize) -> bool {
        self.built.turns[i]
    }

    fn part_of(&self, id: &Ident, b: &mut Builder) -> Option<usize> {
        let i = b.ok(self.names.resolve(id, NameKind::Part))?;
        place(self.built.part_at, i)
    }
}

/// What a case has already said, so that saying it twice is an error.
#[derive(Default)]
struct Seen {
    temperature: HashMap<Option<usize>, Span>,
    strain: HashMap<usize, Span>,
    settlement: HashMap<(usize, usize), Span>,
}

impl Builder {
    /// The load cases: the declared ones, or the loose statements of a file
    /// without cases as its one case, `loads`.
    pub(super) fn cases(
        &mut self,
        file: &ast::File,
        scope: &LetScope<'_, '_>,
        names: &Names<'_>,
        built: Built<'_>,
    ) -> Vec<Case> {
        let mut cases = Vec::new();
        let first_case = file.decls.iter().find_map(|d| match d {
            Decl::Case(c) => Some(c.name.span),
            _ => None,
        });
        let mut loose = Vec::new();
        for d in &file.decls {
            match d {
                Decl::Case(c) => {
                    let mut sustained = false;
                    for f in &c.flags {
                        sustained = f.name == "sustained";
                    }
                    let case = self.case(
                        &c.name.name,
                        sustained,
                        &c.stmts.iter().collect::<Vec<_>>(),
                        c.span,
                        scope,
                        names,
                        built,
                    );
                    cases.push(case);
                }
                Decl::Stmt(s) => match first_case {
                    Some(case) => self.errors.push(ModelError::LooseStatement {
                        span: s.span(),
                        case,
                    }),
                    None => loose.push(&**s),
                },
                _ => {}
            }
        }
        if first_case.is_none() {
            let case = self.case("loads", false, &loose, Span::new(0, 0), scope, names, built);
            cases.push(case);
        }
        cases
    }

    /// The declared combinations, or one per case when none is declared.
    pub(super) fn combinations(
        &mut self,
        file: &ast::File,
        names: &Names<'_>,
        cases: &[Case],
    ) -> Vec<Combination> {
        let mut combinations = Vec::new();
        for d in &file.decls {
            if let Decl::Combine(c) = d {
                let mut terms: Vec<(usize, f64)> = Vec::new();
                for t in &c.terms {
                    if let Some(i) = self.ok(names.resolve(&t.case, NameKind::Case)) {
                        if terms.iter().any(|(j, _)| *j == i) {
                            self.errors.push(ModelError::CaseTwice {
                                case: t.case.name.to_string(),
                                combination: c.name.name.to_string(),
                                span: t.span,
                            });
                        } else if self
                            .ok(ModelError::guard(
                                Quantity::number(t.factor),
                                || format!("the factor of `{}`", t.case.name),
                                t.span,
                            ))
                            .is_some()
                        {
                            terms.push((i, t.factor));
                        }
                    }
                }
                if !terms.is_empty() && terms.iter().all(|(_, f)| *f == 0.0) {
                    self.errors.push(ModelError::ZeroCombination {
                        combination: c.name.name.to_string(),
                        span: c.span,
                    });
                }
                combinations.push(Combination {
                    name: c.name.name.to_string(),
                    terms,
                    declared: true,
                    span: c.span,
                });
            }
        }
        if combinations.is_empty() {
            for (i, c) in cases.iter().enumerate() {
                combinations.push(Combination {
                    name: c.name.clone(),
                    terms: vec![(i, 1.0)],
                    declared: false,
                    span: c.span,
                });
            }
        }
        combinations
    }

    #[allow(clippy::too_many_arguments)]
    pub(super) fn case(
        &mut self,
        name: &str,
        sustained: bool,
        stmts: &[&Stmt],
        span: Span,
        scope: &dyn Scope,
        names: &Names<'_>,
        built: Built<'_>,
    ) -> Case {
        let mut case = Case {
            name: name.to_string(),
            sustained,
            loads: Vec::new(),
            temperatures: Vec::new(),
            strains: Vec::new(),
            settlements: Vec::new(),
            moments: Vec::new(),
            distributed: Vec::new(),
            twists: Vec::new(),
            span,
        };
        let c = InCase {
            name,
            scope,
            names,
            built,
        };
        let mut seen = Seen::default();
        for s in stmts {
            match s {
                Stmt::Load { node, force, span } => self.load(&c, node, force, *span, &mut case),
                Stmt::Moment { node, value, span } => {
                    self.moment(&c, node, value, *span, &mut case);
                }
                Stmt::Temperature { part, change, span } => {
                    self.temperature(&c, part.as_ref(), change, *span, &mut seen, &mut case);
                }
                Stmt::Strain { part, value, span } => {
                    self.strain(&c, part, value, *span, &mut seen, &mut case);
                }
                Stmt::Settle {
                    node,
                    axis,
                    movement,
                    span,
                } => self.settle(&c, node, *axis, movement, *span, &mut seen, &mut case),
            }
        }
        case
    }

    /// `load NODE = FORCE`.
    fn load(
        &mut self,
        c: &InCase<'_, '_, '_>,
        node: &Ident,
        force: &Coord,
        span: Span,
        out: &mut Case,
    ) {
        // a load on a beam is spread along it; on a part it is an error
        if let Some((NameKind::Part, ..)) = c.names.get(&node.name) {
            self.distributed(c, node, force, span, out);
            return;
        }
        let Some(i) = self.ok(c.names.resolve(node, NameKind::Node)) else {
            return;
        };
        let what = format!("the load on `{}`", node.name);
        let f = match (c.built.kind, force) {
            (Kind::Axial, Coord::Axial(e)) => c
                .typed(e, Dimension::FORCE, &what, self)
                .map(|q| [si_force(q), Force::default()]),
            (Kind::Plane, Coord::Plane(xy, _)) => {
                let [ex, ey] = &**xy;
                let x = c.typed(ex, Dimension::FORCE, &what, self);
                let y = c.typed(ey, Dimension::FORCE, &what, self);
                x.zip(y).map(|(x, y)| [si_force(x), si_force(y)])
            }
            (Kind::Axial, Coord::Plane(_, sp)) => {
                self.errors.push(ModelError::AxialLoad {
                    node: node.name.to_string(),
                    span: *sp,
                });
                None
            }
            (Kind::Plane, Coord::Axial(e)) => {
                self.errors.push(ModelError::PlaneLoad {
                    node: node.name.to_string(),
                    span: e.span,
                });
                None
            }
        };
        if let Some(force) = f {
            out.loads.push(Load {
                node: i,
                force,
                span,
            });
        }
    }

    /// `load BEAM = (WX, WY)`: force per unit length of the beam.
    fn distributed(
        &mut self,
        c: &InCase<'_, '_, '_>,
        target: &Ident,
        force: &Coord,
        span: Span,
        out: &mut Case,
    ) {
        let Some(i) = c.part_of(target, self) else {
            return;
        };
        if c.built.parts[i].bend.is_none() {
            self.errors.push(ModelError::DistributedOnPart {
                part: target.name.to_string(),
                span: target.span,
            });
            return;
        }
        let Coord::Plane(xy, _) = force else {
            self.errors.push(ModelError::PlaneLoad {
                node: target.name.to_string(),
                span: force.span(),
            });
            return;
        };
        let what = format!("the distributed load on `{}`", target.name);
        let per_length = Dimension::FORCE.div(Dimension::LENGTH);
        let [ex, ey] = &**xy;
        let x = c.typed(ex, per_length, &what, self);
        let y = c.typed(ey, per_length, &what, self);
        if let (Some(x), Some(y)) = (x, y) {
            out.distributed.push(Distributed {
                part: i,
                w: [x.value, y.value],
                span,
            });
        }
    }

    /// `moment NODE = M`, counter-clockwise positive.
    fn moment(
        &mut self,
        c: &InCase<'_, '_, '_>,
        node: &Ident,
        value: &Expr,
        span: Span,
        out: &mut Case,
    ) {
        if c.built.kind == Kind::Axial {
            self.errors.push(ModelError::BendingInAxial {
                what: "a `moment`".into(),
                span,
            });
            return;
        }
        let Some(i) = self.ok(c.names.resolve(node, NameKind::Node)) else {
            return;
        };
        if !c.turns(i) {
            self.errors.push(ModelError::NoRotation {
                what: "a moment",
                node: node.name.to_string(),
                span,
            });
            return;
        }
        let what = format!("the moment at `{}`", node.name);
        let torque = Dimension::MOMENT;
        if let Some(q) = c.typed(value, torque, &what, self) {
            out.moments.push(NodeMoment {
                node: i,
                moment: q.value,
                span,
            });
        }
    }

    /// `temperature [PART] = CHANGE`: every member it acts on needs an alpha.
    fn temperature(
        &mut self,
        c: &InCase<'_, '_, '_>,
        part: Option<&Ident>,
        change: &Expr,
        span: Span,
        seen: &mut Seen,
        out: &mut Case,
    ) {
        let target = match part {
            Some(id) => match c.part_of(id, self) {
                Some(i) => Some(i),
                None => return,
            },
            None => None,
        };
        if let (Some(i), Some(id)) = (target, part) {
            if c.built.parts[i].material().is_none() {
                self.errors.push(ModelError::SpringTemperature {
                    part: id.name.to_string(),
                    span,
                });
                return;
            }
        }
        if let Some(first) = seen.temperature.get(&target) {
            self.errors.push(ModelError::DuplicateInCase {
                what: "a temperature change".into(),
                case: c.name.to_string(),
                span,
                first: *first,
            });
            return;
        }
        seen.temperature.insert(target, span);
        let Some(q) = c.typed(change, Dimension::TEMPERATURE, "a temperature change", self) else {
            return;
        };
        // Every member the change acts on needs an alpha.
        let affected: Vec<usize> = match target {
            Some(i) => vec![i],
            None => (0..c.built.parts.len()).collect(),
        };
        let mut reported: HashSet<usize> = HashSet::new();
        for i in affected {
            if let Some(m) = c.built.parts[i].material() {
                if c.built.materials[m].alpha.is_none()
                    && !reported.contains(&m)
                    && !self.alpha_failed.contains(&c.built.materials[m].name)
                {
                    reported.insert(m);
                    self.errors.push(ModelError::NoAlpha {
                        part: c.built.parts[i].name.to_string(),
                        material: c.built.materials[m].name.clone(),
                        span,
                        material_span: c.built.materials[m].span,
                    });
                }
            }
        }
        out.temperatures.push(Temperature {
            part: target,
            change: TemperatureInterval::new::<kelvin>(q.value),
            span,
        });
    }

    /// `strain PART = VALUE`.
    fn strain(
        &mut self,
        c: &InCase<'_, '_, '_>,
        part: &Ident,
        value: &Expr,
        span: Span,
        seen: &mut Seen,
        out: &mut Case,
    ) {
        let Some(i) = c.part_of(part, self) else {
            return;
        };
        if let Some(first) = seen.strain.get(&i) {
            self.errors.push(ModelError::DuplicateInCase {
                what: format!("a free strain of `{}`", part.name),
                case: c.name.to_string(),
                span,
                first: *first,
            });
            return;
        }
        seen.strain.insert(i, span);
        if let Some(q) = c.typed(value, Dimension::NONE, "a free strain", self) {
            out.strains.push(FreeStrain {
                part: i,
                strain: Ratio::new::<ratio>(q.value),
                span,
            });
        }
    }

    /// `settle NODE [x|y] = MOVEMENT`: only of a held direction.
    #[allow(clippy::too_many_arguments)]
    fn settle(
        &mut self,
        c: &InCase<'_, '_, '_>,
        node: &Ident,
        axis: Option<(Axis, Span)>,
        movement: &Expr,
        span: Span,
        seen: &mut Seen,
        out: &mut Case,
    ) {
        let Some(i) = self.ok(c.names.resolve(node, NameKind::Node)) else {
            return;
        };
        let direction = match (c.built.kind, axis) {
            (Kind::Axial, None) | (Kind::Plane, Some((Axis::X, _))) => 0,
            (Kind::Plane, Some((Axis::Y, _))) => 1,
            (Kind::Plane, Some((Axis::Rotation, _))) => {
                if !c.turns(i) {
                    self.errors.push(ModelError::NoRotation {
                        what: "a prescribed rotation",
                        node: node.name.to_string(),
                        span,
                    });
                    return;
                }
                if !c.built.nodes[i].fixed_rotation {
                    self.errors.push(ModelError::SettleFree {
                        node: node.name.to_string(),
                        axis: " rotation",
                        span,
                    });
                    return;
                }
                if let Some(first) = seen.settlement.get(&(i, 2)) {
                    self.errors.push(ModelError::DuplicateInCase {
                        what: format!("a rotation of `{}`", node.name),
                        case: c.name.to_string(),
                        span,
                        first: *first,
                    });
                    return;
                }
                seen.settlement.insert((i, 2), span);
                let what = format!("the rotation of `{}`", node.name);
                if let Some(q) = c.typed(movement, Dimension::NONE, &what, self) {
                    out.twists.push(Twist {
                        node: i,
                        angle: q.value,
                        span,
                    });
                }
                return;
            }
            (Kind::Axial, Some((_, sp))) => {
                self.errors.push(ModelError::AxialDirection {
                    statement: "settle",
                    node: node.name.to_string(),
                    example: " = -0.1 in",
                    span: sp,
                });
                return;
            }
            (Kind::Plane, None) => {
                self.errors.push(ModelError::SettleDirection {
                    node: node.name.to_string(),
                    span: node.span,
                });
                return;
            }
        };
        if !c.built.nodes[i].fixed[direction] {
            let axis = match (c.built.kind, direction) {
                (Kind::Axial, _) => "",
                (Kind::Plane, 0) => " x",
                (Kind::Plane, _) => " y",
            };
            self.errors.push(ModelError::SettleFree {
                node: node.name.to_string(),
                axis,
                span,
            });
            return;
        }
        if let Some(first) = seen.settlement.get(&(i, direction)) {
            self.errors.push(ModelError::DuplicateInCase {
                what: format!("a movement of `{}`", node.name),
                case: c.name.to_string(),
                span,
                first: *first,
            });
            return;
        }
        seen.settlement.insert((i, direction), span);
        if let Some(q) = c.typed(movement, Dimension::LENGTH, "a support movement", self) {
            out.settlements.push(Settlement {
                node: i,
                direction,
                movement: si_length(q),
                span,
            });
        }
    }
}
