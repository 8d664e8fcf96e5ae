//! The desktop app (placeholder until the app lands).

use std::path::PathBuf;

/// Opens the app on `file`, or on the built-in default design.
pub fn run(file: Option<PathBuf>) -> anyhow::Result<()> {
    let _ = file;
    anyhow::bail!("the desktop app is not built yet")
}
