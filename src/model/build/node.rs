//! Nodes and supports, rigid bodies and ties.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// The keys of a `rigid` block.
pub(crate) const RIGID_KEYS: &[&str] = &["nodes"];

impl Builder {
    /// Every node. The first fixes the kind of model (axial or plane),
    /// which the rest must share; `None` when there is none.
    pub(super) fn nodes(
        &mut self,
        file: &ast::File,
        scope: &LetScope<'_, '_>,
    ) -> Option<(Vec<Node>, Kind)> {
        let mut kind: Option<(Kind, Span)> = None;
        let node_decls: Vec<&ast::Node> = file
            .decls
            .iter()
            .filter_map(|d| match d {
                Decl::Node(n) => Some(&**n),
                _ => None,
            })
            .collect();
        let mut nodes: Vec<Node> = Vec::with_capacity(node_decls.len());
        if let Some(&first) = node_decls.first() {
            nodes.push(self.node(first, scope, &mut kind));
            let known = kind;
            nodes.extend(self.in_runs(&node_decls[1..], |b, &n| {
                let mut k = known;
                Some(b.node(n, scope, &mut k))
            }));
        }
        let Some((kind, _)) = kind else {
            if !self.errors.is_empty() {
                return None;
            }
            self.errors
                .push(ModelError::empty("nodes", Span::new(0, 0)));
            return None;
        };
        Some((nodes, kind))
    }

    /// `fix` statements: the directions each node is held in.
    pub(super) fn supports(
        &mut self,
        file: &ast::File,
        names: &Names<'_>,
        kind: Kind,
        nodes: &mut [Node],
    ) {
        for d in &file.decls {
            if let Decl::Pin(list, sp) = d {
                if kind == Kind::Axial {
                    self.errors.push(ModelError::BendingInAxial {
                        what: "`pin`".into(),
                        span: *sp,
                    });
                    continue;
                }
                for id in list {
                    if let Some(i) = self.ok(names.resolve(id, NameKind::Node)) {
                        nodes[i].fixed = [true, true];
                    }
                }
            }
            if let Decl::Fix(list) = d {
                for s in list {
                    let Some(i) = self.ok(names.resolve(&s.node, NameKind::Node)) else {
                        continue;
                    };
                    match (kind, s.axis) {
                        (Kind::Axial, Some((_, sp))) => {
                            self.errors.push(ModelError::AxialDirection {
                                statement: "fix",
                                node: s.node.name.to_string(),
                                example: "",
                                span: sp,
                            });
                        }
                        (_, None) => {
                            nodes[i].fixed = [true, kind == Kind::Plane];
                            nodes[i].fixed_rotation = kind == Kind::Plane;
                        }
                        (Kind::Plane, Some((Axis::X, _))) => nodes[i].fixed[0] = true,
                        (Kind::Plane, Some((Axis::Y, _))) => nodes[i].fixed[1] = true,
                        (Kind::Plane, Some((Axis::Rotation, _))) => {
                            nodes[i].fixed_rotation = true;
                        }
                    }
                }
            }
        }
    }

    /// Rigid bodies and ties.
    pub(super) fn rigids_and_ties(
        &mut self,
        file: &ast::File,
        names: &Names<'_>,
        kind: Kind,
        nodes: &[Node],
    ) -> (Vec<Rigid>, Vec<Tie>) {
        let mut rigids = Vec::new();
        let mut ties = Vec::new();
        let mut rigid_of: HashMap<usize, Span> = HashMap::new();
        for d in &file.decls {
            match d {
                Decl::Rigid(nb) => {
                    let what = What::named("rigid body", &nb.name.name);
                    let f = Fields::new(&nb.block, what, RIGID_KEYS, &mut self.errors);
                    let Some(list) = self.opt(f.names("nodes")) else {
                        if !f.has("nodes") {
                            self.errors.push(f.missing("nodes"));
                        }
                        continue;
                    };
                    let mut idx = Vec::new();
                    // a body whose nodes failed (unknown, or in another
                    // body) is not also "too small": one fault, one error
                    let mut faulted = false;
                    for id in list {
                        let Some(i) = self.ok(names.resolve(id, NameKind::Node)) else {
                            faulted = true;
                            continue;
                        };
                        if let Some(first) = rigid_of.get(&i) {
                            faulted = true;
                            self.errors.push(ModelError::RigidShared {
                                node: id.name.to_string(),
                                span: id.span,
                                first: *first,
                            });
                        } else {
                            rigid_of.insert(i, nb.name.span);
                            idx.push(i);
                        }
                    }
                    if faulted {
                        continue;
                    }
                    if idx.len() < 2 {
                        self.errors.push(ModelError::Expected {
                            expected: "at least two nodes in a rigid body".into(),
                            span: nb.block.span,
                            found: format!("{} node(s)", idx.len()),
                            help: None,
                        });
                        continue;
                    }
                    rigids.push(Rigid {
                        name: nb.name.name.to_string(),
                        nodes: idx,
                        span: nb.span,
                    });
                }
                Decl::Tie(t) => {
                    let idx: Vec<usize> = t
                        .nodes
                        .iter()
                        .filter_map(|id| {
                            push_err(&mut self.errors, names.resolve(id, NameKind::Node))
                        })
                        .collect();
                    if idx.len() == t.nodes.len() {
                        // In a plane, nodes that move together without
                        // rotating must coincide: two separated points held
                        // to one translation would be a link that takes
                        // moment from nowhere.
                        let apart = kind == Kind::Plane
                            && idx.iter().any(|&i| {
                                let (a, b) = (&nodes[idx[0]], &nodes[i]);
                                (a.x - b.x).value.abs() + (a.y - b.y).value.abs() > 0.0
                            });
                        let mut seen = HashSet::new();
                        let twice = t
                            .nodes
                            .iter()
                            .zip(&idx)
                            .find(|(_, &i)| !seen.insert(i))
                            .map(|(id, _)| id);
                        if let Some(id) = twice {
                            self.errors.push(ModelError::TiedToItself {
                                node: id.name.to_string(),
                                span: id.span,
                            });
                        } else if apart {
                            self.errors.push(ModelError::TieApart { span: t.span });
                        } else {
                            ties.push(Tie {
                                nodes: idx,
                                span: t.span,
                            });
                        }
                    }
                }
                _ => {}
            }
        }
        (rigids, ties)
    }

    /// One node: its position evaluated, and the kind of model (axial or
    /// plane) held to the first node's.
    pub(super) fn node(
        &mut self,
        n: &ast::Node,
        scope: &dyn Scope,
        kind: &mut Option<(Kind, Span)>,
    ) -> Node {
        let this = match n.at {
            Coord::Axial(_) => Kind::Axial,
            Coord::Plane(..) => Kind::Plane,
        };
        match *kind {
            None => *kind = Some((this, n.span)),
            Some((k, first)) if k != this => {
                self.errors.push(ModelError::MixedModel {
                    this: this.name(),
                    first: k.name(),
                    span: n.at.span(),
                    first_span: first,
                });
            }
            _ => {}
        }
        let coord = |e: &Expr, b: &mut Self| {
            let what = || format!("the position of node `{}`", n.name.name);
            b.ok(typed(e, Dimension::LENGTH, what, scope))
                .map(si_length)
        };
        let (x, y) = match &n.at {
            Coord::Axial(e) => (coord(e, self), Some(Length::new::<meter>(0.0))),
            Coord::Plane(xy, _) => (coord(&xy[0], self), coord(&xy[1], self)),
        };
        // A position that failed is NaN, so that the parts at the node are
        // not reported again (as zero length); its error ends the build.
        let failed = Length::new::<meter>(f64::NAN);
        Node {
            name: n.name.name.clone(),
            x: x.unwrap_or(failed),
            y: y.unwrap_or(failed),
            fixed: [false; 2],
            fixed_rotation: false,
            span: n.span,
        }
    }
}
