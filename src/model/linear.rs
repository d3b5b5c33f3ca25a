//! The ridge-regression part of the LC model: system features, the design matrix of analyte
//! descriptors × system features (`LinearPart`), its penalties and its fit on training rows.

use linfa::prelude::*;
use linfa_linear::LinearRegression;
use ndarray::{Array1, Array2};
use serde::{Deserialize, Serialize};

use super::features::AnalyteFeatures;
use super::system::{Additive, ChemClass, LcSystem, Mode, ModelError, Modifier};
use super::training_data::TrainingData;

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
