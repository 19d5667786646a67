//! gatewright: discrete FET amplifier stages from requirements.
//!
//! Layers, each using only those above it:
//! `units`, `lines` → `catalog` → `device` → `spec`, `netlist` → `topology` →
//! `analysis` → `search` → `verify` → `rank` → `bench` (after synthesis:
//! `crosscheck`, `caps` sized and confirmed by `verify`, `ratings` and
//! cautions, `summary` and `view`: plain data) → `report` (formats only) →
//! `cli`.
//!
//! ```
//! use gatewright::topology::{by_id, evaluate, Rails};
//! use gatewright::device::SquareLaw;
//! // Self bias, IDSS 8 mA, VGS(off) −4 V, RS 1 kΩ: ID = 2 mA.
//! let law = SquareLaw { vto_v: -4.0, k_a_per_v2: 8e-3 / 16.0, lambda_per_v: 0.0 };
//! let t = by_id("self-bias").unwrap();
//! let e = evaluate(t, &[1e6, 1e3, 3.3e3], &Rails { vdd_v: 15.0, vss_v: 0.0 }, &law, 10e3, 0.0);
//! assert!((e.op.id_a - 2e-3).abs() < 1e-12);
//! ```

#![forbid(unsafe_code)]

pub mod analysis;
pub mod bench;
pub mod catalog;
pub mod cli;
pub mod device;
pub mod lines;
pub mod netlist;
pub mod rank;
pub mod report;
pub mod search;
pub mod signal;
pub mod spec;
pub mod topology;
pub mod units;
pub mod verify;
