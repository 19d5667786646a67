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
use crate::bench::view::{bench_view, BenchView};
use crate::report::bom::bom_csv;
use crate::report::svg::{bias::bias_svg, response::response_svg, schematic::netlist_svg};
use crate::report::{table, text};
use crate::search::Outcome;

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
    let report_text = text::bench(&view);
    let Some(dir) = out else {
        emit(&report_text)?;
        return Ok(ExitCode::SUCCESS);
    };
    let contents: Vec<(&str, Vec<u8>)> = render(&view, report_text)
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

/// Every file of the folder, in [`FILES`] order.
fn render(view: &BenchView, report_text: String) -> Vec<(&'static str, String)> {
    let topology = &view.design.topology;
    let mut title = format!("{} — #{} {}", view.name, view.design.rank, topology);
    if view.nominal_only {
        title.push_str(&format!(" ({})", crate::bench::summary::NOMINAL_ONLY));
    }
    let spice = crate::report::spice::deck(&view.deck);
    let sized: Vec<&str> = view
        .caps
        .caps
        .iter()
        .map(|c| c.designator.as_str())
        .collect();
    vec![
        ("report.txt", report_text),
        ("bom.csv", bom_csv(&view.bom)),
        ("design.cir", spice),
        (
            "schematic.svg",
            netlist_svg(
                &view.netlist,
                &title,
                &format!("{topology}: {}", view.summary),
                &sized,
            ),
        ),
        ("bias.svg", bias_svg(&view.bias, &title)),
        ("response.svg", response_svg(&view.response, &title)),
    ]
}
