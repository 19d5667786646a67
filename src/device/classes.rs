//! Generic device classes from `catalogs/devices.toml`.
//!
//! A class is a named family of datasheet ranges ("n-JFET, low IDSS") that a
//! specification can take with `class = "…"` instead of listing every
//! parameter. The built-in file is compiled in with `include_str!`; [`parse`]
//! reads any text of the same shape. No file I/O here.

use super::input::quantity;
use super::input::{range_from_table, DeviceInput};
use super::{Device, Family, ParamRange};
use crate::units::{parse_quantity, parse_value, Quantity};
use serde::Deserialize;
use std::fmt;

/// The built-in class file, as shipped in `catalogs/devices.toml`.
pub const BUILTIN_TOML: &str = include_str!("../../catalogs/devices.toml");

/// One device class.
#[derive(Debug, Clone, PartialEq)]
pub struct DeviceClass {
    /// Identifier used in specifications (`n-jfet-low-idss`).
    pub id: String,
    /// One-line description for listings.
    pub description: String,
    /// The class's numbers before checking, for overlaying a spec's own keys.
    pub input: DeviceInput,
    /// The checked device (its `source` is the class id).
    pub device: Device,
}

/// A class file that cannot be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum ClassError {
    /// The text is not TOML of the expected shape.
    #[error("device classes: {0}")]
    Syntax(String),
    /// A class breaks a value or device rule.
    #[error("device class `{id}`: `{param}`: {rule}")]
    Invalid {
        /// Class id.
        id: String,
        /// Parameter key.
        param: String,
        /// The rule broken.
        rule: String,
    },
    /// Two classes share an id.
    #[error("device class `{0}` is defined twice")]
    Duplicate(String),
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    class: Vec<RawClass>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawClass {
    id: String,
    description: String,
    family: String,
    idss: Option<RawParam>,
    vgs_off: Option<RawParam>,
    vth: Option<RawParam>,
    k: Option<RawParam>,
    id_on: Option<RawParam>,
    vgs_on: Option<RawNum>,
    lambda: Option<RawParam>,
    vgs_max: Option<RawNum>,
    vds_max: Option<RawNum>,
    pd_max: Option<RawNum>,
}

#[derive(Deserialize, Clone)]
#[serde(untagged)]
enum RawNum {
    Number(f64),
    Text(String),
}

#[derive(Deserialize)]
#[serde(untagged)]
enum RawParam {
    One(RawNum),
    Pair(Vec<RawNum>),
    Table {
        min: RawNum,
        typ: Option<RawNum>,
        max: RawNum,
    },
}

impl RawNum {
    /// The number, its text read as quantity `q` (the spec key's).
    fn value(&self, q: Option<Quantity>) -> Result<f64, String> {
        let v = match self {
            RawNum::Number(v) => *v,
            RawNum::Text(t) => match q {
                Some(q) => parse_quantity(t, q),
                None => parse_value(t),
            }
            .map_err(|e| e.to_string())?,
        };
        if v.is_finite() {
            Ok(v)
        } else {
            Err("must be a finite number".to_string())
        }
    }
}

impl RawParam {
    fn range(&self, q: Option<Quantity>) -> Result<ParamRange, String> {
        match self {
            RawParam::One(n) => Ok(ParamRange::exact(n.value(q)?)),
            RawParam::Pair(v) => match v.as_slice() {
                [a, b] => Ok(ParamRange::between(a.value(q)?, b.value(q)?)),
                _ => Err("a range must have exactly two elements".to_string()),
            },
            RawParam::Table { min, typ, max } => {
                let typ = typ.as_ref().map(|t| t.value(q)).transpose()?;
                range_from_table(min.value(q)?, typ, max.value(q)?)
            }
        }
    }
}

impl RawClass {
    fn to_class(&self) -> Result<DeviceClass, ClassError> {
        let bad = |param: &str, rule: String| ClassError::Invalid {
            id: self.id.clone(),
            param: param.to_string(),
            rule,
        };
        let family = Family::from_id(&self.family)
            .ok_or_else(|| bad("family", format!("unknown family `{}`", self.family)))?;
        let range = |name: &str, p: &Option<RawParam>| {
            p.as_ref()
                .map(|r| r.range(quantity(name)))
                .transpose()
                .map_err(|r| bad(name, r))
        };
        let num = |name: &str, p: &Option<RawNum>| {
            p.as_ref()
                .map(|n| n.value(quantity(name)))
                .transpose()
                .map_err(|r| bad(name, r))
        };
        let input = DeviceInput {
            family,
            idss: range("idss", &self.idss)?,
            vgs_off: range("vgs_off", &self.vgs_off)?,
            vth: range("vth", &self.vth)?,
            k: range("k", &self.k)?,
            id_on: range("id_on", &self.id_on)?,
            vgs_on: num("vgs_on", &self.vgs_on)?,
            lambda: range("lambda", &self.lambda)?,
            vgs_max: num("vgs_max", &self.vgs_max)?,
            vds_max: num("vds_max", &self.vds_max)?,
            pd_max: num("pd_max", &self.pd_max)?,
        };
        let device = input.build(&self.id).map_err(|e| bad(e.param, e.rule))?;
        Ok(DeviceClass {
            id: self.id.clone(),
            description: self.description.clone(),
            input,
            device,
        })
    }
}

/// Read a class file: `[[class]]` tables as in `catalogs/devices.toml`.
pub fn parse(text: &str) -> Result<Vec<DeviceClass>, ClassError> {
    let raw: RawFile = toml::from_str(text).map_err(|e| ClassError::Syntax(e.to_string()))?;
    let mut out: Vec<DeviceClass> = Vec::with_capacity(raw.class.len());
    for c in &raw.class {
        if out.iter().any(|o| o.id == c.id) {
            return Err(ClassError::Duplicate(c.id.clone()));
        }
        out.push(c.to_class()?);
    }
    Ok(out)
}

/// The built-in classes.
pub fn builtin() -> Result<Vec<DeviceClass>, ClassError> {
    parse(BUILTIN_TOML)
}

/// Find a class by id (exact spelling).
pub fn find<'a>(classes: &'a [DeviceClass], id: &str) -> Option<&'a DeviceClass> {
    classes.iter().find(|c| c.id == id)
}

impl fmt::Display for DeviceClass {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{} ({}): {}",
            self.id,
            self.device.family.id(),
            self.description
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::device::Params;

    #[test]
    fn builtin_file_parses_and_every_class_validates() {
        let classes = builtin().unwrap();
        assert!(classes.len() >= 6);
        for c in &classes {
            assert_eq!(c.device.source, c.id);
            assert!(!c.description.is_empty());
            // Generic classes only: an id is a family description, kebab-case.
            assert!(c.id.starts_with("n-"), "{}", c.id);
            assert!(c
                .id
                .chars()
                .all(|ch| ch.is_ascii_lowercase() || ch.is_ascii_digit() || ch == '-'));
            // Every class spreads its main parameters (a datasheet range).
            assert!(c.device.corners().len() >= 4, "{}", c.id);
        }
        for fam in Family::ALL {
            assert!(classes.iter().any(|c| c.device.family == fam), "{fam:?}");
        }
    }

    // REFERENCE §8.1, low-IDSS n-JFET class: IDSS 1–5 mA, VGS(off) −0.5 to −3 V.
    #[test]
    fn low_idss_class_carries_the_datasheet_range() {
        let classes = builtin().unwrap();
        let c = find(&classes, "n-jfet-low-idss").unwrap();
        let Params::Depletion { idss, vgs_off } = c.device.params else {
            panic!("not a depletion device")
        };
        assert_eq!((idss.min, idss.max), (1e-3, 5e-3));
        assert_eq!((vgs_off.min, vgs_off.max), (-3.0, -0.5));
        assert_eq!(c.device.vgs_max_v, Some(0.0));
        assert!(find(&classes, "n-jfet-nonexistent").is_none());
    }

    #[test]
    fn bad_class_files_are_refused() {
        let dup = "[[class]]\nid='a'\ndescription='d'\nfamily='n-jfet'\nidss=1e-3\nvgs_off=-2\n";
        assert_eq!(
            parse(&format!("{dup}{dup}")).unwrap_err(),
            ClassError::Duplicate("a".into())
        );
        let pos = "[[class]]\nid='b'\ndescription='d'\nfamily='n-jfet'\nidss=1e-3\nvgs_off=2\n";
        assert!(matches!(parse(pos), Err(ClassError::Invalid { param, .. }) if param == "vgs_off"));
        assert!(matches!(parse("x = 1"), Err(ClassError::Syntax(_))));
    }
}
