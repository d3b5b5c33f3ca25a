//! Inputs of the structure-only learner (a residual model on top of the ridge's `psi_k1`,
//! docs/model.md "Structure-only learner"): which analyte and system quantities it may see, and
//! which of them it must treat monotonically.
//!
//! Physics by construction:
//! - pH enters **only** through ionisation: the charge at the eluent pH, its absolute value, the
//!   ionised fraction and logD at the eluent pH. For an analyte without ionisable sites all four
//!   are constant (0, 0, 0, logP), so no learner on these inputs can move a neutral analyte
//!   with pH. The eluent pH itself, its missing flag and the additive are not inputs.
//! - Chain length enters only through quantities that grow with every CH2 (`MONOTONE_NAMES`:
//!   alkyl-carbon count, logP, logD, McGowan volume, molar refractivity, log10 molar mass); every
//!   other input is unchanged by lengthening an alkyl chain (the fingerprint treats alkyl
//!   carbons as opaque, `model::fingerprint`; polar surface, H-bond counts, rings, heteroatoms
//!   and charges do not change). A learner that is non-decreasing in the monotone inputs (RP)
//!   therefore never lowers retention when a CH2 is added.

use super::features::{AnalyteFeatures, ion_term_at};
use super::fingerprint::FP_BITS;
use super::system::{ChemClass, LcSystem, Mode, Modifier};

/// Inputs on which the RP learner is constrained non-decreasing (each grows with one more CH2
/// in an alkyl chain).
pub const MONOTONE_NAMES: [&str; 6] = [
    "n_alkyl_c",
    "logp",
    "logd_at_ph",
    "mcgowan_volume",
    "molar_refractivity",
    "log10_mw",
];

/// Analyte inputs that lengthening an alkyl chain leaves unchanged (descriptor names of
/// `PhasewiseDescriptors`).
pub const INVARIANT_NAMES: [&str; 16] = [
    "tpsa_a2",
    "hbond_donors",
    "hbond_acceptors",
    "aromatic_rings",
    "n_n",
    "n_o",
    "n_s",
    "n_halogen",
    "n_aromatic_atoms",
    "n_rings",
    "n_carbonyl_like",
    "n_polar_h",
    "n_p",
    "n_acid_sites",
    "n_base_sites",
    "n_permanent_charges",
];

/// Inputs evaluated at the eluent pH through the analyte's ionisable sites.
pub const IONISATION_NAMES: [&str; 3] =
    ["charge_at_ph", "abs_charge_at_ph", "ionised_fraction_at_ph"];

/// System inputs (neither pH nor additive): chemistry class, modifier, temperature and
/// gradient shape.
pub const SYSTEM_NAMES: [&str; 14] = [
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
    "temp_minus_35_per_10",
    "log10_steepness",
    "start_strong_fraction",
];

/// Number of learner inputs: monotone, invariant, ionisation, system, then `FP_BITS`
/// fingerprint bins.
pub const N_INPUTS: usize = MONOTONE_NAMES.len()
    + INVARIANT_NAMES.len()
    + IONISATION_NAMES.len()
    + SYSTEM_NAMES.len()
    + FP_BITS;

/// Indices (into the input vector) of the monotone inputs.
pub fn monotone_indices() -> std::ops::Range<usize> {
    0..MONOTONE_NAMES.len()
}

fn descriptor(f: &AnalyteFeatures, name: &str) -> f64 {
    f.descriptors.get(name).copied().unwrap_or(f64::NAN)
}

/// Neutral fraction of the acid and of the base sites at `ph`, recovered from the model's
/// ionisation terms with the larger ionised-form penalty (`ion_*_d25` = log10(f + (1 - f)·c),
/// c = 10^-2.5; exact for one site of each kind, an approximation for several).
fn neutral_fractions(f: &AnalyteFeatures, ph: f64) -> (f64, f64) {
    let c = 10f64.powf(-2.5);
    let frac = |name: &str| {
        let t = ion_term_at(f, name, ph).unwrap_or(0.0);
        ((10f64.powf(t) - c) / (1.0 - c)).clamp(0.0, 1.0)
    };
    (frac("ion_acid_d25"), frac("ion_base_d25"))
}

/// Mean charge at `ph` from the neutral fractions of the acid and base sites.
fn charge_at(f: &AnalyteFeatures, ph: f64) -> f64 {
    let (fa, fb) = neutral_fractions(f, ph);
    (1.0 - fb) - (1.0 - fa)
}

/// log10 of the neutral fraction at `ph` (acid and base sites independent), floored at -5.
fn log10_fraction_neutral_at(f: &AnalyteFeatures, ph: f64) -> Option<f64> {
    let (fa, fb) = neutral_fractions(f, ph);
    Some((fa * fb).max(1e-5).log10())
}

/// The eluent pH the ridge uses: stated, else the additive's typical pH.
pub fn eluent_ph(sys: &LcSystem) -> f64 {
    sys.ph.unwrap_or_else(|| sys.additive.typical_ph())
}

/// The learner's input vector for one analyte on one system. `fingerprint` and `n_alkyl_c` come
/// from `fingerprint::alkyl_opaque_fingerprint`. Missing descriptors are NaN (the learner
/// treats them as missing).
pub fn learner_inputs(
    f: &AnalyteFeatures,
    fingerprint: &[f64],
    n_alkyl_c: usize,
    sys: &LcSystem,
) -> Vec<f64> {
    let ph = eluent_ph(sys);
    let logp = descriptor(f, "logp");
    let lfn = log10_fraction_neutral_at(f, ph).unwrap_or(0.0);
    let mut x = Vec::with_capacity(N_INPUTS);
    x.push(n_alkyl_c as f64);
    x.push(logp);
    x.push(logp + lfn);
    x.push(descriptor(f, "mcgowan_volume"));
    x.push(descriptor(f, "molar_refractivity"));
    x.push(descriptor(f, "mw_g_mol").max(1.0).log10());
    for n in INVARIANT_NAMES {
        x.push(descriptor(f, n));
    }
    let q = charge_at(f, ph);
    x.push(q);
    x.push(q.abs());
    x.push(1.0 - 10f64.powf(lfn));
    let class = |c: ChemClass| f64::from(u8::from(sys.chem_class == c));
    x.extend([
        class(ChemClass::C8),
        class(ChemClass::Cyano),
        class(ChemClass::Phenyl),
        class(ChemClass::Pentafluorophenyl),
        class(ChemClass::PorousGraphiticCarbon),
        class(ChemClass::BareSilica),
        class(ChemClass::Amide),
        class(ChemClass::Zwitterionic),
        class(ChemClass::Unknown),
        f64::from(u8::from(sys.modifier == Modifier::Methanol)),
        f64::from(u8::from(sys.modifier == Modifier::Other)),
        (sys.temperature_c.unwrap_or(35.0) - 35.0) / 10.0,
        (sys.steepness().max(1e-4)).log10() + 2.0,
        sys.gradient
            .first()
            .map_or(0.0, |p| sys.mode.strong_fraction(p.organic_pct)),
    ]);
    x.extend_from_slice(fingerprint);
    x
}

/// True for RP: the mode whose learner is constrained non-decreasing in `MONOTONE_NAMES`.
pub fn constrained(mode: Mode) -> bool {
    mode == Mode::ReversedPhase
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::fingerprint::fingerprint_smiles;
    use crate::model::system::{Additive, GradientPoint};

    fn sys(mode: Mode, ph: f64) -> LcSystem {
        LcSystem {
            mode,
            chem_class: ChemClass::C18,
            modifier: Modifier::Acetonitrile,
            ph: Some(ph),
            additive: Additive::FormicAcid,
            gradient: vec![
                GradientPoint {
                    time_min: 0.0,
                    organic_pct: 5.0,
                },
                GradientPoint {
                    time_min: 20.0,
                    organic_pct: 95.0,
                },
            ],
            t0_min: 1.0,
            dwell_min: 0.0,
            flow_ml_min: 0.4,
            temperature_c: Some(35.0),
        }
    }

    fn inputs(smiles: &str, s: &LcSystem) -> Vec<f64> {
        let f = AnalyteFeatures::from_smiles(smiles, None).unwrap();
        let (fp, n) = fingerprint_smiles(smiles).unwrap();
        learner_inputs(&f, &fp, n, s)
    }

    fn sites(smiles: &str) -> f64 {
        let f = AnalyteFeatures::from_smiles(smiles, None).unwrap();
        ["n_acid_sites", "n_base_sites", "n_permanent_charges"]
            .iter()
            .map(|k| f.descriptors[*k])
            .sum()
    }

    /// Head groups with no ionisable site, the chain is appended at the end of the SMILES
    /// (alkylbenzenes, alkylnaphthalenes, nitriles, esters, ketones, ethers, haloarenes,
    /// amides; common practice, no source).
    const NEUTRAL_HEADS: [&str; 9] = [
        "c1ccccc1",
        "c1ccc2ccccc2c1",
        "N#C",
        "COC(=O)",
        "CC(=O)",
        "COc1ccc(cc1)",
        "Clc1ccc(cc1)",
        "O=C(Oc1ccccc1)",
        "NC(=O)c1ccccc1",
    ];
    /// Head groups with acidic or basic sites (alkanoic and alkylbenzoic acids, tertiary
    /// amines, alkylanilines, alkylpyridines).
    const IONISABLE_HEADS: [&str; 5] = [
        "OC(=O)",
        "OC(=O)c1ccc(cc1)",
        "CN(C)",
        "Nc1ccc(cc1)",
        "c1ccncc1",
    ];

    #[test]
    fn input_count_matches_the_names() {
        let x = inputs("CCO", &sys(Mode::ReversedPhase, 3.0));
        assert_eq!(x.len(), N_INPUTS);
        assert!(x[..N_INPUTS - FP_BITS].iter().all(|v| v.is_finite()));
    }

    #[test]
    fn neutral_heads_have_no_sites_and_ionisable_heads_do() {
        for h in NEUTRAL_HEADS {
            assert_eq!(sites(&format!("{h}CC")), 0.0, "{h}");
        }
        for h in IONISABLE_HEADS {
            assert!(sites(&format!("{h}CC")) > 0.0, "{h}");
        }
    }

    #[test]
    fn charges_follow_the_eluent_ph() {
        // benzoic acid (pKa about 4.2) and triethylamine (pKa about 10.7); from memory
        let q = |s: &str, ph: f64| {
            inputs(s, &sys(Mode::ReversedPhase, ph))[MONOTONE_NAMES.len() + INVARIANT_NAMES.len()]
        };
        assert!(q("OC(=O)c1ccccc1", 7.0) < q("OC(=O)c1ccccc1", 3.0) - 0.5);
        assert!(q("CCN(CC)CC", 3.0) > q("CCN(CC)CC", 11.5) + 0.5);
    }

    proptest::proptest! {
        /// A neutral analyte's learner inputs do not depend on the eluent pH at all.
        #[test]
        fn neutral_inputs_do_not_depend_on_ph(
            head in 0..NEUTRAL_HEADS.len(),
            chain in 1usize..8,
            ph_a in 1.5f64..11.0,
            ph_b in 1.5f64..11.0,
            hilic in proptest::bool::ANY,
        ) {
            let smiles = format!("{}{}", NEUTRAL_HEADS[head], "C".repeat(chain));
            let mode = if hilic { Mode::Hilic } else { Mode::ReversedPhase };
            proptest::prop_assert_eq!(inputs(&smiles, &sys(mode, ph_a)), inputs(&smiles, &sys(mode, ph_b)));
        }

        /// One more CH2 in an alkyl chain: every monotone input grows or stays, the alkyl count
        /// grows by one, and every other input is unchanged, at any pH.
        #[test]
        fn one_more_ch2_moves_only_monotone_inputs_upwards(
            head in 0..(NEUTRAL_HEADS.len() + IONISABLE_HEADS.len()),
            chain in 1usize..9,
            ph in 1.5f64..11.0,
        ) {
            let head = NEUTRAL_HEADS.iter().chain(IONISABLE_HEADS.iter()).nth(head).copied().unwrap_or("c1ccccc1");
            let s = sys(Mode::ReversedPhase, ph);
            let a = inputs(&format!("{head}{}", "C".repeat(chain)), &s);
            let b = inputs(&format!("{head}{}", "C".repeat(chain + 1)), &s);
            proptest::prop_assert_eq!(b[0], a[0] + 1.0);
            for j in monotone_indices() {
                proptest::prop_assert!(b[j] >= a[j], "{} fell: {} -> {}", MONOTONE_NAMES[j], a[j], b[j]);
            }
            proptest::prop_assert_eq!(&a[MONOTONE_NAMES.len()..], &b[MONOTONE_NAMES.len()..]);
        }
    }
}
