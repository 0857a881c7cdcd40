//! NACA 4-digit, modified 4-digit and 5-digit sections, and their designations.
//!
//! Surfaces follow NACA Report 460: the half-thickness is laid off normal to the mean line,
//! x_u = x − y_t sin θ, y_u = y_c + y_t cos θ (and the opposite sign below), tan θ = dy_c/dx,
//! at cosine-spaced stations x = (1 − cos β)/2.

use super::naca_lines::{five_digit_reflexed, five_digit_standard, MeanLine, Thickness};
use super::{check_points_per_side, cosine_spacing, join_surfaces, Section};
use crate::{Result, SolverError};

/// Build the surfaces of a mean line plus a thickness distribution (NACA Report 460 §2).
fn build(
    name: String,
    mean: MeanLine,
    thickness: Thickness,
    points_per_side: usize,
) -> Result<Section> {
    check_points_per_side(points_per_side)?;
    let stations = cosine_spacing(points_per_side);
    let n = stations.len();
    let (mut xu, mut yu, mut xl, mut yl) = (
        Vec::with_capacity(n),
        Vec::with_capacity(n),
        Vec::with_capacity(n),
        Vec::with_capacity(n),
    );
    for &x in &stations {
        let (yc, slope) = mean.at(x);
        let yt = thickness.half(x);
        let theta = slope.atan();
        let (s, c) = theta.sin_cos();
        xu.push(x - yt * s);
        yu.push(yc + yt * c);
        xl.push(x + yt * s);
        yl.push(yc - yt * c);
    }
    let section = join_surfaces(name, (&xu, &yu), (&xl, &yl));
    section.validate()?;
    Ok(section)
}

fn check_thickness(thickness: f64) -> Result<()> {
    if !(thickness.is_finite() && thickness > 0.0 && thickness <= 0.5) {
        return Err(SolverError::input(format!(
            "thickness must be a fraction of chord in (0, 0.5], got {thickness}"
        )));
    }
    Ok(())
}

fn te_suffix(closed_te: bool) -> &'static str {
    if closed_te {
        " (closed TE)"
    } else {
        ""
    }
}

/// Digits `value·scale` as an integer when that is exact to 1e-9, for names like "NACA 2412".
fn digits(value: f64, scale: f64) -> Option<i64> {
    let v = value * scale;
    ((v - v.round()).abs() < 1e-9 && v >= 0.0).then(|| v.round() as i64)
}

/// The 4-digit mean line, checking its parameters.
fn four_digit_mean_line(camber: f64, camber_position: f64) -> Result<MeanLine> {
    if !(camber.is_finite() && camber.abs() <= 0.1) {
        return Err(SolverError::input(format!(
            "camber must be within ±0.1 chord, got {camber}"
        )));
    }
    if camber == 0.0 {
        return Ok(MeanLine::Flat);
    }
    if !(camber_position.is_finite() && (0.05..=0.95).contains(&camber_position)) {
        return Err(SolverError::input(format!(
            "camber position must be in [0.05, 0.95] chord for a cambered section, got {camber_position}"
        )));
    }
    Ok(MeanLine::FourDigit {
        m: camber,
        p: camber_position,
    })
}

fn four_digit_name(camber: f64, camber_position: f64, thickness: f64) -> String {
    let p = if camber == 0.0 {
        Some(0)
    } else {
        digits(camber_position, 10.0)
    };
    match (digits(camber, 100.0), p, digits(thickness, 100.0)) {
        (Some(m), Some(p), Some(t)) if m < 10 && p < 10 && t < 100 => format!("NACA {m}{p}{t:02}"),
        _ => format!("NACA 4-digit m={camber} p={camber_position} t={thickness}"),
    }
}

/// NACA 4-digit section (NACA Report 460): maximum camber `camber` at `camber_position`
/// (fractions of chord), thickness `thickness`. `closed_te` switches the x⁴ coefficient from
/// the report's −0.1015 (a small open trailing edge) to −0.1036 (closed).
/// `points_per_side` cosine-spaced stations per surface (the leading-edge point is shared).
pub fn naca4(
    camber: f64,
    camber_position: f64,
    thickness: f64,
    closed_te: bool,
    points_per_side: usize,
) -> Result<Section> {
    check_thickness(thickness)?;
    let mean = four_digit_mean_line(camber, camber_position)?;
    let name = format!(
        "{}{}",
        four_digit_name(camber, camber_position, thickness),
        te_suffix(closed_te)
    );
    build(
        name,
        mean,
        Thickness::four_digit(thickness, closed_te),
        points_per_side,
    )
}

fn modified_thickness(
    thickness: f64,
    le_radius_index: f64,
    max_thickness_position: f64,
) -> Result<Thickness> {
    check_thickness(thickness)?;
    if !(le_radius_index.is_finite() && (0.0..=9.0).contains(&le_radius_index)) {
        return Err(SolverError::input(format!(
            "leading-edge radius index must be in [0, 9], got {le_radius_index}"
        )));
    }
    if !(max_thickness_position.is_finite() && (0.2..=0.6).contains(&max_thickness_position)) {
        return Err(SolverError::input(format!(
            "position of maximum thickness must be in [0.2, 0.6] chord, got {max_thickness_position}"
        )));
    }
    Ok(Thickness::modified(
        thickness,
        le_radius_index,
        max_thickness_position,
    ))
}

fn modified_suffix(le_radius_index: f64, max_thickness_position: f64) -> String {
    match (
        digits(le_radius_index, 1.0),
        digits(max_thickness_position, 10.0),
    ) {
        (Some(i), Some(m)) => format!("-{i}{m}"),
        _ => format!(" I={le_radius_index} m={max_thickness_position}"),
    }
}

/// NACA modified 4-digit section ("0012-34"): the 4-digit mean line with the modified
/// thickness of Stack & von Doenhoff (NACA Report 492; Abbott & von Doenhoff §6.4), whose
/// leading-edge radius is 1.1019 (t·I/6)² for index `le_radius_index` = I and whose maximum
/// thickness sits at `max_thickness_position` (0.2–0.6). The trailing edge is open
/// (half-thickness 0.01·t) as in the reference.
pub fn naca4_modified(
    camber: f64,
    camber_position: f64,
    thickness: f64,
    le_radius_index: f64,
    max_thickness_position: f64,
    points_per_side: usize,
) -> Result<Section> {
    let t = modified_thickness(thickness, le_radius_index, max_thickness_position)?;
    let mean = four_digit_mean_line(camber, camber_position)?;
    let name = format!(
        "{}{}",
        four_digit_name(camber, camber_position, thickness),
        modified_suffix(le_radius_index, max_thickness_position)
    );
    build(name, mean, t, points_per_side)
}

fn five_digit_mean_line(design_cl: f64, p: f64, reflexed: bool) -> Result<MeanLine> {
    if !(design_cl.is_finite() && design_cl > 0.0 && design_cl <= 1.5) {
        return Err(SolverError::input(format!(
            "design cl must be in (0, 1.5], got {design_cl}"
        )));
    }
    let range = if reflexed { 0.10..=0.25 } else { 0.05..=0.25 };
    if !(p.is_finite() && range.contains(&p)) {
        return Err(SolverError::input(format!(
            "position of maximum camber must be in [{}, {}] chord for a {} 5-digit mean line, got {p}",
            range.start(),
            range.end(),
            if reflexed { "reflexed" } else { "standard" }
        )));
    }
    if reflexed {
        five_digit_reflexed(design_cl, p).ok_or_else(|| {
            SolverError::input(format!(
                "no reflexed 5-digit mean line has its maximum camber at {p}"
            ))
        })
    } else {
        Ok(five_digit_standard(design_cl, p))
    }
}

fn five_digit_name(design_cl: f64, p: f64, reflexed: bool, thickness: f64) -> String {
    match (
        digits(design_cl, 20.0 / 3.0),
        digits(p, 20.0),
        digits(thickness, 100.0),
    ) {
        (Some(l), Some(pp), Some(t)) if l < 10 && pp < 10 && t < 100 => {
            format!("NACA {l}{pp}{}{t:02}", u8::from(reflexed))
        }
        _ => format!(
            "NACA 5-digit cl={design_cl} p={p}{} t={thickness}",
            if reflexed { " reflexed" } else { "" }
        ),
    }
}

/// NACA 5-digit section (NACA Report 610): the standard or reflexed 5-digit mean line with
/// ideal lift coefficient `design_cl` and maximum camber at `max_camber_position`, plus the
/// 4-digit thickness. Standard lines at the tabulated positions use the report's (m, k1);
/// reflexed lines derive k2/k1 from zero quarter-chord moment (see the naca_lines module).
pub fn naca5(
    design_cl: f64,
    max_camber_position: f64,
    reflexed: bool,
    thickness: f64,
    closed_te: bool,
    points_per_side: usize,
) -> Result<Section> {
    check_thickness(thickness)?;
    let mean = five_digit_mean_line(design_cl, max_camber_position, reflexed)?;
    let name = format!(
        "{}{}",
        five_digit_name(design_cl, max_camber_position, reflexed, thickness),
        te_suffix(closed_te)
    );
    build(
        name,
        mean,
        Thickness::four_digit(thickness, closed_te),
        points_per_side,
    )
}

/// A parsed NACA designation, for callers that want the family parameters.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Designation {
    /// "MPTT": camber, camber position, thickness.
    FourDigit {
        camber: f64,
        camber_position: f64,
        thickness: f64,
    },
    /// "MPTT-IM": plus leading-edge radius index and position of maximum thickness.
    FourDigitModified {
        camber: f64,
        camber_position: f64,
        thickness: f64,
        le_radius_index: f64,
        max_thickness_position: f64,
    },
    /// "LPQTT": design cl = 0.15·L, maximum camber at 0.05·P, Q = 1 reflexed.
    FiveDigit {
        design_cl: f64,
        max_camber_position: f64,
        reflexed: bool,
        thickness: f64,
    },
    /// "LPQTT-IM": a 5-digit mean line with the modified thickness.
    FiveDigitModified {
        design_cl: f64,
        max_camber_position: f64,
        reflexed: bool,
        thickness: f64,
        le_radius_index: f64,
        max_thickness_position: f64,
    },
}

/// One parameter of a [`Designation`]: a number or a flag.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DesignationValue {
    /// A number (fractions of the chord, a design lift coefficient, an index).
    Number(f64),
    /// A yes/no parameter (a reflexed 5-digit mean line).
    Flag(bool),
}

impl Designation {
    /// The family's short name: naca4, naca4_modified, naca5 or naca5_modified.
    pub fn family(&self) -> &'static str {
        match self {
            Designation::FourDigit { .. } => "naca4",
            Designation::FourDigitModified { .. } => "naca4_modified",
            Designation::FiveDigit { .. } => "naca5",
            Designation::FiveDigitModified { .. } => "naca5_modified",
        }
    }

    /// The parameters by name, in the order of the designation's variant fields.
    pub fn parameters(&self) -> Vec<(&'static str, DesignationValue)> {
        use DesignationValue::{Flag, Number};
        let four = |camber, camber_position, thickness| {
            vec![
                ("camber", Number(camber)),
                ("camber_position", Number(camber_position)),
                ("thickness", Number(thickness)),
            ]
        };
        let five = |design_cl, max_camber_position, reflexed, thickness| {
            vec![
                ("design_cl", Number(design_cl)),
                ("max_camber_position", Number(max_camber_position)),
                ("reflexed", Flag(reflexed)),
                ("thickness", Number(thickness)),
            ]
        };
        let modified = |mut base: Vec<_>, le_radius_index, max_thickness_position| {
            base.push(("le_radius_index", Number(le_radius_index)));
            base.push(("max_thickness_position", Number(max_thickness_position)));
            base
        };
        match *self {
            Designation::FourDigit {
                camber,
                camber_position,
                thickness,
            } => four(camber, camber_position, thickness),
            Designation::FourDigitModified {
                camber,
                camber_position,
                thickness,
                le_radius_index,
                max_thickness_position,
            } => modified(
                four(camber, camber_position, thickness),
                le_radius_index,
                max_thickness_position,
            ),
            Designation::FiveDigit {
                design_cl,
                max_camber_position,
                reflexed,
                thickness,
            } => five(design_cl, max_camber_position, reflexed, thickness),
            Designation::FiveDigitModified {
                design_cl,
                max_camber_position,
                reflexed,
                thickness,
                le_radius_index,
                max_thickness_position,
            } => modified(
                five(design_cl, max_camber_position, reflexed, thickness),
                le_radius_index,
                max_thickness_position,
            ),
        }
    }
}

fn bad_code(code: &str, why: &str) -> SolverError {
    SolverError::input(format!(
        "unknown NACA designation '{code}': {why} (expected e.g. 2412, 0012-34, 23012 or 23112)"
    ))
}

/// Parse a NACA designation ("2412", "NACA 0012-34", "23012", "23112") into its parameters.
pub fn parse_designation(code: &str) -> Result<Designation> {
    let trimmed = code.trim();
    let body = match trimmed.get(..4) {
        Some(p) if p.eq_ignore_ascii_case("naca") => {
            trimmed[4..].trim_start_matches([' ', '-', '_']).trim()
        }
        _ => trimmed,
    };
    let (base, suffix) = match body.split_once('-') {
        Some((b, s)) => (b.trim(), Some(s.trim())),
        None => (body, None),
    };
    let digit_values = |s: &str| -> Option<Vec<f64>> {
        s.chars().map(|c| c.to_digit(10).map(f64::from)).collect()
    };
    let d = digit_values(base).ok_or_else(|| bad_code(code, "the designation must be digits"))?;
    let modified = match suffix {
        None => None,
        Some(s) => {
            let sd = digit_values(s).filter(|v| v.len() == 2).ok_or_else(|| {
                bad_code(
                    code,
                    "the modified-thickness suffix must be two digits (radius index, position)",
                )
            })?;
            Some((sd[0], sd[1] / 10.0))
        }
    };
    match d.len() {
        4 => {
            let (camber, camber_position, thickness) =
                (d[0] / 100.0, d[1] / 10.0, (10.0 * d[2] + d[3]) / 100.0);
            if camber > 0.0 && camber_position == 0.0 {
                return Err(bad_code(
                    code,
                    "a cambered 4-digit section needs a camber position digit 1-9",
                ));
            }
            Ok(match modified {
                None => Designation::FourDigit {
                    camber,
                    camber_position,
                    thickness,
                },
                Some((i, m)) => Designation::FourDigitModified {
                    camber,
                    camber_position,
                    thickness,
                    le_radius_index: i,
                    max_thickness_position: m,
                },
            })
        }
        5 => {
            if d[2] > 1.0 {
                return Err(bad_code(
                    code,
                    "the third digit of a 5-digit designation is 0 (standard) or 1 (reflexed)",
                ));
            }
            let (design_cl, p, reflexed, thickness) = (
                0.15 * d[0],
                0.05 * d[1],
                d[2] == 1.0,
                (10.0 * d[3] + d[4]) / 100.0,
            );
            Ok(match modified {
                None => Designation::FiveDigit {
                    design_cl,
                    max_camber_position: p,
                    reflexed,
                    thickness,
                },
                Some((i, m)) => Designation::FiveDigitModified {
                    design_cl,
                    max_camber_position: p,
                    reflexed,
                    thickness,
                    le_radius_index: i,
                    max_thickness_position: m,
                },
            })
        }
        _ => Err(bad_code(code, "4 or 5 digits are supported")),
    }
}

/// Build a section from a NACA designation ("2412", "0012", "0012-34", "2412-63", "23012",
/// "23112" reflexed; an optional "NACA " prefix). `closed_te` applies to the 4- and 5-digit
/// thickness (the modified thickness keeps its open trailing edge). Unknown codes give
/// `SolverError::Input` naming the code.
pub fn from_designation(code: &str, closed_te: bool, points_per_side: usize) -> Result<Section> {
    let with_code = |e: SolverError| match e {
        SolverError::Input(m) => SolverError::Input(format!("NACA '{}': {m}", code.trim())),
        other => other,
    };
    match parse_designation(code)? {
        Designation::FourDigit {
            camber,
            camber_position,
            thickness,
        } => naca4(
            camber,
            camber_position,
            thickness,
            closed_te,
            points_per_side,
        )
        .map_err(with_code),
        Designation::FourDigitModified {
            camber,
            camber_position,
            thickness,
            le_radius_index,
            max_thickness_position,
        } => naca4_modified(
            camber,
            camber_position,
            thickness,
            le_radius_index,
            max_thickness_position,
            points_per_side,
        )
        .map_err(with_code),
        Designation::FiveDigit {
            design_cl,
            max_camber_position,
            reflexed,
            thickness,
        } => naca5(
            design_cl,
            max_camber_position,
            reflexed,
            thickness,
            closed_te,
            points_per_side,
        )
        .map_err(with_code),
        Designation::FiveDigitModified {
            design_cl,
            max_camber_position,
            reflexed,
            thickness,
            le_radius_index,
            max_thickness_position,
        } => {
            let build_it = || -> Result<Section> {
                let t = modified_thickness(thickness, le_radius_index, max_thickness_position)?;
                let mean = five_digit_mean_line(design_cl, max_camber_position, reflexed)?;
                let name = format!(
                    "{}{}",
                    five_digit_name(design_cl, max_camber_position, reflexed, thickness),
                    modified_suffix(le_radius_index, max_thickness_position)
                );
                build(name, mean, t, points_per_side)
            };
            build_it().map_err(with_code)
        }
    }
}
