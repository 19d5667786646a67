//! Generic device classes from `catalogs/devices.toml`.
