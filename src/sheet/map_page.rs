//! The sheet's optional design-map page: two inputs of the design on the axes, each cell
//! filled with its limiting check's colour (lighter where every check passes, the
//! colour-blind-safe palette of [`crate::map::palette`]), the line where the smallest
//! margin is zero, the design itself marked, a legend naming every check and a count of
//! the passing designs. The map is [`crate::map`]'s, so each cell is what `check` gives
//! for that design.

use super::Section;
use super::draw::{Block, GREY, INK, LIGHT, Rgb};
use super::font::Weight;
use super::sections::section as titled;
use crate::design::Design;
use crate::map::palette::{self, Rgb as MapRgb};
use crate::map::{Axis, AxisSpec, DesignMap, MapSpec};
use crate::ticks::ticks;

/// Room left of the map for the y tick labels and the axis label, points.
const LEFT_PT: f32 = 54.0;
/// Room below the map for the x tick labels and the axis label, points.
const BELOW_PT: f32 = 34.0;

fn rgb(c: MapRgb) -> Rgb {
    (c.r, c.g, c.b)
}

/// The map section for `design` over the axes `x` and `y`; refused with the map's own
/// message when an axis does not suit the design.
pub(crate) fn section(
    design: &Design,
    x: &AxisSpec,
    y: &AxisSpec,
    width: f32,
) -> anyhow::Result<Section> {
    let spec = MapSpec::new(design, x, y).map_err(|e| anyhow::anyhow!("the map page: {e}"))?;
    let map = spec
        .compute_all()
        .map_err(|e| anyhow::anyhow!("the map page: {e}"))?;
    let title = format!("Design map: {} against {}", map.y.field, map.x.field);
    Ok(titled(
        &title,
        width,
        vec![figure(&map, width), legend(&map, width)],
    ))
}

/// The map with its axes, zero line and the design's mark.
fn figure(map: &DesignMap, width: f32) -> Block {
    let mut b = Block::new();
    let side = (width - LEFT_PT - 10.0).min(420.0);
    let (x0, y0) = (LEFT_PT, 18.0);
    b.text_in(
        0.0,
        9.0,
        8.0,
        Weight::Regular,
        INK,
        format!("up: {}", shown_axis(&map.y).1),
    );
    let (nx, ny) = (map.x.len(), map.y.len());
    let (cw, ch) = (side / nx as f32, side / ny as f32);
    // Runs of equal colour along each row, one rectangle each.
    for iy in 0..ny {
        let top = y0 + (ny - 1 - iy) as f32 * ch;
        let mut ix = 0;
        while ix < nx {
            let colour = map
                .cell(ix, iy)
                .map(|c| palette::cell_colour(c.limiting, c.pass));
            let mut end = ix + 1;
            while end < nx
                && map
                    .cell(end, iy)
                    .map(|c| palette::cell_colour(c.limiting, c.pass))
                    == colour
            {
                end += 1;
            }
            if let Some(c) = colour {
                // A hair of overlap so no white seams show between rows.
                b.fill_rect(
                    x0 + ix as f32 * cw,
                    top,
                    (end - ix) as f32 * cw + 0.2,
                    ch + 0.2,
                    rgb(c),
                );
            }
            ix = end;
        }
    }
    b.rect(x0, y0, side, side, 0.6, INK);
    // Axis values to page points: cell centres at their values.
    let px = move |v: f64| x0 + place(&map.x, v) * side;
    let py = move |v: f64| y0 + (1.0 - place(&map.y, v)) * side;
    for line in map.zero_line() {
        let points = line.iter().map(|p| [px(p[0]), py(p[1])]).collect();
        b.polyline(points, 1.4, INK, None);
    }
    let (cx, cy) = (px(map.x.current), py(map.y.current));
    if (x0..=x0 + side).contains(&cx) && (y0..=y0 + side).contains(&cy) {
        let ring: Vec<[f32; 2]> = (0..=24)
            .map(|k| {
                let a = std::f32::consts::TAU * k as f32 / 24.0;
                [cx + 4.5 * a.cos(), cy + 4.5 * a.sin()]
            })
            .collect();
        b.polyline(ring, 1.0, INK, None);
        b.line([cx - 6.5, cy], [cx + 6.5, cy], 0.8, INK);
        b.line([cx, cy - 6.5], [cx, cy + 6.5], 0.8, INK);
    }
    // Ticks, at round values of the sheet's units (`f`: field units per shown unit).
    let (fx, fy) = (shown_axis(&map.x).0, shown_axis(&map.y).0);
    let (xt, xd) = ticks(
        map.x.from.min(map.x.to) / fx,
        map.x.from.max(map.x.to) / fx,
        6,
    );
    for v in xt {
        let x = px(v * fx);
        if (x0 - 0.5..=x0 + side + 0.5).contains(&x) {
            b.line([x, y0 + side], [x, y0 + side + 3.0], 0.5, INK);
            b.text_centre(
                x,
                y0 + side + 12.0,
                7.0,
                Weight::Regular,
                INK,
                format!("{v:.xd$}"),
            );
        }
    }
    let (yt, yd) = ticks(
        map.y.from.min(map.y.to) / fy,
        map.y.from.max(map.y.to) / fy,
        6,
    );
    for v in yt {
        let y = py(v * fy);
        if (y0 - 0.5..=y0 + side + 0.5).contains(&y) {
            b.line([x0 - 3.0, y], [x0, y], 0.5, INK);
            b.text_right(x0 - 5.0, y + 2.5, 7.0, Weight::Regular, format!("{v:.yd$}"));
        }
    }
    b.text_centre(
        x0 + 0.5 * side,
        y0 + side + 25.0,
        8.0,
        Weight::Regular,
        INK,
        format!("across: {}", shown_axis(&map.x).1),
    );
    b.height = y0 + side + BELOW_PT;
    b
}

/// An axis in the sheet's units: field units per shown unit (1 in metric, and for pure
/// numbers) and its title (`strip.thickness_mm (in)`).
fn shown_axis(axis: &Axis) -> (f64, String) {
    let units = super::format::units();
    match crate::units::Quantity::of_metric_unit(axis.unit) {
        Some(q) if !units.is_metric() => (
            units.from_display(q, 1.0),
            format!("{} ({})", axis.field, units.unit(q)),
        ),
        _ => (1.0, axis.label()),
    }
}

/// Where `v` lies along an axis, 0 at the first cell's outer edge, 1 at the last's.
fn place(axis: &Axis, v: f64) -> f32 {
    let n = axis.len();
    if n < 2 || axis.to == axis.from {
        return 0.5;
    }
    let step = (axis.to - axis.from) / (n - 1) as f64;
    ((v - axis.from + 0.5 * step) / (step * n as f64)) as f32
}

/// The legend (every check: colour when it fails, when it passes, its meaning), the count
/// of passing designs and how to read the page.
fn legend(map: &DesignMap, width: f32) -> Block {
    let mut b = Block::new();
    let mut y = 10.0;
    let total = map.cells().count();
    let passing = map.cells().filter(|c| c.pass).count();
    b.text(
        0.0,
        y,
        8.5,
        Weight::Bold,
        format!(
            "Every check passes in {passing} of {total} designs ({} x {} grid, both ends included).",
            map.x.len(),
            map.y.len()
        ),
    );
    y += 14.0;
    if let Some(first) = map.cells().next() {
        for c in &first.checks {
            let limited = map.cells().filter(|k| k.limiting == Some(c.id)).count();
            let base = palette::check_colour(c.id);
            b.fill_rect(0.0, y - 7.0, 9.0, 9.0, rgb(base));
            b.fill_rect(9.0, y - 7.0, 9.0, 9.0, rgb(base.lighter(0.5)));
            b.rect(0.0, y - 7.0, 18.0, 9.0, 0.3, LIGHT);
            b.text(24.0, y, 8.0, Weight::Bold, c.id);
            b.text_in(
                70.0,
                y,
                8.0,
                Weight::Regular,
                INK,
                format!("{} (limits {limited} designs)", c.title),
            );
            y += 11.5;
        }
    }
    y += 4.0;
    y = b.paragraph(
        0.0,
        y,
        width,
        7.5,
        Weight::Regular,
        GREY,
        "Each cell is the design with the two values of its row and column, every other input as in this file, judged by every check of the check table; its colour is the limiting check, dark where a check fails, light where every check passes. The black line is where the smallest margin is zero; the ring with the cross marks this design. A map is a screening aid: confirm the chosen design by its own sheet, by test, and by local codes.",
    );
    b.height = y;
    b
}
