//! The `map` sub-command: `bowgrip map FILE --x FIELD:FROM:TO:N --y FIELD:FROM:TO:N
//! [--csv|--json]`. CSV has exactly the columns `x,y,limiting,limiting_margin,pass` (the
//! contract), one row per cell, `y` outer and `x` inner; JSON has the same per cell plus
//! every check's margin, the axes and the zero line; the default is a short picture and
//! summary for people. A refused field or range is bad input (exit 2, one line).

use std::fmt::Write as _;
use std::io::Write;
use std::path::PathBuf;

use anyhow::anyhow;
use clap::Args;
use serde_json::{Value, json};

use super::{Axis, AxisSpec, Cell, DesignMap, MapSpec};
use crate::design;
use crate::segment::csv_cell;

/// The CSV header, as the contract fixes it.
pub const CSV_COLUMNS: &str = "x,y,limiting,limiting_margin,pass";

/// Widest picture the table for people draws, in cells (larger grids are sampled).
const PICTURE_COLUMNS: usize = 60;
/// Tallest picture, in cells.
const PICTURE_ROWS: usize = 30;

/// Arguments of `map`.
#[derive(Debug, Args)]
pub struct MapArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// Horizontal axis: a field of the design file, first and last value, number of
    /// points (1 to 200), e.g. strip.thickness_mm:0.2:0.3:21.
    #[arg(long, value_name = "FIELD:FROM:TO:N", value_parser = axis_spec, allow_hyphen_values = true)]
    pub x: AxisSpec,
    /// Vertical axis, as --x, e.g. strip.count:6:14:9.
    #[arg(long, value_name = "FIELD:FROM:TO:N", value_parser = axis_spec, allow_hyphen_values = true)]
    pub y: AxisSpec,
    /// Print CSV with a header row instead of a table.
    #[arg(long, conflicts_with = "json")]
    pub csv: bool,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    pub json: bool,
}

/// Parses an axis argument (`FIELD:FROM:TO:N`) for clap.
pub fn axis_spec(text: &str) -> Result<AxisSpec, String> {
    text.parse().map_err(|e: super::MapError| e.to_string())
}

/// Runs `map`: loads the design, checks the axes, computes every cell and prints.
pub fn run(a: &MapArgs, out: &mut impl Write) -> anyhow::Result<()> {
    let file = a.file.display();
    let design = design::load(&a.file).map_err(|e| anyhow!(e.in_file(&a.file)))?;
    let spec = MapSpec::new(&design, &a.x, &a.y).map_err(|e| anyhow!("{file}: {e}"))?;
    let map = spec.compute_all().map_err(|e| anyhow!("{file}: {e}"))?;
    if a.csv {
        writeln!(out, "{CSV_COLUMNS}")?;
        for c in map.cells() {
            writeln!(
                out,
                "{},{},{},{},{}",
                c.x,
                c.y,
                c.limiting.unwrap_or(""),
                csv_cell(c.limiting_margin),
                c.pass
            )?;
        }
    } else if a.json {
        let cells: Vec<Value> = map.cells().map(cell_json).collect();
        let doc = json!({
            "file": file.to_string(),
            "title": design.title,
            "x": axis_json(&map.x),
            "y": axis_json(&map.y),
            "cells": cells,
            "zero_line": map.zero_line(),
        });
        serde_json::to_writer(&mut *out, &doc)?;
        writeln!(out)?;
    } else {
        write!(out, "{}", table(&design.title, &map))?;
    }
    Ok(())
}

fn cell_json(c: &Cell) -> Value {
    let margins: serde_json::Map<String, Value> = c
        .checks
        .iter()
        .map(|k| (k.id.to_string(), json!(k.margin)))
        .collect();
    json!({
        "x": c.x,
        "y": c.y,
        "limiting": c.limiting,
        "limiting_margin": c.limiting_margin,
        "pass": c.pass,
        "margins": margins,
    })
}

fn axis_json(a: &Axis) -> Value {
    json!({
        "field": a.field,
        "unit": a.unit,
        "from": a.from,
        "to": a.to,
        "points": a.len(),
        "whole": a.whole,
        "current": a.current,
        "values": a.values,
    })
}

/// `n` indices spread evenly over `0..len` (all of them when `len <= n`), ends included.
fn sample(len: usize, n: usize) -> Vec<usize> {
    if len <= n {
        return (0..len).collect();
    }
    (0..n)
        .map(|k| ((k * (len - 1)) as f64 / (n - 1) as f64).round() as usize)
        .collect()
}

fn short(v: f64) -> String {
    format!("{v:.4}")
        .trim_end_matches('0')
        .trim_end_matches('.')
        .to_string()
}

fn axis_words(a: &Axis) -> String {
    let unit = if a.unit.is_empty() {
        String::new()
    } else {
        format!(" {}", a.unit)
    };
    format!(
        "{} from {} to {}{unit} ({} points; the design has {})",
        a.field,
        short(a.from),
        short(a.to),
        a.len(),
        short(a.current)
    )
}

/// The table for people: the axes, a picture with one letter per cell for its limiting
/// check (lower case where every check passes, upper case where one fails), and how many
/// cells each check limits.
fn table(title: &str, map: &DesignMap) -> String {
    let mut t = String::new();
    if !title.is_empty() {
        let _ = writeln!(t, "{title}");
    }
    let _ = writeln!(t, "x: {}", axis_words(&map.x));
    let _ = writeln!(t, "y: {}", axis_words(&map.y));
    // Letters in the order the checks come, from the first cell's list.
    let ids: Vec<&str> = map
        .cells()
        .next()
        .map(|c| c.checks.iter().map(|k| k.id).collect())
        .unwrap_or_default();
    let letter = |id: Option<&str>, pass: bool| -> char {
        let i = id.and_then(|id| ids.iter().position(|k| *k == id));
        match i.and_then(|i| u8::try_from(i).ok()).filter(|&i| i < 26) {
            Some(i) if pass => char::from(b'a' + i),
            Some(i) => char::from(b'A' + i),
            None => '?',
        }
    };
    let legend: Vec<String> = ids
        .iter()
        .map(|id| format!("{} {id}", letter(Some(*id), true).to_ascii_uppercase()))
        .collect();
    let _ = writeln!(
        t,
        "limiting check per cell (lower case: every check passes; UPPER CASE: fails): {}",
        legend.join(", ")
    );
    let cols = sample(map.x.len(), PICTURE_COLUMNS);
    let rows = sample(map.y.len(), PICTURE_ROWS);
    if cols.len() < map.x.len() || rows.len() < map.y.len() {
        let _ = writeln!(
            t,
            "(the picture shows {} of {} columns and {} of {} rows)",
            cols.len(),
            map.x.len(),
            rows.len(),
            map.y.len()
        );
    }
    let labels: Vec<String> = rows.iter().map(|&iy| short(map.y.values[iy])).collect();
    let width = labels.iter().map(String::len).max().unwrap_or(0);
    for (&iy, label) in rows.iter().zip(&labels).rev() {
        let line: String = cols
            .iter()
            .map(|&ix| map.cell(ix, iy).map_or(' ', |c| letter(c.limiting, c.pass)))
            .collect();
        let _ = writeln!(t, "{label:>width$} | {line}");
    }
    let _ = writeln!(
        t,
        "{:>width$}   x {} .. {}",
        "",
        short(map.x.from),
        short(map.x.to)
    );
    let total = map.cells().count();
    let passing = map.cells().filter(|c| c.pass).count();
    let _ = writeln!(t, "every check passes in {passing} of {total} cells");
    for id in &ids {
        let limited: Vec<bool> = map
            .cells()
            .filter(|c| c.limiting == Some(*id))
            .map(|c| c.pass)
            .collect();
        if !limited.is_empty() {
            let pass = limited.iter().filter(|p| **p).count();
            let _ = writeln!(
                t,
                "  {id:<9} limits {:>6} cells: {pass} pass, {} fail",
                limited.len(),
                limited.len() - pass
            );
        }
    }
    let _ = writeln!(t, "{}", crate::cli::CAUTION);
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn samples_keep_both_ends() {
        assert_eq!(sample(5, 60), vec![0, 1, 2, 3, 4]);
        let s = sample(200, 60);
        assert_eq!((s.len(), s[0], s[59]), (60, 0, 199));
        assert!(s.windows(2).all(|w| w[0] < w[1]));
    }

    #[test]
    fn short_numbers_drop_trailing_zeros() {
        assert_eq!(short(0.25), "0.25");
        assert_eq!(short(10.0), "10");
        assert_eq!(short(0.123456), "0.1235");
    }
}
