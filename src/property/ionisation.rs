//! Ionisation at a given pH: fractions of each site ionised, the net-charge distribution,
//! mean net charge, fraction neutral, a charge-state label, and logD(pH).
//!
//! **Independent-site approximation.** Each site ionises according to its own pKa with the
//! Henderson–Hasselbalch equation, and sites do not influence each other (no electrostatic
//! coupling between, e.g., the two N of a piperazine; no tautomer bookkeeping). For an acid
//! HA ⇌ A⁻ + H⁺, the ionised fraction is 1 / (1 + 10^(pKa − pH)); for a base BH⁺ ⇌ B + H⁺ the
//! protonated fraction is 1 / (1 + 10^(pH − pKa)). Textbook relations, from memory (see e.g.
//! Avdeef, "Absorption and Drug Development", Wiley 2003/2012, ch. 3–4).
//!
//! **logD.** Only the neutral species partitions (the "pH-partition hypothesis"):
//! logD = logP + log10(f_neutral), i.e. logP − log10(1 + 10^(pH − pKa)) for one acid and
//! logP − log10(1 + 10^(pKa − pH)) for one base. Optionally an ion-pair floor lets charged
//! species partition with log P_ion = logP − Δ (Avdeef's "diff 3–4" rule of thumb for
//! octanol/0.15 M KCl, from memory): logD = log10(f_n·10^logP + (1 − f_n)·10^(logP − Δ)).
//! The floor is off unless asked for.
//!
//! **Microspecies-aware logD** ([`log_d_microspecies`]): every microspecies partitions, a
//! zwitterion as an inner salt (logP − Δzw) and a net-charged species as an ion pair
//! (logP − Δ·|z|), so that a zwitterion at its isoelectric pH is not treated like a doubly
//! charged salt. The advisor's chromatographic decisions use it with
//! [`CHROMATOGRAPHIC_PARTITION`]; the LC model's features still use the neutral fraction
//! (`log10_fraction_neutral`).

use serde::{Deserialize, Serialize};

use crate::structure::ionisable::{IonisableSite, SiteKind};

/// Lowest and highest pH accepted (aqueous range with margin).
pub const PH_RANGE: (f64, f64) = (-2.0, 16.0);

/// Typical difference log P(neutral) − log P(ion pair) in octanol/water with 0.15 M KCl,
/// about 3–4 log units (Avdeef 2003, from memory). Offered as a default for the ion-pair floor.
pub const TYPICAL_ION_PAIR_DIFF_LOG: f64 = 3.5;

/// Errors from the ionisation functions.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum IonisationError {
    /// pH outside [`PH_RANGE`] or not finite.
    #[error("pH {value} is outside -2..=16 or not a number; give an aqueous pH such as 7.4")]
    PhOutOfRange {
        /// The value given.
        value: f64,
    },
    /// A site's pKa is not finite.
    #[error(
        "site {index} has pKa {value}, not a finite number; fix the estimate or knowledge-base value"
    )]
    BadPka {
        /// Index of the site.
        index: usize,
        /// The value.
        value: f64,
    },
    /// An acid or base site without a pKa.
    #[error("site {index} is an acid or base without a pKa; supply a pKa or drop the site")]
    MissingPka {
        /// Index of the site.
        index: usize,
    },
    /// logP not finite.
    #[error("logP {value} is not a finite number")]
    BadLogP {
        /// The value.
        value: f64,
    },
    /// The ion-pair difference is negative or not finite.
    #[error("ion-pair difference {value} log units must be finite and >= 0 (typical 3-4)")]
    BadIonPairDiff {
        /// The value.
        value: f64,
    },
    /// Too many sites to enumerate microstates.
    #[error(
        "{sites} ionisable sites give 2^{sites} microstates; at most {MAX_MICROSTATE_SITES} sites are enumerated, use `profile` for the charge distribution"
    )]
    TooManySites {
        /// Number of acid/base sites.
        sites: usize,
    },
    /// The molecule is never neutral (permanent charge) and no ion-pair floor was given.
    #[error(
        "the molecule carries a permanent charge and is never neutral, so logD is undefined under the pH-partition hypothesis; use log_d_with_ion_pair"
    )]
    NeverNeutral,
}

/// Ionisation state of one site at a pH.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SiteIonisation {
    /// Index of the site in the input slice.
    pub site: usize,
    /// Fraction in the charged form (deprotonated acid, protonated base; 1 for permanent charges).
    pub fraction_charged: f64,
    /// Mean charge contributed by the site (−fraction for acids, +fraction for bases).
    pub mean_charge: f64,
}

/// Probability of each net charge.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ChargeFraction {
    /// Net charge z.
    pub charge: i32,
    /// Fraction of molecules with that net charge.
    pub fraction: f64,
}

/// One microspecies: which sites are in their charged form, its net charge and its fraction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Microstate {
    /// For each input site, whether it is charged (ionised acid, protonated base; always true for
    /// permanent charges).
    pub charged: Vec<bool>,
    /// Net charge.
    pub charge: i32,
    /// Fraction of molecules in this state (independent sites: product of site fractions).
    pub fraction: f64,
}

/// Most sites [`microstates`] enumerates (2^n states).
pub const MAX_MICROSTATE_SITES: usize = 12;

/// Charge-state label.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ChargeState {
    /// Mostly neutral (no site ionised).
    Neutral,
    /// Mostly positive (bases protonated, no acid ionised).
    Cationic,
    /// Mostly negative (acids ionised, no base protonated).
    Anionic,
    /// Mostly zwitterionic (at least one acid and one base ionised).
    Zwitterionic,
    /// A permanent charge is present.
    PermanentlyCharged,
}

/// Full ionisation summary at one pH.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct IonisationProfile {
    /// The pH.
    pub ph: f64,
    /// Per-site state.
    pub sites: Vec<SiteIonisation>,
    /// Net-charge distribution, ascending charge, fractions summing to 1.
    pub charge_distribution: Vec<ChargeFraction>,
    /// Mean net charge.
    pub mean_net_charge: f64,
    /// Fraction with no ionised site and no permanent charge.
    pub fraction_neutral: f64,
    /// Fraction zwitterionic (≥ 1 acid ionised and ≥ 1 base protonated).
    pub fraction_zwitterion: f64,
    /// Label.
    pub charge_state: ChargeState,
}

fn check_ph(ph: f64) -> Result<(), IonisationError> {
    if ph.is_finite() && (PH_RANGE.0..=PH_RANGE.1).contains(&ph) {
        Ok(())
    } else {
        Err(IonisationError::PhOutOfRange { value: ph })
    }
}

/// Fraction of an acid in the ionised (A⁻) form: 1 / (1 + 10^(pKa − pH)).
pub fn acid_fraction_ionised(pka: f64, ph: f64) -> f64 {
    1.0 / (1.0 + 10f64.powf(pka - ph))
}

/// Fraction of a base in the protonated (BH⁺) form: 1 / (1 + 10^(pH − pKa)).
pub fn base_fraction_protonated(pka: f64, ph: f64) -> f64 {
    1.0 / (1.0 + 10f64.powf(ph - pka))
}

/// log10 of the neutral fraction of one site, computed without underflow:
/// acid −log10(1 + 10^(pH − pKa)); base −log10(1 + 10^(pKa − pH)).
fn log10_neutral_site(kind: SiteKind, pka: f64, ph: f64) -> f64 {
    let x = match kind {
        SiteKind::Acid => ph - pka,
        _ => pka - ph,
    };
    // log10(1 + 10^x) = x + log10(1 + 10^-x) for large x.
    if x > 0.0 {
        -(x + (1.0 + 10f64.powf(-x)).log10())
    } else {
        -(1.0 + 10f64.powf(x)).log10()
    }
}

/// Per-site charged fractions; errors for bad pKa.
fn site_states(sites: &[IonisableSite], ph: f64) -> Result<Vec<SiteIonisation>, IonisationError> {
    check_ph(ph)?;
    let mut out = Vec::with_capacity(sites.len());
    for (index, s) in sites.iter().enumerate() {
        let (fraction_charged, sign) = match s.kind {
            SiteKind::PermanentCation => (1.0, 1.0),
            SiteKind::PermanentAnion => (1.0, -1.0),
            SiteKind::Acid | SiteKind::Base => {
                let pka = s.pka.ok_or(IonisationError::MissingPka { index })?;
                if !pka.is_finite() {
                    return Err(IonisationError::BadPka { index, value: pka });
                }
                if s.kind == SiteKind::Acid {
                    (acid_fraction_ionised(pka, ph), -1.0)
                } else {
                    (base_fraction_protonated(pka, ph), 1.0)
                }
            }
        };
        out.push(SiteIonisation {
            site: index,
            fraction_charged,
            mean_charge: sign * fraction_charged,
        });
    }
    Ok(out)
}

/// Mean net charge at `ph`: Σ(base protonated fractions) − Σ(acid ionised fractions) + permanent charges.
///
/// # Errors
/// [`IonisationError`] for a pH outside [`PH_RANGE`] or a site without a finite pKa.
pub fn mean_net_charge(sites: &[IonisableSite], ph: f64) -> Result<f64, IonisationError> {
    Ok(site_states(sites, ph)?.iter().map(|s| s.mean_charge).sum())
}

/// log10 of the fraction neutral: Σ over sites of log10(neutral fraction of the site);
/// −∞ when a permanent charge is present.
///
/// # Errors
/// As [`mean_net_charge`].
pub fn log10_fraction_neutral(sites: &[IonisableSite], ph: f64) -> Result<f64, IonisationError> {
    site_states(sites, ph)?;
    let mut total = 0.0;
    for s in sites {
        match (s.kind, s.pka) {
            (SiteKind::PermanentCation | SiteKind::PermanentAnion, _) => {
                return Ok(f64::NEG_INFINITY);
            }
            (kind, Some(pka)) => total += log10_neutral_site(kind, pka, ph),
            (_, None) => {}
        }
    }
    Ok(total)
}

/// Fraction neutral at `ph` (product of the sites' neutral fractions; 0 with a permanent charge).
///
/// # Errors
/// As [`mean_net_charge`].
pub fn fraction_neutral(sites: &[IonisableSite], ph: f64) -> Result<f64, IonisationError> {
    Ok(10f64.powf(log10_fraction_neutral(sites, ph)?))
}

/// Full profile at `ph`: per-site fractions, net-charge distribution (exact convolution of the
/// independent sites, O(n²)), mean charge, neutral and zwitterion fractions, and a label.
///
/// Label rule: permanent charge → `PermanentlyCharged`; otherwise the largest of the four
/// class probabilities P(neutral), P(cationic only), P(anionic only), P(zwitterionic), ties
/// resolved in that order.
///
/// # Errors
/// As [`mean_net_charge`].
///
/// # Examples
/// ```
/// use phasewise::property::ionisation::{profile, ChargeState};
/// use phasewise::structure::{adapter::parse_smiles, ionisable::detect_sites};
/// let g = parse_smiles("NCC(=O)O").unwrap().graph; // glycine
/// let p = profile(&detect_sites(&g).unwrap(), 7.0).unwrap();
/// assert_eq!(p.charge_state, ChargeState::Zwitterionic);
/// ```
pub fn profile(sites: &[IonisableSite], ph: f64) -> Result<IonisationProfile, IonisationError> {
    let states = site_states(sites, ph)?;
    // Distribution over net charge: start with the permanent offset, convolve each site.
    let offset: i32 = sites
        .iter()
        .map(|s| match s.kind {
            SiteKind::PermanentCation => 1,
            SiteKind::PermanentAnion => -1,
            _ => 0,
        })
        .sum();
    let n_acid = sites.iter().filter(|s| s.kind == SiteKind::Acid).count();
    let n_base = sites.iter().filter(|s| s.kind == SiteKind::Base).count();
    // Index k corresponds to charge (k - n_acid) + offset.
    let width = n_acid + n_base + 1;
    let mut dist = vec![0.0; width];
    dist[n_acid] = 1.0;
    let mut p_no_acid = 1.0;
    let mut p_no_base = 1.0;
    for (s, st) in sites.iter().zip(&states) {
        let f = st.fraction_charged;
        let step: isize = match s.kind {
            SiteKind::Acid => -1,
            SiteKind::Base => 1,
            _ => continue,
        };
        if s.kind == SiteKind::Acid {
            p_no_acid *= 1.0 - f;
        } else {
            p_no_base *= 1.0 - f;
        }
        let mut next = vec![0.0; width];
        for (k, &p) in dist.iter().enumerate() {
            if p == 0.0 {
                continue;
            }
            next[k] += p * (1.0 - f);
            let j = k as isize + step;
            if j >= 0 && (j as usize) < width {
                next[j as usize] += p * f;
            }
        }
        dist = next;
    }
    let charge_distribution: Vec<ChargeFraction> = dist
        .iter()
        .enumerate()
        .filter(|(_, p)| **p > 0.0)
        .map(|(k, &p)| ChargeFraction {
            charge: k as i32 - n_acid as i32 + offset,
            fraction: p,
        })
        .collect();
    let permanent = sites
        .iter()
        .any(|s| matches!(s.kind, SiteKind::PermanentCation | SiteKind::PermanentAnion));
    let fraction_neutral = if permanent {
        0.0
    } else {
        fraction_neutral(sites, ph)?
    };
    let p_neutral = p_no_acid * p_no_base;
    let p_cation = p_no_acid * (1.0 - p_no_base);
    let p_anion = (1.0 - p_no_acid) * p_no_base;
    let p_zwitter = (1.0 - p_no_acid) * (1.0 - p_no_base);
    let charge_state = if permanent {
        ChargeState::PermanentlyCharged
    } else {
        let options = [
            (ChargeState::Neutral, p_neutral),
            (ChargeState::Cationic, p_cation),
            (ChargeState::Anionic, p_anion),
            (ChargeState::Zwitterionic, p_zwitter),
        ];
        let mut best = options[0];
        for o in &options[1..] {
            if o.1 > best.1 {
                best = *o;
            }
        }
        best.0
    };
    Ok(IonisationProfile {
        ph,
        mean_net_charge: states.iter().map(|s| s.mean_charge).sum(),
        sites: states,
        charge_distribution,
        fraction_neutral,
        fraction_zwitterion: p_zwitter,
        charge_state,
    })
}

/// Every microspecies at `ph` under the independent-site approximation, sorted by falling
/// fraction (ties: lexicographic order of `charged`).
///
/// # Errors
/// [`IonisationError::TooManySites`] above [`MAX_MICROSTATE_SITES`] acid/base sites; otherwise
/// as [`mean_net_charge`].
pub fn microstates(sites: &[IonisableSite], ph: f64) -> Result<Vec<Microstate>, IonisationError> {
    let states = site_states(sites, ph)?;
    let variable: Vec<usize> = (0..sites.len())
        .filter(|&i| matches!(sites[i].kind, SiteKind::Acid | SiteKind::Base))
        .collect();
    if variable.len() > MAX_MICROSTATE_SITES {
        return Err(IonisationError::TooManySites {
            sites: variable.len(),
        });
    }
    let mut out = Vec::with_capacity(1 << variable.len());
    for mask in 0u32..(1u32 << variable.len()) {
        let mut charged: Vec<bool> = sites
            .iter()
            .map(|s| matches!(s.kind, SiteKind::PermanentCation | SiteKind::PermanentAnion))
            .collect();
        let mut fraction = 1.0;
        for (bit, &i) in variable.iter().enumerate() {
            let on = mask & (1 << bit) != 0;
            charged[i] = on;
            let f = states[i].fraction_charged;
            fraction *= if on { f } else { 1.0 - f };
        }
        let charge = sites
            .iter()
            .zip(&charged)
            .map(|(s, &c)| match (s.kind, c) {
                (SiteKind::Base | SiteKind::PermanentCation, true) => 1,
                (SiteKind::Acid | SiteKind::PermanentAnion, true) => -1,
                _ => 0,
            })
            .sum();
        out.push(Microstate {
            charged,
            charge,
            fraction,
        });
    }
    out.sort_by(|a, b| {
        b.fraction
            .total_cmp(&a.fraction)
            .then(a.charged.cmp(&b.charged))
    });
    Ok(out)
}

/// logD at `ph` under the pH-partition hypothesis: logP + log10(fraction neutral).
///
/// # Errors
/// [`IonisationError::NeverNeutral`] with a permanent charge (use [`log_d_with_ion_pair`]);
/// otherwise as [`mean_net_charge`], plus [`IonisationError::BadLogP`].
///
/// # Examples
/// ```
/// use phasewise::property::ionisation::log_d;
/// use phasewise::structure::{adapter::parse_smiles, ionisable::detect_sites};
/// let sites = detect_sites(&parse_smiles("CC(=O)O").unwrap().graph).unwrap();
/// // pH = pKa: logD = logP - log10 2.
/// let d = log_d(-0.17, &sites, 4.8).unwrap();
/// assert!((d - (-0.17 - 2f64.log10())).abs() < 1e-9);
/// ```
pub fn log_d(log_p: f64, sites: &[IonisableSite], ph: f64) -> Result<f64, IonisationError> {
    if !log_p.is_finite() {
        return Err(IonisationError::BadLogP { value: log_p });
    }
    let lf = log10_fraction_neutral(sites, ph)?;
    if lf == f64::NEG_INFINITY {
        return Err(IonisationError::NeverNeutral);
    }
    Ok(log_p + lf)
}

/// logD with an ion-pair floor: charged species partition with log P_ion = logP − `diff_log`:
/// logD = log10(f_n·10^logP + (1 − f_n)·10^(logP − diff_log)), computed in log space.
/// [`TYPICAL_ION_PAIR_DIFF_LOG`] is a typical `diff_log` (Avdeef 2003, from memory).
///
/// # Errors
/// [`IonisationError::BadIonPairDiff`] for a negative or non-finite difference; otherwise as [`log_d`]
/// (a permanent charge is allowed here).
pub fn log_d_with_ion_pair(
    log_p: f64,
    sites: &[IonisableSite],
    ph: f64,
    diff_log: f64,
) -> Result<f64, IonisationError> {
    if !log_p.is_finite() {
        return Err(IonisationError::BadLogP { value: log_p });
    }
    if !diff_log.is_finite() || diff_log < 0.0 {
        return Err(IonisationError::BadIonPairDiff { value: diff_log });
    }
    let lf = log10_fraction_neutral(sites, ph)?;
    let f_n = 10f64.powf(lf);
    // log10(f_n + (1 - f_n) 10^-diff), stable when f_n underflows.
    let ion = (1.0 - f_n).max(0.0) * 10f64.powf(-diff_log);
    let inner = if lf == f64::NEG_INFINITY {
        -diff_log
    } else {
        (f_n + ion).log10().max(lf)
    };
    Ok(log_p + inner)
}

/// How much less a charged microspecies partitions into the stationary phase than the neutral
/// one, in log units below logP (used by [`log_d_microspecies`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct IonPartition {
    /// Drop per unit of net charge of a net-charged microspecies (an ion pair with the
    /// buffer's counter-ion): a species of net charge z partitions with logP − `per_charge`·|z|.
    pub per_charge: f64,
    /// Drop for a zwitterion (charged sites whose charges cancel: net charge 0): it partitions
    /// as an inner salt, with logP − `zwitterion`, not as a doubly charged ion.
    pub zwitterion: f64,
}

/// The partition drops used for chromatographic decisions (mode fit, pH choice): 2.0 log units
/// per net charge, between the 1–1.5 log-unit drop in reversed-phase retention usually seen on
/// full ionisation with an ion-pairing acid modifier (Snyder, Kirkland & Dolan, "Introduction
/// to Modern Liquid Chromatography", Wiley 2010, ch. 7, from memory) and the 3–4 units of
/// octanol/water ([`TYPICAL_ION_PAIR_DIFF_LOG`]); 2.5 log units for a zwitterion (glycine:
/// Crippen logP of the neutral form about −1.0, measured logD about −3.2; norfloxacin: about
/// 1.3 against a measured logP near −1.0 at its isoelectric pH; from memory).
pub const CHROMATOGRAPHIC_PARTITION: IonPartition = IonPartition {
    per_charge: 2.0,
    zwitterion: 2.5,
};

/// Microspecies-aware logD at `ph`: every microspecies partitions, the neutral one with logP,
/// a zwitterion (net charge 0 with charged sites) with logP − `zwitterion`, and a species of
/// net charge z with logP − `per_charge`·|z|:
/// logD = logP + log10(f_neutral + f_zwitterion·10^−Δzw + Σ_{z≠0} f_z·10^(−Δ·|z|)).
/// The fractions come from the independent-site net-charge distribution ([`profile`]); the
/// zwitterion fraction is the net-zero fraction less the neutral one. Unlike [`log_d`], a
/// zwitterion at its isoelectric pH is not treated as a doubly charged salt, and a permanent
/// charge is allowed. Never above logP, never below [`log_d`].
///
/// # Errors
/// [`IonisationError::BadIonPairDiff`] for a negative or non-finite drop; otherwise as
/// [`mean_net_charge`], plus [`IonisationError::BadLogP`].
///
/// # Examples
/// ```
/// use phasewise::property::ionisation::{log_d, log_d_microspecies, CHROMATOGRAPHIC_PARTITION};
/// use phasewise::structure::{adapter::parse_smiles, ionisable::detect_sites};
/// let sites = detect_sites(&parse_smiles("NCC(=O)O").unwrap().graph).unwrap(); // glycine
/// // at pH 6 glycine is a zwitterion: the pH-partition value is far below logP - 2.5
/// let d = log_d_microspecies(-1.0, &sites, 6.0, &CHROMATOGRAPHIC_PARTITION).unwrap();
/// assert!((d - (-3.5)).abs() < 0.05);
/// assert!(log_d(-1.0, &sites, 6.0).unwrap() < d - 2.0);
/// ```
pub fn log_d_microspecies(
    log_p: f64,
    sites: &[IonisableSite],
    ph: f64,
    partition: &IonPartition,
) -> Result<f64, IonisationError> {
    if !log_p.is_finite() {
        return Err(IonisationError::BadLogP { value: log_p });
    }
    for d in [partition.per_charge, partition.zwitterion] {
        if !d.is_finite() || d < 0.0 {
            return Err(IonisationError::BadIonPairDiff { value: d });
        }
    }
    let prof = profile(sites, ph)?;
    let f_n = prof.fraction_neutral;
    let mut sum = f_n;
    for c in &prof.charge_distribution {
        if c.charge == 0 {
            sum += (c.fraction - f_n).max(0.0) * 10f64.powf(-partition.zwitterion);
        } else {
            sum += c.fraction * 10f64.powf(-partition.per_charge * f64::from(c.charge.abs()));
        }
    }
    // the neutral term alone is the pH-partition value: never go below it (rounding)
    let lf = log10_fraction_neutral(sites, ph)?;
    Ok(log_p + sum.log10().max(lf).min(0.0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::ionisable::{GroupClass, PkaSource};
    use proptest::prelude::*;

    /// Tolerance for closed-form identities (floating-point rounding only).
    const EPS: f64 = 1e-9;

    fn site(kind: SiteKind, pka: Option<f64>) -> IonisableSite {
        IonisableSite {
            class: match kind {
                SiteKind::Acid => GroupClass::CarboxylicAcid,
                SiteKind::Base => GroupClass::PrimaryAmine,
                _ => GroupClass::QuaternaryAmmonium,
            },
            kind,
            pka,
            spread_pka: 0.5,
            atoms: vec![0],
            ionised_in_input: false,
            pka_source: PkaSource::Experimental,
        }
    }

    #[test]
    fn monoprotic_closed_forms() {
        // Henderson–Hasselbalch (textbook): acid, logD = logP − log10(1 + 10^(pH − pKa)).
        let a = [site(SiteKind::Acid, Some(4.0))];
        let d = log_d(2.0, &a, 6.0).expect("valid");
        assert!((d - (2.0 - (1.0 + 100f64).log10())).abs() < EPS);
        let b = [site(SiteKind::Base, Some(9.0))];
        let d = log_d(2.0, &b, 7.0).expect("valid");
        assert!((d - (2.0 - (1.0 + 100f64).log10())).abs() < EPS);
    }

    #[test]
    fn glycine_is_zwitterionic_at_neutral_ph() {
        let s = [
            site(SiteKind::Acid, Some(2.35)),
            site(SiteKind::Base, Some(9.78)),
        ];
        let p = profile(&s, 7.0).expect("valid");
        assert_eq!(p.charge_state, ChargeState::Zwitterionic);
        assert!(p.mean_net_charge.abs() < 0.01);
        let total: f64 = p.charge_distribution.iter().map(|c| c.fraction).sum();
        assert!((total - 1.0).abs() < EPS);
        assert_eq!(
            profile(&s, 1.0).expect("valid").charge_state,
            ChargeState::Cationic
        );
        assert_eq!(
            profile(&s, 12.0).expect("valid").charge_state,
            ChargeState::Anionic
        );
    }

    #[test]
    fn microstates_sum_to_one_and_match_profile() {
        let s = [
            site(SiteKind::Acid, Some(2.35)),
            site(SiteKind::Base, Some(9.78)),
        ];
        let m = microstates(&s, 7.0).expect("valid");
        assert_eq!(m.len(), 4);
        let total: f64 = m.iter().map(|x| x.fraction).sum();
        assert!((total - 1.0).abs() < EPS);
        // Most abundant: both charged (zwitterion), net charge 0.
        assert_eq!(m[0].charged, vec![true, true]);
        assert_eq!(m[0].charge, 0);
        let many: Vec<_> = (0..13).map(|_| site(SiteKind::Acid, Some(4.0))).collect();
        assert!(matches!(
            microstates(&many, 7.0),
            Err(IonisationError::TooManySites { sites: 13 })
        ));
    }

    #[test]
    fn permanent_charge_needs_ion_pair_floor() {
        let s = [site(SiteKind::PermanentCation, None)];
        assert_eq!(log_d(1.0, &s, 7.0), Err(IonisationError::NeverNeutral));
        let d = log_d_with_ion_pair(1.0, &s, 7.0, 3.5).expect("valid");
        assert!((d - (1.0 - 3.5)).abs() < EPS);
        let p = profile(&s, 7.0).expect("valid");
        assert_eq!(p.charge_state, ChargeState::PermanentlyCharged);
        assert_eq!(
            p.charge_distribution,
            vec![ChargeFraction {
                charge: 1,
                fraction: 1.0
            }]
        );
    }

    #[test]
    fn bad_inputs_are_errors() {
        let s = [site(SiteKind::Acid, Some(4.0))];
        assert!(matches!(
            log_d(1.0, &s, f64::NAN),
            Err(IonisationError::PhOutOfRange { .. })
        ));
        assert!(matches!(
            log_d(1.0, &s, 20.0),
            Err(IonisationError::PhOutOfRange { .. })
        ));
        assert!(matches!(
            log_d(f64::INFINITY, &s, 7.0),
            Err(IonisationError::BadLogP { .. })
        ));
        let m = [site(SiteKind::Acid, None)];
        assert!(matches!(
            log_d(1.0, &m, 7.0),
            Err(IonisationError::MissingPka { .. })
        ));
        let n = [site(SiteKind::Acid, Some(f64::NAN))];
        assert!(matches!(
            log_d(1.0, &n, 7.0),
            Err(IonisationError::BadPka { .. })
        ));
        assert!(log_d_with_ion_pair(1.0, &s, 7.0, -1.0).is_err());
    }

    #[test]
    fn zwitterions_partition_as_inner_salts_not_as_doubly_charged_ions() {
        // glycine-like: acid 2.35, base 9.78 (textbook values, from memory)
        let s = [
            site(SiteKind::Acid, Some(2.35)),
            site(SiteKind::Base, Some(9.78)),
        ];
        let part = CHROMATOGRAPHIC_PARTITION;
        // at the isoelectric pH nearly all is zwitterion: logD = logP - 2.5
        let d = log_d_microspecies(-1.0, &s, 6.0, &part).expect("valid");
        assert!((d - (-1.0 - part.zwitterion)).abs() < 0.01, "{d}");
        // the pH-partition value treats it as if only the (tiny) neutral form partitioned
        assert!(log_d(-1.0, &s, 6.0).expect("valid") < -7.0);
        // at pH 0 the cation dominates: logP - 2.0 per charge
        let c = log_d_microspecies(-1.0, &s, 0.0, &part).expect("valid");
        assert!((c - (-1.0 - part.per_charge)).abs() < 0.05, "{c}");
        // a neutral analyte is unchanged; a single base at low pH drops by 2 per charge
        assert!((log_d_microspecies(3.0, &[], 7.0, &part).expect("valid") - 3.0).abs() < EPS);
        let b = [site(SiteKind::Base, Some(9.5))];
        let x = log_d_microspecies(3.0, &b, 2.0, &part).expect("valid");
        assert!((x - 1.0).abs() < 1e-5, "{x}");
        // a permanent cation is allowed (one charge), a betaine (permanent cation and ionised
        // acid) partitions as a zwitterion
        let q = [site(SiteKind::PermanentCation, None)];
        assert!((log_d_microspecies(1.0, &q, 7.0, &part).expect("valid") + 1.0).abs() < EPS);
        let betaine = [
            site(SiteKind::PermanentCation, None),
            site(SiteKind::Acid, Some(1.8)),
        ];
        let z = log_d_microspecies(1.0, &betaine, 7.0, &part).expect("valid");
        assert!((z - (1.0 - part.zwitterion)).abs() < 0.01, "{z}");
        assert!(
            log_d_microspecies(
                1.0,
                &q,
                7.0,
                &IonPartition {
                    per_charge: -1.0,
                    zwitterion: 2.5
                }
            )
            .is_err()
        );
    }

    proptest! {
        #[test]
        fn log_d_never_exceeds_log_p(
            log_p in -5.0f64..8.0,
            ph in -2.0f64..16.0,
            pkas in proptest::collection::vec((-2.0f64..16.0, any::<bool>()), 0..6),
        ) {
            let s: Vec<_> = pkas.iter().map(|&(p, acid)| site(if acid { SiteKind::Acid } else { SiteKind::Base }, Some(p))).collect();
            let d = log_d(log_p, &s, ph).expect("valid");
            prop_assert!(d <= log_p + EPS);
            let f = log_d_with_ion_pair(log_p, &s, ph, 3.5).expect("valid");
            prop_assert!(f <= log_p + EPS && f >= d - EPS && f >= log_p - 3.5 - EPS);
            let m = log_d_microspecies(log_p, &s, ph, &CHROMATOGRAPHIC_PARTITION).expect("valid");
            prop_assert!(m <= log_p + EPS && m >= d - EPS);
            // no species partitions worse than the most charged one could
            prop_assert!(m >= log_p - 2.0 * s.len().max(1) as f64 - 2.5 - EPS);
            let total: f64 = profile(&s, ph).expect("valid").charge_distribution.iter().map(|c| c.fraction).sum();
            prop_assert!((total - 1.0).abs() < 1e-9);
        }

        #[test]
        fn single_acid_decreases_and_base_increases_with_ph(
            log_p in -5.0f64..8.0,
            pka in -1.0f64..15.0,
            ph1 in -2.0f64..16.0,
            dph in 0.01f64..4.0,
        ) {
            let ph2 = (ph1 + dph).min(16.0);
            prop_assume!(ph2 > ph1);
            let a = [site(SiteKind::Acid, Some(pka))];
            let b = [site(SiteKind::Base, Some(pka))];
            prop_assert!(log_d(log_p, &a, ph2).expect("valid") <= log_d(log_p, &a, ph1).expect("valid"));
            prop_assert!(log_d(log_p, &b, ph2).expect("valid") >= log_d(log_p, &b, ph1).expect("valid"));
        }

        #[test]
        fn at_ph_equal_pka_log_d_is_log_p_minus_log2(log_p in -5.0f64..8.0, pka in -2.0f64..16.0, acid in any::<bool>()) {
            let s = [site(if acid { SiteKind::Acid } else { SiteKind::Base }, Some(pka))];
            let d = log_d(log_p, &s, pka).expect("valid");
            prop_assert!((d - (log_p - 2f64.log10())).abs() < EPS);
        }
    }
}
