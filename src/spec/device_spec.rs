//! The `[device]` section: a family with its parameters, or a class from
//! the device catalog with optional overrides.
//!
//! Override rule: with `class = "…"`, every parameter key also given in the
//! spec replaces the class's value; the strength of an enhancement device
//! (`k`, or `id_on` with `vgs_on`) is replaced as one group. `family` may be
//! repeated but must agree with the class's family.

use super::error::SpecError;
use super::fields::{closest, number_of, Section};
use super::raw::{Entry, Node};
use super::validate::{I_MAX_A, K_MAX_A_PER_V2, P_MAX_W, V_MAX_V};
use crate::device::classes::DeviceClass;
use crate::device::input::range_from_table;
use crate::device::{Device, DeviceInput, Family, ParamError, ParamRange};

/// Build the checked device of a `[device]` section.
pub(crate) fn device(s: &Section, classes: &[DeviceClass]) -> Result<Device, SpecError> {
    let family = family(s)?;
    let class = class(s, classes)?;
    let fam = match (family, class) {
        (Some((f, fe)), Some((c, ce))) => {
            if f != c.device.family {
                return Err(SpecError::Conflict {
                    first: s.field("class"),
                    first_line: ce.line,
                    second: s.field("family"),
                    second_line: fe.line,
                    rule: format!(
                        "class `{}` is an {}, not an {}; drop `family` or pick a class of \
                         that family",
                        c.id,
                        c.device.family.id(),
                        f.id()
                    ),
                });
            }
            f
        }
        (Some((f, _)), None) => f,
        (None, Some((c, _))) => c.device.family,
        (None, None) => {
            let ids: Vec<String> = classes.iter().map(|c| format!("\"{}\"", c.id)).collect();
            return Err(s.missing(
                "family",
                &format!(
                    "give `family` ({}) with its parameters, or `class` (one of {})",
                    family_list(),
                    ids.join(", ")
                ),
            ));
        }
    };
    let own = DeviceInput {
        idss: range(s, "idss", Bound::Current)?,
        vgs_off: range(s, "vgs_off", Bound::Voltage)?,
        vth: range(s, "vth", Bound::Voltage)?,
        k: range(s, "k", Bound::K)?,
        id_on: range(s, "id_on", Bound::Current)?,
        vgs_on: scalar(s, "vgs_on", Bound::Voltage)?,
        lambda: range(s, "lambda", Bound::None)?,
        vgs_max: scalar(s, "vgs_max", Bound::Voltage)?,
        vds_max: scalar(s, "vds_max", Bound::Voltage)?,
        pd_max: scalar(s, "pd_max", Bound::Power)?,
        ..DeviceInput::new(fam)
    };
    let (merged, source) = match class {
        Some((c, _)) => (c.input.overlay(&own), c.id.as_str()),
        None => (own, "spec"),
    };
    merged
        .build(source)
        .map_err(|pe| param_error(s, &pe, &merged, class))
}

fn family_list() -> String {
    let names: Vec<String> = Family::ALL
        .iter()
        .map(|f| format!("\"{}\"", f.id()))
        .collect();
    names.join(", ")
}

fn family<'a>(s: &Section<'a>) -> Result<Option<(Family, &'a Entry)>, SpecError> {
    let Some((name, e)) = s.string("family")? else {
        return Ok(None);
    };
    if let Some(f) = Family::from_id(&name) {
        return Ok(Some((f, e)));
    }
    let ids: Vec<&str> = Family::ALL.iter().map(|f| f.id()).collect();
    let mut rule = format!("must be one of {}", family_list());
    if let Some(c) = closest(&name, &ids) {
        rule.push_str(&format!(" (did you mean \"{c}\"?)"));
    }
    Err(s.invalid(e, &rule))
}

fn class<'a, 'c>(
    s: &Section<'a>,
    classes: &'c [DeviceClass],
) -> Result<Option<(&'c DeviceClass, &'a Entry)>, SpecError> {
    let Some((id, e)) = s.string("class")? else {
        return Ok(None);
    };
    if let Some(c) = classes.iter().find(|c| c.id == id) {
        return Ok(Some((c, e)));
    }
    let ids: Vec<&str> = classes.iter().map(|c| c.id.as_str()).collect();
    let quoted: Vec<String> = ids.iter().map(|i| format!("\"{i}\"")).collect();
    let mut rule = format!(
        "is not a known device class; the classes are {}",
        quoted.join(", ")
    );
    if let Some(c) = closest(&id, &ids) {
        rule.push_str(&format!(" (did you mean \"{c}\"?)"));
    }
    Err(s.invalid(e, &rule))
}

/// Magnitude bound of a device parameter.
#[derive(Clone, Copy)]
enum Bound {
    Current,
    Voltage,
    K,
    Power,
    None,
}

impl Bound {
    fn check(self, v: f64) -> Result<(), &'static str> {
        let (ok, rule) = match self {
            Bound::Current => (v.abs() <= I_MAX_A, "must be at most 100 A in magnitude"),
            Bound::Voltage => (
                v.abs() <= V_MAX_V,
                "must be at most 10 kV (1e4 V) in magnitude",
            ),
            Bound::K => (
                v.abs() <= K_MAX_A_PER_V2,
                "must be at most 1000 A/V² in magnitude",
            ),
            Bound::Power => (v.abs() <= P_MAX_W, "must be at most 1 MW (1e6 W)"),
            Bound::None => (true, ""),
        };
        if ok {
            Ok(())
        } else {
            Err(rule)
        }
    }
}

const RANGE_SHAPES: &str =
    "a number, a two-element [min, max] array (either order) or a { min, typ, max } table";

/// A parameter with spread: scalar, `[a, b]` or `{ min, typ, max }`.
fn range(s: &Section, key: &str, bound: Bound) -> Result<Option<ParamRange>, SpecError> {
    let Some(e) = s.get(key) else {
        return Ok(None);
    };
    let r = match &e.value {
        Node::Array(items) => {
            let [a, b] = items.as_slice() else {
                return Err(s.invalid(
                    e,
                    &format!("a range must have exactly two elements; give {RANGE_SHAPES}"),
                ));
            };
            let a = number_of(a, s.quantity(key)).map_err(|r| s.invalid(e, &r))?;
            let b = number_of(b, s.quantity(key)).map_err(|r| s.invalid(e, &r))?;
            ParamRange::between(a, b)
        }
        Node::Table(entries) => {
            let t = Section {
                path: s.field(key),
                line: Some(e.line),
                entries,
            };
            t.check_keys_in(&["min", "typ", "max"])?;
            let min = t.required_num("min", "a { min, typ, max } range needs `min` and `max`")?;
            let max = t.required_num("max", "a { min, typ, max } range needs `min` and `max`")?;
            let typ = t.num("typ")?.map(|n| n.v);
            range_from_table(min.v, typ, max.v).map_err(|r| s.invalid(e, &r))?
        }
        Node::Bool(_) => {
            return Err(s.invalid(
                e,
                &format!("must be {RANGE_SHAPES}, not {}", e.value.kind()),
            ))
        }
        scalar => {
            ParamRange::exact(number_of(scalar, s.quantity(key)).map_err(|r| s.invalid(e, &r))?)
        }
    };
    for v in [Some(r.min), r.typ, Some(r.max)].into_iter().flatten() {
        bound.check(v).map_err(|rule| s.invalid(e, rule))?;
    }
    Ok(Some(r))
}

/// A single-valued parameter or rating.
fn scalar(s: &Section, key: &str, bound: Bound) -> Result<Option<f64>, SpecError> {
    let Some(n) = s.num(key)? else {
        return Ok(None);
    };
    bound.check(n.v).map_err(|rule| n.fail(rule))?;
    Ok(Some(n.v))
}

fn show_range(r: &ParamRange) -> String {
    if !r.has_spread() {
        return format!("{:?}", r.min);
    }
    match r.typ {
        Some(t) => format!("{{ min = {:?}, typ = {t:?}, max = {:?} }}", r.min, r.max),
        None => format!("[{:?}, {:?}]", r.min, r.max),
    }
}

fn show_input(i: &DeviceInput, param: &str) -> String {
    let r = |x: &Option<ParamRange>| x.as_ref().map_or("none".to_string(), show_range);
    let v = |x: &Option<f64>| x.map_or("none".to_string(), |v| format!("{v:?}"));
    match param {
        "idss" => r(&i.idss),
        "vgs_off" => r(&i.vgs_off),
        "vth" => r(&i.vth),
        "k" => r(&i.k),
        "id_on" => r(&i.id_on),
        "lambda" => r(&i.lambda),
        "vgs_on" => v(&i.vgs_on),
        "vgs_max" => v(&i.vgs_max),
        "vds_max" => v(&i.vds_max),
        "pd_max" => v(&i.pd_max),
        _ => "none".to_string(),
    }
}

/// Word a device-rule failure against the key that caused it: the spec's
/// own key, else the class's value, else a missing key.
fn param_error(
    s: &Section,
    pe: &ParamError,
    merged: &DeviceInput,
    class: Option<(&DeviceClass, &Entry)>,
) -> SpecError {
    if let Some(e) = s.get(pe.param) {
        return s.invalid(e, &pe.rule);
    }
    match class {
        Some((c, ce)) if merged.given().contains(&pe.param) => SpecError::Invalid {
            field: s.field(pe.param),
            value: show_input(merged, pe.param),
            line: ce.line,
            rule: format!("{} (value from class `{}`)", pe.rule, c.id),
        },
        _ => s.missing(pe.param, &pe.rule),
    }
}
