//! Speed targets (one core of the 2-core machine): one operating point <= 2 us; a 400-point
//! force-stroke curve plus a 200-bore stroke-vs-bore window (four inverse queries per bore)
//! <= 1 ms together; one full recompute after a change (`analysis::analyse`: curves, checks,
//! drawings) <= 2 ms.

use std::hint::black_box;

use bowgrip::analysis;
use bowgrip::design::{Design, Ends};
use bowgrip::elastica::Path;
use bowgrip::segment::Segment;
use criterion::{Criterion, Throughput, criterion_group, criterion_main};

fn bench(c: &mut Criterion) {
    let design = Design::default();
    let seg = Segment::new(&design).expect("default design is valid");
    let bore = seg.bore_nominal_mm;
    let path = seg.at_bore(bore).expect("default design fits");
    let fc = path.first_contact_stroke_mm().expect("reachable");
    let lc = path.line_contact_stroke_mm().expect("line contact");
    let point_stroke = 0.5 * (fc + lc);
    let line_stroke = 0.5 * (lc + path.limit_stroke_mm());

    c.bench_function(
        "operating point, point contact (bore set-up + state)",
        |b| {
            b.iter(|| {
                seg.at_bore(black_box(bore))
                    .map(|p| p.state(black_box(point_stroke)))
            })
        },
    );
    c.bench_function("operating point, line contact (bore set-up + state)", |b| {
        b.iter(|| {
            seg.at_bore(black_box(bore))
                .map(|p| p.state(black_box(line_stroke)))
        })
    });
    // The same cold operating point over a spread of paths, so that the figure is not one
    // lucky case: 16 gaps from g/L = 0.01 to 0.30, both end conditions, mid-way through
    // point contact (criterion reports the time for all 32; divide by 32 per point).
    let spread: Vec<(Ends, f64, f64)> = (0..16)
        .flat_map(|i| {
            let gap = 0.01 + 0.29 * i as f64 / 15.0;
            [Ends::Clamped, Ends::Hinged].map(|ends| {
                let p = Path::new(ends, gap).expect("a positive gap");
                let mid = 0.5
                    * (p.first_contact_stroke().expect("reachable")
                        + p.line_contact_stroke().expect("line contact"));
                (ends, gap, mid)
            })
        })
        .collect();
    let mut group = c.benchmark_group("operating point spread");
    group.throughput(Throughput::Elements(spread.len() as u64));
    group.bench_function("32 cold point-contact states, g/L 0.01 to 0.30", |b| {
        b.iter(|| {
            spread
                .iter()
                .map(|&(ends, gap, s)| {
                    Path::new(ends, black_box(gap)).map(|p| {
                        let st = p.state(black_box(s));
                        st.contact + p.limit().stroke
                    })
                })
                .fold(0.0, |acc, r| acc + r.unwrap_or(0.0))
        })
    });
    group.finish();
    c.bench_function("400-point curve + 200-bore window", |b| {
        let (lo, hi) = analysis::window_range_mm(&seg);
        b.iter(|| {
            let curve = path.sweep(analysis::CURVE_POINTS);
            let rows: Vec<_> = (0..analysis::WINDOW_POINTS)
                .map(|i| {
                    seg.bore_row(lo + (hi - lo) * i as f64 / (analysis::WINDOW_POINTS - 1) as f64)
                })
                .collect();
            black_box((curve, rows))
        })
    });
    c.bench_function("full recompute (analyse)", |b| {
        b.iter(|| analysis::analyse(black_box(&design)))
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
