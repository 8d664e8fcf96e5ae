//! Colours for the design map: one per check, from the eight-colour set of M. Okabe and
//! K. Ito, "Color Universal Design (CUD): how to make figures and presentations that are
//! friendly to colorblind people" (J*Fly, 2008), chosen to stay apart under the common
//! colour-vision deficiencies (protan, deutan, tritan) and reproduced in B. Wong, "Points
//! of view: Color blindness", Nature Methods 8 (2011) 441. Plain RGB, for the app and the
//! sheet alike. The check names go on the legend and on hover as well, so colour is
//! never the only cue.

/// A colour as 8-bit sRGB.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Rgb {
    /// Red, 0 to 255.
    pub r: u8,
    /// Green, 0 to 255.
    pub g: u8,
    /// Blue, 0 to 255.
    pub b: u8,
}

impl Rgb {
    const fn new(r: u8, g: u8, b: u8) -> Rgb {
        Rgb { r, g, b }
    }

    /// The colour blended toward white by `amount` (0: unchanged, 1: white), e.g. for the
    /// cells where every check passes.
    pub fn lighter(self, amount: f64) -> Rgb {
        let a = amount.clamp(0.0, 1.0);
        let mix = |c: u8| (f64::from(c) + a * (255.0 - f64::from(c))).round() as u8;
        Rgb::new(mix(self.r), mix(self.g), mix(self.b))
    }

    /// `#rrggbb`.
    pub fn hex(self) -> String {
        format!("#{:02x}{:02x}{:02x}", self.r, self.g, self.b)
    }
}

/// The Okabe-Ito set, in its published order, with its names.
pub const OKABE_ITO: [(&str, Rgb); 8] = [
    ("black", Rgb::new(0, 0, 0)),
    ("orange", Rgb::new(230, 159, 0)),
    ("sky blue", Rgb::new(86, 180, 233)),
    ("bluish green", Rgb::new(0, 158, 115)),
    ("yellow", Rgb::new(240, 228, 66)),
    ("blue", Rgb::new(0, 114, 178)),
    ("vermillion", Rgb::new(213, 94, 0)),
    ("reddish purple", Rgb::new(204, 121, 167)),
];

/// Colour of the checks without one of their own (neutral grey: a lightness apart from
/// the set under every deficiency).
pub const OTHER: Rgb = Rgb::new(153, 153, 153);

/// The checks with a colour of their own: the eight checks of `checks::run`, each an
/// Okabe-Ito colour. Black goes to the hub clearance, which limits a design only when it
/// fails (it is judged in millimetres).
pub const CHECK_COLOURS: [(&str, Rgb); 8] = [
    ("fit", OKABE_ITO[2].1),
    ("reach", OKABE_ITO[1].1),
    ("hold", OKABE_ITO[3].1),
    ("static", OKABE_ITO[6].1),
    ("fatigue", OKABE_ITO[7].1),
    ("actuator", OKABE_ITO[5].1),
    ("stroke", OKABE_ITO[4].1),
    ("hub", OKABE_ITO[0].1),
];

/// The colour of a check by its id; [`OTHER`] for a check without one.
pub fn check_colour(id: &str) -> Rgb {
    CHECK_COLOURS
        .iter()
        .find(|(k, _)| *k == id)
        .map_or(OTHER, |(_, c)| *c)
}

/// The colour of a map cell: its limiting check's colour, lightened by half where every
/// check passes, so pass and fail regions differ in lightness as well as in hue.
pub fn cell_colour(limiting: Option<&str>, pass: bool) -> Rgb {
    let base = limiting.map_or(OTHER, check_colour);
    if pass { base.lighter(0.5) } else { base }
}
