//! The `bowgrip` binary: parses the command line and hands off to [`bowgrip::cli`], which
//! opens the desktop app or runs a sub-command. Errors are printed once, there.

use std::process::ExitCode;

use bowgrip::cli;
use clap::CommandFactory;

fn main() -> ExitCode {
    cli::install_panic_hook();
    let args = match cli::parse_args() {
        Ok(args) => args,
        Err(code) => return code,
    };
    if args.command.is_none()
        && let Some(word) = args.file.as_deref().and_then(|f| f.to_str())
        && let Some(message) = not_a_sub_command(word)
    {
        eprintln!("bowgrip: {message}");
        return ExitCode::from(2);
    }
    match cli::run(args) {
        Ok(status) => status.into(),
        Err(e) => cli::report(&e),
    }
}

/// A bare word (no extension, no folder) that names no file here is a mistyped
/// sub-command, not a design to open in the app: say so, with the nearest names.
fn not_a_sub_command(word: &str) -> Option<String> {
    let bare = !word.contains(['.', '/', '\\']);
    if !bare || std::path::Path::new(word).exists() {
        return None;
    }
    let command = cli::Cli::command();
    let names: Vec<&str> = command
        .get_subcommands()
        .map(|c| c.get_name())
        .filter(|n| *n != "help")
        .collect();
    let near: Vec<&str> = names
        .iter()
        .copied()
        .filter(|n| edit_distance(&word.to_lowercase(), n) <= 2)
        .collect();
    let hint = match near.as_slice() {
        [] => String::new(),
        [one] => format!(" Did you mean '{one}'?"),
        many => format!(" Did you mean one of {}?", many.join(", ")),
    };
    Some(format!(
        "'{}' is not a sub-command, and no design file of that name is here.{hint} The sub-commands are {}; a design file to open ends in .ron.",
        word.chars()
            .map(|c| if c.is_control() { '?' } else { c })
            .collect::<String>(),
        names.join(", ")
    ))
}

/// Levenshtein distance: single-character insertions, deletions and substitutions.
fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut diagonal = row[0];
        row[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let next = (row[j + 1] + 1)
                .min(row[j] + 1)
                .min(diagonal + usize::from(ca != *cb));
            diagonal = row[j + 1];
            row[j + 1] = next;
        }
    }
    row[b.len()]
}
