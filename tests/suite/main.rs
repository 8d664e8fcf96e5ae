//! The one integration-test binary: cross-module and reference checks, each citing its source.
mod data_tables;
mod elliptic_reference;
mod small_gap;
mod cli;
