//! Building a checked [`Device`] from datasheet numbers: the physical sign
//! rules and the consistency rules between parameters.
//!
//! The specification parser and the device-class catalog both fill a
//! [`DeviceInput`] and call [`DeviceInput::build`], so the rules live in one
//! place. This module knows nothing of files, lines or TOML; an error names
//! the parameter and the rule, and the caller adds where it came from.

use super::{Device, Family, ParamRange, Params, Strength};
use crate::units::{format_value, Quantity};
use std::fmt;

/// Datasheet numbers for one device, before checking. Every field is
/// optional here; [`DeviceInput::build`] decides what the family needs.
#[derive(Debug, Clone, PartialEq)]
pub struct DeviceInput {
    /// Device family.
    pub family: Family,
    /// IDSS, amps (depletion types).
    pub idss: Option<ParamRange>,
    /// VGS(off), volts (depletion types).
    pub vgs_off: Option<ParamRange>,
    /// VT, volts (enhancement).
    pub vth: Option<ParamRange>,
    /// K, A/V² (enhancement; or `id_on` with `vgs_on`).
    pub k: Option<ParamRange>,
    /// ID(on), amps, measured at `vgs_on` (enhancement).
    pub id_on: Option<ParamRange>,
    /// VGS(on), volts: the test condition of `id_on`.
    pub vgs_on: Option<f64>,
    /// Channel-length modulation, 1/V.
    pub lambda: Option<ParamRange>,
    /// Highest allowed VGS, volts.
    pub vgs_max: Option<f64>,
    /// Drain–source voltage rating, volts.
    pub vds_max: Option<f64>,
    /// Dissipation rating, watts.
    pub pd_max: Option<f64>,
}

/// A device parameter that breaks a rule.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ParamError {
    /// The parameter's key as written in files (`vgs_off`, `k`).
    pub param: &'static str,
    /// The rule it breaks, as a sentence fragment ("must be less than 0 V …").
    pub rule: String,
}

impl fmt::Display for ParamError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "`{}`: {}", self.param, self.rule)
    }
}

impl std::error::Error for ParamError {}

/// Keys of the parameters a depletion-type device takes.
pub const DEPLETION_KEYS: [&str; 2] = ["idss", "vgs_off"];
/// Keys of the parameters an enhancement device takes.
pub const ENHANCEMENT_KEYS: [&str; 4] = ["vth", "k", "id_on", "vgs_on"];
/// Keys every family takes.
pub const COMMON_KEYS: [&str; 4] = ["lambda", "vgs_max", "vds_max", "pd_max"];

fn err(param: &'static str, rule: impl Into<String>) -> ParamError {
    ParamError {
        param,
        rule: rule.into(),
    }
}

/// The quantity of a device parameter or rating (`idss` a current, `k`
/// A/V², ...): the unit its text may carry. `None` for an unknown name.
pub fn quantity(param: &str) -> Option<Quantity> {
    Some(match param {
        "idss" | "id_on" => Quantity::Current,
        "vgs_off" | "vth" | "vgs_on" | "vgs_max" | "vds_max" => Quantity::Voltage,
        "k" => Quantity::TransconductanceParameter,
        "lambda" => Quantity::PerVolt,
        "pd_max" => Quantity::Power,
        _ => return None,
    })
}

/// Build a range from `min`, optional `typ` and `max` as written in a
/// `{ min, typ, max }` table: `min <= typ <= max` is required.
pub fn range_from_table(min: f64, typ: Option<f64>, max: f64) -> Result<ParamRange, String> {
    if min > max {
        return Err(format!(
            "`min` ({}) must not exceed `max` ({})",
            format_value(min),
            format_value(max)
        ));
    }
    if let Some(t) = typ {
        if t < min || t > max {
            return Err(format!(
                "`typ` ({}) must lie between `min` ({}) and `max` ({})",
                format_value(t),
                format_value(min),
                format_value(max)
            ));
        }
    }
    Ok(ParamRange { min, typ, max })
}

impl DeviceInput {
    /// An input with only the family set.
    pub fn new(family: Family) -> Self {
        DeviceInput {
            family,
            idss: None,
            vgs_off: None,
            vth: None,
            k: None,
            id_on: None,
            vgs_on: None,
            lambda: None,
            vgs_max: None,
            vds_max: None,
            pd_max: None,
        }
    }

    /// Names of the parameters that are set, in file order of keys.
    pub fn given(&self) -> Vec<&'static str> {
        let flags = [
            ("idss", self.idss.is_some()),
            ("vgs_off", self.vgs_off.is_some()),
            ("vth", self.vth.is_some()),
            ("k", self.k.is_some()),
            ("id_on", self.id_on.is_some()),
            ("vgs_on", self.vgs_on.is_some()),
            ("lambda", self.lambda.is_some()),
            ("vgs_max", self.vgs_max.is_some()),
            ("vds_max", self.vds_max.is_some()),
            ("pd_max", self.pd_max.is_some()),
        ];
        flags
            .into_iter()
            .filter(|(_, s)| *s)
            .map(|(n, _)| n)
            .collect()
    }

    /// Lay `over` on top of `self`: every parameter `over` sets replaces
    /// ours. The enhancement strength is one group: if `over` sets any of
    /// `k`, `id_on`, `vgs_on`, all three of ours are dropped first, so a
    /// class given by K can be overridden with an ID(on) point and back.
    /// The family is `over`'s.
    pub fn overlay(&self, over: &DeviceInput) -> DeviceInput {
        let strength_given = over.k.is_some() || over.id_on.is_some() || over.vgs_on.is_some();
        let (k, id_on, vgs_on) = if strength_given {
            (over.k, over.id_on, over.vgs_on)
        } else {
            (self.k, self.id_on, self.vgs_on)
        };
        DeviceInput {
            family: over.family,
            idss: over.idss.or(self.idss),
            vgs_off: over.vgs_off.or(self.vgs_off),
            vth: over.vth.or(self.vth),
            k,
            id_on,
            vgs_on,
            lambda: over.lambda.or(self.lambda),
            vgs_max: over.vgs_max.or(self.vgs_max),
            vds_max: over.vds_max.or(self.vds_max),
            pd_max: over.pd_max.or(self.pd_max),
        }
    }

    /// Check every rule and build the device; `source` goes to
    /// [`Device::source`].
    ///
    /// Rules (n-channel): IDSS > 0; VGS(off) < 0 for the JFET and depletion
    /// MOSFET; VT > 0 for enhancement; K > 0; ID(on) > 0; VGS(on) above every
    /// VT; 0 <= λ < 1 /V; ratings `vds_max`, `pd_max` > 0; a MOSFET's
    /// `vgs_max` > 0 (applied as ±vgs_max); the gate rating must let the
    /// device conduct somewhere. A JFET's `vgs_max` defaults to 0 V.
    pub fn build(&self, source: &str) -> Result<Device, ParamError> {
        let fam = self.family;
        let (wrong, right): (&[&'static str], &str) = if fam.is_depletion_type() {
            (
                &ENHANCEMENT_KEYS,
                "a depletion-type device takes `idss` and `vgs_off`",
            )
        } else {
            (
                &DEPLETION_KEYS,
                "an enhancement device takes `vth` and `k` (or `id_on` with `vgs_on`)",
            )
        };
        if let Some(p) = self.given().into_iter().find(|p| wrong.contains(p)) {
            return Err(err(
                p,
                format!("is not a parameter of an {}; {right}", fam.id()),
            ));
        }
        let params = if fam.is_depletion_type() {
            self.depletion_params()?
        } else {
            self.enhancement_params()?
        };
        let lambda = self.lambda.unwrap_or(ParamRange::exact(0.0));
        if lambda.min < 0.0 || lambda.max >= 1.0 {
            return Err(err(
                "lambda",
                "must be at least 0 /V and less than 1 /V (channel-length modulation)",
            ));
        }
        for (name, v) in [("vds_max", self.vds_max), ("pd_max", self.pd_max)] {
            if v.is_some_and(|x| x <= 0.0) {
                return Err(err(
                    name,
                    "must be greater than 0 (a rating is a magnitude)",
                ));
            }
        }
        let (vgs_max_v, vgs_min_v) = self.gate_rating(&params)?;
        Ok(Device {
            family: fam,
            params,
            lambda,
            vgs_max_v,
            vgs_min_v,
            vds_max_v: self.vds_max,
            pd_max_w: self.pd_max,
            source: source.to_string(),
        })
    }

    fn depletion_params(&self) -> Result<Params, ParamError> {
        let idss = self.idss.ok_or_else(|| {
            err(
                "idss",
                format!(
                    "an {} needs IDSS, the drain current at VGS = 0 (amps)",
                    self.family.id()
                ),
            )
        })?;
        let vgs_off = self.vgs_off.ok_or_else(|| {
            err(
                "vgs_off",
                format!(
                    "an {} needs VGS(off), the gate-source cut-off voltage (volts, negative)",
                    self.family.id()
                ),
            )
        })?;
        if idss.min <= 0.0 {
            return Err(err(
                "idss",
                "must be greater than 0 A (IDSS is the drain current at VGS = 0)",
            ));
        }
        if vgs_off.max >= 0.0 {
            let hint = if self.family.is_jfet() {
                "an n-channel JFET's VGS(off) is negative"
            } else {
                "an n-channel depletion MOSFET's VGS(off) is negative; a positive threshold \
                 means an enhancement device: family = \"n-enhancement-mosfet\" with `vth`"
            };
            return Err(err("vgs_off", format!("must be less than 0 V ({hint})")));
        }
        Ok(Params::Depletion { idss, vgs_off })
    }

    fn enhancement_params(&self) -> Result<Params, ParamError> {
        let vth = self.vth.ok_or_else(|| {
            err(
                "vth",
                "an n-enhancement-mosfet needs VT, the threshold voltage (volts)",
            )
        })?;
        if vth.min <= 0.0 {
            return Err(err(
                "vth",
                "must be greater than 0 V (an n-channel enhancement MOSFET's threshold is \
                 positive; a negative threshold means a depletion device: family = \
                 \"n-depletion-mosfet\" with `idss` and `vgs_off`)",
            ));
        }
        let strength = match (self.k, self.id_on, self.vgs_on) {
            (Some(_), Some(_), _) | (Some(_), _, Some(_)) => {
                return Err(err(
                    "k",
                    "give either `k` or `id_on` with `vgs_on`, not both",
                ))
            }
            (Some(k), None, None) => {
                if k.min <= 0.0 {
                    return Err(err("k", "must be greater than 0 A/V²"));
                }
                Strength::K(k)
            }
            (None, Some(id_on), Some(vgs_on)) => {
                if id_on.min <= 0.0 {
                    return Err(err("id_on", "must be greater than 0 A"));
                }
                if vgs_on <= vth.max {
                    return Err(err(
                        "vgs_on",
                        format!(
                            "must be greater than every `vth` value (largest {} V): \
                             K = ID(on)/(VGS(on) − VT)² needs VGS(on) > VT",
                            format_value(vth.max)
                        ),
                    ));
                }
                Strength::OnPoint { id_on, vgs_on }
            }
            (None, Some(_), None) => {
                return Err(err(
                    "vgs_on",
                    "`id_on` needs `vgs_on`, the VGS (volts) at which ID(on) is measured",
                ))
            }
            (None, None, Some(_)) => {
                return Err(err(
                    "id_on",
                    "`vgs_on` needs `id_on`, the drain current (amps) at VGS(on)",
                ))
            }
            (None, None, None) => {
                return Err(err(
                    "k",
                    "an n-enhancement-mosfet needs its strength: `k` (A/V²) or `id_on` (A) \
                     with `vgs_on` (V)",
                ))
            }
        };
        Ok(Params::Enhancement { vth, strength })
    }

    /// (vgs_max, vgs_min) from the rating and the family.
    fn gate_rating(&self, params: &Params) -> Result<(Option<f64>, Option<f64>), ParamError> {
        // Lowest VGS at which some corner conducts.
        let on_above = match params {
            Params::Depletion { vgs_off, .. } => vgs_off.min,
            Params::Enhancement { vth, .. } => vth.min,
        };
        if self.family.is_jfet() {
            let m = self.vgs_max.unwrap_or(0.0);
            if m <= on_above {
                return Err(err(
                    "vgs_max",
                    format!(
                        "must be above the most negative `vgs_off` ({} V), or no \
                         device could conduct",
                        format_value(on_above)
                    ),
                ));
            }
            return Ok((Some(m), None));
        }
        match self.vgs_max {
            None => Ok((None, None)),
            Some(m) if m <= 0.0 => Err(err(
                "vgs_max",
                "must be greater than 0 V (a MOSFET's gate rating is a magnitude, applied \
                 as ±vgs_max)",
            )),
            Some(m) if m <= on_above => Err(err(
                "vgs_max",
                format!(
                    "must be above the lowest threshold ({} V), or no device could \
                     conduct",
                    format_value(on_above)
                ),
            )),
            Some(m) => Ok((Some(m), Some(-m))),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn jfet() -> DeviceInput {
        DeviceInput {
            idss: Some(ParamRange::between(3e-3, 9e-3)),
            vgs_off: Some(ParamRange::between(-1.0, -3.5)),
            ..DeviceInput::new(Family::NJfet)
        }
    }

    #[test]
    fn jfet_gets_default_gate_rating_and_zero_lambda() {
        let d = jfet().build("spec").unwrap();
        assert_eq!(d.vgs_max_v, Some(0.0));
        assert_eq!(d.vgs_min_v, None);
        assert_eq!(d.lambda, ParamRange::exact(0.0));
        assert_eq!(d.source, "spec");
    }

    // Sign convention for n-channel devices: Boylestad & Nashelsky ch. 6
    // (VP < 0 for JFET and depletion MOSFET, VT > 0 for enhancement).
    #[test]
    fn jfet_with_positive_cutoff_is_refused() {
        let mut i = jfet();
        i.vgs_off = Some(ParamRange::exact(2.0));
        let e = i.build("spec").unwrap_err();
        assert_eq!(e.param, "vgs_off");
        assert!(e.rule.contains("JFET's VGS(off) is negative"), "{e}");
    }

    #[test]
    fn mosfet_gate_rating_is_symmetric() {
        let i = DeviceInput {
            vth: Some(ParamRange::between(0.8, 3.0)),
            k: Some(ParamRange::between(3e-3, 15e-3)),
            vgs_max: Some(20.0),
            ..DeviceInput::new(Family::NEnhancementMosfet)
        };
        let d = i.build("x").unwrap();
        assert_eq!((d.vgs_max_v, d.vgs_min_v), (Some(20.0), Some(-20.0)));
    }

    #[test]
    fn overlay_replaces_strength_as_a_group() {
        let class = DeviceInput {
            vth: Some(ParamRange::between(0.8, 3.0)),
            k: Some(ParamRange::between(3e-3, 15e-3)),
            ..DeviceInput::new(Family::NEnhancementMosfet)
        };
        let over = DeviceInput {
            id_on: Some(ParamRange::exact(6e-3)),
            vgs_on: Some(8.0),
            ..DeviceInput::new(Family::NEnhancementMosfet)
        };
        let m = class.overlay(&over);
        assert_eq!(m.k, None);
        assert!(m.build("c").is_ok());
    }

    #[test]
    fn table_range_rules() {
        assert!(range_from_table(1.0, Some(2.0), 3.0).is_ok());
        assert!(range_from_table(3.0, None, 1.0).is_err());
        assert!(range_from_table(1.0, Some(4.0), 3.0).is_err());
    }
}
