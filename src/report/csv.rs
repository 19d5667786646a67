//! CSV of the ranked designs: one row per design, SI units.

use crate::bench::summary::DesignReport;

/// Header and one row per design; values as `designator=ohms` joined by `;`.
pub fn designs(r: &DesignReport) -> String {
    let mut out = String::from(
        "rank,topology,values,gain_min,gain_nominal,gain_max,zin_ohm,zout_ohm,id_min_a,id_nominal_a,id_max_a,vds_min_v,power_w,parts,score\n",
    );
    for d in &r.designs {
        let vals: Vec<String> = d
            .part_order
            .iter()
            .map(|k| format!("{k}={}", d.values.get(k).copied().unwrap_or(f64::NAN)))
            .collect();
        out.push_str(&format!(
            "{},{},{},{},{},{},{},{},{},{},{},{},{},{},{:.6}\n",
            d.rank,
            d.topology,
            vals.join(";"),
            d.gain.min,
            d.gain.nominal,
            d.gain.max,
            d.zin_ohm,
            d.zout_ohm,
            d.id_a.min,
            d.id_a.nominal,
            d.id_a.max,
            d.vds_v.min,
            d.power_w,
            d.parts,
            d.score
        ));
    }
    out
}
