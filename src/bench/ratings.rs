//! Part ratings and safety cautions for a chosen design: what each resistor
//! dissipates and sees at its worst, the wattage to buy, the working-voltage
//! check, the FET's dissipation against its rating, and the cautions an
//! engineer should read before building the stage.
//!
//! This module computes; it formats numbers into caution sentences but never
//! prints or writes files. It sits above `analysis` and below `report`.
//!
//! Every caution defers to local codes and licensed practice: the tool knows
//! the circuit, not the installation.

use crate::analysis::{point, tolerance_extremes, Problem, WorstCase};
use crate::device::Family;
use crate::topology::Topology;
use crate::units::with_unit;

/// Standard resistor power ratings, watts, ascending: SMD 0402 1/16 W,
/// 0603 1/10 W, 0805 1/8 W, 1206 1/4 W; through-hole 1/8 to 2 W; 5 W power
/// types (common practice, REFERENCE §6).
pub const STANDARD_RATINGS_W: [f64; 8] = [0.0625, 0.1, 0.125, 0.25, 0.5, 1.0, 2.0, 5.0];

/// Continuous-service power derating, dimensionless: a resistor runs at no
/// more than this fraction of its rating, so the rating bought is at least
/// twice the worst dissipation (common practice, REFERENCE §6: "≤ 50 % of
/// rated power in continuous service").
pub const POWER_DERATING: f64 = 0.5;

/// Voltage derating, dimensionless: a caution is raised above this fraction
/// of the typical maximum working voltage (common practice, REFERENCE §6).
pub const VOLTAGE_DERATING: f64 = 0.8;

/// Supply voltage above which the circuit leaves SELV, volts DC: IEC 60950-1
/// SELV limit (60 V DC in normal operation) and the ES1 limit of IEC 62368-1.
/// Exactly 60 V is still inside; the caution is for strictly more.
pub const SELV_LIMIT_V: f64 = 60.0;

/// Supply voltage above which the circuit leaves ELV, volts ripple-free DC:
/// the ELV band of IEC 61140 (≤ 120 V ripple-free DC). Exactly 120 V is still
/// inside; the stronger caution is for strictly more.
pub const ELV_LIMIT_V: f64 = 120.0;

/// The sentence every caution ends with.
const DEFER: &str = "Follow local electrical codes and licensed practice.";

/// Relative slack for inclusive comparisons (as `analysis::SLACK`).
const SLACK: f64 = 1e-9;

/// What one resistor endures across every device corner, resistor-tolerance
/// extreme and supply extreme.
#[derive(Debug, Clone, PartialEq)]
pub struct ResistorDuty {
    /// Designator, e.g. `RD`.
    pub designator: String,
    /// Nominal resistance, ohms.
    pub ohms: f64,
    /// Largest dissipation V²/R, watts (R at its tolerance extreme).
    pub p_worst_w: f64,
    /// Largest DC voltage across it, volts (magnitude).
    pub v_worst_v: f64,
}

/// The rating to buy for one resistor and the working-voltage check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ResistorRating {
    /// Smallest standard rating at least `p_worst / POWER_DERATING`, watts;
    /// `None` when even 5 W is not enough.
    pub rating_w: Option<f64>,
    /// Power-limited working voltage `sqrt(P·R)` of that rating, volts.
    pub power_limited_v: Option<f64>,
    /// Typical maximum working (limiting-element) voltage of parts of that
    /// rating, volts (from memory; see [`typical_max_working_v`]).
    pub max_working_v: Option<f64>,
    /// True when the worst voltage is within `VOLTAGE_DERATING` of the
    /// lower of the two limits above.
    pub voltage_ok: bool,
}

/// Smallest standard rating, watts, with `p_worst_w ≤ POWER_DERATING ·
/// rating` (inclusive, relative slack 1e-9); `None` above 2.5 W (5 W is the
/// largest standard rating here) or for a non-finite input.
pub fn rating_for(p_worst_w: f64) -> Option<f64> {
    if !p_worst_w.is_finite() {
        return None;
    }
    let need = p_worst_w.max(0.0) / POWER_DERATING;
    STANDARD_RATINGS_W
        .iter()
        .copied()
        .find(|&r| need <= r * (1.0 + SLACK))
}

/// Power-limited working voltage `E = sqrt(P·R)`, volts, for a rating in
/// watts and a resistance in ohms (REFERENCE §6, MIL-PRF-39005 §3.5.8 form).
pub fn power_limited_voltage_v(rating_w: f64, ohms: f64) -> f64 {
    (rating_w * ohms).max(0.0).sqrt()
}

/// Critical resistance `Vmax²/P`, ohms: above it the voltage limit, not the
/// power limit, governs (REFERENCE §6).
pub fn critical_resistance_ohm(rating_w: f64, v_max_v: f64) -> f64 {
    v_max_v * v_max_v / rating_w
}

/// Typical maximum working voltage of a resistor of the given standard
/// rating, volts, taking the lower of the common SMD and through-hole
/// figures (from memory, REFERENCE §6: 0402 ≈ 50 V, 0603 ≈ 50–75 V, 0805 ≈
/// 150 V, 1206 ≈ 200 V, 1/4 W axial ≈ 250 V, 1/2 W ≈ 350 V; 1 W to 5 W
/// also from memory). Verify against the chosen part's datasheet.
pub fn typical_max_working_v(rating_w: f64) -> Option<f64> {
    // (rating W, volts), from memory, conservative across package styles.
    const TABLE: [(f64, f64); 8] = [
        (0.0625, 50.0),
        (0.1, 50.0),
        (0.125, 150.0),
        (0.25, 200.0),
        (0.5, 350.0),
        (1.0, 350.0),
        (2.0, 500.0),
        (5.0, 500.0),
    ];
    TABLE
        .iter()
        .find(|(r, _)| (r - rating_w).abs() <= SLACK * r)
        .map(|(_, v)| *v)
}

/// The power-limited rating of one resistor (the smallest standard rating
/// for its dissipation) and whether its voltage is within the derated
/// working voltage of that rating.
pub fn rate(d: &ResistorDuty) -> ResistorRating {
    let rating_w = rating_for(d.p_worst_w);
    let power_limited_v = rating_w.map(|r| power_limited_voltage_v(r, d.ohms));
    let max_working_v = rating_w.and_then(typical_max_working_v);
    let limit = match (power_limited_v, max_working_v) {
        (Some(a), Some(b)) => Some(a.min(b)),
        (a, b) => a.or(b),
    };
    ResistorRating {
        rating_w,
        power_limited_v,
        max_working_v,
        voltage_ok: limit.is_some_and(|l| d.v_worst_v <= VOLTAGE_DERATING * l * (1.0 + SLACK)),
    }
}

/// The working-voltage limit of a resistor of a standard rating, volts: the
/// lower of the power-limited `sqrt(P·R)` and the typical maximum working
/// voltage of parts of that rating (REFERENCE §6).
pub fn voltage_limit_v(rating_w: f64, ohms: f64) -> f64 {
    let e = power_limited_voltage_v(rating_w, ohms);
    typical_max_working_v(rating_w).map_or(e, |m| m.min(e))
}

/// The rating to buy for one resistor: the smallest standard rating whose
/// derated power and derated working voltage both hold (a high voltage on a
/// small dissipation needs a larger part). When none does, the power-limited
/// rating with `voltage_ok` false (see [`rate`]).
pub fn rate_to_buy(d: &ResistorDuty) -> ResistorRating {
    let first = rate(d);
    let Some(from) = first.rating_w else {
        return first;
    };
    STANDARD_RATINGS_W
        .iter()
        .filter(|&&r| r >= from)
        .map(|&r| ResistorRating {
            rating_w: Some(r),
            power_limited_v: Some(power_limited_voltage_v(r, d.ohms)),
            max_working_v: typical_max_working_v(r),
            voltage_ok: d.v_worst_v
                <= VOLTAGE_DERATING * voltage_limit_v(r, d.ohms) * (1.0 + SLACK),
        })
        .find(|r| r.voltage_ok)
        .unwrap_or(first)
}

/// The smallest package class of a resistor of a standard rating (common
/// practice, REFERENCE §6: SMD 0402 1/16 W, 0603 1/10 W, 0805 1/8 W, 1206
/// 1/4 W; through-hole 1/8 W to 2 W; 5 W power types).
pub fn resistor_package(rating_w: f64) -> &'static str {
    const TABLE: [(f64, &str); 8] = [
        (0.0625, "0402 SMD or larger"),
        (0.1, "0603 SMD or larger"),
        (0.125, "0805 SMD or 1/8 W axial"),
        (0.25, "1206 SMD or 1/4 W axial"),
        (0.5, "1/2 W axial"),
        (1.0, "1 W axial"),
        (2.0, "2 W axial"),
        (5.0, "5 W power resistor"),
    ];
    TABLE
        .iter()
        .find(|(r, _)| (r - rating_w).abs() <= SLACK * r)
        .map_or("see the rating", |(_, p)| p)
}

/// Worst dissipation and voltage of every resistor of the design (values
/// above 0 Ω; a 0 Ω position is a wire), over every device corner,
/// resistor-tolerance extreme and supply extreme. `values` in ohms and
/// `tolerances` (relative) in the topology's part order.
pub fn resistor_duty(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    tolerances: &[f64],
) -> Vec<ResistorDuty> {
    let mut duty: Vec<ResistorDuty> = t
        .parts()
        .iter()
        .zip(values)
        .map(|(name, &ohms)| ResistorDuty {
            designator: (*name).to_string(),
            ohms,
            p_worst_w: 0.0,
            v_worst_v: 0.0,
        })
        .collect();
    let rails = p.rail_extremes();
    for v in tolerance_extremes(values, tolerances) {
        for r in &rails {
            for c in &p.corners {
                let pt = point(p, t, &v, c, r);
                for ((d, &volts), &ohms) in duty.iter_mut().zip(&pt.resistor_v).zip(&v) {
                    if ohms > 0.0 {
                        d.p_worst_w = d.p_worst_w.max(volts * volts / ohms);
                        d.v_worst_v = d.v_worst_v.max(volts.abs());
                    }
                }
            }
        }
    }
    duty.retain(|d| d.ohms > 0.0);
    duty
}

/// Standard capacitor voltage ratings, volts, ascending (from memory: the
/// common electrolytic and film working voltages).
pub const CAPACITOR_VOLTAGES_V: [f64; 13] = [
    6.3, 10.0, 16.0, 25.0, 35.0, 50.0, 63.0, 100.0, 160.0, 250.0, 400.0, 450.0, 630.0,
];

/// Margin on a capacitor's voltage, dimensionless: rated at least this many
/// times the voltage it can see (common practice).
pub const CAPACITOR_MARGIN: f64 = 1.5;

/// Voltage rating to buy for a coupling or bypass capacitor, volts: the
/// smallest standard rating at least `CAPACITOR_MARGIN` times `span_v`, the
/// most it can see (a coupling capacitor can see the whole supply at
/// power-up, REFERENCE §5, common practice). `None` above 630 V / 1.5.
pub fn capacitor_rating_v(span_v: f64) -> Option<f64> {
    if !span_v.is_finite() {
        return None;
    }
    let need = span_v.abs() * CAPACITOR_MARGIN;
    CAPACITOR_VOLTAGES_V
        .iter()
        .copied()
        .find(|&r| need <= r * (1.0 + SLACK))
}

/// Largest voltage between any two conductors, volts: VDD − VSS at the top
/// of the supply tolerance.
pub fn supply_span_v(p: &Problem) -> f64 {
    (p.rails.vdd_v - p.rails.vss_v) * (1.0 + p.spec.supply.tolerance)
}

fn v(x: f64) -> String {
    with_unit(x, "V")
}

fn w(x: f64) -> String {
    with_unit(x, "W")
}

/// Cautions for the design, most serious first: the supply against the
/// SELV/ES1 and ELV limits, resistors beyond their power or voltage rating,
/// the FET against its dissipation and VDS ratings, and a JFET gate that
/// forward-biases. Each sentence ends by deferring to local codes and
/// licensed practice. An empty list means nothing to caution.
pub fn cautions(p: &Problem, worst: &WorstCase, duty: &[ResistorDuty]) -> Vec<String> {
    let mut out = Vec::new();
    let span = supply_span_v(p);
    if span > ELV_LIMIT_V {
        // IEC 61140: ELV band ends at 120 V ripple-free DC.
        out.push(format!(
            "DANGER: the supply reaches {} DC between conductors, above the 120 V ripple-free DC \
             limit of extra-low voltage (IEC 61140). Contact can be lethal: such circuits need \
             enclosures, insulation and protective measures designed by qualified people. {DEFER}",
            v(span)
        ));
    } else if span > SELV_LIMIT_V {
        // IEC 60950-1 SELV and IEC 62368-1 ES1: 60 V DC.
        out.push(format!(
            "WARNING: the supply reaches {} DC between conductors, above the 60 V DC limit of \
             SELV (IEC 60950-1) and ES1 (IEC 62368-1). Touchable conductors need protection \
             against electric shock. {DEFER}",
            v(span)
        ));
    }
    for d in duty {
        let r = rate_to_buy(d);
        match r.rating_w {
            None => out.push(format!(
                "WARNING: {} dissipates up to {} at the worst corner, more than half of the largest \
                 standard rating here (5 W): it is beyond its power rating and will run hot. \
                 {DEFER}",
                d.designator,
                w(d.p_worst_w)
            )),
            Some(_) if !r.voltage_ok => {
                let largest = STANDARD_RATINGS_W[STANDARD_RATINGS_W.len() - 1];
                let limit = voltage_limit_v(largest, d.ohms);
                let beyond = d.v_worst_v > limit * (1.0 + SLACK);
                out.push(format!(
                    "WARNING: {} sees up to {} DC, {} the working-voltage limit of about {} \
                     of even the largest standard part here (typical figure, from memory: check \
                     the part's datasheet). Choose a part rated for the voltage or split the \
                     resistance. {DEFER}",
                    d.designator,
                    v(d.v_worst_v),
                    if beyond { "beyond" } else { "above 80 % of" },
                    v(limit)
                ));
            }
            Some(_) => {}
        }
    }
    let dev = &p.spec.device;
    if let Some(pd_max) = dev.pd_max_w {
        if worst.pd_max_w > pd_max * (1.0 + SLACK) {
            out.push(format!(
                "WARNING: Q1 dissipates up to {} at the worst corner, beyond its {} rating. {DEFER}",
                w(worst.pd_max_w),
                w(pd_max)
            ));
        } else if worst.pd_max_w > POWER_DERATING * pd_max * (1.0 + SLACK) {
            // Common practice: derate semiconductor dissipation to about half.
            out.push(format!(
                "CAUTION: Q1 dissipates up to {} at the worst corner, more than half of its {} \
                 rating at 25 °C; check the derating at the real ambient temperature. {DEFER}",
                w(worst.pd_max_w),
                w(pd_max)
            ));
        }
    }
    if let Some(vds_max) = dev.vds_max_v {
        // REFERENCE §8.4 (common practice): a cut-off device sees the whole supply.
        if span > vds_max * (1.0 + SLACK) {
            out.push(format!(
                "WARNING: Q1 can see the whole supply ({}) when it is cut off or at power-up, \
                 beyond its {} VDS rating. {DEFER}",
                v(span),
                v(vds_max)
            ));
        }
    }
    if dev.family == Family::NJfet && worst.vgs_max_v > SLACK {
        out.push(format!(
            "WARNING: the JFET gate junction is forward-biased at some corner (VGS up to {}): \
             gate current flows and the input impedance collapses. {DEFER}",
            v(worst.vgs_max_v)
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::worst_case;
    use crate::spec::ValidSpec;
    use crate::topology::by_id;

    fn spec(vdd: f64, vss: f64, idss: (f64, f64), vp: (f64, f64)) -> ValidSpec {
        crate::spec::jfet_test_spec(vdd, vss, idss, vp)
    }

    fn close(got: f64, want: f64, rel: f64) {
        assert!(
            (got - want).abs() <= rel * want.abs(),
            "got {got}, want {want}"
        );
    }

    // REFERENCE §6 check values [computed]: sqrt(0.25 W · 100 kΩ) = 158.1 V;
    // 1/4 W, 1 MΩ -> 500 V; Rcrit(0.25 W, 250 V) = 250 kΩ.
    #[test]
    fn working_voltage_and_critical_resistance_check_values() {
        close(power_limited_voltage_v(0.25, 100e3), 158.113_883, 1e-8);
        close(power_limited_voltage_v(0.25, 1e6), 500.0, 1e-12);
        close(critical_resistance_ohm(0.25, 250.0), 250e3, 1e-12);
    }

    // Common practice (REFERENCE §6): the next standard wattage at least
    // twice the worst dissipation, the boundary inclusive.
    #[test]
    fn rating_is_the_next_standard_wattage_at_twice_the_dissipation() {
        assert_eq!(rating_for(0.1), Some(0.25));
        assert_eq!(rating_for(0.125), Some(0.25));
        assert_eq!(rating_for(0.126), Some(0.5));
        assert_eq!(rating_for(0.01), Some(0.0625));
        assert_eq!(rating_for(0.04), Some(0.1));
        assert_eq!(rating_for(0.0), Some(0.0625));
        assert_eq!(rating_for(2.5), Some(5.0));
        assert_eq!(rating_for(2.6), None);
        assert_eq!(rating_for(f64::NAN), None);
        assert_eq!(capacitor_rating_v(15.0), Some(25.0));
        assert_eq!(capacitor_rating_v(10.0), Some(16.0));
        assert_eq!(capacitor_rating_v(500.0), None);
    }

    // 100 kΩ at 1/4 W: E = 158.1 V (REFERENCE §6), below the 200 V typical
    // limit (from memory), so 158.1 V governs; 80 % of it is 126.5 V.
    #[test]
    fn voltage_check_uses_the_lower_limit_with_eighty_percent_derating() {
        let duty = |v: f64| ResistorDuty {
            designator: "R1".into(),
            ohms: 100e3,
            p_worst_w: 0.1,
            v_worst_v: v,
        };
        let r = rate(&duty(126.0));
        assert_eq!(r.rating_w, Some(0.25));
        close(r.power_limited_v.unwrap(), 158.113_883, 1e-8);
        assert_eq!(r.max_working_v, Some(200.0));
        assert!(r.voltage_ok);
        assert!(!rate(&duty(127.0)).voltage_ok);
    }

    // The part to buy steps up the standard ratings until the voltage holds
    // too (REFERENCE §6 figures, from memory): 100 kΩ at 127 V fails 80 % of
    // 1/4 W's 158.1 V; 1/2 W gives sqrt(0.5 · 100 kΩ) = 223.6 V against a
    // typical 350 V, and 80 % of 223.6 V is 178.9 V.
    #[test]
    fn the_rating_to_buy_steps_up_for_voltage() {
        let duty = |v: f64| ResistorDuty {
            designator: "R1".into(),
            ohms: 100e3,
            p_worst_w: 0.1,
            v_worst_v: v,
        };
        assert_eq!(rate_to_buy(&duty(126.0)).rating_w, Some(0.25));
        let r = rate_to_buy(&duty(127.0));
        assert_eq!(r.rating_w, Some(0.5));
        assert!(r.voltage_ok);
        close(r.power_limited_v.unwrap(), 223.606_798, 1e-8);
        assert_eq!(resistor_package(0.5), "1/2 W axial");
        // 5 W parts at 500 V (from memory): 80 % is 400 V, so 401 V fails.
        let r = rate_to_buy(&duty(401.0));
        assert!(!r.voltage_ok);
        assert_eq!(r.rating_w, Some(0.25));
    }

    // REFERENCE §4.2 [computed]: plain self bias RS 1 kΩ on the curves
    // (4 mA, −2 V) and (12 mA, −6 V) gives 1.000 mA and 3.000 mA. The worst
    // duty is at 3 mA: RS 9 mW at 3 V, RD 3.3 kΩ 29.7 mW at 9.9 V.
    #[test]
    fn duty_is_the_worst_over_device_corners() {
        let p = Problem::new(&spec(20.0, 0.0, (4e-3, 12e-3), (-2.0, -6.0)));
        let t = by_id("self-bias").unwrap();
        let values = [1e6, 1e3, 3.3e3];
        let duty = resistor_duty(&p, t, &values, &[0.0, 0.0, 0.0]);
        let names: Vec<&str> = duty.iter().map(|d| d.designator.as_str()).collect();
        assert_eq!(names, ["RG", "RS", "RD"]);
        assert_eq!(duty[0].p_worst_w, 0.0);
        close(duty[1].p_worst_w, 9e-3, 1e-9);
        close(duty[1].v_worst_v, 3.0, 1e-9);
        close(duty[2].p_worst_w, 29.7e-3, 1e-9);
        close(duty[2].v_worst_v, 9.9, 1e-9);
        assert_eq!(rate(&duty[2]).rating_w, Some(0.0625));
    }

    /// Self-bias current on the (12 mA, −6 V) curve for a given RS:
    /// ID = 12m·(1 − RS·ID/6)² (Shockley), by bisection, independently of
    /// the topology's closed form.
    fn self_bias_id(rs: f64) -> f64 {
        let f = |id: f64| id - 12e-3 * (1.0 - rs * id / 6.0).powi(2);
        let (mut lo, mut hi) = (0.0, 6.0 / rs);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if f(mid) > 0.0 {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        lo
    }

    // With ±5 % resistors RS is worst at one of its ends, 950 Ω (more
    // current) or 1050 Ω (more ohms), on the strongest device curve.
    #[test]
    fn duty_includes_resistor_tolerance_extremes() {
        let p = Problem::new(&spec(20.0, 0.0, (4e-3, 12e-3), (-2.0, -6.0)));
        let t = by_id("self-bias").unwrap();
        let duty = resistor_duty(&p, t, &[1e6, 1e3, 3.3e3], &[0.05, 0.05, 0.05]);
        let (a, b) = (self_bias_id(950.0), self_bias_id(1050.0));
        close(duty[1].p_worst_w, (a * a * 950.0).max(b * b * 1050.0), 1e-9);
        close(duty[1].v_worst_v, (a * 950.0).max(b * 1050.0), 1e-9);
        // RD at 3465 Ω with the largest current (RS 950 Ω).
        close(duty[2].p_worst_w, a * a * 3465.0, 1e-9);
    }

    fn supply_cautions(vdd: f64) -> Vec<String> {
        let p = Problem::new(&spec(vdd, 0.0, (8e-3, 8e-3), (-4.0, -4.0)));
        let t = by_id("self-bias").unwrap();
        let values = [1e6, 1e3, 3.3e3];
        let wc = worst_case(&p, t, &values, &[0.0; 3]);
        cautions(&p, &wc, &resistor_duty(&p, t, &values, &[0.0; 3]))
    }

    // IEC 60950-1 SELV / IEC 62368-1 ES1: 60 V DC; IEC 61140 ELV: 120 V
    // ripple-free DC. Both limits are inclusive (60 V and 120 V are inside).
    #[test]
    fn supply_cautions_follow_the_selv_and_elv_limits() {
        assert!(
            supply_cautions(60.0).is_empty(),
            "{:?}",
            supply_cautions(60.0)
        );
        let c = supply_cautions(60.5);
        assert_eq!(c.len(), 1, "{c:?}");
        assert!(
            c[0].contains("60 V DC") && c[0].contains("IEC 60950-1"),
            "{c:?}"
        );
        assert!(
            c[0].contains("IEC 62368-1") && c[0].ends_with(DEFER),
            "{c:?}"
        );
        let c = supply_cautions(120.0);
        assert_eq!(c.len(), 1, "{c:?}");
        assert!(c[0].contains("SELV"), "{c:?}");
        let c = supply_cautions(121.0);
        assert_eq!(c.len(), 1, "{c:?}");
        assert!(
            c[0].contains("IEC 61140") && c[0].starts_with("DANGER"),
            "{c:?}"
        );
        assert!(c[0].ends_with(DEFER));
    }

    // The span counts both rails and the top of the supply tolerance:
    // +35 V / −30 V is 65 V between conductors; 57 V + 10 % is 62.7 V.
    #[test]
    fn supply_span_counts_both_rails_and_tolerance() {
        let p = Problem::new(&spec(35.0, -30.0, (8e-3, 8e-3), (-4.0, -4.0)));
        close(supply_span_v(&p), 65.0, 1e-12);
        let mut s = spec(57.0, 0.0, (8e-3, 8e-3), (-4.0, -4.0));
        s.supply.tolerance = 0.1;
        close(supply_span_v(&Problem::new(&s)), 62.7, 1e-12);
    }

    #[test]
    fn fet_ratings_and_forward_biased_gate_are_cautioned() {
        let mut s = spec(30.0, 0.0, (8e-3, 8e-3), (-4.0, -4.0));
        s.device.pd_max_w = Some(0.02);
        s.device.vds_max_v = Some(25.0);
        s.device.vgs_max_v = Some(0.5);
        let p = Problem::new(&s);
        // Fixed bias with the gate at +0.2 V would forward-bias the junction;
        // use a hand-built envelope: PD 15 mW (> 50 % of 20 mW), VGS +0.2 V.
        let mut wc = WorstCase::empty();
        wc.pd_max_w = 0.015;
        wc.vgs_max_v = 0.2;
        let c = cautions(&p, &wc, &[]);
        assert_eq!(c.len(), 3, "{c:?}");
        assert!(
            c[0].starts_with("CAUTION: Q1") && c[0].contains("20 mW"),
            "{c:?}"
        );
        assert!(c[1].contains("25 V VDS rating"), "{c:?}");
        assert!(
            c[2].contains("forward-biased") && c[2].contains("200 mV"),
            "{c:?}"
        );
        wc.pd_max_w = 0.021;
        wc.vgs_max_v = 0.0;
        let c = cautions(&p, &wc, &[]);
        assert!(c[0].contains("beyond its 20 mW rating"), "{c:?}");
        assert_eq!(c.len(), 2, "{c:?}");
    }

    #[test]
    fn resistor_beyond_power_or_voltage_is_cautioned() {
        let s = spec(15.0, 0.0, (8e-3, 8e-3), (-4.0, -4.0));
        let p = Problem::new(&s);
        let duty = [
            ResistorDuty {
                designator: "RD".into(),
                ohms: 100.0,
                p_worst_w: 3.0,
                v_worst_v: 17.3,
            },
            ResistorDuty {
                designator: "R1".into(),
                ohms: 1e6,
                p_worst_w: 0.01,
                v_worst_v: 600.0,
            },
            // 100 V on 1 MΩ at 10 mW: past 80 % of 1/16 W's 50 V (from
            // memory), within 80 % of 1/8 W's 150 V: the part to buy is
            // 1/8 W and nothing is cautioned.
            ResistorDuty {
                designator: "R2".into(),
                ohms: 1e6,
                p_worst_w: 0.01,
                v_worst_v: 100.0,
            },
        ];
        let c = cautions(&p, &WorstCase::empty(), &duty);
        assert_eq!(c.len(), 2, "{c:?}");
        assert!(c[0].contains("RD dissipates up to 3 W"), "{c:?}");
        // The largest standard part, 5 W: E = sqrt(5·1M) = 2.24 kV, typical
        // limit 500 V (from memory) governs: 600 V is beyond it.
        assert!(c[1].contains("R1 sees up to 600 V DC, beyond"), "{c:?}");
        assert!(c[1].contains("about 500 V"), "{c:?}");
        assert_eq!(
            rate_to_buy(&duty[2]).rating_w,
            Some(0.125),
            "R2 takes a 1/8 W part"
        );
    }
}
