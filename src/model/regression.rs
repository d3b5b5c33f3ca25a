//! The LC retention model: chromatographic systems (`LcSystem`), the gradient-independent
//! retention target and its conversion to retention time through the linear-solvent-strength
//! (LSS) gradient integral, the ridge regression on analyte descriptors × system features,
//! cross-validated prediction intervals, co-elution probabilities, training and the model file.
//!
//! Target. For every (analyte, system) the model predicts `psi_k1`, the strong-solvent fraction
//! at which the analyte's retention factor is 1 under the LSS model
//! `log10 k = S (psi_k1 − psi)`, i.e. `psi_k1 = log10(kw)/S` (Snyder & Dolan, "High-Performance
//! Gradient Elution", Wiley 2007, ch. 2; from memory). The strong solvent is the organic
//! modifier in RP and water in HILIC (`psi = 1 − organic fraction`), an approximation for HILIC
//! documented in docs/model.md. S comes from the size rule `S = 0.25·sqrt(M/(g/mol))` (same
//! source, from memory). `psi_k1` is obtained from a measured retention time by inverting the
//! fundamental gradient equation `∫_0^{tR−t0} dt / (t0·k(psi_inlet(t))) = 1` (Nikitas &
//! Pappa-Louisi, J. Chromatogr. A 1216 (2009) 1737, from memory), which has a closed form for
//! piecewise-linear programs; the same integral maps a predicted `psi_k1` back to minutes for
//! any user gradient, dead time and dwell time.

use std::collections::BTreeMap;
use std::io::{Read, Write};
use std::path::Path;

use linfa::prelude::*;
use linfa_linear::LinearRegression;
use ndarray::{Array1, Array2};
use serde::{Deserialize, Serialize};
use thiserror::Error;

use super::features::{AnalyteFeatures, DescriptorSource, PhasewiseDescriptors};
use super::memory::{MemoryTable, MemoryWeights, SourceRelation};

/// Licence notice stored inside every model file (the model is derived from RepoRT).
pub const MODEL_LICENCE: &str = "Derived from RepoRT (Kretschmer et al., Nature Methods 21 (2024) 153-155), \
licensed CC BY-SA 4.0 (https://creativecommons.org/licenses/by-sa/4.0/); this model file is distributed under CC BY-SA 4.0.";

/// Errors of the retention model.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum ModelError {
    /// A gradient program is unusable.
    #[error(
        "gradient program invalid: {0}; give times in min (non-decreasing, first at 0) and organic content in 0-100 %"
    )]
    BadGradient(String),
    /// A system parameter is out of range.
    #[error("system parameter {name} = {value} is out of range ({expected})")]
    BadSystem {
        /// Parameter name with unit.
        name: &'static str,
        /// The value given.
        value: f64,
        /// What is accepted.
        expected: &'static str,
    },
    /// A descriptor the model needs is missing or not finite.
    #[error("analyte descriptor {0:?} is missing or not finite; compute it before predicting")]
    MissingDescriptor(String),
    /// The analyte elutes at the dead time (retention time not above t0).
    #[error(
        "retention time {rt_min} min is not above the dead time {t0_min} min; the analyte is unretained"
    )]
    Unretained {
        /// Retention time (min).
        rt_min: f64,
        /// Dead time (min).
        t0_min: f64,
    },
    /// Two predictions for a co-elution probability belong to different systems.
    #[error(
        "predictions belong to different systems ({0} vs {1}); predict both on the same system"
    )]
    DifferentSystems(String, String),
    /// A peak width is not positive.
    #[error("peak width {0} min must be positive and finite")]
    BadPeakWidth(f64),
    /// A data file could not be read.
    #[error("cannot read {path}: {reason}")]
    Io {
        /// File path.
        path: String,
        /// The I/O or format problem.
        reason: String,
    },
    /// A data table has a bad row.
    #[error("{path} line {line}: {reason}")]
    BadRow {
        /// File path.
        path: String,
        /// 1-based line number.
        line: usize,
        /// What is wrong.
        reason: String,
    },
    /// Too little data to train.
    #[error("too little training data: {0}")]
    TooLittleData(String),
}

/// Separation mode.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
pub enum Mode {
    /// Reversed phase: the organic modifier is the strong solvent.
    #[serde(rename = "RP")]
    ReversedPhase,
    /// Hydrophilic interaction: water is the strong solvent.
    #[serde(rename = "HILIC")]
    Hilic,
}

impl Mode {
    /// Short label (`RP`, `HILIC`).
    pub fn label(self) -> &'static str {
        match self {
            Mode::ReversedPhase => "RP",
            Mode::Hilic => "HILIC",
        }
    }
    /// Strong-solvent fraction for an organic content in %.
    pub fn strong_fraction(self, organic_pct: f64) -> f64 {
        match self {
            Mode::ReversedPhase => organic_pct / 100.0,
            Mode::Hilic => 1.0 - organic_pct / 100.0,
        }
    }
}

/// Generic stationary-phase chemistry class (USP-code based, no product names).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ChemClass {
    /// Octadecyl (USP L1).
    C18,
    /// Octyl (L7).
    C8,
    /// Cyanopropyl (L10).
    Cyano,
    /// Phenyl, phenyl-hexyl, biphenyl (L11).
    Phenyl,
    /// Pentafluorophenyl (L43).
    Pentafluorophenyl,
    /// Porous graphitic carbon (L109).
    PorousGraphiticCarbon,
    /// Bare silica (L3).
    BareSilica,
    /// Amide (L68).
    Amide,
    /// Zwitterionic (L114, L122).
    Zwitterionic,
    /// Not stated.
    Unknown,
}

/// All chemistry classes in encoding order (C18 is the reference level).
pub const CHEM_CLASSES: [ChemClass; 10] = [
    ChemClass::C18,
    ChemClass::C8,
    ChemClass::Cyano,
    ChemClass::Phenyl,
    ChemClass::Pentafluorophenyl,
    ChemClass::PorousGraphiticCarbon,
    ChemClass::BareSilica,
    ChemClass::Amide,
    ChemClass::Zwitterionic,
    ChemClass::Unknown,
];

impl ChemClass {
    /// Parses the class names used in the training tables.
    pub fn parse(s: &str) -> Option<Self> {
        Some(match s {
            "C18" => ChemClass::C18,
            "C8" => ChemClass::C8,
            "cyano" => ChemClass::Cyano,
            "phenyl" => ChemClass::Phenyl,
            "pentafluorophenyl" => ChemClass::Pentafluorophenyl,
            "porous_graphitic_carbon" => ChemClass::PorousGraphiticCarbon,
            "bare_silica" => ChemClass::BareSilica,
            "amide" => ChemClass::Amide,
            "zwitterionic" => ChemClass::Zwitterionic,
            "unknown" => ChemClass::Unknown,
            _ => return None,
        })
    }
    /// Name as used in tables.
    pub fn name(self) -> &'static str {
        match self {
            ChemClass::C18 => "C18",
            ChemClass::C8 => "C8",
            ChemClass::Cyano => "cyano",
            ChemClass::Phenyl => "phenyl",
            ChemClass::Pentafluorophenyl => "pentafluorophenyl",
            ChemClass::PorousGraphiticCarbon => "porous_graphitic_carbon",
            ChemClass::BareSilica => "bare_silica",
            ChemClass::Amide => "amide",
            ChemClass::Zwitterionic => "zwitterionic",
            ChemClass::Unknown => "unknown",
        }
    }
}

/// Organic modifier of the mobile phase.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Modifier {
    /// Acetonitrile.
    Acetonitrile,
    /// Methanol.
    Methanol,
    /// Anything else or a mixture (isopropanol, acetone blends).
    Other,
}

impl Modifier {
    /// Parses `acn`, `meoh` or anything else (→ `Other`).
    pub fn parse(s: &str) -> Self {
        match s {
            "acn" => Modifier::Acetonitrile,
            "meoh" => Modifier::Methanol,
            _ => Modifier::Other,
        }
    }
}

/// Main mobile-phase additive (buffer or acid) in the aqueous eluent.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Additive {
    /// Formic acid.
    FormicAcid,
    /// Acetic acid.
    AceticAcid,
    /// Trifluoroacetic acid.
    TrifluoroaceticAcid,
    /// Ammonium acetate.
    AmmoniumAcetate,
    /// Ammonium formate.
    AmmoniumFormate,
    /// Ammonium carbonate or bicarbonate.
    AmmoniumCarbonate,
    /// Ammonium hydroxide (ammonia).
    AmmoniumHydroxide,
    /// Ammonium fluoride.
    AmmoniumFluoride,
    /// Other or none.
    Other,
}

impl Additive {
    /// Parses the RepoRT additive names used in the training tables.
    pub fn parse(s: &str) -> Self {
        match s {
            "formic" => Additive::FormicAcid,
            "acetic" => Additive::AceticAcid,
            "trifluoroacetic" => Additive::TrifluoroaceticAcid,
            "nh4ac" => Additive::AmmoniumAcetate,
            "nh4form" => Additive::AmmoniumFormate,
            "nh4carb" | "nh4bicarb" => Additive::AmmoniumCarbonate,
            "nh4oh" => Additive::AmmoniumHydroxide,
            "nh4f" => Additive::AmmoniumFluoride,
            _ => Additive::Other,
        }
    }
    /// Reads a buffer or additive as a user writes it (`0.1 % formic acid`, `10 mM ammonium
    /// acetate pH 4.8`, `TFA`) or as a buffer id of the catalogue (`ammonium-formate-1`):
    /// case, hyphens and underscores are ignored, ammonium salts are recognised before their
    /// acids. Anything else (phosphate, citrate, no additive) is [`Additive::Other`].
    pub fn from_buffer_text(text: &str) -> Self {
        let t = text.to_lowercase().replace(['-', '_'], " ");
        let has = |w: &str| t.contains(w);
        if has("ammonium formate") {
            Additive::AmmoniumFormate
        } else if has("ammonium acetate") {
            Additive::AmmoniumAcetate
        } else if has("ammonium bicarbonate") || has("ammonium carbonate") {
            Additive::AmmoniumCarbonate
        } else if has("ammonium fluoride") {
            Additive::AmmoniumFluoride
        } else if has("ammonium hydroxide") || has("ammonia") {
            Additive::AmmoniumHydroxide
        } else if has("trifluoroacetic") || t.split_whitespace().any(|w| w == "tfa") {
            Additive::TrifluoroaceticAcid
        } else if has("formic") {
            Additive::FormicAcid
        } else if has("acetic") {
            Additive::AceticAcid
        } else {
            Additive::Other
        }
    }

    /// Typical aqueous pH of the additive at usual LC concentrations, used when the pH is not
    /// stated (common practice, no source).
    pub fn typical_ph(self) -> f64 {
        match self {
            Additive::FormicAcid => 2.7,
            Additive::AceticAcid => 3.2,
            Additive::TrifluoroaceticAcid => 2.0,
            Additive::AmmoniumAcetate => 6.8,
            Additive::AmmoniumFormate => 6.4,
            Additive::AmmoniumCarbonate => 7.8,
            Additive::AmmoniumHydroxide => 10.0,
            Additive::AmmoniumFluoride => 6.5,
            Additive::Other => 5.0,
        }
    }
}

/// One point of a gradient program: organic content (% v/v) reached at a time (min).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct GradientPoint {
    /// Time from injection (min).
    pub time_min: f64,
    /// Organic solvent content at the pump (% v/v).
    pub organic_pct: f64,
}

/// A chromatographic system as the model reads it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LcSystem {
    /// Separation mode.
    pub mode: Mode,
    /// Stationary-phase chemistry class.
    pub chem_class: ChemClass,
    /// Organic modifier.
    pub modifier: Modifier,
    /// Aqueous eluent pH, if known.
    pub ph: Option<f64>,
    /// Main additive.
    pub additive: Additive,
    /// Multi-segment linear gradient program (composition at the pump), linear between points,
    /// held at the last composition after the last point.
    pub gradient: Vec<GradientPoint>,
    /// Column dead time (min).
    pub t0_min: f64,
    /// Dwell (gradient delay) time from mixer to column inlet (min).
    pub dwell_min: f64,
    /// Flow rate (mL/min).
    pub flow_ml_min: f64,
    /// Column temperature (°C), if known.
    pub temperature_c: Option<f64>,
}

impl LcSystem {
    /// Checks ranges and the gradient program.
    ///
    /// # Errors
    /// `ModelError::BadSystem` or `ModelError::BadGradient` naming the offending value.
    pub fn validate(&self) -> Result<(), ModelError> {
        let check = |name, value: f64, ok: bool, expected| {
            if ok && value.is_finite() {
                Ok(())
            } else {
                Err(ModelError::BadSystem {
                    name,
                    value,
                    expected,
                })
            }
        };
        check(
            "t0_min",
            self.t0_min,
            self.t0_min > 0.0 && self.t0_min < 60.0,
            "0 < t0 < 60 min",
        )?;
        check(
            "dwell_min",
            self.dwell_min,
            (0.0..60.0).contains(&self.dwell_min),
            "0 <= dwell < 60 min",
        )?;
        check(
            "flow_ml_min",
            self.flow_ml_min,
            self.flow_ml_min > 0.0 && self.flow_ml_min < 20.0,
            "0 < flow < 20 mL/min",
        )?;
        if let Some(ph) = self.ph {
            check("ph", ph, (0.0..=14.0).contains(&ph), "0-14")?;
        }
        if let Some(t) = self.temperature_c {
            check(
                "temperature_c",
                t,
                (-10.0..=150.0).contains(&t),
                "-10 to 150 °C",
            )?;
        }
        if self.gradient.is_empty() {
            return Err(ModelError::BadGradient("no points".into()));
        }
        let mut last = f64::NEG_INFINITY;
        for p in &self.gradient {
            if !(p.time_min.is_finite() && p.time_min >= 0.0 && p.time_min >= last) {
                return Err(ModelError::BadGradient(format!(
                    "time {} min after {} min",
                    p.time_min, last
                )));
            }
            if !(p.organic_pct.is_finite() && (0.0..=100.0).contains(&p.organic_pct)) {
                return Err(ModelError::BadGradient(format!(
                    "organic content {} % at {} min",
                    p.organic_pct, p.time_min
                )));
            }
            last = p.time_min;
        }
        if self.gradient[0].time_min != 0.0 {
            return Err(ModelError::BadGradient(format!(
                "first point at {} min, expected 0",
                self.gradient[0].time_min
            )));
        }
        Ok(())
    }

    /// Strong-solvent program at the column inlet: pump program delayed by the dwell time.
    fn inlet_program(&self) -> Vec<(f64, f64)> {
        let m = self.mode;
        let mut pts = Vec::with_capacity(self.gradient.len() + 1);
        pts.push((0.0, m.strong_fraction(self.gradient[0].organic_pct)));
        for p in &self.gradient {
            pts.push((
                p.time_min + self.dwell_min,
                m.strong_fraction(p.organic_pct),
            ));
        }
        pts
    }

    /// Organic content (%) at the pump at time `t_min` (held before 0 and after the end).
    pub fn organic_at_pct(&self, t_min: f64) -> f64 {
        let g = &self.gradient;
        if t_min <= g[0].time_min {
            return g[0].organic_pct;
        }
        for w in g.windows(2) {
            if t_min <= w[1].time_min {
                let dt = w[1].time_min - w[0].time_min;
                if dt <= 0.0 {
                    return w[1].organic_pct;
                }
                let f = (t_min - w[0].time_min) / dt;
                return w[0].organic_pct + f * (w[1].organic_pct - w[0].organic_pct);
            }
        }
        g[g.len() - 1].organic_pct
    }

    /// Normalised gradient steepness `Δpsi·t0/tG` of the main ramp (strong-solvent change from
    /// the start to its maximum, over the time to reach it); 0 for isocratic programs.
    pub fn steepness(&self) -> f64 {
        let m = self.mode;
        let start = m.strong_fraction(self.gradient[0].organic_pct);
        let (t_max, psi_max) = self
            .gradient
            .iter()
            .map(|p| (p.time_min, m.strong_fraction(p.organic_pct)))
            .fold(
                (0.0, start),
                |acc, x| if x.1 > acc.1 + 1e-12 { x } else { acc },
            );
        if t_max <= 0.0 || psi_max <= start {
            0.0
        } else {
            (psi_max - start) * self.t0_min / t_max
        }
    }

    /// Last time in the program (min).
    pub fn program_end_min(&self) -> f64 {
        self.gradient.last().map_or(0.0, |p| p.time_min) + self.dwell_min
    }

    /// Short text identifying the system for co-elution checks.
    pub fn fingerprint(&self) -> String {
        let g: Vec<String> = self
            .gradient
            .iter()
            .map(|p| format!("{}:{}", p.time_min, p.organic_pct))
            .collect();
        format!(
            "{}|{}|{:?}|t0={}|td={}|{}",
            self.mode.label(),
            self.chem_class.name(),
            self.modifier,
            self.t0_min,
            self.dwell_min,
            g.join(";")
        )
    }
}

/// LSS S parameter from the size rule `S = 0.25·sqrt(M)` (Snyder & Dolan 2007, from memory),
/// bounded to 2-12 so tiny or huge molecules stay in the range the rule was set up for.
pub fn lss_s(mw_g_mol: f64) -> f64 {
    (0.25 * mw_g_mol.max(1.0).sqrt()).clamp(2.0, 12.0)
}

/// `∫ 10^{S·psi(t)} dt` over one linear segment from psi `a` with slope `m` (1/min) for `dt` min.
fn segment_integral(s: f64, a: f64, m: f64, dt: f64) -> f64 {
    let base = 10f64.powf(s * a);
    let x = s * m * dt * std::f64::consts::LN_10;
    if x.abs() < 1e-9 {
        base * dt
    } else {
        base * x.exp_m1() / (s * m * std::f64::consts::LN_10)
    }
}

/// `F(T) = ∫_0^T 10^{S psi_inlet(t)} dt` for a piecewise-linear inlet program.
fn lss_integral(program: &[(f64, f64)], s: f64, t_end: f64) -> f64 {
    let mut total = 0.0;
    for w in program.windows(2) {
        let (t_a, p_a) = w[0];
        let (t_b, p_b) = w[1];
        if t_end <= t_a {
            return total;
        }
        let dt_seg = t_b - t_a;
        if dt_seg <= 0.0 {
            continue;
        }
        let m = (p_b - p_a) / dt_seg;
        let dt = dt_seg.min(t_end - t_a);
        total += segment_integral(s, p_a, m, dt);
    }
    let (t_last, p_last) = program[program.len() - 1];
    if t_end > t_last {
        total += 10f64.powf(s * p_last) * (t_end - t_last);
    }
    total
}

/// Inverse of `lss_integral`: the time T at which `F(T) = target`.
fn lss_inverse(program: &[(f64, f64)], s: f64, target: f64) -> f64 {
    let mut remaining = target;
    for w in program.windows(2) {
        let (t_a, p_a) = w[0];
        let (t_b, p_b) = w[1];
        let dt_seg = t_b - t_a;
        if dt_seg <= 0.0 {
            continue;
        }
        let m = (p_b - p_a) / dt_seg;
        let seg = segment_integral(s, p_a, m, dt_seg);
        if seg >= remaining {
            let base = 10f64.powf(s * p_a);
            let x = s * m * std::f64::consts::LN_10;
            let dt = if (x * dt_seg).abs() < 1e-9 {
                remaining / base
            } else {
                (remaining * x / base).ln_1p() / x
            };
            return t_a + dt.clamp(0.0, dt_seg);
        }
        remaining -= seg;
    }
    let (t_last, p_last) = program[program.len() - 1];
    t_last + remaining / 10f64.powf(s * p_last)
}

/// `psi_k1` from a measured retention time on a system (LSS gradient integral, module docs).
///
/// # Errors
/// `ModelError::Unretained` if `rt_min <= t0`.
pub fn psi_from_rt(system: &LcSystem, s: f64, rt_min: f64) -> Result<f64, ModelError> {
    let t = rt_min - system.t0_min;
    if t.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
        return Err(ModelError::Unretained {
            rt_min,
            t0_min: system.t0_min,
        });
    }
    let f = lss_integral(&system.inlet_program(), s, t);
    Ok((f / system.t0_min).log10() / s)
}

/// Retention time (min) of an analyte with `psi_k1` and slope `s` on a system.
pub fn rt_from_psi(system: &LcSystem, s: f64, psi_k1: f64) -> f64 {
    let target = system.t0_min * 10f64.powf(s * psi_k1.clamp(-3.0, 3.0));
    system.t0_min + lss_inverse(&system.inlet_program(), s, target)
}

/// Which route produced a prediction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum PredictionPath {
    /// From the analyte's measured retention on other systems, projected onto this one.
    Memory {
        /// Source system ids (RepoRT dataset ids) whose measurements were used.
        source_systems: Vec<String>,
    },
    /// From descriptors only.
    Descriptor,
    /// Directly from log kw and S fitted to the user's own scouting runs on this system
    /// (`scout --store`), through the gradient equation.
    ScoutingFit {
        /// The user's source text of the runs (lab notebook, report).
        source: String,
    },
}

impl PredictionPath {
    /// `memory`, `descriptor` or `scouting fit`.
    pub fn label(&self) -> &'static str {
        match self {
            PredictionPath::Memory { .. } => "memory",
            PredictionPath::Descriptor => "descriptor",
            PredictionPath::ScoutingFit { .. } => "scouting fit",
        }
    }
}

/// A retention prediction with its interval and provenance.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Prediction {
    /// Predicted retention time (min).
    pub rt_min: f64,
    /// Central 90 % interval (min), from cross-validation residuals of this path and mode.
    pub interval_min: (f64, f64),
    /// Organic content (% v/v) at the column outlet when the analyte elutes.
    pub organic_at_elution_pct: f64,
    /// Predicted strong-solvent fraction at which k = 1 (the model's target).
    pub psi_k1: f64,
    /// LSS S parameter used (size rule).
    pub lss_s: f64,
    /// True if the analyte elutes after the last point of the program (final hold).
    pub elutes_after_program: bool,
    /// Route used.
    pub path: PredictionPath,
    /// Sd (in psi units) of this prediction's contribution to the error of a retention
    /// difference, per predicted gap upper bound (psi); from cross-validated pairs.
    pub difference_sd_psi: Vec<(f64, f64)>,
    /// d tR / d psi_k1 at the prediction (min per unit psi).
    pub rt_slope_min: f64,
    /// Isotonic map raw → calibrated co-elution probability for pairs of this mode where both
    /// predictions are descriptor-path (or mixed), from cross-validated pairs.
    pub coelution_map_descriptor: Vec<(f64, f64)>,
    /// The same map for pairs where both predictions come from the memory path.
    pub coelution_map_memory: Vec<(f64, f64)>,
    /// System fingerprint (co-elution needs both predictions on one system).
    pub system: String,
}

/// Standard normal CDF via the complementary error function (Numerical Recipes erfc
/// Chebyshev fit, fractional error < 1.2e-7; Press et al. 3rd ed. §6.2, from memory).
pub fn normal_cdf(x: f64) -> f64 {
    let z = (x / std::f64::consts::SQRT_2).abs();
    let t = 1.0 / (1.0 + 0.5 * z);
    let r = t
        * (-z * z - 1.265_512_23
            + t * (1.000_023_68
                + t * (0.374_091_96
                    + t * (0.096_784_18
                        + t * (-0.186_288_06
                            + t * (0.278_868_07
                                + t * (-1.135_203_98
                                    + t * (1.488_515_87
                                        + t * (-0.822_152_23 + t * 0.170_872_77)))))))))
            .exp();
    if x >= 0.0 { 1.0 - 0.5 * r } else { 0.5 * r }
}

fn sd_for_gap(table: &[(f64, f64)], gap: f64) -> f64 {
    table
        .iter()
        .find(|(upper, _)| gap < *upper)
        .or(table.last())
        .map_or(0.05, |x| x.1)
}

/// Probability that two analytes co-elute, i.e. that their true retention times differ by less
/// than `peak_width_min`, given the calibrated error of their predicted difference (normal
/// error on the difference; the shared system error cancels because the sd was calibrated on
/// differences within held-out systems).
///
/// # Errors
/// `ModelError::DifferentSystems` if the predictions are for different systems,
/// `ModelError::BadPeakWidth` for a non-positive width.
pub fn coelution_probability(
    a: &Prediction,
    b: &Prediction,
    peak_width_min: f64,
) -> Result<f64, ModelError> {
    if a.system != b.system {
        return Err(ModelError::DifferentSystems(
            a.system.clone(),
            b.system.clone(),
        ));
    }
    if !(peak_width_min.is_finite() && peak_width_min > 0.0) {
        return Err(ModelError::BadPeakWidth(peak_width_min));
    }
    let raw = pair_probability(
        a.rt_min - b.rt_min,
        (a.psi_k1 - b.psi_k1).abs(),
        &a.difference_sd_psi,
        &b.difference_sd_psi,
        0.5 * (a.rt_slope_min + b.rt_slope_min),
        peak_width_min,
    );
    let both_fit = a.path.label() == "scouting fit" && b.path.label() == "scouting fit";
    if both_fit {
        // no calibration map exists for the user's own fits: the raw normal-error probability
        return Ok(raw);
    }
    let both_memory = a.path.label() == "memory" && b.path.label() == "memory";
    let map = if both_memory {
        &a.coelution_map_memory
    } else {
        &a.coelution_map_descriptor
    };
    Ok(apply_map(map, raw))
}

/// Piecewise-linear interpolation in a monotone calibration map (identity if empty).
pub fn apply_map(map: &[(f64, f64)], p: f64) -> f64 {
    let Some(&(x0, y0)) = map.first() else {
        return p;
    };
    if p <= x0 {
        return y0;
    }
    for w in map.windows(2) {
        let ((xa, ya), (xb, yb)) = (w[0], w[1]);
        if p <= xb {
            return if xb > xa {
                ya + (yb - ya) * (p - xa) / (xb - xa)
            } else {
                yb
            };
        }
    }
    map[map.len() - 1].1
}

pub(crate) fn pair_probability(
    delta_min: f64,
    gap_psi: f64,
    sd_a: &[(f64, f64)],
    sd_b: &[(f64, f64)],
    slope_min: f64,
    width_min: f64,
) -> f64 {
    let sa = sd_for_gap(sd_a, gap_psi);
    let sb = sd_for_gap(sd_b, gap_psi);
    let sigma = ((sa * sa + sb * sb).sqrt() * slope_min).max(1e-6);
    let p =
        normal_cdf((width_min - delta_min) / sigma) - normal_cdf((-width_min - delta_min) / sigma);
    p.clamp(0.0, 1.0)
}

/// Number of system features (see `system_features`).
pub const SYSTEM_FEATURE_NAMES: [&str; 27] = [
    "hilic",
    "class_c8",
    "class_cyano",
    "class_phenyl",
    "class_pentafluorophenyl",
    "class_porous_graphitic_carbon",
    "class_bare_silica",
    "class_amide",
    "class_zwitterionic",
    "class_unknown",
    "modifier_methanol",
    "modifier_other",
    "ph_minus_5",
    "ph_missing",
    "hilic_x_ph",
    "additive_acetic",
    "additive_tfa",
    "additive_nh4_acetate",
    "additive_nh4_formate",
    "additive_nh4_carbonate",
    "additive_nh4_hydroxide",
    "additive_nh4_fluoride_or_other",
    "temp_minus_35_per_10",
    "temp_missing",
    "log10_steepness",
    "start_strong_fraction",
    "hilic_x_methanol",
];

/// Indices of the system features that interact with every descriptor: mode, chemistry
/// classes, modifier, pH and the HILIC × pH and HILIC × methanol terms. Additive, temperature
/// and gradient-shape features act as offsets only (more interactions overfit in CV).
pub const INTERACTING: [usize; 16] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 26];

/// System feature vector (order of `SYSTEM_FEATURE_NAMES`). pH falls back to the additive's
/// typical pH, temperature to 35 °C, each with a missing flag.
pub fn system_features(sys: &LcSystem) -> Vec<f64> {
    let hilic = f64::from(u8::from(sys.mode == Mode::Hilic));
    let class = |c: ChemClass| f64::from(u8::from(sys.chem_class == c));
    let ph = sys.ph.unwrap_or_else(|| sys.additive.typical_ph());
    let add = |a: Additive| f64::from(u8::from(sys.additive == a));
    let meoh = f64::from(u8::from(sys.modifier == Modifier::Methanol));
    vec![
        hilic,
        class(ChemClass::C8),
        class(ChemClass::Cyano),
        class(ChemClass::Phenyl),
        class(ChemClass::Pentafluorophenyl),
        class(ChemClass::PorousGraphiticCarbon),
        class(ChemClass::BareSilica),
        class(ChemClass::Amide),
        class(ChemClass::Zwitterionic),
        class(ChemClass::Unknown),
        meoh,
        f64::from(u8::from(sys.modifier == Modifier::Other)),
        (ph - 5.0) / 3.0,
        f64::from(u8::from(sys.ph.is_none())),
        hilic * (ph - 5.0) / 3.0,
        add(Additive::AceticAcid),
        add(Additive::TrifluoroaceticAcid),
        add(Additive::AmmoniumAcetate),
        add(Additive::AmmoniumFormate),
        add(Additive::AmmoniumCarbonate),
        add(Additive::AmmoniumHydroxide),
        add(Additive::AmmoniumFluoride) + add(Additive::Other),
        (sys.temperature_c.unwrap_or(35.0) - 35.0) / 10.0,
        f64::from(u8::from(sys.temperature_c.is_none())),
        (sys.steepness().max(1e-4)).log10() + 2.0,
        sys.mode.strong_fraction(sys.gradient[0].organic_pct),
        hilic * meoh,
    ]
}

/// Descriptors that depend on the system: logD at the eluent pH (Crippen logP plus log10 of the
/// neutral fraction, the usual logD definition for an ion-free octanol phase) and the ionised
/// fraction at that pH.
pub const DYNAMIC_NAMES: [&str; 2] = ["logd_at_ph", "ionised_fraction_at_ph"];

fn eluent_ph(sys: &LcSystem) -> f64 {
    sys.ph.unwrap_or_else(|| sys.additive.typical_ph())
}

/// Descriptor transforms applied before standardisation: counts enter as given, mass as log10;
/// the `DYNAMIC_NAMES` are computed at the system's pH.
fn transformed_descriptors(
    names: &[String],
    f: &AnalyteFeatures,
    sys: &LcSystem,
) -> Result<Vec<f64>, ModelError> {
    names
        .iter()
        .map(|n| {
            if n == "charge_at_ph" || n == "abs_charge_at_ph" {
                let ph = eluent_ph(sys).clamp(0.0, 14.0);
                let (lo, hi) = (ph.floor(), ph.ceil());
                let get = |p: f64| {
                    f.descriptors
                        .get(&format!("charge_ph_{}", p as u8))
                        .copied()
                        .ok_or_else(|| ModelError::MissingDescriptor("charge_ph_0..14".into()))
                };
                let (a, b) = (get(lo)?, get(hi)?);
                let q = a + (b - a) * (ph - lo);
                return Ok(if n == "charge_at_ph" { q } else { q.abs() });
            }
            if DYNAMIC_NAMES.contains(&n.as_str()) {
                let lfn = super::features::log10_fraction_neutral_at(f, eluent_ph(sys))
                    .ok_or_else(|| ModelError::MissingDescriptor("lfn_ph_0..14".into()))?;
                let logp = *f
                    .descriptors
                    .get("logp")
                    .filter(|v| v.is_finite())
                    .ok_or_else(|| ModelError::MissingDescriptor("logp".into()))?;
                return Ok(if n == "logd_at_ph" {
                    logp + lfn
                } else {
                    1.0 - 10f64.powf(lfn)
                });
            }
            let v = *f
                .descriptors
                .get(n)
                .filter(|v| v.is_finite())
                .ok_or_else(|| ModelError::MissingDescriptor(n.clone()))?;
            Ok(if n == "mw_g_mol" {
                v.max(1.0).log10()
            } else {
                v
            })
        })
        .collect()
}

/// Ridge penalties relative to the total row weight (chosen by system-grouped CV, docs/model.md).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Penalties {
    /// Penalty on system main effects (offsets).
    pub system: f64,
    /// Penalty on descriptor main effects.
    pub descriptor: f64,
    /// Penalty on descriptor × system interactions.
    pub interaction: f64,
}

/// Default penalties.
pub const DEFAULT_PENALTIES: Penalties = Penalties {
    system: 1e-3,
    descriptor: 1e-4,
    interaction: 3e-3,
};

/// A fitted linear model on descriptors × system features.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LinearPart {
    /// Descriptor names in column order.
    pub descriptor_names: Vec<String>,
    /// Means of the transformed descriptors (training rows, weighted).
    pub descriptor_mean: Vec<f64>,
    /// Standard deviations of the transformed descriptors.
    pub descriptor_sd: Vec<f64>,
    /// Whether descriptor × system interactions are used.
    pub interactions: bool,
    /// Coefficients: intercept, system features, descriptors, then interactions
    /// (descriptor-major: for each descriptor that interacts, one per entry of `INTERACTING`;
    /// then the second-order terms `features::SECOND_ORDER_NAMES`, listed last, × the HILIC
    /// flag only).
    pub coefficients: Vec<f64>,
}

/// Sparse design row: (column, value) pairs with increasing columns.
fn design_row(
    z: &[f64],
    s: &[f64],
    interactions: bool,
    n_interacting: usize,
    out: &mut Vec<(usize, f64)>,
) {
    out.clear();
    let ns = s.len();
    out.push((0, 1.0));
    for (k, &v) in s.iter().enumerate() {
        if v != 0.0 {
            out.push((1 + k, v));
        }
    }
    let base = 1 + ns;
    for (j, &zj) in z.iter().enumerate() {
        out.push((base + j, zj));
    }
    if interactions {
        let base = 1 + ns + z.len();
        let ni = INTERACTING.len();
        for (j, &zj) in z.iter().enumerate().take(n_interacting) {
            for (q, &k) in INTERACTING.iter().enumerate() {
                let v = s[k];
                if v != 0.0 {
                    out.push((base + j * ni + q, zj * v));
                }
            }
        }
        // second-order terms interact with the mode only (their curvature differs between
        // RP and HILIC)
        let base = base + n_interacting.min(z.len()) * ni;
        if s[0] != 0.0 {
            for (j, &zj) in z.iter().enumerate().skip(n_interacting) {
                out.push((base + j - n_interacting, zj * s[0]));
            }
        }
    }
}

fn n_columns(nz: usize, ns: usize, interactions: bool, n_interacting: usize) -> usize {
    1 + ns
        + nz
        + if interactions {
            n_interacting.min(nz) * INTERACTING.len() + nz.saturating_sub(n_interacting)
        } else {
            0
        }
}

/// Number of leading descriptors that interact with the system features: all up to the first
/// second-order term (`common_descriptor_names` lists those last).
fn interacting_count(names: &[String]) -> usize {
    names
        .iter()
        .position(|n| super::features::SECOND_ORDER_NAMES.contains(&n.as_str()))
        .unwrap_or(names.len())
}

impl LinearPart {
    /// Standardised descriptor vector of an analyte.
    pub(crate) fn standardise(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
    ) -> Result<Vec<f64>, ModelError> {
        let raw = transformed_descriptors(&self.descriptor_names, f, sys)?;
        Ok(raw
            .iter()
            .zip(self.descriptor_mean.iter().zip(&self.descriptor_sd))
            .map(|(v, (m, s))| (v - m) / s)
            .collect())
    }

    /// Predicted psi_k1 from standardised descriptors and system features.
    pub(crate) fn predict_z(&self, z: &[f64], s: &[f64], buf: &mut Vec<(usize, f64)>) -> f64 {
        design_row(
            z,
            s,
            self.interactions,
            interacting_count(&self.descriptor_names),
            buf,
        );
        buf.iter().map(|&(c, v)| self.coefficients[c] * v).sum()
    }

    /// Fits the weighted ridge problem. Rows: standardised descriptors, system features,
    /// target, weight. The normal equations `(XᵀWX + Λ) β = XᵀWy` are accumulated sparsely and
    /// solved with linfa-linear's least-squares solver (QR) on that square system.
    fn fit(
        rows: &[(Vec<f64>, &[f64], f64, f64)],
        descriptor_names: Vec<String>,
        descriptor_mean: Vec<f64>,
        descriptor_sd: Vec<f64>,
        interactions: bool,
        penalties: Penalties,
    ) -> Result<Self, ModelError> {
        let nz = descriptor_names.len();
        let ns = SYSTEM_FEATURE_NAMES.len();
        let n_int = interacting_count(&descriptor_names);
        let p = n_columns(nz, ns, interactions, n_int);
        let mut gram = vec![0.0f64; p * p];
        let mut xty = vec![0.0f64; p];
        let mut buf = Vec::new();
        let mut wsum = 0.0;
        for (z, s, y, w) in rows {
            design_row(z, s, interactions, n_int, &mut buf);
            wsum += w;
            for (a, &(ca, va)) in buf.iter().enumerate() {
                let wa = w * va;
                xty[ca] += wa * y;
                let row = &mut gram[ca * p..ca * p + p];
                for &(cb, vb) in &buf[a..] {
                    row[cb] += wa * vb;
                }
            }
        }
        if wsum <= 0.0 {
            return Err(ModelError::TooLittleData("no weighted rows".into()));
        }
        let mut a = Array2::<f64>::zeros((p, p));
        for i in 0..p {
            for j in i..p {
                let v = gram[i * p + j];
                a[[i, j]] = v;
                a[[j, i]] = v;
            }
            let pen = if i == 0 {
                1e-8
            } else if i <= ns {
                penalties.system
            } else if i <= ns + nz {
                penalties.descriptor
            } else {
                penalties.interaction
            };
            a[[i, i]] += pen * wsum;
        }
        let b = Array1::from(xty);
        let data = Dataset::new(a, b);
        let fitted = LinearRegression::new()
            .with_intercept(false)
            .fit(&data)
            .map_err(|e| ModelError::TooLittleData(format!("ridge solve failed: {e}")))?;
        Ok(Self {
            descriptor_names,
            descriptor_mean,
            descriptor_sd,
            interactions,
            coefficients: fitted.params().to_vec(),
        })
    }
}

/// Cross-validated error summary of one path in one mode (psi units: measured − predicted).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PathCalibration {
    /// 5th percentile of the residual.
    pub q05: f64,
    /// 95th percentile of the residual.
    pub q95: f64,
    /// Per-prediction share of the retention-difference error sd, by predicted gap bin
    /// (upper bound of |Δpsi|, sd).
    pub difference_sd: Vec<(f64, f64)>,
    /// Isotonic raw → calibrated co-elution probability map (pairs of this path).
    pub coelution_map: Vec<(f64, f64)>,
    /// Residuals the summary is based on.
    pub n: usize,
}

/// The trained retention model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Model {
    /// Licence and attribution of the model file.
    pub licence: String,
    /// Format version.
    pub format_version: u32,
    /// Seed used for the CV folds.
    pub seed: u64,
    /// Training rows and systems.
    pub n_rows: usize,
    /// Number of training systems.
    pub n_systems: usize,
    /// Main model.
    pub linear: LinearPart,
    /// Calibration per `"<mode>/<path>"`, e.g. `RP/descriptor`.
    pub calibration: BTreeMap<String, PathCalibration>,
    /// Weights for the retention memory.
    pub memory_weights: MemoryWeights,
    /// Retention memory (not serialised with the model; loaded from its own table).
    #[serde(skip)]
    pub memory: Option<MemoryTable>,
}

/// Model file bundled at build time.
const BUILTIN_MODEL: &[u8] = include_bytes!("../../data/lc_model.json.gz");
/// Retention memory table bundled at build time.
const BUILTIN_MEMORY: &[u8] = include_bytes!("../../data/retention_memory.tsv.gz");

impl Model {
    /// Number of shipped training systems of one mode and chemistry class (from the retention
    /// memory's system records); `None` when no memory table is loaded. Classes with few
    /// systems are predicted close to the C18/mode reference by the ridge shrinkage
    /// (docs/model.md §2), so their predictions say less about that chemistry's selectivity.
    pub fn training_systems(&self, mode: Mode, chem_class: ChemClass) -> Option<usize> {
        let memory = self.memory.as_ref()?;
        Some(
            memory
                .systems
                .values()
                .filter(|s| s.mode == mode && s.chem_class == chem_class)
                .count(),
        )
    }

    /// Loads the bundled model and retention memory.
    ///
    /// # Errors
    /// `ModelError::Io` if the bundled files are corrupt.
    pub fn load_builtin() -> Result<Self, ModelError> {
        let mut m = Self::from_gz_bytes(BUILTIN_MODEL, "builtin lc_model.json.gz")?;
        m.memory = Some(MemoryTable::from_gz_bytes_lazy(
            BUILTIN_MEMORY,
            "builtin retention_memory.tsv.gz",
        )?);
        Ok(m)
    }

    /// Decodes a gzip-compressed JSON model.
    ///
    /// # Errors
    /// `ModelError::Io` on a decoding error.
    pub fn from_gz_bytes(bytes: &[u8], label: &str) -> Result<Self, ModelError> {
        let mut s = String::new();
        flate2::read::GzDecoder::new(bytes)
            .read_to_string(&mut s)
            .map_err(|e| ModelError::Io {
                path: label.into(),
                reason: e.to_string(),
            })?;
        serde_json::from_str(&s).map_err(|e| ModelError::Io {
            path: label.into(),
            reason: e.to_string(),
        })
    }

    /// Serialises to gzip-compressed JSON (fixed compression level, byte-for-byte deterministic).
    ///
    /// # Errors
    /// `ModelError::Io` if serialisation fails.
    pub fn to_gz_bytes(&self) -> Result<Vec<u8>, ModelError> {
        let json = serde_json::to_string(self).map_err(|e| ModelError::Io {
            path: "model".into(),
            reason: e.to_string(),
        })?;
        gzip(json.as_bytes())
    }

    /// Predicted `psi_k1` by the descriptor path.
    ///
    /// # Errors
    /// `ModelError::MissingDescriptor` if a descriptor is absent.
    pub fn predict_psi_descriptor(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
    ) -> Result<f64, ModelError> {
        let z = self.linear.standardise(f, sys)?;
        Ok(self
            .linear
            .predict_z(&z, &system_features(sys), &mut Vec::new()))
    }

    /// Predicts retention on a system. Uses the retention memory when the analyte's InChIKey
    /// has measurements on systems of the same mode, else the descriptors alone.
    ///
    /// # Errors
    /// Invalid system (`BadSystem`, `BadGradient`) or missing descriptors.
    pub fn predict(&self, f: &AnalyteFeatures, sys: &LcSystem) -> Result<Prediction, ModelError> {
        self.predict_excluding(f, sys, None)
    }

    /// As `predict`, but never uses memory entries of the system id `exclude` (for validation).
    ///
    /// # Errors
    /// As `predict`.
    pub fn predict_excluding(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
        exclude: Option<&str>,
    ) -> Result<Prediction, ModelError> {
        self.predict_with_memory(f, sys, exclude, &[])
    }

    /// As `predict_excluding`, with further retention-memory sources of this analyte beside
    /// the shipped table: `(system id, source system, measured psi_k1)`, e.g. the user's stored
    /// scouting fits on other systems. With no extra sources this is exactly
    /// `predict_excluding`.
    ///
    /// # Errors
    /// As `predict`; an invalid extra source system.
    pub fn predict_with_memory(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
        exclude: Option<&str>,
        extra: &[(String, LcSystem, f64)],
    ) -> Result<Prediction, ModelError> {
        sys.validate()?;
        let mw = *f
            .descriptors
            .get("mw_g_mol")
            .filter(|v| v.is_finite() && **v > 0.0)
            .ok_or_else(|| ModelError::MissingDescriptor("mw_g_mol".into()))?;
        let s = lss_s(mw);
        let z = self.linear.standardise(f, sys)?;
        let mut buf = Vec::new();
        let base = self.linear.predict_z(&z, &system_features(sys), &mut buf);
        let mut psi = base;
        let mut path = PredictionPath::Descriptor;
        let shipped = match (&self.memory, &f.inchikey) {
            (Some(mem), Some(key)) => mem.measurements(key).collect::<Vec<_>>(),
            _ => Vec::new(),
        };
        for (_, s, _) in extra {
            s.validate()?;
        }
        let user = extra.iter().map(|(id, s, psi)| (id.as_str(), s, *psi));
        let all: Vec<(&str, &LcSystem, f64)> = shipped.into_iter().chain(user).collect();
        if !all.is_empty() {
            let mut sources = Vec::new();
            for (sid, src_sys, measured) in all {
                if Some(sid) == exclude || src_sys.mode != sys.mode {
                    continue;
                }
                let z_src = self.linear.standardise(f, src_sys)?;
                let pred = self
                    .linear
                    .predict_z(&z_src, &system_features(src_sys), &mut buf);
                sources.push((
                    sid.to_owned(),
                    SourceRelation::between(src_sys, sys),
                    measured - pred,
                ));
            }
            if let Some((shift, used)) = self.memory_weights.combine(sys.mode, &sources) {
                psi = base + shift;
                path = PredictionPath::Memory {
                    source_systems: used,
                };
            }
        }
        let cal = self
            .calibration
            .get(&format!("{}/{}", sys.mode.label(), path.label()))
            .ok_or_else(|| {
                ModelError::TooLittleData(format!(
                    "no calibration for {}/{}",
                    sys.mode.label(),
                    path.label()
                ))
            })?;
        let rt = rt_from_psi(sys, s, psi);
        let lo = rt_from_psi(sys, s, psi + cal.q05);
        let hi = rt_from_psi(sys, s, psi + cal.q95);
        let h = 0.01;
        let slope = (rt_from_psi(sys, s, psi + h) - rt_from_psi(sys, s, psi - h)) / (2.0 * h);
        let t_out = rt - sys.t0_min - sys.dwell_min;
        Ok(Prediction {
            rt_min: rt,
            interval_min: (lo.min(rt), hi.max(rt)),
            organic_at_elution_pct: sys.organic_at_pct(t_out),
            psi_k1: psi,
            lss_s: s,
            elutes_after_program: rt - sys.t0_min > sys.program_end_min(),
            path,
            difference_sd_psi: cal.difference_sd.clone(),
            coelution_map_descriptor: self
                .calibration
                .get(&format!("{}/descriptor", sys.mode.label()))
                .map(|c| c.coelution_map.clone())
                .unwrap_or_default(),
            coelution_map_memory: self
                .calibration
                .get(&format!("{}/memory", sys.mode.label()))
                .map(|c| c.coelution_map.clone())
                .unwrap_or_default(),
            rt_slope_min: slope,
            system: sys.fingerprint(),
        })
    }
}

pub(crate) fn gzip(bytes: &[u8]) -> Result<Vec<u8>, ModelError> {
    let mut enc = flate2::GzBuilder::new()
        .mtime(0)
        .write(Vec::new(), flate2::Compression::new(9));
    enc.write_all(bytes)
        .and_then(|()| enc.finish())
        .map_err(|e| ModelError::Io {
            path: "gzip".into(),
            reason: e.to_string(),
        })
}

// ---------------------------------------------------------------------------------------------
// Training data
// ---------------------------------------------------------------------------------------------

/// One training system: RepoRT dataset id plus the model's view of it.
#[derive(Debug, Clone, PartialEq)]
pub struct TrainingSystem {
    /// RepoRT dataset id.
    pub id: String,
    /// System as the model reads it (dwell 0: RepoRT gives no dwell volume).
    pub system: LcSystem,
    /// Gradient duration (min) as given in systems.tsv.
    pub gradient_duration_min: f64,
    /// Flow program `(time min, flow mL/min)` where the flow changes before the end of the
    /// separation window (empty: constant nominal flow). When present, `system.gradient` is on
    /// the volume-equivalent time axis `τ(t) = ∫₀ᵗ F dt / F_nominal` (see `volume_time`).
    pub flow_program: Vec<(f64, f64)>,
}

impl TrainingSystem {
    /// Volume-equivalent time `τ(t) = ∫₀ᵗ F(t') dt' / F_nominal` (min) of a real time `t`; the
    /// identity for a constant flow. Retention is a matter of volume (V_R = V0 (1 + k) in the
    /// gradient integral written in volume), so on the τ axis a flow program becomes a
    /// constant-flow problem at the nominal flow with the same dead time (common practice,
    /// no source).
    pub fn volume_time(&self, t_min: f64) -> f64 {
        volume_time(&self.flow_program, self.system.flow_ml_min, t_min)
    }
    /// Real time (min) at which the volume-equivalent time is `tau_min` (inverse of
    /// `volume_time`).
    pub fn real_time(&self, tau_min: f64) -> f64 {
        if self.flow_program.is_empty() {
            return tau_min;
        }
        // volume_time is increasing (flows > 0): bisection to 1e-9 min
        let (mut lo, mut hi) = (0.0, tau_min.max(0.0) + 1.0);
        while self.volume_time(hi) < tau_min {
            hi *= 2.0;
        }
        for _ in 0..80 {
            let mid = 0.5 * (lo + hi);
            if self.volume_time(mid) < tau_min {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        0.5 * (lo + hi)
    }
}

/// Flow (mL/min) at time t of a piecewise-linear flow program, held before the first and after
/// the last point (the same interpolation as a calibration map); 1 mL/min without a program.
fn flow_at(program: &[(f64, f64)], t: f64) -> f64 {
    if program.is_empty() {
        return 1.0;
    }
    apply_map(program, t)
}

/// `∫₀ᵗ F dt / F_nominal` for a piecewise-linear flow program (exact: between the program's
/// breakpoints the flow is linear, so the midpoint rule is exact; steps are handled too).
fn volume_time(program: &[(f64, f64)], nominal_ml_min: f64, t_min: f64) -> f64 {
    if program.is_empty() {
        return t_min;
    }
    let mut knots: Vec<f64> = program
        .iter()
        .map(|p| p.0)
        .filter(|&x| x > 0.0 && x < t_min)
        .collect();
    knots.insert(0, 0.0);
    knots.push(t_min.max(0.0));
    let mut v = 0.0;
    for w in knots.windows(2) {
        v += flow_at(program, 0.5 * (w[0] + w[1])) * (w[1] - w[0]);
    }
    v / nominal_ml_min
}

/// One measured retention row with its descriptors resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct TrainingRow {
    /// Index into the systems list.
    pub system: usize,
    /// InChIKey.
    pub inchikey: String,
    /// Index into the analyte list.
    pub analyte: usize,
    /// Measured retention time (min).
    pub rt_min: f64,
    /// psi_k1 from the measured time.
    pub psi_k1: f64,
}

/// Training data read from the systems and retention tables.
#[derive(Debug, Clone)]
pub struct TrainingData {
    /// Systems.
    pub systems: Vec<TrainingSystem>,
    /// Distinct analytes (by SMILES) with their features.
    pub analytes: Vec<AnalyteFeatures>,
    /// Rows usable for training (retained, readable structure).
    pub rows: Vec<TrainingRow>,
    /// Rows skipped and why (reason → count).
    pub skipped: BTreeMap<String, usize>,
}

fn read_text(path: &Path) -> Result<String, ModelError> {
    let bytes = std::fs::read(path).map_err(|e| ModelError::Io {
        path: path.display().to_string(),
        reason: e.to_string(),
    })?;
    if path.extension().is_some_and(|e| e == "gz") {
        let mut s = String::new();
        flate2::read::GzDecoder::new(&bytes[..])
            .read_to_string(&mut s)
            .map_err(|e| ModelError::Io {
                path: path.display().to_string(),
                reason: e.to_string(),
            })?;
        Ok(s)
    } else {
        String::from_utf8(bytes).map_err(|e| ModelError::Io {
            path: path.display().to_string(),
            reason: e.to_string(),
        })
    }
}

/// Reads a TSV with a header into rows of (column → value).
pub(crate) fn parse_tsv(text: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let mut lines = text.lines();
    let header: Vec<String> = lines
        .next()
        .unwrap_or("")
        .split('\t')
        .map(str::to_owned)
        .collect();
    let rows = lines
        .filter(|l| !l.trim().is_empty())
        .map(|l| l.split('\t').map(str::to_owned).collect())
        .collect();
    (header, rows)
}

/// Parses a `time:%;time:%` program string.
///
/// # Errors
/// `ModelError::BadGradient` naming the bad token.
pub fn parse_program(s: &str) -> Result<Vec<GradientPoint>, ModelError> {
    s.split(';')
        .filter(|t| !t.trim().is_empty())
        .map(|tok| {
            let (t, p) = tok
                .split_once(':')
                .ok_or_else(|| ModelError::BadGradient(format!("token {tok:?} lacks ':'")))?;
            let time_min: f64 = t
                .trim()
                .parse()
                .map_err(|_| ModelError::BadGradient(format!("time {t:?}")))?;
            let organic_pct: f64 = p
                .trim()
                .parse()
                .map_err(|_| ModelError::BadGradient(format!("composition {p:?}")))?;
            Ok(GradientPoint {
                time_min,
                organic_pct,
            })
        })
        .collect()
}

/// Parses one systems.tsv row into a training system.
fn system_from_row(col: &dyn Fn(&str) -> Option<String>) -> Result<TrainingSystem, String> {
    let get = |k: &str| col(k).ok_or_else(|| format!("missing column {k}"));
    let num = |k: &str| -> Result<f64, String> {
        get(k)?
            .parse::<f64>()
            .map_err(|_| format!("column {k} is not a number"))
    };
    let opt = |k: &str| col(k).and_then(|v| v.parse::<f64>().ok());
    let mode = match get("mode")?.as_str() {
        "RP" => Mode::ReversedPhase,
        "HILIC" => Mode::Hilic,
        other => return Err(format!("mode {other:?}")),
    };
    let chem = get("chem_class")?;
    let chem_class = ChemClass::parse(&chem).ok_or_else(|| format!("chem_class {chem:?}"))?;
    let mut gradient = parse_program(&get("gradient_org")?).map_err(|e| e.to_string())?;
    // A program whose first point is after 0 holds its first composition from injection on.
    if let Some(first) = gradient.first().copied().filter(|p| p.time_min > 0.0) {
        gradient.insert(
            0,
            GradientPoint {
                time_min: 0.0,
                organic_pct: first.organic_pct,
            },
        );
    }
    // Cut the program at the end of the final hold: the return to the start composition is
    // re-equilibration, not part of the separation.
    if let Some(end) = opt("t_window_end") {
        let at_end = LcSystem {
            mode,
            chem_class,
            modifier: Modifier::Other,
            ph: None,
            additive: Additive::Other,
            gradient: gradient.clone(),
            t0_min: 1.0,
            dwell_min: 0.0,
            flow_ml_min: 1.0,
            temperature_c: None,
        }
        .organic_at_pct(end);
        gradient.retain(|p| p.time_min < end);
        gradient.push(GradientPoint {
            time_min: end,
            organic_pct: at_end,
        });
    }
    // Flow programs that change the flow inside the separation window: the program is moved
    // onto the volume-equivalent time axis (breakpoints of both programs, ramps of the flow
    // subdivided so that the composition stays close to linear in τ).
    let nominal = num("flow_ml_min")?;
    let mut flow_program: Vec<(f64, f64)> = Vec::new();
    if let Some(fp) = col("gradient_flow") {
        let mut pts = Vec::new();
        for tok in fp.split(';').filter(|t| !t.trim().is_empty()) {
            let (t, f) = tok
                .split_once(':')
                .ok_or_else(|| format!("gradient_flow token {tok:?} lacks ':'"))?;
            let t: f64 = t
                .trim()
                .parse()
                .map_err(|_| format!("gradient_flow time {t:?}"))?;
            let f: f64 = f
                .trim()
                .parse()
                .map_err(|_| format!("gradient_flow flow {f:?}"))?;
            if !(t.is_finite() && t >= 0.0 && f.is_finite() && f > 0.0) {
                return Err(format!("gradient_flow point {tok:?}"));
            }
            pts.push((t, f));
        }
        let end = gradient.last().map_or(0.0, |p| p.time_min);
        // the flow anywhere in [0, end] differs from the nominal flow
        let changes = std::iter::once(0.0)
            .chain(pts.iter().map(|p| p.0).filter(|&t| t <= end))
            .chain([end])
            .any(|t| (flow_at(&pts, t) - nominal).abs() > 1e-9);
        if changes && !pts.is_empty() {
            flow_program = pts;
        }
    }
    if !flow_program.is_empty() {
        let probe = LcSystem {
            mode,
            chem_class,
            modifier: Modifier::Other,
            ph: None,
            additive: Additive::Other,
            gradient: gradient.clone(),
            t0_min: 1.0,
            dwell_min: 0.0,
            flow_ml_min: 1.0,
            temperature_c: None,
        };
        let end = gradient.last().map_or(0.0, |p| p.time_min);
        let mut times: Vec<f64> = gradient.iter().map(|p| p.time_min).collect();
        for w in flow_program.windows(2) {
            let ((ta, fa), (tb, fb)) = (w[0], w[1]);
            let pieces = if (fb - fa).abs() > 1e-12 { 8 } else { 1 };
            for k in 0..=pieces {
                times.push(ta + (tb - ta) * f64::from(k) / f64::from(pieces));
            }
        }
        times.retain(|&t| (0.0..=end).contains(&t));
        times.sort_by(f64::total_cmp);
        times.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
        gradient = times
            .iter()
            .map(|&t| GradientPoint {
                time_min: (volume_time(&flow_program, nominal, t) * 1e6).round() / 1e6,
                organic_pct: probe.organic_at_pct(t),
            })
            .collect();
    }
    let system = LcSystem {
        mode,
        chem_class,
        modifier: Modifier::parse(&get("modifier_B")?),
        ph: opt("pH_aqueous").filter(|p| *p > 0.0),
        additive: Additive::parse(&get("additive_main")?),
        gradient,
        t0_min: num("t0_min")?,
        dwell_min: 0.0,
        flow_ml_min: num("flow_ml_min")?,
        temperature_c: opt("temp_c"),
    };
    system.validate().map_err(|e| e.to_string())?;
    Ok(TrainingSystem {
        id: get("id")?,
        system,
        gradient_duration_min: num("gradient_duration_min")?,
        flow_program,
    })
}

impl TrainingData {
    /// Reads systems.tsv and retention.tsv (plain or .gz) and computes descriptors with the
    /// given source. Rows whose retention time is not above t0 or whose structure cannot be
    /// read are skipped and counted.
    ///
    /// # Errors
    /// `ModelError::Io`/`BadRow` for unreadable files or malformed rows.
    pub fn load(
        systems_path: &Path,
        retention_path: &Path,
        source: &dyn DescriptorSource,
    ) -> Result<Self, ModelError> {
        let (hdr, rows) = parse_tsv(&read_text(systems_path)?);
        let mut systems = Vec::new();
        for (i, r) in rows.iter().enumerate() {
            let col = |k: &str| {
                hdr.iter()
                    .position(|h| h == k)
                    .and_then(|j| r.get(j))
                    .filter(|v| !v.is_empty() && v.as_str() != "NA")
                    .cloned()
            };
            let s = system_from_row(&col).map_err(|reason| ModelError::BadRow {
                path: systems_path.display().to_string(),
                line: i + 2,
                reason,
            })?;
            systems.push(s);
        }
        systems.sort_by(|a, b| a.id.cmp(&b.id));
        let index: BTreeMap<String, usize> = systems
            .iter()
            .enumerate()
            .map(|(i, s)| (s.id.clone(), i))
            .collect();
        let (hdr, rows) = parse_tsv(&read_text(retention_path)?);
        let pos = |k: &str| {
            hdr.iter()
                .position(|h| h == k)
                .ok_or_else(|| ModelError::BadRow {
                    path: retention_path.display().to_string(),
                    line: 1,
                    reason: format!("missing column {k}"),
                })
        };
        let (c_ds, c_smi, c_key, c_rt) = (
            pos("dataset_id")?,
            pos("smiles")?,
            pos("inchikey")?,
            pos("rt_min")?,
        );
        let mut analytes: Vec<AnalyteFeatures> = Vec::new();
        let mut by_smiles: BTreeMap<String, Option<usize>> = BTreeMap::new();
        let mut out = Vec::new();
        let mut skipped: BTreeMap<String, usize> = BTreeMap::new();
        for (i, r) in rows.iter().enumerate() {
            let field = |c: usize| r.get(c).map(String::as_str).unwrap_or("");
            let bad = |reason: String| ModelError::BadRow {
                path: retention_path.display().to_string(),
                line: i + 2,
                reason,
            };
            let Some(&si) = index.get(field(c_ds)) else {
                *skipped.entry("unknown system".into()).or_default() += 1;
                continue;
            };
            let rt: f64 = field(c_rt)
                .parse()
                .map_err(|_| bad(format!("rt_min {:?}", field(c_rt))))?;
            let smiles = field(c_smi);
            let key = field(c_key);
            let analyte = match by_smiles.get(smiles) {
                Some(a) => *a,
                None => {
                    let a = source.describe(smiles).ok().map(|d| {
                        analytes.push(AnalyteFeatures {
                            inchikey: Some(key.to_owned()),
                            descriptors: d,
                        });
                        analytes.len() - 1
                    });
                    by_smiles.insert(smiles.to_owned(), a);
                    a
                }
            };
            let Some(analyte) = analyte else {
                *skipped.entry("unreadable structure".into()).or_default() += 1;
                continue;
            };
            let mw = analytes[analyte]
                .descriptors
                .get("mw_g_mol")
                .copied()
                .unwrap_or(0.0);
            match psi_from_rt(&systems[si].system, lss_s(mw), systems[si].volume_time(rt)) {
                Ok(psi) if psi.is_finite() => out.push(TrainingRow {
                    system: si,
                    inchikey: key.to_owned(),
                    analyte,
                    rt_min: rt,
                    psi_k1: psi,
                }),
                _ => *skipped.entry("rt not above t0".into()).or_default() += 1,
            }
        }
        Ok(Self {
            systems,
            analytes,
            rows: out,
            skipped,
        })
    }
}

/// Deterministic split of system indices into `k` folds (seeded Fisher–Yates with splitmix64).
pub fn system_folds(n_systems: usize, k: usize, seed: u64) -> Vec<usize> {
    let mut order: Vec<usize> = (0..n_systems).collect();
    let mut state = seed ^ 0x9E37_79B9_7F4A_7C15;
    let mut next = || {
        state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = state;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    };
    for i in (1..n_systems).rev() {
        let j = (next() % (i as u64 + 1)) as usize;
        order.swap(i, j);
    }
    let mut fold = vec![0; n_systems];
    for (rank, &s) in order.iter().enumerate() {
        fold[s] = rank % k.max(1);
    }
    fold
}

/// Per-row weights `1/sqrt(rows in system)`, scaled to sum to the number of rows, so that large
/// datasets do not dominate and each system counts comparably (common practice, no source).
fn row_weights(data: &TrainingData, rows: &[usize]) -> Vec<f64> {
    let mut count = vec![0usize; data.systems.len()];
    for &r in rows {
        count[data.rows[r].system] += 1;
    }
    let raw: Vec<f64> = rows
        .iter()
        .map(|&r| 1.0 / (count[data.rows[r].system] as f64).sqrt())
        .collect();
    let total: f64 = raw.iter().sum();
    let scale = rows.len() as f64 / total.max(1e-12);
    raw.iter().map(|w| w * scale).collect()
}

/// Fits the linear part on a subset of rows.
///
/// # Errors
/// `ModelError::TooLittleData` if the subset is empty or a descriptor is missing.
pub fn fit_linear(
    data: &TrainingData,
    rows: &[usize],
    descriptor_names: &[String],
    interactions: bool,
    penalties: Penalties,
) -> Result<LinearPart, ModelError> {
    if rows.is_empty() {
        return Err(ModelError::TooLittleData("no training rows".into()));
    }
    let weights = row_weights(data, rows);
    let raw: Vec<Vec<f64>> = rows
        .iter()
        .map(|&r| {
            let row = &data.rows[r];
            transformed_descriptors(
                descriptor_names,
                &data.analytes[row.analyte],
                &data.systems[row.system].system,
            )
        })
        .collect::<Result<_, _>>()?;
    let nz = descriptor_names.len();
    let mut mean = vec![0.0; nz];
    let mut wsum = 0.0;
    for (i, &w) in weights.iter().enumerate() {
        for (m, v) in mean.iter_mut().zip(&raw[i]) {
            *m += w * v;
        }
        wsum += w;
    }
    mean.iter_mut().for_each(|m| *m /= wsum);
    let mut sd = vec![0.0; nz];
    for (i, &w) in weights.iter().enumerate() {
        for ((s, v), m) in sd.iter_mut().zip(&raw[i]).zip(&mean) {
            *s += w * (v - m) * (v - m);
        }
    }
    sd.iter_mut()
        .for_each(|s| *s = (*s / wsum).sqrt().max(1e-6));
    let sys_feats: Vec<Vec<f64>> = data
        .systems
        .iter()
        .map(|s| system_features(&s.system))
        .collect();
    let fit_rows: Vec<(Vec<f64>, &[f64], f64, f64)> = rows
        .iter()
        .zip(&weights)
        .enumerate()
        .map(|(i, (&r, &w))| {
            let row = &data.rows[r];
            let z: Vec<f64> = raw[i]
                .iter()
                .zip(mean.iter().zip(&sd))
                .map(|(v, (m, s))| (v - m) / s)
                .collect();
            (
                z,
                sys_feats[row.system].as_slice(),
                row.psi_k1.clamp(-0.5, 1.6),
                w,
            )
        })
        .collect();
    LinearPart::fit(
        &fit_rows,
        descriptor_names.to_vec(),
        mean,
        sd,
        interactions,
        penalties,
    )
}

/// Descriptor names the model uses: every descriptor the source gives for all analytes.
pub fn common_descriptor_names(data: &TrainingData) -> Vec<String> {
    let Some(first) = data.analytes.first() else {
        return Vec::new();
    };
    let all_have = |k: &str| {
        data.analytes
            .iter()
            .all(|a| a.descriptors.get(k).is_some_and(|v| v.is_finite()))
    };
    let mut names: Vec<String> = first
        .descriptors
        .keys()
        .filter(|k| {
            !k.starts_with("lfn_ph_")
                && !k.starts_with("charge_ph_")
                && !super::features::SECOND_ORDER_NAMES.contains(&k.as_str())
                && all_have(k)
        })
        .cloned()
        .collect();
    if all_have("logp") && all_have("lfn_ph_7") {
        names.extend(DYNAMIC_NAMES.iter().map(|n| (*n).to_owned()));
    }
    if all_have("charge_ph_7") {
        names.push("charge_at_ph".to_owned());
        names.push("abs_charge_at_ph".to_owned());
    }
    // second-order terms last: main effects and × mode only (`interacting_count`)
    names.extend(
        super::features::SECOND_ORDER_NAMES
            .iter()
            .filter(|n| all_have(n))
            .map(|n| (*n).to_owned()),
    );
    names
}

/// Trains the model from the two tables with `PhasewiseDescriptors`.
///
/// # Errors
/// File, format or data-size errors.
pub fn train(systems_path: &Path, retention_path: &Path, seed: u64) -> Result<Model, ModelError> {
    let data = TrainingData::load(systems_path, retention_path, &PhasewiseDescriptors)?;
    train_on(&data, seed)
}

/// Trains on loaded data: 5-fold system-grouped CV for calibration, then a fit on all rows.
///
/// # Errors
/// `ModelError::TooLittleData` when there are too few systems or rows.
pub fn train_on(data: &TrainingData, seed: u64) -> Result<Model, ModelError> {
    train_with(data, seed, DEFAULT_PENALTIES)
}

/// `train_on` with explicit ridge penalties.
///
/// # Errors
/// As `train_on`.
pub fn train_with(
    data: &TrainingData,
    seed: u64,
    penalties: Penalties,
) -> Result<Model, ModelError> {
    if data.systems.len() < 5 {
        return Err(ModelError::TooLittleData(format!(
            "{} systems, need at least 5",
            data.systems.len()
        )));
    }
    let names = common_descriptor_names(data);
    let cv = super::eval::cross_validate(data, &names, seed, 5, penalties)?;
    let all: Vec<usize> = (0..data.rows.len()).collect();
    let linear = fit_linear(data, &all, &names, true, penalties)?;
    let n_systems = data.systems.len();
    Ok(Model {
        licence: MODEL_LICENCE.into(),
        format_version: 1,
        seed,
        n_rows: data.rows.len(),
        n_systems,
        linear,
        calibration: cv.calibration,
        memory_weights: cv.memory_weights,
        memory: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sys(mode: Mode, grad: &[(f64, f64)], dwell: f64) -> LcSystem {
        LcSystem {
            mode,
            chem_class: ChemClass::C18,
            modifier: Modifier::Acetonitrile,
            ph: Some(2.7),
            additive: Additive::FormicAcid,
            gradient: grad
                .iter()
                .map(|&(t, p)| GradientPoint {
                    time_min: t,
                    organic_pct: p,
                })
                .collect(),
            t0_min: 1.0,
            dwell_min: dwell,
            flow_ml_min: 0.4,
            temperature_c: Some(40.0),
        }
    }

    #[test]
    fn isocratic_retention_matches_lss_k() {
        // Isocratic: tR = t0 (1 + k), k = 10^{S(psi1 − psi)} (LSS definition).
        let s = sys(Mode::ReversedPhase, &[(0.0, 40.0)], 0.0);
        let (sv, psi1) = (4.0, 0.55);
        let k = 10f64.powf(sv * (psi1 - 0.40));
        let rt = rt_from_psi(&s, sv, psi1);
        assert!((rt - (1.0 + k)).abs() < 1e-9, "{rt} vs {}", 1.0 + k);
    }

    #[test]
    fn linear_gradient_matches_lss_closed_form() {
        // Linear gradient without hold: tR = (t0/b) log10(2.3 k0 b + 1) + t0 with
        // b = S Δφ t0 / tG and k0 = k at the start (Snyder & Dolan 2007, eq. for tR; from memory).
        let s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 0.0);
        let (sv, psi1) = (5.0, 0.5);
        let k0 = 10f64.powf(sv * (psi1 - 0.05));
        let b = sv * 0.9 * 1.0 / 20.0;
        let expected = (1.0 / b) * (std::f64::consts::LN_10 * k0 * b + 1.0).log10() + 1.0;
        let rt = rt_from_psi(&s, sv, psi1);
        assert!((rt - expected).abs() < 1e-3, "{rt} vs {expected}");
    }

    #[test]
    fn dwell_delays_elution_by_at_most_the_dwell_time() {
        let a = sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 0.0);
        let b = sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 2.0);
        let ra = rt_from_psi(&a, 5.0, 0.5);
        let rb = rt_from_psi(&b, 5.0, 0.5);
        assert!(rb > ra && rb <= ra + 2.0 + 1e-9);
    }

    proptest::proptest! {
        #[test]
        fn psi_rt_round_trip(psi in -0.3f64..1.2, sv in 2.0f64..10.0, dwell in 0.0f64..3.0,
                             hold in 0.0f64..5.0, hilic in proptest::bool::ANY) {
            let mode = if hilic { Mode::Hilic } else { Mode::ReversedPhase };
            let g = if hilic { [(0.0, 95.0), (hold, 95.0), (hold + 15.0, 40.0), (hold + 20.0, 40.0)] }
                    else { [(0.0, 5.0), (hold, 5.0), (hold + 15.0, 100.0), (hold + 20.0, 100.0)] };
            let s = sys(mode, &g, dwell);
            let rt = rt_from_psi(&s, sv, psi);
            proptest::prop_assert!(rt > s.t0_min);
            let back = psi_from_rt(&s, sv, rt).unwrap();
            proptest::prop_assert!((back - psi).abs() < 1e-6, "{} vs {}", back, psi);
        }

        #[test]
        fn retention_increases_with_psi(psi in -0.3f64..1.1, d in 0.001f64..0.2) {
            let s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (2.0, 5.0), (12.0, 95.0)], 0.5);
            proptest::prop_assert!(rt_from_psi(&s, 4.0, psi + d) > rt_from_psi(&s, 4.0, psi));
        }
    }

    #[test]
    fn bad_systems_are_errors_naming_the_value() {
        let mut s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (10.0, 95.0)], 0.0);
        s.t0_min = -1.0;
        assert!(s.validate().unwrap_err().to_string().contains("-1"));
        let mut s = sys(Mode::ReversedPhase, &[(0.0, 5.0), (10.0, 195.0)], 0.0);
        assert!(s.validate().unwrap_err().to_string().contains("195"));
        s.gradient = vec![];
        assert!(s.validate().is_err());
        let s = sys(Mode::ReversedPhase, &[(1.0, 5.0)], 0.0);
        assert!(s.validate().is_err());
        assert!(psi_from_rt(&sys(Mode::ReversedPhase, &[(0.0, 5.0)], 0.0), 4.0, 0.5).is_err());
    }

    #[test]
    fn flow_programs_map_to_volume_equivalent_time_and_back() {
        // Flow doubles at 10 min: after 20 min, 10·F + 10·2F = 30·F of eluent has passed,
        // i.e. 30 min at the nominal flow F (definition of τ).
        let ts = TrainingSystem {
            id: "x".into(),
            system: sys(Mode::ReversedPhase, &[(0.0, 5.0), (20.0, 95.0)], 0.0),
            gradient_duration_min: 20.0,
            flow_program: vec![(0.0, 0.4), (10.0, 0.4), (10.0, 0.8)],
        };
        assert!((ts.volume_time(5.0) - 5.0).abs() < 1e-12);
        assert!((ts.volume_time(20.0) - 30.0).abs() < 1e-9);
        assert!((ts.real_time(30.0) - 20.0).abs() < 1e-6);
        // A linear ramp 0.4 → 0.8 over 10 min: mean flow 0.6, τ(10) = 15 min.
        let ramp = TrainingSystem {
            flow_program: vec![(0.0, 0.4), (10.0, 0.8)],
            ..ts.clone()
        };
        assert!((ramp.volume_time(10.0) - 15.0).abs() < 1e-9);
        let constant = TrainingSystem {
            flow_program: Vec::new(),
            ..ts
        };
        assert_eq!(constant.volume_time(7.5), 7.5);
        assert_eq!(constant.real_time(7.5), 7.5);
    }

    #[test]
    fn normal_cdf_reference_values() {
        // Φ(0) = 0.5, Φ(1.959964) = 0.975 (standard normal table, from memory).
        assert!((normal_cdf(0.0) - 0.5).abs() < 1e-7);
        assert!((normal_cdf(1.959_964) - 0.975).abs() < 1e-6);
        assert!((normal_cdf(-1.959_964) - 0.025).abs() < 1e-6);
    }

    #[test]
    fn program_parser_rejects_garbage() {
        assert_eq!(parse_program("0:5;10:95").unwrap().len(), 2);
        assert!(parse_program("0:5;x:95").is_err());
        assert!(parse_program("0-5").is_err());
    }

    #[test]
    fn folds_are_deterministic_and_balanced() {
        let a = system_folds(23, 5, 7);
        assert_eq!(a, system_folds(23, 5, 7));
        for f in 0..5 {
            let n = a.iter().filter(|&&x| x == f).count();
            assert!((4..=5).contains(&n));
        }
        assert_ne!(a, system_folds(23, 5, 8));
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig::with_cases(48))]
        /// On reversed phase, predicted retention grows along a homologous series (n-alkyl
        /// benzenes, one CH2 at a time) under any sensible gradient, pH and modifier: the
        /// methylene increment is positive on every RP phase (common practice, no source).
        #[test]
        fn retention_grows_along_a_homologous_series_on_rp(
            start in 0.0f64..40.0,
            end in 80.0f64..100.0,
            tg in 5.0f64..60.0,
            t0 in 0.3f64..3.0,
            ph in 2.0f64..8.0,
            methanol in proptest::bool::ANY,
        ) {
            let model = Model::load_builtin().unwrap();
            let mut system = sys(Mode::ReversedPhase, &[(0.0, start), (tg, end)], 0.0);
            system.t0_min = t0;
            system.ph = Some(ph);
            system.modifier = if methanol { Modifier::Methanol } else { Modifier::Acetonitrile };
            let mut last = f64::NEG_INFINITY;
            for n in 1..=8 {
                let smiles = format!("{}c1ccccc1", "C".repeat(n));
                let f = AnalyteFeatures::from_smiles(&smiles, None).unwrap();
                let p = model.predict(&f, &system).unwrap();
                proptest::prop_assert!(
                    p.rt_min > last,
                    "C{n}-benzene at {} min after {} min", p.rt_min, last
                );
                last = p.rt_min;
            }
        }
    }
}
