//! The `bowgrip` binary: parses the command line and hands off to [`bowgrip::cli`], which
//! opens the desktop app or runs a sub-command. Errors are printed once, there.

use std::process::ExitCode;

use bowgrip::cli;

fn main() -> ExitCode {
    cli::install_panic_hook();
    let args = match cli::parse_args() {
        Ok(args) => args,
        Err(code) => return code,
    };
    match cli::run(args) {
        Ok(status) => status.into(),
        Err(e) => cli::report(&e),
    }
}
