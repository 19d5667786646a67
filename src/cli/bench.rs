//! `design SPEC --pick N [--out DIR [--force]]`: the bench files of one
//! ranked design, printed (the report) or written to a folder.
//!
//! Every file is rendered in memory first; only then is anything written,
//! all or nothing, by [`super::out_dir`].

use anyhow::{bail, Context, Result};
use std::path::Path;
use std::process::ExitCode;

use super::{emit, talk};
use crate::analysis::Problem;
use crate::bench::summary::DesignReport;
use crate::bench::view::{bench_view, nominal_netlist, BenchView};
use crate::report::bom::{bom_csv, bom_rows, tolerance_text, BomRow};
use crate::report::spice::netlist_to_spice;
use crate::report::svg::{bias::bias_svg, response::response_svg, schematic::schematic_svg};
use crate::report::{table, text};
use crate::search::{Design, Outcome};

/// The names of the files `--out` writes (what [`render`] returns), which
/// `--force` knows as gatewright's own in a folder it replaces.
pub(crate) const FILES: [&str; 6] = [
    "report.txt",
    "bom.csv",
    "design.cir",
    "schematic.svg",
    "bias.svg",
    "response.svg",
];

/// Run `--pick`.
pub(crate) fn run(
    p: &Problem,
    report: &DesignReport,
    outcome: &Outcome,
    pick: usize,
    out: Option<&Path>,
    force: bool,
) -> Result<ExitCode> {
    if outcome.designs.is_empty() {
        talk(&table::design(report));
        talk(&format!("`--pick` = {pick}: no feasible design to pick"));
        return Ok(ExitCode::from(1));
    }
    let count = outcome.designs.len();
    let Some(d) = pick.checked_sub(1).and_then(|i| outcome.designs.get(i)) else {
        bail!(
            "`--pick` = {pick}: out of range; the search found {count} design{} (ranked 1 to {count})",
            if count == 1 { "" } else { "s" }
        );
    };
    let view = bench_view(p, &report.series, pick, d, outcome.nominal_only)
        .with_context(|| format!("design #{pick} ({})", d.topology.id()))?;
    let bom = bom_for(p, d, &report.series, &view);
    let report_text = text::bench(&view, &bom);
    let Some(dir) = out else {
        emit(&report_text)?;
        return Ok(ExitCode::SUCCESS);
    };
    let contents: Vec<(&str, Vec<u8>)> = render(p, d, &view, &bom, report_text)
        .into_iter()
        .map(|(name, text)| (name, text.into_bytes()))
        .collect();
    super::out_dir::write_folder(dir, force, &contents)?;
    let names: Vec<&str> = contents.iter().map(|(name, _)| *name).collect();
    talk(&format!(
        "wrote {} to `{}`",
        names.join(", "),
        dir.display()
    ));
    Ok(ExitCode::SUCCESS)
}

/// BOM rows; capacitors that are not sized (no `f_low`) are listed as such.
fn bom_for(p: &Problem, d: &Design, series: &str, view: &BenchView) -> Vec<BomRow> {
    let mut rows = bom_rows(p, d, series, &view.duty, &view.cap_pairs());
    if let Some(plan) = &view.caps {
        for r in &mut rows {
            if let Some(c) = plan.caps.iter().find(|c| c.designator == r.designator) {
                r.series = format!("{} {}", c.series, c.dielectric);
                r.tolerance = tolerance_text(c.tolerance);
            }
        }
    }
    if view.caps.is_none() {
        let at = rows.len().saturating_sub(1);
        for (name, _) in d.topology.capacitors(&d.values).iter().rev() {
            rows.insert(
                at,
                BomRow {
                    designator: (*name).to_string(),
                    value: "not sized".to_string(),
                    series: String::new(),
                    tolerance: String::new(),
                    rating: String::new(),
                    quantity: 1,
                    notes: "set [band] f_low in the specification to size it".to_string(),
                },
            );
        }
    }
    if view.nominal_only {
        // Every row says so: a BOM travels on its own.
        for r in &mut rows {
            r.notes = if r.notes.is_empty() {
                crate::bench::summary::NOMINAL_ONLY.to_string()
            } else {
                format!("{}; {}", crate::bench::summary::NOMINAL_ONLY, r.notes)
            };
        }
    }
    rows
}

fn render(
    p: &Problem,
    d: &Design,
    view: &BenchView,
    bom: &[BomRow],
    report_text: String,
) -> Vec<(&'static str, String)> {
    let t = d.topology;
    let mut title = format!("{} — #{} {}", view.name, view.design.rank, t.id());
    if view.nominal_only {
        title.push_str(&format!(" ({})", crate::bench::summary::NOMINAL_ONLY));
    }
    let net = nominal_netlist(p, d, view.cap_values());
    let cap_note = match &view.caps {
        Some(plan) => format!(
            "capacitors sized for f_low = {} Hz (see report.txt)",
            plan.f_low_hz
        ),
        None => "capacitors are 1 F placeholders: no [band] f_low was given".to_string(),
    };
    let mut header = vec![format!("{}: nominal device", view.name), cap_note];
    if view.nominal_only {
        header.insert(
            0,
            format!(
                "{}: {}",
                crate::bench::summary::NOMINAL_ONLY,
                crate::bench::summary::NOMINAL_ONLY_WHY
            ),
        );
    }
    let spice = netlist_to_spice(
        &net,
        &format!("gatewright design #{} {}", view.design.rank, t.id()),
        &header,
    );
    let window = p.spec.limits.id_max_a.map(|m| (0.0, m));
    vec![
        ("report.txt", report_text),
        ("bom.csv", bom_csv(bom)),
        ("design.cir", spice),
        (
            "schematic.svg",
            schematic_svg(p, t, &d.values, &view.cap_pairs(), &title),
        ),
        (
            "bias.svg",
            bias_svg(p, t, &d.values, &d.tolerances, window, &title),
        ),
        (
            "response.svg",
            response_svg(&view.response, p.spec.f_low_hz, &title),
        ),
    ]
}
