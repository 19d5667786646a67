use super::*;
use crate::analysis::{corners_only, Problem};
use crate::device::Family;
use crate::netlist::{Element, Netlist};
use crate::rank::Metrics;
use crate::search::{Design, Effort};
use crate::topology::{
    by_id, BiasNetwork, CapRole, NetlistInput, OpPoint, Rails, Role, SignalContext, SmallSignal,
};

/// A JFET gain stage of our own: VDD 15 V, RL 10 kΩ, an ideal source.
fn problem(idss: &str, vgs_off: &str) -> Problem {
    let text = format!(
        "name = 'cross-check stage'\n\
         [target]\ngain = 4.0\ntolerance = 0.5\n\
         [supply]\nvdd = 15.0\n\
         [load]\nrl = '10k'\n\
         [input]\nzin_min = '100k'\n\
         [headroom]\nvds_min = 1.0\n\
         [device]\nfamily = 'n-jfet'\nidss = {idss}\nvgs_off = {vgs_off}\n\
         [parts]\nseries = 'E24'\n"
    );
    Problem::new(&crate::spec::parse(&text).unwrap())
}

fn row(c: &CornerCheck, q: Quantity) -> Comparison {
    *c.rows.iter().find(|r| r.quantity == q).unwrap()
}

// Boylestad & Nashelsky ch. 7 (self bias): IDSS 8 mA, VP −4 V, RS 1 kΩ
// gives ID = 2 mA, VGS = −2 V; ch. 8 (bypassed RS): gm = 2·IDSS/|VP|·(1 −
// VGS/VP) = 2 mS and Av = −gm·(RD∥RL) with RD 3.3 kΩ, RL 10 kΩ.
#[test]
fn textbook_self_bias_is_confirmed_by_the_solver() {
    let p = problem("'8m'", "-4.0");
    assert_eq!(p.corners.len(), 1);
    let t = by_id("self-bias").unwrap();
    let cc = crosscheck(&p, t, &[1e6, 1e3, 3.3e3]).unwrap();
    let c = &cc.corners[0];
    let id = row(c, Quantity::Id);
    assert!((id.closed_form - 2e-3).abs() < 1e-12, "{id:?}");
    assert!((id.solver - 2e-3).abs() < 2e-9, "{id:?}");
    let vgs = row(c, Quantity::Vgs);
    assert!((vgs.solver + 2.0).abs() < 1e-6, "{vgs:?}");
    let av = -2e-3 * (3.3e3 * 10e3 / 13.3e3);
    let g = row(c, Quantity::Gain);
    assert!((g.closed_form - av).abs() < 1e-9 * av.abs(), "{g:?}");
    assert!((g.solver - av).abs() < 1e-6 * av.abs(), "{g:?}");
    // Gate resistor alone sets Zin; Zout = RD with ro infinite (λ = 0).
    assert!((row(c, Quantity::Zin).solver - 1e6).abs() < 1e-6 * 1e6);
    assert!((row(c, Quantity::Zout).solver - 3.3e3).abs() < 1e-6 * 3.3e3);
    assert_eq!(cc.largest.len(), 6);
    for l in &cc.largest {
        assert!(l.relative <= REL_TOL, "{l:?}");
        assert_eq!(l.corner, "nominal");
    }
}

// Shockley (1952) spread: with IDSS and VGS(off) ranged there are four
// corners (2^2 min/max combinations), each one checked, in order.
#[test]
fn every_corner_is_checked() {
    let p = problem("['6m', '10m']", "['-3', '-5']");
    assert_eq!(p.corners.len(), 4);
    let t = by_id("self-bias").unwrap();
    let cc = crosscheck(&p, t, &[1e6, 680.0, 2.2e3]).unwrap();
    assert_eq!(cc.corners.len(), 4);
    let labels: Vec<&str> = cc.corners.iter().map(|c| c.corner.as_str()).collect();
    let want: Vec<&str> = p.corners.iter().map(|c| c.label.as_str()).collect();
    assert_eq!(labels, want);
    let ids: Vec<f64> = cc
        .corners
        .iter()
        .map(|c| row(c, Quantity::Id).solver)
        .collect();
    assert!(ids.iter().all(|&i| i > 1e-4), "{ids:?}");
    assert!(cc.corners.iter().all(CornerCheck::agrees));
    assert_eq!(compare(&p, t, &[1e6, 680.0, 2.2e3]), cc.corners);
}

#[test]
fn relative_measure_has_a_floor_and_handles_infinity() {
    // 1e-15 A against 0 A is below the 1 pA floor: 1e-3, not infinite.
    let r = relative(Quantity::Id, 0.0, Complex64::new(1e-15, 0.0));
    assert!((r - 1e-3).abs() < 1e-12);
    assert_eq!(
        relative(
            Quantity::Zin,
            f64::INFINITY,
            Complex64::new(f64::INFINITY, 0.0)
        ),
        0.0
    );
    assert_eq!(
        relative(Quantity::Zin, 1e6, Complex64::new(f64::NAN, 0.0)),
        f64::INFINITY
    );
    // An imaginary part counts.
    let r = relative(Quantity::Gain, 2.0, Complex64::new(2.0, 2e-5));
    assert!((r - 1e-5).abs() < 1e-15);
}

/// Self bias whose closed-form gain is off by `GAIN_ERROR` and whose
/// netlist, with `BROKEN`, carries a negative resistor: stand-ins for a
/// wrong closed form and for a netlist the solver rejects.
struct Faulty {
    broken: bool,
    /// The closed form's bias takes RS 0.1 % too large (a wrong closed-form
    /// current, which the solver's start is taken from).
    wrong_bias: bool,
}
const GAIN_ERROR: f64 = 1e-4;
static WRONG_GAIN: Faulty = Faulty {
    broken: false,
    wrong_bias: false,
};
static BROKEN: Faulty = Faulty {
    broken: true,
    wrong_bias: false,
};
static WRONG_BIAS: Faulty = Faulty {
    broken: false,
    wrong_bias: true,
};

impl Topology for Faulty {
    fn id(&self) -> &'static str {
        "faulty"
    }
    fn summary(&self) -> &'static str {
        "test stand-in"
    }
    fn parts(&self) -> &'static [&'static str] {
        by_id("self-bias").unwrap().parts()
    }
    fn roles(&self) -> &'static [Role] {
        by_id("self-bias").unwrap().roles()
    }
    fn families(&self) -> &'static [Family] {
        by_id("self-bias").unwrap().families()
    }
    fn bias(&self, values: &[f64], rails: &Rails) -> BiasNetwork {
        let mut b = by_id("self-bias").unwrap().bias(values, rails);
        if self.wrong_bias {
            b.rs_ohm *= 1.001;
        }
        b
    }
    fn small_signal(&self, values: &[f64], ctx: &SignalContext) -> SmallSignal {
        let mut ss = by_id("self-bias").unwrap().small_signal(values, ctx);
        if !self.broken {
            ss.av *= 1.0 + GAIN_ERROR;
        }
        ss
    }
    fn signal_path(&self, values: &[f64]) -> crate::topology::SignalPath {
        by_id("self-bias").unwrap().signal_path(values)
    }
    fn resistor_volts(&self, values: &[f64], rails: &Rails, op: &OpPoint) -> Vec<f64> {
        by_id("self-bias")
            .unwrap()
            .resistor_volts(values, rails, op)
    }
    fn netlist(&self, values: &[f64], build: &NetlistInput) -> Netlist {
        let mut net = by_id("self-bias").unwrap().netlist(values, build);
        if self.broken {
            for e in &mut net.elements {
                if let Element::Resistor { ohms, .. } = e {
                    *ohms = -1.0;
                }
            }
        }
        net
    }
    fn capacitors(&self, values: &[f64]) -> Vec<(&'static str, CapRole)> {
        by_id("self-bias").unwrap().capacitors(values)
    }
}

#[test]
fn a_wrong_closed_form_is_a_disagreement_naming_quantity_and_corner() {
    let p = problem("['6m', '10m']", "['-3', '-5']");
    let e = crosscheck(&p, &WRONG_GAIN, &[1e6, 680.0, 2.2e3]).unwrap_err();
    let Disagreement::Value {
        quantity,
        corner,
        closed_form,
        solver,
        relative,
    } = &e
    else {
        panic!("{e}");
    };
    assert_eq!(*quantity, Quantity::Gain);
    assert_eq!(corner, &p.corners[0].label);
    assert!((closed_form / solver - (1.0 + GAIN_ERROR)).abs() < 1e-9);
    assert!((relative - GAIN_ERROR / (1.0 + GAIN_ERROR)).abs() < 1e-9);
    let text = e.to_string();
    assert!(text.starts_with("gain at corner `"), "{text}");
    // The per-corner view still shows the agreeing quantities.
    let all = compare(&p, &WRONG_GAIN, &[1e6, 680.0, 2.2e3]);
    assert!(all.iter().all(|c| !c.agrees()));
    assert!(all.iter().all(|c| row(c, Quantity::Id).agrees));
}

// The solver starts from the closed form's current, but must still meet
// KCL on its own: a closed-form current that is off (RS taken 0.1 % too
// large) is reported, not confirmed.
#[test]
fn a_wrong_closed_form_current_is_a_disagreement() {
    let p = problem("['6m', '10m']", "['-3', '-5']");
    let e = crosscheck(&p, &WRONG_BIAS, &[1e6, 680.0, 2.2e3]).unwrap_err();
    let Disagreement::Value {
        quantity, relative, ..
    } = &e
    else {
        panic!("{e}");
    };
    assert_eq!(*quantity, Quantity::Id, "{e}");
    assert!(*relative > 10.0 * REL_TOL, "{e}");
    let all = compare(&p, &WRONG_BIAS, &[1e6, 680.0, 2.2e3]);
    assert!(all.iter().all(|c| !row(c, Quantity::Id).agrees));
}

#[test]
fn a_solver_failure_is_a_disagreement() {
    let p = problem("'8m'", "-4.0");
    let e = crosscheck(&p, &BROKEN, &[1e6, 1e3, 3.3e3]).unwrap_err();
    assert!(
        matches!(&e, Disagreement::Solver { corner, error: SolveError::InvalidElement { .. } } if corner == "nominal"),
        "{e:?}"
    );
    let c = &compare(&p, &BROKEN, &[1e6, 1e3, 3.3e3])[0];
    assert!(c.rows.is_empty() && c.solver_error.is_some() && !c.agrees());
}

fn design(p: &Problem, t: &'static dyn Topology, values: &[f64]) -> Design {
    let worst = corners_only(p, t, values);
    Design {
        topology: t,
        topology_index: 0,
        values: values.to_vec(),
        tolerances: vec![0.05; values.len()],
        worst,
        metrics: Metrics::new(&p.spec, &worst, 3),
        score: 0.5,
    }
}

#[test]
fn retain_verified_drops_only_the_disagreeing_designs() {
    let p = problem("['6m', '10m']", "['-3', '-5']");
    let good = by_id("self-bias").unwrap();
    let mut outcome = Outcome {
        designs: vec![
            design(&p, good, &[1e6, 680.0, 2.2e3]),
            design(&p, &WRONG_GAIN, &[1e6, 680.0, 2.2e3]),
            design(&p, good, &[1e6, 1e3, 2.7e3]),
            design(&p, &BROKEN, &[1e6, 1e3, 2.7e3]),
        ],
        rejected: Vec::new(),
        effort: Effort::default(),
        nominal_only: false,
    };
    let warnings = retain_verified(&p, &mut outcome);
    let kept: Vec<(&str, f64)> = outcome
        .designs
        .iter()
        .map(|d| (d.topology.id(), d.values[1]))
        .collect();
    assert_eq!(kept, vec![("self-bias", 680.0), ("self-bias", 1e3)]);
    assert_eq!(warnings.len(), 2, "{warnings:?}");
    assert!(
        warnings[0].starts_with(
            "dropped design 2 (faulty RG=1M RS=680 RD=2.2k): the nodal solver disagrees on gain at corner"
        ),
        "{}",
        warnings[0]
    );
    assert!(
        warnings[1].starts_with("dropped design 4 (faulty"),
        "{}",
        warnings[1]
    );
    assert!(warnings[1].contains("solver failed"), "{}", warnings[1]);
}

// Kirchhoff at the drain: with RD = 1 TΩ the device sits deep in triode
// with VDS of a few nanovolts, a rail-sized difference (15 V − RD·ID) that
// keeps only the last digits of f64. The 1 µV voltage floor keeps that
// rounding (about 1e-14 V) from reading as a disagreement.
#[test]
fn nanovolt_vds_from_cancellation_is_not_a_disagreement() {
    let p = problem("['6m', '10m']", "['-3', '-5']");
    let t = by_id("self-bias").unwrap();
    let cc = crosscheck(&p, t, &[1e6, 1e-3, 1e12]).unwrap();
    for c in &cc.corners {
        let vds = row(c, Quantity::Vds);
        assert!(vds.solver > 0.0 && vds.solver < 1e-8, "{vds:?}");
        assert!((vds.solver - vds.closed_form).abs() < 1e-12, "{vds:?}");
        // KCL: essentially all of VDD across RD, ID = 15 V / 1 TΩ.
        let id = row(c, Quantity::Id);
        assert!((id.solver - 15.0 / 1e12).abs() < 1e-6 * 15e-12, "{id:?}");
    }
}
