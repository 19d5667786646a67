//! The schematic of a design, drawn from its netlist.
//!
//! Layout by node role, using the node names every topology uses: the VDD
//! rail across the top; the FET in the middle with its drain node `d` above
//! and its source nodes `s`, `sx` below in one column; the gate nodes `g`,
//! `gb` in a column to its left; the signal source (`sig`, `src`) on the row
//! of the input node, left of the gate column (or, when the input is the
//! source, between the gate column and the FET); the output node `out` and
//! RL on the right. Ground is drawn as a symbol at the foot of each grounded
//! part and VSS, when present, as a rail along the bottom.
//!
//! A part from a node to a rail hangs vertically from the node; several
//! from one node fan out into side-by-side columns (leftwards for the gate
//! nodes, rightwards for the others). A part between two nodes is drawn on
//! the straight line between them, or on an L (horizontal at the upper
//! node's height, then down) when they share neither row nor column.

use super::symbols::{Anchor, Canvas, Pt};
use crate::netlist::{Element, FetKind, Netlist, Node, GROUND};
use crate::units::format_value;

const Y_VDD: i32 = 80;
const Y_D: i32 = 160;
const Y_Q: i32 = 230;
const Y_S: i32 = 300;
const Y_SX: i32 = 380;
const Y_GND: i32 = 460;
const Y_VSS: i32 = 510;
/// Distance between side-by-side columns of parts hanging from one node.
const STEP: i32 = 80;
/// Room for a horizontal part with its leads.
const SPAN: i32 = 110;

/// The schematic of any netlist built from the node names above. Capacitor
/// values are printed only for the designators in `sized_caps`.
pub fn netlist_svg(net: &Netlist, title: &str, subtitle: &str, sized_caps: &[&str]) -> String {
    let l = Layout::new(net);
    let mut c = Canvas::default();
    c.text(
        (20, 28),
        &crate::report::printable(title),
        Anchor::Start,
        16,
        true,
    );
    c.text((20, 48), subtitle, Anchor::Start, 12, false);
    let mut drops_done = vec![(0usize, 0usize); net.nodes.len()];
    let mut vdd_x: Vec<i32> = Vec::new();
    let mut vss_x: Vec<i32> = Vec::new();
    for e in &net.elements {
        let (a, b) = match e {
            Element::Resistor { a, b, .. } | Element::Capacitor { a, b, .. } => (*a, *b),
            Element::VoltageSource { pos, neg, .. } => {
                if l.rail(*pos).is_some() {
                    continue;
                }
                (*pos, *neg)
            }
            Element::Fet {
                d,
                g,
                s,
                kind,
                law,
                name,
            } => {
                draw_fet(&mut c, &l, (*d, *g, *s), *kind, law.vto_v > 0.0, name);
                if l.rail(*d) == Some(Rail::Vdd) {
                    vdd_x.push(l.x_d);
                }
                continue;
            }
        };
        let (label, sym) = label_of(e, sized_caps);
        match (l.rail(a), l.rail(b)) {
            (Some(r), None) | (None, Some(r)) => {
                let n = if l.rail(a).is_some() { b } else { a };
                let (up, down) = &mut drops_done[n];
                let k = if r == Rail::Vdd { up } else { down };
                let col = l.drop_column(n, *k);
                *k += 1;
                let home = l.pos(n);
                c.wire(home, (col, home.1));
                let foot = match r {
                    Rail::Vdd => {
                        vdd_x.push(col);
                        (col, Y_VDD)
                    }
                    Rail::Ground => {
                        c.ground((col, Y_GND));
                        (col, Y_GND)
                    }
                    Rail::Vss => {
                        vss_x.push(col);
                        (col, Y_VSS)
                    }
                };
                let top = if foot.1 < home.1 { foot } else { (col, home.1) };
                let bottom = if foot.1 < home.1 { (col, home.1) } else { foot };
                let centre = (col, (top.1 + bottom.1) / 2);
                draw_part(&mut c, sym, top, bottom, centre, &label);
            }
            (None, None) => {
                let (pa, pb) = (l.pos(a), l.pos(b));
                if pa.0 == pb.0 || pa.1 == pb.1 {
                    let centre = if pa.1 == pb.1 {
                        let (left, right) = if pa.0 <= pb.0 { (a, b) } else { (b, a) };
                        let free_left = l.pos(left).0 + l.right_fan(left);
                        let right_x = l.pos(right).0;
                        let mut x = (free_left + right_x) / 2;
                        if free_left < l.x_f && right_x >= l.x_d {
                            // Keep the symbol clear of the FET it passes under.
                            x = x.min(l.x_f - 45);
                        }
                        (x, pa.1)
                    } else {
                        (pa.0, (pa.1 + pb.1) / 2)
                    };
                    draw_part(&mut c, sym, pa, pb, centre, &label);
                } else {
                    let (upper, lower) = if pa.1 < pb.1 { (pa, pb) } else { (pb, pa) };
                    let corner = (lower.0, upper.1);
                    let centre = ((upper.0 + corner.0) / 2, upper.1);
                    draw_part(&mut c, sym, upper, corner, centre, &label);
                    c.wire(corner, lower);
                }
            }
            (Some(_), Some(_)) => {}
        }
    }
    if let Some(v) = l.vdd_v {
        rail_line(
            &mut c,
            &vdd_x,
            Y_VDD,
            &format!("VDD {}", signed_volts(v)),
            false,
        );
    }
    if let Some(v) = l.vss_v {
        rail_line(
            &mut c,
            &vss_x,
            Y_VSS,
            &format!("VSS {}", signed_volts(v)),
            true,
        );
    }
    if net.output != GROUND {
        let o = l.pos(net.output);
        c.text((o.0 + 8, o.1 - 8), "out", Anchor::Start, 12, false);
    }
    let (w, h) = c.extent;
    c.finish(w + 30, h + 20)
}

/// `+15 V`, `−10 V`.
fn signed_volts(v: f64) -> String {
    let mag = format_value(v.abs());
    if v < 0.0 {
        format!("\u{2212}{mag} V")
    } else {
        format!("+{mag} V")
    }
}

fn rail_line(c: &mut Canvas, xs: &[i32], y: i32, label: &str, below: bool) {
    let (Some(&x0), Some(&x1)) = (xs.iter().min(), xs.iter().max()) else {
        return;
    };
    c.rail(x0 - 30, x1 + 30, y, label, below);
}

#[derive(Clone, Copy, PartialEq, Eq)]
enum Rail {
    Vdd,
    Vss,
    Ground,
}

#[derive(Clone, Copy)]
enum Sym {
    Resistor,
    Capacitor,
    Source,
}

/// Designator and value lines, and the symbol.
fn label_of(e: &Element, sized_caps: &[&str]) -> ([String; 2], Sym) {
    match e {
        Element::Resistor { name, ohms, .. } => (
            [name.clone(), format!("{}Ω", format_value(*ohms))],
            Sym::Resistor,
        ),
        Element::Capacitor { name, farads, .. } => {
            let value = if sized_caps.contains(&name.as_str()) {
                format!("{}F", format_value(*farads))
            } else {
                String::new()
            };
            ([name.clone(), value], Sym::Capacitor)
        }
        Element::VoltageSource { name, .. } => ([name.clone(), "signal".to_string()], Sym::Source),
        Element::Fet { name, .. } => ([name.clone(), String::new()], Sym::Resistor),
    }
}

fn draw_part(c: &mut Canvas, sym: Sym, a: Pt, b: Pt, centre: Pt, label: &[String; 2]) {
    match sym {
        Sym::Resistor => c.resistor(a, b, centre),
        Sym::Capacitor => c.capacitor(a, b, centre),
        Sym::Source => c.source(a, b, centre),
    }
    let vertical = a.0 == b.0;
    if vertical {
        let dx = if matches!(sym, Sym::Source) { 22 } else { 18 };
        c.text(
            (centre.0 + dx, centre.1 - 3),
            &label[0],
            Anchor::Start,
            12,
            true,
        );
        c.text(
            (centre.0 + dx, centre.1 + 12),
            &label[1],
            Anchor::Start,
            12,
            false,
        );
    } else {
        c.text(
            (centre.0, centre.1 - 20),
            &label[0],
            Anchor::Middle,
            12,
            true,
        );
        c.text(
            (centre.0, centre.1 + 30),
            &label[1],
            Anchor::Middle,
            12,
            false,
        );
    }
}

fn draw_fet(
    c: &mut Canvas,
    l: &Layout,
    (d, g, s): (Node, Node, Node),
    kind: FetKind,
    enh: bool,
    name: &str,
) {
    let gate = (l.x_f, Y_Q);
    c.fet(gate, kind == FetKind::NJfet, enh);
    c.wire(l.pos(g), gate);
    let (top, bottom) = ((l.x_d, Y_Q - 40), (l.x_d, Y_Q + 40));
    match l.rail(d) {
        Some(Rail::Vdd) => c.wire(top, (l.x_d, Y_VDD)),
        _ => c.wire(top, l.pos(d)),
    }
    match l.rail(s) {
        Some(Rail::Ground) => {
            c.wire(bottom, (l.x_d, Y_GND));
            c.ground((l.x_d, Y_GND));
        }
        Some(Rail::Vss) => c.wire(bottom, (l.x_d, Y_VSS)),
        _ => c.wire(bottom, l.pos(s)),
    }
    let what = match (kind, enh) {
        (FetKind::NJfet, _) => "n-JFET",
        (FetKind::NMos, true) => "n-MOSFET, enh.",
        (FetKind::NMos, false) => "n-MOSFET, depl.",
    };
    c.text((l.x_d + 12, Y_Q - 2), name, Anchor::Start, 12, true);
    c.text((l.x_d + 12, Y_Q + 13), what, Anchor::Start, 12, false);
}

/// Node positions and columns.
struct Layout {
    names: Vec<String>,
    pos: Vec<Pt>,
    /// Parts hanging up (to VDD) and down (to ground or VSS) from each node.
    fan: Vec<(i32, i32)>,
    x_f: i32,
    x_d: i32,
    vdd_v: Option<f64>,
    vss_v: Option<f64>,
}

impl Layout {
    fn new(net: &Netlist) -> Layout {
        let names = net.nodes.clone();
        let n = names.len();
        let name_of = |i: Node| names.get(i).map_or("", |s| s.as_str());
        let rail_of = |i: Node| match name_of(i) {
            _ if i == GROUND => Some(Rail::Ground),
            "vdd" => Some(Rail::Vdd),
            "vss" => Some(Rail::Vss),
            _ => None,
        };
        let mut fan = vec![(0, 0); n];
        let mut vdd_v = None;
        let mut vss_v = None;
        for e in &net.elements {
            let (a, b) = match e {
                Element::Resistor { a, b, .. } | Element::Capacitor { a, b, .. } => (*a, *b),
                Element::VoltageSource { pos, neg, dc_v, .. } => {
                    match rail_of(*pos) {
                        Some(Rail::Vdd) => vdd_v = Some(*dc_v),
                        Some(Rail::Vss) => vss_v = Some(*dc_v),
                        _ => {}
                    }
                    (*pos, *neg)
                }
                Element::Fet { .. } => continue,
            };
            let (ra, rb) = (rail_of(a), rail_of(b));
            let (node, rail) = match (ra, rb) {
                (Some(r), None) => (b, r),
                (None, Some(r)) => (a, r),
                _ => continue,
            };
            if let Some(f) = fan.get_mut(node) {
                if rail == Rail::Vdd {
                    f.0 += 1;
                } else {
                    f.1 += 1;
                }
            }
        }
        let find = |s: &str| names.iter().position(|x| x == s);
        let width = |i: Option<Node>| -> i32 {
            i.and_then(|i| fan.get(i))
                .map_or(0, |&(u, d)| (u.max(d) - 1).max(0) * STEP)
        };
        let gate_fan = width(find("g")).max(width(find("gb")));
        let right_fan = width(find("s"))
            .max(width(find("sx")))
            .max(width(find("d")));
        let input_at_gate = name_of(net.input) != "s";
        let has_src = find("src").is_some();
        let chain = |x0: i32| -> (i32, i32, i32) {
            let sig = x0 + 20;
            let src = if has_src { sig + SPAN } else { sig };
            (sig, src, src + SPAN)
        };
        let (x_sig, x_src, x_g, chain_end) = if input_at_gate {
            let (sig, src, end) = chain(40);
            (sig, src, end + 20 + gate_fan, end)
        } else {
            let x_g = 60 + gate_fan;
            // Clear of the gate column's labels.
            let (sig, src, end) = chain(x_g + 70);
            (sig, src, x_g, end)
        };
        let x_f = x_g.max(chain_end) + 60;
        let x_d = x_f + 50;
        let x_out = x_d + right_fan + SPAN + 60;
        let y_in = if input_at_gate { Y_Q } else { Y_S };
        let out_src = net
            .elements
            .iter()
            .find_map(|e| match e {
                Element::Capacitor { a, b, .. } if *b == net.output => Some(*a),
                Element::Capacitor { a, b, .. } if *a == net.output => Some(*b),
                _ => None,
            })
            .map_or("d", name_of);
        let y_out = if out_src == "s" { Y_S } else { Y_D };
        let mut spare = x_out + STEP;
        let pos = (0..n)
            .map(|i| match name_of(i) {
                "g" => (x_g, Y_Q),
                "gb" => (x_g, Y_SX),
                "d" => (x_d, Y_D),
                "s" => (x_d, Y_S),
                "sx" => (x_d, Y_SX),
                "sig" => (x_sig, y_in),
                "src" => (x_src, y_in),
                "out" => (x_out, y_out),
                "vdd" => (x_d, Y_VDD),
                "vss" => (x_d, Y_VSS),
                _ if i == GROUND => (x_d, Y_GND),
                _ => {
                    spare += STEP;
                    (spare, Y_SX)
                }
            })
            .collect();
        Layout {
            names,
            pos,
            fan,
            x_f,
            x_d,
            vdd_v,
            vss_v,
        }
    }

    fn pos(&self, n: Node) -> Pt {
        self.pos.get(n).copied().unwrap_or((0, 0))
    }

    fn rail(&self, n: Node) -> Option<Rail> {
        if n == GROUND {
            return Some(Rail::Ground);
        }
        match self.names.get(n).map(|s| s.as_str()) {
            Some("vdd") => Some(Rail::Vdd),
            Some("vss") => Some(Rail::Vss),
            _ => None,
        }
    }

    /// True for the gate nodes, whose parts fan out leftwards.
    fn fans_left(&self, n: Node) -> bool {
        matches!(self.names.get(n).map(|s| s.as_str()), Some("g" | "gb"))
    }

    /// Column of the `k`-th part hanging from node `n`.
    fn drop_column(&self, n: Node, k: usize) -> i32 {
        let step = if self.fans_left(n) { -STEP } else { STEP };
        self.pos(n).0 + step * k as i32
    }

    /// How far right of node `n` its hanging parts reach, pixels.
    fn right_fan(&self, n: Node) -> i32 {
        if self.fans_left(n) {
            return 0;
        }
        self.fan
            .get(n)
            .map_or(0, |&(u, d)| (u.max(d) - 1).max(0) * STEP)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn signed_volts_use_a_true_minus() {
        assert_eq!(signed_volts(15.0), "+15 V");
        assert_eq!(signed_volts(-10.0), "\u{2212}10 V");
    }
}
