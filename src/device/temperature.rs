//! How a device and the resistors move with temperature.
//!
//! Datasheet values are taken at the reference temperature
//! [`T_REF_C`] (25 °C). At another temperature `T` (°C), with `ΔT = T − 25`:
//!
//! - threshold (VGS(off) of a JFET or depletion MOSFET, VT of an
//!   enhancement MOSFET): `vto(T) = vto + tc·ΔT`, `tc` in V/°C, signed. For
//!   an n-channel JFET VGS(off) grows more negative with temperature, so
//!   `tc < 0`; an enhancement MOSFET's VT falls, `tc < 0` too;
//! - strength of a depletion-type device: `k(T) = k·(1 + a)^ΔT` with `a`
//!   the fractional change per °C, compounding. That is the law of the SPICE
//!   JFET's `BETATCE` (ngspice jfettemp.c: `BETA·1.01^(BETATCE·ΔT)`), so
//!   `BETATCE = ln(1 + a)/ln(1.01)`;
//! - strength of an enhancement MOSFET: `k(T) = k·(T/T_ref)^x` in kelvin,
//!   `x = −1.5` by default (mobility limited by lattice scattering; the
//!   fixed law of ngspice's level-1 MOSFET, mos1temp.c);
//! - gate leakage: `IG(T) = IGSS·2^(ΔT/10)`, doubling every 10 °C
//!   (common practice; Harrison, *Current Sources and Voltage References*,
//!   on MOSFET leakage; the junction law gives 4.6 to 9.2 °C per doubling);
//! - a resistor of temperature coefficient `±r` (1/°C, sign unknown):
//!   within `R·(1 ± r·|ΔT|)` at `T`.
//!
//! This module must not know about circuits or topologies.

use super::{Family, SquareLaw};
use serde::Serialize;

/// Reference temperature of datasheet values, °C.
pub const T_REF_C: f64 = 25.0;

/// 0 °C in kelvin.
pub const ZERO_C_K: f64 = 273.15;

/// Default threshold coefficient of a JFET or depletion MOSFET, V/°C:
/// VTOTC = −2.5 mV/°C, the value of every n-channel JFET in a widely used
/// standard SPICE model library and of a vendor's JFET model file
/// (published SPICE models; the classic figure |dVP/dT| = 2.2 mV/°C is from
/// memory of FET application notes).
pub const DEPLETION_VTO_TC_V_PER_C: f64 = -2.5e-3;

/// The SPICE `BETATCE` of the same published models, %/°C (compounding).
pub const DEPLETION_BETATCE: f64 = -0.5;

/// Default VT coefficient of an enhancement MOSFET, V/°C: from memory, small
/// discrete MOSFETs drift −2 to −4 mV/°C; no datasheet figure was found.
pub const ENHANCEMENT_VTO_TC_V_PER_C: f64 = -3e-3;

/// Default temperature exponent of an enhancement MOSFET's K (K ∝ T^x):
/// ngspice's level-1 MOSFET uses −1.5 (mos1temp.c), the lattice-scattering
/// mobility law.
pub const ENHANCEMENT_K_EXPONENT: f64 = -1.5;

/// Kelvin of a Celsius temperature.
pub fn kelvin(t_c: f64) -> f64 {
    t_c + ZERO_C_K
}

/// The fractional change of β per °C that a SPICE `BETATCE` (%/°C,
/// compounding on 1.01) stands for: `1.01^BETATCE − 1`.
pub fn beta_per_c_of_betatce(betatce: f64) -> f64 {
    1.01_f64.powf(betatce) - 1.0
}

/// How the device's strength (k) moves with temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "law", rename_all = "kebab-case")]
pub enum StrengthTc {
    /// `k(T) = k·(1 + per_c)^ΔT` (JFET, depletion MOSFET).
    Compounding {
        /// Fractional change per °C (−0.005 = −0.5 %/°C).
        per_c: f64,
    },
    /// `k(T) = k·(T/T_ref)^exponent`, kelvin (enhancement MOSFET).
    Power {
        /// The exponent (−1.5 by default).
        exponent: f64,
    },
}

/// The device's temperature coefficients and gate leakage.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TempCoeffs {
    /// d(vto)/dT, V/°C, signed.
    pub vto_v_per_c: f64,
    /// How k moves.
    pub strength: StrengthTc,
    /// Gate leakage at 25 °C, amps (datasheet IGSS), when given.
    pub igss_a: Option<f64>,
}

impl TempCoeffs {
    /// The published defaults of the family (see the constants above), no
    /// gate leakage.
    pub fn default_for(family: Family) -> TempCoeffs {
        if family.is_depletion_type() {
            TempCoeffs {
                vto_v_per_c: DEPLETION_VTO_TC_V_PER_C,
                strength: StrengthTc::Compounding {
                    per_c: beta_per_c_of_betatce(DEPLETION_BETATCE),
                },
                igss_a: None,
            }
        } else {
            TempCoeffs {
                vto_v_per_c: ENHANCEMENT_VTO_TC_V_PER_C,
                strength: StrengthTc::Power {
                    exponent: ENHANCEMENT_K_EXPONENT,
                },
                igss_a: None,
            }
        }
    }

    /// The factor k(T)/k(25 °C).
    pub fn k_factor(&self, t_c: f64) -> f64 {
        let dt = t_c - T_REF_C;
        match self.strength {
            StrengthTc::Compounding { per_c } => (dt * per_c.ln_1p()).exp(),
            StrengthTc::Power { exponent } => (kelvin(t_c) / kelvin(T_REF_C)).powf(exponent),
        }
    }

    /// The square law at `t_c` °C of a device whose law at 25 °C is `law`
    /// (λ does not move).
    pub fn law_at(&self, law: &SquareLaw, t_c: f64) -> SquareLaw {
        if t_c == T_REF_C {
            return *law;
        }
        SquareLaw {
            vto_v: law.vto_v + self.vto_v_per_c * (t_c - T_REF_C),
            k_a_per_v2: law.k_a_per_v2 * self.k_factor(t_c),
            lambda_per_v: law.lambda_per_v,
        }
    }

    /// Gate leakage at `t_c` °C, amps: IGSS doubling every 10 °C; 0 when no
    /// IGSS is given.
    pub fn gate_leakage_a(&self, t_c: f64) -> f64 {
        self.igss_a
            .map_or(0.0, |i| i * 2f64.powf((t_c - T_REF_C) / 10.0))
    }

    /// The SPICE JFET `BETATCE` (%/°C) of a compounding strength law, `None`
    /// for the power law (which SPICE's level-1 MOSFET cannot carry).
    pub fn betatce(&self) -> Option<f64> {
        match self.strength {
            StrengthTc::Compounding { per_c } => Some(per_c.ln_1p() / 1.01_f64.ln()),
            StrengthTc::Power { .. } => None,
        }
    }

    /// d(ln k)/dT at 25 °C, 1/°C.
    pub fn k_log_slope_per_c(&self) -> f64 {
        match self.strength {
            StrengthTc::Compounding { per_c } => per_c.ln_1p(),
            StrengthTc::Power { exponent } => exponent / kelvin(T_REF_C),
        }
    }

    /// The overdrive at which the drain current does not move with
    /// temperature to first order (zero-temperature-coefficient point):
    /// `d ln ID/dT = d ln k/dT − 2·tc/vov = 0`, so `vov = 2·tc/(d ln k/dT)`.
    /// `None` when the two effects do not oppose (no such point).
    pub fn ztc_overdrive_v(&self) -> Option<f64> {
        let slope = self.k_log_slope_per_c();
        let v = 2.0 * self.vto_v_per_c / slope;
        (v.is_finite() && v > 0.0).then_some(v)
    }
}

/// The multipliers `(low, high)` of a resistor of relative tolerance `tol`
/// and temperature coefficient magnitude `tcr_per_c` (sign unknown) at
/// `t_c` °C: `(1 − tol)·(1 − tcr·|ΔT|)` and `(1 + tol)·(1 + tcr·|ΔT|)`.
pub fn resistor_extremes(tol: f64, tcr_per_c: f64, t_c: f64) -> (f64, f64) {
    let drift = tcr_per_c * (t_c - T_REF_C).abs();
    ((1.0 - tol) * (1.0 - drift), (1.0 + tol) * (1.0 + drift))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::topology::{BiasNetwork, Gate};

    fn close(got: f64, want: f64, rel: f64, what: &str) {
        assert!(
            (got - want).abs() <= rel * want.abs(),
            "{what}: got {got}, want {want}"
        );
    }

    fn jfet(idss: f64, vp: f64) -> SquareLaw {
        SquareLaw {
            vto_v: vp,
            k_a_per_v2: idss / (vp * vp),
            lambda_per_v: 0.0,
        }
    }

    /// Coefficients referenced to 27 °C (ngspice's TNOM) for the checks
    /// below, which were run at ngspice's default TNOM: the law at T is
    /// `law_at(T − 2)` of coefficients referenced to 25 °C.
    fn at_27(c: &TempCoeffs, law: &SquareLaw, t_c: f64) -> SquareLaw {
        c.law_at(law, t_c - 2.0)
    }

    // ngspice-39, NJF VTO = -4 BETA = 0.5m VTOTC = -2.2m BETATCE = -0.70597
    // (2.2 mV/°C and -0.7 %/°C), VGS fixed, `.options temp=T tnom=27`,
    // `print @j1[id]` (REFERENCE-NEXT §1.3 table): ID in mA.
    #[test]
    fn jfet_current_at_fixed_vgs_matches_ngspice() {
        let c = TempCoeffs {
            vto_v_per_c: -2.2e-3,
            strength: StrengthTc::Compounding {
                per_c: beta_per_c_of_betatce(-0.70597),
            },
            igss_a: None,
        };
        let law = jfet(8e-3, -4.0);
        let rows = [
            (-3.7, [0.01864, 0.04500, 0.06083]),
            (-3.5, [0.09953, 0.12500, 0.13104]),
            (-3.371429, [0.18534, 0.19755, 0.19022]),
            (-3.2, [0.34093, 0.32000, 0.28625]),
            (-2.0, [2.747475, 2.000000, 1.505936]),
            (0.0, [11.88169, 8.000000, 5.667893]),
        ];
        for (vgs, ids) in rows {
            for (t, want) in [-40.0, 27.0, 85.0].into_iter().zip(ids) {
                let id = at_27(&c, &law, t).id(vgs, 10.0) * 1e3;
                close(id, want, 3e-4, &format!("VGS {vgs} at {t} °C"));
            }
        }
    }

    // Zero-TC point: vov = 2|dVP/dT|/|dlnβ/dT|; with 2.2 mV/°C and
    // −0.7 %/°C as a log slope it is 0.628571 V, and IDSS 8 mA, VP −4 V
    // give IDZ = 0.197551 mA (REFERENCE-NEXT §1.3, computed; the textbook
    // "VP + 0.63 V" rule). The library coefficients give 1.00499 V.
    #[test]
    fn zero_tc_overdrive() {
        let c = TempCoeffs {
            vto_v_per_c: -2.2e-3,
            strength: StrengthTc::Compounding {
                per_c: (-0.007_f64).exp() - 1.0,
            },
            igss_a: None,
        };
        let v = c.ztc_overdrive_v().unwrap();
        close(v, 0.628571, 1e-6, "vov,Z");
        close(
            jfet(8e-3, -4.0).id(-4.0 + v, 10.0),
            0.197551e-3,
            1e-5,
            "IDZ",
        );
        let lib = TempCoeffs::default_for(Family::NJfet);
        close(
            lib.ztc_overdrive_v().unwrap(),
            1.00499,
            1e-5,
            "library vov,Z",
        );
        // MOSFET: 3 mV/°C with T^-1.5 at 25 °C -> 1.1926 V.
        let m = TempCoeffs::default_for(Family::NEnhancementMosfet);
        close(m.ztc_overdrive_v().unwrap(), 1.1926, 1e-4, "MOSFET vov,Z");
    }

    // REFERENCE-NEXT §1.4 (ngspice-39 in brackets there): self bias RS 1 kΩ,
    // gate grounded, IDSS 8 mA, VP −4 V at 27 °C, VTOTC −2.5 mV/°C,
    // BETATCE −0.5: ID 2.098394 / 2.000000 / 1.895660 mA and gm 2.420146 /
    // 2.000000 / 1.685525 mS at −40 / 27 / 85 °C.
    #[test]
    fn self_bias_drift_matches_ngspice() {
        let c = TempCoeffs::default_for(Family::NJfet);
        let net = BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: 1e3,
            drain_rail_v: 15.0,
            rd_ohm: 4.7e3,
        };
        let law = jfet(8e-3, -4.0);
        for (t, id, gm) in [
            (-40.0, 2.098394e-3, 2.420146e-3),
            (27.0, 2.0e-3, 2.0e-3),
            (85.0, 1.895660e-3, 1.685525e-3),
        ] {
            let l = at_27(&c, &law, t);
            let op = net.solve(&l);
            close(op.id_a, id, 1e-6, &format!("ID at {t} °C"));
            close(l.gm(op.vgs_v, op.vds_v), gm, 1e-6, &format!("gm at {t} °C"));
        }
    }

    // REFERENCE-NEXT Appendix A temperature loop (ngspice-39): NJF VTO −4
    // BETA 0.5m BETATCE −0.5 VTOTC −2.5m, VGS −2 V: 2.343279 / 2.000000 /
    // 1.723871 mA at −40 / 27 / 85 °C.
    #[test]
    fn fixed_vgs_loop_matches_ngspice() {
        let c = TempCoeffs::default_for(Family::NJfet);
        let law = jfet(8e-3, -4.0);
        for (t, id) in [(-40.0, 2.343279e-3), (27.0, 2e-3), (85.0, 1.723871e-3)] {
            close(
                at_27(&c, &law, t).id(-2.0, 10.0),
                id,
                1e-6,
                &format!("{t} °C"),
            );
        }
        // BETATCE round trip and its meaning: −0.5 is −0.4963 %/°C.
        close(c.betatce().unwrap(), -0.5, 1e-12, "BETATCE");
        close(beta_per_c_of_betatce(-0.5), -0.004963, 1e-3, "per °C");
    }

    // REFERENCE-NEXT §1.5 (computed): VT 2.0 V at 25 °C, −3 mV/°C, K 0.5 mA/V²
    // ∝ (T/298.15 K)^−1.5: ID at −40 / 25 / 85 °C.
    #[test]
    fn enhancement_law_moves_as_published() {
        let c = TempCoeffs::default_for(Family::NEnhancementMosfet);
        let law = SquareLaw {
            vto_v: 2.0,
            k_a_per_v2: 0.5e-3,
            lambda_per_v: 0.0,
        };
        for (vgs, ids) in [
            (2.5, [0.06726, 0.12500, 0.17561]),
            (3.1926, [0.71958, 0.71115, 0.71551]),
            (4.0, [2.35572, 2.00000, 1.80484]),
        ] {
            for (t, want) in [-40.0, 25.0, 85.0].into_iter().zip(ids) {
                let id = c.law_at(&law, t).id(vgs, 20.0) * 1e3;
                close(id, want, 2e-4, &format!("VGS {vgs} at {t} °C"));
            }
        }
        // ngspice-39 MOS1 KP law check (REFERENCE-NEXT §1.5): KP factor
        // (358.15/300.15)^−1.5 between 27 and 85 °C.
        let p = TempCoeffs {
            vto_v_per_c: 0.0,
            strength: StrengthTc::Power { exponent: -1.5 },
            igss_a: None,
        };
        let ratio = p.k_factor(85.0) / p.k_factor(27.0);
        close(ratio, (358.15_f64 / 300.15).powf(-1.5), 1e-12, "KP factor");
    }

    // REFERENCE-NEXT §1.6 (common practice, doubling per 10 °C): IG(25 °C)
    // = 1 nA → 22.63 nA at 70 °C, 64 nA at 85 °C, 1.024 µA at 125 °C.
    #[test]
    fn gate_leakage_doubles_every_ten_degrees() {
        let c = TempCoeffs {
            igss_a: Some(1e-9),
            ..TempCoeffs::default_for(Family::NJfet)
        };
        close(c.gate_leakage_a(25.0), 1e-9, 1e-12, "25 °C");
        close(c.gate_leakage_a(70.0), 22.63e-9, 2e-4, "70 °C");
        close(c.gate_leakage_a(85.0), 64e-9, 1e-12, "85 °C");
        close(c.gate_leakage_a(125.0), 1.024e-6, 1e-12, "125 °C");
        assert_eq!(
            TempCoeffs::default_for(Family::NJfet).gate_leakage_a(85.0),
            0.0
        );
        // Its offset across a 1 MΩ gate resistor in the §1.4 circuit at
        // 85 °C: ngspice-39 with 64 nA injected into the gate prints v(g)
        // 64.03 mV and ID 1.935925 mA (+40.25 µA); by hand ΔID ≈
        // gm·ΔVG/(1 + gm·RS) = 40.17 µA (gm 1.685525 mS, RS 1 kΩ).
        let lib = TempCoeffs::default_for(Family::NJfet);
        let law = at_27(&lib, &jfet(8e-3, -4.0), 85.0);
        let id_at = |vg: f64| {
            BiasNetwork {
                gate: Gate::Fixed(vg),
                source_rail_v: 0.0,
                rs_ohm: 1e3,
                drain_rail_v: 15.0,
                rd_ohm: 4.7e3,
            }
            .solve(&law)
            .id_a
        };
        let offset = c.gate_leakage_a(85.0) * 1e6;
        close(id_at(64.03e-3), 1.935925e-3, 2e-6, "ID with leakage");
        close(id_at(offset) - id_at(0.0), 40.17e-6, 2e-3, "ΔID");
    }

    // REFERENCE-NEXT §8 (computed from the TCR definition, MIL-STD-202
    // Method 304 form): 10 kΩ ±1 %, ±100 ppm/°C, −40…85 °C (largest ΔT 65 °C)
    // → 10 165.65 Ω and 9 835.65 Ω.
    #[test]
    fn resistor_extremes_over_temperature() {
        let (lo, hi) = resistor_extremes(0.01, 100e-6, 90.0);
        close(10e3 * hi, 10_165.65, 1e-9, "Rmax");
        close(10e3 * lo, 9_835.65, 1e-9, "Rmin");
        let (lo, hi) = resistor_extremes(0.01, 100e-6, -40.0);
        close(10e3 * lo, 9_835.65, 1e-9, "Rmin cold");
        close(10e3 * hi, 10_165.65, 1e-9, "Rmax cold");
        assert_eq!(resistor_extremes(0.05, 200e-6, 25.0), (0.95, 1.05));
    }
}
