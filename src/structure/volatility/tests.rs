//! Unit tests of the GC-suitability assessment.

use super::*;
use crate::structure::adapter::parse_smiles;

fn assess(smiles: &str) -> GcAssessment {
    assess_gc(&parse_smiles(smiles).expect("parses").graph, None).expect("valid graph")
}

fn issues(a: &GcAssessment) -> Vec<GcIssue> {
    a.flags.iter().map(|f| f.issue).collect()
}

#[test]
fn classes_by_band() {
    // Experimental Tb from memory (CRC Handbook-type values).
    assert_eq!(
        volatility_class(341.9).expect("valid"),
        VolatilityClass::VeryVolatile
    ); // n-hexane
    assert_eq!(
        volatility_class(454.9).expect("valid"),
        VolatilityClass::Volatile
    ); // phenol
    assert_eq!(
        volatility_class(560.0).expect("valid"),
        VolatilityClass::SemiVolatile
    ); // hexadecane
    assert_eq!(
        volatility_class(700.0).expect("valid"),
        VolatilityClass::NonVolatile
    );
    assert!(volatility_class(f64::NAN).is_err());
    assert!(volatility_class(-3.0).is_err());
}

#[test]
fn simple_solvents_are_suitable() {
    for smi in ["CCCCCC", "CCOC(C)=O", "Clc1ccccc1", "CC(C)=O"] {
        let a = assess(smi);
        assert_eq!(a.verdict, GcVerdict::Suitable, "{smi}: {a:?}");
    }
}

#[test]
fn acids_and_sugars_need_derivatisation() {
    // palmitic acid: too high-boiling to run free; octanoic acid (Tb about 512 K) runs as is
    // on acid-modified PEG since issue 15 (short-chain acid rule)
    let a = assess("CCCCCCCCCCCCCCCC(=O)O");
    assert_eq!(a.verdict, GcVerdict::SuitableAfterDerivatisation);
    assert!(issues(&a).contains(&GcIssue::CarboxylicAcid));
    assert_eq!(assess("CCCCCCCC(=O)O").verdict, GcVerdict::Suitable);
    let g = assess("OCC(O)CO");
    assert!(issues(&g).contains(&GcIssue::ManyHydroxyls));
    let z = assess("CC(N)C(=O)O");
    assert!(issues(&z).contains(&GcIssue::Zwitterion));
    assert_eq!(z.verdict, GcVerdict::SuitableAfterDerivatisation);
}

#[test]
fn charges_and_size_are_unsuitable() {
    assert_eq!(assess("C[N+](C)(C)CCO").verdict, GcVerdict::Unsuitable);
    // Erythromycin-size molecule (invented test of the mass rule: a C40 alkane chain with many ethers).
    let big = format!("C{}", "COC".repeat(15));
    let a = assess(&big);
    assert!(a.molar_mass_g_mol.unwrap_or(0.0) > 600.0);
    assert_eq!(a.verdict, GcVerdict::Unsuitable);
}

#[test]
fn experimental_tb_is_used() {
    let g = parse_smiles("CCO").expect("parses").graph;
    let a = assess_gc(&g, Some(351.4)).expect("valid");
    assert_eq!(a.tb_source, TbSource::Experimental);
    assert_eq!(a.volatility_class, Some(VolatilityClass::VeryVolatile));
    assert!(assess_gc(&g, Some(f64::NAN)).is_err());
}

/// The assessment from known sites and Joback sum (what `describe` uses) is the assessment
/// itself, on the 2,000 structures of the RDKit reference set (acids, bases, zwitterions,
/// salts, polyols, heavy and light molecules).
#[test]
fn assessment_from_known_sites_and_joback_sum_is_the_same() {
    use crate::structure::ionisable::detect_sites;
    use crate::structure::joback::{JobackOptions, joback_tb};
    let data = include_str!("../../../tests/data/rdkit_descriptors.tsv");
    let mut compared = 0;
    for line in data.lines().skip(1) {
        let Some(smiles) = line.split('\t').nth(1) else {
            continue;
        };
        let Ok(parsed) = parse_smiles(smiles) else {
            continue;
        };
        let g = &parsed.graph;
        let (Ok(sites), Ok(j)) = (detect_sites(g), joback_tb(g, JobackOptions::default())) else {
            continue;
        };
        let known = assess_gc_known(g, &sites, j.tb_joback_k);
        assert_eq!(known, assess_gc(g, None), "{smiles}");
        compared += 1;
    }
    assert!(compared > 1_400, "{compared}");
}
