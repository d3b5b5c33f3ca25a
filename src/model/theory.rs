//! Plate theory and isocratic retention: retention factor, plate number and height, selectivity,
//! resolution (measured and Purnell form), peak shape (USP tailing, asymmetry), column dead
//! volume and dead time, plate-number and pressure estimates from column geometry, and the
//! linear-solvent-strength (LSS) model of retention versus organic fraction.
//!
//! Every function is pure, validates its inputs (finite, positive where the physics needs it) and
//! returns a [`TheoryError`] naming the offending quantity and value. Equations and their sources
//! are listed in each function's documentation and in `docs/theory-and-measured.md`.
//!
//! Main reference: L. R. Snyder, J. J. Kirkland, J. W. Dolan, *Introduction to Modern Liquid
//! Chromatography*, 3rd ed., Wiley 2010 (cited below as "SKD 2010"), chapter 2 (basic concepts)
//! and chapter 9 (gradient elution); L. R. Snyder, J. W. Dolan, *High-Performance Gradient
//! Elution*, Wiley 2007 ("SD 2007").

use serde::{Deserialize, Serialize};
use thiserror::Error;

/// Errors from the theory functions: a quantity was not finite, not positive, or out of range.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum TheoryError {
    /// A quantity was NaN or infinite.
    #[error("{quantity} must be a finite number, got {value}")]
    NotFinite {
        /// Name of the quantity, with unit.
        quantity: &'static str,
        /// The value given.
        value: f64,
    },
    /// A quantity that must be strictly positive was zero or negative.
    #[error("{quantity} must be greater than zero, got {value}; check the sign and the unit")]
    NotPositive {
        /// Name of the quantity, with unit.
        quantity: &'static str,
        /// The value given.
        value: f64,
    },
    /// A quantity that must not be negative was negative.
    #[error("{quantity} must not be negative, got {value}")]
    Negative {
        /// Name of the quantity, with unit.
        quantity: &'static str,
        /// The value given.
        value: f64,
    },
    /// A quantity lies outside its allowed range.
    #[error("{quantity} = {value} is outside the allowed range {min}..={max}")]
    OutOfRange {
        /// Name of the quantity, with unit.
        quantity: &'static str,
        /// The value given.
        value: f64,
        /// Lowest allowed value.
        min: f64,
        /// Highest allowed value.
        max: f64,
    },
    /// A retention time lies before the dead time, which no retained or unretained analyte can do.
    #[error(
        "retention time {retention_time_min} min is before the dead time {dead_time_min} min; \
         check t0 (or the column geometry and flow it was computed from)"
    )]
    RetentionBeforeDeadTime {
        /// Retention time, min.
        retention_time_min: f64,
        /// Dead time, min.
        dead_time_min: f64,
    },
    /// The peak width at 5 % height is smaller than its front half, which is impossible.
    #[error(
        "width at 5 % height ({width_min} min) is smaller than its front half-width ({front_min} min); \
         the columns may be swapped"
    )]
    FrontLargerThanWidth {
        /// Full width at 5 % height, min.
        width_min: f64,
        /// Front half-width at 5 % height, min.
        front_min: f64,
    },
}

/// Result alias for the theory functions.
pub type Result<T> = std::result::Result<T, TheoryError>;

pub(crate) fn finite(quantity: &'static str, value: f64) -> Result<f64> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(TheoryError::NotFinite { quantity, value })
    }
}

pub(crate) fn positive(quantity: &'static str, value: f64) -> Result<f64> {
    finite(quantity, value)?;
    if value > 0.0 {
        Ok(value)
    } else {
        Err(TheoryError::NotPositive { quantity, value })
    }
}

pub(crate) fn non_negative(quantity: &'static str, value: f64) -> Result<f64> {
    finite(quantity, value)?;
    if value >= 0.0 {
        Ok(value)
    } else {
        Err(TheoryError::Negative { quantity, value })
    }
}

/// Reduced plate height h = H/dp assumed for a well-packed modern column when no plate number is
/// measured. Common practice, no source beyond the usual range h ≈ 2–3 quoted in SKD 2010 ch. 2.
pub const REDUCED_PLATE_HEIGHT: f64 = 2.5;

/// Interstitial (between-particle) porosity assumed in the pressure estimate; ≈ 0.40 for packed
/// beds of spherical particles (SKD 2010 ch. 2; from memory).
pub const INTERSTITIAL_POROSITY: f64 = 0.40;

/// Retention factor k = (tR − tM)/tM.
///
/// Source: SKD 2010 ch. 2 (definition). Valid for any retained or unretained peak; tR = tM gives 0.
///
/// # Errors
/// t0 must be positive; tR must be finite and not before t0.
///
/// # Examples
/// ```
/// use phasewise::model::theory::retention_factor;
/// assert!((retention_factor(6.0, 1.5).unwrap() - 3.0).abs() < 1e-12);
/// ```
pub fn retention_factor(retention_time_min: f64, dead_time_min: f64) -> Result<f64> {
    let t0 = positive("dead time (min)", dead_time_min)?;
    let tr = finite("retention time (min)", retention_time_min)?;
    if tr < t0 {
        return Err(TheoryError::RetentionBeforeDeadTime {
            retention_time_min: tr,
            dead_time_min: t0,
        });
    }
    Ok((tr - t0) / t0)
}

/// Plate number from the width at half height: N = 5.54 (tR/w½)².
///
/// Source: SKD 2010 ch. 2; 5.54 = 8 ln 2 for a Gaussian peak. Assumes a Gaussian peak; tailing
/// peaks give an overestimate.
///
/// # Errors
/// tR and w½ must be positive.
pub fn plate_number_half_height(retention_time_min: f64, width_half_min: f64) -> Result<f64> {
    let tr = positive("retention time (min)", retention_time_min)?;
    let w = positive("width at half height (min)", width_half_min)?;
    Ok(5.54 * (tr / w).powi(2))
}

/// Plate number from the tangent baseline width: N = 16 (tR/wb)².
///
/// Source: SKD 2010 ch. 2; wb = 4σ for a Gaussian peak.
///
/// # Errors
/// tR and wb must be positive.
pub fn plate_number_base(retention_time_min: f64, width_base_min: f64) -> Result<f64> {
    let tr = positive("retention time (min)", retention_time_min)?;
    let w = positive("baseline width (min)", width_base_min)?;
    Ok(16.0 * (tr / w).powi(2))
}

/// Plate height H = L/N, returned in µm.
///
/// Source: SKD 2010 ch. 2 (definition).
///
/// # Errors
/// Length and plate number must be positive.
pub fn plate_height_um(column_length_mm: f64, plates: f64) -> Result<f64> {
    let l = positive("column length (mm)", column_length_mm)?;
    let n = positive("plate number", plates)?;
    Ok(l * 1000.0 / n)
}

/// Selectivity α = k2/k1 with k2 ≥ k1 (the arguments may be given in either order).
///
/// Source: SKD 2010 ch. 2 (definition).
///
/// # Errors
/// Both retention factors must be positive (α is undefined for an unretained first peak).
pub fn selectivity(retention_factor_a: f64, retention_factor_b: f64) -> Result<f64> {
    let a = positive("retention factor of the first peak", retention_factor_a)?;
    let b = positive("retention factor of the second peak", retention_factor_b)?;
    Ok(if b >= a { b / a } else { a / b })
}

/// Resolution from widths at half height: Rs = 1.18 Δt / (w½,1 + w½,2).
///
/// Source: SKD 2010 ch. 2 (1.18 = 2 √(2 ln 2)/2 for Gaussian peaks). Order of peaks does not matter.
///
/// # Errors
/// Times must be finite, widths positive.
pub fn resolution_half_height(
    retention_time_1_min: f64,
    retention_time_2_min: f64,
    width_half_1_min: f64,
    width_half_2_min: f64,
) -> Result<f64> {
    let t1 = finite("retention time of peak 1 (min)", retention_time_1_min)?;
    let t2 = finite("retention time of peak 2 (min)", retention_time_2_min)?;
    let w1 = positive("width at half height of peak 1 (min)", width_half_1_min)?;
    let w2 = positive("width at half height of peak 2 (min)", width_half_2_min)?;
    Ok(1.18 * (t2 - t1).abs() / (w1 + w2))
}

/// Resolution from baseline widths: Rs = 2 Δt / (wb,1 + wb,2).
///
/// Source: SKD 2010 ch. 2 (definition).
///
/// # Errors
/// Times must be finite, widths positive.
pub fn resolution_base(
    retention_time_1_min: f64,
    retention_time_2_min: f64,
    width_base_1_min: f64,
    width_base_2_min: f64,
) -> Result<f64> {
    let t1 = finite("retention time of peak 1 (min)", retention_time_1_min)?;
    let t2 = finite("retention time of peak 2 (min)", retention_time_2_min)?;
    let w1 = positive("baseline width of peak 1 (min)", width_base_1_min)?;
    let w2 = positive("baseline width of peak 2 (min)", width_base_2_min)?;
    Ok(2.0 * (t2 - t1).abs() / (w1 + w2))
}

/// Purnell equation: Rs = (√N / 4) · (α − 1)/α · k2/(1 + k2), with k2 the retention factor of the
/// later peak.
///
/// Source: SKD 2010 ch. 2 (the "fundamental resolution equation" in its (α−1)/α form). Assumes
/// equal plate numbers and Gaussian peaks; accurate for α close to 1.
///
/// # Errors
/// N positive, α ≥ 1, k2 ≥ 0.
pub fn purnell_resolution(plates: f64, selectivity: f64, retention_factor_2: f64) -> Result<f64> {
    let n = positive("plate number", plates)?;
    let a = finite("selectivity", selectivity)?;
    if a < 1.0 {
        return Err(TheoryError::OutOfRange {
            quantity: "selectivity",
            value: a,
            min: 1.0,
            max: f64::INFINITY,
        });
    }
    let k = non_negative("retention factor of the later peak", retention_factor_2)?;
    Ok(n.sqrt() / 4.0 * (a - 1.0) / a * k / (1.0 + k))
}

/// USP tailing factor T = W0.05 / (2 f), W0.05 the full width at 5 % height and f the front
/// half-width (peak start to the perpendicular from the apex) at 5 % height.
///
/// Source: USP general chapter on chromatography (definition of tailing factor), in general
/// terms; also SKD 2010 ch. 2. T = 1 for a symmetric peak.
///
/// # Errors
/// Both widths positive and W0.05 ≥ f.
pub fn usp_tailing(width_5pct_min: f64, front_5pct_min: f64) -> Result<f64> {
    let w = positive("width at 5 % height (min)", width_5pct_min)?;
    let f = positive("front half-width at 5 % height (min)", front_5pct_min)?;
    if w < f {
        return Err(TheoryError::FrontLargerThanWidth {
            width_min: w,
            front_min: f,
        });
    }
    Ok(w / (2.0 * f))
}

/// Asymmetry factor As = b/a at 10 % height, a the front and b the back half-width.
///
/// Source: SKD 2010 ch. 2 (asymmetry factor at 10 % height).
///
/// # Errors
/// Both half-widths positive.
pub fn asymmetry(front_10pct_min: f64, back_10pct_min: f64) -> Result<f64> {
    let a = positive("front half-width at 10 % height (min)", front_10pct_min)?;
    let b = positive("back half-width at 10 % height (min)", back_10pct_min)?;
    Ok(b / a)
}

/// Column dead volume estimate Vm ≈ 0.5 · L · dc² (L and dc in cm, Vm in mL), here with L and dc
/// given in mm: Vm = 0.5 · (L/10) · (dc/10)² mL.
///
/// Source: SKD 2010 ch. 2 (rule of thumb for fully porous packings, total porosity ≈ 0.64).
/// Accuracy about ±10–20 %; superficially porous particles have Vm about 10–20 % lower.
///
/// # Errors
/// Length and diameter positive.
///
/// # Examples
/// ```
/// use phasewise::model::theory::column_dead_volume_ml;
/// // 150 mm × 4.6 mm: 0.5 × 15 × 0.46² = 1.587 mL
/// assert!((column_dead_volume_ml(150.0, 4.6).unwrap() - 1.587).abs() < 1e-9);
/// ```
pub fn column_dead_volume_ml(column_length_mm: f64, inner_diameter_mm: f64) -> Result<f64> {
    let l_cm = positive("column length (mm)", column_length_mm)? / 10.0;
    let dc_cm = positive("column inner diameter (mm)", inner_diameter_mm)? / 10.0;
    Ok(0.5 * l_cm * dc_cm * dc_cm)
}

/// Dead time t0 = Vm / F.
///
/// Source: SKD 2010 ch. 2 (definition).
///
/// # Errors
/// Volume and flow positive.
pub fn dead_time_min(dead_volume_ml: f64, flow_ml_min: f64) -> Result<f64> {
    let v = positive("column dead volume (mL)", dead_volume_ml)?;
    let f = positive("flow rate (mL/min)", flow_ml_min)?;
    Ok(v / f)
}

/// Dwell time tD = VD / F (VD the gradient delay volume from mixer to column inlet).
///
/// Source: SD 2007 ch. 2 (definition). A zero dwell volume is allowed.
///
/// # Errors
/// Volume not negative, flow positive.
pub fn dwell_time_min(dwell_volume_ml: f64, flow_ml_min: f64) -> Result<f64> {
    let v = non_negative("dwell volume (mL)", dwell_volume_ml)?;
    let f = positive("flow rate (mL/min)", flow_ml_min)?;
    Ok(v / f)
}

/// Plate-number estimate N = L / (h · dp) with the reduced plate height h =
/// [`REDUCED_PLATE_HEIGHT`] = 2.5.
///
/// Source: SKD 2010 ch. 2 (reduced plate height of a well-packed column near its optimum
/// velocity, h ≈ 2–3). Real columns at high flow, or with extra-column dispersion, give less.
///
/// # Errors
/// Length and particle size positive.
pub fn estimated_plate_number(column_length_mm: f64, particle_size_um: f64) -> Result<f64> {
    estimated_plate_number_with(column_length_mm, particle_size_um, REDUCED_PLATE_HEIGHT)
}

/// Plate-number estimate N = L / (h · dp) with a caller-chosen reduced plate height h.
///
/// # Errors
/// All inputs positive.
pub fn estimated_plate_number_with(
    column_length_mm: f64,
    particle_size_um: f64,
    reduced_plate_height: f64,
) -> Result<f64> {
    let l_um = positive("column length (mm)", column_length_mm)? * 1000.0;
    let dp = positive("particle size (µm)", particle_size_um)?;
    let h = positive("reduced plate height", reduced_plate_height)?;
    Ok(l_um / (h * dp))
}

/// Inputs to the column back-pressure estimate.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct PressureInput {
    /// Flow rate, mL/min.
    pub flow_ml_min: f64,
    /// Column length, mm.
    pub column_length_mm: f64,
    /// Column inner diameter, mm.
    pub inner_diameter_mm: f64,
    /// Particle diameter, µm.
    pub particle_size_um: f64,
    /// Mobile-phase viscosity at the column temperature, mPa·s (= cP). Water at 25 °C ≈ 0.89;
    /// water–organic mixtures pass through a maximum (water–methanol ≈ 1.6 near 40–50 % methanol),
    /// from memory; use the value for your mixture and temperature.
    pub viscosity_mpa_s: f64,
}

/// A back-pressure estimate with its uncertainty band.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct PressureEstimate {
    /// Central estimate across the packed bed, bar (excludes tubing and frits).
    pub pressure_bar: f64,
    /// Lower end of the uncertainty band, bar.
    pub low_bar: f64,
    /// Upper end of the uncertainty band, bar.
    pub high_bar: f64,
}

/// Column back-pressure from Darcy's law with the Kozeny–Carman permeability:
/// ΔP = [180 (1 − ε)² / ε³] · η · L · u_s / dp², u_s = F / (π dc²/4) the superficial velocity,
/// ε = [`INTERSTITIAL_POROSITY`] = 0.40 (flow-resistance factor ≈ 1010).
///
/// Source: Darcy's law with the Kozeny–Carman equation (e.g. R. B. Bird, W. E. Stewart,
/// E. N. Lightfoot, *Transport Phenomena*, 2nd ed. 2002, §6.4); applied to LC columns in SKD 2010
/// ch. 2. Uncertainty: real columns differ by a factor of about 1.5 either way (packing density,
/// particle-size distribution, frits; common practice, no source) — the band returned is
/// ×0.67 … ×1.5. Verify against the column's and the instrument's pressure limits before use: an
/// over-pressured column or fitting can fail and spray solvent.
///
/// # Errors
/// All inputs positive.
pub fn pressure_estimate(input: &PressureInput) -> Result<PressureEstimate> {
    let f = positive("flow rate (mL/min)", input.flow_ml_min)?;
    let l = positive("column length (mm)", input.column_length_mm)? * 1e-3;
    let dc = positive("column inner diameter (mm)", input.inner_diameter_mm)? * 1e-3;
    let dp = positive("particle size (µm)", input.particle_size_um)? * 1e-6;
    let eta = positive("viscosity (mPa·s)", input.viscosity_mpa_s)? * 1e-3;
    let eps = INTERSTITIAL_POROSITY;
    let resistance = 180.0 * (1.0 - eps).powi(2) / eps.powi(3);
    let q_m3_s = f * 1e-6 / 60.0;
    let u_s = q_m3_s / (std::f64::consts::PI * dc * dc / 4.0);
    let pa = resistance * eta * l * u_s / (dp * dp);
    let bar = pa / 1e5;
    Ok(PressureEstimate {
        pressure_bar: bar,
        low_bar: bar / 1.5,
        high_bar: bar * 1.5,
    })
}

/// Linear-solvent-strength model: log10 k = log10 kw − S · φ, φ the organic volume fraction (0–1).
///
/// Source: SKD 2010 ch. 6 and SD 2007 ch. 1 (Snyder's LSS model). Valid for reversed-phase
/// retention over a moderate range of φ (typically k from about 0.5 to 50); log kw is an
/// extrapolation and curvature at low and high φ is ignored.
///
/// # Errors
/// All inputs finite; φ in 0..=1.
pub fn lss_log_retention_factor(log_kw: f64, s: f64, organic_fraction: f64) -> Result<f64> {
    let lk = finite("log kw", log_kw)?;
    let s = finite("S", s)?;
    let phi = fraction("organic fraction", organic_fraction)?;
    Ok(lk - s * phi)
}

/// Checks that a volume fraction lies in 0..=1.
pub(crate) fn fraction(quantity: &'static str, value: f64) -> Result<f64> {
    finite(quantity, value)?;
    if (0.0..=1.0).contains(&value) {
        Ok(value)
    } else {
        Err(TheoryError::OutOfRange {
            quantity,
            value,
            min: 0.0,
            max: 1.0,
        })
    }
}

/// Snyder's rule of thumb for the LSS slope when it has not been measured: S ≈ 0.25 · M^0.5,
/// M the molar mass in g/mol (S ≈ 4 for M = 256 g/mol).
///
/// Source: SD 2007 ch. 1 / SKD 2010 ch. 9 (rule of thumb for small neutral molecules in
/// reversed phase; scatter about ±30 %, from memory). Not for peptides and proteins beyond a rough
/// start, nor for ionised analytes.
///
/// # Errors
/// M positive.
pub fn estimated_s_from_molar_mass(molar_mass_g_mol: f64) -> Result<f64> {
    let m = positive("molar mass (g/mol)", molar_mass_g_mol)?;
    Ok(0.25 * m.sqrt())
}

/// Converts % organic (0–100) to the volume fraction φ (0–1).
///
/// # Errors
/// Value in 0..=100.
pub fn percent_to_fraction(organic_pct: f64) -> Result<f64> {
    finite("organic content (%)", organic_pct)?;
    if (0.0..=100.0).contains(&organic_pct) {
        Ok(organic_pct / 100.0)
    } else {
        Err(TheoryError::OutOfRange {
            quantity: "organic content (%)",
            value: organic_pct,
            min: 0.0,
            max: 100.0,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    const TOL: f64 = 1e-9;

    #[test]
    fn retention_factor_hand_computed() {
        // Hand-computed: (6.0 − 1.5)/1.5 = 3.0.
        assert!((retention_factor(6.0, 1.5).unwrap() - 3.0).abs() < TOL);
        assert_eq!(retention_factor(1.5, 1.5).unwrap(), 0.0);
        assert!(matches!(
            retention_factor(1.0, 1.5),
            Err(TheoryError::RetentionBeforeDeadTime { .. })
        ));
        assert!(matches!(
            retention_factor(2.0, 0.0),
            Err(TheoryError::NotPositive { .. })
        ));
    }

    #[test]
    fn plate_numbers_agree_for_a_gaussian_peak() {
        // Self-consistency: for a Gaussian, w½ = 2.3548σ and wb = 4σ; both forms give (tR/σ)².
        let sigma = 0.05;
        let tr = 10.0;
        let nh = plate_number_half_height(tr, 2.0 * (2.0 * 2f64.ln()).sqrt() * sigma).unwrap();
        let nb = plate_number_base(tr, 4.0 * sigma).unwrap();
        // 5.54 is 8 ln 2 = 5.545 rounded, so the forms agree to 0.1 %.
        assert!((nh / nb - 1.0).abs() < 1e-3, "{nh} vs {nb}");
        assert!((nb - 40_000.0).abs() < 1e-6);
    }

    #[test]
    fn plate_height_hand_computed() {
        // 150 mm / 15 000 plates = 10 µm.
        assert!((plate_height_um(150.0, 15_000.0).unwrap() - 10.0).abs() < TOL);
    }

    #[test]
    fn resolution_forms_agree_for_gaussian_peaks() {
        // Self-consistency: w½ = 0.5887 wb for Gaussians, so 1.18 Δt/(Σw½) ≈ 2 Δt/(Σwb).
        let rb = resolution_base(5.0, 5.4, 0.2, 0.2).unwrap();
        let rh = resolution_half_height(5.0, 5.4, 0.2 * 0.5887, 0.2 * 0.5887).unwrap();
        assert!((rb - 2.0).abs() < TOL);
        // 1.18 rounds 2√(2 ln 2)/2 = 1.1774, so the forms agree to 0.3 %.
        assert!((rh / rb - 1.0).abs() < 3e-3);
    }

    #[test]
    fn purnell_hand_computed() {
        // N = 10 000, α = 1.1, k = 4: 100/4 × 0.1/1.1 × 0.8 = 1.81818…
        let rs = purnell_resolution(10_000.0, 1.1, 4.0).unwrap();
        assert!((rs - 25.0 * (0.1 / 1.1) * 0.8).abs() < TOL);
        assert!(purnell_resolution(10_000.0, 0.9, 4.0).is_err());
    }

    #[test]
    fn tailing_and_asymmetry_hand_computed() {
        // T = 0.30/(2 × 0.10) = 1.5; As = 0.15/0.10 = 1.5.
        assert!((usp_tailing(0.30, 0.10).unwrap() - 1.5).abs() < TOL);
        assert!((asymmetry(0.10, 0.15).unwrap() - 1.5).abs() < TOL);
        assert!(usp_tailing(0.05, 0.10).is_err());
    }

    #[test]
    fn dead_volume_and_time_hand_computed() {
        // Rule of thumb of SKD 2010 ch. 2: 150 × 4.6 mm → 0.5 × 15 cm × (0.46 cm)² = 1.587 mL;
        // at 1.0 mL/min t0 = 1.587 min.
        let vm = column_dead_volume_ml(150.0, 4.6).unwrap();
        assert!((vm - 1.587).abs() < TOL);
        assert!((dead_time_min(vm, 1.0).unwrap() - 1.587).abs() < TOL);
        // 50 × 2.1 mm: 0.5 × 5 × 0.0441 = 0.11025 mL.
        assert!((column_dead_volume_ml(50.0, 2.1).unwrap() - 0.11025).abs() < TOL);
        assert!(column_dead_volume_ml(-50.0, 2.1).is_err());
        assert!(dead_time_min(1.0, -1.0).is_err());
        assert_eq!(dwell_time_min(0.0, 1.0).unwrap(), 0.0);
    }

    #[test]
    fn plate_estimate_hand_computed() {
        // 150 mm = 150 000 µm; h·dp = 2.5 × 5 µm = 12.5 µm → N = 12 000.
        assert!((estimated_plate_number(150.0, 5.0).unwrap() - 12_000.0).abs() < 1e-6);
    }

    #[test]
    fn pressure_estimate_hand_computed() {
        // 150 × 4.6 mm, 5 µm, 1 mL/min, η = 0.89 mPa·s:
        // resistance = 180 × 0.36 / 0.064 = 1012.5; u_s = (1e-6/60)/(π × 0.0046²/4) = 1.0029e-3 m/s;
        // ΔP = 1012.5 × 0.89e-3 × 0.15 × 1.0029e-3 / 25e-12 = 5.423e6 Pa = 54.2 bar.
        let p = pressure_estimate(&PressureInput {
            flow_ml_min: 1.0,
            column_length_mm: 150.0,
            inner_diameter_mm: 4.6,
            particle_size_um: 5.0,
            viscosity_mpa_s: 0.89,
        })
        .unwrap();
        assert!((p.pressure_bar - 54.2).abs() < 0.1, "{}", p.pressure_bar);
        assert!(p.low_bar < p.pressure_bar && p.pressure_bar < p.high_bar);
    }

    #[test]
    fn lss_and_s_estimate() {
        // log k = 3 − 4 × 0.5 = 1.
        assert!((lss_log_retention_factor(3.0, 4.0, 0.5).unwrap() - 1.0).abs() < TOL);
        assert!(lss_log_retention_factor(3.0, 4.0, 1.5).is_err());
        // 0.25 × √256 = 4.
        assert!((estimated_s_from_molar_mass(256.0).unwrap() - 4.0).abs() < TOL);
        assert!((percent_to_fraction(35.0).unwrap() - 0.35).abs() < TOL);
        assert!(percent_to_fraction(101.0).is_err());
    }

    proptest! {
        #[test]
        fn k_is_zero_at_dead_time(t0 in 0.01f64..100.0) {
            prop_assert_eq!(retention_factor(t0, t0).unwrap(), 0.0);
        }

        #[test]
        fn resolution_grows_with_selectivity(
            n in 1000.0f64..100_000.0,
            k in 0.1f64..50.0,
            a1 in 1.0f64..3.0,
            da in 0.001f64..1.0,
        ) {
            let r1 = purnell_resolution(n, a1, k).unwrap();
            let r2 = purnell_resolution(n, a1 + da, k).unwrap();
            prop_assert!(r2 > r1);
        }

        #[test]
        fn selectivity_is_symmetric_and_at_least_one(a in 0.01f64..100.0, b in 0.01f64..100.0) {
            let s1 = selectivity(a, b).unwrap();
            let s2 = selectivity(b, a).unwrap();
            prop_assert!(s1 >= 1.0);
            prop_assert!((s1 - s2).abs() < 1e-12);
        }

        #[test]
        fn retention_factor_never_panics(tr in proptest::num::f64::ANY, t0 in proptest::num::f64::ANY) {
            let _ = retention_factor(tr, t0);
        }

        /// Unit conversions: volume (mL) ÷ flow (mL/min) = time (min), and back; the dead
        /// volume scales with L·dc² (a column twice as long holds twice the volume); percent
        /// to fraction divides by 100 and stays in [0, 1].
        #[test]
        fn volume_time_and_percent_conversions_are_consistent(
            l in 10.0f64..300.0,
            dc in 0.5f64..10.0,
            flow in 0.01f64..5.0,
            pct in 0.0f64..=100.0,
        ) {
            let vm = column_dead_volume_ml(l, dc).unwrap();
            let t0 = dead_time_min(vm, flow).unwrap();
            prop_assert!((t0 * flow - vm).abs() <= 1e-12 * vm.max(1.0));
            let vm2 = column_dead_volume_ml(2.0 * l, dc).unwrap();
            prop_assert!((vm2 - 2.0 * vm).abs() <= 1e-12 * vm2);
            let dwell = dwell_time_min(vm, flow).unwrap();
            prop_assert!((dwell - t0).abs() <= 1e-12 * t0.max(1.0));
            let f = percent_to_fraction(pct).unwrap();
            prop_assert!((0.0..=1.0).contains(&f));
            prop_assert!((f * 100.0 - pct).abs() < 1e-12);
        }

        /// Plate number: the half-height and base-width forms agree for a Gaussian peak
        /// (w_b = 4σ, w½ = 2.355σ; 5.54 ≈ 2.355²), and plate height is L / N in µm.
        #[test]
        fn plate_number_forms_agree_for_a_gaussian(
            tr in 0.5f64..60.0,
            sigma in 0.001f64..0.5,
            l in 10.0f64..300.0,
        ) {
            let n_half = plate_number_half_height(tr, 2.3548 * sigma).unwrap();
            let n_base = plate_number_base(tr, 4.0 * sigma).unwrap();
            prop_assert!((n_half / n_base - 1.0).abs() < 0.002, "{n_half} vs {n_base}");
            let h = plate_height_um(l, n_base).unwrap();
            prop_assert!((h * n_base - l * 1000.0).abs() <= 1e-9 * l * 1000.0);
        }
    }
}
