//! An independent nodal-analysis (MNA) solver for [`Netlist`]s: the DC
//! operating point by damped Newton–Raphson, then linearised AC analysis at
//! mid-band or at any frequency.
//!
//! It reads nothing but the netlist and the device law's three numbers, and
//! must not know about topologies, their closed forms, searching or
//! printing: it is the check the closed forms are held to.
//!
//! # What is measured
//!
//! [`small_signal`] returns, with the signal source's EMF `e` as the AC
//! drive (every other source a short):
//!
//! - `gain` = `V(net.output) / e`, V/V, with the load connected: the gain
//!   from the source EMF (`SmallSignal::gain_from_source` in the closed
//!   forms).
//! - `zin_ohm` = `V(net.input) / I`, where `I` is the AC current the signal
//!   source delivers. All of it flows through the signal path (source
//!   resistance, input coupling capacitor) into `net.input`, so this is the
//!   impedance looking into the stage's input terminal, load connected.
//! - `zout_ohm` = `V(net.output)` with a 1 A test current injected into
//!   `net.output`, the EMF at zero (the source resistance stays connected),
//!   and the load removed. The load is every resistor from `net.output` to
//!   ground. This is the Thevenin impedance the load sees.
//!
//! At a finite frequency these include the capacitors (e.g. `zout_ohm`
//! includes the output coupling capacitor in series); at
//! [`Freq::MidBand`] every capacitor is an ideal short.

mod ac;
mod check;
mod dc;
mod error;
mod fet;
mod measure;
mod residual;
mod sweep;
#[cfg(test)]
mod tests;

pub use error::SolveError;
pub use residual::kcl_residuals;
pub use sweep::{corner_low, sweep};

use crate::device::Region;
use crate::netlist::{Netlist, Node};
use num_complex::Complex64;
use serde::Serialize;

/// How the DC operating point was reached.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DcMethod {
    /// Damped Newton–Raphson from the linear network's solution.
    Newton,
    /// Newton along a ramp of every source from 0 to 100 %.
    SourceStepping,
    /// Newton with a shunt conductance from every node to ground, stepped
    /// from 10 mS down to none.
    GminStepping,
}

impl DcMethod {
    /// Short spelling for messages.
    pub fn id(self) -> &'static str {
        match self {
            DcMethod::Newton => "newton",
            DcMethod::SourceStepping => "source-stepping",
            DcMethod::GminStepping => "gmin-stepping",
        }
    }
}

/// Settings of the DC solve.
#[derive(Debug, Clone, PartialEq)]
pub struct DcOptions {
    /// Newton iterations allowed per run (each source or gmin step is a run).
    pub max_iterations: usize,
    /// Largest change of any node voltage in one iteration, volts.
    pub max_step_v: f64,
    /// Methods to try, in order, until one converges.
    pub methods: Vec<DcMethod>,
    /// A guess of each FET's drain current, amps, in netlist order (say
    /// from a closed form). Newton then starts from the linear network with
    /// each FET replaced by that fixed current, and only if it does not
    /// converge from there from the usual first guess (FETs open). The
    /// guess moves the start only: the answer must still satisfy KCL at
    /// every node.
    pub fet_currents_a: Option<Vec<f64>>,
}

impl Default for DcOptions {
    fn default() -> Self {
        DcOptions {
            max_iterations: 500,
            max_step_v: 0.5,
            methods: vec![
                DcMethod::Newton,
                DcMethod::SourceStepping,
                DcMethod::GminStepping,
            ],
            fet_currents_a: None,
        }
    }
}

/// One voltage source at the operating point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SourceOp {
    /// Designator.
    pub name: String,
    /// Current delivered out of the positive terminal into the circuit,
    /// amps (a supply feeding a stage is positive).
    pub delivered_a: f64,
}

/// One FET at the operating point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FetOp {
    /// Designator.
    pub name: String,
    /// Gate–source voltage, volts.
    pub vgs_v: f64,
    /// Drain–source voltage, volts.
    pub vds_v: f64,
    /// Drain current, amps, positive into the drain.
    pub id_a: f64,
    /// `∂ID/∂VGS` at the point, siemens.
    pub gm_s: f64,
    /// `∂ID/∂VDS` at the point, siemens.
    pub gds_s: f64,
    /// Region of the channel (with drain and source exchanged when
    /// `VDS < 0`).
    pub region: Region,
}

/// A converged DC operating point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DcSolution {
    /// Node voltages to ground, volts, by node index (index 0 is ground).
    pub node_v: Vec<f64>,
    /// Voltage sources in netlist order.
    pub sources: Vec<SourceOp>,
    /// FETs in netlist order.
    pub fets: Vec<FetOp>,
    /// The method that converged.
    pub method: DcMethod,
    /// Newton iterations spent, in all methods tried.
    pub iterations: usize,
}

impl DcSolution {
    /// Voltage of a node, volts.
    pub fn v(&self, node: Node) -> Option<f64> {
        self.node_v.get(node).copied()
    }
    /// The operating point of a FET by designator.
    pub fn fet(&self, name: &str) -> Option<&FetOp> {
        self.fets.iter().find(|f| f.name == name)
    }
    /// Current delivered by a source, amps (see [`SourceOp::delivered_a`]).
    pub fn source_current(&self, name: &str) -> Option<f64> {
        self.sources
            .iter()
            .find(|s| s.name == name)
            .map(|s| s.delivered_a)
    }
}

/// The frequency of an AC analysis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Freq {
    /// Every capacitor an ideal short (exact, not a large-C limit).
    MidBand,
    /// A finite frequency, hertz (> 0).
    Hz(f64),
}

/// Phasors of one AC solve.
#[derive(Debug, Clone, PartialEq)]
pub struct AcSolution {
    /// The frequency solved at.
    pub freq: Freq,
    /// Node voltage phasors, volts, by node index (index 0 is ground).
    pub node_v: Vec<Complex64>,
    /// Per voltage source in netlist order: designator and the AC current
    /// delivered out of its positive terminal, amps; `None` for a source
    /// shorted by capacitors at mid-band, whose current is undefined.
    pub sources: Vec<(String, Option<Complex64>)>,
}

impl AcSolution {
    /// Voltage phasor of a node, volts.
    pub fn v(&self, node: Node) -> Option<Complex64> {
        self.node_v.get(node).copied()
    }
    /// AC current delivered by a source, amps.
    pub fn source_current(&self, name: &str) -> Option<Complex64> {
        self.sources
            .iter()
            .find(|(n, _)| n == name)
            .and_then(|(_, i)| *i)
    }
}

/// Gain and terminal impedances measured on the netlist (definitions in
/// the [module documentation](self)). At mid-band the imaginary parts are
/// zero.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Measured {
    /// `V(output)/EMF`, V/V, load connected.
    pub gain: Complex64,
    /// Impedance into `net.input`, ohms, load connected.
    pub zin_ohm: Complex64,
    /// Impedance the load sees at `net.output`, ohms, EMF zeroed.
    pub zout_ohm: Complex64,
}

/// Where the low −3 dB corner lies relative to a sweep.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LowCorner {
    /// The gain stays within 3 dB of mid-band down to the sweep's start.
    BelowRange,
    /// The corner, hertz.
    At(f64),
    /// The gain is already more than 3 dB down at the sweep's stop.
    AboveRange,
}

/// The DC operating point with the default options.
pub fn dc(net: &Netlist) -> Result<DcSolution, SolveError> {
    dc::run(net, &DcOptions::default())
}

/// The DC operating point with the given options.
pub fn dc_with(net: &Netlist, opts: &DcOptions) -> Result<DcSolution, SolveError> {
    dc::run(net, opts)
}

/// AC phasors about `dc`, each voltage source driven at its `ac_v`.
pub fn ac(net: &Netlist, dc: &DcSolution, freq: Freq) -> Result<AcSolution, SolveError> {
    let lin = ac::Linear::new(net, dc)?;
    let as_given = |_: usize, ac_v: f64| ac_v;
    ac::solve(
        net,
        &lin,
        freq,
        &ac::Drive {
            source_v: &as_given,
            skip: &[],
            inject: None,
        },
    )
}

/// Gain from the signal EMF, Zin and Zout about `dc` at `freq` (see the
/// [module documentation](self) for the exact definitions).
pub fn small_signal(net: &Netlist, dc: &DcSolution, freq: Freq) -> Result<Measured, SolveError> {
    let lin = ac::Linear::new(net, dc)?;
    measure::measured(net, &lin, freq)
}
