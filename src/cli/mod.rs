//! Command-line interface: parse, dispatch, print. No engineering here.
//!
//! Exit codes: 0 = a design was found (or the command did its job),
//! 1 = the search ran but no design is feasible, 2 = bad input or I/O,
//! 130 = interrupted while writing `--out` (which was left as it was).
//! The product goes to stdout; warnings and errors go to stderr. A closed
//! pipe ends the program quietly.

mod args;
mod bench;
mod load;
mod out_dir;
mod progress;
mod verify_cmd;

use anyhow::{bail, Context, Result};
use args::{Cli, Cmd, Format};
use clap::{CommandFactory, Parser};
use std::io::Write;
use std::process::ExitCode;

use crate::analysis::Problem;
use crate::bench::summary;
use crate::catalog::snap;
use crate::report;
use crate::search::{self, Options};
use crate::spec::{R_MAX_OHM, R_MIN_OHM};
use crate::units::Quantity;

/// Smallest divider ratio `snap --ratio` takes, and 1 minus the largest
/// (dimensionless): a 1e-6 tap is far below what 0.1 % parts resolve
/// (common practice).
const RATIO_MIN: f64 = 1e-6;

/// Entry point of the binary.
pub fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match run(cli) {
        Ok(code) => code,
        Err(e) => {
            if is_broken_pipe(&e) {
                return ExitCode::SUCCESS;
            }
            let _ = writeln!(std::io::stderr(), "error: {e:#}");
            if e.chain().any(|c| c.is::<out_dir::Interrupted>()) {
                // 128 + SIGINT, as a shell reports an interrupted command.
                return ExitCode::from(130);
            }
            ExitCode::from(2)
        }
    }
}

fn is_broken_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|c| {
        c.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}

/// Write the product to stdout (errors propagate so a broken pipe is seen).
fn emit(text: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())?;
    out.flush()?;
    Ok(())
}

/// Talk to stderr; failures to write there are ignored.
fn talk(text: &str) {
    let _ = writeln!(std::io::stderr(), "{text}");
}

fn json<T: serde::Serialize>(v: &T) -> Result<String> {
    let mut s = serde_json::to_string_pretty(v).context("serialising JSON")?;
    s.push('\n');
    Ok(s)
}

/// JSON of a `design`, `analyze` or `verify` view, `schema_version` first.
fn versioned_json<T: serde::Serialize>(v: &T) -> Result<String> {
    report::json::versioned(v).context("serialising JSON")
}

fn run(cli: Cli) -> Result<ExitCode> {
    match cli.cmd {
        Cmd::Snap(a) => snap_cmd(a),
        Cmd::Topologies => {
            let mut s = String::new();
            for t in crate::topology::TOPOLOGIES {
                let fams: Vec<&str> = t.families().iter().map(|f| f.id()).collect();
                s.push_str(&format!(
                    "{:<18} {:<24} {}{}\n    families: {}\n",
                    t.id(),
                    t.parts().join(","),
                    t.summary(),
                    if t.needs_vss() {
                        " [needs vss < 0]"
                    } else {
                        ""
                    },
                    fams.join(", ")
                ));
            }
            emit(&s)?;
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Analyze(a) => analyze_cmd(a),
        Cmd::Design(a) => design_cmd(a),
        Cmd::Verify(a) => verify_cmd::run(a),
        Cmd::Completions { shell } => {
            let mut cmd = Cli::command();
            let mut out = Vec::new();
            clap_complete::generate(shell, &mut cmd, "gatewright", &mut out);
            emit(&String::from_utf8_lossy(&out))?;
            Ok(ExitCode::SUCCESS)
        }
        Cmd::Manpage { command } => {
            emit(&manpage(command.as_deref())?)?;
            Ok(ExitCode::SUCCESS)
        }
    }
}

/// The roff manual page of the program, or of one of its commands (named
/// gatewright-COMMAND, as man pages of subcommands are).
fn manpage(command: Option<&str>) -> Result<String> {
    let mut root = Cli::command();
    let names: Vec<String> = root
        .get_subcommands()
        .map(|c| c.get_name().to_string())
        .collect();
    // Gives each command its full name (`gatewright design`) for the
    // synopsis.
    root.build();
    let cmd = match command {
        None => root,
        Some(name) => match root.find_subcommand(name) {
            Some(sub) if names.iter().any(|n| n == name) => {
                sub.clone().display_name(format!("gatewright-{name}"))
            }
            _ => bail!(
                "`manpage` COMMAND = {name}: unknown; expected one of {}",
                names.join(", ")
            ),
        },
    };
    let mut out = Vec::new();
    clap_mangen::Man::new(cmd)
        .source(format!("gatewright {}", env!("CARGO_PKG_VERSION")))
        .manual("gatewright manual")
        .render(&mut out)
        .context("writing the manual page")?;
    Ok(String::from_utf8_lossy(&out).into_owned())
}

fn snap_cmd(a: args::SnapArgs) -> Result<ExitCode> {
    if matches!(a.format, Format::Csv | Format::Spice) {
        bail!("`--format` for `snap` is table or json");
    }
    let series = crate::catalog::ESeries::from_name(&a.series).with_context(|| {
        format!(
            "`--series` = {}: expected one of E6, E12, E24, E48, E96, E192",
            a.series
        )
    })?;
    if let Some(ratio_text) = &a.ratio {
        let ratio =
            crate::units::parse_quantity(ratio_text, Quantity::Ratio).context("`--ratio`")?;
        if !(RATIO_MIN..=1.0 - RATIO_MIN).contains(&ratio) {
            bail!(
                "`--ratio` = {ratio_text}: must lie between 1e-6 and 1 − 1e-6 (R2 over R1 + R2; \
                 a finer tap is beyond what resistor tolerances resolve)"
            );
        }
        let total = a
            .total
            .as_deref()
            .context("`--ratio` needs `--total MIN..MAX` (the allowed R1 + R2, ohms)")?;
        let (lo, hi) = load::parse_span(total).context("`--total`")?;
        let cat = crate::catalog::Catalog::from_series(series, None, 1e-3, hi.max(1.0))?;
        let pairs = snap::ratio_pairs(&cat, ratio, lo, hi, a.count)?;
        let text = match a.format {
            Format::Json => json(&pairs)?,
            _ => report::table::ratio(&pairs, ratio),
        };
        emit(&text)?;
        return Ok(ExitCode::SUCCESS);
    }
    if a.values.is_empty() {
        bail!("`snap` needs at least one VALUE (e.g. `gatewright snap 4k7 --series E96`) or `--ratio R --total MIN..MAX`");
    }
    let mut rows = Vec::new();
    for text in &a.values {
        let v = crate::units::parse_quantity(text, Quantity::Resistance)
            .with_context(|| format!("VALUE `{text}`"))?;
        if v <= 0.0 {
            bail!("VALUE `{text}` = {v}: a resistance must be greater than 0");
        }
        if !(R_MIN_OHM..=R_MAX_OHM).contains(&v) {
            bail!("VALUE `{text}`: must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models");
        }
        let cat =
            crate::catalog::Catalog::from_series(series, None, (v / 100.0).max(1e-3), v * 100.0)?;
        rows.push(snap::snap_value(&cat, v)?);
    }
    let text = match a.format {
        Format::Json => json(&rows)?,
        _ => report::table::snap(&rows),
    };
    emit(&text)?;
    Ok(ExitCode::SUCCESS)
}

fn analyze_cmd(a: args::AnalyzeArgs) -> Result<ExitCode> {
    let loaded = load::spec(&a.spec)?;
    let t = load::topology(&a.topology, "`--topology`")?;
    let values = load::values(t, &a.values, loaded.spec.device.family)?;
    let tolerances: Vec<f64> = values.iter().map(|&v| loaded.tolerance_for(v)).collect();
    let p = Problem::new(&loaded.spec);
    if !t.supports(loaded.spec.device.family) {
        talk(&format!(
            "warning: {} is not a usual topology for a {}; analysing anyway",
            t.id(),
            loaded.spec.device.family.id()
        ));
    }
    if t.needs_vss() && loaded.spec.supply.vss_v >= 0.0 {
        bail!(
            "`--topology` = {}: needs a negative rail; set `supply.vss` below 0 V",
            t.id()
        );
    }
    let view = summary::analysis(&p, t, &values, &tolerances);
    let text = match a.format {
        Format::Json => versioned_json(&view)?,
        Format::Spice => {
            let input = load::netlist_input(&p, &p.nominal);
            let net = t.netlist(&values, &input);
            report::spice::netlist_to_spice(&net, &format!("gatewright {} nominal", t.id()), &[])
        }
        Format::Csv => {
            bail!("`--format csv` is for `design`; use table, json or spice with `analyze`")
        }
        Format::Table => report::table::analysis(&view, t.parts()),
    };
    emit(&text)?;
    Ok(ExitCode::SUCCESS)
}

fn design_cmd(a: args::DesignArgs) -> Result<ExitCode> {
    let loaded = load::spec(&a.spec)?;
    let shelf = loaded.shelf();
    let opts = Options {
        nominal_only: a.nominal,
        prefer: a.prefer.into(),
        top: usize::from(a.top).max(a.pick.map_or(0, usize::from)),
        method: a.search.into(),
        ..Options::default()
    };
    if a.spice_corners && a.format != Format::Spice {
        bail!("`--spice-corners` works with `--format spice` only");
    }
    let counts = search::Progress::new();
    let label = match a.search {
        args::SearchArg::Exhaustive => "exhaustive search",
        args::SearchArg::Smart => "searching",
    };
    let mut outcome = progress::while_running(label, &counts, || {
        search::run_with_progress(&loaded.spec, &shelf, &opts, &counts)
    })?;
    let full = Problem::new(&loaded.spec);
    // Every ranked design is confirmed by the independent nodal solver at
    // every device corner; one it does not confirm is never shown.
    for w in crate::bench::crosscheck::retain_verified(&full, &mut outcome) {
        talk(&format!("warning: {w}"));
    }
    let cautions = crate::bench::view::spec_cautions(&full);
    let report_view = summary::design_report(&full, &shelf.name, &outcome, cautions);
    if a.format == Format::Spice {
        return design_spice(&full, &report_view, &outcome, &a);
    }
    if a.out.is_some() && a.pick.is_none() {
        bail!("`--out` needs `--pick N` (the bench files of one design) or `--format spice` (one deck per design)");
    }
    if let Some(n) = a.pick {
        if a.format != Format::Table {
            bail!("`--format` with `--pick` is table (the bench report) or spice (the deck); use `--out DIR` for the netlist, BOM and pictures");
        }
        let n = usize::from(n);
        return bench::run(&full, &report_view, &outcome, n, a.out.as_deref(), a.force);
    }
    let text = match a.format {
        Format::Json => versioned_json(&report_view)?,
        Format::Csv => report::csv::designs(&report_view),
        Format::Table | Format::Spice => report::table::design(&report_view),
    };
    emit(&text)?;
    if outcome.designs.is_empty() && a.format == Format::Csv {
        // CSV rows are designs only; the reasons for none go to the talk
        // stream so a script still sees why.
        talk(report::table::design(&report_view).trim_end());
    }
    if outcome.nominal_only {
        talk("warning: --nominal checks the nominal device and nominal resistor values only; the designs are not worst-case safe");
    }
    Ok(if outcome.designs.is_empty() {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

/// `design --format spice`: one deck that ngspice runs unchanged, of the
/// design ranked `--pick` (default 1), with `--spice-corners` running every
/// device corner after the nominal device; or with `--out DIR` one deck per
/// design, `designN.cir` (`designN-corners.cir`), written all or nothing.
fn design_spice(
    full: &Problem,
    view: &summary::DesignReport,
    outcome: &search::Outcome,
    a: &args::DesignArgs,
) -> Result<ExitCode> {
    if outcome.designs.is_empty() {
        talk(report::table::design(view).trim_end());
        return Ok(ExitCode::from(1));
    }
    let deck_of = |rank: usize, d: &search::Design| -> Result<String> {
        let deck = crate::bench::deck::deck(
            full,
            d,
            rank,
            &full.spec.name,
            a.spice_corners,
            outcome.nominal_only,
        )
        .with_context(|| format!("design #{rank} ({})", d.topology.id()))?;
        Ok(report::spice::deck(&deck))
    };
    if let Some(dir) = &a.out {
        if a.pick.is_some() {
            bail!("`--format spice --out DIR` writes every design's deck; drop `--pick`, or drop `--format spice` for the bench files of one design");
        }
        let suffix = if a.spice_corners { "-corners" } else { "" };
        let mut files: Vec<(String, Vec<u8>)> = Vec::new();
        for (i, d) in outcome.designs.iter().enumerate() {
            let rank = i + 1;
            files.push((
                format!("design{rank}{suffix}.cir"),
                deck_of(rank, d)?.into_bytes(),
            ));
        }
        let named: Vec<(&str, Vec<u8>)> =
            files.iter().map(|(n, b)| (n.as_str(), b.clone())).collect();
        out_dir::write_folder(dir, a.force, &named)?;
        talk(&format!(
            "wrote {} deck{} (design1{suffix}.cir to design{}{suffix}.cir) to `{}`",
            files.len(),
            if files.len() == 1 { "" } else { "s" },
            files.len(),
            dir.display()
        ));
        return Ok(ExitCode::SUCCESS);
    }
    let rank = a.pick.map_or(1, usize::from);
    let count = outcome.designs.len();
    let Some(d) = rank.checked_sub(1).and_then(|i| outcome.designs.get(i)) else {
        bail!("`--pick` = {rank}: out of range; the search found {count} design(s) (ranked 1 to {count})");
    };
    emit(&deck_of(rank, d)?)?;
    if a.pick.is_none() && count > 1 {
        talk(&format!(
            "note: the deck of design #1 of {count}; `--pick N` prints another, `--out DIR` writes one per design"
        ));
    }
    Ok(ExitCode::SUCCESS)
}
