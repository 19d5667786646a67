//! The layering of DEVELOPERS.md ("Architecture"), read from the sources:
//! every `crate::<module>` path in a module's files names a module on its
//! own layer or below; the verifier and the topologies never name each
//! other (the verifier must stay an independent check); the exporters
//! (`report`) take views and types, never a function of a module that
//! computes; and inside the default search (`search/smart`) each file
//! names only the files below it, with explicit imports (no `use
//! super::*`).

use std::path::{Path, PathBuf};

/// Layer of each top-level module (DEVELOPERS.md's table; a module may
/// use modules of a lower or equal number). Within layer 3 the exact
/// evaluation comes before the ranking, and both before the search that
/// uses them.
const LAYERS: [(&str, u32); 18] = [
    ("units", 0),
    ("lines", 0),
    ("catalog", 10),
    ("device", 10),
    ("spec", 10),
    ("netlist", 10),
    ("topology", 20),
    ("verify", 20),
    ("signal", 25),
    ("analysis", 30),
    ("requirement", 30),
    ("rank", 31),
    ("search", 32),
    ("bench", 40),
    ("report", 50),
    ("cli", 60),
    ("lib", 70),
    ("main", 70),
];

/// Pairs (module, module it must never name), whatever the layers say.
const NEVER: [(&str, &str); 2] = [("verify", "topology"), ("topology", "verify")];

/// Modules whose functions compute physics or search: an exporter may
/// name their types (views, results), never their functions.
const COMPUTING: [&str; 7] = [
    "analysis",
    "requirement",
    "search",
    "verify",
    "topology",
    "signal",
    "bench",
];

/// Functions an exporter may call from a computing module: formatting
/// only.
const FORMATTING: [&str; 1] = ["with_unit"];

/// Exporter imports of computing functions allowed by exception: none
/// since the engineering moved out of `report` into the bench stage (issue
/// 28). Do not add to this list.
const KNOWN: [(&str, &str); 0] = [];

/// What `report` may name at all: the bench stage's data, netlists,
/// catalog query results and unit formatting (DEVELOPERS.md: "uses only
/// `bench`, `netlist`, `catalog` and `units`"); never the search, the
/// device equations, the topologies, the analysis or the solver.
const REPORT_NAMES: [&str; 4] = ["bench", "netlist", "catalog", "units"];

/// The files of the default search, lowest first: each may name only the
/// ones before it (`mod.rs`, the search itself, names them all).
const SMART: [&str; 7] = ["pairs", "axis", "blocks", "bound", "visit", "branch", "mod"];

fn layer(module: &str) -> Option<u32> {
    LAYERS.iter().find(|(m, _)| *m == module).map(|x| x.1)
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            rust_files(&p, out);
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

/// The code of a file without its unit tests (from the first
/// `#[cfg(test)]` on; a `tests.rs` is all tests) and without comments.
fn code(path: &Path) -> String {
    if path.file_name().is_some_and(|n| n == "tests.rs") {
        return String::new();
    }
    let text = std::fs::read_to_string(path).unwrap();
    let text = text.split("#[cfg(test)]").next().unwrap_or("");
    text.lines()
        .map(|l| l.split("//").next().unwrap_or(""))
        .collect::<Vec<_>>()
        .join("\n")
}

/// Every `crate::a::b::…` path in `code`, as its segments, with the names
/// a `{…}` group after it brings in.
fn crate_paths(code: &str) -> Vec<(Vec<String>, Vec<String>)> {
    let mut out = Vec::new();
    let mut rest = code;
    while let Some(i) = rest.find("crate::") {
        rest = &rest[i + "crate::".len()..];
        let end = rest
            .find(|c: char| !(c.is_alphanumeric() || c == '_' || c == ':'))
            .unwrap_or(rest.len());
        let segs: Vec<String> = rest[..end]
            .split("::")
            .filter(|s| !s.is_empty())
            .map(str::to_string)
            .collect();
        let mut names = Vec::new();
        if rest[end..].starts_with('{') {
            let close = rest[end..].find('}').map_or(rest.len(), |j| end + j);
            names = rest[end + 1..close]
                .split(',')
                .map(|s| s.trim().to_string())
                .filter(|s| !s.is_empty())
                .collect();
        } else if let Some(last) = segs.last() {
            names.push(last.clone());
        }
        out.push((segs, names));
    }
    out
}

fn src() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("src")
}

/// (file relative to src/, top-level module, code) of every source file.
fn sources() -> Vec<(String, String, String)> {
    let root = src();
    let mut files = Vec::new();
    rust_files(&root, &mut files);
    files.sort();
    files
        .iter()
        .map(|f| {
            let rel = f
                .strip_prefix(&root)
                .unwrap()
                .to_string_lossy()
                .replace('\\', "/");
            let top = rel.split('/').next().unwrap().trim_end_matches(".rs");
            (rel.clone(), top.to_string(), code(f))
        })
        .collect()
}

/// The layering violations in the sources (empty when none).
fn violations(files: &[(String, String, String)]) -> Vec<String> {
    let mut bad = Vec::new();
    for (rel, module, code) in files {
        let Some(own) = layer(module) else {
            bad.push(format!("{rel}: module `{module}` has no layer in LAYERS"));
            continue;
        };
        for (segs, names) in crate_paths(code) {
            let Some(dep) = segs.first() else { continue };
            if dep == module {
                continue;
            }
            match layer(dep) {
                None => bad.push(format!("{rel}: names `crate::{dep}`, which has no layer")),
                Some(l) if l > own => bad.push(format!(
                    "{rel}: `{module}` (layer {own}) names `crate::{}` (layer {l})",
                    segs.join("::")
                )),
                _ => {}
            }
            if NEVER.contains(&(module.as_str(), dep.as_str())) {
                bad.push(format!("{rel}: `{module}` must never name `{dep}`"));
            }
            if module == "report" && COMPUTING.contains(&dep.as_str()) {
                for n in &names {
                    let name = n.split(" as ").next().unwrap_or(n);
                    let function = name.starts_with(|c: char| c.is_lowercase())
                        && !FORMATTING.contains(&name)
                        && name != "self";
                    if function && !KNOWN.contains(&(rel.as_str(), name)) {
                        bad.push(format!(
                            "{rel}: an exporter calls `{dep}::{name}`; exporters format views, they never compute"
                        ));
                    }
                }
            }
        }
    }
    bad
}

/// The violations inside `search/smart` (empty when none).
fn smart_violations(files: &[(String, String, String)]) -> Vec<String> {
    let mut bad = Vec::new();
    let rank = |f: &str| SMART.iter().position(|s| *s == f);
    for (rel, _, code) in files {
        let Some(inner) = rel.strip_prefix("search/smart/") else {
            continue;
        };
        let part = inner.split('/').next().unwrap().trim_end_matches(".rs");
        let Some(own) = rank(part) else {
            if part != "tests" {
                bad.push(format!("{rel}: not in the smart search's order (SMART)"));
            }
            continue;
        };
        if code.contains("use super::*") {
            bad.push(format!(
                "{rel}: a glob import (`use super::*`); name what it uses"
            ));
        }
        for (segs, _) in crate_paths(code) {
            if segs.len() >= 3 && segs[0] == "search" && segs[1] == "smart" {
                if let Some(dep) = rank(&segs[2]) {
                    if dep > own && segs[2] != part {
                        bad.push(format!(
                            "{rel}: `{part}` names `{}`, which comes after it",
                            segs[2]
                        ));
                    }
                }
            }
        }
        // Plain `use super::x` in a file directly under smart/.
        if !inner.contains('/') {
            for l in code.lines() {
                let l = l.trim();
                if let Some(x) = l.strip_prefix("use super::") {
                    let name: String = x
                        .chars()
                        .take_while(|c| c.is_alphanumeric() || *c == '_')
                        .collect();
                    if rank(&name).is_some_and(|d| d > own) {
                        bad.push(format!(
                            "{rel}: `{part}` names `{name}`, which comes after it"
                        ));
                    }
                }
            }
        }
    }
    bad
}

#[test]
fn every_module_names_only_its_own_layer_or_below() {
    let files = sources();
    assert!(files.len() > 50, "found only {} source files", files.len());
    let bad = violations(&files);
    assert!(bad.is_empty(), "layering broken:\n{}", bad.join("\n"));
}

#[test]
fn report_names_only_the_data_it_formats() {
    let mut bad = Vec::new();
    for (rel, module, code) in sources() {
        if module != "report" {
            continue;
        }
        for (segs, _) in crate_paths(&code) {
            let Some(dep) = segs.first() else { continue };
            if dep != "report" && !REPORT_NAMES.contains(&dep.as_str()) {
                bad.push(format!(
                    "{rel}: names `crate::{}`; report formats data from {REPORT_NAMES:?} only",
                    segs.join("::")
                ));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "report reaches past its data:\n{}",
        bad.join("\n")
    );
}

#[test]
fn the_smart_search_files_name_only_the_files_below_them() {
    let files = sources();
    let bad = smart_violations(&files);
    assert!(
        bad.is_empty(),
        "search/smart layering broken:\n{}",
        bad.join("\n")
    );
}

// The checks fail where they should: a verifier that names a topology,
// an exporter that calls the worst-case evaluation, a device model that
// names the search, a glob import in the smart search and a lower smart
// file naming a higher one.
#[test]
fn the_layering_checks_catch_planted_violations() {
    let planted = |rel: &str, module: &str, code: &str| {
        vec![(rel.to_string(), module.to_string(), code.to_string())]
    };
    let v = violations(&planted(
        "verify/dc.rs",
        "verify",
        "use crate::topology::Topology;",
    ));
    assert!(
        v.iter().any(|m| m.contains("must never name `topology`")),
        "{v:?}"
    );
    let v = violations(&planted(
        "report/table.rs",
        "report",
        "use crate::analysis::{worst_case, Check};",
    ));
    assert_eq!(v.len(), 1, "{v:?}");
    assert!(v[0].contains("analysis::worst_case"), "{v:?}");
    let v = violations(&planted("device/mod.rs", "device", "crate::search::run(x)"));
    assert!(v.iter().any(|m| m.contains("layer 10")), "{v:?}");
    // Types and formatting are fine in an exporter.
    let v = violations(&planted(
        "report/text.rs",
        "report",
        "use crate::analysis::Check;\nuse crate::bench::ratings::with_unit;",
    ));
    assert!(v.is_empty(), "{v:?}");
    let v = smart_violations(&planted(
        "search/smart/blocks.rs",
        "search",
        "use super::*;\nuse crate::search::smart::branch::Node;",
    ));
    assert_eq!(v.len(), 2, "{v:?}");
}
