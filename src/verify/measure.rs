//! Gain, input impedance and output impedance measured on the netlist, the
//! way a bench (or a SPICE AC run) would measure them.

use super::ac::{solve, Drive, Linear};
use super::{AcSolution, Freq, Measured, SolveError};
use crate::netlist::{Element, Netlist, GROUND};
use num_complex::Complex64;

/// Element index of the signal source.
fn signal_index(net: &Netlist) -> Result<usize, SolveError> {
    net.elements
        .iter()
        .position(
            |e| matches!(e, Element::VoltageSource { name, .. } if *name == net.signal_source),
        )
        .ok_or_else(|| SolveError::MissingSource {
            name: net.signal_source.clone(),
        })
}

/// Only the signal source drives, at 1 V; every other source is a short.
fn signal_only(sig: usize) -> impl Fn(usize, f64) -> f64 {
    move |i, _| if i == sig { 1.0 } else { 0.0 }
}

/// The circuit driven by the signal source alone, at 1 V EMF, load
/// connected.
fn signal_driven(net: &Netlist, lin: &Linear, freq: Freq) -> Result<AcSolution, SolveError> {
    let drive = signal_only(signal_index(net)?);
    solve(
        net,
        lin,
        freq,
        &Drive {
            source_v: &drive,
            skip: &[],
            inject: None,
        },
    )
}

/// V(output) per volt of signal EMF, load connected.
pub(crate) fn gain(net: &Netlist, lin: &Linear, freq: Freq) -> Result<Complex64, SolveError> {
    Ok(signal_driven(net, lin, freq)?.node_v[net.output])
}

/// Gain, Zin and Zout (see [`super::small_signal`] for the definitions).
pub(crate) fn measured(net: &Netlist, lin: &Linear, freq: Freq) -> Result<Measured, SolveError> {
    let a = signal_driven(net, lin, freq)?;
    let i_in = a
        .source_current(&net.signal_source)
        .ok_or_else(|| SolveError::ShortedSource {
            name: net.signal_source.clone(),
        })?;
    let zin = if i_in.norm() == 0.0 {
        Complex64::new(f64::INFINITY, 0.0)
    } else {
        a.node_v[net.input] / i_in
    };
    // The load: every resistor from the output node to ground.
    let load: Vec<usize> = net
        .elements
        .iter()
        .enumerate()
        .filter(|(_, e)| {
            matches!(e, Element::Resistor { a, b, .. }
                if (*a == net.output && *b == GROUND) || (*b == net.output && *a == GROUND))
        })
        .map(|(i, _)| i)
        .collect();
    let quiet = |_: usize, _: f64| 0.0;
    let b = solve(
        net,
        lin,
        freq,
        &Drive {
            source_v: &quiet,
            skip: &load,
            inject: Some(net.output),
        },
    )?;
    Ok(Measured {
        gain: a.node_v[net.output],
        zin_ohm: zin,
        zout_ohm: b.node_v[net.output],
    })
}
