//! `design SPEC --pick N [--out DIR [--force]]`: the bench files of one
//! ranked design, printed (the report) or written to a folder.
//!
//! Every file is rendered in memory first; only then is anything written.
//! Each file goes to a temporary file in DIR and all are renamed into place
//! at the end, so a failed run leaves no partial file (the temporary files,
//! and DIR itself when this run created it, are removed on error).

use anyhow::{bail, Context, Result};
use std::io::Write;
use std::path::{Path, PathBuf};
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

/// The files `--out` writes, in order.
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
    let view = bench_view(p, &report.series, pick, d)
        .with_context(|| format!("design #{pick} ({})", d.topology.id()))?;
    let bom = bom_for(p, d, &report.series, &view);
    let report_text = text::bench(&view, &bom);
    let Some(dir) = out else {
        emit(&report_text)?;
        return Ok(ExitCode::SUCCESS);
    };
    let contents = render(p, d, &view, &bom, report_text);
    write_all(dir, force, &contents)?;
    talk(&format!(
        "wrote {} to `{}`",
        FILES.join(", "),
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
    let title = format!("{} — #{} {}", view.name, view.design.rank, t.id());
    let net = nominal_netlist(p, d, view.cap_values());
    let cap_note = match &view.caps {
        Some(plan) => format!(
            "capacitors sized for f_low = {} Hz (see report.txt)",
            plan.f_low_hz
        ),
        None => "capacitors are 1 F placeholders: no [band] f_low was given".to_string(),
    };
    let spice = netlist_to_spice(
        &net,
        &format!("gatewright design #{} {}", view.design.rank, t.id()),
        &[format!("{}: nominal device", view.name), cap_note],
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

/// Write every file into `dir` through temporary files renamed at the end.
fn write_all(dir: &Path, force: bool, files: &[(&str, String)]) -> Result<()> {
    let created = match std::fs::metadata(dir) {
        Ok(m) if !m.is_dir() => bail!("`--out` = {}: exists and is not a folder", dir.display()),
        Ok(_) if !force => bail!(
            "`--out` = {}: already exists; pass --force to replace the files in it",
            dir.display()
        ),
        Ok(_) => false,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            std::fs::create_dir_all(dir)
                .with_context(|| format!("`--out` = {}: creating the folder", dir.display()))?;
            true
        }
        Err(e) => {
            return Err(e).with_context(|| format!("`--out` = {}", dir.display()));
        }
    };
    // A folder in the way of a file would make its rename fail after the
    // others had moved: refuse before writing anything.
    for (name, _) in files {
        let target = dir.join(name);
        if target.is_dir() {
            bail!(
                "`--out` = {}: `{name}` is a folder; remove it or choose another --out",
                dir.display()
            );
        }
    }
    let mut temps: Vec<PathBuf> = Vec::new();
    let result = stage_and_rename(dir, files, &mut temps);
    if result.is_err() {
        for tmp in &temps {
            let _ = std::fs::remove_file(tmp);
        }
        if created {
            // Only succeeds when empty, so nothing of anyone else's goes.
            let _ = std::fs::remove_dir(dir);
        }
    }
    result
}

fn stage_and_rename(dir: &Path, files: &[(&str, String)], temps: &mut Vec<PathBuf>) -> Result<()> {
    let pid = std::process::id();
    for (name, text) in files {
        let tmp = dir.join(format!(".{name}.{pid}.tmp"));
        temps.push(tmp.clone());
        let mut f =
            std::fs::File::create(&tmp).with_context(|| format!("writing `{}`", tmp.display()))?;
        f.write_all(text.as_bytes())
            .and_then(|()| f.sync_all())
            .with_context(|| format!("writing `{}`", tmp.display()))?;
    }
    for ((name, _), tmp) in files.iter().zip(temps.iter()) {
        let target = dir.join(name);
        std::fs::rename(tmp, &target)
            .with_context(|| format!("moving `{}` into place", target.display()))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(tag: &str) -> PathBuf {
        let d = std::env::temp_dir().join(format!("gatewright-write-{}-{tag}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        d
    }

    // A file that cannot be staged (its folder does not exist) fails the
    // run after another was staged: the staged temporary file and the folder
    // this run created are both gone.
    #[test]
    fn a_failed_write_leaves_nothing_behind() {
        let dir = scratch("fail");
        let files = [
            ("a.txt", "first".to_string()),
            ("missing/b.txt", "second".to_string()),
        ];
        let e = write_all(&dir, false, &files).unwrap_err();
        assert!(format!("{e:#}").contains("writing"), "{e:#}");
        assert!(!dir.exists(), "{} is left behind", dir.display());
    }

    // With --force into an existing folder, the folder stays and holds no
    // temporary file and no partial output.
    #[test]
    fn a_failed_forced_write_keeps_the_folder_clean() {
        let dir = scratch("force");
        std::fs::create_dir_all(&dir).unwrap();
        std::fs::write(dir.join("a.txt"), "old").unwrap();
        let files = [
            ("a.txt", "new".to_string()),
            ("missing/b.txt", "second".to_string()),
        ];
        assert!(write_all(&dir, true, &files).is_err());
        let names: Vec<String> = std::fs::read_dir(&dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        assert_eq!(names, vec!["a.txt".to_string()]);
        assert_eq!(std::fs::read_to_string(dir.join("a.txt")).unwrap(), "old");
        let _ = std::fs::remove_dir_all(&dir);
    }

    #[test]
    fn a_folder_in_the_way_is_refused_before_writing() {
        let dir = scratch("inway");
        std::fs::create_dir_all(dir.join("b.txt")).unwrap();
        let files = [("a.txt", "x".to_string()), ("b.txt", "y".to_string())];
        let e = write_all(&dir, true, &files).unwrap_err();
        assert!(e.to_string().contains("`b.txt` is a folder"), "{e}");
        assert!(!dir.join("a.txt").exists());
        let _ = std::fs::remove_dir_all(&dir);
    }
}
