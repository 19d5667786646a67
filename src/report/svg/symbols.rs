//! Drawing primitives for the schematic: wires, IEC-style resistor boxes,
//! capacitor plates, the signal source, ground, and the FET symbols, all
//! on integer coordinates so the output is byte-for-byte stable.
//!
//! Wires are kept as segments so junction dots can be found where three or
//! more wire arms meet; symbols are drawn at once.

use ::svg::node::element::{Circle, Line, Path, Polygon, Rectangle, Text};
use ::svg::Node;

/// A point in picture coordinates (pixels, y down).
pub(crate) type Pt = (i32, i32);

/// Length of a resistor or capacitor body along its axis, pixels.
pub(crate) const BODY: i32 = 40;

/// The picture under construction: wire segments, symbol nodes and text.
#[derive(Default)]
pub(crate) struct Canvas {
    wires: Vec<(Pt, Pt)>,
    shapes: Vec<Box<dyn Node>>,
    texts: Vec<Box<dyn Node>>,
    /// Largest x and y touched, for the picture size.
    pub(crate) extent: Pt,
}

/// How text sits on its anchor point.
#[derive(Clone, Copy)]
pub(crate) enum Anchor {
    Start,
    Middle,
}

impl Canvas {
    fn touch(&mut self, p: Pt) {
        self.extent = (self.extent.0.max(p.0), self.extent.1.max(p.1));
    }

    /// A wire between two points (axis-aligned in every use here).
    pub(crate) fn wire(&mut self, a: Pt, b: Pt) {
        if a != b {
            self.touch(a);
            self.touch(b);
            self.wires.push((a, b));
        }
    }

    fn shape<T: Node>(&mut self, n: T) {
        self.shapes.push(Box::new(n));
    }

    /// Text at a point, 12 px unless `size` says otherwise.
    pub(crate) fn text(&mut self, at: Pt, s: &str, anchor: Anchor, size: u32, bold: bool) {
        // Rough width for the picture size: 0.6 em per character.
        let w = (s.chars().count() as i32 * size as i32 * 6) / 10;
        let right = match anchor {
            Anchor::Start => at.0 + w,
            Anchor::Middle => at.0 + w / 2,
        };
        self.touch((right, at.1 + 4));
        let mut t = Text::new(s)
            .set("x", at.0)
            .set("y", at.1)
            .set("font-size", size);
        t = match anchor {
            Anchor::Start => t,
            Anchor::Middle => t.set("text-anchor", "middle"),
        };
        if bold {
            t = t.set("font-weight", "bold");
        }
        self.texts.push(Box::new(t));
    }

    /// A resistor (IEC 60617 box) with its body centred on `c`, with leads
    /// to `a` and `b`, which lie on one vertical or horizontal line with `c`.
    pub(crate) fn resistor(&mut self, a: Pt, b: Pt, c: Pt) {
        let vertical = a.0 == b.0;
        let (w, h) = if vertical { (14, BODY) } else { (BODY, 14) };
        self.leads(a, b, c, BODY / 2);
        self.shape(
            Rectangle::new()
                .set("x", c.0 - w / 2)
                .set("y", c.1 - h / 2)
                .set("width", w)
                .set("height", h)
                .set("fill", "white")
                .set("stroke", "black")
                .set("stroke-width", 1.5),
        );
    }

    /// A capacitor (two plates 8 px apart) centred on `c`, leads to `a`, `b`.
    pub(crate) fn capacitor(&mut self, a: Pt, b: Pt, c: Pt) {
        let vertical = a.0 == b.0;
        self.leads(a, b, c, 4);
        for side in [-4, 4] {
            let (p, q) = if vertical {
                ((c.0 - 14, c.1 + side), (c.0 + 14, c.1 + side))
            } else {
                ((c.0 + side, c.1 - 14), (c.0 + side, c.1 + 14))
            };
            self.shape(line(p, q, 2.5));
        }
    }

    /// The signal source: a circle with a sine inside, centred on `c`.
    pub(crate) fn source(&mut self, a: Pt, b: Pt, c: Pt) {
        self.leads(a, b, c, 16);
        self.shape(
            Circle::new()
                .set("cx", c.0)
                .set("cy", c.1)
                .set("r", 16)
                .set("fill", "white")
                .set("stroke", "black")
                .set("stroke-width", 1.5),
        );
        let d = format!(
            "M{} {} C{} {} {} {} {} {} S{} {} {} {}",
            c.0 - 9,
            c.1,
            c.0 - 6,
            c.1 - 9,
            c.0 - 2,
            c.1 - 9,
            c.0,
            c.1,
            c.0 + 6,
            c.1 + 9,
            c.0 + 9,
            c.1
        );
        self.shape(stroked_path(&d, 1.5));
    }

    /// Leads from `a` and `b` to the body of half-length `half` at `c`.
    fn leads(&mut self, a: Pt, b: Pt, c: Pt, half: i32) {
        let vertical = a.0 == b.0;
        let toward = |p: Pt| -> Pt {
            if vertical {
                (c.0, c.1 + half * (p.1 - c.1).signum())
            } else {
                (c.0 + half * (p.0 - c.0).signum(), c.1)
            }
        };
        self.wire(a, toward(a));
        self.wire(b, toward(b));
    }

    /// A ground symbol hanging below `p`.
    pub(crate) fn ground(&mut self, p: Pt) {
        for (i, half) in [12, 8, 4].into_iter().enumerate() {
            let y = p.1 + 5 * i as i32;
            self.shape(line((p.0 - half, y), (p.0 + half, y), 1.5));
        }
        self.touch((p.0 + 12, p.1 + 12));
    }

    /// A supply rail: a thick horizontal line with its name and voltage.
    pub(crate) fn rail(&mut self, x0: i32, x1: i32, y: i32, label: &str, label_below: bool) {
        self.shape(line((x0, y), (x1, y), 2.5));
        self.touch((x1, y));
        let ty = if label_below { y + 18 } else { y - 8 };
        self.text((x0, ty), label, Anchor::Start, 12, true);
    }

    /// An n-channel FET with its gate terminal at `gate` and its drain and
    /// source terminals at `(gate.0 + 50, gate.1 ∓ 40)`. `jfet` picks the
    /// junction symbol (gate arrow into the channel); otherwise a MOSFET with
    /// an insulated gate, a broken channel when `enhancement`, and the body
    /// arrow pointing in, tied to the source.
    pub(crate) fn fet(&mut self, gate: Pt, jfet: bool, enhancement: bool) {
        let (x, y) = gate;
        let xd = x + 50;
        let add_path = |c: &mut Canvas, d: String, w: f64| c.shape(stroked_path(&d, w));
        if jfet {
            let xc = x + 22;
            self.shape(line((xc, y - 28), (xc, y + 28), 3.0));
            add_path(self, format!("M{xc} {} H{xd} V{}", y - 20, y - 40), 1.5);
            add_path(self, format!("M{xc} {} H{xd} V{}", y + 20, y + 40), 1.5);
            self.shape(line((x, y), (xc, y), 1.5));
            self.shape(arrow((xc - 1, y), (xc - 10, y - 5), (xc - 10, y + 5)));
        } else {
            let (xg, xc) = (x + 14, x + 22);
            self.shape(line((x, y), (xg, y), 1.5));
            self.shape(line((xg, y - 22), (xg, y + 22), 2.0));
            if enhancement {
                for (a, b) in [(-28, -12), (-6, 6), (12, 28)] {
                    self.shape(line((xc, y + a), (xc, y + b), 3.0));
                }
            } else {
                self.shape(line((xc, y - 28), (xc, y + 28), 3.0));
            }
            add_path(self, format!("M{xc} {} H{xd} V{}", y - 20, y - 40), 1.5);
            add_path(self, format!("M{xc} {} H{xd} V{}", y + 20, y + 40), 1.5);
            add_path(self, format!("M{xc} {y} H{xd} V{}", y + 20), 1.5);
            self.shape(arrow((xc + 1, y), (xc + 10, y - 5), (xc + 10, y + 5)));
        }
        self.touch((xd, y + 40));
    }

    /// Junction dots where three or more wire arms meet: a segment ending at
    /// a point gives it one arm, a segment passing through gives two.
    fn junctions(&self) -> Vec<Pt> {
        let mut ends: Vec<Pt> = self.wires.iter().flat_map(|&(a, b)| [a, b]).collect();
        ends.sort_unstable();
        ends.dedup();
        ends.into_iter()
            .filter(|&p| {
                let arms: usize = self
                    .wires
                    .iter()
                    .map(|&(a, b)| {
                        if p == a || p == b {
                            1
                        } else if on_segment(p, a, b) {
                            2
                        } else {
                            0
                        }
                    })
                    .sum();
                arms >= 3
            })
            .collect()
    }

    /// The finished SVG document of the given size.
    pub(crate) fn finish(self, width: i32, height: i32) -> String {
        let mut wires = ::svg::node::element::Group::new()
            .set("stroke", "black")
            .set("stroke-width", 1.5)
            .set("stroke-linecap", "square");
        for &(a, b) in &self.wires {
            wires.append(line_plain(a, b));
        }
        let mut dots = ::svg::node::element::Group::new().set("fill", "black");
        for p in self.junctions() {
            dots.append(Circle::new().set("cx", p.0).set("cy", p.1).set("r", 3));
        }
        let mut shapes = ::svg::node::element::Group::new();
        for s in self.shapes {
            shapes.append(s);
        }
        let mut texts = ::svg::node::element::Group::new()
            .set("font-family", "sans-serif")
            .set("fill", "black");
        for t in self.texts {
            texts.append(t);
        }
        ::svg::Document::new()
            .set("width", width)
            .set("height", height)
            .set("viewBox", (0, 0, width, height))
            .add(
                Rectangle::new()
                    .set("x", 0)
                    .set("y", 0)
                    .set("width", width)
                    .set("height", height)
                    .set("fill", "white"),
            )
            .add(wires)
            .add(shapes)
            .add(dots)
            .add(texts)
            .to_string()
    }
}

fn on_segment(p: Pt, a: Pt, b: Pt) -> bool {
    let within = |v: i32, s: i32, t: i32| v >= s.min(t) && v <= s.max(t);
    (a.0 == b.0 && p.0 == a.0 && within(p.1, a.1, b.1))
        || (a.1 == b.1 && p.1 == a.1 && within(p.0, a.0, b.0))
}

fn line_plain(a: Pt, b: Pt) -> Line {
    Line::new()
        .set("x1", a.0)
        .set("y1", a.1)
        .set("x2", b.0)
        .set("y2", b.1)
}

fn line(a: Pt, b: Pt, width: f64) -> Line {
    line_plain(a, b)
        .set("stroke", "black")
        .set("stroke-width", width)
}

fn stroked_path(d: &str, width: f64) -> Path {
    Path::new()
        .set("d", d)
        .set("fill", "none")
        .set("stroke", "black")
        .set("stroke-width", width)
}

fn arrow(tip: Pt, b: Pt, c: Pt) -> Polygon {
    Polygon::new()
        .set(
            "points",
            format!("{},{} {},{} {},{}", tip.0, tip.1, b.0, b.1, c.0, c.1),
        )
        .set("fill", "black")
}
