//! Any numbers into the strip solver's entry points: gap, stroke and query targets, both
//! end conditions. Every call must return (all solves are iteration-bounded), never panic.
#![no_main]

use bowgrip::design::Ends;
use bowgrip::elastica::Path;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: [u8; 33]| {
    let num = |i: usize| f64::from_le_bytes(data[i..i + 8].try_into().unwrap_or([0; 8]));
    let ends = if data[32] & 1 == 0 {
        Ends::Clamped
    } else {
        Ends::Hinged
    };
    if let Ok(path) = Path::new(ends, num(0)) {
        let state = path.state(num(8));
        let _ = path.stroke_for_contact(num(16));
        let _ = path.stroke_for_linear(num(24).abs().min(1e6), 0.01, num(16));
        let _ = path.shape(state.stroke, 16);
        let _ = path.limit();
    }
});
