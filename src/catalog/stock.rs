//! In-house stock lists.
