//! Starts the desktop app on an optional design file (for development, until the main
//! binary's subcommand opens it).
fn main() -> anyhow::Result<()> {
    bowgrip::app::run(std::env::args().nth(1).map(Into::into))
}
