//! DC operating point by modified nodal analysis and Newton–Raphson.
//!
//! Unknowns: the voltage of every node but ground, then the current of every
//! voltage source. Capacitors are open. Each FET is a nonlinear
//! voltage-controlled current source from drain to source (the gate draws no
//! current), linearised at every iterate into its companion model: `gds`
//! across drain–source, `gm` controlled by VGS, and the remainder as a fixed
//! current. The step is damped so no node moves more than
//! [`DcOptions::max_step_v`] per iteration. When plain Newton fails, the
//! sources are ramped from 0 to 100 % (source stepping), and then a shunt
//! conductance from every node to ground is stepped from 10 mS down to
//! zero (gmin stepping). Every method ends with a solve of the circuit as
//! given (no shunt conductance, full sources), and the answer is accepted
//! only when KCL holds at every node and the last Newton update is
//! negligible. With a guess of the FET currents ([`DcOptions::fet_currents_a`])
//! Newton first starts from the linear network with those currents fixed.

use super::check::{connected, validate};
use super::fet::eval;
use super::{DcMethod, DcOptions, DcSolution, FetOp, SolveError, SourceOp};
use crate::device::SquareLaw;
use crate::netlist::{Element, Netlist, Node};
use nalgebra::{DMatrix, DVector};

/// KCL tolerance, amps, on top of the rounding floor of each node's currents.
const ABSTOL_A: f64 = 1e-12;
/// Update tolerance, volts, on top of the rounding floor of each voltage.
const VTOL_V: f64 = 1e-12;
/// Rounding floor multipliers (a few units in the last place).
const RESIDUAL_ULPS: f64 = 16.0 * f64::EPSILON;
const UPDATE_ULPS: f64 = 4.0 * f64::EPSILON;
/// Most source-stepping steps (successful or not) before giving up.
const MAX_SOURCE_STEPS: usize = 1000;

struct Source {
    elem: usize,
    pos: Node,
    neg: Node,
    dc_v: f64,
}

struct Fet {
    elem: usize,
    d: Node,
    g: Node,
    s: Node,
    law: SquareLaw,
}

/// The circuit, indexed for stamping.
struct System<'a> {
    net: &'a Netlist,
    /// Node unknowns (every node but ground).
    n_v: usize,
    resistors: Vec<(Node, Node, f64)>,
    sources: Vec<Source>,
    fets: Vec<Fet>,
}

/// One linearisation: residual, its rounding scale per row, and the Jacobian.
struct Assembly {
    f: Vec<f64>,
    scale: Vec<f64>,
    j: DMatrix<f64>,
}

/// Why one Newton run stopped without an answer.
#[derive(Clone, Copy, PartialEq)]
enum Stop {
    Singular,
    Iterations,
}

#[derive(Default)]
struct Stats {
    iterations: usize,
    residual: f64,
    update: f64,
}

fn unknown(n: Node) -> Option<usize> {
    n.checked_sub(1)
}

impl<'a> System<'a> {
    fn new(net: &'a Netlist) -> Self {
        let mut sys = System {
            net,
            n_v: net.nodes.len() - 1,
            resistors: Vec::new(),
            sources: Vec::new(),
            fets: Vec::new(),
        };
        for (elem, e) in net.elements.iter().enumerate() {
            match e {
                Element::Resistor { a, b, ohms, .. } => sys.resistors.push((*a, *b, 1.0 / ohms)),
                Element::Capacitor { .. } => {}
                Element::VoltageSource { pos, neg, dc_v, .. } => sys.sources.push(Source {
                    elem,
                    pos: *pos,
                    neg: *neg,
                    dc_v: *dc_v,
                }),
                Element::Fet { d, g, s, law, .. } => sys.fets.push(Fet {
                    elem,
                    d: *d,
                    g: *g,
                    s: *s,
                    law: *law,
                }),
            }
        }
        sys
    }

    fn size(&self) -> usize {
        self.n_v + self.sources.len()
    }

    fn v(x: &[f64], n: Node) -> f64 {
        unknown(n).map_or(0.0, |i| x[i])
    }

    /// Residual (currents leaving each node; source equations) and Jacobian
    /// at `x`, with the sources at `level` (0..1) of their value and `gmin`
    /// siemens from every node to ground. FETs are left out when `with_fets`
    /// is false (the linear network alone, for the first guess).
    fn assemble(&self, x: &[f64], level: f64, gmin: f64, with_fets: bool) -> Assembly {
        let n = self.size();
        let mut a = Assembly {
            f: vec![0.0; n],
            scale: vec![0.0; n],
            j: DMatrix::zeros(n, n),
        };
        // Adds `value` to row r, column c when both are unknowns.
        let add = |j: &mut DMatrix<f64>, r: Option<usize>, c: Option<usize>, value: f64| {
            if let (Some(r), Some(c)) = (r, c) {
                j[(r, c)] += value;
            }
        };
        // Current `i` leaving node `p` and entering node `q`.
        let flow = |a: &mut Assembly, p: Node, q: Node, i: f64, floor: f64| {
            if let Some(r) = unknown(p) {
                a.f[r] += i;
                a.scale[r] += floor;
            }
            if let Some(r) = unknown(q) {
                a.f[r] -= i;
                a.scale[r] += floor;
            }
        };
        for &(p, q, g) in &self.resistors {
            let (vp, vq) = (Self::v(x, p), Self::v(x, q));
            flow(&mut a, p, q, g * (vp - vq), g * (vp.abs() + vq.abs()));
            let (rp, rq) = (unknown(p), unknown(q));
            add(&mut a.j, rp, rp, g);
            add(&mut a.j, rp, rq, -g);
            add(&mut a.j, rq, rp, -g);
            add(&mut a.j, rq, rq, g);
        }
        for (k, src) in self.sources.iter().enumerate() {
            let row = self.n_v + k;
            let i = x[row];
            flow(&mut a, src.pos, src.neg, i, i.abs());
            let (rp, rn) = (unknown(src.pos), unknown(src.neg));
            add(&mut a.j, rp, Some(row), 1.0);
            add(&mut a.j, rn, Some(row), -1.0);
            add(&mut a.j, Some(row), rp, 1.0);
            add(&mut a.j, Some(row), rn, -1.0);
            let (vp, vn, e) = (Self::v(x, src.pos), Self::v(x, src.neg), level * src.dc_v);
            a.f[row] = vp - vn - e;
            a.scale[row] = vp.abs() + vn.abs() + e.abs();
        }
        if with_fets {
            for fet in &self.fets {
                let (vd, vg, vs) = (Self::v(x, fet.d), Self::v(x, fet.g), Self::v(x, fet.s));
                let ev = eval(&fet.law, vg - vs, vd - vs);
                flow(&mut a, fet.d, fet.s, ev.id_a, ev.id_a.abs());
                let (rd, rg, rs) = (unknown(fet.d), unknown(fet.g), unknown(fet.s));
                for (row, sign) in [(rd, 1.0), (rs, -1.0)] {
                    add(&mut a.j, row, rg, sign * ev.gm_s);
                    add(&mut a.j, row, rd, sign * ev.gds_s);
                    add(&mut a.j, row, rs, -sign * (ev.gm_s + ev.gds_s));
                }
            }
        }
        if gmin > 0.0 {
            for (r, v) in x.iter().take(self.n_v).enumerate() {
                a.f[r] += gmin * v;
                a.scale[r] += gmin * v.abs();
                a.j[(r, r)] += gmin;
            }
        }
        a
    }

    /// Largest residual, and whether every row is within tolerance.
    fn residual(&self, a: &Assembly) -> (f64, bool) {
        let mut worst = 0.0_f64;
        let mut ok = true;
        for (r, (&f, &sc)) in a.f.iter().zip(&a.scale).enumerate() {
            let tol = if r < self.n_v { ABSTOL_A } else { VTOL_V };
            ok &= f.abs() <= tol + RESIDUAL_ULPS * sc;
            worst = worst.max(f.abs());
        }
        (worst, ok)
    }

    fn small_update(&self, dx: &[f64], x: &[f64]) -> bool {
        dx.iter().zip(x).enumerate().all(|(r, (d, v))| {
            let tol = if r < self.n_v { VTOL_V } else { ABSTOL_A };
            d.abs() <= tol + UPDATE_ULPS * v.abs()
        })
    }

    /// Newton–Raphson from `x` at source level `level` and shunt `gmin`.
    fn newton(
        &self,
        x: &mut [f64],
        level: f64,
        gmin: f64,
        opts: &DcOptions,
        stats: &mut Stats,
    ) -> Result<(), Stop> {
        for _ in 0..opts.max_iterations {
            stats.iterations += 1;
            let a = self.assemble(x, level, gmin, true);
            stats.residual = self.residual(&a).0;
            let rhs = DVector::from_iterator(a.f.len(), a.f.iter().map(|f| -f));
            let dx = solve(a.j, rhs).ok_or(Stop::Singular)?;
            let max_dv = dx
                .iter()
                .take(self.n_v)
                .fold(0.0_f64, |m, d| m.max(d.abs()));
            let alpha = if max_dv > opts.max_step_v {
                opts.max_step_v / max_dv
            } else {
                1.0
            };
            for (xi, di) in x.iter_mut().zip(dx.iter()) {
                *xi += alpha * di;
            }
            stats.update = alpha * max_dv;
            if alpha == 1.0 && self.small_update(dx.as_slice(), x) {
                let after = self.assemble(x, level, gmin, true);
                let (worst, ok) = self.residual(&after);
                stats.residual = worst;
                if ok {
                    return Ok(());
                }
            }
        }
        Err(Stop::Iterations)
    }

    /// The linear network alone (FETs open), as a first guess.
    fn first_guess(&self) -> Vec<f64> {
        self.guess_with_currents(&[])
    }

    /// The linear network with FET `k` replaced by a fixed current
    /// `id[k]` from drain to source, amps (FETs past the end of `id` open):
    /// the operating point itself when the currents are right.
    fn guess_with_currents(&self, id: &[f64]) -> Vec<f64> {
        let zero = vec![0.0; self.size()];
        let mut a = self.assemble(&zero, 1.0, 0.0, false);
        for (fet, &i) in self.fets.iter().zip(id) {
            if let Some(r) = unknown(fet.d) {
                a.f[r] += i;
            }
            if let Some(r) = unknown(fet.s) {
                a.f[r] -= i;
            }
        }
        let rhs = DVector::from_iterator(a.f.len(), a.f.iter().map(|f| -f));
        match solve(a.j, rhs) {
            Some(dx) => dx.iter().copied().collect(),
            None => zero,
        }
    }

    fn source_stepping(&self, opts: &DcOptions, stats: &mut Stats) -> Result<Vec<f64>, Stop> {
        // With every source at zero the all-zero state is the solution.
        let mut x = vec![0.0; self.size()];
        let (mut level, mut step) = (0.0_f64, 0.1_f64);
        // A bound on the number of steps, so a hopeless ramp ends.
        for _ in 0..MAX_SOURCE_STEPS {
            if level >= 1.0 {
                return Ok(x);
            }
            let target = (level + step).min(1.0);
            let mut trial = x.clone();
            match self.newton(&mut trial, target, 0.0, opts, stats) {
                Ok(()) => {
                    x = trial;
                    level = target;
                    step = (2.0 * step).min(0.5);
                }
                Err(stop) => {
                    step *= 0.25;
                    if step < 1e-7 {
                        return Err(stop);
                    }
                }
            }
        }
        if level >= 1.0 {
            Ok(x)
        } else {
            Err(Stop::Iterations)
        }
    }

    fn gmin_stepping(&self, opts: &DcOptions, stats: &mut Stats) -> Result<Vec<f64>, Stop> {
        let mut x = self.first_guess();
        let mut gmin = 1e-2;
        while gmin >= 1e-12 {
            self.newton(&mut x, 1.0, gmin, opts, stats)?;
            gmin *= 0.1;
        }
        self.newton(&mut x, 1.0, 0.0, opts, stats)?;
        Ok(x)
    }

    fn solution(&self, x: &[f64], method: DcMethod, iterations: usize) -> DcSolution {
        let node_v: Vec<f64> = (0..self.net.nodes.len()).map(|n| Self::v(x, n)).collect();
        let sources = self
            .sources
            .iter()
            .enumerate()
            .map(|(k, s)| SourceOp {
                name: self.net.elements[s.elem].name().to_string(),
                delivered_a: -x[self.n_v + k],
            })
            .collect();
        let fets = self
            .fets
            .iter()
            .map(|f| {
                let (vgs, vds) = (node_v[f.g] - node_v[f.s], node_v[f.d] - node_v[f.s]);
                let e = eval(&f.law, vgs, vds);
                FetOp {
                    name: self.net.elements[f.elem].name().to_string(),
                    vgs_v: vgs,
                    vds_v: vds,
                    id_a: e.id_a,
                    gm_s: e.gm_s,
                    gds_s: e.gds_s,
                    region: e.region,
                }
            })
            .collect();
        DcSolution {
            node_v,
            sources,
            fets,
            method,
            iterations,
        }
    }
}

/// Dense LU with partial pivoting; `None` when singular or not finite.
fn solve(j: DMatrix<f64>, rhs: DVector<f64>) -> Option<DVector<f64>> {
    let x = j.lu().solve(&rhs)?;
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// Solve the DC operating point with the given options.
pub(crate) fn run(net: &Netlist, opts: &DcOptions) -> Result<DcSolution, SolveError> {
    validate(net)?;
    connected(net, false)?;
    let sys = System::new(net);
    let mut stats = Stats::default();
    let mut tried = Vec::new();
    let mut last = Stop::Iterations;
    for &method in &opts.methods {
        tried.push(method.id());
        let result = match method {
            DcMethod::Newton => {
                // From the guessed currents first, then with the FETs open.
                let mut from = |id: &[f64]| {
                    let mut x = sys.guess_with_currents(id);
                    sys.newton(&mut x, 1.0, 0.0, opts, &mut stats).map(|()| x)
                };
                match opts.fet_currents_a.as_deref().map(&mut from) {
                    Some(Ok(x)) => Ok(x),
                    _ => from(&[]),
                }
            }
            DcMethod::SourceStepping => sys.source_stepping(opts, &mut stats),
            DcMethod::GminStepping => sys.gmin_stepping(opts, &mut stats),
        };
        match result {
            Ok(x) => return Ok(sys.solution(&x, method, stats.iterations)),
            Err(stop) => last = stop,
        }
    }
    if last == Stop::Singular {
        return Err(SolveError::Singular { analysis: "DC" });
    }
    Err(SolveError::NoConvergence {
        methods: tried.join(", "),
        iterations: stats.iterations,
        worst_residual_a: stats.residual,
        worst_update_v: stats.update,
    })
}
