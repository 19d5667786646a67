//! The stage's mid-band linear network: three nodes (gate, source, drain)
//! with the resistances of a [`SignalPath`], the signal source (EMF `u`
//! behind its resistance), the load, and the FET as a voltage-controlled
//! current source `gm·vgs + gds·vds` from drain to source.
//!
//! Coupling and bypass capacitors are shorts and the supplies are AC
//! ground, so every node voltage here is an increment on the DC operating
//! point. Solving the three node equations (a 3×3 system at most) gives
//! the gain, the transfer of any current injected between two nodes (a
//! noise generator, or the device's own current change), and the
//! large-signal excursions once the FET's law closes the loop.

use crate::topology::{SignalPath, Terminal};

/// Gate node index.
pub const G: usize = 0;
/// Source node index.
pub const S: usize = 1;
/// Drain node index.
pub const D: usize = 2;
/// Ground, as an end of an injected current.
pub const GND: usize = 3;

/// Node voltages (gate, source, drain), volts.
pub type Nodes = [f64; 3];

/// A stage with its signal source and load.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stage {
    /// The topology's signal path at its resistor values.
    pub path: SignalPath,
    /// Signal source resistance, ohms (0 = ideal source).
    pub rsig_ohm: f64,
    /// Load, ohms, AC-coupled to the output terminal.
    pub rl_ohm: f64,
}

/// A current `amps` taken out of node `from` and put into node `to` (either
/// may be [`GND`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Injection {
    /// Node the current leaves.
    pub from: usize,
    /// Node the current enters.
    pub to: usize,
    /// Amps.
    pub amps: f64,
}

fn node_of(t: Terminal) -> usize {
    match t {
        Terminal::Gate => G,
        Terminal::Source => S,
        Terminal::Drain => D,
    }
}

fn conductance(r_ohm: f64) -> f64 {
    if r_ohm.is_finite() && r_ohm > 0.0 {
        1.0 / r_ohm
    } else {
        0.0
    }
}

impl Stage {
    /// Index of the node the source drives.
    pub fn input_node(&self) -> usize {
        node_of(self.path.input)
    }

    /// Index of the node the load hangs on.
    pub fn output_node(&self) -> usize {
        node_of(self.path.output)
    }

    /// The node voltages for EMF `u` volts, FET conductances `gm_s`,
    /// `gds_s` (siemens) and the injected currents.
    pub fn solve(&self, gm_s: f64, gds_s: f64, u: f64, inj: &[Injection]) -> Nodes {
        let p = &self.path;
        let input = self.input_node();
        let output = self.output_node();
        // Nodes held at a known voltage: AC ground, or the EMF itself when
        // the source has no resistance.
        let mut fixed: [Option<f64>; 3] = [None; 3];
        if p.gate_ohm == 0.0 {
            fixed[G] = Some(0.0);
        }
        if p.source_ohm == 0.0 && input != S && output != S {
            fixed[S] = Some(0.0);
        }
        if p.drain_ohm == 0.0 && output != D {
            fixed[D] = Some(0.0);
        }
        let mut y = [[0.0_f64; 3]; 3];
        let mut b = [0.0_f64; 3];
        if self.rsig_ohm > 0.0 {
            let g = 1.0 / self.rsig_ohm;
            y[input][input] += g;
            b[input] += g * u;
        } else {
            fixed[input] = Some(u);
        }
        y[G][G] += conductance(p.gate_ohm);
        y[S][S] += conductance(p.source_ohm);
        y[D][D] += conductance(p.drain_ohm);
        let gf = conductance(p.feedback_ohm);
        y[G][G] += gf;
        y[D][D] += gf;
        y[G][D] -= gf;
        y[D][G] -= gf;
        y[output][output] += conductance(self.rl_ohm);
        // The FET: gm·(vg − vs) + gds·(vd − vs) leaves the drain node and
        // enters the source node.
        y[D][G] += gm_s;
        y[D][S] -= gm_s + gds_s;
        y[D][D] += gds_s;
        y[S][G] -= gm_s;
        y[S][S] += gm_s + gds_s;
        y[S][D] -= gds_s;
        for i in inj {
            if i.to < 3 {
                b[i.to] += i.amps;
            }
            if i.from < 3 {
                b[i.from] -= i.amps;
            }
        }
        solve_fixed(&y, &b, &fixed)
    }

    /// The output node's voltage in `v`.
    pub fn out(&self, v: &Nodes) -> f64 {
        v[self.output_node()]
    }

    /// Mid-band gain from the EMF to the loaded output, V/V, signed.
    pub fn gain(&self, gm_s: f64, gds_s: f64) -> f64 {
        self.out(&self.solve(gm_s, gds_s, 1.0, &[]))
    }

    /// Output volts per amp injected from `from` to `to` (EMF at zero).
    pub fn transfer(&self, gm_s: f64, gds_s: f64, from: usize, to: usize) -> f64 {
        let v = self.solve(
            gm_s,
            gds_s,
            0.0,
            &[Injection {
                from,
                to,
                amps: 1.0,
            }],
        );
        self.out(&v)
    }
}

/// `y·v = b` over the nodes that are not fixed, the fixed ones at their
/// values. Gaussian elimination with partial pivoting on at most 3
/// unknowns; a singular system (a floating node) gives 0 for that node.
fn solve_fixed(y: &[[f64; 3]; 3], b: &[f64; 3], fixed: &[Option<f64>; 3]) -> Nodes {
    let mut v = [0.0; 3];
    let mut free = [0usize; 3];
    let mut n = 0;
    for i in 0..3 {
        match fixed[i] {
            Some(x) => v[i] = x,
            None => {
                free[n] = i;
                n += 1;
            }
        }
    }
    let mut a = [[0.0_f64; 4]; 3];
    for r in 0..n {
        let i = free[r];
        let mut rhs = b[i];
        for j in 0..3 {
            if let Some(x) = fixed[j] {
                rhs -= y[i][j] * x;
            }
        }
        for c in 0..n {
            a[r][c] = y[i][free[c]];
        }
        a[r][3] = rhs;
    }
    for c in 0..n {
        let pivot = (c..n)
            .max_by(|&p, &q| a[p][c].abs().total_cmp(&a[q][c].abs()))
            .unwrap_or(c);
        a.swap(c, pivot);
        if a[c][c] == 0.0 {
            continue;
        }
        for r in (c + 1)..n {
            let f = a[r][c] / a[c][c];
            if f != 0.0 {
                let (upper, lower) = a.split_at_mut(r);
                for (x, y) in lower[0][c..].iter_mut().zip(&upper[c][c..]) {
                    *x -= f * y;
                }
            }
        }
    }
    let mut x = [0.0_f64; 3];
    for r in (0..n).rev() {
        let mut s = a[r][3];
        for c in (r + 1)..n {
            s -= a[r][c] * x[c];
        }
        x[r] = if a[r][r] == 0.0 { 0.0 } else { s / a[r][r] };
    }
    for r in 0..n {
        v[free[r]] = x[r];
    }
    v
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::topology::{SignalContext, TOPOLOGIES};

    // The network's gain from the EMF equals each topology's closed-form
    // gain (Boylestad & Nashelsky ch. 8 forms, with ro and the load) for
    // every topology, over many values, gm, gds and source resistances:
    // the signal path each topology declares is the circuit it builds.
    #[test]
    fn network_gain_is_every_topologys_closed_form() {
        let mut seed = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed >> 11) as f64 / (1u64 << 53) as f64
        };
        for t in TOPOLOGIES {
            for _ in 0..300 {
                let v: Vec<f64> = (0..t.parts().len())
                    .map(|_| 10f64.powf(1.0 + 6.0 * next()))
                    .collect();
                let gm = 10f64.powf(-5.0 + 4.0 * next());
                let gds = if next() < 0.3 {
                    0.0
                } else {
                    gm * 10f64.powf(-4.0 + 3.0 * next())
                };
                let rsig = if next() < 0.3 {
                    0.0
                } else {
                    10f64.powf(1.0 + 5.0 * next())
                };
                let rl = 10f64.powf(2.0 + 4.0 * next());
                let ctx = SignalContext {
                    gm_s: gm,
                    gds_s: gds,
                    rl_ohm: rl,
                    rsig_ohm: rsig,
                };
                let want = t.small_signal(&v, &ctx).gain_from_source(rsig);
                let stage = Stage {
                    path: t.signal_path(&v),
                    rsig_ohm: rsig,
                    rl_ohm: rl,
                };
                let got = stage.gain(gm, gds);
                assert!(
                    (got - want).abs() <= 1e-9 * want.abs().max(1e-12),
                    "{} {v:?} gm {gm} gds {gds} rsig {rsig}: {got} vs {want}",
                    t.id()
                );
            }
        }
    }

    // A current injected into the drain of a bypassed common source sees
    // RD∥RL (KCL at one node).
    #[test]
    fn drain_injection_sees_the_ac_load() {
        let stage = Stage {
            path: SignalPath::common_source(1e6, 0.0, 4.7e3),
            rsig_ohm: 10e3,
            rl_ohm: 10e3,
        };
        let z = stage.transfer(2e-3, 0.0, GND, D);
        assert!((z - 4.7e3 * 10e3 / 14.7e3).abs() < 1e-9);
    }
}
