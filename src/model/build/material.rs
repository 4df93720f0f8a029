//! The title block, materials and the `units` declaration.

#![allow(clippy::wildcard_imports)] // the builder's shared imports and helpers

use super::*;

/// The keys of a `material` block.
pub(crate) const MATERIAL_KEYS: &[&str] = &[
    "E",
    "alpha",
    "yield",
    "yield_compression",
    "allowable",
    "allowable_tension",
    "allowable_compression",
    "creep",
];

impl Builder {
    /// The title block, the materials and the `units` declaration.
    pub(super) fn title_materials_units(
        &mut self,
        file: &ast::File,
        scope: &LetScope<'_, '_>,
    ) -> (Title, Vec<Material>, UnitChoice) {
        let mut title = Title::default();
        let mut materials = Vec::new();
        let mut units = UnitChoice::Auto;
        for d in &file.decls {
            match d {
                Decl::Calc(b) => {
                    let f = Fields::new(
                        b,
                        What {
                            kind: "the title block",
                            name: None,
                        },
                        Title::KEYS,
                        &mut self.errors,
                    );
                    for key in Title::KEYS {
                        if let Some(e) = f.map.get(key) {
                            match &e.value {
                                Value::Str(s) => title.fields.push((key, s.text.clone())),
                                Value::Exprs(list) => {
                                    self.errors.push(ModelError::title_not_string(
                                        key,
                                        list[0].span.to(list[list.len() - 1].span),
                                    ));
                                }
                            }
                        }
                    }
                }
                Decl::Material(nb) => materials.extend(self.material(nb, scope)),
                Decl::Units(u) => units = self.units(u),
                _ => {}
            }
        }
        (title, materials, units)
    }

    pub(super) fn units(&mut self, u: &ast::Units) -> UnitChoice {
        match u {
            ast::Units::System(id) if id.name == "us" => UnitChoice::Us,
            ast::Units::System(_) => UnitChoice::Si,
            ast::Units::List(list) => {
                let mut out: Vec<(String, Quantity)> = Vec::new();
                for ue in list {
                    if let Some(q) = self.ok(crate::model::eval::unit_value(ue)) {
                        let text = ue.to_string();
                        if let Some((first, _)) = out.iter().find(|(_, o)| o.dim == q.dim) {
                            self.errors.push(ModelError::SameKindUnits {
                                first: first.clone(),
                                second: text,
                                kind: q.dim.describe(),
                                span: ue.span,
                            });
                            continue;
                        }
                        out.push((text, q));
                    }
                }
                UnitChoice::List(out)
            }
        }
    }

    pub(super) fn material(&mut self, nb: &ast::NamedBlock, scope: &dyn Scope) -> Option<Material> {
        let what = What::named("material", &nb.name.name);
        let f = Fields::new(&nb.block, what, MATERIAL_KEYS, &mut self.errors);
        let e = self.opt(f.quantity("E", Dimension::PRESSURE, scope));
        if !f.has("E") {
            self.errors.push(f.missing("E"));
        }
        let alpha = self
            .opt(f.quantity("alpha", Dimension::PER_TEMPERATURE, scope))
            .map(|q| TemperatureCoefficient::new::<per_kelvin>(q.value));
        if alpha.is_none() && f.has("alpha") {
            // its error is reported; a temperature change does not repeat it
            self.alpha_failed.insert(nb.name.name.to_string());
        }
        let stress = |key: &str, b: &mut Self, strict: bool| {
            let q = b.opt(f.quantity(key, Dimension::PRESSURE, scope))?;
            if q.value < 0.0 || (strict && q.value == 0.0) {
                let sp = f.map.get(key).map(|e| e.span).unwrap_or_default();
                b.errors.push(ModelError::NotPositive {
                    what: format!("`{key}` of {what}"),
                    value: "zero or less".into(),
                    span: sp,
                    help: None,
                });
                return None;
            }
            Some(si_pressure(q))
        };
        let yield_strength = stress("yield", self, true);
        let yield_compression = stress("yield_compression", self, true);
        let allowable = stress("allowable", self, false);
        let allowable_tension = stress("allowable_tension", self, false);
        let allowable_compression = stress("allowable_compression", self, false);
        let creep = self
            .opt(f.quantity("creep", Dimension::NONE, scope))
            .map(|q| q.value);
        if let Some(c) = creep {
            if c < 0.0 {
                self.errors.push(ModelError::negative_creep(
                    format!("`creep` of {what}"),
                    c,
                    f.map.get("creep").map(|e| e.span).unwrap_or_default(),
                ));
            }
        }
        let mut e_sources = Vec::new();
        // a rebuild keeps a material's sources and expressions (they do
        // not change with the values)
        if let (false, Some(Ok(expr))) = (self.numbers_only, f.expr("E")) {
            crate::model::functions::sources(expr, &mut e_sources);
            let mut refs = Vec::new();
            walk_names(expr, &mut refs);
            for id in refs {
                for s in self
                    .let_sources
                    .get(id.name.as_str())
                    .cloned()
                    .unwrap_or_default()
                {
                    if !e_sources.contains(&s) {
                        e_sources.push(s);
                    }
                }
            }
        }
        let e = e?;
        if e.value <= 0.0 {
            let sp = f.map.get("E").map(|x| x.span).unwrap_or_default();
            self.errors.push(ModelError::modulus_not_positive(
                format!("`E` of {what}"),
                sp,
            ));
            return None;
        }
        // keys derived from other names, for the report's substitution
        let mut derived = Vec::new();
        for key in MATERIAL_KEYS.iter().filter(|_| !self.numbers_only) {
            if let Some(Ok(e)) = f.expr(key) {
                let mut named = false;
                e.visit(&mut |x| named |= matches!(x.kind, ExprKind::Name(_)));
                if named {
                    derived.push((*key, e.clone()));
                }
            }
        }
        Some(Material {
            derived,
            // a rebuild keeps the name it has
            name: if self.numbers_only {
                String::new()
            } else {
                nb.name.name.to_string()
            },
            e: si_pressure(e),
            alpha,
            yield_strength,
            yield_compression,
            allowable,
            allowable_tension,
            allowable_compression,
            creep,
            e_sources,
            span: nb.span,
        })
    }
}
