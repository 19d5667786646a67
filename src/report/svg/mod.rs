//! SVG pictures of a chosen design: the schematic, the bias window (transfer
//! curves at every device corner with the bias line), and the frequency
//! response. Each is a pure function returning the SVG text; none writes a
//! file.
//!
//! Every picture has an opaque white background, black strokes and
//! sans-serif text, and is deterministic: the same input gives the same
//! bytes (integer or fixed-precision coordinates, no timestamps).
//!
//! The schematic is built with the `svg` crate (elements and attributes,
//! escaped, printed in a fixed order) because it is a drawing of symbols and
//! wires, not a chart. The two charts use `plotters` with its SVG backend,
//! which brings axes, ticks, log scales and legends ready-made.

pub mod bias;
pub mod response;
pub mod schematic;
mod symbols;

/// Colours for device corners and curves, in order (Okabe–Ito palette,
/// readable with the common colour-vision deficiencies), as RGB.
pub(crate) const PALETTE: [(u8, u8, u8); 8] = [
    (0, 114, 178),
    (213, 94, 0),
    (0, 158, 115),
    (204, 121, 167),
    (230, 159, 0),
    (86, 180, 233),
    (0, 0, 0),
    (240, 228, 66),
];

/// The charts are drawn at `SCALE` times their size and shown at their
/// size (the root element's width and height are the size, its viewBox the
/// drawn one): plotters writes whole-pixel coordinates, and a quarter of a
/// shown pixel is fine enough that a nearly flat curve shows no one-pixel
/// stairs.
pub(crate) const SCALE: u32 = 4;

/// Drawn length for a shown length, in pixels.
pub(crate) const fn px(shown: u32) -> u32 {
    shown * SCALE
}

/// Drawn length for a shown length, in pixels, signed.
pub(crate) const fn spx(shown: i32) -> i32 {
    shown * SCALE as i32
}

/// The chart drawn at `SCALE` shown at `width` × `height`.
pub(crate) fn shown_at(svg: String, width: u32, height: u32) -> String {
    let drawn = format!("width=\"{}\" height=\"{}\"", px(width), px(height));
    svg.replacen(&drawn, &format!("width=\"{width}\" height=\"{height}\""), 1)
}

/// Colour number `i`, cycling through [`PALETTE`].
pub(crate) fn colour(i: usize) -> (u8, u8, u8) {
    PALETTE[i % PALETTE.len()]
}

/// A plain picture saying why the real one could not be drawn, so a caller
/// always gets valid SVG.
pub(crate) fn fallback(width: u32, height: u32, title: &str, why: &str) -> String {
    use ::svg::node::element::{Rectangle, Text};
    let title = super::printable(title);
    let doc = ::svg::Document::new()
        .set("width", width)
        .set("height", height)
        .set("viewBox", (0, 0, width, height))
        .add(
            Rectangle::new()
                .set("width", "100%")
                .set("height", "100%")
                .set("fill", "white"),
        )
        .add(
            Text::new(title.as_ref())
                .set("x", 20)
                .set("y", 30)
                .set("font-family", "sans-serif")
                .set("font-size", 16),
        )
        .add(
            Text::new(why)
                .set("x", 20)
                .set("y", 60)
                .set("font-family", "sans-serif")
                .set("font-size", 13),
        );
    doc.to_string()
}
