//! The bill of materials as plain data, ready for purchasing: one line per
//! group of equal parts, with sequential designators (R1…Rn, C1…Cn, Q1),
//! the circuit role of each part, the value and tolerance, the power rating
//! to buy (derated), the worst voltage across the part, the voltage rating
//! and the smallest package class.
//!
//! - Designators number the resistors in the topology's part order (a 0 Ω
//!   position is a wire and gets none), then the capacitors, then the FET.
//!   The role column keeps the design's own names (RD, C_IN), which the
//!   schematic, the netlist and the report use.
//! - A resistor's rating is the smallest standard one whose derated power
//!   and derated working voltage both hold ([`rate_to_buy`]); its package
//!   class follows from the rating ([`resistor_package`]).
//! - A capacitor's voltage rating covers the whole supply span with margin
//!   ([`capacitor_rating_v`]); its voltage column is the DC across it in
//!   operation, the largest over the device corners, from the independent
//!   nodal solver. An electrolytic's note says which side is positive.
//! - The FET's ratings are minimums: VDS at least the supply span (a
//!   cut-off device sees all of it), PD at least twice the worst
//!   dissipation (the same 50 % derating as the resistors, common
//!   practice).
//! - Parts group into one line when every column but the designator and
//!   the role is the same.
//!
//! This module computes; `report::bom` writes the CSV.

use crate::analysis::Problem;
use crate::bench::caps::CapPlan;
use crate::bench::ratings::{
    capacitor_rating_v, rate_to_buy, resistor_package, supply_span_v, ResistorDuty, POWER_DERATING,
};
use crate::bench::response::netlist;
use crate::netlist::{Element, FetKind, Netlist};
use crate::search::Design;
use crate::topology::Role;
use crate::units::with_unit;
use crate::verify::{self, SolveError};

/// Below this DC magnitude, volts, a capacitor is taken to have no steady
/// polarity (common practice: an electrolytic wants a clear bias).
pub const POLARITY_FLOOR_V: f64 = 0.1;

/// Dissipation up to which a small-signal package (SOT-23, TO-92 class) is
/// enough, watts: half the 0.25 W that the smallest of them is commonly
/// rated for (from memory; the device's datasheet decides).
pub const SMALL_SIGNAL_PD_W: f64 = 0.125;

/// What kind of part a line is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PartClass {
    /// A fixed resistor.
    Resistor,
    /// A film capacitor (non-polarised).
    FilmCapacitor,
    /// An aluminium electrolytic capacitor (polarised).
    ElectrolyticCapacitor,
    /// The FET.
    Fet,
}

impl PartClass {
    /// The part in words, for the `part` column.
    pub fn words(self) -> &'static str {
        match self {
            PartClass::Resistor => "resistor",
            PartClass::FilmCapacitor => "film capacitor",
            PartClass::ElectrolyticCapacitor => "aluminium electrolytic capacitor",
            PartClass::Fet => "FET",
        }
    }
}

/// One line of the bill of materials: a group of equal parts.
#[derive(Debug, Clone, PartialEq)]
pub struct BomLine {
    /// Sequential designators, e.g. `R1`, `R4`.
    pub designators: Vec<String>,
    /// The design's name and function of each part, e.g. `RD (drain
    /// load)`, in the order of `designators`.
    pub roles: Vec<String>,
    /// What kind of part.
    pub class: PartClass,
    /// What to ask for beyond the class, e.g. `n-channel JFET`.
    pub description: String,
    /// Ohms for a resistor, farads for a capacitor; `None` for the FET.
    pub value: Option<f64>,
    /// Relative tolerance, when it applies.
    pub tolerance: Option<f64>,
    /// Where the value comes from: an E-series or stock list, a capacitor
    /// series, or the device class.
    pub series: String,
    /// Power rating to buy, watts (a minimum for the FET).
    pub power_rating_w: Option<f64>,
    /// Largest dissipation of any part of the line, watts.
    pub power_worst_w: Option<f64>,
    /// Largest DC voltage across any part of the line, volts.
    pub voltage_worst_v: Option<f64>,
    /// Voltage rating to buy, volts (a minimum for the FET).
    pub voltage_rating_v: Option<f64>,
    /// True when the ratings are minimums (the FET), not standard values.
    pub ratings_are_minimums: bool,
    /// Smallest package class.
    pub package: String,
    /// Notes for the buyer and the assembler.
    pub notes: Vec<String>,
}

impl BomLine {
    /// How many parts.
    pub fn quantity(&self) -> usize {
        self.designators.len()
    }
}

/// The bill of materials of one design.
#[derive(Debug, Clone, PartialEq)]
pub struct Bom {
    /// The lines: resistors, then capacitors, then the FET.
    pub lines: Vec<BomLine>,
    /// The corner the capacitors are sized for, hertz.
    pub f_low_hz: f64,
    /// True when the specification gave it (false: the default corner).
    pub f_low_given: bool,
}

/// A resistor's function from its role.
fn resistor_words(role: Option<&Role>, bypassed: bool) -> &'static str {
    match role {
        Some(Role::Gate) => "gate return",
        Some(Role::DivTop) => "gate divider, upper",
        Some(Role::DivBottom) => "gate divider, lower",
        Some(Role::Source) if bypassed => "source, bypassed",
        Some(Role::Source) => "source",
        Some(Role::Drain) => "drain load",
        Some(Role::Feedback) => "drain-to-gate feedback",
        None => "resistor",
    }
}

/// A node of the stage in words, for the polarity of an electrolytic.
fn node_words(name: &str) -> String {
    match name {
        "0" | "gnd" => "ground".to_string(),
        "vdd" => "VDD".to_string(),
        "vss" => "VSS".to_string(),
        "g" => "the gate".to_string(),
        "gb" => "the gate divider".to_string(),
        "s" => "the source".to_string(),
        "sx" => "the junction of RS1 and RS2".to_string(),
        "d" => "the drain".to_string(),
        "out" => "the load".to_string(),
        "src" | "sig" => "the signal source".to_string(),
        other => format!("node {other}"),
    }
}

/// The DC across each capacitor of `nets` (one netlist per device corner):
/// designator → (largest magnitude, the node names of its two sides, the
/// sign of V(a) − V(b) when it is the same and clear at every corner).
fn capacitor_volts(nets: &[Netlist]) -> Result<Vec<CapVolts>, SolveError> {
    let mut out: Vec<CapVolts> = Vec::new();
    for net in nets {
        let dc = verify::dc(net)?;
        let name = |n: usize| net.nodes.get(n).cloned().unwrap_or_else(|| n.to_string());
        for e in &net.elements {
            if let Element::Capacitor {
                name: des, a, b, ..
            } = e
            {
                let v = dc.v(*a).unwrap_or(0.0) - dc.v(*b).unwrap_or(0.0);
                match out.iter_mut().find(|c| c.designator == *des) {
                    Some(c) => {
                        c.worst_v = c.worst_v.max(v.abs());
                        c.min_signed_v = c.min_signed_v.min(v);
                        c.max_signed_v = c.max_signed_v.max(v);
                    }
                    None => out.push(CapVolts {
                        designator: des.clone(),
                        a: name(*a),
                        b: name(*b),
                        worst_v: v.abs(),
                        min_signed_v: v,
                        max_signed_v: v,
                    }),
                }
            }
        }
    }
    Ok(out)
}

struct CapVolts {
    designator: String,
    a: String,
    b: String,
    worst_v: f64,
    min_signed_v: f64,
    max_signed_v: f64,
}

impl CapVolts {
    /// Which side is positive, in words, or why none is.
    fn polarity(&self) -> String {
        if self.min_signed_v >= POLARITY_FLOOR_V {
            format!("+ side to {}", node_words(&self.a))
        } else if self.max_signed_v <= -POLARITY_FLOOR_V {
            format!("+ side to {}", node_words(&self.b))
        } else {
            format!(
                "no steady DC across it (under {}): use a bipolar (non-polarised) type",
                with_unit(POLARITY_FLOOR_V, "V")
            )
        }
    }
}

/// One part before grouping.
struct Part {
    designator: String,
    role: String,
    line: BomLine,
}

/// The bill of materials of design `d`: `series` names the resistor shelf,
/// `duty` comes from [`crate::bench::ratings::resistor_duty`], `plan` holds
/// the sized capacitors (for `plan.f_low_hz`; `f_low_given` false when that
/// is the default corner).
pub fn bom(
    p: &Problem,
    d: &Design,
    series: &str,
    duty: &[ResistorDuty],
    plan: &CapPlan,
    f_low_given: bool,
) -> Result<Bom, SolveError> {
    let t = d.topology;
    let span = supply_span_v(p);
    let mut parts: Vec<Part> = Vec::new();
    let mut n_r = 0;
    for (i, (name, &ohms)) in t.parts().iter().zip(&d.values).enumerate() {
        if ohms <= 0.0 {
            continue;
        }
        n_r += 1;
        let duty = duty.iter().find(|x| x.designator == *name);
        let rating = duty.map(rate_to_buy);
        let mut notes = Vec::new();
        if let Some(r) = &rating {
            if r.rating_w.is_none() {
                notes.push("dissipation beyond 5 W: see the cautions".to_string());
            } else if !r.voltage_ok {
                notes
                    .push("voltage beyond the largest standard part: see the cautions".to_string());
            }
        }
        let rating_w = rating.and_then(|r| r.rating_w);
        let words = resistor_words(t.roles().get(i), t.bypassed().contains(&i));
        parts.push(Part {
            designator: format!("R{n_r}"),
            role: format!("{name} ({words})"),
            line: BomLine {
                designators: Vec::new(),
                roles: Vec::new(),
                class: PartClass::Resistor,
                description: String::new(),
                value: Some(ohms),
                tolerance: d.tolerances.get(i).copied().filter(|t| *t > 0.0),
                series: series.to_string(),
                power_rating_w: rating_w,
                power_worst_w: duty.map(|x| x.p_worst_w),
                voltage_worst_v: duty.map(|x| x.v_worst_v),
                voltage_rating_v: None,
                ratings_are_minimums: false,
                package: rating_w.map_or_else(
                    || "see notes".to_string(),
                    |r| resistor_package(r).to_string(),
                ),
                notes,
            },
        });
    }
    let caps = plan.values();
    let nets: Vec<Netlist> = p
        .corners
        .iter()
        .map(|c| netlist(p, t, &d.values, c.law, caps))
        .collect();
    let volts = capacitor_volts(&nets)?;
    let corner_note = if f_low_given {
        format!(
            "sized for f_low = {} (the specification)",
            with_unit(plan.f_low_hz, "Hz")
        )
    } else {
        format!(
            "sized for the default corner {}: the specification gives no [band] f_low",
            with_unit(plan.f_low_hz, "Hz")
        )
    };
    for (k, c) in plan.caps.iter().enumerate() {
        let electrolytic = c.dielectric == "electrolytic";
        let v = volts.iter().find(|v| v.designator == c.designator);
        let mut notes = vec![corner_note.clone()];
        if electrolytic {
            if let Some(v) = v {
                notes.push(v.polarity());
            }
        }
        parts.push(Part {
            designator: format!("C{}", k + 1),
            role: format!("{} ({})", c.designator, c.role_words()),
            line: BomLine {
                designators: Vec::new(),
                roles: Vec::new(),
                class: if electrolytic {
                    PartClass::ElectrolyticCapacitor
                } else {
                    PartClass::FilmCapacitor
                },
                description: String::new(),
                value: Some(c.farads),
                tolerance: Some(c.tolerance),
                series: c.series.to_string(),
                power_rating_w: None,
                power_worst_w: None,
                voltage_worst_v: v.map(|v| v.worst_v),
                voltage_rating_v: capacitor_rating_v(span),
                ratings_are_minimums: false,
                package: if electrolytic {
                    "radial, polarised".to_string()
                } else {
                    "radial or box film".to_string()
                },
                notes,
            },
        });
    }
    let dev = &p.spec.device;
    let kind = match p.kind {
        FetKind::NJfet => "n-channel JFET",
        FetKind::NMos => "n-channel MOSFET",
    };
    let mut notes = vec![format!("designed for {}", spread_words(p))];
    match (dev.pd_max_w, dev.vds_max_v) {
        (Some(pd), Some(vds)) => notes.push(format!(
            "as specified: PD {}, VDS {}",
            with_unit(pd, "W"),
            with_unit(vds, "V")
        )),
        (Some(pd), None) => notes.push(format!("as specified: PD {}", with_unit(pd, "W"))),
        (None, Some(vds)) => notes.push(format!("as specified: VDS {}", with_unit(vds, "V"))),
        (None, None) => {}
    }
    parts.push(Part {
        designator: "Q1".to_string(),
        role: "Q1 (amplifying FET)".to_string(),
        line: BomLine {
            designators: Vec::new(),
            roles: Vec::new(),
            class: PartClass::Fet,
            description: format!("{kind} ({})", dev.family.id()),
            value: None,
            tolerance: None,
            series: dev.source.clone(),
            power_rating_w: Some(d.worst.pd_max_w / POWER_DERATING),
            power_worst_w: Some(d.worst.pd_max_w),
            voltage_worst_v: Some(d.worst.vds_max_v),
            voltage_rating_v: Some(span),
            ratings_are_minimums: true,
            package: if d.worst.pd_max_w <= SMALL_SIGNAL_PD_W {
                "small-signal (SOT-23, TO-92 class)".to_string()
            } else {
                "power package: see the device's datasheet".to_string()
            },
            notes,
        },
    });
    Ok(Bom {
        lines: group(parts),
        f_low_hz: plan.f_low_hz,
        f_low_given,
    })
}

/// The device spread the design relies on, from the corners' parameters:
/// `idss 3 mA to 9 mA, vgs_off -4 V to -1.5 V`.
fn spread_words(p: &Problem) -> String {
    let mut names: Vec<&String> = Vec::new();
    for c in &p.corners {
        for k in c.params.keys() {
            if !names.contains(&k) {
                names.push(k);
            }
        }
    }
    let unit = |name: &str| {
        if name.starts_with('v') {
            "V"
        } else if name.starts_with('k') {
            "A/V^2"
        } else if name.starts_with("lambda") {
            "/V"
        } else {
            "A"
        }
    };
    let parts: Vec<String> = names
        .iter()
        .map(|n| {
            let vals = p.corners.iter().filter_map(|c| c.params.get(*n));
            let lo = vals.clone().copied().fold(f64::INFINITY, f64::min);
            let hi = vals.copied().fold(f64::NEG_INFINITY, f64::max);
            if (hi - lo).abs() <= 1e-12 * hi.abs().max(lo.abs()) {
                format!("{n} {}", with_unit(lo, unit(n)))
            } else {
                format!(
                    "{n} {} to {}",
                    with_unit(lo, unit(n)),
                    with_unit(hi, unit(n))
                )
            }
        })
        .collect();
    parts.join(", ")
}

/// Group equal parts (every column but designator and role the same) into
/// lines, in order of first appearance.
fn group(parts: Vec<Part>) -> Vec<BomLine> {
    let mut lines: Vec<BomLine> = Vec::new();
    for part in parts {
        let same = |l: &BomLine| {
            l.class == part.line.class
                && l.description == part.line.description
                && l.value == part.line.value
                && l.tolerance == part.line.tolerance
                && l.series == part.line.series
                && l.power_rating_w == part.line.power_rating_w
                && l.voltage_rating_v == part.line.voltage_rating_v
                && l.package == part.line.package
                && l.notes == part.line.notes
        };
        match lines.iter_mut().find(|l| same(l)) {
            Some(l) => {
                l.designators.push(part.designator);
                l.roles.push(part.role);
                l.power_worst_w = max_opt(l.power_worst_w, part.line.power_worst_w);
                l.voltage_worst_v = max_opt(l.voltage_worst_v, part.line.voltage_worst_v);
            }
            None => {
                let mut l = part.line;
                l.designators.push(part.designator);
                l.roles.push(part.role);
                lines.push(l);
            }
        }
    }
    lines
}

fn max_opt(a: Option<f64>, b: Option<f64>) -> Option<f64> {
    match (a, b) {
        (Some(x), Some(y)) => Some(x.max(y)),
        (x, y) => x.or(y),
    }
}
