//! The one integration-test binary: cross-module and reference checks, each citing its source.
mod app;
mod calibration;
mod cli;
mod data_tables;
mod design_file;
mod elastica_reference;
mod elliptic_reference;
mod hostile;
mod inverse_queries;
mod map;
mod readme;
mod recovery;
mod scatter;
mod segment_model;
mod shared;
mod sheet;
mod small_gap;
