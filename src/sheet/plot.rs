//! Vector x-y plots for the sheet: a framed plot area with ticks at round values,
//! tick labels, axis titles with units, series drawn as clipped polylines (a `None`
//! breaks the line), horizontal and vertical reference lines, shaded bands and a legend
//! below the frame.

use super::draw::{Block, GREY, INK, LIGHT, Rgb};
use super::font::Weight;
use super::format::fixed;
use crate::ticks::ticks;
use crate::units::UnitSystem;

/// How a series is stroked.
#[derive(Clone, Debug)]
pub struct Pen {
    /// Line colour.
    pub color: Rgb,
    /// Line width, points.
    pub width: f32,
    /// Dash pattern, points (solid when `None`).
    pub dash: Option<Vec<f32>>,
}

impl Pen {
    /// A solid pen.
    pub fn solid(color: Rgb, width: f32) -> Pen {
        Pen {
            color,
            width,
            dash: None,
        }
    }

    /// A dashed pen.
    pub fn dashed(color: Rgb, width: f32, dash: &[f32]) -> Pen {
        Pen {
            color,
            width,
            dash: Some(dash.to_vec()),
        }
    }
}

/// Something drawn in a plot.
#[derive(Clone, Debug)]
pub enum Item {
    /// A data series; `None` y values break the line.
    Series {
        label: String,
        pen: Pen,
        points: Vec<(f64, Option<f64>)>,
    },
    /// A horizontal line at `y` across the plot.
    HLine { label: String, pen: Pen, y: f64 },
    /// A vertical line at `x` across the plot.
    VLine { label: String, pen: Pen, x: f64 },
    /// A shaded band between `x0` and `x1`.
    Band {
        label: String,
        color: Rgb,
        x0: f64,
        x1: f64,
    },
    /// Measured points, each a small filled square (outside the range: not drawn).
    Points {
        label: String,
        color: Rgb,
        points: Vec<(f64, f64)>,
    },
}

impl Item {
    /// A data series; `None` y values break the line.
    pub fn series(label: impl Into<String>, pen: Pen, points: Vec<(f64, Option<f64>)>) -> Item {
        Item::Series {
            label: label.into(),
            pen,
            points,
        }
    }
}

/// A plot to lay out.
#[derive(Clone, Debug)]
pub struct Plot {
    /// Title above the frame.
    pub title: String,
    /// Axis title with unit, e.g. "bore diameter (mm)".
    pub x_label: String,
    /// Axis title with unit.
    pub y_label: String,
    /// Data range on x.
    pub x_range: (f64, f64),
    /// Data range on y.
    pub y_range: (f64, f64),
    /// What to draw, back to front.
    pub items: Vec<Item>,
}

/// Widens a range that is empty or inverted so it can be drawn.
pub fn usable_range(lo: f64, hi: f64) -> (f64, f64) {
    if !(lo.is_finite() && hi.is_finite()) {
        return (0.0, 1.0);
    }
    if hi > lo {
        (lo, hi)
    } else {
        let pad = lo.abs().max(1.0) * 0.05;
        (lo - pad, lo + pad)
    }
}

const TICK_SIZE: f32 = 7.0;
const LABEL_SIZE: f32 = 8.0;
const LEGEND_SIZE: f32 = 7.5;

impl Plot {
    /// The plot in `units`: the data on an axis whose title ends in a metric unit
    /// (`stroke (mm)`) converted with the title, the legend in words converted.
    fn in_units(&self, units: UnitSystem) -> Plot {
        if units.is_metric() {
            return self.clone();
        }
        let (x_label, xq) = units.axis_label(&self.x_label);
        let (y_label, yq) = units.axis_label(&self.y_label);
        let x = |v: f64| xq.map_or(v, |q| units.to_display(q, v));
        let y = |v: f64| yq.map_or(v, |q| units.to_display(q, v));
        let items = self
            .items
            .iter()
            .map(|item| match item {
                Item::Series { label, pen, points } => Item::Series {
                    label: units.prose(label),
                    pen: pen.clone(),
                    points: points.iter().map(|&(a, b)| (x(a), b.map(y))).collect(),
                },
                Item::HLine { label, pen, y: v } => Item::HLine {
                    label: units.prose(label),
                    pen: pen.clone(),
                    y: y(*v),
                },
                Item::VLine { label, pen, x: v } => Item::VLine {
                    label: units.prose(label),
                    pen: pen.clone(),
                    x: x(*v),
                },
                Item::Band {
                    label,
                    color,
                    x0,
                    x1,
                } => Item::Band {
                    label: units.prose(label),
                    color: *color,
                    x0: x(*x0),
                    x1: x(*x1),
                },
                Item::Points {
                    label,
                    color,
                    points,
                } => Item::Points {
                    label: units.prose(label),
                    color: *color,
                    points: points.iter().map(|&(a, b)| (x(a), y(b))).collect(),
                },
            })
            .collect();
        Plot {
            title: units.prose(&self.title),
            x_label,
            y_label,
            x_range: (x(self.x_range.0), x(self.x_range.1)),
            y_range: (y(self.y_range.0), y(self.y_range.1)),
            items,
        }
    }

    /// Lays the plot out in a block `width` points wide with a frame `frame_height` tall,
    /// in the sheet's units.
    pub fn layout(&self, width: f32, frame_height: f32) -> Block {
        self.in_units(super::format::units())
            .layout_shown(width, frame_height)
    }

    fn layout_shown(&self, width: f32, frame_height: f32) -> Block {
        let mut b = Block::new();
        let (xlo, xhi) = usable_range(self.x_range.0, self.x_range.1);
        let (ylo, yhi) = usable_range(self.y_range.0, self.y_range.1);
        let (xt, xd) = ticks(xlo, xhi, 6);
        let (yt, yd) = ticks(ylo, yhi, 5);
        let y_tick_w = yt
            .iter()
            .map(|v| super::draw::text_width(&fixed(*v, yd), TICK_SIZE, Weight::Regular))
            .fold(0.0f32, f32::max);
        let left = 14.0 + y_tick_w + 6.0;
        let top = 26.0;
        let right = width - 6.0;
        let bottom = top + frame_height;
        let fw = right - left;
        let fh = bottom - top;
        let px = |x: f64| left + ((x - xlo) / (xhi - xlo)) as f32 * fw;
        let py = |y: f64| bottom - ((y - ylo) / (yhi - ylo)) as f32 * fh;

        b.text(0.0, 9.0, 9.0, Weight::Bold, self.title.clone());
        // Bands first, then the grid, then lines.
        for item in &self.items {
            if let Item::Band { color, x0, x1, .. } = item {
                let (a, c) = (px(x0.max(xlo)), px(x1.min(xhi)));
                if c > a {
                    b.fill_rect(a, top, c - a, fh, *color);
                }
            }
        }
        for &v in &xt {
            let x = px(v);
            b.line([x, top], [x, bottom], 0.3, LIGHT);
            b.line([x, bottom], [x, bottom + 3.0], 0.5, INK);
            b.text_centre(
                x,
                bottom + 11.0,
                TICK_SIZE,
                Weight::Regular,
                INK,
                fixed(v, xd),
            );
        }
        for &v in &yt {
            let y = py(v);
            b.line([left, y], [right, y], 0.3, LIGHT);
            b.line([left - 3.0, y], [left, y], 0.5, INK);
            b.text_right(
                left - 4.0,
                y + 2.5,
                TICK_SIZE,
                Weight::Regular,
                fixed(v, yd),
            );
        }
        b.text_centre(
            0.5 * (left + right),
            bottom + 22.0,
            LABEL_SIZE,
            Weight::Regular,
            INK,
            self.x_label.clone(),
        );
        // The y title sits above the tick labels (no rotated text: it stays easy to read and search).
        b.text(
            left - y_tick_w - 4.0,
            top - 2.0,
            LABEL_SIZE,
            Weight::Regular,
            self.y_label.clone(),
        );

        b.marks
            .push(super::draw::Mark::Clip([left, top, right, bottom]));
        for item in &self.items {
            match item {
                Item::Series { pen, points, .. } => {
                    let mut run: Vec<[f32; 2]> = Vec::new();
                    for (x, y) in points {
                        match y.filter(|v| v.is_finite()) {
                            Some(y) => run
                                .push([px(*x), py(y.clamp(ylo - (yhi - ylo), yhi + (yhi - ylo)))]),
                            None => {
                                b.polyline(
                                    std::mem::take(&mut run),
                                    pen.width,
                                    pen.color,
                                    pen.dash.clone(),
                                );
                            }
                        }
                    }
                    if run.len() == 1 {
                        // A lone point: a short tick so it still shows.
                        let [x, y] = run[0];
                        run = vec![[x - 1.5, y], [x + 1.5, y]];
                    }
                    b.polyline(run, pen.width, pen.color, pen.dash.clone());
                }
                Item::HLine { pen, y, .. } if y.is_finite() => {
                    b.polyline(
                        vec![[left, py(*y)], [right, py(*y)]],
                        pen.width,
                        pen.color,
                        pen.dash.clone(),
                    );
                }
                Item::VLine { pen, x, .. } if x.is_finite() => {
                    b.polyline(
                        vec![[px(*x), top], [px(*x), bottom]],
                        pen.width,
                        pen.color,
                        pen.dash.clone(),
                    );
                }
                Item::Points { color, points, .. } => {
                    for &(x, y) in points {
                        if (xlo..=xhi).contains(&x) && (ylo..=yhi).contains(&y) {
                            b.fill_rect(px(x) - 1.6, py(y) - 1.6, 3.2, 3.2, *color);
                        }
                    }
                }
                _ => {}
            }
        }
        b.marks.push(super::draw::Mark::Unclip);
        b.rect(left, top, fw, fh, 0.6, INK);

        // Legend: entries flow left to right in rows below the axis title.
        let mut lx = left;
        let mut ly = bottom + 34.0;
        for item in &self.items {
            let (label, sample) = match item {
                Item::Series { label, pen, .. }
                | Item::HLine { label, pen, .. }
                | Item::VLine { label, pen, .. } => (label, Some(pen)),
                Item::Band { label, .. } | Item::Points { label, .. } => (label, None),
            };
            if label.is_empty() {
                continue;
            }
            let w = 20.0 + super::draw::text_width(label, LEGEND_SIZE, Weight::Regular) + 12.0;
            if lx + w > right && lx > left {
                lx = left;
                ly += 10.0;
            }
            match (sample, item) {
                (Some(pen), _) => b.polyline(
                    vec![[lx, ly - 2.5], [lx + 16.0, ly - 2.5]],
                    pen.width.max(0.8),
                    pen.color,
                    pen.dash.clone(),
                ),
                (None, Item::Band { color, .. }) => {
                    b.fill_rect(lx, ly - 6.0, 16.0, 7.0, *color);
                    b.rect(lx, ly - 6.0, 16.0, 7.0, 0.3, GREY);
                }
                (None, Item::Points { color, .. }) => {
                    b.fill_rect(lx + 6.4, ly - 4.1, 3.2, 3.2, *color);
                }
                _ => {}
            }
            b.text(lx + 20.0, ly, LEGEND_SIZE, Weight::Regular, label.clone());
            lx += w;
        }
        b.height = ly + 6.0;
        b
    }
}
