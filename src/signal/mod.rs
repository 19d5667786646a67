//! What decides whether a stage works on the bench beyond its bias point:
//! output swing, noise and distortion, from a topology's
//! [`SignalPath`](crate::topology::SignalPath), its operating point and
//! the device law.
//!
//! Each quantity is a pure function of one evaluated point; taking the
//! worst over corners, tolerances, supply and temperature is the caller's
//! job.
//!
//! This module must not know about searching, ranking or printing.

pub mod distortion;
pub mod network;
pub mod noise;
pub mod swing;

pub use network::Stage;
