//! Command-line conventions: the specification from standard input (`-`),
//! shell completion scripts and the manual page. The scripts are checked
//! by the shells' own parsers (`bash -n`, and `zsh -n` / `fish -n` where
//! installed) and the page by groff's man macros (`groff -man -ww -z`),
//! the tools that will read them.

use crate::cli_errors::{run, temp_dir, BASE};
use std::io::Write;
use std::path::Path;
use std::process::{Command, Output, Stdio};

/// Run the binary with `input` on its standard input.
#[allow(clippy::unwrap_used)]
fn run_with_stdin(args: &[&str], cwd: &Path, input: &[u8]) -> Output {
    let mut child = Command::new(env!("CARGO_BIN_EXE_gatewright"))
        .args(args)
        .current_dir(cwd)
        .env("NO_COLOR", "1")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut stdin = child.stdin.take().unwrap();
    // A refusal may close the pipe before everything is written.
    let _ = stdin.write_all(input);
    drop(stdin);
    child.wait_with_output().unwrap()
}

fn has(tool: &str) -> bool {
    Command::new("sh")
        .args(["-c", &format!("command -v {tool}")])
        .output()
        .is_ok_and(|o| o.status.success())
}

#[test]
#[allow(clippy::unwrap_used)]
fn a_dash_reads_the_specification_from_standard_input() {
    let dir = temp_dir("conv-stdin");
    let example = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/line-gain.toml");
    let text = std::fs::read(example).unwrap();
    for format in ["table", "json"] {
        let from_file = run(&["design", example, "--format", format], &dir);
        let piped = run_with_stdin(&["design", "-", "--format", format], &dir, &text);
        assert_eq!(piped.status.code(), Some(0));
        assert_eq!(piped.stdout, from_file.stdout, "{format}");
    }
    // analyze and verify take it too.
    let values = ["--topology", "self-bias", "--values", "RG=1M,RS=1k,RD=10k"];
    for cmd in ["analyze", "verify"] {
        let mut args = vec![cmd, "-"];
        args.extend_from_slice(&values);
        let out = run_with_stdin(&args, &dir, BASE.as_bytes());
        assert!(
            matches!(out.status.code(), Some(0 | 1)),
            "{cmd}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        assert!(!out.stdout.is_empty(), "{cmd}");
    }
    // Without a name the title says where it came from.
    let unnamed = BASE.replace("name = \"base\"\n", "");
    let out = run_with_stdin(&["design", "-", "--top", "1"], &dir, unnamed.as_bytes());
    assert!(String::from_utf8_lossy(&out.stdout).starts_with("stdin — E24"));
    // A stock list it names is looked for in the current folder.
    std::fs::write(
        dir.join("shelf.toml"),
        [
            "1k", "2k2", "4k7", "10k", "22k", "47k", "100k", "220k", "470k", "1M",
        ]
        .iter()
        .fold(
            "name = \"bench drawer\"\ntolerance = 0.05\n".to_string(),
            |s, v| s + &format!("[[part]]\nvalue = \"{v}\"\n"),
        ),
    )
    .unwrap();
    let stocked = BASE.replace("series = \"E24\"", "series = \"shelf.toml\"");
    let out = run_with_stdin(&["design", "-", "--top", "1"], &dir, stocked.as_bytes());
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        matches!(out.status.code(), Some(0 | 1)) && stdout.contains("bench drawer"),
        "{stdout}{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
#[allow(clippy::unwrap_used)]
fn standard_input_is_read_with_the_file_limit_and_named_in_errors() {
    let dir = temp_dir("conv-stdin-errors");
    let cases: [(&[u8], &str); 3] = [
        (
            b"gain = \n",
            "error: in standard input: TOML syntax error at line 1, column 8: invalid string; expected `\"`, `'`",
        ),
        (
            b"\xff\xfe",
            "error: reading standard input: the specification is not UTF-8 text (invalid at byte offset 0)",
        ),
        (
            &[b' '; (64 << 20) + 1],
            "error: standard input: the specification runs past the limit of 64 MiB for an input file (read as a stream, from a pipe or device)",
        ),
    ];
    for (input, want) in cases {
        let out = run_with_stdin(&["design", "-"], &dir, input);
        assert_eq!(out.status.code(), Some(2));
        assert!(out.stdout.is_empty());
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(stderr.lines().next(), Some(want), "{stderr}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
#[allow(clippy::unwrap_used)]
fn completion_scripts_parse_in_their_shells() {
    let dir = temp_dir("conv-completions");
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let out = run(&["completions", shell], &dir);
        assert_eq!(out.status.code(), Some(0), "{shell}");
        let script = String::from_utf8(out.stdout).unwrap();
        // Every command and a few options of `design` are offered (and,
        // where the shell completes values, the search methods).
        if matches!(shell, "bash" | "zsh" | "fish") {
            assert!(script.contains("exhaustive"), "{shell}: no exhaustive");
        }
        for word in ["design", "analyze", "verify", "snap", "pick", "out"] {
            assert!(script.contains(word), "{shell}: no {word}");
        }
        let file = dir.join(format!("gatewright.{shell}"));
        std::fs::write(&file, &script).unwrap();
        let check = match shell {
            "bash" | "zsh" => Some((shell, "-n")),
            "fish" => Some(("fish", "--no-execute")),
            _ => None,
        };
        if let Some((tool, flag)) = check {
            if !has(tool) {
                assert_ne!(shell, "bash", "bash is needed to check the bash script");
                eprintln!("SKIPPED: {tool} is not installed; the {shell} script is not parsed");
                continue;
            }
            let status = Command::new(tool).arg(flag).arg(&file).output().unwrap();
            assert!(
                status.status.success(),
                "{shell}: {}",
                String::from_utf8_lossy(&status.stderr)
            );
        }
    }
    let out = run(&["completions", "tcsh"], &dir);
    assert_eq!(out.status.code(), Some(2));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
#[allow(clippy::unwrap_used)]
fn the_manual_pages_render_without_warnings() {
    let dir = temp_dir("conv-man");
    let groff = has("groff");
    if !groff {
        assert!(
            std::env::var("CI").as_deref() != Ok("true"),
            "groff is needed under CI=true"
        );
        eprintln!("SKIPPED: groff is not installed; the pages are checked for their sections only");
    }
    for (command, title) in [
        (None, ".TH gatewright 1"),
        (Some("design"), ".TH gatewright-design 1"),
        (Some("analyze"), ".TH gatewright-analyze 1"),
        (Some("verify"), ".TH gatewright-verify 1"),
        (Some("snap"), ".TH gatewright-snap 1"),
    ] {
        let mut args = vec!["manpage"];
        args.extend(command);
        let out = run(&args, &dir);
        assert_eq!(out.status.code(), Some(0));
        let page = String::from_utf8(out.stdout).unwrap();
        assert!(page.contains(title), "{command:?}");
        for section in [".SH NAME", ".SH SYNOPSIS", ".SH OPTIONS"] {
            assert!(page.contains(section), "{command:?}: no {section}");
        }
        if command == Some("design") {
            assert!(page.contains("\\fBgatewright design\\fR"));
            assert!(page.contains("\\-\\-pick"));
        }
        if command.is_none() {
            assert!(page.contains("Exit status"));
            assert!(page.contains("gatewright\\-design(1)"));
        }
        if groff {
            let file = dir.join("page.1");
            std::fs::write(&file, &page).unwrap();
            let out = Command::new("groff")
                .args(["-man", "-Tutf8", "-ww", "-z"])
                .arg(&file)
                .output()
                .unwrap();
            assert!(out.status.success(), "{command:?}");
            assert_eq!(
                String::from_utf8_lossy(&out.stderr),
                "",
                "{command:?}: groff warns"
            );
        }
    }
    let out = run(&["manpage", "frobnicate"], &dir);
    assert_eq!(out.status.code(), Some(2));
    assert_eq!(
        String::from_utf8_lossy(&out.stderr),
        "error: `manpage` COMMAND = frobnicate: unknown; expected one of design, analyze, snap, topologies, verify, completions, manpage\n"
    );
    let _ = std::fs::remove_dir_all(&dir);
}
