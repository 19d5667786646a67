//! Files and argument values into checked library inputs (the only file I/O
//! besides writing outputs).

use anyhow::{bail, Context, Result};
use std::io::Read;
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

/// The most bytes an input file (specification, stock list, design JSON)
/// may hold: 64 MiB, about 1.5 million stock-list parts. A larger file, or
/// a pipe or device that gives more (`/dev/zero`), is refused rather than
/// read until memory runs out.
pub(crate) const MAX_INPUT_BYTES: u64 = 64 << 20;

/// The text of an input file, at most [`MAX_INPUT_BYTES`]. Pipes and
/// devices are read up to the limit as well (a shell's `<(...)` is a
/// pipe); errors name the file and the limit. `what` names the file's role
/// in messages ("specification", "stock list").
pub(crate) fn read_text(path: &Path, what: &str) -> Result<String> {
    read_bounded(path, what, MAX_INPUT_BYTES)
}

fn read_bounded(path: &Path, what: &str, limit: u64) -> Result<String> {
    let name = path.display();
    let file = std::fs::File::open(path).with_context(|| format!("reading `{name}`"))?;
    // A regular file's size is known before reading; a pipe or device
    // reports 0 and is read up to the limit.
    if let Ok(meta) = file.metadata() {
        if meta.is_file() && meta.len() > limit {
            bail!(
                "`{name}`: the {what} is {}, over the limit of {} for an input file",
                mib(meta.len()),
                mib(limit)
            );
        }
    }
    read_stream(file, &format!("`{name}`"), what, limit)
}

/// The text of the specification on standard input (`-` for SPEC), at most
/// [`MAX_INPUT_BYTES`] like a file.
fn read_stdin(what: &str) -> Result<String> {
    read_stream(std::io::stdin().lock(), STDIN, what, MAX_INPUT_BYTES)
}

/// How standard input is named in messages.
const STDIN: &str = "standard input";

/// Up to `limit` bytes of UTF-8 text from `reader`; `shown` names the
/// source in messages.
fn read_stream(reader: impl Read, shown: &str, what: &str, limit: u64) -> Result<String> {
    let mut bytes = Vec::new();
    reader
        .take(limit + 1)
        .read_to_end(&mut bytes)
        .with_context(|| format!("reading {shown}"))?;
    if bytes.len() as u64 > limit {
        bail!(
            "{shown}: the {what} runs past the limit of {} for an input file (read as a stream, from a pipe or device)",
            mib(limit)
        );
    }
    String::from_utf8(bytes).map_err(|e| {
        anyhow::anyhow!(
            "reading {shown}: the {what} is not UTF-8 text (invalid at byte offset {})",
            e.utf8_error().valid_up_to()
        )
    })
}

/// Bytes in mebibytes for messages: `64 MiB`, `70.3 MiB` (below 1 MiB in
/// bytes).
fn mib(bytes: u64) -> String {
    if bytes < 1 << 20 {
        return format!("{bytes} bytes");
    }
    let m = bytes as f64 / f64::from(1u32 << 20);
    if m.fract() == 0.0 {
        format!("{m:.0} MiB")
    } else {
        format!("{m:.1} MiB")
    }
}

/// Read and check a specification, and load its catalog. `-` reads it
/// from standard input (a stock list it names is then looked for in the
/// current folder).
pub(crate) fn spec(path: &Path) -> Result<Loaded> {
    let stdin = path == Path::new("-");
    let (text, shown) = if stdin {
        (read_stdin("specification")?, STDIN.to_string())
    } else {
        (
            read_text(path, "specification")?,
            format!("`{}`", path.display()),
        )
    };
    let mut spec = crate::spec::parse(&text).with_context(|| format!("in {shown}"))?;
    // A specification without a `name` is titled by its file.
    if spec.name.trim().is_empty() {
        if stdin {
            spec.name = "stdin".to_string();
        } else if let Some(stem) = path.file_stem() {
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
        .with_context(|| format!("in {shown}: `parts.range`"))?,
        CatalogChoice::StockFile(f) => {
            let base = if stdin {
                Path::new("")
            } else {
                path.parent().unwrap_or_else(|| Path::new("."))
            };
            let file = base.join(f);
            let text = read_text(&file, "stock list")
                .with_context(|| format!("in {shown}: `parts.series` = \"{f}\""))?;
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

    /// Tolerance for a value the user typed (see
    /// [`Catalog::tolerance_for`]).
    pub(crate) fn tolerance_for(&self, ohms: f64) -> f64 {
        self.catalog.tolerance_for(ohms, self.spec.parts.tolerance)
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

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> std::path::PathBuf {
        let dir =
            std::env::temp_dir().join(format!("gatewright-load-{tag}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        dir
    }

    #[test]
    fn a_file_at_the_limit_is_read_and_one_byte_more_is_refused() {
        let dir = scratch("limit");
        let path = dir.join("spec.toml");
        std::fs::write(&path, "a = 1\n").unwrap();
        assert_eq!(read_bounded(&path, "specification", 6).unwrap(), "a = 1\n");
        let e = read_bounded(&path, "specification", 5).unwrap_err();
        assert_eq!(
            e.to_string(),
            format!(
                "`{}`: the specification is 6 bytes, over the limit of 5 bytes for an input file",
                path.display()
            )
        );
        let _ = std::fs::remove_dir_all(&dir);
    }

    #[test]
    fn a_device_is_read_up_to_the_limit_only() {
        // /dev/zero never ends: reading it whole would exhaust memory.
        let e = read_bounded(Path::new("/dev/zero"), "stock list", 1 << 20).unwrap_err();
        assert_eq!(
            e.to_string(),
            "`/dev/zero`: the stock list runs past the limit of 1 MiB for an input file (read as a stream, from a pipe or device)"
        );
    }

    #[test]
    fn sizes_are_given_in_mebibytes() {
        assert_eq!(mib(64 << 20), "64 MiB");
        assert_eq!(mib((64 << 20) + (1 << 19)), "64.5 MiB");
        assert_eq!(mib(1000), "1000 bytes");
    }
}
