//! Helpers shared by the integration tests: running ngspice and reading
//! what it prints.

use std::collections::BTreeMap;
use std::io::Write as _;
use std::path::PathBuf;
use std::process::{Command, Stdio};
use std::sync::atomic::{AtomicUsize, Ordering};

/// Writes to the real stderr, past the test harness's capture, so the notice
/// shows in every `cargo test` log, passing or not.
pub(crate) fn loud(text: &str) {
    let _ = writeln!(std::io::stderr(), "{text}");
}

/// Largest relative disagreement allowed for ID, VDS and |gain|.
pub(crate) const TOLERANCE: f64 = 5e-3;

/// True when ngspice can be run. Under `CI=true` its absence fails the test.
pub(crate) fn ngspice_or_skip(test: &str) -> bool {
    let present = Command::new("ngspice")
        .arg("--version")
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    if present {
        return true;
    }
    let ci = std::env::var("CI").is_ok_and(|v| v == "true");
    assert!(
        !ci,
        "{test}: ngspice is not installed, and CI=true requires it (.ci/run installs it)"
    );
    loud(&format!(
        "\n*** SKIP {test}: ngspice not found on PATH; install it to run the ngspice cross-check ***\n"
    ));
    false
}

/// Runs a deck with `ngspice -b` in a fresh temporary folder and returns
/// every `name = value` line it printed. Fails on a non-zero exit status or
/// on any output line starting with `Error`.
pub(crate) fn run_ngspice(deck: &str, name: &str) -> BTreeMap<String, f64> {
    static COUNTER: AtomicUsize = AtomicUsize::new(0);
    let n = COUNTER.fetch_add(1, Ordering::Relaxed);
    let dir: PathBuf =
        std::env::temp_dir().join(format!("gatewright-ngspice-{}-{n}", std::process::id()));
    std::fs::create_dir_all(&dir)
        .unwrap_or_else(|e| panic!("{name}: cannot create {}: {e}", dir.display()));
    let file = dir.join(format!("{name}.cir"));
    std::fs::write(&file, deck)
        .unwrap_or_else(|e| panic!("{name}: cannot write {}: {e}", file.display()));
    let out = Command::new("ngspice")
        .arg("-b")
        .arg(&file)
        .current_dir(&dir)
        .stdin(Stdio::null())
        .output()
        .unwrap_or_else(|e| panic!("{name}: cannot run ngspice: {e}"));
    let _ = std::fs::remove_dir_all(&dir);
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        out.status.success(),
        "{name}: ngspice exited with {}\n{stdout}\n{stderr}\n{deck}",
        out.status
    );
    for line in stdout.lines().chain(stderr.lines()) {
        assert!(
            !line.trim_start().starts_with("Error"),
            "{name}: ngspice printed `{line}`\n{deck}"
        );
    }
    let mut values = BTreeMap::new();
    for line in stdout.lines() {
        if let Some((k, v)) = line.split_once(" = ") {
            if let Ok(x) = v.trim().parse::<f64>() {
                values.insert(k.trim().to_string(), x);
            }
        }
    }
    values
}

pub(crate) fn get(values: &BTreeMap<String, f64>, key: &str, ctx: &str) -> f64 {
    *values
        .get(key)
        .unwrap_or_else(|| panic!("{ctx}: ngspice printed no `{key}` in {values:?}"))
}

/// Relative disagreement of `got` from `want`.
pub(crate) fn rel(got: f64, want: f64) -> f64 {
    (got - want).abs() / want.abs().max(1e-12)
}

/// What ngspice reports for one deck of `net`: drain current (A), VDS (V)
/// and |gain| at the analysis frequency (V/V).
pub(crate) struct SpiceOp {
    pub(crate) id_a: f64,
    pub(crate) vds_v: f64,
    pub(crate) gain: f64,
}

/// Run `deck` (written from `net`) through ngspice and read the FET's
/// current, its VDS from the node voltages, and |V(out)|.
pub(crate) fn spice_op(
    net: &gatewright::netlist::Netlist,
    deck: &str,
    name: &str,
    ctx: &str,
) -> SpiceOp {
    use gatewright::netlist::{Element, GROUND};
    let (d, s, des) = net
        .elements
        .iter()
        .find_map(|el| match el {
            Element::Fet { d, s, .. } => Some((*d, *s, gatewright::report::spice::designator(el))),
            _ => None,
        })
        .unwrap_or_else(|| panic!("{ctx}: no FET in the netlist"));
    let printed = run_ngspice(deck, name);
    let volts = |n: usize| {
        if n == GROUND {
            0.0
        } else {
            get(&printed, &format!("v({})", net.nodes[n]), ctx)
        }
    };
    SpiceOp {
        id_a: get(&printed, &format!("@{}[id]", des.to_ascii_lowercase()), ctx),
        vds_v: volts(d) - volts(s),
        gain: get(&printed, &format!("vm({})", net.nodes[net.output]), ctx),
    }
}
