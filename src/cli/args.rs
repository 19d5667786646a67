//! Command-line arguments (clap derive): raw input, validated elsewhere.

use clap::{Args, Parser, Subcommand, ValueEnum};
use std::path::PathBuf;

/// gatewright: discrete FET amplifier stages from requirements, with
/// standard resistor values, checked across the device's datasheet spread.
#[derive(Debug, Parser)]
#[command(name = "gatewright", version, about, long_about = None, after_long_help = EXIT_AND_EXAMPLES)]
pub(crate) struct Cli {
    #[command(subcommand)]
    pub(crate) cmd: Cmd,
}

#[derive(Debug, Subcommand)]
pub(crate) enum Cmd {
    /// Search every topology for standard-value designs that meet SPEC at
    /// every device corner and tolerance extreme, ranked.
    Design(DesignArgs),
    /// Evaluate one topology with given values at every device corner.
    Analyze(AnalyzeArgs),
    /// Nearest E-series values, or resistor pairs for a divider ratio.
    Snap(SnapArgs),
    /// List the topologies with their parts and device families.
    Topologies,
    /// Check one design's closed-form results against the independent nodal
    /// solver at every device corner.
    #[command(after_help = VERIFY_EXIT)]
    Verify(VerifyArgs),
    /// Print a completion script for SHELL (e.g. `gatewright completions
    /// bash > /etc/bash_completion.d/gatewright`).
    Completions {
        /// The shell to complete in.
        #[arg(value_enum)]
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff), of the program or of one command
    /// (e.g. `gatewright manpage > gatewright.1; man -l gatewright.1`).
    Manpage {
        /// A command (`design`, `verify`, ...) for its own page
        /// (gatewright-COMMAND).
        command: Option<String>,
    },
}

const EXIT_AND_EXAMPLES: &str = "Exit status:\n  \
    0  the command did its job (for `design`, at least one feasible design)\n  \
    1  `design`: no design meets the specification (the reasons are printed);\n     \
       `verify`: the closed form and the solver disagree\n  \
    2  bad input (specification, arguments, files) or an I/O error\n\n\
    Examples:\n  \
    gatewright design examples/line-gain.toml\n  \
    gatewright design examples/line-gain.toml --format json > designs.json\n  \
    gatewright verify examples/line-gain.toml --design designs.json --rank 2\n  \
    gatewright design examples/line-gain.toml --pick 1 --out bench/\n  \
    cat spec.toml | gatewright design -";

const VERIFY_EXIT: &str = "Exit status:\n  \
    0  the closed form and the solver agree (within 1e-6 relative) at every corner\n  \
    1  they disagree somewhere, or the solver failed at some corner\n  \
    2  bad input (specification, topology, values or design file)";

/// Output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub(crate) enum Format {
    /// A table for the terminal.
    #[default]
    Table,
    /// JSON with stable keys.
    Json,
    /// Comma-separated values.
    Csv,
    /// A SPICE deck that ngspice runs unchanged (one design; `--out` for
    /// every design).
    Spice,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub(crate) enum PreferArg {
    /// The documented default balance.
    #[default]
    Balanced,
    /// Small gain spread, ample headroom.
    Robust,
    /// Low supply power.
    LowPower,
    /// Few parts.
    FewParts,
    /// Gain closest to the target at the worst corner.
    Accurate,
}

impl From<PreferArg> for crate::rank::Prefer {
    fn from(p: PreferArg) -> Self {
        use crate::rank::Prefer;
        match p {
            PreferArg::Balanced => Prefer::Balanced,
            PreferArg::Robust => Prefer::Robust,
            PreferArg::LowPower => Prefer::LowPower,
            PreferArg::FewParts => Prefer::FewParts,
            PreferArg::Accurate => Prefer::Accurate,
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub(crate) enum SearchArg {
    /// Pruned search (default).
    #[default]
    Smart,
    /// Every combination over the shelf (the reference; slow).
    Exhaustive,
}

impl From<SearchArg> for crate::search::Method {
    fn from(s: SearchArg) -> Self {
        match s {
            SearchArg::Smart => crate::search::Method::Smart,
            SearchArg::Exhaustive => crate::search::Method::Exhaustive,
        }
    }
}

#[derive(Debug, Args)]
pub(crate) struct DesignArgs {
    /// Specification file (TOML); `-` reads it from standard input.
    pub(crate) spec: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub(crate) format: Format,
    /// Check at the nominal device and nominal resistor values only (NOT worst case).
    #[arg(long)]
    pub(crate) nominal: bool,
    /// What the ranking favours.
    #[arg(long, value_enum, default_value_t)]
    pub(crate) prefer: PreferArg,
    /// How many designs to list.
    #[arg(long, default_value_t = 10, value_parser = clap::value_parser!(u16).range(1..=1000))]
    pub(crate) top: u16,
    /// Search method.
    #[arg(long, value_enum, default_value_t)]
    pub(crate) search: SearchArg,
    /// With `--format spice`: the deck also runs every device corner after
    /// the nominal device.
    #[arg(long)]
    pub(crate) spice_corners: bool,
    /// Take the design ranked N (1 = best) to the bench: print its report,
    /// or write its files with `--out`.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u16).range(1..))]
    pub(crate) pick: Option<u16>,
    /// Folder for the picked design's files (report.txt, bom.csv,
    /// design.cir, schematic.svg, bias.svg, response.svg), or with
    /// `--format spice` one deck per design; written all or nothing; must
    /// not exist unless `--force`.
    #[arg(long, value_name = "DIR")]
    pub(crate) out: Option<PathBuf>,
    /// Replace an existing `--out` folder whole (only one that holds
    /// nothing but gatewright's files).
    #[arg(long, requires = "out")]
    pub(crate) force: bool,
}

#[derive(Debug, Args)]
pub(crate) struct VerifyArgs {
    /// Specification file (TOML): device corners, rails, load, source; `-`
    /// reads it from standard input.
    pub(crate) spec: PathBuf,
    /// Topology id (see `gatewright topologies`); with `--values`.
    #[arg(long, requires = "values", required_unless_present = "design")]
    pub(crate) topology: Option<String>,
    /// Every resistor of the topology, e.g. `RG=1M,RS=1k,RD=3.3k`.
    #[arg(long, requires = "topology")]
    pub(crate) values: Option<String>,
    /// A design from `gatewright design --format json` (the whole output, or
    /// one entry of its `designs` array).
    #[arg(long, conflicts_with_all = ["topology", "values"])]
    pub(crate) design: Option<PathBuf>,
    /// Which design of the file's `designs` array, by its `rank` (default 1).
    #[arg(long, requires = "design", value_parser = clap::value_parser!(u16).range(1..))]
    pub(crate) rank: Option<u16>,
    /// Output format (table or json).
    #[arg(long, value_enum, default_value_t)]
    pub(crate) format: Format,
}

#[derive(Debug, Args)]
pub(crate) struct AnalyzeArgs {
    /// Specification file (TOML); `-` reads it from standard input.
    pub(crate) spec: PathBuf,
    /// Topology id (see `gatewright topologies`).
    #[arg(long)]
    pub(crate) topology: String,
    /// Every resistor of the topology, e.g. `R1=4.7M,R2=1M,RS=470,RD=6.8k`.
    #[arg(long)]
    pub(crate) values: String,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub(crate) format: Format,
}

#[derive(Debug, Args)]
pub(crate) struct SnapArgs {
    /// Resistances to snap (engineering notation: 4k7, 2.2M, 150).
    pub(crate) values: Vec<String>,
    /// IEC 60063 series.
    #[arg(long, default_value = "E24")]
    pub(crate) series: String,
    /// Divider ratio R2/(R1+R2) to realise with a pair.
    #[arg(long)]
    pub(crate) ratio: Option<String>,
    /// Allowed total R1+R2 for `--ratio`, as MIN..MAX (e.g. 100k..1M).
    #[arg(long)]
    pub(crate) total: Option<String>,
    /// How many pairs to list for `--ratio`.
    #[arg(long, default_value_t = 5)]
    pub(crate) count: usize,
    /// Output format (table or json).
    #[arg(long, value_enum, default_value_t)]
    pub(crate) format: Format,
}
