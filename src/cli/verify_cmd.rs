//! `gatewright verify`: one design's closed-form results against the
//! independent nodal solver at every device corner.
//!
//! Exit codes: 0 = they agree at every corner, 1 = they disagree (or the
//! solver failed) somewhere, 2 = bad input (the caller's error path).

use anyhow::{bail, Context, Result};
use serde_json::Value;
use std::path::Path;
use std::process::ExitCode;

use super::args::{Format, VerifyArgs};
use super::{emit, load, talk, versioned_json};
use crate::analysis::Problem;
use crate::bench::crosscheck;
use crate::topology::Topology;

/// Run the command.
pub(crate) fn run(a: VerifyArgs) -> Result<ExitCode> {
    if matches!(a.format, Format::Csv | Format::Spice) {
        bail!("`--format` for `verify` is table or json");
    }
    let loaded = load::spec(&a.spec)?;
    let family = loaded.spec.device.family;
    let (t, values) = match (&a.design, &a.topology, &a.values) {
        (Some(file), _, _) => from_design_file(file, a.rank.unwrap_or(1), family)?,
        (None, Some(id), Some(text)) => {
            let t = load::topology(id, "`--topology`")?;
            (t, load::values(t, text, family)?)
        }
        _ => bail!("`verify` needs `--topology ID --values ...` or `--design FILE.json`"),
    };
    if !t.supports(family) {
        talk(&format!(
            "warning: {} is not a usual topology for a {}; verifying anyway",
            t.id(),
            family.id()
        ));
    }
    if t.needs_vss() && loaded.spec.supply.vss_v >= 0.0 {
        bail!(
            "topology {}: needs a negative rail; set `supply.vss` below 0 V",
            t.id()
        );
    }
    let p = Problem::new(&loaded.spec);
    let view = crosscheck::verification(&p, t, &values);
    let text = match a.format {
        Format::Json => versioned_json(&view)?,
        _ => {
            let order: Vec<String> = t.parts().iter().map(|s| s.to_string()).collect();
            crate::report::verify_table::verification(&view, &order)
        }
    };
    emit(&text)?;
    Ok(if view.agrees {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    })
}

/// The topology and values of one design in a `design --format json` file:
/// the entry of `designs` with the given `rank`, or the file itself when it
/// is a single entry (an object with `topology` and `values`).
fn from_design_file(
    file: &Path,
    rank: u16,
    family: crate::device::Family,
) -> Result<(&'static dyn Topology, Vec<f64>)> {
    let name = file.display();
    let text = super::load::read_text(file, "design file")?;
    let root: Value =
        serde_json::from_str(&text).with_context(|| format!("`{name}` is not valid JSON"))?;
    let (entry, at) = match root.get("designs") {
        Some(Value::Array(list)) => {
            let found = list
                .iter()
                .find(|d| d.get("rank").and_then(Value::as_u64) == Some(u64::from(rank)));
            match found {
                Some(d) => (d, format!("`{name}`: designs[rank {rank}]")),
                None => bail!(
                    "`--rank` = {rank}: `{name}` lists {} design(s) (ranks 1..={})",
                    list.len(),
                    list.len()
                ),
            }
        }
        Some(_) => bail!("`{name}`: `designs` must be an array"),
        None => (&root, format!("`{name}`")),
    };
    let Some(id) = entry.get("topology").and_then(Value::as_str) else {
        bail!(
            "{at}: no `topology` string (expected a design from `gatewright design --format json`)"
        );
    };
    let t = load::topology(id, &format!("{at}.topology"))?;
    let Some(Value::Object(map)) = entry.get("values") else {
        bail!("{at}: no `values` object of designator → ohms");
    };
    let mut pairs = Vec::with_capacity(map.len());
    for (k, v) in map {
        let Some(ohms) = v.as_f64() else {
            bail!("{at}.values.{k} = {v}: must be a number of ohms");
        };
        pairs.push((k.clone(), ohms));
    }
    let values = load::values_from_map(t, &pairs, family, &format!("{at}.values"))?;
    Ok((t, values))
}
