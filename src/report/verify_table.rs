//! `verify`: per device corner, the closed-form and solver values side by
//! side with their relative difference. Pure formatting: view in, text out.

use crate::bench::crosscheck::{Verification, REL_TOL};
use crate::units::format_sig;
use comfy_table::{presets, ContentArrangement, Table};

/// Significant figures shown: enough to see a 1e-6 relative difference.
const SIG: usize = 9;

fn value(v: f64, unit: &str) -> String {
    format!("{}{unit}", format_sig(v, SIG))
}

/// The comparison as text: a heading, one table per corner, and the
/// largest relative disagreement per quantity.
pub fn verification(v: &Verification, order: &[String]) -> String {
    let mut out = String::new();
    let values: Vec<String> = order
        .iter()
        .map(|d| {
            format!(
                "{d}={}",
                v.values
                    .get(d)
                    .map_or("?".to_string(), |x| crate::units::format_value(*x))
            )
        })
        .collect();
    out.push_str(&format!(
        "{} {} — closed form against the nodal solver, mid-band, nominal resistor values (agree within {:e} relative)\n",
        v.topology,
        values.join(" "),
        REL_TOL
    ));
    for c in &v.corners {
        out.push_str(&format!("\ncorner: {}\n", c.corner));
        if let Some(e) = &c.solver_error {
            out.push_str(&format!("  SOLVER FAILED: {e}\n"));
            continue;
        }
        let mut t = Table::new();
        t.load_preset(presets::ASCII_FULL_CONDENSED)
            .set_content_arrangement(ContentArrangement::Dynamic)
            .force_no_tty()
            .set_width(crate::report::table::WIDTH)
            .set_header(vec![
                "quantity",
                "closed form",
                "solver",
                "relative difference",
                "agrees",
            ]);
        for r in &c.rows {
            let unit = r.quantity.unit();
            let solver = if r.solver_im == 0.0 {
                value(r.solver, unit)
            } else {
                format!("{} {:+e}j", value(r.solver, unit), r.solver_im)
            };
            t.add_row(vec![
                r.quantity.name().to_string(),
                value(r.closed_form, unit),
                solver,
                format!("{:.2e}", r.relative),
                if r.agrees { "yes" } else { "NO" }.to_string(),
            ]);
        }
        out.push_str(&t.to_string());
        out.push('\n');
    }
    let largest: Vec<String> = v
        .largest
        .iter()
        .map(|l| format!("{} {:.2e}", l.quantity.name(), l.relative))
        .collect();
    out.push_str(&format!(
        "\nlargest relative difference: {}\n{}\n",
        largest.join(", "),
        if v.agrees {
            "verdict: the solver confirms the closed form at every corner"
        } else {
            "verdict: DISAGREEMENT — the closed form is not confirmed"
        }
    ));
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::bench::crosscheck::{Comparison, CornerCheck, Largest, Quantity};

    fn view(solver_id: f64) -> Verification {
        let rel = (solver_id - 2e-3_f64).abs() / 2e-3;
        Verification {
            topology: "self-bias".into(),
            values: [("RD".to_string(), 3.3e3), ("RS".to_string(), 1e3)]
                .into_iter()
                .collect(),
            tolerance: REL_TOL,
            agrees: rel <= REL_TOL,
            corners: vec![
                CornerCheck {
                    corner: "nominal".into(),
                    rows: vec![Comparison {
                        quantity: Quantity::Id,
                        closed_form: 2e-3,
                        solver: solver_id,
                        solver_im: 0.0,
                        relative: rel,
                        agrees: rel <= REL_TOL,
                    }],
                    solver_error: None,
                },
                CornerCheck {
                    corner: "idss=max".into(),
                    rows: vec![],
                    solver_error: Some("did not converge".into()),
                },
            ],
            largest: vec![Largest {
                quantity: Quantity::Id,
                relative: rel,
                corner: "nominal".into(),
            }],
        }
    }

    #[test]
    fn shows_both_values_the_difference_and_the_verdict() {
        let text = verification(&view(2.01e-3), &["RS".into(), "RD".into()]);
        assert!(text.starts_with("self-bias RS=1k RD=3.3k"), "{text}");
        assert!(text.contains("corner: nominal"), "{text}");
        assert!(
            text.contains("| ID       | 2mA         | 2.01mA |"),
            "{text}"
        );
        assert!(text.contains("5.00e-3"), "{text}");
        assert!(text.contains("| NO     |"), "{text}");
        assert!(
            text.contains("corner: idss=max\n  SOLVER FAILED: did not converge"),
            "{text}"
        );
        assert!(text.contains("verdict: DISAGREEMENT"), "{text}");
        let ok = verification(&view(2e-3), &["RS".into(), "RD".into()]);
        assert!(ok.contains("| yes    |"), "{ok}");
    }
}
