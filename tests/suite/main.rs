//! The one integration-test binary: cross-module and reference checks, each citing its source.
