//! The boiling-point route to the retention index (steps 1-4 of the module docs): used when an
//! analyte has a boiling point but no structure the solvation model can read.

use serde::Serialize;

use super::{GcAnalyte, GcError, RingSubstitution};
use crate::phase::{McReynoldsConstants, PhaseMode, StationaryPhase};

// Kreglewski & Zwolinski (1961) n-alkane boiling-point correlation; constants from memory.
const KZ_A: f64 = 1071.28;
const KZ_B: f64 = 6.97596;
const KZ_C: f64 = 0.116307;

/// Normal boiling point of the n-alkane with `carbon_number` carbons (Kreglewski & Zwolinski 1961,
/// constants from memory; within about 1 K of handbook values for C3-C20, off by about 6 K for
/// methane).
pub fn alkane_boiling_point_k(carbon_number: f64) -> f64 {
    KZ_A - (KZ_B - KZ_C * carbon_number.max(0.0).powf(2.0 / 3.0)).exp()
}

/// The (fractional) n-alkane carbon number with boiling point `tb_k`: the inverse of
/// [`alkane_boiling_point_k`]. `None` outside 0 < n and Tb < A.
pub fn alkane_equivalent_carbon_number(tb_k: f64) -> Option<f64> {
    if !tb_k.is_finite() || tb_k >= KZ_A {
        return None;
    }
    let root = (KZ_B - (KZ_A - tb_k).ln()) / KZ_C;
    (root > 0.0).then(|| root.powf(1.5))
}

/// d(100 n)/dTb, the index change per kelvin of boiling point near `tb_k`.
fn index_per_kelvin(tb_k: f64) -> f64 {
    let root = ((KZ_B - (KZ_A - tb_k).ln()) / KZ_C).max(1e-6);
    100.0 * 1.5 * root.sqrt() / (KZ_C * (KZ_A - tb_k))
}

/// One functional group: increment to the squalane index, Rohrschneider-McReynolds weights
/// (a, b, c, d, e for x', y', z', u', s'), and the 1-sigma index uncertainty it adds.
struct GroupTerm {
    squalane_increment_ri: f64,
    weights: [f64; 5],
    sigma_ri: f64,
}

/// A [`GroupTerm`] from its squalane increment, McReynolds weights and 1-sigma uncertainty.
const fn group(squalane_increment_ri: f64, weights: [f64; 5], sigma_ri: f64) -> GroupTerm {
    GroupTerm {
        squalane_increment_ri,
        weights,
        sigma_ri,
    }
}

// Increments fitted so that the McReynolds probes reach their squalane indices (see the module
// docs); the rest are from memory of typical indices on dimethylpolysiloxane. Rough.
const AROMATIC_RING: GroupTerm = group(17.0, [1.0, 0.0, 0.0, 0.0, 0.0], 10.0);
// Rings after the first: fused and linked polyaromatics elute earlier than their boiling points
// suggest (fitted to naphthalene near 1180 and biphenyl near 1380 on dimethylpolysiloxane, from
// memory); the benzene-probe weight per extra ring is reduced to 0.8 (naphthalene is retained
// about 560 units more on polyethylene glycol, from memory).
const ADDITIONAL_RING: GroupTerm = group(-75.0, [0.8, 0.0, 0.0, 0.0, 0.0], 25.0);
// Small alcohols lose more index to hydrogen bonding than the 1-butanol probe: an extra
// decrement growing to 75 units at ethanol's molar mass (ethanol near 430 on
// dimethylpolysiloxane, from memory), applied per hydroxyl below 1-butanol's molar mass.
const SMALL_ALCOHOL_EXTRA_RI: f64 = -75.0;
const BUTANOL_M_G_MOL: f64 = 74.12;
const ETHANOL_M_G_MOL: f64 = 46.07;
const HYDROXYL: GroupTerm = group(-180.0, [0.0, 1.0, 0.0, 0.0, 0.0], 20.0);
const CARBOXYLIC_ACID: GroupTerm = group(-250.0, [0.0, 1.4, 0.5, 0.0, 0.0], 40.0);
const CARBONYL: GroupTerm = group(-86.0, [0.0, 0.0, 1.0, 0.0, 0.0], 15.0);
const ETHER: GroupTerm = group(-15.0, [0.0, 0.0, 0.5, 0.0, 0.0], 15.0);
const ESTER: GroupTerm = group(-55.0, [0.0, 0.0, 0.9, 0.0, 0.0], 15.0);
const NITRILE: GroupTerm = group(-190.0, [0.0, 0.0, 0.0, 1.0, 0.0], 30.0);
const NITRO: GroupTerm = group(-169.0, [0.0, 0.0, 0.0, 1.0, 0.0], 20.0);
const HALOGEN: GroupTerm = group(10.0, [0.0, 0.0, 0.0, 0.2, 0.0], 10.0);
const AMINE: GroupTerm = group(-35.0, [0.0, 0.1, 0.0, 0.0, 0.5], 25.0);
// A pyridine-like nitrogen turns one ring's benzene-like weight into the pyridine probe's weight
// (the pyridine probe already carries its ring's aromaticity).
const PYRIDINE_LIKE: GroupTerm = group(-78.0, [-1.0, 0.0, 0.0, 0.0, 1.0], 20.0);
const META_DIPOLE_U: f64 = 0.012;
const ORTHO_DIPOLE_U: f64 = 0.035;

/// Hydrocarbon scatter of boiling-point indices (1 sigma, from memory, rough).
const BASE_SIGMA_RI: f64 = 12.0;
/// Relative uncertainty of the McReynolds-type shift (common practice, no source).
const SHIFT_RELATIVE_SIGMA: f64 = 0.10;

/// Two analytes whose indices differ by less than this on a 30 m capillary are treated as likely
/// to co-elute (common practice, no source: peaks under a 10 C/min ramp are a few index units wide).
pub const MIN_RESOLVABLE_DELTA_RI: f64 = 5.0;

/// The analyte's Rohrschneider-McReynolds weights (a, b, c, d, e), its squalane increment and the
/// variance the groups add.
fn group_profile(analyte: &GcAnalyte) -> ([f64; 5], f64, f64) {
    let pyridine = analyte.n_pyridine_like.min(analyte.n_aromatic_rings);
    let terms: [(&GroupTerm, u32); 12] = [
        (&AROMATIC_RING, analyte.n_aromatic_rings.min(1)),
        (&ADDITIONAL_RING, analyte.n_aromatic_rings.saturating_sub(1)),
        (&HYDROXYL, analyte.n_hydroxyl),
        (&CARBOXYLIC_ACID, analyte.n_carboxylic_acid),
        (&CARBONYL, analyte.n_carbonyl),
        (&ETHER, analyte.n_ether),
        (&ESTER, analyte.n_ester),
        (&NITRILE, analyte.n_nitrile),
        (&NITRO, analyte.n_nitro),
        (&HALOGEN, analyte.n_halogen),
        (&AMINE, analyte.n_amine),
        (&PYRIDINE_LIKE, pyridine),
    ];
    let mut weights = [0.0; 5];
    let mut increment = 0.0;
    let mut variance = 0.0;
    for (term, count) in terms {
        let n = f64::from(count);
        for (w, tw) in weights.iter_mut().zip(term.weights) {
            *w += n * tw;
        }
        increment += n * term.squalane_increment_ri;
        variance += (n * term.sigma_ri).powi(2);
    }
    let smallness = ((BUTANOL_M_G_MOL - analyte.molar_mass_g_mol)
        / (BUTANOL_M_G_MOL - ETHANOL_M_G_MOL))
        .clamp(0.0, 1.0);
    increment += f64::from(analyte.n_hydroxyl) * SMALL_ALCOHOL_EXTRA_RI * smallness;
    weights[3] += match analyte.ring_substitution {
        RingSubstitution::Ortho => ORTHO_DIPOLE_U,
        RingSubstitution::Meta => META_DIPOLE_U,
        RingSubstitution::Para | RingSubstitution::NotApplicable => 0.0,
    };
    (weights, increment, variance)
}

/// A predicted retention index with its uncertainty and the path that produced it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RetentionIndexPrediction {
    /// Phase id.
    pub phase_id: String,
    /// Predicted retention index (Kovats / van den Dool-Kratz scale).
    pub retention_index: f64,
    /// 1-sigma uncertainty in index units.
    pub sigma_ri: f64,
    /// Lower end of the approximate 95 % interval (index - 1.96 sigma).
    pub low_95_ri: f64,
    /// Upper end of the approximate 95 % interval.
    pub high_95_ri: f64,
    /// The non-polar part of the index: on the boiling-point route 100 n(Tb) before group
    /// increments and phase shift; on the solvation route 100 (L + 0.362) / 0.505, the index the
    /// solute's dispersion term alone would give.
    pub boiling_point_index: f64,
    /// The polar part on this phase: the McReynolds-type shift relative to squalane (boiling-point
    /// route) or (e E + s S + a A + b B) / l in index units (solvation route).
    pub phase_shift_ri: f64,
    /// How the value was obtained.
    pub path: String,
}

impl RetentionIndexPrediction {
    /// A prediction with its approximate 95 % interval (index +- 1.96 sigma).
    pub(super) fn with_interval(
        phase_id: &str,
        retention_index: f64,
        sigma_ri: f64,
        boiling_point_index: f64,
        phase_shift_ri: f64,
        path: String,
    ) -> Self {
        RetentionIndexPrediction {
            phase_id: phase_id.to_string(),
            retention_index,
            sigma_ri,
            low_95_ri: retention_index - 1.96 * sigma_ri,
            high_95_ri: retention_index + 1.96 * sigma_ri,
            boiling_point_index,
            phase_shift_ri,
            path,
        }
    }

    /// The route of the index in a few words, for reports: `n-alkane` (100 n by definition),
    /// `solvation model`, `boiling-point route` (also when the boiling-point route stood in
    /// for a structure the solvation route could not type).
    pub fn route(&self) -> &'static str {
        if self.path.starts_with("n-alkane") {
            "n-alkane"
        } else if self.path.starts_with("solvation") {
            "solvation model"
        } else {
            "boiling-point route"
        }
    }
}

pub(super) fn gc_constants(phase: &StationaryPhase) -> Result<&McReynoldsConstants, GcError> {
    if phase.mode() != PhaseMode::Gc {
        return Err(GcError::NotGcPhase {
            phase_id: phase.id().to_string(),
            mode: phase.mode(),
        });
    }
    phase
        .gc()
        .and_then(|gc| gc.mcreynolds())
        .ok_or_else(|| GcError::NoMcReynolds {
            phase_id: phase.id().to_string(),
        })
}

/// Predicts the retention index of `analyte` on a liquid GC `phase`.
///
/// # Errors
/// [`GcError::NotGcPhase`], [`GcError::NoMcReynolds`] for porous-layer phases,
/// [`GcError::BadAnalyte`] for invalid analyte fields.
///
/// # Examples
/// ```
/// use phasewise::model::gc::{GcAnalyte, predict_retention_index};
/// let catalogue = phasewise::phase::Catalogue::builtin().unwrap();
/// let decane = GcAnalyte { tb_k: 447.3, molar_mass_g_mol: 142.3,
///     is_n_alkane_carbon_count: Some(10), ..GcAnalyte::default() };
/// let wax = catalogue.phase("gc-wax").unwrap();
/// assert_eq!(predict_retention_index(&decane, wax).unwrap().retention_index, 1000.0);
/// ```
pub fn predict_retention_index(
    analyte: &GcAnalyte,
    phase: &StationaryPhase,
) -> Result<RetentionIndexPrediction, GcError> {
    let constants = gc_constants(phase)?;
    analyte.validate()?;
    if let Some(n) = analyte.is_n_alkane_carbon_count {
        let index = 100.0 * f64::from(n);
        return Ok(RetentionIndexPrediction::with_interval(
            phase.id(),
            index,
            0.0,
            index,
            0.0,
            "n-alkane: index 100 n by definition (Kovats)".to_string(),
        ));
    }
    let carbon = alkane_equivalent_carbon_number(analyte.tb_k).ok_or(GcError::BadAnalyte {
        field: "tb_k",
        value: analyte.tb_k,
        reason: "is below the boiling point the alkane ladder can represent",
    })?;
    let boiling_point_index = 100.0 * carbon;
    let (weights, increment, group_variance) = group_profile(analyte);
    let phase_shift_ri: f64 = weights
        .iter()
        .zip(constants.as_array())
        .map(|(w, c)| w * c)
        .sum();
    let retention_index = boiling_point_index + increment + phase_shift_ri;
    let tb_term = index_per_kelvin(analyte.tb_k) * analyte.tb_sigma_k;
    // Large analytes: the boiling-point route extrapolates; add 1 % of the index above 2500.
    let size_term = 0.01 * (retention_index - 2500.0).max(0.0);
    let sigma_ri = (BASE_SIGMA_RI.powi(2)
        + tb_term.powi(2)
        + group_variance
        + (SHIFT_RELATIVE_SIGMA * phase_shift_ri).powi(2)
        + size_term.powi(2))
    .sqrt();
    Ok(RetentionIndexPrediction::with_interval(
        phase.id(),
        retention_index,
        sigma_ri,
        boiling_point_index,
        phase_shift_ri,
        "boiling-point index on the n-alkane ladder (Kreglewski-Zwolinski Tb) + functional-group increments (squalane) + McReynolds-type phase shift".to_string(),
    ))
}

/// True when two predicted indices on the same phase differ by less than
/// [`MIN_RESOLVABLE_DELTA_RI`] (likely co-elution; common practice, no source).
pub fn likely_coelute(a: &RetentionIndexPrediction, b: &RetentionIndexPrediction) -> bool {
    a.phase_id == b.phase_id
        && (a.retention_index - b.retention_index).abs() < MIN_RESOLVABLE_DELTA_RI
}
