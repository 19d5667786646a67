//! The mid-band signal path of a topology: the few resistances the signal
//! sees once every coupling and bypass capacitor is a short, and which FET
//! terminals carry the input and the output.
//!
//! Four basic stages cover every topology: common source (gate in, drain
//! out, with or without unbypassed source resistance), source follower
//! (gate in, source out, drain at AC ground), common gate (gate at AC
//! ground, source in, drain out) and drain feedback (common source with a
//! resistor from the drain back to the gate). Output swing, noise and
//! distortion are computed from this description and the operating point,
//! so a new topology states its path once and gets all three.

use serde::Serialize;

/// A FET terminal that carries the signal.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Terminal {
    /// The gate.
    Gate,
    /// The source.
    Source,
    /// The drain.
    Drain,
}

/// What the signal sees at mid-band, ohms. An absent element is
/// `f64::INFINITY` (open); a terminal held at AC ground has 0 Ω to ground.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SignalPath {
    /// Where the signal source (through its resistance) is coupled in.
    pub input: Terminal,
    /// Where the load is coupled out.
    pub output: Terminal,
    /// Gate to AC ground: the gate resistor, the divider R1∥R2, or 0 when
    /// the gate is bypassed (common gate); infinite when no resistor returns
    /// the gate to ground (drain feedback).
    pub gate_ohm: f64,
    /// Source to AC ground: the unbypassed source resistance, 0 when the
    /// source sits on a bypass capacitor or a rail.
    pub source_ohm: f64,
    /// Drain to AC ground: RD, or 0 when the drain sits on the supply
    /// (follower).
    pub drain_ohm: f64,
    /// Drain to gate (drain feedback's RF); infinite otherwise.
    pub feedback_ohm: f64,
    /// DC resistance between the gate and the node that sets its voltage
    /// (a rail, the divider's Thevenin source, or the drain for drain
    /// feedback): the resistance gate leakage flows through, ohms.
    pub gate_dc_ohm: f64,
}

impl SignalPath {
    /// Common source: gate in, drain out.
    pub fn common_source(gate_ohm: f64, source_ohm: f64, drain_ohm: f64) -> SignalPath {
        SignalPath {
            input: Terminal::Gate,
            output: Terminal::Drain,
            gate_ohm,
            source_ohm,
            drain_ohm,
            feedback_ohm: f64::INFINITY,
            gate_dc_ohm: gate_ohm,
        }
    }

    /// Source follower: gate in, source out, drain at AC ground.
    pub fn follower(gate_ohm: f64, source_ohm: f64) -> SignalPath {
        SignalPath {
            input: Terminal::Gate,
            output: Terminal::Source,
            gate_ohm,
            source_ohm,
            drain_ohm: 0.0,
            feedback_ohm: f64::INFINITY,
            gate_dc_ohm: gate_ohm,
        }
    }

    /// Common gate: gate at AC ground through a bypass capacitor, source in,
    /// drain out; `gate_dc_ohm` is the bias network's Thevenin resistance.
    pub fn common_gate(gate_dc_ohm: f64, source_ohm: f64, drain_ohm: f64) -> SignalPath {
        SignalPath {
            input: Terminal::Source,
            output: Terminal::Drain,
            gate_ohm: 0.0,
            source_ohm,
            drain_ohm,
            feedback_ohm: f64::INFINITY,
            gate_dc_ohm,
        }
    }

    /// Drain feedback: RF from drain to gate, gate in, drain out, source
    /// grounded.
    pub fn drain_feedback(feedback_ohm: f64, drain_ohm: f64) -> SignalPath {
        SignalPath {
            input: Terminal::Gate,
            output: Terminal::Drain,
            gate_ohm: f64::INFINITY,
            source_ohm: 0.0,
            drain_ohm,
            feedback_ohm,
            gate_dc_ohm: feedback_ohm,
        }
    }

    /// The same path with a different DC gate resistance (a gate resistor
    /// fed from a bypassed divider: the leakage also crosses the divider).
    pub fn with_gate_dc_ohm(self, gate_dc_ohm: f64) -> SignalPath {
        SignalPath {
            gate_dc_ohm,
            ..self
        }
    }
}
