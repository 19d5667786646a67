//! The bench report (`report.txt`, and the terminal with `--pick N`): pure
//! formatting of a [`BenchView`] and the BOM rows built from it. Nothing
//! here computes physics.

use super::bom::BomRow;
use super::table::{corner_table, table};
use crate::bench::caps::CapPlan;
use crate::bench::ratings::with_unit;
use crate::bench::view::{BenchView, Connection, PartKind};
use crate::topology::CapRole;
use crate::units::{format_sig, format_value};

/// Width the report's prose is wrapped to, characters.
const PROSE: usize = 100;

fn q(v: f64, unit: &str) -> String {
    format!("{}{unit}", format_sig(v, 4))
}

/// A percentage without SI prefixes: `60%`, `7.4%`, `0.0604%`.
fn pct(fraction: f64) -> String {
    let x = fraction * 100.0;
    let a = x.abs();
    if !x.is_finite() {
        "n/a".to_string()
    } else if a >= 10.0 {
        format!("{x:.0}%")
    } else if a >= 1.0 {
        format!("{x:.1}%")
    } else {
        format!("{}%", crate::units::round_sig(x, 3))
    }
}

fn heading(out: &mut String, title: &str) {
    out.push('\n');
    out.push_str(title);
    out.push('\n');
    out.push_str(&"-".repeat(title.chars().count()));
    out.push('\n');
}

/// Greedy word wrap to [`PROSE`] columns, each line prefixed by `indent`.
fn wrap(out: &mut String, text: &str, indent: &str) {
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > PROSE {
            out.push_str(indent);
            out.push_str(&line);
            out.push('\n');
            line.clear();
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        out.push_str(indent);
        out.push_str(&line);
        out.push('\n');
    }
}

fn value_text(c: &Connection) -> String {
    match &c.kind {
        PartKind::Resistor { ohms } => format!("{}Ω", format_value(*ohms)),
        PartKind::Capacitor { farads, sized } => {
            if *sized {
                format!("{}F", format_value(*farads))
            } else {
                "not sized (mid-band short)".to_string()
            }
        }
        PartKind::Source { dc_v, ac_v } => {
            if *ac_v != 0.0 {
                format!("signal, {} AC", with_unit(*ac_v, "V"))
            } else {
                format!("{} DC", with_unit(*dc_v, "V"))
            }
        }
        PartKind::Fet => "FET".to_string(),
    }
}

fn role_text(r: CapRole) -> &'static str {
    match r {
        CapRole::InputCoupling => "input coupling",
        CapRole::OutputCoupling => "output coupling",
        CapRole::SourceBypass => "source bypass",
        CapRole::GateBypass => "gate bypass",
    }
}

fn hz(f: Option<f64>, floor: f64) -> String {
    f.map_or_else(
        || format!("below {}", with_unit(floor, "Hz")),
        |f| with_unit(f, "Hz"),
    )
}

fn caps_section(out: &mut String, plan: &CapPlan) {
    wrap(out, &format!("Rule: {}", plan.rule), "");
    let mut t = table(vec![
        "part",
        "role",
        "value",
        "kind",
        "R seen (worst)",
        "pole placed at",
        "rule asked for",
    ]);
    for c in &plan.caps {
        t.add_row(vec![
            c.designator.clone(),
            role_text(c.role).to_string(),
            format!("{}F", format_value(c.farads)),
            format!(
                "{} {} ±{}%",
                c.dielectric,
                c.series,
                format_sig(c.tolerance * 100.0, 2)
            ),
            q(c.r_ohm, "Ω"),
            with_unit(c.pole_hz, "Hz"),
            format!("{}F", format_sig(c.exact_f, 3)),
        ]);
    }
    out.push_str(&t.to_string());
    out.push('\n');
    out.push_str(&format!(
        "−3 dB corner found by the nodal solver (AC sweep) at each device corner; target {}:\n",
        with_unit(plan.f_low_hz, "Hz")
    ));
    let floor = plan.f_low_hz / 1e3;
    let mut t = table(vec![
        "device corner",
        "nominal capacitors",
        "capacitors at −tolerance",
        "meets f_low",
    ]);
    for c in &plan.corners {
        t.add_row(vec![
            c.label.clone(),
            hz(c.nominal_caps_hz, floor),
            hz(c.low_caps_hz, floor),
            if c.pass { "yes" } else { "NO" }.to_string(),
        ]);
    }
    out.push_str(&t.to_string());
    out.push('\n');
}

/// The bench report as text.
pub fn bench(v: &BenchView, bom: &[BomRow]) -> String {
    let d = &v.design;
    let mut out = String::new();
    let nominal = v.nominal_only;
    if nominal {
        out.push_str(&super::table::nominal_banner());
    }
    let title = format!(
        "{} — design #{}: {} ({} values{})",
        super::printable(&v.name),
        d.rank,
        d.topology,
        super::printable(&v.series),
        if nominal {
            format!(", {}", crate::bench::summary::NOMINAL_ONLY)
        } else {
            String::new()
        }
    );
    out.push_str(&title);
    out.push('\n');
    out.push_str(&"=".repeat(title.chars().count()));
    out.push('\n');
    out.push_str(&format!("{}\n", v.summary));

    heading(&mut out, "Circuit (connection list; node 0 is ground)");
    let mut t = table(vec!["part", "value", "connects"]);
    for c in &v.connections {
        let pins: Vec<String> = c.pins.iter().map(|(p, n)| format!("{p}={n}")).collect();
        t.add_row(vec![c.part.clone(), value_text(c), pins.join("  ")]);
    }
    out.push_str(&t.to_string());
    out.push('\n');

    heading(&mut out, "Parts to buy");
    let mut t = table(vec![
        "part",
        "value",
        "series",
        "tolerance",
        "rating to buy",
        "qty",
        "worst duty / notes",
    ]);
    for r in bom {
        t.add_row(vec![
            r.designator.clone(),
            r.value.clone(),
            r.series.clone(),
            r.tolerance.clone(),
            r.rating.clone(),
            r.quantity.to_string(),
            r.notes.clone(),
        ]);
    }
    out.push_str(&t.to_string());
    out.push('\n');
    wrap(
        &mut out,
        "Resistor ratings: the smallest standard wattage at least twice the worst dissipation \
         over every device corner, resistor tolerance and supply extreme (50 % derating, common \
         practice). Capacitor voltage: at least 1.5 times the supply span (common practice).",
        "",
    );

    heading(&mut out, "FET duty");
    let f = &v.fet;
    out.push_str(&format!(
        "dissipation: worst {}{}\n",
        with_unit(f.pd_worst_w, "W"),
        f.pd_max_w
            .map_or(" (no rating given)".to_string(), |m| format!(
                " of {} rated ({} of the rating)",
                with_unit(m, "W"),
                pct(f.pd_worst_w / m)
            ))
    ));
    out.push_str(&format!(
        "VDS: up to {} in operation{}\n",
        with_unit(f.vds_worst_v, "V"),
        f.vds_max_v
            .map_or(" (no rating given)".to_string(), |m| format!(
                ", rated {}",
                with_unit(m, "V")
            ))
    ));

    heading(
        &mut out,
        "Operating point at each device corner (nominal resistors)",
    );
    let t = corner_table(&v.nominal, &v.corners);
    out.push_str(&t.to_string());
    out.push('\n');

    heading(
        &mut out,
        if nominal {
            "Small-signal results (nominal only, not worst case)"
        } else {
            "Small-signal results (worst case over corners and tolerances)"
        },
    );
    out.push_str(&format!(
        "gain from the source EMF, loaded: {} / {} / {} V/V (min / nominal / max)\n",
        crate::units::format_plain(d.gain.min, 4),
        crate::units::format_plain(d.gain.nominal, 4),
        crate::units::format_plain(d.gain.max, 4)
    ));
    out.push_str(&format!(
        "input impedance at least {}; output impedance at most {}\n",
        q(d.zin_ohm, "Ω"),
        q(d.zout_ohm, "Ω")
    ));
    out.push_str(&format!(
        "drain current {} to {}; VDS {} to {}; supply power at most {}\n",
        q(d.id_a.min, "A"),
        q(d.id_a.max, "A"),
        q(d.vds_v.min, "V"),
        q(d.vds_v.max, "V"),
        q(d.power_w, "W")
    ));

    heading(
        &mut out,
        if nominal {
            "Requirements and margins (nominal only, not worst case)"
        } else {
            "Requirements and margins"
        },
    );
    let mut t = table(vec![
        "requirement",
        "required",
        "achieved",
        "margin",
        "holds",
    ]);
    for c in &v.checks {
        t.add_row(vec![
            c.name.to_string(),
            c.required.clone(),
            c.achieved.clone(),
            pct(c.margin),
            if c.pass { "yes" } else { "NO" }.to_string(),
        ]);
    }
    out.push_str(&t.to_string());
    out.push('\n');
    out.push_str(&super::table::margin_note(&v.checks));
    if nominal {
        spread_section(&mut out, &v.spread_checks);
    }

    heading(&mut out, "Capacitors");
    match &v.caps {
        Some(plan) => caps_section(&mut out, plan),
        None => wrap(
            &mut out,
            "Not sized: the specification gives no [band] f_low. The netlist and the response \
             use 1 F placeholders (a short at every signal frequency); set [band] f_low to size \
             them.",
            "",
        ),
    }

    heading(&mut out, "Cautions");
    if v.cautions.is_empty() {
        wrap(
            &mut out,
            "None raised by the checks above. The tool knows the circuit, not the installation: \
             follow local electrical codes and licensed practice.",
            "",
        );
    }
    for c in &v.cautions {
        wrap(&mut out, c, "");
    }
    out
}

/// Nominal mode: what the design does over the device's whole spread
/// (nominal resistor values, every supply extreme).
fn spread_section(out: &mut String, checks: &[crate::analysis::Check]) {
    heading(
        out,
        "Over the device's datasheet spread (nominal resistor values)",
    );
    let failing: Vec<String> = checks
        .iter()
        .filter(|c| !c.pass)
        .map(|c| format!("{} (needs {}, reaches {})", c.name, c.required, c.achieved))
        .collect();
    if failing.is_empty() {
        wrap(
            out,
            "Every requirement holds at every device corner with nominal resistors; resistor \
             tolerances were not checked.",
            "",
        );
    } else {
        wrap(
            out,
            &format!(
                "This design does NOT meet the specification across the spread: {}.",
                failing.join("; ")
            ),
            "",
        );
    }
}
