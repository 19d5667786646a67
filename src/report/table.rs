//! Terminal tables (comfy-table). Pure formatting: views in, text out.

use crate::bench::summary::{AnalysisView, DesignReport, PointView};
use crate::catalog::snap::{RatioPair, SnapResult};
use crate::units::{format_plain, format_sig, format_value};
use comfy_table::{presets, ContentArrangement, Table};

/// Width the tables are laid out for (fits a 120-column terminal).
pub const WIDTH: u16 = 120;

pub(crate) fn table(header: Vec<&str>) -> Table {
    let mut t = Table::new();
    t.load_preset(presets::ASCII_FULL_CONDENSED)
        .set_content_arrangement(ContentArrangement::Dynamic)
        .force_no_tty()
        .set_width(WIDTH)
        .set_header(header);
    t
}

fn q(v: f64, unit: &str) -> String {
    format!("{}{unit}", format_sig(v, 4))
}

/// The operating point at the nominal device and at every corner, one row
/// each (shared by `analyze` and the bench report).
pub(crate) fn corner_table(nominal: &PointView, corners: &[PointView]) -> Table {
    let mut t = table(vec![
        "corner",
        "ID",
        "VGS",
        "VDS",
        "VG",
        "VS",
        "VD",
        "gm",
        "gain",
        "Zin",
        "Zout",
        "saturated",
    ]);
    t.add_row(corner_row(nominal));
    for c in corners {
        t.add_row(corner_row(c));
    }
    t
}

fn corner_row(p: &PointView) -> Vec<String> {
    vec![
        p.label.clone(),
        q(p.id_a, "A"),
        q(p.vgs_v, "V"),
        q(p.vds_v, "V"),
        q(p.vg_v, "V"),
        q(p.vs_v, "V"),
        q(p.vd_v, "V"),
        q(p.gm_s, "S"),
        format_plain(p.gain, 4),
        q(p.zin_ohm, "Ω"),
        q(p.zout_ohm, "Ω"),
        p.off_saturation()
            .map_or_else(|| "yes".to_string(), |r| format!("NO ({r})")),
    ]
}

/// What the margins of `checks` are fractions of, one line per base
/// (in the order the checks come), under a heading line.
pub(super) fn margin_note(checks: &[crate::bench::summary::Check]) -> String {
    let mut groups: Vec<(&str, Vec<&str>)> = Vec::new();
    for c in checks {
        match groups.iter_mut().find(|g| g.0 == c.basis) {
            Some(g) => g.1.push(c.name),
            None => groups.push((&c.basis, vec![c.name])),
        }
    }
    let mut out = String::from("margin, as a fraction of:\n");
    for (basis, names) in groups {
        out.push_str(&format!("  {basis}: {}\n", names.join(", ")));
    }
    out
}

/// `analyze`: per-corner operating points, then the requirement checks.
pub fn analysis(v: &AnalysisView, order: &[&str]) -> String {
    let mut out = String::new();
    let values: Vec<String> = order
        .iter()
        .map(|d| {
            format!(
                "{d}={}",
                v.values
                    .get(*d)
                    .map_or("?".to_string(), |x| format_value(*x))
            )
        })
        .collect();
    out.push_str(&format!(
        "{} ({}): {}\n",
        v.topology,
        v.summary,
        values.join(" ")
    ));
    let mut nominal = v.nominal.clone();
    if v.nominal_is_midpoint {
        nominal.label = "nominal (midpoints)".to_string();
    }
    let t = corner_table(&nominal, &v.corners);
    out.push_str(&t.to_string());
    out.push('\n');
    if v.nominal_is_midpoint {
        out.push_str("note: no typ value given for some device parameter; nominal uses the midpoint of its range\n");
    }
    let mut c = table(vec![
        "requirement",
        "required",
        "worst case reached",
        "margin",
        "holds",
    ]);
    for ch in &v.checks {
        c.add_row(vec![
            ch.name.to_string(),
            ch.required.clone(),
            ch.achieved.clone(),
            format!("{:+.1} %", 100.0 * ch.margin),
            if ch.pass { "yes" } else { "NO" }.to_string(),
        ]);
    }
    out.push_str("worst case over every device corner and resistor-tolerance extreme:\n");
    out.push_str(&c.to_string());
    out.push('\n');
    out.push_str(&margin_note(&v.checks));
    let failing: Vec<&str> = v
        .checks
        .iter()
        .filter(|c| !c.pass)
        .map(|c| c.name)
        .collect();
    if failing.is_empty() {
        out.push_str("meets the specification at every corner\n");
    } else {
        out.push_str(&format!(
            "does NOT meet the specification: {}\n",
            failing.join(", ")
        ));
    }
    out
}

/// The banner line of every nominal-mode text output.
pub(crate) fn nominal_banner() -> String {
    format!(
        "*** {}: {}\n",
        crate::bench::summary::NOMINAL_ONLY.to_uppercase(),
        crate::bench::summary::NOMINAL_ONLY_WHY
    )
}

/// `design`: the ranked designs with their trade-offs, then the rejected
/// topologies and the cautions.
pub fn design(r: &DesignReport) -> String {
    let mut out = String::new();
    if r.mode_note.is_some() {
        out.push_str(&nominal_banner());
    }
    out.push_str(&format!(
        "{} — {} values, {}\n",
        super::printable(&r.name),
        super::printable(&r.series),
        if r.mode_note.is_some() {
            crate::bench::summary::NOMINAL_ONLY
        } else {
            "worst-case check"
        }
    ));
    for c in &r.cautions {
        out.push_str(&format!("{c}\n"));
    }
    if !r.designs.is_empty() {
        let mut t = table(vec![
            "#",
            "topology",
            "values (Ω)",
            "gain\nmin\nnom\nmax",
            "Zin",
            "Zout",
            "ID\nmin\nmax",
            "VDS min",
            "power",
            "parts",
        ]);
        for d in &r.designs {
            let vals: Vec<String> = d
                .part_order
                .iter()
                .map(|k| {
                    format!(
                        "{k}={}",
                        d.values
                            .get(k)
                            .map_or("?".to_string(), |x| format_value(*x))
                    )
                })
                .collect();
            t.add_row(vec![
                d.rank.to_string(),
                d.topology.clone(),
                vals.join("\n"),
                format!(
                    "{}\n{}\n{}",
                    format_plain(d.gain.min, 3),
                    format_plain(d.gain.nominal, 3),
                    format_plain(d.gain.max, 3)
                ),
                q(d.zin_ohm, "Ω"),
                q(d.zout_ohm, "Ω"),
                format!(
                    "{}A\n{}A",
                    format_sig(d.id_a.min, 3),
                    format_sig(d.id_a.max, 3)
                ),
                q(d.vds_v.min, "V"),
                q(d.power_w, "W"),
                d.parts.to_string(),
            ]);
        }
        out.push_str(&t.to_string());
        out.push('\n');
    }
    let relevant: Vec<_> = r
        .infeasible
        .iter()
        .filter(|x| x.binding != "device.family")
        .collect();
    if !relevant.is_empty() {
        out.push_str(if r.designs.is_empty() {
            "no feasible design; per topology:\n"
        } else {
            "topologies without a feasible design:\n"
        });
        for x in relevant {
            out.push_str(&format!("  {}\n", x.reason));
        }
    }
    let other = r
        .infeasible
        .iter()
        .filter(|x| x.binding == "device.family")
        .count();
    if other > 0 {
        out.push_str(&format!(
            "({other} topologies do not apply to this device family)\n"
        ));
    }
    out
}

/// `snap VALUE...`: neighbours in the series.
pub fn snap(rows: &[SnapResult]) -> String {
    let mut t = table(vec![
        "value", "series", "below", "above", "nearest", "error",
    ]);
    let o = |x: Option<f64>| x.map_or("-".to_string(), format_value);
    for r in rows {
        t.add_row(vec![
            format_value(r.value_ohm),
            r.series.clone(),
            o(r.below_ohm),
            o(r.above_ohm),
            format_value(r.nearest_ohm),
            format!("{:+.2} %", 100.0 * r.error),
        ]);
    }
    format!("{t}\n")
}

/// `snap --ratio`: divider pairs.
pub fn ratio(rows: &[RatioPair], wanted: f64) -> String {
    let mut t = table(vec![
        "R1 (upper)",
        "R2 (lower)",
        "total",
        "R2/(R1+R2)",
        "error",
    ]);
    for r in rows {
        t.add_row(vec![
            format_value(r.r1_ohm),
            format_value(r.r2_ohm),
            format_value(r.total_ohm),
            format_plain(r.ratio, 6),
            format!("{:+.3} %", 100.0 * r.error),
        ]);
    }
    format!(
        "divider ratio R2/(R1+R2) = {}\n{t}\n",
        format_plain(wanted, 6)
    )
}
