//! Bench measurements of a built segment: the CSV reader. A file holds one header row of
//! this program's column names, then one row per measured stroke: `stroke_mm` (required)
//! and any of `outer_diameter_mm`, `actuator_force_n`, `slip_force_n` (the axial pull at
//! which the segment slips, a pull-out test) and `bore_mm` (the bore the row was measured
//! in; empty or absent: the design's nominal bore). An empty cell means "not measured in
//! this row". Lines starting with `#` are comments and blank lines are skipped.
//!
//! Numbers use a decimal point and fields are separated by commas, unless a comment line
//! before the header says `# decimal: comma`; then numbers use a decimal comma and fields
//! are separated by semicolons. Anything else is refused with its line and column (1-based,
//! counted in characters) and what was expected there. Files larger than
//! [`MAX_FILE_BYTES`] and anything that is not a regular file are refused before reading.
//!
//! This module only reads; `crate::calibrate` compares the rows with the model.

use std::fmt;
use std::fs;
use std::io::{self, Read};
use std::path::{Path, PathBuf};

/// Largest measurement file read, bytes (4 MiB: some 100,000 rows, far more than a bench
/// produces by hand or by a logger in one session).
pub const MAX_FILE_BYTES: u64 = 4 * 1024 * 1024;

/// A quantity measured on the bench and predicted by the model.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Quantity {
    /// Diameter over the strips, mm (calipers or a laser gauge).
    OuterDiameter,
    /// Pull on the end plates, N (a load cell in line with the actuator).
    ActuatorForce,
    /// Axial pull at which the segment slips in its bore, N (pull-out test).
    SlipForce,
}

impl Quantity {
    /// Every measured quantity, in column order.
    pub const ALL: [Quantity; 3] = [
        Quantity::OuterDiameter,
        Quantity::ActuatorForce,
        Quantity::SlipForce,
    ];

    /// The column name in the measurement file (and the key in reports).
    pub fn column(self) -> &'static str {
        match self {
            Quantity::OuterDiameter => "outer_diameter_mm",
            Quantity::ActuatorForce => "actuator_force_n",
            Quantity::SlipForce => "slip_force_n",
        }
    }

    /// Unit for tables.
    pub fn unit(self) -> &'static str {
        match self {
            Quantity::OuterDiameter => "mm",
            Quantity::ActuatorForce | Quantity::SlipForce => "N",
        }
    }
}

/// One row of the file.
#[derive(Clone, Debug, PartialEq)]
pub struct Measurement {
    /// Line of the row in the file, 1-based.
    pub line: usize,
    /// End-plate travel from the bench's zero, mm.
    pub stroke_mm: f64,
    /// Bore the row was measured in, mm; `None`: the design's nominal bore.
    pub bore_mm: Option<f64>,
    /// Measured diameter over the strips, mm.
    pub outer_diameter_mm: Option<f64>,
    /// Measured pull on the end plates, N.
    pub actuator_force_n: Option<f64>,
    /// Measured axial slip (pull-out) force, N.
    pub slip_force_n: Option<f64>,
}

impl Measurement {
    /// The measured value of a quantity in this row, if any.
    pub fn value(&self, q: Quantity) -> Option<f64> {
        match q {
            Quantity::OuterDiameter => self.outer_diameter_mm,
            Quantity::ActuatorForce => self.actuator_force_n,
            Quantity::SlipForce => self.slip_force_n,
        }
    }
}

/// A parsed measurement file.
#[derive(Clone, Debug, PartialEq)]
pub struct BenchData {
    /// The rows, in file order.
    pub rows: Vec<Measurement>,
    /// Whether the file declared a decimal comma.
    pub decimal_comma: bool,
}

impl BenchData {
    /// Number of rows in which `q` was measured.
    pub fn count(&self, q: Quantity) -> usize {
        self.rows.iter().filter(|r| r.value(q).is_some()).count()
    }

    /// The measured quantities that have at least one value, in column order.
    pub fn quantities(&self) -> Vec<Quantity> {
        Quantity::ALL
            .into_iter()
            .filter(|&q| self.count(q) > 0)
            .collect()
    }
}

/// Why a measurement file was refused.
#[derive(Debug, thiserror::Error)]
pub enum BenchError {
    /// The file could not be opened or read (with the system's reason).
    #[error("cannot read {}: {source}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// What the system said.
        source: io::Error,
    },
    /// The path is a directory, a device, a pipe or anything else but a regular file.
    #[error("{}: not a regular file (a measurement file must be a plain CSV file)", path.display())]
    NotAFile {
        /// The path given.
        path: PathBuf,
    },
    /// The file is larger than [`MAX_FILE_BYTES`].
    #[error("{}: the file is larger than {} bytes ({} MiB), the most a measurement file may hold", path.display(), MAX_FILE_BYTES, MAX_FILE_BYTES / (1024 * 1024))]
    TooLarge {
        /// The file.
        path: PathBuf,
    },
    /// The text is malformed at a position.
    #[error("{line}:{column}: {message}")]
    Syntax {
        /// Line, 1-based.
        line: usize,
        /// Column in characters, 1-based.
        column: usize,
        /// What was wrong and what was expected.
        message: String,
    },
}

impl BenchError {
    /// The message prefixed with the file name: `FILE:LINE:COLUMN: message` when the
    /// position is known, else the message (which names the file already).
    pub fn in_file(&self, path: &Path) -> String {
        match self {
            BenchError::Syntax { .. } => format!("{}:{self}", path.display()),
            _ => self.to_string(),
        }
    }

    /// `(line, column)`, 1-based, when the error has a position.
    pub fn position(&self) -> Option<(usize, usize)> {
        match self {
            BenchError::Syntax { line, column, .. } => Some((*line, *column)),
            _ => None,
        }
    }
}

fn syntax(line: usize, column: usize, message: impl Into<String>) -> BenchError {
    BenchError::Syntax {
        line,
        column,
        message: message.into(),
    }
}

/// The columns a file may have.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Column {
    Stroke,
    Bore,
    Measured(Quantity),
}

impl Column {
    const ALL: [Column; 5] = [
        Column::Stroke,
        Column::Measured(Quantity::OuterDiameter),
        Column::Measured(Quantity::ActuatorForce),
        Column::Measured(Quantity::SlipForce),
        Column::Bore,
    ];

    fn name(self) -> &'static str {
        match self {
            Column::Stroke => "stroke_mm",
            Column::Bore => "bore_mm",
            Column::Measured(q) => q.column(),
        }
    }

    /// The allowed range of a value in this column, inclusive, and its wording.
    fn range(self) -> (f64, f64, &'static str) {
        match self {
            Column::Stroke => (0.0, 2000.0, "from 0 to 2000 mm"),
            Column::Bore => (1e-3, 1e6, "from 0.001 to 1000000 mm"),
            Column::Measured(Quantity::OuterDiameter) => (1e-3, 1e6, "from 0.001 to 1000000 mm"),
            // Small negative forces are load-cell noise around zero; keep them.
            Column::Measured(_) => (-1e9, 1e9, "from -1e9 to 1e9 N"),
        }
    }
}

/// Reads a measurement file: a regular file of at most [`MAX_FILE_BYTES`].
pub fn load(path: &Path) -> Result<BenchData, BenchError> {
    let io_err = |source| BenchError::Io {
        path: path.to_path_buf(),
        source,
    };
    let meta = fs::metadata(path).map_err(io_err)?;
    if !meta.is_file() {
        return Err(BenchError::NotAFile {
            path: path.to_path_buf(),
        });
    }
    if meta.len() > MAX_FILE_BYTES {
        return Err(BenchError::TooLarge {
            path: path.to_path_buf(),
        });
    }
    let file = fs::File::open(path).map_err(io_err)?;
    let mut bytes = Vec::new();
    // The file may grow between the size check and the read: read one byte past the bound.
    file.take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(io_err)?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Err(BenchError::TooLarge {
            path: path.to_path_buf(),
        });
    }
    parse_bytes(&bytes)
}

/// Parses the bytes of a measurement file (UTF-8, with or without a byte-order mark).
pub fn parse_bytes(bytes: &[u8]) -> Result<BenchData, BenchError> {
    match std::str::from_utf8(bytes) {
        Ok(text) => parse(text),
        Err(e) => {
            let good = &bytes[..e.valid_up_to()];
            // The valid prefix decodes; count its lines and the characters on the last one.
            let prefix = String::from_utf8_lossy(good);
            let line = prefix.matches('\n').count() + 1;
            let column = prefix.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
            Err(syntax(
                line,
                column,
                "the file is not UTF-8 text (save the CSV as UTF-8)",
            ))
        }
    }
}

/// One field of a line: its text (untrimmed) and its first column, 1-based in characters.
struct Field<'a> {
    text: &'a str,
    column: usize,
}

fn split_fields(line: &str, separator: char) -> Vec<Field<'_>> {
    let mut fields = Vec::new();
    let mut start_byte = 0;
    let mut start_col = 1;
    for (col, (i, c)) in (1..).zip(line.char_indices()) {
        if c == separator {
            fields.push(Field {
                text: &line[start_byte..i],
                column: start_col,
            });
            start_byte = i + c.len_utf8();
            start_col = col + 1;
        }
    }
    fields.push(Field {
        text: &line[start_byte..],
        column: start_col,
    });
    fields
}

/// Column of the first non-blank character of a field (its own column when all blank).
fn trimmed_column(f: &Field<'_>) -> usize {
    let lead = f.text.chars().take_while(|c| c.is_whitespace()).count();
    if f.text.trim().is_empty() {
        f.column
    } else {
        f.column + lead
    }
}

/// Reads a `# decimal: ...` directive from a comment's text (after the `#`), if it is one.
fn decimal_directive(comment: &str) -> Option<&str> {
    let (key, value) = comment.split_once(':')?;
    key.trim()
        .eq_ignore_ascii_case("decimal")
        .then(|| value.trim())
}

/// Parses the text of a measurement file.
pub fn parse(text: &str) -> Result<BenchData, BenchError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut decimal_comma = false;
    let mut header: Option<(usize, Vec<Column>)> = None;
    let mut rows = Vec::new();
    for (index, raw) in text.split('\n').enumerate() {
        let line_no = index + 1;
        let line = raw.strip_suffix('\r').unwrap_or(raw);
        let trimmed = line.trim_start();
        if trimmed.is_empty() {
            continue;
        }
        if let Some(comment) = trimmed.strip_prefix('#') {
            if let Some(value) = decimal_directive(comment) {
                let column = line.chars().count() - trimmed.chars().count() + 1;
                if header.is_some() {
                    return Err(syntax(
                        line_no,
                        column,
                        "the `# decimal:` line must come before the header row",
                    ));
                }
                decimal_comma = match value.to_ascii_lowercase().as_str() {
                    "comma" => true,
                    "point" => false,
                    other => {
                        return Err(syntax(
                            line_no,
                            column,
                            format!(
                                "`# decimal: {other}` is not known; expected `# decimal: comma` \
                                 (fields then separated by `;`) or `# decimal: point`"
                            ),
                        ));
                    }
                };
            }
            continue;
        }
        let separator = if decimal_comma { ';' } else { ',' };
        let fields = split_fields(line, separator);
        match &header {
            None => header = Some((line_no, parse_header(line_no, &fields, separator)?)),
            Some((header_line, columns)) => {
                rows.push(parse_row(
                    line_no,
                    &fields,
                    columns,
                    *header_line,
                    decimal_comma,
                )?);
            }
        }
    }
    let last_line = text.split('\n').count();
    let Some((header_line, _)) = header else {
        return Err(syntax(
            last_line,
            1,
            format!(
                "no header row; expected a first row of column names, e.g. `stroke_mm,outer_diameter_mm` (known: {})",
                known_columns()
            ),
        ));
    };
    if rows.is_empty() {
        return Err(syntax(
            last_line,
            1,
            format!("no data rows after the header on line {header_line}"),
        ));
    }
    Ok(BenchData {
        rows,
        decimal_comma,
    })
}

fn known_columns() -> String {
    Column::ALL
        .iter()
        .map(|c| c.name())
        .collect::<Vec<_>>()
        .join(", ")
}

fn parse_header(
    line_no: usize,
    fields: &[Field<'_>],
    separator: char,
) -> Result<Vec<Column>, BenchError> {
    let mut columns: Vec<Column> = Vec::with_capacity(fields.len());
    for f in fields {
        let name = f.text.trim();
        let column = trimmed_column(f);
        let found = Column::ALL.into_iter().find(|c| c.name() == name);
        let Some(c) = found else {
            let what = if name.is_empty() {
                "an empty column name".to_string()
            } else {
                format!("unknown column {name:?}")
            };
            let hint = if separator == ',' && name.contains(';') {
                " (fields are separated by `,`; a file with `;` and decimal commas must say `# decimal: comma` before the header)"
            } else {
                ""
            };
            return Err(syntax(
                line_no,
                column,
                format!("{what}; expected one of {}{hint}", known_columns()),
            ));
        };
        if columns.contains(&c) {
            return Err(syntax(
                line_no,
                column,
                format!("column {name:?} appears twice; each column may appear once"),
            ));
        }
        columns.push(c);
    }
    if !columns.contains(&Column::Stroke) {
        return Err(syntax(
            line_no,
            1,
            "the header has no `stroke_mm` column; every file needs one",
        ));
    }
    if !columns.iter().any(|c| matches!(c, Column::Measured(_))) {
        return Err(syntax(
            line_no,
            1,
            "the header has no measured column; expected at least one of outer_diameter_mm, actuator_force_n, slip_force_n",
        ));
    }
    Ok(columns)
}

fn parse_row(
    line_no: usize,
    fields: &[Field<'_>],
    columns: &[Column],
    header_line: usize,
    decimal_comma: bool,
) -> Result<Measurement, BenchError> {
    if fields.len() != columns.len() {
        let column = if fields.len() > columns.len() {
            fields[columns.len()].column
        } else {
            fields
                .last()
                .map_or(1, |f| f.column + f.text.chars().count())
        };
        let hint = if !decimal_comma && fields.len() > columns.len() {
            " (a decimal comma needs `# decimal: comma` before the header)"
        } else {
            ""
        };
        return Err(syntax(
            line_no,
            column,
            format!(
                "expected {} fields as in the header on line {header_line}, found {}{hint}",
                columns.len(),
                fields.len()
            ),
        ));
    }
    let mut row = Measurement {
        line: line_no,
        stroke_mm: f64::NAN,
        bore_mm: None,
        outer_diameter_mm: None,
        actuator_force_n: None,
        slip_force_n: None,
    };
    for (f, &c) in fields.iter().zip(columns) {
        let column = trimmed_column(f);
        let value = parse_number(f.text.trim(), decimal_comma)
            .map_err(|what| syntax(line_no, column, format!("{}: {what}", c.name())))?;
        let Some(v) = value else {
            if c == Column::Stroke {
                return Err(syntax(
                    line_no,
                    column,
                    "stroke_mm is empty; every row needs its stroke (a number of mm)",
                ));
            }
            continue;
        };
        let (lo, hi, allowed) = c.range();
        if !(lo..=hi).contains(&v) {
            return Err(syntax(
                line_no,
                column,
                format!("{} = {v} is outside the allowed range: {allowed}", c.name()),
            ));
        }
        match c {
            Column::Stroke => row.stroke_mm = v,
            Column::Bore => row.bore_mm = Some(v),
            Column::Measured(Quantity::OuterDiameter) => row.outer_diameter_mm = Some(v),
            Column::Measured(Quantity::ActuatorForce) => row.actuator_force_n = Some(v),
            Column::Measured(Quantity::SlipForce) => row.slip_force_n = Some(v),
        }
    }
    Ok(row)
}

/// A cell as a number: `None` when empty. Only digits, one sign, one decimal mark and an
/// exponent are accepted (no `inf`, `NaN`, digit grouping or units).
fn parse_number(cell: &str, decimal_comma: bool) -> Result<Option<f64>, NumberError> {
    if cell.is_empty() {
        return Ok(None);
    }
    let (mark, other) = if decimal_comma {
        (',', '.')
    } else {
        ('.', ',')
    };
    if cell.contains(other) {
        return Err(NumberError {
            cell: cell.to_string(),
            decimal_comma,
        });
    }
    let plain_chars = cell
        .chars()
        .all(|c| c.is_ascii_digit() || matches!(c, '+' | '-' | 'e' | 'E') || c == mark);
    let normalised = cell.replace(mark, ".");
    match normalised.parse::<f64>() {
        Ok(v) if plain_chars && v.is_finite() && cell.chars().any(|c| c.is_ascii_digit()) => {
            Ok(Some(v))
        }
        _ => Err(NumberError {
            cell: cell.to_string(),
            decimal_comma,
        }),
    }
}

/// A cell that is not a number in the file's notation.
struct NumberError {
    cell: String,
    decimal_comma: bool,
}

impl fmt::Display for NumberError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let notation = if self.decimal_comma {
            "a number with a decimal comma, e.g. 1,25 (the file says `# decimal: comma`)"
        } else {
            "a number with a decimal point, e.g. 1.25"
        };
        write!(f, "{:?} is not a number; expected {notation}", self.cell)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn position(text: &str) -> (usize, usize) {
        parse(text)
            .err()
            .and_then(|e| e.position())
            .unwrap_or((0, 0))
    }

    #[test]
    fn reads_comments_blank_lines_and_empty_cells() {
        let text = "# bench log\n\nstroke_mm,outer_diameter_mm,actuator_force_n\n0.5,41.2,\n\n1.0,,12.5\r\n";
        let data = parse(text).expect("a good file");
        assert_eq!(data.rows.len(), 2);
        assert_eq!(data.rows[0].line, 4);
        assert_eq!(data.rows[0].outer_diameter_mm, Some(41.2));
        assert_eq!(data.rows[0].actuator_force_n, None);
        assert_eq!(data.rows[1].line, 6);
        assert_eq!(data.rows[1].actuator_force_n, Some(12.5));
        assert_eq!(
            data.quantities(),
            vec![Quantity::OuterDiameter, Quantity::ActuatorForce]
        );
    }

    #[test]
    fn decimal_comma_only_when_declared() {
        let text = "# decimal: comma\nstroke_mm;slip_force_n\n1,5;20,25\n";
        let data = parse(text).expect("declared decimal comma");
        assert_eq!(data.rows[0].stroke_mm, 1.5);
        assert_eq!(data.rows[0].slip_force_n, Some(20.25));
        // Undeclared: the comma splits the field, refused at the extra field.
        assert_eq!(position("stroke_mm,slip_force_n\n1,5,20\n"), (2, 5));
        // Declared, but a point is used.
        assert_eq!(
            position("# decimal: comma\nstroke_mm;slip_force_n\n1.5;20\n"),
            (3, 1)
        );
    }

    #[test]
    fn refuses_non_numbers_with_their_column() {
        assert_eq!(position("stroke_mm,slip_force_n\n1, inf\n"), (2, 4));
        assert_eq!(position("stroke_mm,slip_force_n\n1,NaN\n"), (2, 3));
        assert_eq!(position("stroke_mm,slip_force_n\n1,2 N\n"), (2, 3));
        assert_eq!(position("stroke_mm,slip_force_n\n-1,2\n"), (2, 1));
        assert_eq!(position("stroke_mm,slip_force_n\n,2\n"), (2, 1));
    }

    #[test]
    fn reports_a_column_after_multibyte_characters_in_characters() {
        // "µ" is two bytes but one column.
        assert_eq!(position("stroke_mm,µ\n"), (1, 11));
    }

    #[test]
    fn invalid_utf8_is_located() {
        let e = parse_bytes(b"stroke_mm,slip_force_n\n1,\xff\n").err();
        assert_eq!(e.and_then(|e| e.position()), Some((2, 3)));
    }
}
