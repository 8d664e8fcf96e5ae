//! Any bytes into the design reader: a design or a typed error, never a panic; whatever
//! loads is analysed end to end.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    if let Ok(design) = bowgrip::design::parse(&text) {
        let _ = bowgrip::analysis::analyse(&design);
    }
});
