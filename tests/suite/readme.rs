//! The README agrees with the program: its design-file sample is the app's built-in demo
//! (what `bowgrip` opens on a first start and File > New gives), field for field.

use bowgrip::design::{self, Design};

/// The first RON block after the words "A sample" in README.md.
fn readme_sample() -> String {
    let readme = include_str!("../../README.md");
    let from = readme.find("A sample").expect("README has a design sample");
    let rest = &readme[from..];
    let start = rest.find("```ron\n").expect("the sample is a ron block") + "```ron\n".len();
    let end = rest[start..].find("```").expect("the ron block ends") + start;
    rest[start..end].to_string()
}

#[test]
fn readme_sample_is_the_built_in_demo() {
    let sample = design::parse(&readme_sample()).expect("the README sample is a valid design");
    assert_eq!(sample, Design::default());
}
