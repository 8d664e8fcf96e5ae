//! The command line: argument types, the five sub-commands (`point`, `sweep`, `bores`,
//! `check`, `sheet`) and the hand-off to the desktop app when no sub-command is given.
//!
//! Data goes to stdout (human tables by default, `--json` or `--csv` for scripts), every
//! message to stderr as one line. Exit status: 0 success, 1 when `check` finds a failing
//! check, 2 for bad input of any kind (a missing or malformed design file, a value out of
//! range, a bore the relaxed segment does not fit for `point`/`sweep`, a bad number on the
//! command line) and for anything else that stops a run, a failed write to stdout
//! included: a closed stdout (`| head -0`) is an error with status 2, named as stdout.

use std::fmt::Write as _;
use std::fs;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, anyhow, bail};
use clap::{Args, Parser, Subcommand, ValueEnum};

use crate::actuation::{self, Drive};
use crate::checks::{self, Check, CheckId, MarginUnit};
use crate::design::{self, Design, show_number};
use crate::quantities::{STATE_FIELDS, UsableStroke};
use crate::segment::{BORE_ROW_COLUMNS, BorePath, STATE_COLUMNS, Segment, SegmentState, csv_cell};
use crate::sharing;
use crate::sheet::{self, Paper};
use crate::units::{Quantity, UnitSystem};

/// Default number of strokes on a `sweep`.
pub const SWEEP_POINTS: usize = 200;

/// Largest bore diameter the command line takes, mm (a kilometre: far past any design,
/// well short of overflowing the geometry).
pub const MAX_BORE_MM: f64 = 1e6;

/// Most points `sweep` and `bores` accept.
pub const MAX_POINTS: usize = 100_000_000;

/// One line of caution printed under every human-readable table.
pub const CAUTION: &str = "Caution: bowed strips store spring energy and can snap; end plates pinch; \
pipe work brings confined-space and pressure hazards. These results are a design aid: \
follow local codes and licensed engineering practice.";

/// The command line of `bowgrip`.
#[derive(Debug, Parser)]
#[command(
    name = "bowgrip",
    version,
    about = "Size bowed-strip expanding segments: strips, stroke, grip and stress across a bore tolerance",
    long_about = "Size bowed-strip expanding segments: strips, stroke, grip and stress across a \
                  bore tolerance.\n\nWithout a sub-command the desktop app opens: on FILE, else on \
                  the last design you had open, else on a built-in demo design.",
    args_conflicts_with_subcommands = true,
    after_help = CAUTION
)]
pub struct Cli {
    /// Design file (.ron) to open in the app; without it the app reopens the last design
    /// (the built-in demo on a first start).
    pub file: Option<PathBuf>,
    /// Units of the printed numbers (tables, CSV, the sheet): mm (millimetre, newton, MPa,
    /// N m) or in (inch, pound-force, ksi, lbf in). JSON stays in the SI units its keys
    /// name, so `--units in` with `--json` is refused.
    #[arg(long, global = true, value_enum, default_value_t = UnitsArg::Mm)]
    pub units: UnitsArg,
    /// What to compute; none opens the app.
    #[command(subcommand)]
    pub command: Option<Command>,
}

/// The sub-commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// One state of the segment at a stroke: forces, diameter, flat run, stress.
    Point(PointArgs),
    /// The force-stroke curve at one bore, from rest to the model's limit or the actuator's
    /// maximum (of travel, through a compliant drive), whichever comes first.
    Sweep(SweepArgs),
    /// Strokes against bore: first contact, holding, stress limit, line contact and model
    /// limit for equally spaced bores.
    Bores(BoresArgs),
    /// Every design check with its margin and reason; exit status 1 when any fails.
    Check(CheckArgs),
    /// Write the printable sizing sheet (PDF).
    Sheet(SheetArgs),
    /// Bench measurements against the model: residuals, and with --fit the fitted
    /// correction factors with their standard errors.
    Compare(crate::compare::CompareArgs),
    /// The design map: two inputs over a grid, each design's limiting check and margin.
    Map(crate::map::command::MapArgs),
    /// What the shop's tolerances (the file's scatter section) do to every check: the
    /// probability of failing, margin percentiles, the worst case and sensitivities.
    Scatter(crate::scatter::command::ScatterArgs),
    /// Print a completion script for a shell, e.g. `bowgrip completions bash >
    /// ~/.local/share/bash-completion/completions/bowgrip`.
    Completions(CompletionsArgs),
}

/// Arguments of `point`.
#[derive(Debug, Args)]
pub struct PointArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// End-plate travel from rest, mm [default: the operating point at this bore: the set
    /// stroke, or the first stroke reaching the set pull or torque].
    #[arg(long = "stroke-mm", value_name = "MM", value_parser = stroke_mm, allow_negative_numbers = true)]
    pub stroke_mm: Option<f64>,
    /// Bore diameter, mm [default: the design's nominal bore].
    #[arg(long = "bore-mm", value_name = "MM", value_parser = bore_mm, allow_negative_numbers = true)]
    pub bore_mm: Option<f64>,
    /// Print one JSON object instead of a table.
    #[arg(long, conflicts_with = "csv")]
    pub json: bool,
    /// Print the strips as CSV instead of a table: one row per strip in order of clock angle
    /// from the top (clock_deg, gap_mm, phase, contact_force_n, axial_force_n, max_stress_mpa).
    #[arg(long)]
    pub csv: bool,
    /// Load sharing: what sits on the load line at the bottom [default: the governing case].
    #[arg(long, value_enum)]
    pub clocking: Option<ClockingArg>,
    /// Load sharing: the out-of-round bore's largest diameter [default: the governing case].
    #[arg(long = "major-axis", value_enum)]
    pub major_axis: Option<MajorAxisArg>,
}

/// Display units as spelled on the command line.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum UnitsArg {
    /// Millimetre, newton, MPa, N m.
    Mm,
    /// Inch, pound-force, ksi, lbf in.
    In,
}

impl From<UnitsArg> for UnitSystem {
    fn from(u: UnitsArg) -> UnitSystem {
        match u {
            UnitsArg::Mm => UnitSystem::Metric,
            UnitsArg::In => UnitSystem::Inch,
        }
    }
}

/// Arguments of `completions`.
#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell to complete for.
    #[arg(value_enum)]
    pub shell: ShellArg,
}

/// Shells `completions` writes a script for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ShellArg {
    /// GNU Bash.
    Bash,
    /// Z shell.
    Zsh,
    /// fish.
    Fish,
}

impl ShellArg {
    fn generator(self) -> clap_complete::Shell {
        match self {
            ShellArg::Bash => clap_complete::Shell::Bash,
            ShellArg::Zsh => clap_complete::Shell::Zsh,
            ShellArg::Fish => clap_complete::Shell::Fish,
        }
    }
}

/// `--clocking`: a strip, or the middle of a gap, at the bottom of the load line.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ClockingArg {
    /// A strip on the load line.
    Strip,
    /// The middle of a gap between two strips on the load line.
    Gap,
}

/// `--major-axis`: the largest diameter of an out-of-round bore.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum MajorAxisArg {
    /// Along the load (vertical).
    Vertical,
    /// Across the load (horizontal).
    Horizontal,
}

/// Arguments of `sweep`.
#[derive(Debug, Args)]
pub struct SweepArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// Bore diameter, mm [default: the design's nominal bore].
    #[arg(long = "bore-mm", value_name = "MM", value_parser = bore_mm, allow_negative_numbers = true)]
    pub bore_mm: Option<f64>,
    /// Number of strokes, both ends included.
    #[arg(long, value_name = "N", default_value_t = SWEEP_POINTS, value_parser = points, allow_negative_numbers = true)]
    pub points: usize,
    /// Print CSV with a header row instead of a table.
    #[arg(long, conflicts_with = "json")]
    pub csv: bool,
    /// JSON instead of the table: an array of objects keyed by the CSV's column names
    /// (empty cells are null)
    #[arg(long)]
    pub json: bool,
}

/// Arguments of `bores`.
#[derive(Debug, Args)]
pub struct BoresArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// First bore diameter, mm [default: the smallest bore of the design's tolerance].
    #[arg(long = "from-mm", value_name = "MM", value_parser = bore_mm, allow_negative_numbers = true)]
    pub from_mm: Option<f64>,
    /// Last bore diameter, mm (included) [default: the largest bore of the design's
    /// tolerance].
    #[arg(long = "to-mm", value_name = "MM", value_parser = bore_mm, allow_negative_numbers = true)]
    pub to_mm: Option<f64>,
    /// Number of bores, both ends included.
    #[arg(long, value_name = "N", default_value_t = BORES_POINTS, value_parser = points, allow_negative_numbers = true)]
    pub points: usize,
    /// Print CSV with a header row instead of a table.
    #[arg(long, conflicts_with = "json")]
    pub csv: bool,
    /// JSON instead of the table: an array of objects keyed by the CSV's column names
    /// (empty cells are null)
    #[arg(long)]
    pub json: bool,
}

/// Bores in a `bores` table when `--points` is not given.
const BORES_POINTS: usize = 21;

/// Arguments of `check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// Print one JSON object instead of a table.
    #[arg(long, conflicts_with = "csv")]
    pub json: bool,
    /// CSV instead of the table: one row per check (id, pass, margin, unit, bore_mm,
    /// stroke_mm, reason)
    #[arg(long)]
    pub csv: bool,
}

/// Arguments of `sheet`.
#[derive(Debug, Args)]
pub struct SheetArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// Where to write the PDF.
    #[arg(short = 'o', long = "output", value_name = "SHEET.pdf")]
    pub output: PathBuf,
    /// Paper size.
    #[arg(long, value_enum, default_value_t = PaperArg::A4)]
    pub paper: PaperArg,
    /// Add a design-map page: its horizontal axis, as `map --x` (FIELD:FROM:TO:N).
    #[arg(long = "map-x", value_name = "FIELD:FROM:TO:N", requires = "map_y", value_parser = crate::map::command::axis_spec, allow_hyphen_values = true)]
    pub map_x: Option<crate::map::AxisSpec>,
    /// The design-map page's vertical axis, as `map --y`.
    #[arg(long = "map-y", value_name = "FIELD:FROM:TO:N", requires = "map_x", value_parser = crate::map::command::axis_spec, allow_hyphen_values = true)]
    pub map_y: Option<crate::map::AxisSpec>,
    /// Bench measurements (CSV): adds a page with them over the model and the residuals.
    #[arg(long, value_name = "DATA.csv")]
    pub measured: Option<PathBuf>,
    /// With `--measured`: factors to fit and print, comma-separated: any of modulus,
    /// offset, length, friction.
    #[arg(long, value_name = "FACTORS", value_parser = crate::compare::fit_list, requires = "measured")]
    pub fit: Option<crate::compare::FitList>,
}

/// Paper sizes as spelled on the command line.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum PaperArg {
    /// ISO A4.
    A4,
    /// US Letter.
    Letter,
}

impl From<PaperArg> for Paper {
    fn from(p: PaperArg) -> Paper {
        match p {
            PaperArg::A4 => Paper::A4,
            PaperArg::Letter => Paper::Letter,
        }
    }
}

/// How a successful run ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Status {
    /// Everything asked for was done (and every check passed).
    Done,
    /// `check` ran and at least one check failed.
    ChecksFailed,
}

impl From<Status> for ExitCode {
    fn from(s: Status) -> ExitCode {
        match s {
            Status::Done => ExitCode::SUCCESS,
            Status::ChecksFailed => ExitCode::from(1),
        }
    }
}

// ---------------------------------------------------------------------------------------
// Number parsers: say what was wrong and the allowed range.

/// A finite number; NaN and infinities are refused as not numbers at all.
fn number(text: &str) -> Result<f64, String> {
    match text.trim().parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        Ok(_) => Err(format!("{text:?} is not a finite number")),
        Err(_) => Err(format!("{text:?} is not a number")),
    }
}

fn stroke_mm(text: &str) -> Result<f64, String> {
    let v = number(text).map_err(|e| format!("{e}; the allowed range is a stroke >= 0 mm"))?;
    if v >= 0.0 {
        Ok(v)
    } else {
        Err(format!(
            "{} is outside the allowed range: a stroke >= 0 mm",
            show_number(v)
        ))
    }
}

fn bore_mm(text: &str) -> Result<f64, String> {
    let v = number(text).map_err(|e| {
        format!(
            "{e}; the allowed range is a bore diameter > 0 and <= {} mm",
            show_number(MAX_BORE_MM)
        )
    })?;
    if v > 0.0 && v <= MAX_BORE_MM {
        Ok(v)
    } else {
        Err(format!(
            "{} is outside the allowed range: a bore diameter > 0 and <= {} mm",
            show_number(v),
            show_number(MAX_BORE_MM)
        ))
    }
}

fn points(text: &str) -> Result<usize, String> {
    let allowed = format!(
        "a whole number from 2 to {}",
        show_number(MAX_POINTS as f64)
    );
    match text.trim().parse::<usize>() {
        Ok(n) if (2..=MAX_POINTS).contains(&n) => Ok(n),
        Ok(n) => Err(format!("{n} is outside the allowed range: {allowed}")),
        Err(_) => Err(format!("{text:?} is not {allowed}")),
    }
}

// ---------------------------------------------------------------------------------------
// Entry points used by `main`.

/// Makes a panic print one line on stderr and exit with status 2, instead of a backtrace.
/// A last resort: every expected failure is an error value, not a panic.
pub fn install_panic_hook() {
    std::panic::set_hook(Box::new(|info| {
        let message = info
            .payload()
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| info.payload().downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "unknown cause".to_string());
        let place = info
            .location()
            .map(|l| format!(" at {}:{}", l.file(), l.line()))
            .unwrap_or_default();
        let _ = writeln!(
            io::stderr(),
            "bowgrip: internal error{place}: {}",
            one_line(&message)
        );
        std::process::exit(2);
    }));
}

/// Parses the process arguments. On help or version it prints them and gives status 0; on
/// a bad command line it prints one line and gives status 2.
pub fn parse_args() -> Result<Cli, ExitCode> {
    Cli::try_parse_from(units_last(joined_numbers(std::env::args_os())))
        .map_err(|e| usage_error(&e))
}

/// Moves `--units VALUE` (or `--units=VALUE`) to the end of the arguments, so that it may
/// come before the sub-command too (`bowgrip --units in check FILE`): the top level's
/// arguments otherwise conflict with a sub-command. Nothing after a `--` is moved.
fn units_last(args: Vec<std::ffi::OsString>) -> Vec<std::ffi::OsString> {
    let mut kept = Vec::with_capacity(args.len());
    let mut moved = Vec::new();
    let mut rest = Vec::new();
    let mut args = args.into_iter();
    while let Some(arg) = args.next() {
        match arg.to_str() {
            Some("--") => {
                rest.push(arg);
                rest.extend(args.by_ref());
            }
            Some("--units") => {
                moved.push(arg);
                moved.extend(args.next());
            }
            Some(a) if a.starts_with("--units=") => moved.push(arg),
            _ => kept.push(arg),
        }
    }
    kept.extend(moved);
    kept.extend(rest);
    kept
}

/// Options that take a number, whose value may start with `-`.
const NUMBER_OPTIONS: [&str; 5] = [
    "--stroke-mm",
    "--bore-mm",
    "--from-mm",
    "--to-mm",
    "--points",
];

/// `--stroke-mm -inf` as `--stroke-mm=-inf`: a value after a number option is that
/// option's value even when it looks like a flag (`-inf`, `-nan`), so that it is refused
/// as a number, with the allowed range, rather than as an unknown flag.
fn joined_numbers(args: impl IntoIterator<Item = std::ffi::OsString>) -> Vec<std::ffi::OsString> {
    let mut out: Vec<std::ffi::OsString> = Vec::new();
    let mut args = args.into_iter();
    while let Some(arg) = args.next() {
        let is_number_option = arg.to_str().is_some_and(|a| NUMBER_OPTIONS.contains(&a));
        if is_number_option && let Some(value) = args.next() {
            let mut joined = arg;
            joined.push("=");
            joined.push(value);
            out.push(joined);
        } else {
            out.push(arg);
        }
    }
    out
}

/// `text` with control characters (escape sequences, bells, carriage returns) shown as
/// escapes instead of being sent raw to the terminal.
pub fn printable(text: &str) -> String {
    text.chars()
        .flat_map(|c| {
            let escaped: Vec<char> = if c.is_control() && c != ' ' {
                c.escape_default().collect()
            } else {
                vec![c]
            };
            escaped
        })
        .collect()
}

/// Prints a clap error (or help text) the way this program reports: help and version in
/// full on stdout, anything else as one line on stderr with status 2.
pub fn usage_error(e: &clap::Error) -> ExitCode {
    use clap::error::ErrorKind;
    match e.kind() {
        ErrorKind::DisplayHelp
        | ErrorKind::DisplayVersion
        | ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => {
            let _ = e.print();
            ExitCode::from(u8::try_from(e.exit_code()).unwrap_or(2))
        }
        _ => {
            let text = e.render().to_string();
            // Drop the usage block and the pointer to --help; keep what went wrong.
            let what = text
                .split("\n\nUsage:")
                .next()
                .unwrap_or(&text)
                .split("\n\nFor more information")
                .next()
                .unwrap_or(&text);
            let what = what.trim().trim_start_matches("error:").trim();
            let _ = writeln!(
                io::stderr(),
                "bowgrip: {} (see bowgrip --help)",
                one_line(what)
            );
            ExitCode::from(2)
        }
    }
}

/// Reports an error from [`run`] once: one line on stderr (control characters escaped)
/// and status 2. A closed stdout is such an error too: the output did not arrive.
pub fn report(e: &anyhow::Error) -> ExitCode {
    let _ = writeln!(
        io::stderr(),
        "bowgrip: {}",
        printable(&one_line(&format!("{e:#}")))
    );
    ExitCode::from(2)
}

/// A failed write of the results, named as a write to stdout.
#[derive(Debug, thiserror::Error)]
#[error("cannot write the results to stdout: {}", describe_stdout_error(.0))]
pub struct StdoutError(#[source] pub io::Error);

fn describe_stdout_error(e: &io::Error) -> String {
    if e.kind() == io::ErrorKind::BrokenPipe {
        "it was closed before the output ended (the output is incomplete)".to_string()
    } else {
        e.to_string()
    }
}

/// Writes through to stdout, turning every failure into a [`StdoutError`].
struct Stdout<W: Write>(W);

impl<W: Write> Write for Stdout<W> {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        self.0.write(buf).map_err(stdout_error)
    }
    fn flush(&mut self) -> io::Result<()> {
        self.0.flush().map_err(stdout_error)
    }
}

fn stdout_error(e: io::Error) -> io::Error {
    let kind = e.kind();
    if e.get_ref().is_some_and(|inner| inner.is::<StdoutError>()) {
        return e;
    }
    io::Error::new(kind, StdoutError(e))
}

/// Collapses a message onto one line.
fn one_line(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// Runs the parsed command line.
pub fn run(cli: Cli) -> anyhow::Result<Status> {
    let Some(command) = cli.command else {
        crate::app::run(cli.file)?;
        return Ok(Status::Done);
    };
    let units = UnitSystem::from(cli.units);
    refuse_units(&command, units)?;
    let stdout = io::stdout();
    let mut out = BufWriter::new(Stdout(stdout.lock()));
    let status = match command {
        Command::Point(a) => point(&a, units, &mut out)?,
        Command::Sweep(a) => sweep(&a, units, &mut out)?,
        Command::Bores(a) => bores(&a, units, &mut out)?,
        Command::Check(a) => check(&a, units, &mut out)?,
        Command::Sheet(a) => write_sheet(&a, units)?,
        Command::Compare(a) => crate::compare::run(&a, &mut out).map(|()| Status::Done)?,
        Command::Map(a) => crate::map::command::run(&a, &mut out).map(|()| Status::Done)?,
        Command::Scatter(a) => {
            crate::scatter::command::run(&a, units, &mut out).map(|()| Status::Done)?
        }
        Command::Completions(a) => {
            let mut command = <Cli as clap::CommandFactory>::command();
            clap_complete::generate(a.shell.generator(), &mut command, "bowgrip", &mut out);
            Status::Done
        }
    };
    out.flush()?;
    Ok(status)
}

/// Refuses `--units in` where it cannot apply: with `--json` (the keys name SI units by
/// contract: `stroke_mm`, `max_stress_mpa`), and on the sub-commands whose output keeps
/// the design file's own units (`compare`, `map`, `scatter`).
fn refuse_units(command: &Command, units: UnitSystem) -> anyhow::Result<()> {
    if units.is_metric() {
        return Ok(());
    }
    let json = match command {
        Command::Point(a) => a.json,
        Command::Sweep(a) => a.json,
        Command::Bores(a) => a.json,
        Command::Check(a) => a.json,
        Command::Compare(_) => bail!(
            "--units in: compare prints in the units of the design file and the bench CSV (mm, N); use --units mm (the default)"
        ),
        Command::Map(_) => bail!(
            "--units in: map works on the design file's own fields (mm, N, MPa); use --units mm (the default)"
        ),
        Command::Scatter(a) if a.json || a.csv => bail!(
            "--units in applies to scatter's tables; its JSON and CSV keep the design file's units (mm, per cent), so use --units mm (the default) with --json or --csv"
        ),
        Command::Scatter(_) => false,
        Command::Sheet(_) | Command::Completions(_) => false,
    };
    if json {
        bail!(
            "--units in does not apply to --json: JSON keys name their SI units (stroke_mm, max_stress_mpa) and always hold mm, N and MPa; for inches use --csv (columns such as stroke_in) or the table"
        );
    }
    Ok(())
}

// ---------------------------------------------------------------------------------------
// Loading.

/// Reads, parses and resolves a design file; every failure names the file.
fn load(path: &Path) -> anyhow::Result<(Design, Segment)> {
    let design = design::load(path).map_err(|e| anyhow!(e.in_file(path)))?;
    let segment = Segment::new(&design).map_err(|e| match e {
        crate::segment::SegmentError::Design(d) => anyhow!(d.in_file(path)),
        other => anyhow!("{}: {other}", path.display()),
    })?;
    Ok((design, segment))
}

/// The path at the asked bore (nominal by default); a bore the relaxed segment does not
/// fit is an error here.
fn bore_path<'a>(
    file: &Path,
    seg: &'a Segment,
    bore_mm: Option<f64>,
) -> anyhow::Result<BorePath<'a>> {
    let bore = bore_mm.unwrap_or(seg.bore_nominal_mm);
    seg.at_bore(bore).map_err(|e| {
        anyhow!(
            "{}: {}",
            file.display(),
            no_fit_message(&e, seg.design.strip.width_mm, bore)
        )
    })
}

/// Why the segment has no state at `bore_mm`, in words, with magnitudes printed sanely
/// (a bore of 1e-300 mm is not printed as 300 digits).
fn no_fit_message(e: &crate::segment::SegmentError, width_mm: f64, bore_mm: f64) -> String {
    use crate::segment::SegmentError;
    if width_mm >= bore_mm {
        // The flat strip's edges are already outside the bore: there is no gap at all.
        return format!(
            "the segment does not fit a {} mm bore: its strips are {} mm wide, as wide as the bore or wider, so their edges meet the wall before they can bow",
            show_number(bore_mm),
            show_number(width_mm)
        );
    }
    match e {
        SegmentError::NoClearance { bore_mm, gap_mm } => format!(
            "the relaxed strips do not fit a {} mm bore: the gap to the wall is {} mm (it must be more than 0)",
            show_number(*bore_mm),
            show_number(*gap_mm)
        ),
        other => other.to_string(),
    }
}

// ---------------------------------------------------------------------------------------
// point

fn point(a: &PointArgs, units: UnitSystem, out: &mut impl Write) -> anyhow::Result<Status> {
    let (design, seg) = load(&a.file)?;
    let path = bore_path(&a.file, &seg, a.bore_mm)?;
    let drive = Drive::of(&seg);
    // Without --stroke-mm: the operating point at this bore. A set pull never reached has
    // no stroke; its state says why.
    let (stroke_mm, unreached) = match a.stroke_mm {
        Some(s) => (s, None),
        None => {
            let op = actuation::operating_state(&path);
            match op.stroke_mm {
                Some(s) => (s, None),
                None => (f64::NAN, Some(op.state)),
            }
        }
    };
    if let Some(state) = unreached {
        if a.json {
            serde_json::to_writer(&mut *out, &point_json(&state, &drive)?)?;
            writeln!(out)?;
        } else {
            write!(out, "{}", point_table(&seg, &state, units))?;
        }
        return Ok(Status::Done);
    }
    // Through a compliant drive the actuator's maximum is of travel (stroke plus the
    // drive's stretch), which runs out before the stroke does.
    let travel_mm = actuation::travel_at_mm(&path, stroke_mm);
    if travel_mm > seg.max_stroke_mm() {
        // A note, not an error: the model state is still asked for. On stderr, so the JSON
        // and the table stay as they were.
        if travel_mm > stroke_mm {
            let note = format!(
                "bowgrip: note: stroke {} mm takes {} mm of actuator travel through the drive's \
                 stretch, past the actuator's maximum of {} mm; the actuator cannot reach it",
                show_number(stroke_mm),
                show_number((travel_mm * 1e3).round() / 1e3),
                show_number(seg.max_stroke_mm())
            );
            eprintln!("{}", units.prose(&note));
        } else {
            let note = format!(
                "bowgrip: note: stroke {} mm is past the actuator's maximum stroke of {} mm; the \
                 actuator cannot reach it",
                show_number(stroke_mm),
                show_number(seg.max_stroke_mm())
            );
            eprintln!("{}", units.prose(&note));
        }
    }
    let shared =
        sharing::design_uses_sharing(&design) || a.clocking.is_some() || a.major_axis.is_some();
    if !shared {
        let state = path.state(stroke_mm);
        if a.csv {
            // Every strip carries the same share: the centred state, once per strip.
            let st = seg
                .loaded_at_bore(path.bore_mm(), &sharing::Loading::default())
                .and_then(|l| l.state(stroke_mm))
                .map_err(|e| anyhow!("{}: {e}", a.file.display()))?;
            write!(
                out,
                "{}",
                units.csv_text(&sharing::strips_csv(&sharing::strip_rows(&st)))
            )?;
        } else if a.json {
            serde_json::to_writer(&mut *out, &point_json(&state, &drive)?)?;
            writeln!(out)?;
        } else {
            write!(out, "{}", point_table(&seg, &state, units))?;
        }
        return Ok(Status::Done);
    }
    let choice = sharing::CaseChoice {
        clocking: a.clocking.map(|c| match c {
            ClockingArg::Strip => sharing::Clocking::Strip,
            ClockingArg::Gap => sharing::Clocking::Gap,
        }),
        major_axis: a.major_axis.map(|m| match m {
            MajorAxisArg::Vertical => sharing::MajorAxis::Vertical,
            MajorAxisArg::Horizontal => sharing::MajorAxis::Horizontal,
        }),
    };
    let bore = path.bore_mm();
    let loaded =
        sharing::loaded_point(&seg, bore, stroke_mm, choice, sharing::Judge::HighestStress)
            .map_err(|e| {
                anyhow!(
                    "{}: load sharing at bore {} mm: {e}",
                    a.file.display(),
                    show_number(bore)
                )
            })?;
    if a.csv {
        write!(
            out,
            "{}",
            units.csv_text(&sharing::strips_csv(&loaded.strips))
        )?;
    } else if a.json {
        let mut v = loaded_json(&loaded)?;
        add_drive_keys(&mut v, &loaded.segment_state, &drive)?;
        serde_json::to_writer(&mut *out, &v)?;
        writeln!(out)?;
    } else {
        write!(out, "{}", point_table(&seg, &loaded.segment_state, units))?;
        write!(out, "{}", strips_table(&loaded, units))?;
    }
    Ok(Status::Done)
}

/// A state as `point --json` prints it: the state's keys in their own order (as before
/// the actuation keys existed), then the actuation keys.
#[derive(serde::Serialize)]
struct PointJson<'a> {
    #[serde(flatten)]
    state: &'a SegmentState,
    travel_mm: Option<f64>,
    operating_mode: &'static str,
}

fn point_json<'a>(state: &'a SegmentState, drive: &Drive) -> anyhow::Result<PointJson<'a>> {
    Ok(PointJson {
        state,
        travel_mm: travel_of(state, drive),
        operating_mode: drive.mode_name(),
    })
}

/// Adds `travel_mm` (stroke + pull / stiffness; the stroke itself when rigid; `null`
/// where there is no stroke, or no pull through a compliant drive) and `operating_mode`.
fn add_drive_keys(
    v: &mut serde_json::Value,
    state: &SegmentState,
    drive: &Drive,
) -> anyhow::Result<()> {
    let obj = v
        .as_object_mut()
        .ok_or_else(|| anyhow!("a state did not serialise as an object"))?;
    obj.insert(
        "travel_mm".into(),
        serde_json::to_value(travel_of(state, drive))?,
    );
    obj.insert("operating_mode".into(), drive.mode_name().into());
    Ok(())
}

/// Actuator travel at a state, mm (`None`: no stroke, or no pull through a compliant drive).
fn travel_of(state: &SegmentState, drive: &Drive) -> Option<f64> {
    let stroke = Some(state.stroke_mm).filter(|s| s.is_finite())?;
    match drive.stiffness_n_per_mm {
        None => Some(stroke),
        Some(_) => state.actuator_force_n.map(|p| drive.travel_mm(stroke, p)),
    }
}

/// The state's keys (means over the strips, the worst strip's stress), then the load
/// sharing keys the contract adds: the hub offset, one object per strip and the three
/// bore-level strokes.
fn loaded_json(p: &sharing::LoadedPoint) -> anyhow::Result<serde_json::Value> {
    let mut v = serde_json::to_value(&p.segment_state)?;
    let obj = v
        .as_object_mut()
        .ok_or_else(|| anyhow!("a state did not serialise as an object"))?;
    obj.insert(
        "hub_offset_mm".into(),
        serde_json::to_value(p.hub_offset_mm)?,
    );
    obj.insert("strips".into(), serde_json::to_value(&p.strips)?);
    for (key, value) in [
        (
            "first_strip_contact_stroke_mm",
            p.first_strip_contact_stroke_mm,
        ),
        ("lift_off_stroke_mm", p.lift_off_stroke_mm),
        (
            "last_strip_contact_stroke_mm",
            p.last_strip_contact_stroke_mm,
        ),
    ] {
        obj.insert(key.into(), serde_json::to_value(value)?);
    }
    Ok(v)
}

/// The per-strip table under the state table of `point` when the strips share unequally.
fn strips_table(p: &sharing::LoadedPoint, units: UnitSystem) -> String {
    let mut t = String::new();
    let len = units.unit(Quantity::Length);
    let stroke = |v: Option<f64>| fixed_in(units, Quantity::Length, v, 3);
    let offset = |v: f64| units.to_display(Quantity::Length, v);
    let _ = writeln!(t);
    let _ = writeln!(
        t,
        "{}",
        units.prose(&format!("load sharing ({})", p.governing))
    );
    let _ = writeln!(
        t,
        "  hub offset        y {:+.4} {len} (up), z {:+.4} {len}",
        offset(p.hub_offset_mm[0]),
        offset(p.hub_offset_mm[1])
    );
    let _ = writeln!(
        t,
        "  first strip touches at {} {len}, lifts the hub off its rest at {} {len}, last strip touches at {} {len}",
        stroke(p.first_strip_contact_stroke_mm),
        stroke(p.lift_off_stroke_mm),
        stroke(p.last_strip_contact_stroke_mm)
    );
    if p.strips.is_empty() {
        let _ = writeln!(
            t,
            "  a strip is past its own limit at this stroke: no per-strip state"
        );
        return t;
    }
    let _ = writeln!(
        t,
        "  {:>9}  {:>9}  {:<13}  {:>11}  {:>11}  {:>11}",
        "clock deg",
        format!("gap {len}"),
        "phase",
        format!("contact {}", units.unit(Quantity::Force)),
        format!("axial {}", units.unit(Quantity::Force)),
        format!("stress {}", units.unit(Quantity::Stress))
    );
    let num = |q: Quantity, v: f64, d: usize| fixed_in(units, q, v.is_finite().then_some(v), d);
    for r in &p.strips {
        let phase = if r.phase.has_state() {
            r.phase.to_string()
        } else {
            "off the wall".to_string()
        };
        let _ = writeln!(
            t,
            "  {:>9.1}  {:>9}  {:<13}  {:>11}  {:>11}  {:>11}",
            r.clock_deg,
            units.number(Quantity::Length, r.gap_mm, 4),
            phase,
            units.number(Quantity::Force, r.contact_force_n, 3),
            num(Quantity::Force, r.axial_force_n, 3),
            num(Quantity::Stress, r.max_stress_mpa, 1)
        );
    }
    t
}

/// Fixed decimals for tables; `-` where the quantity does not exist.
fn fixed(v: Option<f64>, decimals: usize) -> String {
    match v {
        Some(v) => format!("{v:.decimals$}"),
        None => "-".to_string(),
    }
}

/// [`fixed`] for an SI value of kind `q` shown in `units` (the metric decimals given; in
/// metric exactly `fixed`).
fn fixed_in(units: UnitSystem, q: Quantity, v: Option<f64>, decimals: usize) -> String {
    fixed(
        v.map(|v| units.to_display(q, v)),
        units.decimals(q, decimals),
    )
}

/// The operating mode in words with its value: `stroke 1.8 mm`, `pull 300 N`,
/// `torque 0.5 N m (pull 942.5 N)`, and the drive's stiffness when it gives; in `units`.
fn operating_words(drive: &Drive, units: UnitSystem) -> String {
    units.prose(&operating_words_mm(drive))
}

fn operating_words_mm(drive: &Drive) -> String {
    let op = drive.operating;
    let mut words = format!(
        "{} {} {}",
        op.mode_name(),
        show_number(op.value()),
        op.unit()
    );
    if let (crate::design::Operating::Torque(_), Some(p)) = (op, drive.set_pull_n) {
        let _ = write!(words, " (pull {p:.2} N)");
    }
    if let Some(k) = drive.stiffness_n_per_mm {
        let _ = write!(words, ", drive stiffness {} N/mm", show_number(k));
    }
    words
}

fn point_table(seg: &Segment, s: &SegmentState, units: UnitSystem) -> String {
    let mut t = String::new();
    let bore_label = if s.bore_mm == seg.bore_nominal_mm {
        "bore (nominal)"
    } else {
        "bore"
    };
    let len = units.unit(Quantity::Length);
    let length = |v: Option<f64>| fixed_in(units, Quantity::Length, v, 3);
    let mut rows: Vec<(&str, String, &str)> = vec![
        (bore_label, length(Some(s.bore_mm)), len),
        ("gap to the wall", length(Some(s.gap_mm)), len),
        (
            "stroke",
            length(Some(s.stroke_mm).filter(|v| v.is_finite())),
            len,
        ),
        ("phase", s.phase.to_string(), ""),
    ];
    rows.extend(
        STATE_FIELDS
            .iter()
            .map(|f| (f.label, f.number_in(s, "-", units), f.unit_in(units))),
    );
    rows.extend([
        (
            "first contact at stroke",
            length(s.first_contact_stroke_mm),
            len,
        ),
        (
            "line contact from stroke",
            length(s.line_contact_stroke_mm),
            len,
        ),
        (
            "model limit at stroke",
            length(Some(s.limit_stroke_mm)),
            len,
        ),
    ]);
    for (label, value, unit) in rows {
        let _ = writeln!(t, "{label:<26} {value:>14} {unit}");
    }
    if let Some(r) = &s.actuator {
        // The effort is N or N m, the position mm or degrees (`ActuatorReading`).
        let (effort, effort_unit) = reading_in(units, r.effort, r.effort_unit, 3);
        let (position, position_unit) = reading_in(units, r.position, r.position_unit, 3);
        let _ = writeln!(
            t,
            "{:<26} {:>14} {} at {} {}",
            "actuator effort", effort, effort_unit, position, position_unit
        );
    }
    let _ = writeln!(t, "{:<26} {}", "limit reason", s.limit_reason);
    if seg.design.uses_actuation() {
        let drive = Drive::of(seg);
        let _ = writeln!(
            t,
            "{:<26} {}",
            "operating mode",
            operating_words(&drive, units)
        );
        let _ = writeln!(
            t,
            "{:<26} {:>14} {len}",
            "actuator travel",
            length(travel_of(s, &drive))
        );
    }
    if let Some(reason) = &s.reason {
        let _ = writeln!(t, "{:<26} {}", "no state", units.prose(reason));
    }
    let _ = writeln!(t, "stiffness: {}", seg.stiffness_reason);
    let _ = writeln!(t, "{CAUTION}");
    t
}

/// A value given with a metric unit label (`N`, `N m`, `mm`; anything else, such as
/// `deg`, is left alone) as a number to `decimals` and its label in `units`.
fn reading_in(
    units: UnitSystem,
    v: f64,
    unit: &'static str,
    decimals: usize,
) -> (String, &'static str) {
    match Quantity::of_metric_unit(unit) {
        Some(q) => (
            format!(
                "{:.d$}",
                units.to_display(q, v),
                d = units.decimals(q, decimals)
            ),
            units.unit(q),
        ),
        None => (format!("{v:.decimals$}"), unit),
    }
}

// ---------------------------------------------------------------------------------------
// sweep

/// Columns of `sweep` after the fixed outside names (`segment::STATE_COLUMNS`).
const SWEEP_EXTRA: &str = "bore_mm,crest_height_mm,static_safety_factor,\
fatigue_safety_factor,limit_stroke_mm,limit_reason";

fn sweep_csv_row(s: &SegmentState, drive: Option<&Drive>) -> String {
    let mut extra = vec![
        s.bore_mm.to_string(),
        csv_cell(s.crest_height_mm),
        csv_cell(s.static_safety_factor),
        csv_cell(s.fatigue_safety_factor),
        s.limit_stroke_mm.to_string(),
        s.limit_reason.to_string(),
    ];
    if let Some(drive) = drive {
        extra.push(csv_cell(travel_of(s, drive)));
    }
    format!("{},{}", s.csv_cells().join(","), extra.join(","))
}

fn sweep(a: &SweepArgs, units: UnitSystem, out: &mut impl Write) -> anyhow::Result<Status> {
    let (_, seg) = load(&a.file)?;
    let path = bore_path(&a.file, &seg, a.bore_mm)?;
    // The strokes of `BorePath::sweep`, computed one at a time so that a long sweep
    // streams instead of collecting, and spaced so that the last is the end exactly.
    let end_mm = actuation::sweep_end_mm(&path);
    let n = a.points;
    let states = (0..n).map(|i| path.state(spaced(0.0, end_mm, i, n)));
    // Designs with a set pull or torque, or a compliant drive, get the actuator travel.
    let drive = seg.design.uses_actuation().then(|| Drive::of(&seg));
    if a.csv || a.json {
        let travel = if drive.is_some() { ",travel_mm" } else { "" };
        let header = format!("{},{SWEEP_EXTRA}{travel}", STATE_COLUMNS.join(","));
        let rows = states.map(|s| sweep_csv_row(&s, drive.as_ref()));
        tabular(&header, rows, a.json, units, out)?;
        return Ok(Status::Done);
    }
    let len = units.unit(Quantity::Length);
    let length = |v: Option<f64>| fixed_in(units, Quantity::Length, v, 3);
    writeln!(
        out,
        "bore {} {len}, gap {} {len}; first contact at {} {len}, line contact from {} {len}; \
         model limit {} {len} ({}); actuator maximum {} {len}{}",
        length(Some(path.bore_mm())),
        length(Some(path.gap_mm())),
        length(path.first_contact_stroke_mm()),
        length(path.line_contact_stroke_mm()),
        length(Some(path.limit_stroke_mm())),
        path.limit_reason().describe(),
        length(Some(seg.max_stroke_mm())),
        // Through a compliant drive the maximum is of travel, reached at a shorter stroke.
        match seg.design.actuator.stiffness_n_per_mm() {
            Some(_) => match actuation::stroke_at_travel_mm(&path, seg.max_stroke_mm()) {
                Some(s) => format!(" of travel, reached at {} {len} of stroke", length(Some(s))),
                None => " of travel, not reached before the model limit".to_string(),
            },
            None => String::new(),
        }
    )?;
    if let Some(drive) = &drive {
        writeln!(out, "{}", operating_line(&path, drive, units))?;
    }
    writeln!(
        out,
        "{:>10} {:<13} {:>10} {:>10} {:>10} {:>10} {:>10} {:>9} {:>8} {:>8}",
        "stroke",
        "phase",
        "P/strip",
        "F/strip",
        "pull",
        "radial",
        "holding",
        "outer D",
        "flat",
        "stress"
    )?;
    let force = units.unit(Quantity::Force);
    writeln!(
        out,
        "{:>10} {:<13} {:>10} {:>10} {:>10} {:>10} {:>10} {:>9} {:>8} {:>8}",
        len,
        "",
        force,
        force,
        force,
        force,
        force,
        len,
        len,
        units.unit(Quantity::Stress)
    )?;
    let f = |v: Option<f64>, d: usize| fixed_in(units, Quantity::Force, v, d);
    let l = |v: Option<f64>, d: usize| fixed_in(units, Quantity::Length, v, d);
    for s in states {
        writeln!(
            out,
            "{:>10} {:<13} {:>10} {:>10} {:>10} {:>10} {:>10} {:>9} {:>8} {:>8}",
            l(Some(s.stroke_mm), 4),
            s.phase,
            f(s.axial_force_per_strip_n, 3),
            f(s.contact_force_per_strip_n, 3),
            f(s.actuator_force_n, 2),
            f(s.radial_force_n, 2),
            f(s.holding_force_n, 2),
            l(s.outer_diameter_mm, 3),
            l(s.flat_length_mm, 2),
            fixed_in(units, Quantity::Stress, s.max_stress_mpa, 1),
        )?;
    }
    if drive
        .as_ref()
        .is_some_and(|d| d.stiffness_n_per_mm.is_some())
    {
        let outputs = if units.is_metric() {
            "travel_mm of the CSV and JSON output"
        } else {
            "travel_in of the CSV output"
        };
        writeln!(
            out,
            "(actuator travel = stroke + pull / drive stiffness: column {outputs})"
        )?;
    }
    writeln!(out, "{CAUTION}")?;
    Ok(Status::Done)
}

/// One line on the operating point at a path's bore: the mode, the operating stroke and
/// the actuator travel, or why a set pull is never reached.
fn operating_line(path: &BorePath, drive: &Drive, units: UnitSystem) -> String {
    let op = actuation::operating_state(path);
    let len = units.unit(Quantity::Length);
    match (op.stroke_mm, op.travel_mm) {
        (Some(s), Some(t)) => format!(
            "operating point ({}): stroke {} {len}, actuator travel {} {len}",
            operating_words(drive, units),
            fixed_in(units, Quantity::Length, Some(s), 3),
            fixed_in(units, Quantity::Length, Some(t), 3),
        ),
        _ => format!(
            "operating point ({}): {}",
            operating_words(drive, units),
            units.prose(&op.state.reason.unwrap_or_default())
        ),
    }
}

// ---------------------------------------------------------------------------------------
// bores

/// The `i`-th of `n` equally spaced values from `from` to `to`; both ends exact.
fn spaced(from: f64, to: f64, i: usize, n: usize) -> f64 {
    if i + 1 >= n {
        to
    } else {
        from + (to - from) * (i as f64 / (n - 1) as f64)
    }
}

fn bores(a: &BoresArgs, units: UnitSystem, out: &mut impl Write) -> anyhow::Result<Status> {
    let (_, seg) = load(&a.file)?;
    let from_mm = a.from_mm.unwrap_or(seg.bore_smallest_mm);
    let to_mm = a.to_mm.unwrap_or(seg.bore_largest_mm);
    let rows = (0..a.points).map(|i| seg.bore_row(spaced(from_mm, to_mm, i, a.points)));
    // Designs with a set pull or torque, or a compliant drive, get the operating stroke
    // and the actuator travel at each bore.
    let operating = seg.design.uses_actuation();
    let op_cells = |bore_mm: f64| match actuation::operating_state_at(&seg, bore_mm) {
        Ok(op) => (op.stroke_mm, op.travel_mm),
        Err(_) => (None, None),
    };
    if a.csv || a.json {
        let extra = if operating {
            ",operating_stroke_mm,travel_mm"
        } else {
            ""
        };
        let header = format!("{}{extra}", BORE_ROW_COLUMNS.join(","));
        let rows = rows.map(|r| {
            if operating {
                let (s, t) = op_cells(r.bore_mm);
                format!("{},{},{}", r.csv_line(), csv_cell(s), csv_cell(t))
            } else {
                r.csv_line()
            }
        });
        tabular(&header, rows, a.json, units, out)?;
        return Ok(Status::Done);
    }
    if operating {
        writeln!(
            out,
            "operating point: {}",
            operating_words(&Drive::of(&seg), units)
        )?;
    }
    let len = units.unit(Quantity::Length);
    let len_words = units.length_words();
    writeln!(
        out,
        "strokes in {len_words} against bore; '-' where the quantity does not exist (the segment does not \
         fit or reach, or the path never gets there)"
    )?;
    let (op_head, travel_head) = if operating {
        (" operating", "  travel")
    } else {
        ("", "")
    };
    writeln!(
        out,
        "{:>10} {:>14} {:>10} {:>13} {:>13} {:>10}{op_head}{travel_head}",
        format!("bore {len}"),
        "first contact",
        "holding",
        "stress limit",
        "line contact",
        "limit"
    )?;
    let l = |v: Option<f64>| fixed_in(units, Quantity::Length, v, 3);
    for r in rows {
        let extra = if operating {
            let (s, t) = op_cells(r.bore_mm);
            format!(" {:>9} {:>7}", l(s), l(t))
        } else {
            String::new()
        };
        writeln!(
            out,
            "{:>10} {:>14} {:>10} {:>13} {:>13} {:>10}{extra}",
            l(Some(r.bore_mm)),
            l(r.first_contact_stroke_mm),
            l(r.holding_stroke_mm),
            l(r.stress_limit_stroke_mm),
            l(r.line_contact_stroke_mm),
            l(r.limit_stroke_mm),
        )?;
    }
    writeln!(out, "{CAUTION}")?;
    Ok(Status::Done)
}

// ---------------------------------------------------------------------------------------
// check

fn check(a: &CheckArgs, units: UnitSystem, out: &mut impl Write) -> anyhow::Result<Status> {
    let (design, seg) = load(&a.file)?;
    let list = checks::run(&seg);
    let pass = checks::all_pass(&list);
    let limiting = checks::limiting(&list).map(|i| list[i].id);
    let cautions = checks::geometry_cautions(&seg);
    let usable = seg.usable_stroke_across_tolerance();
    if a.json {
        let mut doc = serde_json::json!({
            "file": a.file.display().to_string(),
            "title": design.title,
            "pass": pass,
            "limiting": limiting,
            "stiffness": seg.stiffness_used.name(),
            "stiffness_reason": seg.stiffness_reason,
            "checks": list,
            "geometry_cautions": cautions,
            "usable_stroke_mm": usable.range_mm().map(|(from, to)| serde_json::json!({"from": from, "to": to})),
        });
        if design.uses_actuation()
            && let Some(obj) = doc.as_object_mut()
        {
            obj.insert("operating_mode".into(), Drive::of(&seg).mode_name().into());
            obj.insert("operating".into(), operating_json(&seg));
        }
        serde_json::to_writer(&mut *out, &doc)?;
        writeln!(out)?;
    } else if a.csv {
        let (header, kinds) = units.csv_header(&CHECK_COLUMNS.join(","));
        writeln!(out, "{header}")?;
        for c in &list {
            // The margin of a geometry check is a length; a ratio reads the same in both.
            let (margin, unit) = match c.unit() {
                MarginUnit::Mm => (
                    c.margin.map(|m| units.to_display(Quantity::Length, m)),
                    units.unit(Quantity::Length),
                ),
                MarginUnit::Ratio => (c.margin, c.unit().label()),
            };
            let row = format!(
                "{},{},{},{},{},{},{}",
                c.id,
                c.pass,
                csv_cell(margin),
                unit,
                csv_cell(c.bore_mm),
                csv_cell(c.stroke_mm),
                csv_text(&units.prose(&c.reason))
            );
            writeln!(out, "{}", units.csv_row(&kinds, &row))?;
        }
    } else {
        write!(
            out,
            "{}",
            check_table(&design, &seg, &list, limiting, &cautions, &usable, units)
        )?;
    }
    Ok(if pass {
        Status::Done
    } else {
        Status::ChecksFailed
    })
}

/// The operating point at the smallest, nominal and largest bore, for `check --json`:
/// `{case, bore_mm, stroke_mm, travel_mm, pull_n, reason}` (`null` stroke and travel, and a
/// reason, where a set pull is never reached).
fn operating_json(seg: &Segment) -> serde_json::Value {
    let cases = [
        ("smallest", seg.bore_smallest_mm),
        ("nominal", seg.bore_nominal_mm),
        ("largest", seg.bore_largest_mm),
    ];
    cases
        .iter()
        .map(
            |&(case, bore)| match actuation::operating_state_at(seg, bore) {
                Ok(op) => serde_json::json!({
                    "case": case,
                    "bore_mm": bore,
                    "stroke_mm": op.stroke_mm,
                    "travel_mm": op.travel_mm,
                    "pull_n": op.state.actuator_force_n,
                    "reason": op.unreached.map(|_| op.state.reason.clone()),
                }),
                Err(why) => serde_json::json!({
                    "case": case,
                    "bore_mm": bore,
                    "stroke_mm": null,
                    "travel_mm": null,
                    "pull_n": null,
                    "reason": why,
                }),
            },
        )
        .collect()
}

/// Columns of `check --csv`, in order.
pub const CHECK_COLUMNS: [&str; 7] = [
    "id",
    "pass",
    "margin",
    "unit",
    "bore_mm",
    "stroke_mm",
    "reason",
];

/// A text cell for CSV (RFC 4180): quoted when it holds a comma, a quote or a line break,
/// with quotes doubled.
fn csv_text(t: &str) -> String {
    if t.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", t.replace('"', "\"\""))
    } else {
        t.to_string()
    }
}

/// Writes a table given as a CSV header and CSV rows: as CSV, or (`json`) as one JSON array
/// of objects keyed by the column names, numbers as numbers, empty cells as null and other
/// cells as strings. The rows stream; nothing is collected. One source for both forms, so
/// the JSON has exactly the CSV's columns.
fn tabular(
    header: &str,
    rows: impl Iterator<Item = String>,
    json: bool,
    units: UnitSystem,
    out: &mut impl Write,
) -> anyhow::Result<()> {
    if !json {
        // CSV in the display units (JSON with inches is refused before any work).
        let (shown, kinds) = units.csv_header(header);
        writeln!(out, "{shown}")?;
        for r in rows {
            writeln!(out, "{}", units.csv_row(&kinds, &r))?;
        }
        return Ok(());
    }
    let names: Vec<String> = header
        .split(',')
        .map(serde_json::to_string)
        .collect::<Result<_, _>>()?;
    write!(out, "[")?;
    for (i, r) in rows.enumerate() {
        write!(out, "{}{{", if i == 0 { "" } else { "," })?;
        for (j, (name, cell)) in names.iter().zip(r.split(',')).enumerate() {
            let value = match cell {
                "" => "null".to_string(),
                c => match c.parse::<f64>() {
                    Ok(v) if v.is_finite() => c.to_string(),
                    _ => serde_json::to_string(c)?,
                },
            };
            write!(out, "{}{name}:{value}", if j == 0 { "" } else { "," })?;
        }
        write!(out, "}}")?;
    }
    writeln!(out, "]")?;
    Ok(())
}

fn check_table(
    design: &Design,
    seg: &Segment,
    list: &[Check],
    limiting: Option<CheckId>,
    cautions: &[String],
    usable: &UsableStroke,
    units: UnitSystem,
) -> String {
    let mut t = String::new();
    if !design.title.is_empty() {
        let _ = writeln!(t, "{}", printable(&design.title));
    }
    let l = |v: f64| units.number(Quantity::Length, v, 3);
    let _ = writeln!(
        t,
        "bore {} {} (smallest {}, largest {}); stiffness {}",
        l(seg.bore_nominal_mm),
        units.unit(Quantity::Length),
        l(seg.bore_smallest_mm),
        l(seg.bore_largest_mm),
        seg.stiffness_reason
    );
    for c in list {
        let verdict = if c.pass { "pass" } else { "FAIL" };
        let margin = c.margin_text_in(units).unwrap_or_else(|| "-".to_string());
        let mark = if Some(c.id) == limiting {
            " (limiting)"
        } else {
            ""
        };
        let _ = writeln!(
            t,
            "{:<9} {verdict:<5} {margin:>14}  {}{mark}: {}",
            c.id,
            c.title(),
            units.prose(&c.reason)
        );
    }
    let failed = list.iter().filter(|c| !c.pass).count();
    if failed == 0 {
        let _ = writeln!(t, "all {} checks pass", list.len());
    } else {
        let _ = writeln!(t, "{failed} of {} checks fail", list.len());
    }
    let _ = writeln!(t, "{}", units.prose(&usable.describe()));
    if design.uses_actuation() {
        let _ = writeln!(
            t,
            "operating point: {}",
            operating_words(&Drive::of(seg), units)
        );
        for (case, bore) in [
            ("smallest", seg.bore_smallest_mm),
            ("nominal", seg.bore_nominal_mm),
            ("largest", seg.bore_largest_mm),
        ] {
            let line = match actuation::operating_state_at(seg, bore) {
                Ok(op) => match (op.stroke_mm, op.travel_mm) {
                    (Some(s), Some(tr)) => {
                        format!("stroke {s:.3} mm, actuator travel {tr:.3} mm")
                    }
                    _ => op.state.reason.unwrap_or_default(),
                },
                Err(why) => why,
            };
            let line = units.prose(&format!("  at the {case} bore {bore:.3} mm: {line}"));
            let _ = writeln!(t, "{line}");
        }
    }
    for c in cautions {
        let _ = writeln!(t, "geometry caution: {}", units.prose(c));
    }
    let _ = writeln!(t, "{CAUTION}");
    t
}

// ---------------------------------------------------------------------------------------
// sheet

fn write_sheet(a: &SheetArgs, units: UnitSystem) -> anyhow::Result<Status> {
    // Parse the very bytes that are hashed on the sheet.
    let bytes = design::read_bytes(&a.file).map_err(|e| anyhow!(e.in_file(&a.file)))?;
    let text = design::decode(bytes.clone()).map_err(|e| anyhow!(e.in_file(&a.file)))?;
    let design = design::parse(&text).map_err(|e| anyhow!(e.in_file(&a.file)))?;
    if same_file(&a.file, &a.output) {
        bail!(
            "{}: the sheet would overwrite the design file itself; choose another -o path",
            a.output.display()
        );
    }
    let label = a.file.display().to_string();
    let options = sheet::SheetOptions {
        map: a.map_x.clone().zip(a.map_y.clone()),
        units,
    };
    if let Some((x, y)) = &options.map {
        // Refused axes are bad input: say so before any work, as `map` does.
        crate::map::MapSpec::new(&design, x, y).map_err(|e| anyhow!("{label}: {e}"))?;
    }
    let measured = match &a.measured {
        Some(path) => Some(sheet::Measured {
            label: path.display().to_string(),
            data: crate::bench_data::load(path).map_err(|e| anyhow!(e.in_file(path)))?,
            fit: a.fit.as_ref().map(|f| f.0.clone()).unwrap_or_default(),
        }),
        None => None,
    };
    let pdf = sheet::render_with(
        &design,
        &label,
        &bytes,
        a.paper.into(),
        measured.as_ref(),
        &options,
    )
    .with_context(|| format!("cannot make the sheet for {label}"))?;
    crate::atomic::write(&a.output, &pdf)?;
    let _ = writeln!(io::stderr(), "sheet written to {}", a.output.display());
    Ok(Status::Done)
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (fs::canonicalize(a), fs::canonicalize(b)) {
        (Ok(a), Ok(b)) => a == b,
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spacing_hits_both_ends_exactly() {
        assert_eq!(spaced(60.1, 80.7, 0, 7), 60.1);
        assert_eq!(spaced(60.1, 80.7, 6, 7), 80.7);
        assert_eq!(spaced(60.0, 80.0, 1, 3), 70.0);
        assert_eq!(spaced(50.0, 56.0, 1, 61), 50.1);
    }

    #[test]
    fn number_parsers_state_the_range() {
        assert!(stroke_mm("NaN").is_err_and(|e| e.contains("not a finite number")));
        assert!(stroke_mm("-inf").is_err_and(|e| e.contains("not a finite number")));
        assert!(stroke_mm("-1").is_err_and(|e| e.contains("a stroke >= 0 mm")));
        assert_eq!(stroke_mm("2.5"), Ok(2.5));
        assert!(bore_mm("0").is_err_and(|e| e.contains("> 0 and <= 1e6 mm")));
        assert!(bore_mm("1e7").is_err_and(|e| e.starts_with("1e7 is outside")));
        assert!(bore_mm("1e300").is_err());
        assert!(bore_mm("NaN").is_err());
        assert!(points("1").is_err_and(|e| e.contains("from 2 to")));
        assert_eq!(points("1000000"), Ok(1_000_000));
        assert!(points("abc").is_err());
    }

    #[test]
    fn messages_fold_onto_one_line() {
        assert_eq!(one_line("a\n  b\tc "), "a b c");
    }

    #[test]
    fn a_bore_the_segment_does_not_fit_is_said_plainly() {
        use crate::segment::SegmentError;
        // Issue 11, item 11: `--bore-mm 1e-300` printed a 300-digit number.
        let e = SegmentError::NoClearance {
            bore_mm: 1e-300,
            gap_mm: -27.0,
        };
        let text = no_fit_message(&e, 0.1, 1e-300);
        assert!(text.contains("a 1e-300 mm bore"), "{text}");
        assert!(text.len() < 200, "{text}");
        // A strip wider than the bore: says the segment does not fit, and why.
        let text = no_fit_message(&e, 80.0, 70.0);
        assert!(
            text.starts_with("the segment does not fit a 70 mm bore: its strips are 80 mm wide"),
            "{text}"
        );
    }

    #[test]
    fn control_characters_are_escaped() {
        assert_eq!(printable("a\u{1b}[31mb\u{7}"), "a\\u{1b}[31mb\\u{7}");
        assert_eq!(printable("plain text"), "plain text");
    }

    #[test]
    fn number_options_take_values_that_look_like_flags() {
        let args = ["bowgrip", "point", "f.ron", "--stroke-mm", "-inf", "--json"]
            .map(std::ffi::OsString::from);
        let joined: Vec<String> = joined_numbers(args)
            .into_iter()
            .map(|a| a.to_string_lossy().into_owned())
            .collect();
        assert_eq!(
            joined,
            ["bowgrip", "point", "f.ron", "--stroke-mm=-inf", "--json"]
        );
    }
}
