//! Files and argument values into checked library inputs (the only file I/O
//! besides writing outputs).

use anyhow::{bail, Context, Result};
use std::path::Path;

use crate::analysis::Problem;
use crate::catalog::{stock, Catalog};
use crate::device::{Corner, Family};
use crate::search::Shelf;
use crate::spec::{CatalogChoice, ValidSpec};
use crate::topology::{NetlistInput, Topology};
use crate::units::Quantity;

/// A specification with its resistor catalog loaded.
pub(crate) struct Loaded {
    pub(crate) spec: ValidSpec,
    pub(crate) catalog: Catalog,
}

/// Read and check a specification, and load its catalog.
pub(crate) fn spec(path: &Path) -> Result<Loaded> {
    let text =
        std::fs::read_to_string(path).with_context(|| format!("reading `{}`", path.display()))?;
    let mut spec = crate::spec::parse(&text).with_context(|| format!("in `{}`", path.display()))?;
    // A specification without a `name` is titled by its file.
    if spec.name.trim().is_empty() {
        if let Some(stem) = path.file_stem() {
            spec.name = stem.to_string_lossy().into_owned();
        }
    }
    let catalog = match &spec.parts.catalog {
        CatalogChoice::Series(s) => Catalog::from_series(
            *s,
            spec.parts.tolerance,
            spec.parts.r_min_ohm,
            spec.parts.r_max_ohm,
        )
        .with_context(|| format!("in `{}`: `parts.range`", path.display()))?,
        CatalogChoice::StockFile(f) => {
            let base = path.parent().unwrap_or_else(|| Path::new("."));
            let file = base.join(f);
            let text = std::fs::read_to_string(&file).with_context(|| {
                format!(
                    "in `{}`: `parts.series` = \"{f}\": reading `{}`",
                    path.display(),
                    file.display()
                )
            })?;
            stock::parse(&text).with_context(|| format!("in stock list `{}`", file.display()))?
        }
    };
    Ok(Loaded { spec, catalog })
}

impl Loaded {
    /// The shelf inside `[parts] range`.
    pub(crate) fn shelf(&self) -> Shelf {
        Shelf::new(
            &self.catalog,
            self.spec.parts.tolerance,
            self.spec.parts.r_min_ohm,
            self.spec.parts.r_max_ohm,
        )
    }

    /// Tolerance for a value the user typed: the spec's, else the shelf
    /// entry's, else the widest on the shelf (conservative).
    pub(crate) fn tolerance_for(&self, ohms: f64) -> f64 {
        if ohms == 0.0 {
            return 0.0;
        }
        if let Some(t) = self.spec.parts.tolerance {
            return t;
        }
        self.catalog
            .parts
            .iter()
            .find(|p| (p.ohms - ohms).abs() <= 1e-9 * ohms)
            .map(|p| p.tolerance)
            .unwrap_or_else(|| {
                self.catalog
                    .parts
                    .iter()
                    .map(|p| p.tolerance)
                    .fold(0.0, f64::max)
            })
    }
}

/// `R1=4.7M,R2=1M,...` into values in the topology's part order.
pub(crate) fn values(t: &dyn Topology, text: &str, family: Family) -> Result<Vec<f64>> {
    let mut items = Vec::new();
    for item in text.split(',').map(str::trim).filter(|s| !s.is_empty()) {
        let Some((name, val)) = item.split_once('=') else {
            bail!("`--values`: `{item}` is not DESIGNATOR=VALUE (e.g. RD=6.8k)");
        };
        let name = name.trim();
        let v = crate::units::parse_quantity(val, Quantity::Resistance)
            .with_context(|| format!("`--values` {name}"))?;
        items.push((name.to_string(), v, val.trim().to_string()));
    }
    place(t, &items, family, "`--values`")
}

/// Designator → ohms (e.g. a design's `values` from JSON) into values in
/// the topology's part order; `field` names the source in messages.
pub(crate) fn values_from_map(
    t: &dyn Topology,
    map: &[(String, f64)],
    family: Family,
    field: &str,
) -> Result<Vec<f64>> {
    let items: Vec<(String, f64, String)> = map
        .iter()
        .map(|(k, v)| (k.clone(), *v, v.to_string()))
        .collect();
    place(t, &items, family, field)
}

/// Check (designator, ohms, as written) items and put them in part order.
fn place(
    t: &dyn Topology,
    items: &[(String, f64, String)],
    family: Family,
    field: &str,
) -> Result<Vec<f64>> {
    let mut out: Vec<Option<f64>> = vec![None; t.parts().len()];
    for (name, v, written) in items {
        let (name, v) = (name.as_str(), *v);
        let Some(i) = t.index_of(name) else {
            bail!(
                "{field}: `{name}` is not a part of {}; its parts are {}",
                t.id(),
                t.parts().join(", ")
            );
        };
        let zero_ok = t.may_be_zero(i, family);
        if v == 0.0 && !zero_ok {
            bail!(
                "{field} {name} = {written}: {name} of {} may not be 0 Ω (a wire); \
                 it must be between 1 mΩ and 1 TΩ",
                t.id()
            );
        }
        if !v.is_finite() || v < 0.0 || !(1e-3..=1e12).contains(&v) && v != 0.0 {
            bail!(
                "{field} {name} = {written}: must be between 1 mΩ and 1 TΩ{}",
                if zero_ok { " (or 0 for a wire)" } else { "" }
            );
        }
        if let Some(slot) = out.get_mut(i) {
            if slot.replace(v).is_some() {
                bail!("{field}: {name} is given twice");
            }
        }
    }
    let missing: Vec<&str> = t
        .parts()
        .iter()
        .zip(&out)
        .filter(|(_, v)| v.is_none())
        .map(|(p, _)| *p)
        .collect();
    if !missing.is_empty() {
        bail!(
            "{field}: missing {} (a {} needs {})",
            missing.join(", "),
            t.id(),
            t.parts().join(", ")
        );
    }
    Ok(out.into_iter().map(|v| v.unwrap_or(0.0)).collect())
}

/// A topology by id, or an error listing the ids; `field` names the source.
pub(crate) fn topology(id: &str, field: &str) -> Result<&'static dyn Topology> {
    crate::topology::by_id(id).with_context(|| {
        format!(
            "{field} = {id}: unknown; expected one of {}",
            crate::topology::ids().join(", ")
        )
    })
}

/// `MIN..MAX` resistances in engineering notation, either order. Exactly
/// two dots part the ends: `100k...1M` is refused, not read as 100k..0.1M.
pub(crate) fn parse_span(text: &str) -> Result<(f64, f64)> {
    let shape =
        || format!("`{text}` is not MIN..MAX with two dots between the ends (e.g. 100k..1M)");
    let Some((a, b)) = text.split_once("..") else {
        bail!(shape());
    };
    if a.trim().is_empty() || b.trim().is_empty() || b.starts_with('.') || b.contains("..") {
        bail!(shape());
    }
    let a = crate::units::parse_quantity(a, Quantity::Resistance)?;
    let b = crate::units::parse_quantity(b, Quantity::Resistance)?;
    if a <= 0.0 || b <= 0.0 {
        bail!("`{text}`: both ends must be greater than 0");
    }
    let modelled = crate::spec::R_MIN_OHM..=crate::spec::R_MAX_OHM;
    if !modelled.contains(&a) || !modelled.contains(&b) {
        bail!("`{text}`: both ends must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models");
    }
    Ok((a.min(b), a.max(b)))
}

/// Netlist inputs for a device corner with mid-band placeholder capacitors.
pub(crate) fn netlist_input(p: &Problem, corner: &Corner) -> NetlistInput {
    p.netlist_input(corner)
}
