//! Bill of materials as CSV: one row per fitted part, columns exactly
//! `designator,value,series,tolerance,rating,quantity,notes`.
//!
//! [`bom_rows`] turns a design and its ratings (computed in
//! [`crate::bench::ratings`]) into rows of text; [`bom_csv`] writes them. Quoting
//! follows RFC 4180: a field holding a comma, a double quote, CR or LF is
//! put in double quotes with inner quotes doubled. Lines end in LF (RFC 4180
//! asks for CRLF; every reader also takes LF, and the other outputs use LF).
//! The writer is a few lines with no error path, so it is written here rather
//! than pulled in; the tests read the output back with the `csv` crate.

use crate::analysis::Problem;
use crate::bench::ratings::{
    capacitor_rating_v, rate, rating_text, supply_span_v, with_unit, ResistorDuty,
};
use crate::netlist::FetKind;
use crate::search::Design;
use crate::units::format_value;

/// The header line, without its line ending.
pub const HEADER: &str = "designator,value,series,tolerance,rating,quantity,notes";

/// One line of the bill of materials, as text.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BomRow {
    /// Designator, e.g. `RD`, `C_IN`, `Q1`.
    pub designator: String,
    /// Value with its unit, e.g. `4.7kΩ`, `100nF`.
    pub value: String,
    /// Where the value comes from: an E-series name, a stock list, or a
    /// device class.
    pub series: String,
    /// Tolerance, e.g. `±5%` (empty when not applicable).
    pub tolerance: String,
    /// Rating to buy, e.g. `1/4 W`, `25 V`.
    pub rating: String,
    /// How many, a count.
    pub quantity: u32,
    /// Free text: worst-case duty, cautions.
    pub notes: String,
}

/// One CSV field, quoted when RFC 4180 requires it.
fn field(text: &str) -> String {
    if text.contains([',', '"', '\r', '\n']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_string()
    }
}

/// The CSV text: the header, then one line per row, each ending in LF.
pub fn bom_csv(rows: &[BomRow]) -> String {
    let mut out = String::from(HEADER);
    out.push('\n');
    for r in rows {
        let cells = [
            field(&r.designator),
            field(&r.value),
            field(&r.series),
            field(&r.tolerance),
            field(&r.rating),
            r.quantity.to_string(),
            field(&r.notes),
        ];
        out.push_str(&cells.join(","));
        out.push('\n');
    }
    out
}

/// A relative tolerance as `±5%` (`±0.5%`), empty for 0.
pub fn tolerance_text(tol: f64) -> String {
    if tol > 0.0 && tol.is_finite() {
        format!("±{}%", crate::units::round_sig(tol * 100.0, 3))
    } else {
        String::new()
    }
}

/// Rows for a design: its resistors (0 Ω positions are wires and get no
/// row), the capacitors given as (designator, farads), and the FET. `series`
/// names the resistor catalog (the shelf's name); `duty` comes from
/// [`crate::bench::ratings::resistor_duty`]. Capacitor voltage ratings come from
/// [`capacitor_rating_v`] over the supply span.
pub fn bom_rows(
    p: &Problem,
    d: &Design,
    series: &str,
    duty: &[ResistorDuty],
    caps: &[(String, f64)],
) -> Vec<BomRow> {
    let mut rows = Vec::new();
    let span = supply_span_v(p);
    for (i, (name, &ohms)) in d.topology.parts().iter().zip(&d.values).enumerate() {
        if ohms <= 0.0 {
            continue;
        }
        let (rating, notes) = match duty.iter().find(|x| x.designator == *name) {
            Some(x) => {
                let r = rate(x);
                let rating = r
                    .rating_w
                    .map_or_else(|| "over 5 W".to_string(), rating_text);
                let mut notes = if x.p_worst_w > 0.0 {
                    format!(
                        "worst {} at {} DC",
                        with_unit(x.p_worst_w, "W"),
                        with_unit(x.v_worst_v, "V")
                    )
                } else {
                    "no DC current".to_string()
                };
                if !r.voltage_ok {
                    notes.push_str("; check working voltage");
                }
                (rating, notes)
            }
            None => (String::new(), String::new()),
        };
        rows.push(BomRow {
            designator: (*name).to_string(),
            value: format!("{}Ω", format_value(ohms)),
            series: series.to_string(),
            tolerance: tolerance_text(d.tolerances.get(i).copied().unwrap_or(0.0)),
            rating,
            quantity: 1,
            notes,
        });
    }
    for (name, farads) in caps {
        rows.push(BomRow {
            designator: name.clone(),
            value: format!("{}F", format_value(*farads)),
            series: String::new(),
            tolerance: String::new(),
            rating: capacitor_rating_v(span)
                .map_or_else(|| "see notes".to_string(), |v| with_unit(v, "V")),
            quantity: 1,
            notes: if *farads >= 1e-6 {
                "if electrolytic, mind its polarity".to_string()
            } else {
                String::new()
            },
        });
    }
    let dev = &p.spec.device;
    let kind = match p.kind {
        FetKind::NJfet => "n-channel JFET",
        FetKind::NMos => "n-channel MOSFET",
    };
    let mut notes = format!("worst PD {}", with_unit(d.worst.pd_max_w, "W"));
    if let Some(pd) = dev.pd_max_w {
        notes.push_str(&format!(" of {} rated", with_unit(pd, "W")));
    }
    rows.push(BomRow {
        designator: "Q1".to_string(),
        value: format!("{kind} ({})", dev.family.id()),
        series: dev.source.clone(),
        tolerance: String::new(),
        rating: format!("VDS >= {}", with_unit(span, "V")),
        quantity: 1,
        notes,
    });
    rows
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(designator: &str, notes: &str) -> BomRow {
        BomRow {
            designator: designator.into(),
            value: "4.7kΩ".into(),
            series: "E24".into(),
            tolerance: "±5%".into(),
            rating: "1/4 W".into(),
            quantity: 1,
            notes: notes.into(),
        }
    }

    // RFC 4180 §2: fields with commas, quotes or line breaks are enclosed in
    // double quotes, and an inner double quote is written twice.
    #[test]
    fn quotes_only_the_fields_that_need_it() {
        let text = bom_csv(&[
            row("RD", "plain"),
            row("RS", "a, b"),
            row("R1", "say \"hot\""),
            row("R2", "two\nlines"),
        ]);
        insta::assert_snapshot!(text, @r###"
        designator,value,series,tolerance,rating,quantity,notes
        RD,4.7kΩ,E24,±5%,1/4 W,1,plain
        RS,4.7kΩ,E24,±5%,1/4 W,1,"a, b"
        R1,4.7kΩ,E24,±5%,1/4 W,1,"say ""hot"""
        R2,4.7kΩ,E24,±5%,1/4 W,1,"two
        lines"
        "###);
    }

    #[test]
    fn tolerance_text_is_percent() {
        assert_eq!(tolerance_text(0.05), "±5%");
        assert_eq!(tolerance_text(0.005), "±0.5%");
        assert_eq!(tolerance_text(0.0), "");
    }
}
