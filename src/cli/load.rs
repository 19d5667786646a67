//! Files and argument values into checked library inputs (the only file I/O
//! besides writing outputs).

use anyhow::{bail, Context, Result};
use std::path::Path;

use crate::analysis::Problem;
use crate::catalog::{stock, Catalog};
use crate::device::{Corner, Family};
use crate::search::Shelf;
use crate::spec::{CatalogChoice, ValidSpec};
use crate::topology::{Caps, NetlistInput, Topology};

/// A specification with its resistor catalog loaded.
pub(crate) struct Loaded {
    pub(crate) spec: ValidSpec,
    pub(crate) catalog: Catalog,
}

/// Read and check a specification, and load its catalog.
pub(crate) fn spec(path: &Path) -> Result<Loaded> {
    let text =
        std::fs::read_to_string(path).with_context(|| format!("reading `{}`", path.display()))?;
    let spec = crate::spec::parse(&text).with_context(|| format!("in `{}`", path.display()))?;
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
    let mut out: Vec<Option<f64>> = vec![None; t.parts().len()];
    for item in text.split(',').map(str::trim).filter(|s| !s.is_empty()) {
        let Some((name, val)) = item.split_once('=') else {
            bail!("`--values`: `{item}` is not DESIGNATOR=VALUE (e.g. RD=6.8k)");
        };
        let name = name.trim();
        let Some(i) = t.index_of(name) else {
            bail!(
                "`--values`: `{name}` is not a part of {}; its parts are {}",
                t.id(),
                t.parts().join(", ")
            );
        };
        let v = crate::units::parse_value(val).with_context(|| format!("`--values` {name}"))?;
        let zero_ok = t.may_be_zero(i, family);
        if v == 0.0 && !zero_ok {
            bail!(
                "`--values` {name} = {val}: {name} of {} may not be 0 Ω (a wire); \
                 it must be between 1 mΩ and 1 TΩ",
                t.id()
            );
        }
        if v < 0.0 || (v == 0.0 && !zero_ok) || !(1e-3..=1e12).contains(&v) && v != 0.0 {
            bail!(
                "`--values` {name} = {val}: must be between 1 mΩ and 1 TΩ{}",
                if zero_ok { " (or 0 for a wire)" } else { "" }
            );
        }
        if out[i].replace(v).is_some() {
            bail!("`--values`: {name} is given twice");
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
            "`--values`: missing {} (a {} needs {})",
            missing.join(", "),
            t.id(),
            t.parts().join(", ")
        );
    }
    Ok(out.into_iter().map(|v| v.unwrap_or(0.0)).collect())
}

/// `MIN..MAX` in engineering notation, either order.
pub(crate) fn parse_span(text: &str) -> Result<(f64, f64)> {
    let Some((a, b)) = text.split_once("..") else {
        bail!("`{text}` is not MIN..MAX (e.g. 100k..1M)");
    };
    let a = crate::units::parse_value(a)?;
    let b = crate::units::parse_value(b)?;
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
    NetlistInput {
        law: corner.law,
        kind: p.kind,
        rails: p.rails,
        rl_ohm: p.spec.rl_ohm,
        rsig_ohm: p.spec.source_resistance_ohm,
        caps: Caps::MID_BAND,
    }
}
