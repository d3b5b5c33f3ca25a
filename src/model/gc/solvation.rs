//! The solvation-parameter route to the retention index: phase selectivity from published
//! physics.
//!
//! Retention on a GC phase follows the solvation-parameter (linear free-energy) model
//! log k = c + e E + s S + a A + b B + l L (M. H. Abraham, Chem. Soc. Rev. 22 (1993) 73; for GC
//! phases C. F. Poole and co-workers), with the solute descriptors E, S, A, B, L estimated from
//! structure ([`crate::structure::abraham`]) and the phase's system constants e, s, a, b, l
//! (`data/gc_system_constants.tsv`). The n-alkanes have E = S = A = B = 0 and, in the fragment
//! scheme, L(n) = 0.505 n - 0.362 exactly, so on every phase log k(n) = c + l (0.505 n - 0.362)
//! and the Kovats index I = 100 [n + (log k - log k(n)) / (log k(n+1) - log k(n))] becomes
//!
//!   I = 100 / 0.505 x (L + 0.362 + (e E + s S + a A + b B) / l),
//!
//! independent of c: an n-alkane is 100 n on every phase, a CH2 adds exactly 100, and a polar
//! solute gains (s S + a A) / l, which is large on polyethylene glycol and small on
//! poly(dimethylsiloxane). The fragment values are the priors of `data/gc_fragment_priors.tsv`
//! refitted on the training half of the reference set (`model::gc::calibration`); the
//! uncertainty is the held-out residual spread per phase (`data/gc_retention_residuals.tsv`).

use std::sync::OnceLock;

use serde::Serialize;

use super::{GcError, RetentionIndexPrediction};
use crate::phase::{PhaseMode, StationaryPhase};
use crate::structure::abraham::{
    Fragment, FragmentValues, SoluteDescriptors, descriptors_from_counts, fragment_counts,
};
use crate::structure::graph::MolGraph;

/// L per CH2 of the n-alkane ladder (the fixed CH2 fragment value).
pub const L_PER_CH2: f64 = 0.505;
/// L of the n-alkane ladder at n = 0 (2 CH3 - 2 CH2 of the fixed fragment values).
pub const L_ALKANE_OFFSET: f64 = -0.362;

const CONSTANTS_TSV: &str = include_str!("../../../data/gc_system_constants.tsv");
const FRAGMENTS_TSV: &str = include_str!("../../../data/gc_solute_fragments.tsv");
const RESIDUALS_TSV: &str = include_str!("../../../data/gc_retention_residuals.tsv");

/// Solvation-parameter system constants of one GC phase.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SystemConstants {
    /// Phase id of the catalogue.
    pub phase_id: String,
    /// e (excess molar refraction).
    pub e: f64,
    /// s (dipolarity/polarisability).
    pub s: f64,
    /// a (hydrogen-bond basicity of the phase, times solute acidity).
    pub a: f64,
    /// b (hydrogen-bond acidity of the phase, times solute basicity).
    pub b: f64,
    /// l (dispersion and cavity, times L).
    pub l: f64,
    /// Where the values come from.
    pub source: String,
}

impl SystemConstants {
    /// The retention index of a solute with descriptors `d` on this phase.
    pub fn retention_index(&self, d: &SoluteDescriptors) -> f64 {
        100.0 / L_PER_CH2 * (d.l - L_ALKANE_OFFSET + self.polar_term(d))
    }

    /// (e E + s S + a A + b B) / l, in units of L.
    pub fn polar_term(&self, d: &SoluteDescriptors) -> f64 {
        (self.e * d.e + self.s * d.s + self.a * d.a + self.b * d.b) / self.l
    }
}

/// Parses a tab-separated table, skipping `#` comments and the header row.
pub(super) fn table_rows(text: &str) -> impl Iterator<Item = Vec<&str>> {
    text.lines()
        .filter(|l| !l.trim().is_empty() && !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split('\t').collect())
}

fn number(field: Option<&&str>) -> Option<f64> {
    field
        .and_then(|f| f.trim().parse::<f64>().ok())
        .filter(|v| v.is_finite())
}

/// Parses `data/gc_system_constants.tsv`-style text.
///
/// # Errors
/// A message naming the line that is malformed.
pub fn parse_system_constants(text: &str) -> Result<Vec<SystemConstants>, String> {
    table_rows(text)
        .map(|f| {
            let get = |i: usize| number(f.get(i));
            match (f.first(), get(1), get(2), get(3), get(4), get(5)) {
                (Some(id), Some(e), Some(s), Some(a), Some(b), Some(l)) if l > 0.0 => {
                    Ok(SystemConstants {
                        phase_id: (*id).to_string(),
                        e,
                        s,
                        a,
                        b,
                        l,
                        source: f.get(6).unwrap_or(&"").to_string(),
                    })
                }
                _ => Err(format!(
                    "system-constant row `{}` is malformed",
                    f.join("\t")
                )),
            }
        })
        .collect()
}

/// Parses fragment rows (`fragment E S A B L ...`).
///
/// # Errors
/// A message naming the unknown fragment or malformed line.
pub fn parse_fragment_values(text: &str) -> Result<Vec<(Fragment, FragmentValues)>, String> {
    table_rows(text)
        .map(|f| {
            let fragment = f
                .first()
                .and_then(|id| Fragment::from_id(id))
                .ok_or_else(|| format!("unknown fragment in row `{}`", f.join("\t")))?;
            let get = |i: usize| number(f.get(i));
            match (get(1), get(2), get(3), get(4), get(5)) {
                (Some(e), Some(s), Some(a), Some(b), Some(l)) => {
                    Ok((fragment, FragmentValues { e, s, a, b, l }))
                }
                _ => Err(format!("fragment row `{}` is malformed", f.join("\t"))),
            }
        })
        .collect()
}

struct Tables {
    constants: Vec<SystemConstants>,
    fragments: Vec<(Fragment, FragmentValues)>,
    /// (phase id, 1-sigma residual in index units) from the held-out validation.
    residual_sd: Vec<(String, f64)>,
}

fn tables() -> Result<&'static Tables, GcError> {
    static TABLES: OnceLock<Result<Tables, String>> = OnceLock::new();
    TABLES
        .get_or_init(|| {
            let residual_sd = table_rows(RESIDUALS_TSV)
                .map(|f| match (f.first(), number(f.get(1))) {
                    (Some(id), Some(v)) if v > 0.0 => Ok(((*id).to_string(), v)),
                    _ => Err(format!("residual row `{}` is malformed", f.join("\t"))),
                })
                .collect::<Result<Vec<_>, String>>()?;
            Ok(Tables {
                constants: parse_system_constants(CONSTANTS_TSV)?,
                fragments: parse_fragment_values(FRAGMENTS_TSV)?,
                residual_sd,
            })
        })
        .as_ref()
        .map_err(|e| GcError::ModelData(e.clone()))
}

/// The system constants of `phase`, or why there are none.
///
/// # Errors
/// [`GcError::NotGcPhase`], [`GcError::NoSystemConstants`] (porous-layer phases and phases
/// without published constants), [`GcError::ModelData`] if the shipped tables are broken.
pub fn system_constants(phase: &StationaryPhase) -> Result<&'static SystemConstants, GcError> {
    if phase.mode() != PhaseMode::Gc {
        return Err(GcError::NotGcPhase {
            phase_id: phase.id().to_string(),
            mode: phase.mode(),
        });
    }
    tables()?
        .constants
        .iter()
        .find(|c| c.phase_id == phase.id())
        .ok_or_else(|| GcError::NoSystemConstants {
            phase_id: phase.id().to_string(),
        })
}

/// The shipped fragment values (for the fit and its tests).
///
/// # Errors
/// [`GcError::ModelData`] if the shipped table is broken.
pub fn shipped_fragment_values() -> Result<&'static [(Fragment, FragmentValues)], GcError> {
    Ok(&tables()?.fragments)
}

/// Abraham descriptors of a structure from the shipped fragment values.
///
/// # Errors
/// [`GcError::Structure`] naming the atom the scheme cannot type.
pub fn solute_descriptors(g: &MolGraph) -> Result<SoluteDescriptors, GcError> {
    let fragments = &tables()?.fragments;
    let counts = fragment_counts(g).map_err(|e| GcError::Structure(e.to_string()))?;
    let lookup = |f: Fragment| {
        fragments
            .iter()
            .find(|(g, _)| *g == f)
            .map_or_else(FragmentValues::default, |(_, v)| *v)
    };
    Ok(descriptors_from_counts(g, &counts, &lookup))
}

/// 1-sigma index uncertainty on `constants`' phase: the held-out residual spread of that phase
/// when it is in the reference set, else interpolated by polarity (s / l) between the non-polar
/// and the polyethylene-glycol residuals.
fn residual_sigma(constants: &SystemConstants) -> Result<f64, GcError> {
    let t = tables()?;
    if let Some((_, v)) = t
        .residual_sd
        .iter()
        .find(|(id, _)| *id == constants.phase_id)
    {
        return Ok(*v);
    }
    let find = |id: &str| {
        let c = t.constants.iter().find(|c| c.phase_id == id);
        let r = t.residual_sd.iter().find(|(p, _)| p == id).map(|r| r.1);
        c.zip(r)
    };
    match (find("gc-dimethyl"), find("gc-wax")) {
        (Some((cn, rn)), Some((cp, rp))) => {
            let x = (constants.s / constants.l - cn.s / cn.l) / (cp.s / cp.l - cn.s / cn.l);
            Ok(rn + (rp - rn) * x.clamp(0.0, 1.5))
        }
        _ => Err(GcError::ModelData(
            "residual table lacks the gc-dimethyl or gc-wax row".into(),
        )),
    }
}

/// Typical error of a fragment-estimated solute descriptor (E, S, A, B): about 0.1 for E and S
/// and 0.05 for A and B (from memory of the accuracy reported for group-contribution schemes of
/// Abraham descriptors; order of magnitude only).
const DESCRIPTOR_SD: [f64; 4] = [0.10, 0.10, 0.05, 0.05];

/// 1-sigma index uncertainty from extrapolating the descriptors beyond the reference phases.
///
/// The fragment values were fitted to indices on the reference phases (those with a held-out
/// residual row), so a descriptor error is checked only along the constant ratios (e/l, s/l,
/// a/l, b/l) those phases span. On a phase whose ratio lies outside that span, the part of the
/// error no reference phase saw adds 100 / 0.505 x (distance of the ratio beyond the span) x the
/// descriptor's typical error ([`DESCRIPTOR_SD`]), summed in quadrature over the four
/// descriptors. Zero for the reference phases and for phases inside their span.
fn extrapolation_sigma(constants: &SystemConstants) -> Result<f64, GcError> {
    let t = tables()?;
    let ratios = |c: &SystemConstants| [c.e / c.l, c.s / c.l, c.a / c.l, c.b / c.l];
    let reference: Vec<[f64; 4]> = t
        .constants
        .iter()
        .filter(|c| t.residual_sd.iter().any(|(id, _)| *id == c.phase_id))
        .map(ratios)
        .collect();
    if reference.is_empty() {
        return Ok(0.0);
    }
    let own = ratios(constants);
    let mut sum = 0.0;
    for (k, (r, sd)) in own.iter().zip(DESCRIPTOR_SD).enumerate() {
        let lo = reference.iter().map(|x| x[k]).fold(f64::INFINITY, f64::min);
        let hi = reference
            .iter()
            .map(|x| x[k])
            .fold(f64::NEG_INFINITY, f64::max);
        let beyond = (lo - r).max(r - hi).max(0.0);
        sum += (beyond * sd).powi(2);
    }
    Ok(100.0 / L_PER_CH2 * sum.sqrt())
}

/// Relative uncertainty added per unit of L beyond the reference set's range (L above 11, about
/// index 2300): extrapolation (assumption, no source).
const EXTRAPOLATION_SIGMA_PER_L: f64 = 10.0;

/// Predicts the retention index of the structure `g` on the liquid GC `phase` by the
/// solvation-parameter model. n-alkanes come out at 100 n by construction.
///
/// # Errors
/// [`GcError::NotGcPhase`], [`GcError::NoSystemConstants`], [`GcError::Structure`].
pub fn predict_retention_index_from_structure(
    g: &MolGraph,
    phase: &StationaryPhase,
) -> Result<RetentionIndexPrediction, GcError> {
    let constants = system_constants(phase)?;
    let d = solute_descriptors(g)?;
    let is_alkane = crate::structure::abraham::is_n_alkane(g);
    // n-alkanes are 100 n by definition (methane included, whose L the fragments do not give)
    let retention_index = if is_alkane {
        100.0 * g.atoms.len() as f64
    } else {
        constants.retention_index(&d)
    };
    let dispersion = 100.0 / L_PER_CH2 * (d.l - L_ALKANE_OFFSET);
    let sigma_ri = if is_alkane {
        0.0
    } else {
        let base = residual_sigma(constants)?;
        let phase_beyond = extrapolation_sigma(constants)?;
        let beyond = (d.l - 11.0).max(0.0) * EXTRAPOLATION_SIGMA_PER_L;
        (base * base + phase_beyond * phase_beyond + beyond * beyond).sqrt()
    };
    Ok(RetentionIndexPrediction::with_interval(
        phase.id(),
        retention_index,
        sigma_ri,
        dispersion,
        retention_index - dispersion,
        format!(
            "solvation-parameter model: descriptors E {:.2}, S {:.2}, A {:.2}, B {:.2}, L {:.2} from structure fragments, system constants of this phase ({}), index against the n-alkane ladder",
            d.e, d.s, d.a, d.b, d.l, constants.source
        ),
    ))
}
