//! The CLI's own `--format spice` output, with every option, for every
//! example, run by ngspice (the Debian package, `ngspice -b`): each deck
//! must run to the end (exit 0, no `Error` line), and at the nominal device
//! and at every corner it runs, its operating point (ID, VDS) and mid-band
//! |gain| must match the design's closed forms. ngspice is an independent
//! implementation of the same published laws (Shockley 1952 via the SPICE
//! JFET, Shichman–Hodges 1968 via MOSFET level 1).
//!
//! Options covered: `--format spice` (design #1), `--spice-corners`,
//! `--pick 2`, `--out DIR` (one deck per design), `--out DIR
//! --spice-corners`, and the bench folder's `design.cir` (`--pick 1
//! --out`).

use crate::util::{loud, ngspice_or_skip, rel, TOLERANCE};
use gatewright::analysis::{point, Problem};
use gatewright::topology::by_id;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};
use std::sync::atomic::{AtomicUsize, Ordering};

fn gatewright(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_gatewright"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .unwrap()
}

fn fresh_dir(tag: &str) -> PathBuf {
    static N: AtomicUsize = AtomicUsize::new(0);
    let n = N.fetch_add(1, Ordering::Relaxed);
    let d = std::env::temp_dir().join(format!("gatewright-spice-{}-{tag}-{n}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    d
}

/// What one block of a deck's output printed: node voltages, the FET's
/// current and |v(out)|.
#[derive(Debug, Default)]
struct Block {
    values: std::collections::BTreeMap<String, f64>,
}

/// The FET's drain and source nodes, from its card in the deck (`JQ1 d g
/// s MODEL` or `MQ1 d g s b MODEL ...`).
fn fet_nodes(deck: &str, ctx: &str) -> (String, String) {
    let card = deck
        .lines()
        .find(|l| l.starts_with("JQ1 ") || l.starts_with("MQ1 "))
        .unwrap_or_else(|| panic!("{ctx}: no FET card"));
    let t: Vec<&str> = card.split_whitespace().collect();
    (t[1].to_string(), t[3].to_string())
}

/// Run a deck file with `ngspice -b`; its output cut into blocks at the
/// `corner N:` lines (block 0 is the nominal device).
fn run(file: &Path, ctx: &str) -> Vec<Block> {
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(file)
        .current_dir(file.parent().unwrap())
        .stdin(Stdio::null())
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        out.status.success(),
        "{ctx}: ngspice exited with {}\n{stdout}\n{stderr}",
        out.status
    );
    for line in stdout.lines().chain(stderr.lines()) {
        assert!(
            !line.trim_start().starts_with("Error"),
            "{ctx}: ngspice printed `{line}`"
        );
    }
    let mut blocks = vec![Block::default()];
    for line in stdout.lines() {
        if line.starts_with("corner ") && line.contains(':') {
            blocks.push(Block::default());
        } else if let Some((k, v)) = line.split_once(" = ") {
            if let Ok(x) = v.trim().parse::<f64>() {
                blocks
                    .last_mut()
                    .unwrap()
                    .values
                    .insert(k.trim().to_string(), x);
            }
        }
    }
    blocks
}

/// One ranked design of the JSON output: topology and values in part order.
struct Ranked {
    topology: &'static dyn gatewright::topology::Topology,
    values: Vec<f64>,
}

fn designs(spec: &Path) -> Vec<Ranked> {
    let o = gatewright(&["design", spec.to_str().unwrap(), "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    v["designs"]
        .as_array()
        .unwrap()
        .iter()
        .map(|d| {
            let t = by_id(d["topology"].as_str().unwrap()).unwrap();
            let values = t
                .parts()
                .iter()
                .map(|p| d["values"][*p].as_f64().unwrap())
                .collect();
            Ranked {
                topology: t,
                values,
            }
        })
        .collect()
}

/// Check one deck's blocks against design `d`: the nominal device, then
/// `corners` corners (0 for a nominal-only deck). Returns the largest
/// relative disagreement seen.
fn check(p: &Problem, d: &Ranked, file: &Path, blocks: &[Block], corners: bool, ctx: &str) -> f64 {
    let (drain, source) = fet_nodes(&std::fs::read_to_string(file).unwrap(), ctx);
    let want = if corners { 1 + p.corners.len() } else { 1 };
    assert_eq!(blocks.len(), want, "{ctx}: {} blocks", blocks.len());
    let mut worst: f64 = 0.0;
    let cases = std::iter::once(&p.nominal).chain(p.corners.iter().filter(|_| corners));
    for (b, corner) in blocks.iter().zip(cases) {
        let ctx = format!("{ctx} at {}", corner.label);
        let pt = point(p, d.topology, &d.values, corner, &p.rails);
        let get = |k: &str| {
            *b.values
                .get(k)
                .unwrap_or_else(|| panic!("{ctx}: no `{k}` in {:?}", b.values))
        };
        let id = b
            .values
            .iter()
            .find(|(k, _)| k.ends_with("[id]"))
            .map(|(_, v)| *v)
            .unwrap_or_else(|| panic!("{ctx}: no drain current"));
        let node = |n: &str| {
            if n == "0" {
                0.0
            } else {
                get(&format!("v({n})"))
            }
        };
        let vds = node(&drain) - node(&source);
        let pairs = [
            ("ID", id, pt.eval.op.id_a),
            ("VDS", vds, pt.eval.op.vds_v),
            ("|gain|", get("vm(out)"), pt.gain.abs()),
        ];
        for (name, ng, gw) in pairs {
            let r = rel(ng, gw);
            assert!(
                r <= TOLERANCE,
                "{ctx}: {name} ngspice {ng:e} vs gatewright {gw:e} ({r:e})"
            );
            worst = worst.max(r);
        }
    }
    worst
}

fn examples() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    files.sort();
    files
}

#[test]
fn ngspice_runs_every_spice_output_of_every_example() {
    if !ngspice_or_skip("ngspice_runs_every_spice_output_of_every_example") {
        return;
    }
    let (mut decks, mut blocks_seen, mut worst) = (0, 0, 0.0f64);
    for spec in examples() {
        let name = spec.file_stem().unwrap().to_string_lossy().into_owned();
        let text = std::fs::read_to_string(&spec).unwrap();
        let p = Problem::new(&gatewright::spec::parse(&text).unwrap());
        let ranked = designs(&spec);
        assert!(!ranked.is_empty(), "{name}: no design");
        let scratch = fresh_dir(&name);
        std::fs::create_dir_all(&scratch).unwrap();
        let s = spec.to_str().unwrap();
        // Printed decks: design #1, with corners, and design #2.
        let mut printed = vec![(vec!["--format", "spice"], 0, false)];
        printed.push((vec!["--format", "spice", "--spice-corners"], 0, true));
        if ranked.len() > 1 {
            printed.push((vec!["--format", "spice", "--pick", "2"], 1, false));
        }
        for (k, (args, i, corners)) in printed.into_iter().enumerate() {
            let mut all = vec!["design", s];
            all.extend(args.iter().copied());
            let o = gatewright(&all);
            assert!(
                o.status.success(),
                "{name} {args:?}: {}",
                String::from_utf8_lossy(&o.stderr)
            );
            let file = scratch.join(format!("printed{k}.cir"));
            std::fs::write(&file, &o.stdout).unwrap();
            let ctx = format!("{name} {args:?}");
            let b = run(&file, &ctx);
            blocks_seen += b.len();
            worst = worst.max(check(&p, &ranked[i], &file, &b, corners, &ctx));
            decks += 1;
        }
        // One deck per design with --out, without and with corners.
        for corners in [false, true] {
            let dir = scratch.join(format!("decks-{corners}"));
            let mut all = vec![
                "design",
                s,
                "--format",
                "spice",
                "--out",
                dir.to_str().unwrap(),
            ];
            if corners {
                all.push("--spice-corners");
            }
            let o = gatewright(&all);
            assert!(
                o.status.success(),
                "{name}: {}",
                String::from_utf8_lossy(&o.stderr)
            );
            let mut files: Vec<String> = std::fs::read_dir(&dir)
                .unwrap()
                .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
                .collect();
            files.sort();
            assert_eq!(files.len(), ranked.len(), "{name}: {files:?}");
            for (i, d) in ranked.iter().enumerate() {
                let suffix = if corners { "-corners" } else { "" };
                let file = dir.join(format!("design{}{suffix}.cir", i + 1));
                let ctx = format!("{name} {}", file.display());
                let b = run(&file, &ctx);
                blocks_seen += b.len();
                worst = worst.max(check(&p, d, &file, &b, corners, &ctx));
                decks += 1;
            }
        }
        // The bench folder's deck: design #1, every corner.
        let dir = scratch.join("bench");
        let o = gatewright(&["design", s, "--pick", "1", "--out", dir.to_str().unwrap()]);
        assert!(
            o.status.success(),
            "{name}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
        let ctx = format!("{name} design.cir");
        let file = dir.join("design.cir");
        let b = run(&file, &ctx);
        blocks_seen += b.len();
        worst = worst.max(check(&p, &ranked[0], &file, &b, true, &ctx));
        decks += 1;
        let _ = std::fs::remove_dir_all(&scratch);
    }
    loud(&format!(
        "ngspice ran {decks} decks of the CLI's spice output ({blocks_seen} operating points); \
         largest relative disagreement in ID, VDS or |gain|: {worst:.2e}"
    ));
}

// Two option pairs that cannot both hold are refused (exit 2) before any
// file is written.
#[test]
fn spice_out_and_pick_together_are_refused() {
    let spec = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/piezo-buffer.toml");
    let dir = fresh_dir("refused");
    let o = gatewright(&[
        "design",
        spec.to_str().unwrap(),
        "--format",
        "spice",
        "--pick",
        "1",
        "--out",
        dir.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(!dir.exists());
    let o = gatewright(&[
        "design",
        spec.to_str().unwrap(),
        "--out",
        dir.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("`--out` needs `--pick N`"));
    assert!(!dir.exists());
}
