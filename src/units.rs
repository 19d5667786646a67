//! Engineering notation: parsing and printing of values such as `4k7`, `2.2M`,
//! `10meg`, `100n` and `1.5e3`.
//!
//! Values are plain `f64` in SI base units (ohms, volts, amps, farads, hertz,
//! watts). Names of variables and fields carry the unit as a suffix
//! (`rd_ohm`, `vds_v`, `id_a`) and doc comments state it.
//!
//! Suffixes (case-sensitive where it matters, as engineers write them):
//! `f` 1e-15, `p` 1e-12, `n` 1e-9, `u`/`µ` 1e-6, `m` 1e-3 (milli), `k`/`K` 1e3,
//! `M` 1e6 (mega), `meg`/`MEG`/`Meg` 1e6, `G` 1e9, `T` 1e12. The suffix may
//! stand in place of the decimal point (`4k7` = 4700, `2M2` = 2.2e6,
//! `4R7` = 4.7 with `R` as the unit-less marker). A trailing unit is
//! checked against the quantity ([`parse_quantity`]): `47k`, `47kΩ` and
//! `47kohm` are resistances, `47kV` is not; [`parse_value`], for text whose
//! quantity is unknown, accepts any of the units.
//!
//! An exponent and a scale letter together (`1e3k`) are refused: the reader
//! cannot tell whether the writer meant 1e3 or 1e6.
//!
//! This module must not know about circuits: it only turns text into numbers
//! and numbers into text.

use std::fmt;

/// A value that could not be read as engineering notation.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ParseValueError {
    /// The text exactly as given.
    pub text: String,
    /// Why it was refused.
    pub reason: String,
    /// True when the number reads but its unit belongs to another quantity
    /// (`47kV` for a resistance): `reason` is then the whole rule, e.g.
    /// "a resistance takes Ω or no unit".
    pub wrong_unit: bool,
}

impl fmt::Display for ParseValueError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.wrong_unit {
            return write!(f, "`{}`: {}", self.text, self.reason);
        }
        write!(
            f,
            "`{}` is not a value in engineering notation ({}); expected e.g. 4k7, 2.2M, 100n, 10meg or 1.5e3",
            self.text, self.reason
        )
    }
}

/// What a value measures, which decides the unit that may follow it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// Ohms: `Ω`, `ohm`, `ohms`; `R` may stand for the decimal point.
    Resistance,
    /// Volts: `V`.
    Voltage,
    /// Amps: `A`.
    Current,
    /// Watts: `W`.
    Power,
    /// Hertz: `Hz`.
    Frequency,
    /// Farads: `F`.
    Capacitance,
    /// Siemens: `S`.
    Conductance,
    /// A transconductance parameter, A/V²: `A/V²`, `A/V^2`, `A/V2`.
    TransconductanceParameter,
    /// Per volt (channel-length modulation): `/V`, `1/V`.
    PerVolt,
    /// A ratio of like quantities (a gain, V/V): `V/V` or no unit.
    Gain,
    /// A plain number (tolerances, divider ratios): no unit.
    Ratio,
    /// Decibels: `dB`.
    Decibels,
}

/// Every quantity.
const ALL: [Quantity; 12] = [
    Quantity::Resistance,
    Quantity::Voltage,
    Quantity::Current,
    Quantity::Power,
    Quantity::Frequency,
    Quantity::Capacitance,
    Quantity::Conductance,
    Quantity::TransconductanceParameter,
    Quantity::PerVolt,
    Quantity::Gain,
    Quantity::Ratio,
    Quantity::Decibels,
];

impl Quantity {
    /// The unit words that may follow a value of this quantity, longest
    /// first (so `ohms` is tried before `ohm`, `A/V^2` before `A`).
    pub fn units(self) -> &'static [&'static str] {
        match self {
            Quantity::Resistance => &["ohms", "Ohms", "ohm", "Ohm", "Ω"],
            Quantity::Voltage => &["V"],
            Quantity::Current => &["A"],
            Quantity::Power => &["W"],
            Quantity::Frequency => &["Hz"],
            Quantity::Capacitance => &["F"],
            Quantity::Conductance => &["S"],
            Quantity::TransconductanceParameter => &["A/V^2", "A/V²", "A/V2"],
            Quantity::PerVolt => &["1/V", "/V"],
            Quantity::Gain => &["V/V"],
            Quantity::Ratio => &[],
            Quantity::Decibels => &["dB"],
        }
    }

    /// The rule a value with a foreign unit breaks, for messages:
    /// "a resistance takes Ω or no unit".
    pub fn unit_rule(self) -> &'static str {
        match self {
            Quantity::Resistance => "a resistance takes Ω (or ohm) or no unit",
            Quantity::Voltage => "a voltage takes V or no unit",
            Quantity::Current => "a current takes A or no unit",
            Quantity::Power => "a power takes W or no unit",
            Quantity::Frequency => "a frequency takes Hz or no unit",
            Quantity::Capacitance => "a capacitance takes F or no unit",
            Quantity::Conductance => "a conductance takes S or no unit",
            Quantity::TransconductanceParameter => {
                "a transconductance parameter takes A/V^2 (A/V²) or no unit"
            }
            Quantity::PerVolt => "a channel-length modulation takes 1/V or no unit",
            Quantity::Gain => "a gain takes V/V or no unit",
            Quantity::Ratio => "a ratio takes no unit",
            Quantity::Decibels => "a gain in decibels takes dB or no unit",
        }
    }
}

impl std::error::Error for ParseValueError {}

/// Multiplier of an SI prefix letter, if `c` is one (`m` milli, `M` mega).
fn prefix_multiplier(c: char) -> Option<f64> {
    Some(match c {
        'f' => 1e-15,
        'p' => 1e-12,
        'n' => 1e-9,
        'u' | 'µ' | 'μ' => 1e-6,
        'm' => 1e-3,
        'k' | 'K' => 1e3,
        'M' => 1e6,
        'G' => 1e9,
        'T' => 1e12,
        'R' | 'r' => 1.0,
        _ => return None,
    })
}

/// Parse engineering notation into a number in SI base units, whatever
/// unit follows it (for text whose quantity is unknown; prefer
/// [`parse_quantity`]).
///
/// ```
/// use gatewright::units::parse_value;
/// assert_eq!(parse_value("4k7").unwrap(), 4700.0);
/// assert_eq!(parse_value("2M2").unwrap(), 2.2e6);
/// assert_eq!(parse_value("10meg").unwrap(), 1.0e7);
/// assert!((parse_value("15m").unwrap() - 0.015).abs() < 1e-15);
/// assert!(parse_value("4k7k").is_err());
/// assert!(parse_value("1e3k").is_err());
/// ```
pub fn parse_value(text: &str) -> Result<f64, ParseValueError> {
    parse_with(text, None)
}

/// Parse engineering notation for a value of quantity `q`: a unit, when
/// present, must be one of `q`'s ([`Quantity::units`]); a unit of another
/// quantity is refused with [`Quantity::unit_rule`] as the reason.
///
/// ```
/// use gatewright::units::{parse_quantity, Quantity};
/// assert_eq!(parse_quantity("47k", Quantity::Resistance).unwrap(), 47e3);
/// assert_eq!(parse_quantity("47kΩ", Quantity::Resistance).unwrap(), 47e3);
/// let e = parse_quantity("47kV", Quantity::Resistance).unwrap_err();
/// assert_eq!(e.reason, "a resistance takes Ω (or ohm) or no unit");
/// assert!((parse_quantity("5mA", Quantity::Current).unwrap() - 5e-3).abs() < 1e-18);
/// assert!(parse_quantity("5mV", Quantity::Current).is_err());
/// ```
pub fn parse_quantity(text: &str, q: Quantity) -> Result<f64, ParseValueError> {
    parse_with(text, Some(q))
}

fn parse_with(text: &str, q: Option<Quantity>) -> Result<f64, ParseValueError> {
    let err = |reason: &str| ParseValueError {
        text: text.to_string(),
        reason: reason.to_string(),
        wrong_unit: false,
    };
    let s = text.trim();
    if s.is_empty() {
        return Err(err("empty"));
    }
    let (sign, body) = match s.strip_prefix('-') {
        Some(rest) => (-1.0, rest),
        None => (1.0, s.strip_prefix('+').unwrap_or(s)),
    };
    // The units this value may carry; a unit is stripped only where a
    // number stands before it ("F" alone is no number, "1S" is 1 siemens).
    let own: Vec<&str> = match q {
        Some(q) => q.units().to_vec(),
        None => {
            let mut all: Vec<&str> = ALL.iter().flat_map(|q| q.units().iter().copied()).collect();
            all.sort_by_key(|w| std::cmp::Reverse(w.len()));
            all
        }
    };
    let stripped = own
        .iter()
        .find_map(|w| body.strip_suffix(w).filter(|rest| !rest.is_empty()));
    let number = stripped.unwrap_or(body);
    let r_marks = q.is_none_or(|q| q == Quantity::Resistance);
    match scaled(number, r_marks) {
        Ok(v) => finish(sign * v, &err),
        Err(reason) => {
            // A number followed by another quantity's unit: say which unit
            // this field takes rather than blame the letters.
            if let (Some(q), None) = (q, stripped) {
                let foreign = ALL
                    .iter()
                    .flat_map(|o| o.units().iter().copied())
                    .chain(["R", "r"])
                    .filter_map(|w| body.strip_suffix(w).filter(|rest| !rest.is_empty()))
                    .any(|rest| scaled(rest, false).is_ok());
                if foreign {
                    return Err(ParseValueError {
                        text: text.to_string(),
                        reason: q.unit_rule().to_string(),
                        wrong_unit: true,
                    });
                }
            }
            Err(err(&reason))
        }
    }
}

/// A magnitude with at most one scale letter (or `meg`), which may stand
/// for the decimal point; `r_marks`: `R` is a unit-less decimal marker
/// (resistances only).
fn scaled(body: &str, r_marks: bool) -> Result<f64, String> {
    let exponent_too = |head: &str| head.contains(['e', 'E']);
    const BOTH: &str = "an exponent and a scale letter together; write one of them (1e6 or 1M)";
    // `meg` in any case is mega (SPICE habit); check before the one-letter prefixes.
    let lower = body.to_ascii_lowercase();
    if let Some(num) = lower.strip_suffix("meg") {
        if exponent_too(num) {
            return Err(BOTH.to_string());
        }
        let v = parse_plain(num).ok_or("the part before `meg` is not a number")?;
        return Ok(v * 1e6);
    }
    if let Some(pos) = lower.find("meg") {
        // letter-as-decimal-point: 1meg5 = 1.5e6
        let (a, b) = (&lower[..pos], &lower[pos + 3..]);
        return join_digits(a, b)
            .map(|v| v * 1e6)
            .ok_or_else(|| "misplaced `meg`".to_string());
    }
    if let Some(v) = parse_plain(body) {
        return Ok(v);
    }
    // Find the single prefix letter.
    let letters: Vec<(usize, char)> = body
        .char_indices()
        .filter(|(_, c)| c.is_alphabetic() && !matches!(c, 'e' | 'E'))
        .collect();
    let [(pos, c)] = letters.as_slice() else {
        // Words such as `nan`, `inf` or `four` carry no digit at all: they
        // are not numbers, whatever letters they happen to contain.
        let has_digit = body.chars().any(|c| c.is_ascii_digit());
        return Err(if !has_digit {
            "no digits"
        } else if letters.is_empty() {
            "not a number"
        } else {
            "more than one scale letter"
        }
        .to_string());
    };
    let mult = match prefix_multiplier(*c) {
        Some(_) if matches!(c, 'R' | 'r') && !r_marks => None,
        m => m,
    }
    .ok_or_else(|| format!("unknown scale letter `{c}`"))?;
    let head = &body[..*pos];
    let tail = &body[pos + c.len_utf8()..];
    if exponent_too(head) {
        return Err(BOTH.to_string());
    }
    let v = if tail.is_empty() {
        parse_plain(head).ok_or("the part before the scale letter is not a number")?
    } else {
        join_digits(head, tail).ok_or("digits expected on both sides of the scale letter")?
    };
    Ok(v * mult)
}

fn finish(v: f64, err: &dyn Fn(&str) -> ParseValueError) -> Result<f64, ParseValueError> {
    if v.is_finite() {
        Ok(v)
    } else {
        Err(err("not finite"))
    }
}

/// A plain decimal or scientific number, no letters other than one exponent.
fn parse_plain(s: &str) -> Option<f64> {
    if s.is_empty()
        || !s
            .chars()
            .all(|c| c.is_ascii_digit() || matches!(c, '.' | 'e' | 'E' | '-' | '+'))
    {
        return None;
    }
    if s.starts_with(['e', 'E', '+', '-']) {
        return None;
    }
    s.parse::<f64>().ok()
}

/// `4` and `7` around a scale letter mean 4.7; both sides must be plain digits.
fn join_digits(head: &str, tail: &str) -> Option<f64> {
    let digits = |x: &str| !x.is_empty() && x.chars().all(|c| c.is_ascii_digit());
    if !digits(head) || !digits(tail) {
        return None;
    }
    format!("{head}.{tail}").parse::<f64>().ok()
}

/// Print a value the way engineers write it: three significant figures at
/// most, an SI prefix, no trailing zeros (`4.7k`, `2.2M`, `150`, `100n`).
///
/// Mega is `M` and milli is `m`, matching [`parse_value`], so the output can
/// be read back. Zero prints as `0`.
///
/// ```
/// use gatewright::units::format_value;
/// assert_eq!(format_value(4700.0), "4.7k");
/// assert_eq!(format_value(2.2e6), "2.2M");
/// assert_eq!(format_value(150.0), "150");
/// assert_eq!(format_value(1.0e-7), "100n");
/// ```
pub fn format_value(v: f64) -> String {
    format_sig(v, 3)
}

/// `15 mW`, `158 V`, `4.7 kΩ`: three significant figures, a space, the SI
/// prefix joined to the unit.
///
/// ```
/// use gatewright::units::with_unit;
/// assert_eq!(with_unit(0.015, "W"), "15 mW");
/// assert_eq!(with_unit(4700.0, "Ω"), "4.7 kΩ");
/// ```
pub fn with_unit(x: f64, unit: &str) -> String {
    let text = format_sig(x, 3);
    match text.char_indices().last() {
        Some((i, c)) if c.is_ascii_alphabetic() => format!("{} {c}{unit}", &text[..i]),
        _ => format!("{text} {unit}"),
    }
}

/// As [`format_value`] with `sig` significant figures (1 to 9).
pub fn format_sig(v: f64, sig: usize) -> String {
    if !v.is_finite() {
        return "n/a".to_string();
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let sig = sig.clamp(1, 9);
    const PREFIXES: [(f64, &str); 9] = [
        (1e12, "T"),
        (1e9, "G"),
        (1e6, "M"),
        (1e3, "k"),
        (1.0, ""),
        (1e-3, "m"),
        (1e-6, "u"),
        (1e-9, "n"),
        (1e-12, "p"),
    ];
    // Round to `sig` figures first so 999.99 becomes 1k rather than 1000.
    let rounded = round_sig(v, sig);
    let mag = rounded.abs();
    if !(1e-15 * (1.0 - 1e-12)..1e15).contains(&mag) {
        // Beyond the prefixes: scientific notation (`2.5e20`, `1e-310`),
        // which `parse_value` reads back, instead of hundreds of digits.
        let text = format!("{:.*e}", sig - 1, rounded);
        return match text.split_once('e') {
            Some((m, e)) if m.contains('.') => {
                format!("{}e{e}", m.trim_end_matches('0').trim_end_matches('.'))
            }
            _ => text,
        };
    }
    let (scale, prefix) = PREFIXES
        .iter()
        .copied()
        .find(|(s, _)| mag >= *s * (1.0 - 1e-12))
        .unwrap_or((1e-15, "f"));
    let scaled = rounded / scale;
    let int_digits = if scaled.abs() >= 1.0 {
        scaled.abs().log10().floor() as usize + 1
    } else {
        1
    };
    let decimals = sig.saturating_sub(int_digits);
    let mut text = format!("{scaled:.decimals$}");
    if text.contains('.') {
        while text.ends_with('0') {
            text.pop();
        }
        if text.ends_with('.') {
            text.pop();
        }
    }
    format!("{text}{prefix}")
}

/// A ratio (such as a gain) with `sig` significant figures and no SI
/// prefix: `0.883`, `-4.92`, `57`.
pub fn format_plain(v: f64, sig: usize) -> String {
    if v == 0.0 || !v.is_finite() {
        return if v.is_finite() {
            "0".to_string()
        } else {
            "n/a".to_string()
        };
    }
    let digits = (sig as i32 - 1 - v.abs().log10().floor() as i32).clamp(0, 15) as usize;
    let mut s = format!("{v:.digits$}");
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    s
}

/// Round to `sig` significant figures.
pub fn round_sig(v: f64, sig: usize) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    // Through decimal text: exact rounding, and no overflowing scale factor
    // for subnormal or huge values (10^(sig − 1 − exp) is infinite for
    // v = 1e-310, which turned the result into NaN).
    let sig = sig.clamp(1, 17);
    format!("{:.*e}", sig - 1, v).parse::<f64>().unwrap_or(v)
}

#[cfg(test)]
mod tests {
    use super::*;

    // Engineering notation as written on schematics: common practice.
    #[test]
    fn parses_engineering_notation() {
        let cases = [
            ("4k7", 4700.0),
            ("2.2M", 2.2e6),
            ("2M2", 2.2e6),
            ("470", 470.0),
            ("100n", 100e-9),
            ("15m", 15e-3),
            ("10meg", 10e6),
            ("10MEG", 10e6),
            ("1.5e3", 1500.0),
            ("-3.5", -3.5),
            ("4R7", 4.7),
            ("1k", 1000.0),
            ("22k", 22000.0),
            ("0.5", 0.5),
            ("3.3kohm", 3300.0),
            ("10uF", 10e-6),
            ("1meg5", 1.5e6),
        ];
        for (text, want) in cases {
            let got = parse_value(text).unwrap();
            assert!(
                ((got - want) / want).abs() < 1e-12,
                "{text}: got {got}, want {want}"
            );
        }
    }

    #[test]
    fn rejects_garbage_and_quotes_it() {
        for text in [
            "", "abc", "4k7k", "k", "1..2", "4x7", "1e999", "nan", "inf", "--1", "e5",
        ] {
            let e = parse_value(text).unwrap_err();
            assert!(e.to_string().contains(&format!("`{text}`")), "{e}");
        }
    }

    #[test]
    fn extreme_magnitudes_print_finite_and_read_back() {
        // Found by fuzzing: 1e-310 (subnormal) printed as "NaNf". Beyond the
        // prefixes (f to T) values print in scientific notation.
        for (v, want) in [
            (1e-310, "1e-310"),
            (2.5e20, "2.5e20"),
            (-1.25e300, "-1.25e300"),
            (5e-16, "5e-16"),
            (999e12, "999T"),
        ] {
            let shown = format_value(v);
            assert_eq!(shown, want, "{v}");
            let back = parse_value(&shown).unwrap();
            assert!(((back - v) / v).abs() < 1e-12, "{v} -> {shown} -> {back}");
        }
        assert_eq!(round_sig(1e-310, 3), 1e-310);
        assert_eq!(round_sig(1234.5, 3), 1230.0);
    }

    // Each field takes its own unit or none; another quantity's unit is a
    // slip (47 kV is no load resistance), refused with the rule.
    #[test]
    fn a_unit_must_belong_to_the_quantity() {
        use Quantity::*;
        let ok = [
            ("47k", Resistance, 47e3),
            ("47kΩ", Resistance, 47e3),
            ("3.3kohm", Resistance, 3.3e3),
            ("470R", Resistance, 470.0),
            ("4R7", Resistance, 4.7),
            ("10megohm", Resistance, 1e7),
            ("5mA", Current, 5e-3),
            ("-2.5V", Voltage, -2.5),
            ("250mW", Power, 0.25),
            ("20Hz", Frequency, 20.0),
            ("2mA/V^2", TransconductanceParameter, 2e-3),
            ("0.02/V", PerVolt, 0.02),
            ("5V/V", Gain, 5.0),
            ("14dB", Decibels, 14.0),
            ("100n", Capacitance, 1e-7),
            ("0.05", Ratio, 0.05),
        ];
        for (text, q, want) in ok {
            let got = parse_quantity(text, q).unwrap();
            assert!(((got - want) / want).abs() < 1e-12, "{text}: {got}");
        }
        let bad = [
            ("47kV", Resistance),
            ("5mV", Current),
            ("5mA", Voltage),
            ("1kHz", Resistance),
            ("470R", Voltage),
            ("3W", Current),
            ("10uF", Resistance),
            ("2kΩ", Ratio),
        ];
        for (text, q) in bad {
            let e = parse_quantity(text, q).unwrap_err();
            assert!(e.wrong_unit, "{text}: {e}");
            assert_eq!(e.reason, q.unit_rule(), "{text}");
        }
        // Not numbers at all stay "not a number" errors, not unit errors;
        // `R` as the decimal point is resistance notation only.
        assert!(!parse_quantity("abcV", Resistance).unwrap_err().wrong_unit);
        assert!(parse_quantity("4R7", Voltage).is_err());
    }

    // "1e3k" could mean 1e3 (the k a slip) or 1e6: refused either way.
    #[test]
    fn an_exponent_with_a_scale_letter_is_refused() {
        for text in ["1e3k", "1E3k", "2.2e-3m", "1e3meg", "1e3kΩ"] {
            let e = parse_value(text).unwrap_err();
            assert!(
                e.reason.contains("exponent and a scale letter"),
                "{text}: {e}"
            );
        }
        assert_eq!(parse_value("1e3").unwrap(), 1e3);
    }

    #[test]
    fn words_without_digits_are_not_numbers() {
        // `nan`, `inf` and `four` contain SI letters (n, f, ...) but no digit:
        // the reason must say so, not blame the scale letters.
        for text in ["nan", "inf", "four", "abc", "Infinity"] {
            assert_eq!(parse_value(text).unwrap_err().reason, "no digits", "{text}");
        }
        assert_eq!(
            parse_value("10kk").unwrap_err().reason,
            "more than one scale letter"
        );
    }

    #[test]
    fn prints_like_an_engineer() {
        let cases = [
            (4700.0, "4.7k"),
            (2.2e6, "2.2M"),
            (150.0, "150"),
            (1e-7, "100n"),
            (0.015, "15m"),
            (999.99, "1k"),
            (1e7, "10M"),
            (-2.5, "-2.5"),
            (0.0, "0"),
            (3.3e-6, "3.3u"),
        ];
        for (v, want) in cases {
            assert_eq!(format_value(v), want, "{v}");
        }
    }

    #[test]
    fn ratios_print_without_prefixes() {
        assert_eq!(format_plain(0.8829, 3), "0.883");
        assert_eq!(format_plain(-4.9186, 3), "-4.92");
        assert_eq!(format_plain(57.0, 4), "57");
        assert_eq!(format_plain(0.0, 3), "0");
    }

    #[test]
    fn printed_values_read_back() {
        for v in [4.7e3, 2.2e6, 150.0, 1e-7, 0.015, 12.0, 8.2e-12] {
            let back = parse_value(&format_value(v)).unwrap();
            assert!(((back - v) / v).abs() < 1e-12);
        }
    }
}
