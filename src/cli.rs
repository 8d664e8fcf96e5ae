//! The command line (placeholder until the CLI lands).
