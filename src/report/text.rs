//! The bench report (`report.txt`, and the terminal with `--pick N`): pure
//! formatting of a [`BenchView`]. Nothing here computes physics.

use super::bom::{rating_text, tolerance_text, value_text as bom_value, Symbols};
use super::table::{corner_table, table};
use crate::bench::bom::{BomLine, PartClass};
use crate::bench::caps::CapPlan;
use crate::bench::view::{BenchView, Connection, PartKind};
use crate::units::{format_sig, format_value, with_unit};

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

fn hz(f: Option<f64>, floor: f64) -> String {
    f.map_or_else(
        || format!("below {}", with_unit(floor, "Hz")),
        |f| with_unit(f, "Hz"),
    )
}

fn caps_section(out: &mut String, plan: &CapPlan, given: bool) {
    if !given {
        wrap(
            out,
            &format!(
                "The specification gives no [band] f_low: the capacitors are sized for the \
                 default corner, {} (the low edge of the audio band). Set [band] f_low to size \
                 them for your band.",
                with_unit(plan.f_low_hz, "Hz")
            ),
            "",
        );
    }
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
            c.role_words().to_string(),
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

/// The "Parts to buy" table, then the notes of the lines that have any.
fn parts_table(lines: &[BomLine]) -> String {
    let mut t = table(vec![
        "#",
        "qty",
        "parts (role)",
        "value",
        "tol.",
        "rating",
        "worst duty",
        "package",
    ]);
    let mut notes = String::new();
    for (i, l) in lines.iter().enumerate() {
        let item = i + 1;
        let parts: Vec<String> = l
            .designators
            .iter()
            .zip(&l.roles)
            .map(|(d, r)| format!("{d} = {r}"))
            .collect();
        let value = match l.class {
            PartClass::Resistor => bom_value(l, Symbols::Unicode),
            PartClass::FilmCapacitor => format!("{} film", bom_value(l, Symbols::Unicode)),
            PartClass::ElectrolyticCapacitor => {
                format!("{} electrolytic", bom_value(l, Symbols::Unicode))
            }
            PartClass::Fet => l.description.clone(),
        };
        let series = super::printable(&l.series);
        let rating = match l.class {
            PartClass::Resistor => l.power_rating_w.map_or_else(String::new, rating_text),
            PartClass::FilmCapacitor | PartClass::ElectrolyticCapacitor => l
                .voltage_rating_v
                .map_or_else(String::new, |v| with_unit(v, "V")),
            PartClass::Fet => {
                let mut r = Vec::new();
                if let Some(v) = l.voltage_rating_v {
                    r.push(format!("VDS ≥ {}", with_unit(v, "V")));
                }
                if let Some(w) = l.power_rating_w {
                    r.push(format!("PD ≥ {}", with_unit(w, "W")));
                }
                r.join(", ")
            }
        };
        let duty = match (l.power_worst_w, l.voltage_worst_v) {
            (Some(w), Some(v)) => format!("{} at {}", with_unit(w, "W"), with_unit(v, "V")),
            (None, Some(v)) => format!("{} DC", with_unit(v, "V")),
            (Some(w), None) => with_unit(w, "W"),
            (None, None) => String::new(),
        };
        t.add_row(vec![
            item.to_string(),
            l.quantity().to_string(),
            parts.join("\n"),
            format!("{value} ({series})"),
            tolerance_text(l, Symbols::Unicode),
            rating,
            duty,
            l.package.clone(),
        ]);
        if !l.notes.is_empty() {
            wrap(&mut notes, &format!("{item}: {}", l.notes.join("; ")), "");
        }
    }
    format!("{t}\n{notes}")
}

/// The bench report as text.
pub fn bench(v: &BenchView) -> String {
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
    out.push_str(&parts_table(&v.bom.lines));
    wrap(
        &mut out,
        "Resistor ratings: the smallest standard part whose power rating is at least twice the \
         worst dissipation over every device corner, resistor tolerance and supply extreme (50 % \
         derating), and whose working voltage is at least 1.25 times the worst voltage (80 % \
         derating; common practice). Capacitor voltage: at least 1.5 times the supply span \
         (common practice). FET: at least the supply span across it and twice its worst \
         dissipation.",
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
    caps_section(&mut out, &v.caps, v.f_low_given);

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
fn spread_section(out: &mut String, checks: &[crate::bench::summary::Check]) {
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
