//! The one integration-test binary: cross-module and reference checks, each citing its source.
mod cli;
mod data_tables;
mod elliptic_reference;
mod small_gap;
mod design_file;
mod segment_model;
mod elastica_reference;
mod hostile;
mod app;
mod sheet;
