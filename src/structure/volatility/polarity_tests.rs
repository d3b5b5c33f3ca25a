//! Polarity and derivatisation classes of the GC-suitability assessment (common practice, no
//! source, unless a test says otherwise).

use super::*;
use crate::structure::adapter::parse_smiles;

fn assess(smiles: &str) -> GcAssessment {
    assess_gc(&parse_smiles(smiles).expect("parses").graph, None).expect("valid graph")
}

fn has(a: &GcAssessment, issue: GcIssue) -> bool {
    a.flags.iter().any(|f| f.issue == issue)
}

// Expectations: common practice, no source (these classes are run by LC, or by GC only
// after derivatisation).
#[test]
fn nucleobases_sulfonamides_and_catechols_need_derivatisation() {
    for (smi, what) in [
        ("Nc1ncnc2[nH]cnc12", "adenine"),
        ("O=c1cc[nH]c(=O)[nH]1", "uracil"),
        ("Cc1cc(NS(=O)(=O)c2ccc(N)cc2)no1", "sulfamethoxazole"),
        ("NCCc1ccc(O)c(O)c1", "dopamine"),
        ("CN(C)C(=O)Nc1ccc(Cl)c(Cl)c1", "diuron (urea)"),
    ] {
        let a = assess(smi);
        assert_eq!(
            a.verdict,
            GcVerdict::SuitableAfterDerivatisation,
            "{what}: {a:?}"
        );
        assert!(
            a.flags
                .iter()
                .any(|f| f.severity == Severity::NeedsDerivatisation && f.derivatisation.is_some()),
            "{what}: a derivatisation is named"
        );
    }
    assert!(has(
        &assess("Cc1cc(NS(=O)(=O)c2ccc(N)cc2)no1"),
        GcIssue::Sulfonamide
    ));
    assert!(has(&assess("NCCc1ccc(O)c(O)c1"), GcIssue::Catechol));
    assert!(has(
        &assess("O=c1cc[nH]c(=O)[nH]1"),
        GcIssue::AromaticLactam
    ));
    assert!(has(&assess("Nc1ncnc2[nH]cnc12"), GcIssue::ManyHbondDonors));
}

#[test]
fn short_chain_acids_run_as_is_but_hydroxy_and_diacids_do_not() {
    // volatile fatty acids: GC on acid-modified PEG without derivatisation
    for smi in ["CC(=O)O", "CCCC(=O)O", "CC(C)C(=O)O"] {
        let a = assess(smi);
        assert_eq!(a.verdict, GcVerdict::Suitable, "{smi}: {a:?}");
        assert!(has(&a, GcIssue::CarboxylicAcid), "{smi}: still flagged");
    }
    for smi in ["CC(O)C(=O)O", "OC(=O)CCC(=O)O", "CCCCCCCCCCCCCCCC(=O)O"] {
        assert_eq!(
            assess(smi).verdict,
            GcVerdict::SuitableAfterDerivatisation,
            "{smi}"
        );
    }
}

/// Derivatisation adds mass: heavy polyols and polyamines stay out of GC even silylated,
/// while mono- and disaccharides, steroids and amino acids are run as silyl derivatives
/// (common practice, no source; structures from memory).
#[test]
fn heavy_polyols_and_polyamines_stay_unsuitable_after_derivatisation() {
    for (smi, what) in [
        // tobramycin, kanamycin-type aminoglycosides (10 donor atoms, 467-484 g/mol)
        (
            "NCC1OC(OC2C(N)CC(N)C(OC3OC(CO)C(O)C(N)C3O)C2O)C(N)CC1O",
            "tobramycin",
        ),
        (
            "NCC1OC(OC2C(N)CC(N)C(OC3OC(CO)C(O)C(N)C3O)C2O)C(O)C(O)C1O",
            "kanamycin A",
        ),
        // a trisaccharide (raffinose-like: 11 OH, 504 g/mol)
        (
            "OCC1OC(OCC2OC(OC3(CO)OC(CO)C(O)C3O)C(O)C(O)C2O)C(O)C(O)C1O",
            "raffinose",
        ),
    ] {
        let a = assess(smi);
        assert_eq!(a.verdict, GcVerdict::Unsuitable, "{what}: {a:?}");
        assert!(
            a.flags.iter().any(|f| f.issue == GcIssue::HighMolarMass
                && f.reason.contains("even after derivatisation")),
            "{what}: {a:?}"
        );
    }
    for (smi, what) in [
        ("OCC1OC(O)C(O)C(O)C1O", "glucose"),
        (
            "OCC1OC(OC2(CO)OC(CO)C(O)C2O)C(O)C(O)C1O",
            "sucrose (8 OH, about 920 g/mol silylated)",
        ),
        (
            "CC(C)CCCC(C)C1CCC2C3CC=C4CC(O)CCC4(C)C3CCC12C",
            "cholesterol",
        ),
        ("NC(Cc1ccccc1)C(=O)O", "phenylalanine"),
    ] {
        let v = assess(smi).verdict;
        assert!(
            matches!(
                v,
                GcVerdict::Suitable | GcVerdict::SuitableAfterDerivatisation
            ),
            "{what}: {v:?}"
        );
    }
}

#[test]
fn a_missing_boiling_point_is_unknown_never_suitable() {
    // Joback has no silicon group: no boiling point can be estimated
    let a = assess("C[Si](C)(C)C");
    assert!(a.tb_k.is_none());
    assert_eq!(a.verdict, GcVerdict::Unknown);
    assert_eq!(a.verdict.label(), "unknown (no boiling point)");
}

#[test]
fn high_boiling_neutrals_are_a_caution_not_a_verdict() {
    // a hexachlorobiphenyl (Tb about 650-700 K) is routine GC on a thin film
    let a = assess("Clc1ccc(c(Cl)c1Cl)-c1cc(Cl)c(Cl)cc1Cl");
    assert_eq!(a.verdict, GcVerdict::Suitable, "{a:?}");
}

#[test]
fn every_derivatisation_states_its_cost() {
    for d in [
        Derivatisation::Silylation,
        Derivatisation::Esterification,
        Derivatisation::Acylation,
        Derivatisation::EsterificationAndAcylation,
    ] {
        assert!(d.describe().contains("min") || d.describe().contains(" h "));
    }
}
