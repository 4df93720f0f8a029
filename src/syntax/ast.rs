//! The owned syntax tree of a calc file. Every node carries the [`Span`] of
//! the text it came from; nothing here knows about pest.

use crate::source::Span;

/// A name as written, with its span.
#[derive(Clone, Debug, PartialEq)]
pub struct Ident {
    /// Kept inline (no allocation) up to 24 bytes.
    pub name: compact_str::CompactString,
    pub span: Span,
}

/// A whole calc file: its declarations in file order.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct File {
    pub decls: Vec<Decl>,
}

/// One top-level declaration. The larger kinds are boxed so that a file of
/// a million parts keeps a compact list.
#[derive(Clone, Debug, PartialEq)]
pub enum Decl {
    Calc(Block),
    Let(Box<Let>),
    Material(Box<NamedBlock>),
    Part(Box<NamedBlock>),
    /// `beam NAME { ... }`: a member that bends.
    Beam(Box<NamedBlock>),
    Rigid(Box<NamedBlock>),
    Node(Box<Node>),
    Fix(Vec<Support>),
    /// `pin a, b`: held in x and y, free to rotate.
    Pin(Vec<Ident>, Span),
    Tie(Tie),
    Case(Box<Case>),
    Combine(Box<Combine>),
    Check(Box<Check>),
    Group(Box<Group>),
    Units(Units),
    /// A case statement standing at top level (the file's single case).
    Stmt(Box<Stmt>),
}

/// `let NAME = EXPR`
#[derive(Clone, Debug, PartialEq)]
pub struct Let {
    pub name: Ident,
    pub value: Expr,
    pub span: Span,
}

/// `{ key = value ... }`
#[derive(Clone, Debug, PartialEq)]
pub struct Block {
    pub entries: Vec<Entry>,
    pub span: Span,
}

/// `KEYWORD NAME { ... }`
#[derive(Clone, Debug, PartialEq)]
pub struct NamedBlock {
    pub name: Ident,
    pub block: Block,
    pub span: Span,
}

/// `key = value` inside a block.
#[derive(Clone, Debug, PartialEq)]
pub struct Entry {
    pub key: Ident,
    pub value: Value,
    pub span: Span,
}

/// The right side of an entry: a string, or one or more expressions.
#[derive(Clone, Debug, PartialEq)]
pub enum Value {
    Str(Str),
    Exprs(Vec<Expr>),
}

/// A string literal with escapes resolved.
#[derive(Clone, Debug, PartialEq)]
pub struct Str {
    pub text: String,
    pub span: Span,
}

/// A position or load: one value (axial) or a pair (plane).
#[derive(Clone, Debug, PartialEq)]
pub enum Coord {
    Axial(Expr),
    /// `(x, y)`, boxed so that axial positions stay small.
    Plane(Box<[Expr; 2]>, Span),
}

impl Coord {
    #[must_use]
    pub fn span(&self) -> Span {
        match self {
            Coord::Axial(e) => e.span,
            Coord::Plane(_, s) => *s,
        }
    }
}

/// `node NAME at POSITION`
#[derive(Clone, Debug, PartialEq)]
pub struct Node {
    pub name: Ident,
    pub at: Coord,
    pub span: Span,
}

/// A direction in a plane model.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Axis {
    X,
    Y,
    /// The rotation of a node a beam is rigidly joined to.
    Rotation,
}

/// One `NAME [x|y]` of a `fix` line.
#[derive(Clone, Debug, PartialEq)]
pub struct Support {
    pub node: Ident,
    pub axis: Option<(Axis, Span)>,
    pub span: Span,
}

/// `tie a, b, ...`
#[derive(Clone, Debug, PartialEq)]
pub struct Tie {
    pub nodes: Vec<Ident>,
    pub span: Span,
}

/// `case NAME [sustained] { ... }`
#[derive(Clone, Debug, PartialEq)]
pub struct Case {
    pub name: Ident,
    pub flags: Vec<Ident>,
    pub stmts: Vec<Stmt>,
    pub span: Span,
}

/// Statements that make up a load case.
#[derive(Clone, Debug, PartialEq)]
pub enum Stmt {
    Load {
        node: Ident,
        force: Coord,
        span: Span,
    },
    /// `moment NODE = M` (counter-clockwise positive)
    Moment {
        node: Ident,
        value: Expr,
        span: Span,
    },
    /// `temperature [PART] = DT`
    Temperature {
        part: Option<Ident>,
        change: Expr,
        span: Span,
    },
    /// `strain PART = VALUE`
    Strain {
        part: Ident,
        value: Expr,
        span: Span,
    },
    /// `settle NODE [x|y] = MOVEMENT`
    Settle {
        node: Ident,
        axis: Option<(Axis, Span)>,
        movement: Expr,
        span: Span,
    },
}

impl Stmt {
    #[must_use]
    pub fn span(&self) -> Span {
        match self {
            Stmt::Load { span, .. }
            | Stmt::Moment { span, .. }
            | Stmt::Temperature { span, .. }
            | Stmt::Strain { span, .. }
            | Stmt::Settle { span, .. } => *span,
        }
    }
}

/// `combine NAME = 1.2 dead + 1.6 live`
#[derive(Clone, Debug, PartialEq)]
pub struct Combine {
    pub name: Ident,
    pub terms: Vec<ComboTerm>,
    pub span: Span,
}

/// One `factor case` term of a combination.
#[derive(Clone, Debug, PartialEq)]
pub struct ComboTerm {
    pub factor: f64,
    pub case: Ident,
    pub span: Span,
}

/// A comparison operator of a check.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Compare {
    Le,
    Lt,
    Ge,
    Gt,
}

impl Compare {
    #[must_use]
    pub fn symbol(self) -> &'static str {
        match self {
            Compare::Le => "≤",
            Compare::Lt => "<",
            Compare::Ge => "≥",
            Compare::Gt => ">",
        }
    }
}

/// `check "label" [for x in GROUP] [under NAME, ... [short_term|long_term]] : LHS op RHS`
#[derive(Clone, Debug, PartialEq)]
pub struct Check {
    pub label: Str,
    pub each: Option<Each>,
    pub under: Option<Under>,
    pub lhs: Expr,
    pub op: Compare,
    pub rhs: Expr,
    pub span: Span,
}

/// `for x in GROUP` in a check.
#[derive(Clone, Debug, PartialEq)]
pub struct Each {
    pub var: Ident,
    pub group: Ident,
    pub span: Span,
}

/// Which state of the assembly a check reads.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum State {
    Short,
    Long,
}

/// `under NAME, ... [short_term|long_term]` in a check.
#[derive(Clone, Debug, PartialEq)]
pub struct Under {
    /// Combinations (or cases, in a file with no `combine`); empty: all.
    pub names: Vec<Ident>,
    pub state: Option<(State, Span)>,
    pub span: Span,
}

/// `group NAME = a, b, c`
#[derive(Clone, Debug, PartialEq)]
pub struct Group {
    pub name: Ident,
    pub members: Vec<Ident>,
    pub span: Span,
}

/// `units us`, `units si` or `units kip, in, ksi`
#[derive(Clone, Debug, PartialEq)]
pub enum Units {
    System(Ident),
    List(Vec<UnitExpr>),
}

/// An expression.
#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
    pub span: Span,
}

/// The shapes of expression. Sums and products are flat lists so that long
/// chains (`a + b + c + ...`) never nest deeply.
#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    /// A number with an optional unit: `29000 ksi`, `0.45`.
    Quantity { value: f64, unit: Option<UnitExpr> },
    /// A unit standing alone: `psi` in `sqrt(fc / psi) * psi`.
    Unit(UnitExpr),
    /// A name: a `let`, a constant, or (in some keys) a material or node.
    Name(Ident),
    /// `PART.force`, `NODE.displacement`: the name and the field (boxed, as
    /// are calls, so that the common expressions stay small).
    Field(Box<[Ident; 2]>),
    /// Unary minus.
    Neg(Box<Expr>),
    /// `first (op operand)*` with `+`/`-`.
    Sum(Box<Expr>, Vec<(AddOp, Expr)>),
    /// `first (op operand)*` with `*`/`/`.
    Product(Box<Expr>, Vec<(MulOp, Expr)>),
    /// `base ^ exponent` (right-associative chains are nested).
    Power(Box<Expr>, Box<Expr>),
    /// `f(args)`.
    Call(Box<Call>),
}

/// `f(args)`.
#[derive(Clone, Debug, PartialEq)]
pub struct Call {
    pub func: Ident,
    pub args: Vec<Arg>,
}

/// `+` or `-`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum AddOp {
    Add,
    Sub,
}

/// `*` or `/`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MulOp {
    Mul,
    Div,
}

/// A call argument, named (`d = 10 in`) or positional.
#[derive(Clone, Debug, PartialEq)]
pub struct Arg {
    pub name: Option<Ident>,
    pub value: Expr,
    pub span: Span,
}

/// A unit expression such as `kip/in` or `kN/m^3`.
#[derive(Clone, Debug, PartialEq)]
pub struct UnitExpr {
    pub factors: Vec<UnitFactor>,
    pub span: Span,
}

/// One unit name with its power; `divide` when it follows a `/`.
#[derive(Clone, Debug, PartialEq)]
pub struct UnitFactor {
    pub name: compact_str::CompactString,
    pub power: i32,
    pub divide: bool,
    pub span: Span,
}

impl std::fmt::Display for UnitExpr {
    /// The unit as written, in canonical form: `kip/ft`, `in^2`, `kN*m`.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        for (i, u) in self.factors.iter().enumerate() {
            let op = match (i, u.divide) {
                (0, _) => "",
                (_, true) => "/",
                (_, false) => "*",
            };
            f.write_str(op)?;
            f.write_str(&u.name)?;
            if u.power != 1 {
                write!(f, "^{}", u.power)?;
            }
        }
        Ok(())
    }
}

impl Decl {
    /// Every expression the declaration writes (not those inside them), in
    /// order: what a walk over a file's names and units visits.
    pub fn exprs<'e>(&'e self, out: &mut Vec<&'e Expr>) {
        let block = |b: &'e Block, out: &mut Vec<&'e Expr>| {
            for e in &b.entries {
                if let Value::Exprs(list) = &e.value {
                    out.extend(list.iter());
                }
            }
        };
        let coord = |c: &'e Coord, out: &mut Vec<&'e Expr>| match c {
            Coord::Axial(e) => out.push(e),
            Coord::Plane(xy, _) => {
                let [x, y] = &**xy;
                out.push(x);
                out.push(y);
            }
        };
        let stmt = |s: &'e Stmt, out: &mut Vec<&'e Expr>| match s {
            Stmt::Load { force, .. } => coord(force, out),
            Stmt::Temperature { change, .. } => out.push(change),
            Stmt::Moment { value, .. } | Stmt::Strain { value, .. } => out.push(value),
            Stmt::Settle { movement, .. } => out.push(movement),
        };
        match self {
            Decl::Calc(b) => block(b, out),
            Decl::Material(nb) | Decl::Part(nb) | Decl::Beam(nb) | Decl::Rigid(nb) => {
                block(&nb.block, out);
            }
            Decl::Let(l) => out.push(&l.value),
            Decl::Node(n) => coord(&n.at, out),
            Decl::Case(c) => {
                for s in &c.stmts {
                    stmt(s, out);
                }
            }
            Decl::Stmt(s) => stmt(s, out),
            Decl::Check(c) => {
                out.push(&c.lhs);
                out.push(&c.rhs);
            }
            // no expressions of their own
            Decl::Fix(_)
            | Decl::Pin(..)
            | Decl::Tie(_)
            | Decl::Combine(_)
            | Decl::Units(_)
            | Decl::Group(_) => {}
        }
    }
}

impl Expr {
    /// Visit this expression and every expression inside it, outer first.
    /// Depth is bounded by the parser's nesting limits, and sums and
    /// products are flat, so the recursion stays shallow.
    pub fn visit<'e>(&'e self, f: &mut impl FnMut(&'e Expr)) {
        f(self);
        match &self.kind {
            ExprKind::Quantity { .. }
            | ExprKind::Unit(_)
            | ExprKind::Name(_)
            | ExprKind::Field(..) => {}
            ExprKind::Neg(x) => x.visit(f),
            ExprKind::Sum(a, rest) => {
                a.visit(f);
                for (_, x) in rest {
                    x.visit(f);
                }
            }
            ExprKind::Product(a, rest) => {
                a.visit(f);
                for (_, x) in rest {
                    x.visit(f);
                }
            }
            ExprKind::Power(a, b) => {
                a.visit(f);
                b.visit(f);
            }
            ExprKind::Call(c) => {
                for a in &c.args {
                    a.value.visit(f);
                }
            }
        }
    }

    /// Call `f` on this expression and every one inside it, mutably.
    pub fn visit_mut(&mut self, f: &mut impl FnMut(&mut Expr)) {
        f(self);
        match &mut self.kind {
            ExprKind::Quantity { .. }
            | ExprKind::Unit(_)
            | ExprKind::Name(_)
            | ExprKind::Field(..) => {}
            ExprKind::Neg(x) => x.visit_mut(f),
            ExprKind::Sum(a, rest) => {
                a.visit_mut(f);
                for (_, x) in rest {
                    x.visit_mut(f);
                }
            }
            ExprKind::Product(a, rest) => {
                a.visit_mut(f);
                for (_, x) in rest {
                    x.visit_mut(f);
                }
            }
            ExprKind::Power(a, b) => {
                a.visit_mut(f);
                b.visit_mut(f);
            }
            ExprKind::Call(c) => {
                for a in &mut c.args {
                    a.value.visit_mut(f);
                }
            }
        }
    }
}
