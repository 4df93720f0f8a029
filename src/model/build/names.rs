//! The name table: one namespace per file, reserved words, resolution and
//! "did you mean".

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// What a declared name stands for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum NameKind {
    Let,
    Material,
    Node,
    Part,
    Rigid,
    Case,
    Combination,
    Group,
}

impl NameKind {
    /// How many kinds there are.
    pub(super) const COUNT: usize = NameKind::Group as usize + 1;

    pub(super) fn word(self) -> &'static str {
        match self {
            NameKind::Let => "value",
            NameKind::Material => "material",
            NameKind::Node => "node",
            NameKind::Part => "part",
            NameKind::Rigid => "rigid body",
            NameKind::Case => "case",
            NameKind::Combination => "combination",
            NameKind::Group => "group",
        }
    }
}

/// The declared names of a file. The table holds only the position of each
/// first declaration in the file's list, so that it stays small (a few
/// bytes a name) and a lookup among millions of names touches little
/// memory; the name itself is compared in the declaration, which for names
/// looked up in file order is close to the last one. Large files split the
/// table into shards by hash, one filled on each core.
pub(super) struct Names<'a> {
    pub(super) shards: Vec<hashbrown::HashTable<u32>>,
    pub(super) hasher: foldhash::fast::FixedState,
    /// For each declaration, its number among the declarations of its kind.
    pub(super) number: Vec<u32>,
    pub(super) file: &'a ast::File,
    /// Suggestions left to make: each scans every name of a kind, so a file
    /// with thousands of wrong names gets suggestions for the first ones
    /// only (the rest are not shown anyway).
    pub(super) suggestions: std::sync::atomic::AtomicUsize,
}

impl<'a> Names<'a> {
    /// The name declared by declaration `i`.
    pub(super) fn declared(&self, i: u32) -> Option<(&'a Ident, NameKind)> {
        declared_name(&self.file.decls[i as usize])
    }

    pub(super) fn position(&self, name: &str) -> Option<u32> {
        let hash = std::hash::BuildHasher::hash_one(&self.hasher, name);
        self.shards[shard(hash, self.shards.len())]
            .find(hash, |&i| {
                self.declared(i).is_some_and(|(id, _)| id.name == name)
            })
            .copied()
    }

    pub(super) fn get(&self, name: &str) -> Option<(NameKind, usize, Span)> {
        let i = self.position(name)?;
        let (id, kind) = self.declared(i)?;
        Some((kind, self.number[i as usize] as usize, id.span))
    }

    /// Whether `name` is declared by a `beam`.
    pub(super) fn is_beam(&self, name: &str) -> bool {
        self.position(name)
            .is_some_and(|i| matches!(self.file.decls[i as usize], ast::Decl::Beam(_)))
    }

    /// The registered names of `kind`, in file order (a duplicate is left
    /// out: only its first declaration is registered).
    pub(super) fn of_kind(&self, kind: NameKind) -> impl Iterator<Item = &'a str> + '_ {
        self.file
            .decls
            .iter()
            .enumerate()
            .filter_map(move |(i, d)| {
                let (id, k) = declared_name(d)?;
                let first = self.position(&id.name) == u32::try_from(i).ok();
                (k == kind && first).then_some(id.name.as_str())
            })
    }

    /// The closest name of `kind`, while the budget of suggestions lasts.
    pub(super) fn suggest(&self, name: &str, kind: NameKind) -> Option<String> {
        self.suggest_among(name, self.of_kind(kind))
    }

    /// The closest of `candidates`, while the budget of suggestions lasts.
    pub(super) fn suggest_among<'c>(
        &self,
        name: &str,
        candidates: impl IntoIterator<Item = &'c str>,
    ) -> Option<String> {
        use std::sync::atomic::Ordering;
        let left = self
            .suggestions
            .fetch_update(Ordering::Relaxed, Ordering::Relaxed, |n| n.checked_sub(1));
        if left.is_err() {
            return None;
        }
        did_you_mean(name, candidates)
    }

    /// Resolve a name that must be of `kind`, with a suggestion when not.
    pub(super) fn resolve(&self, id: &Ident, kind: NameKind) -> Result<usize, ModelError> {
        match self.get(&id.name) {
            Some((k, i, _)) if k == kind => Ok(i),
            Some((k, _, _)) => Err(ModelError::WrongKind {
                name: id.name.to_string(),
                found: k.word(),
                expected: kind.word(),
                span: id.span,
                help: self.suggest(&id.name, kind),
            }),
            None => Err(ModelError::UnknownName {
                kind: kind.word(),
                name: id.name.to_string(),
                span: id.span,
                help: self.suggest(&id.name, kind).or_else(|| {
                    let all: Vec<_> = self.of_kind(kind).take(6).collect();
                    if all.is_empty() {
                        Some(format!("the file declares no {}", kind.word()))
                    } else {
                        Some(format!(
                            "the {}s are {}",
                            kind.word(),
                            all.iter()
                                .map(|n| format!("`{n}`"))
                                .collect::<Vec<_>>()
                                .join(", ")
                        ))
                    }
                }),
            }),
        }
    }
}

/// The shard of the name table a hash belongs to: bits that neither the
/// table's bucket index (low bits) nor its tag (top seven) use.
pub(super) fn shard(hash: u64, shards: usize) -> usize {
    ((hash >> 32) & 0xFF_FFFF) as usize % shards
}

/// One shard of the name table, and the errors found filling it, each with
/// its declaration's position.
pub(super) type Shard = (hashbrown::HashTable<u32>, Vec<(usize, ModelError)>);

/// Register the names whose hash falls in shard `which` of `shards`, in
/// file order: the table of first declarations, and the errors (names too
/// long, reserved words, duplicates), each with its declaration's position.
pub(super) fn fill_shard(
    file: &ast::File,
    hasher: &foldhash::fast::FixedState,
    which: usize,
    shards: usize,
    limits: Limits,
) -> Shard {
    use std::hash::BuildHasher;
    let mut table = hashbrown::HashTable::with_capacity(file.decls.len() / shards + 16);
    let mut errors = Vec::new();
    let name_at = |j: u32| declared_name(&file.decls[j as usize]).map(|(id, _)| id);
    for (i, d) in file.decls.iter().enumerate() {
        let Some((id, _)) = declared_name(d) else {
            continue;
        };
        let hash = hasher.hash_one(id.name.as_str());
        if shard(hash, shards) != which {
            continue;
        }
        if id.name.len() > limits.max_name_len {
            errors.push((
                i,
                ModelError::too_many(
                    "characters in a name",
                    id.name.len(),
                    limits.max_name_len,
                    id.span,
                ),
            ));
        }
        if let Some(what) = reserved(&id.name) {
            errors.push((
                i,
                ModelError::Reserved {
                    name: id.name.to_string(),
                    what,
                    span: id.span,
                },
            ));
        }
        match table.entry(
            hash,
            |&j| name_at(j).is_some_and(|n| n.name == id.name),
            |&j| name_at(j).map_or(0, |n| hasher.hash_one(n.name.as_str())),
        ) {
            hashbrown::hash_table::Entry::Occupied(o) => {
                let first = name_at(*o.get()).map_or(id.span, |n| n.span);
                errors.push((
                    i,
                    ModelError::Duplicate {
                        name: id.name.to_string(),
                        span: id.span,
                        first,
                    },
                ));
            }
            hashbrown::hash_table::Entry::Vacant(v) => {
                // at most `max_declarations` (checked before), far below 2^32
                v.insert(u32::try_from(i).unwrap_or(u32::MAX));
            }
        }
    }
    (table, errors)
}

/// The name a declaration declares, and what it stands for.
pub(super) fn declared_name(d: &Decl) -> Option<(&Ident, NameKind)> {
    Some(match d {
        Decl::Let(l) => (&l.name, NameKind::Let),
        Decl::Material(nb) => (&nb.name, NameKind::Material),
        // beams live among the parts: their results, groups and checks
        Decl::Part(nb) | Decl::Beam(nb) => (&nb.name, NameKind::Part),
        Decl::Rigid(nb) => (&nb.name, NameKind::Rigid),
        Decl::Node(n) => (&n.name, NameKind::Node),
        Decl::Case(c) => (&c.name, NameKind::Case),
        Decl::Combine(c) => (&c.name, NameKind::Combination),
        Decl::Group(g) => (&g.name, NameKind::Group),
        _ => return None,
    })
}

/// What a name already means (a unit, a function or a constant), if it
/// cannot be declared: one lookup in a table of every such word.
pub(super) fn reserved(name: &str) -> Option<&'static str> {
    static WORDS: std::sync::OnceLock<HashMap<&'static str, &'static str>> =
        std::sync::OnceLock::new();
    let words = WORDS.get_or_init(|| {
        let mut m = HashMap::new();
        // units first: a word that is both is reported as a unit
        for u in crate::units::units() {
            m.entry(u.name).or_insert("a unit");
        }
        for f in crate::model::functions::names() {
            m.entry(f).or_insert("a function");
        }
        for c in CONSTANTS {
            m.entry(*c).or_insert("a constant");
        }
        m
    });
    words.get(name).copied()
}

impl Builder {
    pub(super) fn register<'a>(&mut self, file: &'a ast::File) -> Names<'a> {
        // Numbers among each kind, in file order.
        let mut number = vec![0u32; file.decls.len()];
        let mut counters = [0u32; NameKind::COUNT];
        for (n, d) in number.iter_mut().zip(&file.decls) {
            if let Some((_, kind)) = declared_name(d) {
                *n = counters[kind as usize];
                counters[kind as usize] += 1;
            }
        }
        let workers = crate::parallel::runs_for(file.decls.len(), 20_000);
        let hasher = foldhash::fast::FixedState::default();
        let limits = self.limits;
        let filled: Vec<Shard> = crate::parallel::each(workers, |which| {
            fill_shard(file, &hasher, which, workers, limits)
        });
        let mut shards = Vec::with_capacity(workers);
        let mut errors = Vec::new();
        for (table, e) in filled {
            shards.push(table);
            errors.extend(e);
        }
        // in file order; one declaration's errors all come from one shard,
        // in the order it found them
        errors.sort_by_key(|(i, _)| *i);
        self.errors.extend(errors.into_iter().map(|(_, e)| e));
        Names {
            shards,
            hasher,
            number,
            file,
            suggestions: std::sync::atomic::AtomicUsize::new(crate::words::MAX_SHOWN),
        }
    }
}
