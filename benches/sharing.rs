//! Speed target (one core of the 2-core machine): one off-centre loaded state of a
//! 12-strip segment (a weight on the hub, an out-of-round bore) <= 100 us, stretch 30 us.
//! The design is an invented demo. Also the app's full recompute of a design with a radial
//! load (the horizontal drain sample): the target is <= 16 ms, or the load-sharing parts
//! off the UI thread within 300 ms while the centred results stay instant; the app takes
//! the second way, so both halves are measured: the centred analysis (UI thread) and the
//! worker's load-sharing computation.

use std::hint::black_box;

use bowgrip::design::Design;
use bowgrip::segment::Segment;
use bowgrip::sharing::{Loading, MajorAxis, StripDeviation};
use criterion::{Criterion, criterion_group, criterion_main};

fn bench(c: &mut Criterion) {
    let mut design = Design::default();
    design.strip.count = 12;
    design.strip.width_mm = 8.0;
    let seg = Segment::new(&design).expect("demo design is valid");
    let bore = seg.bore_nominal_mm;
    let loading = Loading {
        radial_load_n: 40.0,
        out_of_round_mm: 0.5,
        major_axis: MajorAxis::Vertical,
        ..Loading::default()
    };
    let loaded = seg.loaded_at_bore(bore, &loading).expect("demo fits");
    let centred = seg.at_bore(bore).expect("demo fits");
    let stroke =
        0.5 * (centred.first_contact_stroke_mm().expect("reach") + centred.limit_stroke_mm());
    let st = loaded.state(stroke).expect("solves");
    assert!(st.hub_offset_mm[0] < 0.0 && !st.on_support);
    c.bench_function("loaded state, 12 strips, weight + oval bore", |b| {
        b.iter(|| loaded.state(black_box(stroke)))
    });
    // Unequal strips (invented deviations of a few hundredths of a mm): the nested
    // bracketed roots on both offset components. No target; reported for comparison.
    let unequal = Loading {
        deviations: (0..12)
            .map(|i| StripDeviation {
                thickness_mm: 0.004 * (f64::from(i) - 5.5) / 5.5,
                ..StripDeviation::default()
            })
            .collect(),
        ..loading.clone()
    };
    let loaded2 = seg.loaded_at_bore(bore, &unequal).expect("demo fits");
    loaded2.state(stroke).expect("solves");
    c.bench_function("loaded state, 12 unequal strips, weight + oval bore", |b| {
        b.iter(|| loaded2.state(black_box(stroke)))
    });
}

fn recompute(c: &mut Criterion) {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("drain-crawler-horizontal-150mm.ron");
    let design = bowgrip::design::load(&path).expect("the sample loads");
    let mut group = c.benchmark_group("app recompute, radial load");
    group.sample_size(10);
    group.bench_function("centred analysis (UI thread)", |b| {
        b.iter(|| bowgrip::analysis::analyse_centred(black_box(&design)))
    });
    group.bench_function("full analysis with the load-sharing checks", |b| {
        b.iter(|| bowgrip::analysis::analyse(black_box(&design)))
    });
    group.bench_function(
        "the app's load-sharing worker (checks, the end view's state, the loaded curves)",
        |b| b.iter(|| bowgrip::app::strips::compute(black_box(&design))),
    );
    group.finish();
}

criterion_group!(benches, bench, recompute);
criterion_main!(benches);
