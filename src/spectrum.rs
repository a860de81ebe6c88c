//! A simulated absorption spectrum of a 1Sigma - 1Sigma band system (or of infrared bands
//! within one 1Sigma state): Boltzmann populations of the lower levels, P and R lines with
//! their Hoenl-London factors, and a broadened profile.
//!
//! Line intensity (absorption, relative; the strongest line is 1):
//!
//! ```text
//!   I = nu (1 - exp(-nu / kT)) exp(-E''/kT) / Q * S(J', J'') / (2J'' + 1) * |M(v', v'')|^2
//! ```
//!
//! with E'' the lower level above the lowest, Q = sum (2J'' + 1) exp(-E''/kT) over the lower
//! levels computed, and the Hoenl-London factors of a Sigma - Sigma transition S = J'' + 1 for
//! the R branch (J' = J'' + 1) and S = J'' for the P branch (J' = J'' - 1) (Herzberg, *Spectra
//! of Diatomic Molecules* (1950), ch. IV; common practice). |M|^2 is the band's squared
//! transition moment, or the Franck-Condon factor when no moment function is given (a
//! constant electronic moment). Not included: the J dependence of M (Herman-Wallis effects),
//! nuclear-spin statistics of homonuclear molecules, and Q branches (absent for Sigma - Sigma).
//!
//! Profiles are normalised to unit area: Gaussian, Lorentzian, or their convolution (Voigt),
//! computed numerically once as a table of offsets and interpolated. Energies in hartree.

use crate::solver::LevelSet;

/// P (J' = J'' - 1) or R (J' = J'' + 1).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Branch {
    P,
    R,
}

/// One rovibrational line.
#[derive(Debug, Clone, PartialEq)]
pub struct Line {
    pub v_upper: u32,
    pub j_upper: u32,
    pub v_lower: u32,
    pub j_lower: u32,
    pub branch: Branch,
    /// Transition energy, hartree.
    pub position: f64,
    /// Relative absorption intensity (strongest line 1).
    pub intensity: f64,
    /// Fraction of molecules in the lower level.
    pub lower_population: f64,
}

/// Line shape, full widths at half maximum in hartree.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Profile {
    Gaussian {
        fwhm: f64,
    },
    Lorentzian {
        fwhm: f64,
    },
    Voigt {
        gaussian_fwhm: f64,
        lorentzian_fwhm: f64,
    },
}

impl Profile {
    /// The smallest full width of the shape, hartree.
    pub fn narrowest(&self) -> f64 {
        match *self {
            Profile::Gaussian { fwhm } | Profile::Lorentzian { fwhm } => fwhm,
            Profile::Voigt {
                gaussian_fwhm,
                lorentzian_fwhm,
            } => gaussian_fwhm.min(lorentzian_fwhm),
        }
    }

    /// An upper bound of the full width of the shape, hartree.
    pub fn widest(&self) -> f64 {
        match *self {
            Profile::Gaussian { fwhm } | Profile::Lorentzian { fwhm } => fwhm,
            Profile::Voigt {
                gaussian_fwhm,
                lorentzian_fwhm,
            } => gaussian_fwhm + lorentzian_fwhm,
        }
    }
}

/// Problems simulating.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SpectrumError {
    #[error("the temperature must be positive, found {0} K")]
    Temperature(f64),
    #[error("no line is strong enough at this temperature in the bands and J range given")]
    NoLines,
    #[error("the profile widths must be positive")]
    Width,
    #[error("the axis step {step:.3e} is coarser than a fifth of the narrowest width {width:.3e}; use a finer step so the profile is resolved")]
    StepTooCoarse { step: f64, width: f64 },
}

/// Boltzmann factor k_B T in hartree for T in kelvin (CODATA 2018).
pub fn thermal_energy(kelvin: f64) -> f64 {
    kelvin * crate::units::codata::BOLTZMANN / crate::units::codata::HARTREE
}

/// The lines from the lower levels (one set per J, J = 0, 1, ...) to the upper levels (one
/// set per J), with `strength(v', v'')` = |M|^2 of the band (None: no such band), the upper
/// energies shifted by `offset`, at temperature `kelvin`. Lines weaker than
/// `relative_cutoff` of the strongest are dropped; so are lines whose upper level is not
/// bound.
pub fn simulate(
    lower: &[LevelSet],
    upper: &[LevelSet],
    strength: &dyn Fn(u32, u32) -> Option<f64>,
    offset: f64,
    kelvin: f64,
    relative_cutoff: f64,
) -> Result<Vec<Line>, SpectrumError> {
    if kelvin <= 0.0 || !kelvin.is_finite() {
        return Err(SpectrumError::Temperature(kelvin));
    }
    let kt = thermal_energy(kelvin);
    let lowest = lower
        .iter()
        .flat_map(|s| s.levels.first())
        .map(|l| l.energy)
        .fold(f64::INFINITY, f64::min);
    let weight = |j: u32, energy: f64| f64::from(2 * j + 1) * (-(energy - lowest) / kt).exp();
    let partition: f64 = lower
        .iter()
        .flat_map(|s| s.levels.iter().map(move |l| weight(s.j, l.energy)))
        .sum();
    let level = |sets: &[LevelSet], v: u32, j: u32| {
        sets.iter()
            .find(|s| s.j == j)
            .and_then(|s| s.levels.iter().find(|l| l.v == v))
            .map(|l| l.energy)
    };
    let mut lines = Vec::new();
    for set in lower {
        let j_lower = set.j;
        for low in &set.levels {
            let population = weight(j_lower, low.energy) / partition;
            for (branch, j_upper, honl_london) in [
                (Branch::R, j_lower + 1, f64::from(j_lower + 1)),
                (Branch::P, j_lower.wrapping_sub(1), f64::from(j_lower)),
            ] {
                if j_lower == 0 && branch == Branch::P {
                    continue;
                }
                for up in upper.iter().filter(|s| s.j == 0) {
                    for band_upper in &up.levels {
                        let Some(m2) = strength(band_upper.v, low.v) else {
                            continue;
                        };
                        let Some(e_upper) = level(upper, band_upper.v, j_upper) else {
                            continue;
                        };
                        let position = e_upper + offset - low.energy;
                        if position <= 0.0 {
                            continue;
                        }
                        let intensity =
                            position * (1.0 - (-position / kt).exp()) * population * honl_london
                                / f64::from(2 * j_lower + 1)
                                * m2;
                        lines.push(Line {
                            v_upper: band_upper.v,
                            j_upper,
                            v_lower: low.v,
                            j_lower,
                            branch,
                            position,
                            intensity,
                            lower_population: population,
                        });
                    }
                }
            }
        }
    }
    let strongest = lines.iter().map(|l| l.intensity).fold(0.0, f64::max);
    if strongest <= 0.0 {
        return Err(SpectrumError::NoLines);
    }
    lines.retain(|l| l.intensity >= relative_cutoff * strongest);
    lines.iter_mut().for_each(|l| l.intensity /= strongest);
    lines.sort_by(|a, b| a.position.total_cmp(&b.position));
    Ok(lines)
}

/// A unit-area line shape as a function of the offset from the line centre.
struct Shape {
    profile: Profile,
    /// For Voigt: the shape tabulated at offsets k * spacing, k = 0.. (symmetric).
    table: Vec<f64>,
    spacing: f64,
}

fn gaussian(x: f64, fwhm: f64) -> f64 {
    let sigma = fwhm / (8.0 * std::f64::consts::LN_2).sqrt();
    (-0.5 * (x / sigma).powi(2)).exp() / (sigma * (2.0 * std::f64::consts::PI).sqrt())
}

fn lorentzian(x: f64, fwhm: f64) -> f64 {
    let gamma = 0.5 * fwhm;
    gamma / (std::f64::consts::PI * (x * x + gamma * gamma))
}

impl Shape {
    fn new(profile: Profile, reach: f64) -> Shape {
        let (table, spacing) = match profile {
            Profile::Voigt {
                gaussian_fwhm,
                lorentzian_fwhm,
            } => {
                // V(x) = int G(t) L(x - t) dt. When the Lorentzian is the wider, the
                // trapezoidal rule over +-6 sigma of the Gaussian (400 nodes) resolves both.
                // When it is the narrower, substitute t = x - gamma tan(theta):
                // V(x) = (1/pi) int G(x - gamma tan theta) d theta over (-pi/2, pi/2), a smooth
                // integrand (midpoint rule, 2000 nodes). Tabulated every min(width)/100 (at
                // most 20000 entries) out to `reach`.
                let spacing = (gaussian_fwhm.min(lorentzian_fwhm) / 100.0).max(reach / 20000.0);
                let sigma = gaussian_fwhm / (8.0 * std::f64::consts::LN_2).sqrt();
                let gamma = 0.5 * lorentzian_fwhm;
                let voigt = |x: f64| -> f64 {
                    if gamma >= sigma {
                        let nodes = 400;
                        let dt = 12.0 * sigma / nodes as f64;
                        (0..=nodes)
                            .map(|i| {
                                let t = -6.0 * sigma + i as f64 * dt;
                                let end = if i == 0 || i == nodes { 0.5 } else { 1.0 };
                                end * gaussian(t, gaussian_fwhm)
                                    * lorentzian(x - t, lorentzian_fwhm)
                            })
                            .sum::<f64>()
                            * dt
                    } else {
                        let nodes = 2000;
                        let pi = std::f64::consts::PI;
                        (0..nodes)
                            .map(|i| {
                                let theta = -0.5 * pi + (i as f64 + 0.5) * pi / nodes as f64;
                                gaussian(x - gamma * theta.tan(), gaussian_fwhm)
                            })
                            .sum::<f64>()
                            / nodes as f64
                    }
                };
                let count = (reach / spacing).ceil() as usize + 2;
                let table = (0..count).map(|k| voigt(k as f64 * spacing)).collect();
                (table, spacing)
            }
            _ => (Vec::new(), 0.0),
        };
        Shape {
            profile,
            table,
            spacing,
        }
    }

    fn at(&self, offset: f64) -> f64 {
        match self.profile {
            Profile::Gaussian { fwhm } => gaussian(offset, fwhm),
            Profile::Lorentzian { fwhm } => lorentzian(offset, fwhm),
            Profile::Voigt { .. } => {
                let x = offset.abs() / self.spacing;
                let k = x.floor() as usize;
                match (self.table.get(k), self.table.get(k + 1)) {
                    (Some(a), Some(b)) => a + (b - a) * (x - k as f64),
                    _ => 0.0,
                }
            }
        }
    }
}

/// The broadened spectrum sum_lines I * shape(x - position) on the points `axis` (hartree),
/// which must be uniform with the given step. Each line contributes within 50 widths of its
/// centre (the Lorentzian wings beyond hold 0.6% of its area).
pub fn broaden(lines: &[Line], profile: Profile, axis: &[f64]) -> Result<Vec<f64>, SpectrumError> {
    let step = if axis.len() > 1 {
        axis[1] - axis[0]
    } else {
        0.0
    };
    let reach_widths = 50.0;
    let narrowest = profile.narrowest();
    if narrowest.is_nan() || narrowest <= 0.0 {
        return Err(SpectrumError::Width);
    }
    if step > narrowest / 5.0 {
        return Err(SpectrumError::StepTooCoarse {
            step,
            width: narrowest,
        });
    }
    let reach = reach_widths * profile.widest();
    let shape = Shape::new(profile, reach);
    let mut values = vec![0.0; axis.len()];
    let Some(&start) = axis.first() else {
        return Ok(values);
    };
    for line in lines {
        let first = ((line.position - reach - start) / step).floor().max(0.0) as usize;
        let last = (((line.position + reach - start) / step).ceil().max(0.0) as usize)
            .min(axis.len().saturating_sub(1));
        for i in first..=last.max(first).min(axis.len().saturating_sub(1)) {
            values[i] += line.intensity * shape.at(axis[i] - line.position);
        }
    }
    Ok(values)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn area(profile: Profile, half_span: f64, step: f64) -> f64 {
        let line = Line {
            v_upper: 0,
            j_upper: 1,
            v_lower: 0,
            j_lower: 0,
            branch: Branch::R,
            position: 0.0,
            intensity: 1.0,
            lower_population: 1.0,
        };
        let n = (2.0 * half_span / step) as usize;
        let axis: Vec<f64> = (0..=n).map(|i| -half_span + i as f64 * step).collect();
        broaden(&[line], profile, &axis)
            .unwrap()
            .iter()
            .sum::<f64>()
            * step
    }

    #[test]
    fn profiles_have_unit_area() {
        // Within +-50 widths a Lorentzian holds 1 - (2/pi) atan(1/100) ~ 0.99363 of its
        // area (closed form); a Gaussian all of it. The tolerances are ours: the trapezoidal
        // sum of a Gaussian sampled 1/20 of its width is exact to rounding; the Lorentzian's
        // cut at the axis ends is the closed form's; the Voigt's wings beyond 50 widths (its
        // Lorentzian part holds about 0.6% there) allow 1%.
        assert!((area(Profile::Gaussian { fwhm: 1.0 }, 60.0, 0.05) - 1.0).abs() < 1e-9);
        let lorentz = area(Profile::Lorentzian { fwhm: 1.0 }, 60.0, 0.05);
        let expected = 1.0 - 2.0 / std::f64::consts::PI * (1.0f64 / 100.0).atan();
        assert!((lorentz - expected).abs() < 1e-4, "{lorentz} vs {expected}");
        let voigt = area(
            Profile::Voigt {
                gaussian_fwhm: 1.0,
                lorentzian_fwhm: 1.0,
            },
            120.0,
            0.05,
        );
        assert!((voigt - 1.0).abs() < 1e-2, "{voigt}");
    }

    #[test]
    fn voigt_peak_matches_the_faddeeva_closed_form() {
        // At the centre the Voigt profile is exp(y^2) erfc(y) / (sigma sqrt(2 pi)) with
        // y = gamma / (sigma sqrt 2) (the Faddeeva function on the imaginary axis, w(iy) =
        // exp(y^2) erfc(y); standard), in both integration regimes.
        for (gaussian_fwhm, lorentzian_fwhm) in [(1.0, 0.3), (1.0, 3.0)] {
            let shape = Shape::new(
                Profile::Voigt {
                    gaussian_fwhm,
                    lorentzian_fwhm,
                },
                1.0,
            );
            let sigma = gaussian_fwhm / (8.0 * std::f64::consts::LN_2).sqrt();
            let y = 0.5 * lorentzian_fwhm / (sigma * 2f64.sqrt());
            let exact =
                (y * y).exp() * libm::erfc(y) / (sigma * (2.0 * std::f64::consts::PI).sqrt());
            assert!(
                (shape.at(0.0) - exact).abs() < 1e-6 * exact,
                "{gaussian_fwhm}, {lorentzian_fwhm}: {} vs {exact}",
                shape.at(0.0)
            );
        }
    }

    #[test]
    fn voigt_tends_to_its_limits() {
        // A Voigt with a tiny Lorentzian part is the Gaussian. Our bound: 0.5%, several
        // times the Lorentzian's fraction of the width (0.1%).
        let narrow = Shape::new(
            Profile::Voigt {
                gaussian_fwhm: 1.0,
                lorentzian_fwhm: 1e-3,
            },
            2.0,
        );
        let g = gaussian(0.3, 1.0);
        assert!(
            (narrow.at(0.3) - g).abs() < 5e-3 * g,
            "{} vs {g}",
            narrow.at(0.3)
        );
    }
}
