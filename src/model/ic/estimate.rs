//! A rough structure estimate of ion-exchange retention for ions that are not in the ion table
//! (organic anions such as haloacetates, sulfonates and di- and tricarboxylates; protonated
//! amines), so that an ionic panel is not left without conditions because its ions are
//! organic.
//!
//! Model (rough; the coefficients are from memory of typical elution orders, no source; the
//! interval is wide to match): ion exchange selects first by charge and then by polarisability
//! and hydrophobic contact with the resin, and loses retention to hydration:
//!
//! `ln r = ln r1 + (z − 1) ln(r2 / r1) + Σ halogen terms + c·(carbons beyond the anchor)
//!  + a·aromatic rings + s·sulfonate heads − h·neutral hydroxyls`,
//!
//! where `r` is the retention-factor ratio to the ion table's reference ion, `z` the charge
//! magnitude at the eluent's pH (from the ionisable sites' pKa values), and `r1`, `r2` the ion
//! table's own small monovalent and divalent organic anchors (acetate and oxalate for anions,
//! methylammonium and magnesium for cations), read from the table so that the estimate and the
//! table agree. The concentration dependence is the table's ion-exchange slope.

use crate::phase::{Catalogue, IcExchanger, PhaseError};
use crate::structure::graph::{BondOrder, MolGraph};
use crate::structure::ionisable::{IonisableSite, SiteKind};

/// pH of the eluents the estimate is made at (common practice, from memory): about 25 mM
/// hydroxide (pH ≈ 12.4), 3.5 mM carbonate with 1 mM bicarbonate (pH ≈ 10.5) and 20 mM
/// methanesulfonic acid (pH ≈ 1.7).
pub fn eluent_ph(exchanger: IcExchanger) -> f64 {
    match exchanger {
        IcExchanger::AnionHydroxide => 12.4,
        IcExchanger::AnionCarbonate => 10.5,
        IcExchanger::CationCarboxylate | IcExchanger::CationPhosphonate => 1.7,
        IcExchanger::ExclusionSulfonate => 2.0,
    }
}

/// Smallest charge magnitude (at the eluent's pH) for which an ion is estimated: below it the
/// analyte is mostly neutral and passes near the void of an ion exchanger.
pub const MIN_CHARGE: f64 = 0.5;

/// 1-sigma of ln r for the structure estimate (rough, no source: about a factor 1.6, so the
/// 95 % interval spans a factor of about 2.4 either way).
pub const SIGMA_LN_ESTIMATE: f64 = 0.45;

/// The structure features the estimate uses.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct IonFeatures {
    /// Charge magnitude of the ion's sign at the eluent pH (sum of ionised fractions).
    pub charge: f64,
    /// Fluorine, chlorine, bromine and iodine atoms.
    pub halogens: [u32; 4],
    /// Carbon atoms.
    pub carbons: u32,
    /// Aromatic rings.
    pub aromatic_rings: u32,
    /// Sulfonic or sulfuric acid heads.
    pub sulfonates: u32,
    /// Hydroxyl groups that are not part of an acid (alcohols).
    pub hydroxyls: u32,
}

/// The charge an ion carries at `ph` for one panel: anions count ionised acids and permanent
/// anions, minus protonated bases; cations the reverse.
pub fn charge_at(sites: &[IonisableSite], ph: f64, anion: bool) -> f64 {
    let mut neg = 0.0;
    let mut pos = 0.0;
    for s in sites {
        match (s.kind, s.pka) {
            (SiteKind::Acid, Some(k)) => neg += 1.0 / (1.0 + 10f64.powf(k - ph)),
            (SiteKind::Base, Some(k)) => pos += 1.0 / (1.0 + 10f64.powf(ph - k)),
            (SiteKind::PermanentAnion, _) => neg += 1.0,
            (SiteKind::PermanentCation, _) => pos += 1.0,
            _ => {}
        }
    }
    if anion { neg - pos } else { pos - neg }
}

/// The structure features of an ion at the eluent pH of `exchanger`.
pub fn ion_features(
    graph: &MolGraph,
    sites: &[IonisableSite],
    exchanger: IcExchanger,
) -> IonFeatures {
    let anion = matches!(
        exchanger,
        IcExchanger::AnionHydroxide | IcExchanger::AnionCarbonate
    );
    let mut f = IonFeatures {
        charge: charge_at(sites, eluent_ph(exchanger), anion),
        ..IonFeatures::default()
    };
    for (i, a) in graph.atoms.iter().enumerate() {
        match a.atomic_number {
            6 => f.carbons += 1,
            9 => f.halogens[0] += 1,
            17 => f.halogens[1] += 1,
            35 => f.halogens[2] += 1,
            53 => f.halogens[3] += 1,
            8 if a.hydrogens == 1 && a.formal_charge == 0 => {
                // an alcohol: O-H on an sp3 carbon without a double-bonded oxygen beside it
                let carbon = graph.neighbours[i]
                    .iter()
                    .find(|&&(n, _)| graph.atoms[n].atomic_number == 6)
                    .map(|&(n, _)| n);
                let acid_like = carbon.is_none_or(|c| {
                    graph.atoms[c].aromatic
                        || graph.neighbours[c]
                            .iter()
                            .any(|&(_, b)| graph.bonds[b].order != BondOrder::Single)
                });
                if !acid_like {
                    f.hydroxyls += 1;
                }
            }
            16 => {
                let oxygens = graph.neighbours[i]
                    .iter()
                    .filter(|&&(n, _)| graph.atoms[n].atomic_number == 8)
                    .count();
                if oxygens >= 3 {
                    f.sulfonates += 1;
                }
            }
            _ => {}
        }
    }
    f.aromatic_rings = graph
        .rings
        .iter()
        .filter(|r| r.iter().all(|&i| graph.atoms[i].aromatic))
        .count() as u32;
    f
}

/// Per-atom halogen terms of ln r (F, Cl, Br, I): polarisable halogens raise anion-exchange
/// retention strongly (rough, from memory of haloacetate orders, no source).
const HALOGEN_LN: [f64; 4] = [0.15, 0.70, 0.95, 1.40];
/// Per carbon beyond the anchor (rough, no source).
const CARBON_LN: f64 = 0.12;
/// Per aromatic ring (π contact with the resin; rough, no source).
const AROMATIC_LN: f64 = 0.90;
/// A sulfonate head is retained more than a carboxylate of the same size (rough, no source).
const SULFONATE_LN: f64 = 0.60;
/// Per neutral hydroxyl (hydration; rough, no source).
const HYDROXYL_LN: f64 = 0.25;

/// The estimate: relative retention to the table's reference ion and its 1-sigma of ln r, or
/// `None` when the ion carries less than [`MIN_CHARGE`] at the eluent pH.
///
/// # Errors
/// When an anchor ion is missing from the catalogue.
pub fn estimate_relative_retention(
    catalogue: &Catalogue,
    exchanger: IcExchanger,
    features: &IonFeatures,
) -> Result<Option<f64>, PhaseError> {
    let anion = matches!(
        exchanger,
        IcExchanger::AnionHydroxide | IcExchanger::AnionCarbonate
    );
    if features.charge < MIN_CHARGE {
        return Ok(None);
    }
    let (one, two, anchor_carbons) = if anion {
        ("acetate", "oxalate", 2.0)
    } else {
        ("methylammonium", "magnesium", 1.0)
    };
    let value = |id: &str| -> Result<Option<f64>, PhaseError> {
        let ion = catalogue.ic_ion(id)?;
        Ok(match exchanger {
            IcExchanger::AnionHydroxide => ion.rr_hydroxide(),
            IcExchanger::AnionCarbonate => ion.rr_carbonate(),
            IcExchanger::CationCarboxylate | IcExchanger::CationPhosphonate => ion.rr_carboxylate(),
            IcExchanger::ExclusionSulfonate => None,
        })
    };
    let (Some(r1), Some(r2)) = (value(one)?, value(two)?) else {
        return Ok(None);
    };
    let h = &features.halogens;
    let halogen: f64 = (0..4).map(|i| HALOGEN_LN[i] * f64::from(h[i])).sum();
    let ln_r = r1.ln()
        + (features.charge - 1.0) * (r2 / r1).ln()
        + halogen
        + CARBON_LN * (f64::from(features.carbons) - anchor_carbons).max(0.0)
        + AROMATIC_LN * f64::from(features.aromatic_rings)
        + if anion {
            SULFONATE_LN * f64::from(features.sulfonates)
        } else {
            0.0
        }
        - HYDROXYL_LN * f64::from(features.hydroxyls);
    Ok(Some(ln_r.exp()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;
    use crate::structure::ionisable::detect_sites;

    fn rr(exchanger: IcExchanger, smiles: &str) -> Option<f64> {
        let g = parse_smiles(smiles).unwrap().graph;
        let sites = detect_sites(&g).unwrap();
        let f = ion_features(&g, &sites, exchanger);
        estimate_relative_retention(Catalogue::builtin().unwrap(), exchanger, &f).unwrap()
    }

    // Expectations: typical anion-exchange orders, from memory (rough); directions only.
    #[test]
    fn more_halogens_and_heavier_halogens_retain_haloacetates_longer() {
        for ex in [IcExchanger::AnionHydroxide, IcExchanger::AnionCarbonate] {
            let mca = rr(ex, "OC(=O)CCl").unwrap();
            let dca = rr(ex, "OC(=O)C(Cl)Cl").unwrap();
            let tca = rr(ex, "OC(=O)C(Cl)(Cl)Cl").unwrap();
            let mba = rr(ex, "OC(=O)CBr").unwrap();
            let acetate = rr(ex, "CC(=O)O").unwrap();
            assert!(acetate < mca && mca < dca && dca < tca, "{ex:?}");
            assert!(mca < mba, "{ex:?}");
        }
    }

    #[test]
    fn charge_dominates_and_neutral_analytes_are_not_estimated() {
        let ex = IcExchanger::AnionHydroxide;
        let propanoate = rr(ex, "CCC(=O)O").unwrap();
        let succinate = rr(ex, "OC(=O)CCC(=O)O").unwrap();
        let citrate = rr(ex, "OC(=O)CC(O)(CC(=O)O)C(=O)O").unwrap();
        assert!(propanoate < succinate && succinate < citrate);
        assert!(succinate / propanoate > 4.0);
        // toluene, and an amine at hydroxide pH, carry no anion charge
        assert_eq!(rr(ex, "Cc1ccccc1"), None);
        assert_eq!(rr(ex, "CCCCN"), None);
        // a sulfonate beats a carboxylate of the same carbon count
        assert!(rr(ex, "CS(=O)(=O)O").unwrap() > rr(ex, "CC(=O)O").unwrap());
    }

    #[test]
    fn protonated_amines_are_estimated_on_cation_exchangers_and_diamines_retained_longer() {
        let ex = IcExchanger::CationCarboxylate;
        let butylamine = rr(ex, "CCCCN").unwrap();
        let putrescine = rr(ex, "NCCCCN").unwrap();
        let ethanolamine = rr(ex, "NCCO").unwrap();
        let ethylamine = rr(ex, "CCN").unwrap();
        assert!(putrescine > 2.0 * butylamine);
        assert!(ethanolamine < ethylamine);
        // carboxylic acids are neutral at the eluent pH
        assert_eq!(rr(ex, "CC(=O)O"), None);
    }

    #[test]
    fn charge_follows_ionisation_on_each_side() {
        let g = parse_smiles("OC(=O)CC(=O)O").unwrap().graph;
        let s = detect_sites(&g).unwrap();
        assert!((charge_at(&s, 12.4, true) - 2.0).abs() < 0.05);
        assert!(charge_at(&s, 1.7, true) < 0.2);
        let g = parse_smiles("NCCCCN").unwrap().graph;
        let s = detect_sites(&g).unwrap();
        assert!((charge_at(&s, 1.7, false) - 2.0).abs() < 0.05);
        assert!(charge_at(&s, 12.4, false) < 0.6);
    }
}
