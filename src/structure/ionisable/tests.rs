use super::*;
use crate::structure::adapter::parse_smiles;

fn sites(smiles: &str) -> Vec<IonisableSite> {
    let g = parse_smiles(smiles).expect("test SMILES parses").graph;
    detect_sites(&g).expect("valid graph")
}

fn classes(smiles: &str) -> Vec<GroupClass> {
    sites(smiles).iter().map(|s| s.class).collect()
}

fn only(smiles: &str) -> IonisableSite {
    let s = sites(smiles);
    assert_eq!(s.len(), 1, "{smiles}: {s:?}");
    s[0].clone()
}

// Reference values in these tests: CRC Handbook-type parent pKa values, from memory.
#[test]
fn acids_are_detected_with_class_values() {
    assert_eq!(only("CC(=O)O").class, GroupClass::CarboxylicAcid);
    assert_eq!(only("OC(=O)c1ccccc1").pka, Some(4.2));
    assert_eq!(only("CS(=O)(=O)O").class, GroupClass::SulfonicAcid);
    assert_eq!(only("Oc1ccccc1").pka, Some(10.0));
    assert_eq!(only("CCS").class, GroupClass::Thiol);
    assert_eq!(only("Cc1nnn[nH]1").class, GroupClass::Tetrazole);
    assert_eq!(only("O=C1CCC(=O)N1").class, GroupClass::Imide);
    assert_eq!(
        only("CC(=O)NS(=O)(=O)c1ccccc1").class,
        GroupClass::AcylSulfonamide
    );
    assert_eq!(only("NS(=O)(=O)c1ccccc1").class, GroupClass::Sulfonamide);
    assert_eq!(
        classes("CP(=O)(O)O"),
        vec![
            GroupClass::PhosphorusAcidFirst,
            GroupClass::PhosphorusAcidSecond
        ]
    );
}

#[test]
fn pre_ionised_forms_are_the_same_site() {
    let neutral = only("CC(=O)O");
    let ionised = only("CC(=O)[O-]");
    assert_eq!(neutral.class, ionised.class);
    assert_eq!(neutral.pka, ionised.pka);
    assert!(ionised.ionised_in_input && !neutral.ionised_in_input);
    assert_eq!(only("CC[NH3+]").class, GroupClass::PrimaryAmine);
    assert_eq!(only("c1cc[nH+]cc1").class, GroupClass::PyridineNitrogen);
}

#[test]
fn amines_but_not_amides() {
    assert_eq!(only("CCN").pka, Some(10.6));
    assert_eq!(only("CCNCC").class, GroupClass::SecondaryAmine);
    assert_eq!(only("CCN(CC)CC").class, GroupClass::TertiaryAmine);
    assert!(sites("CC(=O)N").is_empty(), "acetamide is not basic");
    assert!(sites("CC(=O)NC").is_empty());
    assert_eq!(only("Nc1ccccc1").class, GroupClass::Aniline);
    assert_eq!(only("Nc1ccccc1").pka, Some(4.6));
    // Morpholine 8.4 (from memory): two beta-O paths.
    let m = only("C1COCCN1");
    assert!((m.pka.unwrap_or(0.0) - 8.4).abs() < 0.3, "{m:?}");
}

#[test]
fn amidines_guanidines_azines() {
    assert_eq!(only("CC(=N)N").class, GroupClass::Amidine);
    assert_eq!(only("NC(=N)N").class, GroupClass::Guanidine);
    assert_eq!(only("c1ccncc1").pka, Some(5.2));
    assert_eq!(only("c1c[nH]cn1").class, GroupClass::ImidazoleNitrogen);
    assert_eq!(
        only("c1ccc2[nH]cnc2c1").class,
        GroupClass::BenzimidazoleNitrogen
    );
    assert_eq!(only("c1cncnc1").class, GroupClass::DiazineNitrogen);
    assert!(sites("c1cc[nH]c1").is_empty(), "pyrrole is not basic");
    // 4-Aminopyridine 9.2 (from memory).
    let p = only("Nc1ccncc1");
    assert!((p.pka.unwrap_or(0.0) - 9.2).abs() < 0.5, "{p:?}");
}

#[test]
fn hammett_corrections_move_the_right_way() {
    // 4-Nitrophenol 7.15 (from memory).
    let p = only("Oc1ccc(cc1)[N+](=O)[O-]");
    assert!((p.pka.unwrap_or(0.0) - 7.15).abs() < 0.3, "{p:?}");
    // 4-Nitrobenzoic acid 3.44.
    let b = only("OC(=O)c1ccc(cc1)[N+](=O)[O-]");
    assert!((b.pka.unwrap_or(0.0) - 3.44).abs() < 0.2, "{b:?}");
    // 4-Chloroaniline 4.0.
    let a = only("Nc1ccc(Cl)cc1");
    assert!((a.pka.unwrap_or(0.0) - 4.0).abs() < 0.3, "{a:?}");
}

#[test]
fn permanent_charges() {
    let q = only("C[N+](C)(C)C");
    assert_eq!(q.kind, SiteKind::PermanentCation);
    assert_eq!(q.pka, None);
    assert_eq!(only("C[S+](C)C").class, GroupClass::Sulfonium);
    assert!(
        sites("C[N+](C)(C)[O-]").is_empty(),
        "N-oxide is not a permanent charge"
    );
    assert!(sites("C[N+](=O)[O-]").is_empty(), "nitro is not ionisable");
}

#[test]
fn zwitterion_amino_acid() {
    let s = sites("NCC(=O)O");
    assert_eq!(s.len(), 2);
    assert!(s.iter().any(|x| x.class == GroupClass::AminoAcidCarboxyl));
    assert!(s.iter().any(|x| x.class == GroupClass::PrimaryAmine));
    assert_eq!(sites("[NH3+]CC(=O)[O-]").len(), 2);
}

#[test]
fn experimental_values_win_by_rank() {
    let s = sites("NCC(=O)O");
    let merged = apply_experimental(
        &s,
        &[(2.35, Some(AcidBase::Acid)), (9.78, Some(AcidBase::Base))],
    )
    .expect("valid values");
    assert!(merged.unmatched.is_empty());
    let acid = most_acidic(&merged.sites).expect("acid");
    assert_eq!(acid.pka, Some(2.35));
    assert_eq!(acid.pka_source, PkaSource::Experimental);
    assert_eq!(most_basic(&merged.sites).and_then(|b| b.pka), Some(9.78));
    // Untyped: nearest estimate.
    let m = apply_experimental(&s, &[(9.0, None)]).expect("valid");
    assert_eq!(most_basic(&m.sites).and_then(|b| b.pka), Some(9.0));
    // No acid site for a second acid value.
    let m = apply_experimental(
        &s,
        &[(2.0, Some(AcidBase::Acid)), (3.0, Some(AcidBase::Acid))],
    )
    .expect("valid");
    assert_eq!(m.unmatched, vec![(3.0, Some(AcidBase::Acid))]);
    assert!(apply_experimental(&s, &[(f64::NAN, None)]).is_err());
    assert!(apply_experimental(&s, &[(25.0, None)]).is_err());
}

#[test]
fn malformed_graph_is_an_error_not_a_panic() {
    let mut g = parse_smiles("CCO").expect("parses").graph;
    g.neighbours[0].push((99, 0));
    assert!(detect_sites(&g).is_err());
}

#[test]
fn output_is_sorted_and_deterministic() {
    let a = sites("NCCc1ccc(O)c(O)c1");
    let b = sites("NCCc1ccc(O)c(O)c1");
    assert_eq!(a, b);
    let firsts: Vec<_> = a.iter().map(|s| s.atoms[0]).collect();
    let mut sorted = firsts.clone();
    sorted.sort_unstable();
    assert_eq!(firsts, sorted);
}

/// Issue 16: the path of an estimate is read by users (`describe --format json`), so it names
/// the class and the substituents in plain words, never a Rust name such as
/// `AromaticCarboxylicAcid` or `o-Acylamino`.
#[test]
fn estimate_paths_are_plain_words() {
    for smiles in [
        "CC(=O)Oc1ccccc1C(=O)O", // aromatic acid with an ortho acyloxy group
        "CC(=O)Nc1ccc(O)cc1",    // phenol with a para acylamino group
        "NCC(=O)O",              // amino acid
        "Clc1ccc(N)cc1",         // aniline with a para chloro
        "c1ccncc1C#N",           // pyridine with a meta cyano
    ] {
        for site in sites(smiles) {
            if let PkaSource::Estimated { path } = &site.pka_source {
                let camel = path
                    .split(|c: char| !c.is_alphanumeric())
                    .any(|w| w.chars().any(char::is_uppercase));
                assert!(!camel, "{smiles}: path `{path}` shows an internal name");
            }
        }
    }
}
