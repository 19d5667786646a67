//! The bill of materials as CSV, from the bench stage's [`Bom`]: one row
//! per line of equal parts, with the header [`HEADER`].
//!
//! The text is ASCII (`ohm` for Ω, `u` for µ, no ±), so a spreadsheet that
//! assumes a legacy code page opens it as it is; when a field holds text
//! the user wrote that is not ASCII (a stock list's or a device class's
//! name), the file starts with a UTF-8 byte-order mark instead, which tells
//! such a spreadsheet the encoding. Quoting follows RFC 4180: a field
//! holding a comma, a double quote, CR or LF is put in double quotes with
//! inner quotes doubled. Lines end in LF (RFC 4180 asks for CRLF; every
//! reader also takes LF, and the other outputs use LF). The writer is a few
//! lines with no error path, so it is written here rather than pulled in;
//! the tests read the output back with the `csv` crate.

use crate::bench::bom::{Bom, BomLine, PartClass};
use crate::units::{round_sig, with_unit};

/// The header line, without its line ending.
pub const HEADER: &str = "item,qty,designators,roles,part,value,tolerance,power_rating,\
                          worst_power,worst_voltage,voltage_rating,package,series,notes";

/// The UTF-8 byte-order mark.
pub const UTF8_BOM: char = '\u{feff}';

/// One CSV field, quoted when RFC 4180 requires it.
fn field(text: &str) -> String {
    if text.contains([',', '"', '\r', '\n']) {
        format!("\"{}\"", text.replace('"', "\"\""))
    } else {
        text.to_string()
    }
}

/// How the text names units: ASCII for the CSV, symbols for the terminal.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Symbols {
    /// `ohm`, `u`, `+/-`.
    Ascii,
    /// `Ω`, `µ`, `±`.
    Unicode,
}

fn sym(text: String, s: Symbols) -> String {
    match s {
        Symbols::Ascii => text,
        Symbols::Unicode => {
            let t = text.replace(" ohm", " Ω").replace("ohm", "Ω");
            match t.find(" u") {
                Some(i) => format!("{} µ{}", &t[..i], &t[i + 2..]),
                None => t,
            }
        }
    }
}

/// A power rating in the words a buyer uses: `1/16 W`, `1/4 W`, `2 W`.
pub fn rating_text(rating_w: f64) -> String {
    const FRACTIONS: [(f64, &str); 5] = [
        (0.0625, "1/16 W"),
        (0.1, "1/10 W"),
        (0.125, "1/8 W"),
        (0.25, "1/4 W"),
        (0.5, "1/2 W"),
    ];
    FRACTIONS
        .iter()
        .find(|(r, _)| (r - rating_w).abs() <= 1e-9 * r)
        .map_or_else(|| with_unit(rating_w, "W"), |(_, t)| t.to_string())
}

/// The line's value: `75 kohm`, `3.3 uF`, or the FET's description.
pub fn value_text(l: &BomLine, s: Symbols) -> String {
    match (l.class, l.value) {
        (PartClass::Resistor, Some(v)) => sym(with_unit(v, "ohm"), s),
        (PartClass::FilmCapacitor | PartClass::ElectrolyticCapacitor, Some(v)) => {
            sym(with_unit(v, "F"), s)
        }
        _ => l.description.clone(),
    }
}

/// A relative tolerance as `1%` (`0.5%`), empty when there is none.
pub fn tolerance_text(l: &BomLine, s: Symbols) -> String {
    match l.tolerance {
        Some(t) if t > 0.0 && t.is_finite() => {
            let pm = if s == Symbols::Unicode { "±" } else { "" };
            format!("{pm}{}%", round_sig(t * 100.0, 3))
        }
        _ => String::new(),
    }
}

/// The line's cells in [`HEADER`] order; `item` is 1-based.
pub fn cells(item: usize, l: &BomLine, s: Symbols) -> Vec<String> {
    let min = if l.ratings_are_minimums { ">= " } else { "" };
    let opt = |x: Option<f64>, f: &dyn Fn(f64) -> String| x.map_or_else(String::new, f);
    vec![
        item.to_string(),
        l.quantity().to_string(),
        l.designators.join(", "),
        l.roles.join(", "),
        l.class.words().to_string(),
        value_text(l, s),
        tolerance_text(l, s),
        opt(l.power_rating_w, &|w| {
            if l.ratings_are_minimums {
                format!("{min}{}", with_unit(w, "W"))
            } else {
                rating_text(w)
            }
        }),
        opt(l.power_worst_w, &|w| with_unit(w, "W")),
        opt(l.voltage_worst_v, &|v| with_unit(v, "V")),
        opt(l.voltage_rating_v, &|v| {
            format!("{min}{}", with_unit(v, "V"))
        }),
        l.package.clone(),
        crate::report::printable(&l.series).into_owned(),
        l.notes.join("; "),
    ]
}

/// The CSV text: the header, then one line per BOM line, each ending in LF;
/// ASCII, or UTF-8 with a byte-order mark when some field is not ASCII.
pub fn bom_csv(b: &Bom) -> String {
    let mut out = String::from(HEADER);
    out.push('\n');
    for (i, l) in b.lines.iter().enumerate() {
        let row: Vec<String> = cells(i + 1, l, Symbols::Ascii)
            .iter()
            .map(|c| field(c))
            .collect();
        out.push_str(&row.join(","));
        out.push('\n');
    }
    if out.is_ascii() {
        out
    } else {
        format!("{UTF8_BOM}{out}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn line(notes: &[&str]) -> BomLine {
        BomLine {
            designators: vec!["R1".into(), "R3".into()],
            roles: vec!["RG (gate return)".into(), "RD (drain load)".into()],
            class: PartClass::Resistor,
            description: String::new(),
            value: Some(4700.0),
            tolerance: Some(0.05),
            series: "E24".into(),
            power_rating_w: Some(0.0625),
            power_worst_w: Some(1.5e-3),
            voltage_worst_v: Some(2.65),
            voltage_rating_v: None,
            ratings_are_minimums: false,
            package: "0402 SMD or larger".into(),
            notes: notes.iter().map(|s| s.to_string()).collect(),
        }
    }

    fn bom(lines: Vec<BomLine>) -> Bom {
        Bom {
            lines,
            f_low_hz: 20.0,
            f_low_given: true,
        }
    }

    // RFC 4180 §2: fields with commas, quotes or line breaks are enclosed in
    // double quotes, and an inner double quote is written twice.
    #[test]
    fn quotes_only_the_fields_that_need_it() {
        let text = bom_csv(&bom(vec![
            line(&[]),
            line(&["say \"hot\""]),
            line(&["two\nlines"]),
        ]));
        insta::assert_snapshot!(text, @r###"
        item,qty,designators,roles,part,value,tolerance,power_rating,worst_power,worst_voltage,voltage_rating,package,series,notes
        1,2,"R1, R3","RG (gate return), RD (drain load)",resistor,4.7 kohm,5%,1/16 W,1.5 mW,2.65 V,,0402 SMD or larger,E24,
        2,2,"R1, R3","RG (gate return), RD (drain load)",resistor,4.7 kohm,5%,1/16 W,1.5 mW,2.65 V,,0402 SMD or larger,E24,"say ""hot"""
        3,2,"R1, R3","RG (gate return), RD (drain load)",resistor,4.7 kohm,5%,1/16 W,1.5 mW,2.65 V,,0402 SMD or larger,E24,"two
        lines"
        "###);
        assert!(text.is_ascii());
    }

    // A non-ASCII name the user wrote: the file says it is UTF-8 with a
    // byte-order mark (Unicode standard, §23.8: U+FEFF at the start of a
    // UTF-8 stream is a signature).
    #[test]
    fn non_ascii_text_gets_a_byte_order_mark() {
        let mut l = line(&[]);
        l.series = "Lager-Ω".into();
        let text = bom_csv(&bom(vec![l]));
        assert!(text.starts_with('\u{feff}'));
        assert_eq!(&text.as_bytes()[..3], &[0xEF, 0xBB, 0xBF]);
    }

    #[test]
    fn symbols_for_the_terminal() {
        let l = line(&[]);
        assert_eq!(value_text(&l, Symbols::Unicode), "4.7 kΩ");
        assert_eq!(tolerance_text(&l, Symbols::Unicode), "±5%");
        let mut c = line(&[]);
        c.class = PartClass::ElectrolyticCapacitor;
        c.value = Some(3.3e-6);
        assert_eq!(value_text(&c, Symbols::Ascii), "3.3 uF");
        assert_eq!(value_text(&c, Symbols::Unicode), "3.3 µF");
        assert_eq!(rating_text(0.25), "1/4 W");
        assert_eq!(rating_text(2.0), "2 W");
    }
}
