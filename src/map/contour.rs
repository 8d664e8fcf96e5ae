//! The zero line of a design map: marching squares over the grid points of one level,
//! with "every check passes" as the inside, and each crossing placed on its grid edge by
//! linear interpolation of the cells' smallest margins (the middle of the edge where a
//! margin is missing). Segments are joined into polylines through the grid edges they
//! share, so no floating-point comparison decides what connects.

use std::collections::HashMap;

use super::DesignMap;

/// A grid point of the level: (column, row) as cell indices.
type Vertex = (usize, usize);

/// A grid edge crossed by the line, by its two ends in a fixed order.
type Edge = (Vertex, Vertex);

fn edge(a: Vertex, b: Vertex) -> Edge {
    if (a.1, a.0) <= (b.1, b.0) {
        (a, b)
    } else {
        (b, a)
    }
}

/// The polylines where the smallest margin is zero, on the sub-grid of stride `s`.
pub(super) fn zero_line(map: &DesignMap, s: usize) -> Vec<Vec<[f64; 2]>> {
    let xs: Vec<usize> = (0..map.x.len()).step_by(s).collect();
    let ys: Vec<usize> = (0..map.y.len()).step_by(s).collect();
    let inside = |v: Vertex| map.cell(v.0, v.1).is_some_and(|c| c.pass);
    let mut segments: Vec<(Edge, Edge)> = Vec::new();
    for row in ys.windows(2) {
        for col in xs.windows(2) {
            // Corners counter-clockwise from the lower left; edge k joins corner k and k+1.
            let corners = [
                (col[0], row[0]),
                (col[1], row[0]),
                (col[1], row[1]),
                (col[0], row[1]),
            ];
            let ins = corners.map(inside);
            let e = |k: usize| edge(corners[k], corners[(k + 1) % 4]);
            let crossed: Vec<usize> = (0..4).filter(|&k| ins[k] != ins[(k + 1) % 4]).collect();
            match crossed[..] {
                [a, b] => segments.push((e(a), e(b))),
                [_, _, _, _] => {
                    // A saddle: the middle decides which pair of corners is joined.
                    let middle = middle_inside(map, &corners);
                    // Cut off each corner that differs from the middle: the edges before
                    // and after it.
                    for (k, &inside) in ins.iter().enumerate() {
                        if inside != middle {
                            segments.push((e((k + 3) % 4), e(k)));
                        }
                    }
                }
                _ => {}
            }
        }
    }
    join(&segments)
        .into_iter()
        .map(|chain| chain.into_iter().map(|e| crossing(map, e)).collect())
        .collect()
}

/// Whether the middle of a saddle square counts as inside: the mean of the corners'
/// smallest margins is not negative (outside when a margin is missing).
fn middle_inside(map: &DesignMap, corners: &[Vertex; 4]) -> bool {
    let mut sum = 0.0;
    for v in corners {
        match map.cell(v.0, v.1).and_then(|c| c.smallest_margin()) {
            Some(m) if m.is_finite() => sum += m,
            _ => return false,
        }
    }
    sum >= 0.0
}

/// Where the line crosses a grid edge, in axis values.
fn crossing(map: &DesignMap, (a, b): Edge) -> [f64; 2] {
    let margin = |v: Vertex| map.cell(v.0, v.1).and_then(|c| c.smallest_margin());
    let t = match (margin(a), margin(b)) {
        (Some(ma), Some(mb)) if ma.is_finite() && mb.is_finite() && (ma >= 0.0) != (mb >= 0.0) => {
            (ma / (ma - mb)).clamp(0.0, 1.0)
        }
        _ => 0.5,
    };
    let lerp = |p: f64, q: f64| p + t * (q - p);
    [
        lerp(map.x.values[a.0], map.x.values[b.0]),
        lerp(map.y.values[a.1], map.y.values[b.1]),
    ]
}

/// Joins segments that share an edge into chains of edges: open chains (from the border)
/// first, then closed loops (first edge repeated at the end).
fn join(segments: &[(Edge, Edge)]) -> Vec<Vec<Edge>> {
    let mut at: HashMap<Edge, Vec<usize>> = HashMap::new();
    for (i, (a, b)) in segments.iter().enumerate() {
        at.entry(*a).or_default().push(i);
        at.entry(*b).or_default().push(i);
    }
    let mut used = vec![false; segments.len()];
    let mut chains = Vec::new();
    let mut starts: Vec<(Edge, usize)> = Vec::new();
    for (i, (a, b)) in segments.iter().enumerate() {
        for end in [a, b] {
            if at.get(end).is_some_and(|v| v.len() == 1) {
                starts.push((*end, i));
            }
        }
    }
    for (i, (a, _)) in segments.iter().enumerate() {
        starts.push((*a, i));
    }
    for (start, first) in starts {
        if used[first] {
            continue;
        }
        let mut chain = vec![start];
        let mut here = start;
        let mut seg = first;
        loop {
            used[seg] = true;
            let (a, b) = segments[seg];
            let next = if a == here { b } else { a };
            chain.push(next);
            here = next;
            let Some(&follow) = at.get(&here).and_then(|v| v.iter().find(|&&j| !used[j])) else {
                break;
            };
            seg = follow;
        }
        chains.push(chain);
    }
    chains
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn segments_sharing_edges_make_one_chain() {
        let e = |a: usize, b: usize| edge((a, 0), (b, 0));
        // Three segments in a row and one apart.
        let segs = [
            (e(0, 1), e(1, 2)),
            (e(2, 3), e(1, 2)),
            (e(2, 3), e(3, 4)),
            (e(7, 8), e(8, 9)),
        ];
        let chains = join(&segs);
        assert_eq!(chains.len(), 2);
        assert_eq!(chains[0], vec![e(0, 1), e(1, 2), e(2, 3), e(3, 4)]);
        assert_eq!(chains[1].len(), 2);
        // A closed loop comes back to its first edge.
        let ring = [(e(0, 1), e(1, 2)), (e(1, 2), e(2, 3)), (e(2, 3), e(0, 1))];
        let chains = join(&ring);
        assert_eq!(chains.len(), 1);
        assert_eq!(chains[0].first(), chains[0].last());
    }
}
