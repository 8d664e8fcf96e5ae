//! Speed targets for the design map (issue #15, this 2-core machine, both cores): a
//! 100 x 100 map of the demo design <= 1 s; the first coarse picture of a 200 x 200 map
//! (every 16th row and column complete) <= 100 ms, the time the app waits for a first
//! picture.
//!
//! Measured (criterion, `--warm-up-time 1 --measurement-time 3`, this machine with other
//! builds running, branch h5-map-scatter after 8bf855e): 100 x 100 map of the demo
//! 179 ms (150 to 198 ms); first coarse picture of a 200 x 200 map 4.5 ms.

use std::hint::black_box;
use std::sync::atomic::{AtomicBool, Ordering};

use bowgrip::design::Design;
use bowgrip::map::{AxisSpec, MapSpec};
use criterion::{Criterion, criterion_group, criterion_main};

fn spec(x: &str, y: &str, design: &Design) -> MapSpec {
    let axis = |t: &str| t.parse::<AxisSpec>().expect("axis text");
    MapSpec::new(design, &axis(x), &axis(y)).expect("axes inside the limits")
}

fn bench(c: &mut Criterion) {
    let design = Design::default();
    let mut group = c.benchmark_group("design map");
    group.sample_size(10);
    let full = spec(
        "strip.thickness_mm:0.15:0.4:100",
        "strip.free_length_mm:60:120:100",
        &design,
    );
    group.bench_function("100 x 100 map of the demo, thickness x free length", |b| {
        b.iter(|| black_box(full.compute_all().expect("map")))
    });
    let large = spec(
        "strip.thickness_mm:0.15:0.4:200",
        "strip.free_length_mm:60:120:200",
        &design,
    );
    group.bench_function("first coarse picture of a 200 x 200 map", |b| {
        b.iter(|| {
            let cancel = AtomicBool::new(false);
            let _ = large.compute(&cancel, &mut |p| {
                if p.map.complete_stride().is_some() {
                    cancel.store(true, Ordering::Relaxed);
                }
            });
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
