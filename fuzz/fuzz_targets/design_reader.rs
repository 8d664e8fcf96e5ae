//! Any bytes into the design reader: a design or a typed error, never a panic. Whatever
//! loads is analysed end to end and must round-trip through the writer; a refusal with a
//! position must point inside the text.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    match bowgrip::design::parse(&text) {
        Ok(design) => {
            let _ = bowgrip::analysis::analyse(&design);
            let written = bowgrip::design::to_ron(&design).expect("a loaded design writes");
            assert_eq!(bowgrip::design::parse(&written).ok(), Some(design));
        }
        Err(e) => {
            if let Some((line, _)) = e.position() {
                let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
                assert!(line >= 1 && line <= text.split('\n').count(), "{e}");
            }
        }
    }
});
