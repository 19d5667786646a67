//! A design's SPICE deck as plain data: the nominal-device netlist with the
//! capacitors sized (for `f_low`, or the default corner), its title and
//! comment lines, the device corners to run after the nominal one, and the
//! frequency at which the deck prints the mid-band gain. `report::spice`
//! writes it.

use crate::analysis::Problem;
use crate::bench::caps::{size, DEFAULT_F_LOW_HZ};
use crate::bench::response::netlist;
use crate::bench::summary::{NOMINAL_ONLY, NOMINAL_ONLY_WHY};
use crate::bench::view::BenchError;
use crate::device::SquareLaw;
use crate::netlist::Netlist;
use crate::search::Design;

/// The deck prints the gain at this multiple of the corner the capacitors
/// are sized for, dimensionless: there every coupling and bypass pole and
/// zero is three decades or more below, so |gain| is the mid-band value to
/// about 1e-6 (each pole takes (f_pole/f)²/2).
pub const MID_BAND_FACTOR: f64 = 1e3;

/// Lowest frequency at which the deck prints the gain, hertz.
pub const MID_BAND_FLOOR_HZ: f64 = 1e3;

/// One device corner the deck runs after the nominal device.
#[derive(Debug, Clone, PartialEq)]
pub struct DeckCorner {
    /// The corner's label, e.g. `idss=min vgs_off=max`.
    pub label: String,
    /// The square law at the corner.
    pub law: SquareLaw,
}

/// A SPICE deck of one design.
#[derive(Debug, Clone, PartialEq)]
pub struct Deck {
    /// The title line.
    pub title: String,
    /// Comment lines after the title.
    pub comments: Vec<String>,
    /// The circuit at the nominal device, capacitors sized.
    pub netlist: Netlist,
    /// Corners the `.control` block runs after the nominal device (empty:
    /// the nominal device only).
    pub corners: Vec<DeckCorner>,
    /// Where the deck prints |gain|, hertz (mid-band).
    pub gain_hz: f64,
}

/// The deck of design `d` ranked `rank` for the specification named `name`;
/// with `corners` the `.control` block also runs every device corner; a
/// design of a `--nominal` run (`nominal_only`) says so first.
pub fn deck(
    p: &Problem,
    d: &Design,
    rank: usize,
    name: &str,
    corners: bool,
    nominal_only: bool,
) -> Result<Deck, BenchError> {
    let t = d.topology;
    let (f_low_hz, given) = match p.spec.f_low_hz {
        Some(f) => (f, true),
        None => (DEFAULT_F_LOW_HZ, false),
    };
    let plan = size(p, t, &d.values, &d.tolerances, f_low_hz)?;
    let caps_note = if given {
        format!("capacitors sized for f_low = {f_low_hz} Hz")
    } else {
        format!(
            "capacitors sized for the default corner {f_low_hz} Hz: the specification gives no [band] f_low"
        )
    };
    let gain_hz = (f_low_hz * MID_BAND_FACTOR).max(MID_BAND_FLOOR_HZ);
    let mut comments: Vec<String> = nominal_only
        .then(|| format!("{NOMINAL_ONLY}: {NOMINAL_ONLY_WHY}"))
        .into_iter()
        .collect();
    comments.extend([
        format!("{name}: design #{rank}, {}: {}", t.id(), t.summary()),
        caps_note,
        format!("nominal device first; |gain| = vm(out) at {gain_hz} Hz (mid-band)"),
    ]);
    let corner_list: Vec<DeckCorner> = if corners {
        comments.push(format!(
            "then each of the {} device corners, one `altermod` per model parameter",
            p.corners.len()
        ));
        p.corners
            .iter()
            .map(|c| DeckCorner {
                label: c.label.clone(),
                law: c.law,
            })
            .collect()
    } else {
        Vec::new()
    };
    Ok(Deck {
        title: format!("gatewright design #{rank} {}", t.id()),
        comments,
        netlist: netlist(p, t, &d.values, p.nominal.law, plan.values()),
        corners: corner_list,
        gain_hz,
    })
}
