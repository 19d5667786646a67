//! The FET as the nodal solver sees it: drain current and its two partial
//! derivatives at any terminal voltages, written here from the law's three
//! numbers (`vto`, `k`, `λ`) so the solver does not lean on the code it
//! checks.
//!
//! Forward mode (`VDS >= 0`) is the Shichman–Hodges square law (1968), the
//! same law as SPICE's JFET (`BETA = k`) and level-1 MOSFET (`KP = 2k`):
//! saturation `k·vov²·(1 + λ·VDS)`, triode `k·VDS·(2·vov − VDS)·(1 + λ·VDS)`,
//! cut-off 0, with `vov = VGS − vto`. Reverse mode (`VDS < 0`) swaps the roles
//! of drain and source, as SPICE does: `ID(VGS, VDS) = −f(VGD, −VDS)`. The
//! result is continuous with a continuous first derivative everywhere, which
//! Newton's method needs.

use crate::device::{Region, SquareLaw};

/// Current and small-signal derivatives at one bias, with the region.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Eval {
    /// Drain current, amps, positive into the drain.
    pub id_a: f64,
    /// `∂ID/∂VGS`, siemens.
    pub gm_s: f64,
    /// `∂ID/∂VDS`, siemens.
    pub gds_s: f64,
    /// Region of the channel (of the swapped device when `VDS < 0`).
    pub region: Region,
}

/// Forward mode, `vds_v >= 0`.
fn forward(law: &SquareLaw, vgs_v: f64, vds_v: f64) -> Eval {
    let k = law.k_a_per_v2;
    let lam = law.lambda_per_v;
    let vov = vgs_v - law.vto_v;
    if vov <= 0.0 {
        return Eval {
            id_a: 0.0,
            gm_s: 0.0,
            gds_s: 0.0,
            region: Region::Cutoff,
        };
    }
    let clm = 1.0 + lam * vds_v;
    if vds_v >= vov {
        Eval {
            id_a: k * vov * vov * clm,
            gm_s: 2.0 * k * vov * clm,
            gds_s: lam * k * vov * vov,
            region: Region::Saturation,
        }
    } else {
        let shape = vds_v * (2.0 * vov - vds_v);
        Eval {
            id_a: k * shape * clm,
            gm_s: 2.0 * k * vds_v * clm,
            gds_s: k * (2.0 * (vov - vds_v) * clm + lam * shape),
            region: Region::Triode,
        }
    }
}

/// The device at `VGS = vgs_v`, `VDS = vds_v` (either sign).
pub(crate) fn eval(law: &SquareLaw, vgs_v: f64, vds_v: f64) -> Eval {
    if vds_v >= 0.0 {
        return forward(law, vgs_v, vds_v);
    }
    // ID = −f(VGS − VDS, −VDS): ∂/∂VGS = −f₁, ∂/∂VDS = f₁ + f₂.
    let r = forward(law, vgs_v - vds_v, -vds_v);
    Eval {
        id_a: -r.id_a,
        gm_s: -r.gm_s,
        gds_s: r.gm_s + r.gds_s,
        region: r.region,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn law() -> SquareLaw {
        SquareLaw {
            vto_v: -2.5,
            k_a_per_v2: 1.2e-3,
            lambda_per_v: 0.03,
        }
    }

    // The forward branch must be the device module's law (Shichman–Hodges
    // 1968, as written in src/device): two independent codings of one law.
    #[test]
    fn forward_mode_is_the_device_law() {
        let l = law();
        for vgs in [-3.0, -2.5, -2.0, -1.0, 0.0, 1.5] {
            for vds in [0.0, 0.1, 0.5, 1.0, 2.5, 4.0, 12.0] {
                let e = eval(&l, vgs, vds);
                let scale = l.id(vgs, vds).abs().max(1e-12);
                assert!((e.id_a - l.id(vgs, vds)).abs() <= 1e-14 * scale);
                assert!((e.gm_s - l.gm(vgs, vds)).abs() <= 1e-14 * l.gm(vgs, vds).max(1e-9));
                assert!((e.gds_s - l.gds(vgs, vds)).abs() <= 1e-14 * l.gds(vgs, vds).max(1e-9));
                assert_eq!(e.region, l.region(vgs, vds));
            }
        }
    }

    // Exchanging drain and source reverses the current (a symmetric channel,
    // as SPICE's JFET and level-1 MOSFET treat it).
    #[test]
    fn reverse_mode_is_the_mirror_image() {
        let l = law();
        for (vg, vd, vs) in [(0.0, -1.0, 0.0), (-1.0, -3.0, 0.5), (0.0, 0.0, 2.0)] {
            let a = eval(&l, vg - vs, vd - vs);
            let b = eval(&l, vg - vd, vs - vd);
            assert!((a.id_a + b.id_a).abs() <= 1e-15, "{a:?} {b:?}");
        }
    }

    #[test]
    fn derivatives_match_central_differences_in_both_modes() {
        let l = law();
        let h = 1e-6;
        for (vgs, vds) in [
            (-1.0, 3.0),
            (-1.0, 0.4),
            (0.5, -0.7),
            (-1.0, -4.0),
            (0.0, -0.2),
        ] {
            let e = eval(&l, vgs, vds);
            let gm = (eval(&l, vgs + h, vds).id_a - eval(&l, vgs - h, vds).id_a) / (2.0 * h);
            let gds = (eval(&l, vgs, vds + h).id_a - eval(&l, vgs, vds - h).id_a) / (2.0 * h);
            assert!(
                (gm - e.gm_s).abs() < 1e-9,
                "gm at {vgs},{vds}: {gm} vs {}",
                e.gm_s
            );
            assert!(
                (gds - e.gds_s).abs() < 1e-9,
                "gds at {vgs},{vds}: {gds} vs {}",
                e.gds_s
            );
        }
    }

    #[test]
    fn slope_is_continuous_through_vds_zero() {
        let l = law();
        let a = eval(&l, -1.0, 1e-12);
        let b = eval(&l, -1.0, -1e-12);
        assert!((a.gds_s - b.gds_s).abs() < 1e-12);
        assert!((a.gm_s - b.gm_s).abs() < 1e-12);
    }
}
