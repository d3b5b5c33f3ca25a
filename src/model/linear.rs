//! The ridge-regression part of the LC model: system features, the design matrix of analyte
//! descriptors × system features (`LinearPart`), its penalties and its fit on training rows.

use linfa::prelude::*;
use linfa_linear::LinearRegression;
use ndarray::{Array1, Array2};
use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use super::features::{AnalyteFeatures, ION_NAMES};
use super::system::{Additive, ChemClass, LcSystem, Mode, ModelError, Modifier};
use super::training_data::TrainingData;

/// Number of system features (see `system_features`).
pub const SYSTEM_FEATURE_NAMES: [&str; 25] = [
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
    "ph_missing",
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
/// classes, modifier, the pH-missing flag and the HILIC × methanol term. Additive, temperature
/// and gradient-shape features act as offsets only (more interactions overfit in CV).
///
/// The eluent pH is **not** a system feature: it reaches a prediction only through the
/// analyte's ionisation (`ION_NAMES`), so a neutral analyte's prediction does not depend on
/// it (issue 14). The additive stays as a per-system offset (the buffer effect).
pub const INTERACTING: [usize; 14] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 24];

/// System feature vector (order of `SYSTEM_FEATURE_NAMES`). Temperature falls back to 35 °C
/// with a missing flag; a missing pH is only flagged (the ionisation terms then use the
/// additive's typical pH).
pub fn system_features(sys: &LcSystem) -> Vec<f64> {
    let hilic = f64::from(u8::from(sys.mode == Mode::Hilic));
    let class = |c: ChemClass| f64::from(u8::from(sys.chem_class == c));
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
        f64::from(u8::from(sys.ph.is_none())),
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

fn eluent_ph(sys: &LcSystem) -> f64 {
    sys.ph.unwrap_or_else(|| sys.additive.typical_ph())
}

/// Descriptor transforms applied before standardisation: counts enter as given, mass as log10;
/// the ionisation terms (`features::ION_NAMES`) are interpolated at the system's pH.
fn transformed_descriptors(
    names: &[String],
    f: &AnalyteFeatures,
    sys: &LcSystem,
) -> Result<Vec<f64>, ModelError> {
    names
        .iter()
        .map(|n| {
            if ION_NAMES.contains(&n.as_str()) {
                return super::features::ion_term_at(f, n, eluent_ph(sys))
                    .ok_or_else(|| ModelError::MissingDescriptor(format!("{n}_ph_0..14")));
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
    /// Fit the compound terms within systems (a free offset per training system), then the
    /// offsets on the system features (`LinearPart::fit`); else one pooled ridge.
    #[serde(default)]
    pub within_system: bool,
}

/// System features of the buffer additive (one-hot, formic acid the reference).
const BUFFER_FEATURES: [usize; 7] = [13, 14, 15, 16, 17, 18, 19];

/// Ridge penalty (relative to the total weight) on the buffer offsets in the within-system
/// fit's second stage: for a neutral analyte the buffer's own effect on retention is small
/// (common practice, no source), while the raw offsets mostly carry the laboratories that use
/// each buffer; shrunk this hard, pH 3 (formic) against pH 7 (ammonium acetate or carbonate)
/// moves a neutral analyte by well under 2 % of the gradient (docs/model.md § 2a).
const BUFFER_PENALTY: f64 = 0.3;

/// Bounds of the training target `psi_k1` (strong-solvent fraction at k = 1); predictions are
/// kept inside them too, so that no prediction leaves the range the model was fitted on.
pub const PSI_MIN: f64 = -0.5;
/// Upper bound of `psi_k1` (see `PSI_MIN`).
pub const PSI_MAX: f64 = 1.6;
/// Upper bound of `psi_k1` in HILIC, where the strong solvent is water: an analyte reaches
/// k = 1 at or below 100 % water (retention on a HILIC phase fades as the eluent becomes
/// aqueous; common practice, no source), and the open retention data agree (HILIC targets
/// 0.98 at most, 4,124 rows, measured 2026-12-05). Above it the size rule's S would turn a small
/// excess into retention factors of millions at the end of a gradient.
pub const PSI_MAX_HILIC: f64 = 1.0;

/// The `psi_k1` bounds of `mode` ([`PSI_MIN`], [`PSI_MAX`], [`PSI_MAX_HILIC`]).
pub fn psi_bounds(mode: Mode) -> (f64, f64) {
    match mode {
        Mode::Hilic => (PSI_MIN, PSI_MAX_HILIC),
        _ => (PSI_MIN, PSI_MAX),
    }
}

/// Default penalties.
pub const DEFAULT_PENALTIES: Penalties = Penalties {
    system: 1e-3,
    descriptor: 1e-4,
    interaction: 3e-3,
    within_system: true,
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
    /// Smallest and largest standardised value of each descriptor over the training rows
    /// (empty in older model files: no extrapolation check).
    #[serde(default)]
    pub z_range: Vec<(f64, f64)>,
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
/// ionisation or second-order term (`common_descriptor_names` lists those last; they act as
/// main effects and × the HILIC flag only, so that no chemistry class or modifier can turn the
/// direction of the ionisation effect).
fn interacting_count(names: &[String]) -> usize {
    names
        .iter()
        .position(|n| {
            super::features::SECOND_ORDER_NAMES.contains(&n.as_str())
                || ION_NAMES.contains(&n.as_str())
        })
        .unwrap_or(names.len())
}

impl LinearPart {
    /// How far (in training standard deviations) the standardised descriptors `z` lie outside
    /// the range of the training analytes: the largest excess over all descriptors, 0 inside.
    pub(crate) fn extrapolation_sd(&self, z: &[f64]) -> f64 {
        z.iter()
            .zip(&self.z_range)
            .map(|(v, (lo, hi))| (lo - v).max(v - hi).max(0.0))
            .fold(0.0, f64::max)
    }

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
    /// target, weight, system index. The normal equations `(XᵀWX + Λ) β = XᵀWy` are accumulated
    /// sparsely and solved with linfa-linear's least-squares solver (QR) on that square system.
    ///
    /// With `penalties.within_system` the compound terms (descriptors and descriptor × system
    /// interactions) are fitted **within systems**: every training system gets its own offset
    /// (the normal equations are centred per system, the fixed-effects or Frisch–Waugh form;
    /// e.g. Wooldridge, "Econometric Analysis of Cross Section and Panel Data", 2010, ch. 10;
    /// from memory), so one system's offset (column make, instrument, buffer, unknown dwell)
    /// cannot leak into what is learnt about compounds. The per-system offsets are then
    /// regressed on the system features (a second, small ridge) to give the offset of a system
    /// never seen. The RP main effects of the ionisation terms (`ION_NAMES`) are kept ≥ 0 (an
    /// ionised analyte is never more retained than its neutral form in RP): a negative one is
    /// fixed at 0 and the rest refitted.
    fn fit(
        rows: &[FitRow<'_>],
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
        // per system: weight, Σ w x (dense), Σ w y, system features
        let mut groups: BTreeMap<usize, SystemSums<'_>> = BTreeMap::new();
        for row in rows {
            design_row(&row.z, row.s, interactions, n_int, &mut buf);
            let w = row.w;
            wsum += w;
            let g = groups
                .entry(row.system)
                .or_insert_with(|| (0.0, vec![0.0; p], 0.0, row.s));
            g.0 += w;
            g.2 += w * row.y;
            for (a, &(ca, va)) in buf.iter().enumerate() {
                let wa = w * va;
                xty[ca] += wa * row.y;
                g.1[ca] += wa;
                let r = &mut gram[ca * p..ca * p + p];
                for &(cb, vb) in &buf[a..] {
                    r[cb] += wa * vb;
                }
            }
        }
        if wsum <= 0.0 {
            return Err(ModelError::TooLittleData("no weighted rows".into()));
        }
        let within = penalties.within_system;
        if within {
            // centre per system: G −= Sx Sxᵀ / W, Xᵀy −= Sx Sy / W (upper triangle)
            for (wg, sx, sy, _) in groups.values() {
                let nzc: Vec<(usize, f64)> = sx
                    .iter()
                    .enumerate()
                    .filter(|(_, v)| **v != 0.0)
                    .map(|(i, v)| (i, *v))
                    .collect();
                for (a, &(i, vi)) in nzc.iter().enumerate() {
                    xty[i] -= vi * sy / wg;
                    let r = &mut gram[i * p..i * p + p];
                    for &(j, vj) in &nzc[a..] {
                        r[j] -= vi * vj / wg;
                    }
                }
            }
        }
        let n_ion = descriptor_names
            .iter()
            .filter(|n| ION_NAMES.contains(&n.as_str()))
            .count();
        let ion_cols: Vec<usize> = descriptor_names
            .iter()
            .enumerate()
            .filter(|(_, n)| ION_NAMES.contains(&n.as_str()))
            .map(|(j, _)| 1 + ns + j)
            .collect();
        debug_assert_eq!(n_ion, ion_cols.len());
        let mut fixed_zero: Vec<usize> = Vec::new();
        let mut coefficients = Vec::new();
        for _ in 0..=ion_cols.len() {
            let mut a = Array2::<f64>::zeros((p, p));
            for i in 0..p {
                for j in i..p {
                    let v = gram[i * p + j];
                    a[[i, j]] = v;
                    a[[j, i]] = v;
                }
                let pen = if i == 0 {
                    if within { 1.0 } else { 1e-8 }
                } else if i <= ns {
                    if within { 1.0 } else { penalties.system }
                } else if i <= ns + nz {
                    penalties.descriptor
                } else {
                    penalties.interaction
                };
                let pen = if fixed_zero.contains(&i) { 1e6 } else { pen };
                a[[i, i]] += pen * wsum;
            }
            let b = Array1::from(xty.clone());
            let fitted = LinearRegression::new()
                .with_intercept(false)
                .fit(&Dataset::new(a, b))
                .map_err(|e| ModelError::TooLittleData(format!("ridge solve failed: {e}")))?;
            coefficients = fitted.params().to_vec();
            for &c in &fixed_zero {
                coefficients[c] = 0.0;
            }
            let negative: Vec<usize> = ion_cols
                .iter()
                .copied()
                .filter(|&c| coefficients[c] < 0.0 && !fixed_zero.contains(&c))
                .collect();
            if negative.is_empty() {
                break;
            }
            fixed_zero.extend(negative);
        }
        if within {
            // stage 2: per-system offsets (mean residual of the compound terms) on the system
            // features, weighted by the system's total weight
            for c in coefficients.iter_mut().take(1 + ns) {
                *c = 0.0;
            }
            let q = 1 + ns;
            let mut g2 = Array2::<f64>::zeros((q, q));
            let mut b2 = Array1::<f64>::zeros(q);
            for (wg, sx, sy, sf) in groups.values() {
                let fitted_mean: f64 = sx.iter().zip(&coefficients).map(|(x, c)| x * c).sum();
                let offset = (sy - fitted_mean) / wg;
                let mut x = Vec::with_capacity(q);
                x.push(1.0);
                x.extend_from_slice(sf);
                for i in 0..q {
                    b2[i] += wg * x[i] * offset;
                    for j in 0..q {
                        g2[[i, j]] += wg * x[i] * x[j];
                    }
                }
            }
            for i in 1..q {
                let pen = if BUFFER_FEATURES.contains(&(i - 1)) {
                    BUFFER_PENALTY
                } else {
                    penalties.system
                };
                g2[[i, i]] += pen * wsum;
            }
            g2[[0, 0]] += 1e-8 * wsum;
            let fitted = LinearRegression::new()
                .with_intercept(false)
                .fit(&Dataset::new(g2, b2))
                .map_err(|e| ModelError::TooLittleData(format!("offset solve failed: {e}")))?;
            for (c, v) in coefficients.iter_mut().zip(fitted.params().iter()) {
                *c = *v;
            }
        }
        let mut z_range = vec![(f64::INFINITY, f64::NEG_INFINITY); nz];
        for row in rows {
            for (r, v) in z_range.iter_mut().zip(&row.z) {
                r.0 = r.0.min(*v);
                r.1 = r.1.max(*v);
            }
        }
        Ok(Self {
            descriptor_names,
            descriptor_mean,
            descriptor_sd,
            interactions,
            z_range,
            coefficients,
        })
    }
}

/// Per-system sums of the within-system fit: weight, Σ w·x (dense), Σ w·y, system features.
type SystemSums<'a> = (f64, Vec<f64>, f64, &'a [f64]);

/// One training row for `LinearPart::fit`.
struct FitRow<'a> {
    z: Vec<f64>,
    s: &'a [f64],
    y: f64,
    w: f64,
    system: usize,
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
    let fit_rows: Vec<FitRow<'_>> = rows
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
            FitRow {
                z,
                s: sys_feats[row.system].as_slice(),
                y: {
                    let (lo, hi) = psi_bounds(data.systems[row.system].system.mode);
                    row.psi_k1.clamp(lo, hi)
                },
                w,
                system: row.system,
            }
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
                && !k.starts_with("ion_")
                && !super::features::SECOND_ORDER_NAMES.contains(&k.as_str())
                && all_have(k)
        })
        .cloned()
        .collect();
    // the ionisation terms after the interacting descriptors (main effects and × HILIC only)
    names.extend(
        ION_NAMES
            .iter()
            .filter(|n| all_have(&format!("{n}_ph_7")))
            .map(|n| (*n).to_owned()),
    );
    // second-order terms last: main effects and × mode only (`interacting_count`)
    names.extend(
        super::features::SECOND_ORDER_NAMES
            .iter()
            .filter(|n| all_have(n))
            .map(|n| (*n).to_owned()),
    );
    names
}
