//! Independent verification of whole designs. For every example
//! specification, the search's top designs are checked at every device
//! corner (nominal resistor values and rails, mid-band):
//!
//! - closed forms against the project's nodal solver (`crosscheck`), to
//!   1e-6 relative (DESIGN: closed forms and solver agree to 1e-6);
//! - closed forms against ngspice (Shockley 1952 via the SPICE JFET,
//!   Shichman–Hodges 1968 via MOSFET level 1), ID, VDS and |gain| to 0.5 %;
//! - the `verify` command's output and exit codes.

// Helpers outside #[test] fns unwrap too: any failure should fail the test.
#![allow(clippy::unwrap_used)]

use crate::util::{loud, ngspice_or_skip, rel, spice_op, TOLERANCE};
use gatewright::analysis::{quick, Problem};
use gatewright::bench::crosscheck::{crosscheck, Quantity, REL_TOL};
use gatewright::catalog::Catalog;
use gatewright::report::spice::netlist_to_spice;
use gatewright::search::{self, Design, Options, Shelf};
use gatewright::spec::CatalogChoice;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;
use std::time::Instant;

/// Examples whose search takes minutes in an unoptimised (debug) build;
/// they run in optimised builds only (`cargo test --release`).
const SLOW_IN_DEBUG: &[&str] = &[];

/// The top designs of one example.
struct Example {
    file: String,
    problem: Problem,
    designs: Vec<Design>,
}

fn examples_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("examples")
}

fn example_files() -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(examples_dir())
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    files.sort();
    assert!(!files.is_empty(), "no examples/*.toml");
    files
}

/// Every example searched once per test process (shared by the tests
/// below), top 3 designs, 3 kept per topology.
fn examples() -> &'static [Example] {
    static ALL: OnceLock<Vec<Example>> = OnceLock::new();
    ALL.get_or_init(|| {
        let mut out = Vec::new();
        for path in example_files() {
            let file = path.file_name().unwrap().to_string_lossy().to_string();
            if cfg!(debug_assertions) && SLOW_IN_DEBUG.contains(&file.as_str()) {
                loud(&format!(
                    "*** SKIP example {file} in a debug build (its search takes minutes unoptimised); \
                     `cargo test --release` includes it ***"
                ));
                continue;
            }
            let spec = gatewright::spec::parse(&std::fs::read_to_string(&path).unwrap())
                .unwrap_or_else(|e| panic!("{file}: {e}"));
            let CatalogChoice::Series(series) = spec.parts.catalog.clone() else {
                panic!("{file}: the examples use E-series shelves");
            };
            let cat = Catalog::from_series(
                series,
                spec.parts.tolerance,
                spec.parts.r_min_ohm,
                spec.parts.r_max_ohm,
            )
            .unwrap();
            let shelf = Shelf::new(
                &cat,
                spec.parts.tolerance,
                spec.parts.r_min_ohm,
                spec.parts.r_max_ohm,
            );
            let started = Instant::now();
            let outcome = search::run(
                &spec,
                &shelf,
                &Options {
                    top: 3,
                    per_topology: 3,
                    ..Options::default()
                },
            )
            .unwrap();
            loud(&format!(
                "example {file}: {} design(s) in {:.1} s",
                outcome.designs.len(),
                started.elapsed().as_secs_f64()
            ));
            out.push(Example {
                file,
                problem: Problem::new(&spec),
                designs: outcome.designs,
            });
        }
        let total: usize = out.iter().map(|e| e.designs.len()).sum();
        assert!(total >= 3, "the examples gave only {total} designs in all");
        out
    })
}

fn describe(e: &Example, rank: usize, d: &Design) -> String {
    let vals: Vec<String> = d
        .topology
        .parts()
        .iter()
        .zip(&d.values)
        .map(|(p, v)| format!("{p}={v}"))
        .collect();
    format!(
        "{} design {rank} {} {}",
        e.file,
        d.topology.id(),
        vals.join(",")
    )
}

#[test]
fn closed_forms_and_solver_agree_on_the_top_designs_of_every_example() {
    let mut worst: Vec<(f64, String)> = vec![(0.0, String::new()); Quantity::ALL.len()];
    let mut checked = 0;
    for e in examples() {
        for (i, d) in e.designs.iter().enumerate() {
            let what = describe(e, i + 1, d);
            let cc = crosscheck(&e.problem, d.topology, &d.values)
                .unwrap_or_else(|dis| panic!("{what}: {dis}"));
            assert_eq!(cc.corners.len(), e.problem.corners.len(), "{what}");
            checked += 1;
            for (k, l) in cc.largest.iter().enumerate() {
                assert!(l.relative <= REL_TOL, "{what}: {l:?}");
                if l.relative >= worst[k].0 {
                    worst[k] = (l.relative, format!("{what} at `{}`", l.corner));
                }
            }
        }
    }
    let mut summary = format!(
        "closed form vs nodal solver: {checked} designs; largest relative disagreement per quantity:"
    );
    for (q, (r, at)) in Quantity::ALL.iter().zip(&worst) {
        summary.push_str(&format!("\n  {}: {r:.2e} ({at})", q.name()));
    }
    loud(&summary);
}

// ngspice (tested with ngspice-39, the Debian package) runs each design's
// deck at every device corner: ID, VDS and |gain| at 1 kHz (1 F coupling
// capacitors, so mid-band) agree with gatewright's closed forms within 0.5 %.
#[test]
fn ngspice_confirms_the_top_designs_of_every_example() {
    if !ngspice_or_skip("ngspice_confirms_the_top_designs_of_every_example") {
        return;
    }
    let names = ["ID", "VDS", "|gain|"];
    let mut worst: Vec<(f64, String)> = vec![(0.0, String::new()); 3];
    let mut runs = 0;
    for e in examples() {
        let p = &e.problem;
        for (i, d) in e.designs.iter().enumerate() {
            let what = describe(e, i + 1, d);
            let t = d.topology;
            let stem = format!("{}-{}", e.file.trim_end_matches(".toml"), i + 1);
            for (k, corner) in p.corners.iter().enumerate() {
                let ctx = format!("{what} ({})", corner.label);
                let ours = quick(p, t, &d.values, &corner.law, &p.rails);
                let net = t.netlist(&d.values, &p.netlist_input(corner));
                let title = format!("{stem} corner {k}");
                let deck = netlist_to_spice(&net, &title, &[]);
                let op = spice_op(&net, &deck, &format!("{stem}-corner{k}"), &ctx);
                runs += 1;
                let (id, vds, gain) = (op.id_a, op.vds_v, op.gain);
                let pairs = [
                    (id, ours.eval.op.id_a),
                    (vds, ours.eval.op.vds_v),
                    (gain, ours.gain.abs()),
                ];
                for (q, (ng, gw)) in pairs.into_iter().enumerate() {
                    let r = rel(ng, gw);
                    assert!(
                        r <= TOLERANCE,
                        "{ctx}: {} ngspice {ng:e} vs gatewright {gw:e} (relative {r:e})\n{deck}",
                        names[q],
                    );
                    if r >= worst[q].0 {
                        worst[q] = (r, format!("{ctx} (ngspice {ng:e}, gatewright {gw:e})"));
                    }
                }
            }
        }
    }
    assert!(runs > 0);
    let mut summary = format!(
        "ngspice vs gatewright on example designs: {runs} runs; largest relative disagreement per quantity:"
    );
    for (n, (r, at)) in names.iter().zip(&worst) {
        summary.push_str(&format!("\n  {n}: {r:.3e} at {at}"));
    }
    loud(&summary);
}

fn gatewright(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_gatewright"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap()
}

fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

/// A specification of our own with a ranged JFET (four corners).
fn spec_file() -> PathBuf {
    let dir = std::env::temp_dir().join(format!("gatewright-verify-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("stage.toml");
    std::fs::write(
        &path,
        "name = 'verify stage'\n\
         [target]\ngain = 4.0\ntolerance = 0.5\n\
         [supply]\nvdd = 15.0\n\
         [load]\nrl = '10k'\n\
         [input]\nzin_min = '100k'\nsource_resistance = '600'\n\
         [headroom]\nvds_min = 1.0\n\
         [device]\nfamily = 'n-jfet'\nidss = ['6m', '10m']\nvgs_off = ['-3', '-5']\n\
         [parts]\nseries = 'E24'\n",
    )
    .unwrap();
    path
}

fn spec_arg() -> String {
    spec_file().to_string_lossy().into_owned()
}

// Boylestad & Nashelsky ch. 7–8 self bias, checked by the solver: the
// command agrees and exits 0, with a table per device corner.
#[test]
fn verify_agreeing_values_exits_0_with_a_table_per_corner() {
    let out = gatewright(&[
        "verify",
        &spec_arg(),
        "--topology",
        "self-bias",
        "--values",
        "RG=1M,RS=680,RD=2.2k",
    ]);
    let stdout = text(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{stdout}{}", text(&out.stderr));
    assert_eq!(stdout.matches("corner: idss=").count(), 4, "{stdout}");
    assert!(stdout.contains("| closed form"), "{stdout}");
    assert!(
        stdout.contains("verdict: the solver confirms the closed form at every corner"),
        "{stdout}"
    );
}

#[test]
fn verify_json_lists_every_corner_and_quantity() {
    let out = gatewright(&[
        "verify",
        &spec_arg(),
        "--topology",
        "divider",
        "--values",
        "R1=2.2M,R2=270k,RS=2.2k,RD=2.2k",
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["agrees"], true);
    assert_eq!(v["topology"], "divider");
    assert_eq!(v["values"]["R1"], 2.2e6);
    let corners = v["corners"].as_array().unwrap();
    assert_eq!(corners.len(), 4);
    for c in corners {
        let rows = c["rows"].as_array().unwrap();
        let names: Vec<&str> = rows
            .iter()
            .map(|r| r["quantity"].as_str().unwrap())
            .collect();
        assert_eq!(names, ["id", "vgs", "vds", "gain", "zin", "zout"]);
        for r in rows {
            assert!(r["relative"].as_f64().unwrap() <= REL_TOL, "{r}");
        }
    }
    // Shockley: ID rises with IDSS at every fixed VGS(off); the table is in
    // the corners' order, min before max.
    let id = |i: usize| corners[i]["rows"][0]["solver"].as_f64().unwrap();
    assert!(id(1) > id(0), "{} {}", id(0), id(1));
}

#[test]
fn verify_bad_input_exits_2_naming_the_field() {
    let cases: &[(&[&str], &str)] = &[
        (
            &["--topology", "self-biass", "--values", "RG=1M"],
            "`--topology` = self-biass: unknown",
        ),
        (
            &["--topology", "self-bias", "--values", "RG=1M,RS=1k"],
            "`--values`: missing RD",
        ),
        (
            &["--topology", "self-bias", "--values", "RG=1M,RS=-1k,RD=1k"],
            "`--values` RS = -1k: must be between",
        ),
        (&["--topology", "self-bias"], "--values"),
        (
            &[
                "--topology",
                "self-bias",
                "--values",
                "RG=1M,RS=1k,RD=1k",
                "--format",
                "csv",
            ],
            "`--format` for `verify` is table or json",
        ),
        (&[], "--topology"),
    ];
    for (extra, want) in cases {
        let spec = spec_arg();
        let mut args = vec!["verify", spec.as_str()];
        args.extend_from_slice(extra);
        let out = gatewright(&args);
        let stderr = text(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{extra:?}: {stderr}");
        assert!(
            stderr.contains(want),
            "{extra:?}: want `{want}` in {stderr}"
        );
        assert!(out.stdout.is_empty(), "{extra:?}");
    }
}

/// `design --format json` on the piezo example (a fast search), saved.
fn piezo_designs() -> PathBuf {
    let out = gatewright(&[
        "design",
        "examples/piezo-buffer.toml",
        "--top",
        "3",
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    // Every listed design passed the solver: nothing was dropped.
    assert!(
        !text(&out.stderr).contains("dropped design"),
        "{}",
        text(&out.stderr)
    );
    let path = spec_file().with_file_name("piezo-designs.json");
    std::fs::write(&path, &out.stdout).unwrap();
    path
}

#[test]
fn verify_reads_a_design_file_by_rank() {
    let designs = piezo_designs();
    let file = designs.to_string_lossy().into_owned();
    let report: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&designs).unwrap()).unwrap();
    let listed = report["designs"].as_array().unwrap();
    assert!(!listed.is_empty());
    for (rank, want) in [
        (None, &listed[0]),
        (Some("2"), &listed[listed.len().min(2) - 1]),
    ] {
        if rank.is_some() && listed.len() < 2 {
            continue;
        }
        let mut args = vec![
            "verify",
            "examples/piezo-buffer.toml",
            "--design",
            file.as_str(),
            "--format",
            "json",
        ];
        if let Some(r) = rank {
            args.extend(["--rank", r]);
        }
        let out = gatewright(&args);
        assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        assert_eq!(v["topology"], want["topology"]);
        assert_eq!(v["values"], want["values"]);
        assert_eq!(v["agrees"], true);
    }
    // A single entry of `designs` works as the file too.
    let one = designs.with_file_name("one-design.json");
    std::fs::write(&one, serde_json::to_string(&listed[0]).unwrap()).unwrap();
    let out = gatewright(&[
        "verify",
        "examples/piezo-buffer.toml",
        "--design",
        &one.to_string_lossy(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
}

#[test]
fn verify_bad_design_file_exits_2() {
    let designs = piezo_designs();
    let file = designs.to_string_lossy().into_owned();
    let out = gatewright(&[
        "verify",
        "examples/piezo-buffer.toml",
        "--design",
        &file,
        "--rank",
        "99",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        text(&out.stderr).contains("`--rank` = 99"),
        "{}",
        text(&out.stderr)
    );
    let broken = designs.with_file_name("broken-design.json");
    std::fs::write(
        &broken,
        r#"{"topology": "self-bias", "values": {"RG": 1e6, "RS": "1k", "RD": 2200}}"#,
    )
    .unwrap();
    let out = gatewright(&[
        "verify",
        "examples/piezo-buffer.toml",
        "--design",
        &broken.to_string_lossy(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        text(&out.stderr).contains(".values.RS = \"1k\": must be a number of ohms"),
        "{}",
        text(&out.stderr)
    );
    let out = gatewright(&[
        "verify",
        "examples/piezo-buffer.toml",
        "--design",
        &file,
        "--topology",
        "self-bias",
    ]);
    assert_eq!(
        out.status.code(),
        Some(2),
        "--design conflicts with --topology"
    );
}

#[test]
fn verify_help_documents_the_exit_codes() {
    let out = gatewright(&["verify", "--help"]);
    assert_eq!(out.status.code(), Some(0));
    let help = text(&out.stdout);
    for line in [
        "0  the closed form and the solver agree",
        "1  they disagree",
        "2  bad input",
    ] {
        assert!(help.contains(line), "{help}");
    }
}

// `--format spice` prints one deck (ngspice runs one circuit per file);
// with `--spice-corners` that deck runs the nominal device and then each
// of the example's four device corners (IDSS and VGS(off) ranged).
#[test]
fn spice_corners_gives_one_deck_that_runs_every_corner() {
    let out = gatewright(&[
        "design",
        "examples/piezo-buffer.toml",
        "--top",
        "2",
        "--format",
        "spice",
        "--spice-corners",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let s = text(&out.stdout);
    assert_eq!(s.lines().filter(|l| *l == ".end").count(), 1, "{s}");
    assert!(s.starts_with("gatewright design #1 "), "{s}");
    let corners: Vec<&str> = s
        .lines()
        .filter(|l| l.starts_with("echo corner "))
        .collect();
    assert_eq!(corners.len(), 4, "{s}");
    assert!(
        corners[0].starts_with("echo corner 0: idss="),
        "{}",
        corners[0]
    );
    let nominal = gatewright(&["design", "examples/piezo-buffer.toml", "--format", "spice"]);
    let n = text(&nominal.stdout);
    assert_eq!(n.lines().filter(|l| *l == ".end").count(), 1);
    assert!(!n.contains("altermod"));
    let bad = gatewright(&["design", "examples/piezo-buffer.toml", "--spice-corners"]);
    assert_eq!(bad.status.code(), Some(2));
    assert!(text(&bad.stderr).contains("`--spice-corners` works with `--format spice` only"));
}
