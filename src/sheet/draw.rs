//! The sheet's drawing vocabulary: marks (text runs, polylines, filled polygons, clip
//! regions) collected into blocks measured before they are placed, and the one function
//! that writes placed marks into a krilla page. Coordinates are PDF points with the origin
//! at the top left and y growing downward, as krilla has them.

use krilla::color::rgb;
use krilla::geom::{PathBuilder, Point, Rect};
use krilla::num::NormalizedF32;
use krilla::paint::{Fill, FillRule, LineCap, LineJoin, Stroke, StrokeDash};
use krilla::surface::Surface;

use super::font::{Weight, face};

/// A colour, 0-255 per channel.
pub type Rgb = (u8, u8, u8);

/// Ink for text and outlines.
pub const INK: Rgb = (0, 0, 0);
/// Secondary text and grid lines.
pub const GREY: Rgb = (110, 110, 110);
/// Light rules and grids.
pub const LIGHT: Rgb = (200, 200, 200);
/// Verdict colours (the words PASS/FAIL carry the meaning; colour only helps).
pub const RED: Rgb = (190, 20, 20);
/// Passing checks.
pub const GREEN: Rgb = (0, 120, 50);

/// One thing drawn.
#[derive(Clone, Debug, PartialEq)]
pub enum Mark {
    /// A single line of text with its baseline at `y`.
    Text {
        x: f32,
        y: f32,
        size: f32,
        weight: Weight,
        color: Rgb,
        text: String,
    },
    /// A polyline (closed when `closed`).
    Line {
        points: Vec<[f32; 2]>,
        width: f32,
        color: Rgb,
        dash: Option<Vec<f32>>,
        closed: bool,
    },
    /// A filled polygon.
    Area { points: Vec<[f32; 2]>, color: Rgb },
    /// Marks up to the matching `Unclip` are clipped to this rectangle `[x0, y0, x1, y1]`.
    Clip([f32; 4]),
    /// Ends the innermost clip.
    Unclip,
}

impl Mark {
    /// The same mark moved by `(dx, dy)`.
    pub fn shifted(&self, dx: f32, dy: f32) -> Mark {
        let mv = |p: &Vec<[f32; 2]>| p.iter().map(|[x, y]| [x + dx, y + dy]).collect();
        match self {
            Mark::Text {
                x,
                y,
                size,
                weight,
                color,
                text,
            } => Mark::Text {
                x: x + dx,
                y: y + dy,
                size: *size,
                weight: *weight,
                color: *color,
                text: text.clone(),
            },
            Mark::Line {
                points,
                width,
                color,
                dash,
                closed,
            } => Mark::Line {
                points: mv(points),
                width: *width,
                color: *color,
                dash: dash.clone(),
                closed: *closed,
            },
            Mark::Area { points, color } => Mark::Area {
                points: mv(points),
                color: *color,
            },
            Mark::Clip([x0, y0, x1, y1]) => Mark::Clip([x0 + dx, y0 + dy, x1 + dx, y1 + dy]),
            Mark::Unclip => Mark::Unclip,
        }
    }
}

/// Marks laid out relative to a block's top left corner, with the block's height.
#[derive(Clone, Debug, Default)]
pub struct Block {
    /// The marks, relative to the block's origin.
    pub marks: Vec<Mark>,
    /// Height taken, points.
    pub height: f32,
}

/// Text width in points.
pub fn text_width(text: &str, size: f32, weight: Weight) -> f32 {
    face(weight).map_or(0.6 * size * text.chars().count() as f32, |f| {
        f.width_pt(text, size)
    })
}

/// Breaks `text`, in the sheet's units ([`super::format::shown`]), into lines no wider
/// than `width` points (a single word longer than the width is broken by characters).
pub fn wrap(text: &str, width: f32, size: f32, weight: Weight) -> Vec<String> {
    wrap_raw(&super::format::shown(text), width, size, weight)
}

/// [`wrap`] of a text kept as written (a design's own title).
pub fn wrap_raw(text: &str, width: f32, size: f32, weight: Weight) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        let candidate = if line.is_empty() {
            word.to_string()
        } else {
            format!("{line} {word}")
        };
        if text_width(&candidate, size, weight) <= width {
            line = candidate;
            continue;
        }
        if !line.is_empty() {
            lines.push(std::mem::take(&mut line));
        }
        // The word alone: break it by characters if it is still too wide.
        for c in word.chars() {
            let mut next = line.clone();
            next.push(c);
            if text_width(&next, size, weight) > width && !line.is_empty() {
                lines.push(std::mem::take(&mut line));
                line.push(c);
            } else {
                line = next;
            }
        }
    }
    if !line.is_empty() || lines.is_empty() {
        lines.push(line);
    }
    lines
}

impl Block {
    /// An empty block.
    pub fn new() -> Block {
        Block::default()
    }

    /// Text with its baseline at `y`.
    pub fn text(&mut self, x: f32, y: f32, size: f32, weight: Weight, text: impl Into<String>) {
        self.text_in(x, y, size, weight, INK, text);
    }

    /// Text with its baseline at `y`, kept as written (a design's own title or file name:
    /// not converted to the sheet's units).
    #[allow(clippy::too_many_arguments)]
    pub fn text_raw(
        &mut self,
        x: f32,
        y: f32,
        size: f32,
        weight: Weight,
        color: Rgb,
        text: String,
    ) {
        self.marks.push(Mark::Text {
            x,
            y,
            size,
            weight,
            color,
            text,
        });
    }

    /// Coloured text with its baseline at `y`, in the sheet's units.
    pub fn text_in(
        &mut self,
        x: f32,
        y: f32,
        size: f32,
        weight: Weight,
        color: Rgb,
        text: impl Into<String>,
    ) {
        let text = super::format::shown(&text.into());
        self.marks.push(Mark::Text {
            x,
            y,
            size,
            weight,
            color,
            text,
        });
    }

    /// Text ending at `x_right`.
    pub fn text_right(
        &mut self,
        x_right: f32,
        y: f32,
        size: f32,
        weight: Weight,
        text: impl Into<String>,
    ) {
        self.text_anchored(x_right, 1.0, y, size, weight, INK, text);
    }

    /// Text centred on `x`.
    pub fn text_centre(
        &mut self,
        x: f32,
        y: f32,
        size: f32,
        weight: Weight,
        color: Rgb,
        text: impl Into<String>,
    ) {
        self.text_anchored(x, 0.5, y, size, weight, color, text);
    }

    /// Text placed so that the point `anchor` of the way along it (0 its start, 0.5 its
    /// middle, 1 its end) is at `x`.
    #[allow(clippy::too_many_arguments)]
    pub fn text_anchored(
        &mut self,
        x: f32,
        anchor: f32,
        y: f32,
        size: f32,
        weight: Weight,
        color: Rgb,
        text: impl Into<String>,
    ) {
        let text = super::format::shown(&text.into());
        let w = text_width(&text, size, weight);
        self.text_in(x - anchor * w, y, size, weight, color, text);
    }

    /// Wrapped text starting with its first baseline at `y`; returns the y below the last line.
    #[allow(clippy::too_many_arguments)]
    pub fn paragraph(
        &mut self,
        x: f32,
        y: f32,
        width: f32,
        size: f32,
        weight: Weight,
        color: Rgb,
        text: &str,
    ) -> f32 {
        let lead = 1.25 * size;
        let mut y = y;
        for line in wrap(text, width, size, weight) {
            self.text_in(x, y, size, weight, color, line);
            y += lead;
        }
        y
    }

    /// A straight line.
    pub fn line(&mut self, a: [f32; 2], b: [f32; 2], width: f32, color: Rgb) {
        self.marks.push(Mark::Line {
            points: vec![a, b],
            width,
            color,
            dash: None,
            closed: false,
        });
    }

    /// A polyline, optionally dashed.
    pub fn polyline(
        &mut self,
        points: Vec<[f32; 2]>,
        width: f32,
        color: Rgb,
        dash: Option<Vec<f32>>,
    ) {
        if points.len() >= 2 {
            self.marks.push(Mark::Line {
                points,
                width,
                color,
                dash,
                closed: false,
            });
        }
    }

    /// A rectangle outline.
    pub fn rect(&mut self, x: f32, y: f32, w: f32, h: f32, width: f32, color: Rgb) {
        let points = vec![[x, y], [x + w, y], [x + w, y + h], [x, y + h]];
        self.marks.push(Mark::Line {
            points,
            width,
            color,
            dash: None,
            closed: true,
        });
    }

    /// A filled rectangle.
    pub fn fill_rect(&mut self, x: f32, y: f32, w: f32, h: f32, color: Rgb) {
        self.marks.push(Mark::Area {
            points: vec![[x, y], [x + w, y], [x + w, y + h], [x, y + h]],
            color,
        });
    }

    /// Appends `other` placed at `(dx, dy)`.
    pub fn append(&mut self, other: &Block, dx: f32, dy: f32) {
        self.marks
            .extend(other.marks.iter().map(|m| m.shifted(dx, dy)));
    }
}

fn paint(color: Rgb) -> krilla::paint::Paint {
    rgb::Color::new(color.0, color.1, color.2).into()
}

fn path(points: &[[f32; 2]], closed: bool) -> Option<krilla::geom::Path> {
    let mut pb = PathBuilder::new();
    let (first, rest) = points.split_first()?;
    pb.move_to(first[0], first[1]);
    for p in rest {
        pb.line_to(p[0], p[1]);
    }
    if closed {
        pb.close();
    }
    pb.finish()
}

/// Sets the surface to fill with `color` and stroke nothing (text and areas).
fn fill_only(surface: &mut Surface, color: Rgb) {
    surface.set_stroke(None);
    surface.set_fill(Some(Fill {
        paint: paint(color),
        opacity: NormalizedF32::ONE,
        rule: FillRule::NonZero,
    }));
}

/// Writes placed marks onto a page surface.
pub fn emit(surface: &mut Surface, marks: &[Mark]) -> anyhow::Result<()> {
    let mut clips: Vec<bool> = Vec::new();
    for mark in marks {
        match mark {
            Mark::Text {
                x,
                y,
                size,
                weight,
                color,
                text,
            } => {
                if text.is_empty() {
                    continue;
                }
                let f = face(*weight)?;
                fill_only(surface, *color);
                surface.draw_glyphs(
                    Point::from_xy(*x, *y),
                    &f.glyphs(text),
                    f.font.clone(),
                    text,
                    *size,
                    false,
                );
            }
            Mark::Line {
                points,
                width,
                color,
                dash,
                closed,
            } => {
                let Some(p) = path(points, *closed) else {
                    continue;
                };
                surface.set_fill(None);
                surface.set_stroke(Some(Stroke {
                    paint: paint(*color),
                    width: *width,
                    miter_limit: 4.0,
                    line_cap: LineCap::Butt,
                    line_join: LineJoin::Round,
                    opacity: NormalizedF32::ONE,
                    dash: dash.as_ref().map(|a| StrokeDash {
                        array: a.clone(),
                        offset: 0.0,
                    }),
                }));
                surface.draw_path(&p);
            }
            Mark::Area { points, color } => {
                let Some(p) = path(points, true) else {
                    continue;
                };
                fill_only(surface, *color);
                surface.draw_path(&p);
            }
            Mark::Clip([x0, y0, x1, y1]) => {
                // Every clip is paired with an `Unclip`; remember whether this one was pushed
                // so a degenerate rectangle never pops someone else's state.
                let path = Rect::from_ltrb(*x0, *y0, *x1, *y1).and_then(|rect| {
                    let mut pb = PathBuilder::new();
                    pb.push_rect(rect);
                    pb.finish()
                });
                if let Some(p) = &path {
                    surface.push_clip_path(p, &FillRule::NonZero);
                }
                clips.push(path.is_some());
            }
            Mark::Unclip => {
                if clips.pop() == Some(true) {
                    surface.pop();
                }
            }
        }
    }
    for pushed in clips {
        if pushed {
            surface.pop();
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wrap_keeps_every_line_inside_the_width_and_loses_no_word() {
        let text =
            "the quick brown fox jumps over the lazy dog and a verylongwordthatcannotfitonone line";
        let lines = wrap(text, 60.0, 9.0, Weight::Regular);
        assert!(lines.len() > 3);
        for l in &lines {
            assert!(text_width(l, 9.0, Weight::Regular) <= 60.0 + 1e-3, "{l:?}");
        }
        assert_eq!(lines.concat().replace(' ', ""), text.replace(' ', ""));
    }
}
