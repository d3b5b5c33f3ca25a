//! The chromatographic system as the LC retention model reads it: separation mode, phase
//! chemistry class, modifier, additive, gradient program, dead and dwell time, flow and
//! temperature (`LcSystem`), with its range checks, and the model's error type.

use serde::{Deserialize, Serialize};
use thiserror::Error;

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
    #[error(
        "the retention model needs the analyte's {}, which could not be computed from its structure (a bare ion, or an element the descriptors do not cover)",
        .0.replace('_', " ")
    )]
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
    pub(crate) fn inlet_program(&self) -> Vec<(f64, f64)> {
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
