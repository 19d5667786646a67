//! Integration tests.

mod verify_props;
