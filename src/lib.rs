//! bowgrip: sizing of bowed-strip expanding segments (a ring of spring strips between two
//! end plates that bow out and grip a bore when the plates are drawn together).
//!
//! The mechanics (`elliptic`, `elastica`, `segment`, `checks`, and the data tables
//! `material`, `pipe`, `friction`) import nothing from the GUI, file dialogs or the PDF
//! writer. `design` is the RON design file; `cli`, `app` and `sheet` are the front ends.

pub mod actuation;
pub mod analysis;
pub mod app;
pub mod atomic;
pub mod bench_data;
pub mod bend;
pub mod calibrate;
pub mod checks;
pub mod cli;
pub mod compare;
pub mod design;
pub mod elastica;
pub mod elliptic;
pub mod fit;
pub mod friction;
pub mod map;
pub mod material;
pub mod pipe;
pub mod quantities;
pub mod scatter;
pub mod segment;
pub mod sharing;
pub mod sheet;
pub mod ticks;
pub mod units;
