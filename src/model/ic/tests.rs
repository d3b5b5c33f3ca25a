//! Tests of the IC order model. Orders are "from memory" of typical chromatograms or "common
//! practice, no source", as stated at each check.

use super::*;
use proptest::prelude::*;

fn catalogue() -> &'static Catalogue {
    match Catalogue::builtin() {
        Ok(c) => c,
        Err(err) => panic!("{err}"),
    }
}

fn order(phase: &str, eluent: &str, conc: Option<f64>, ions: &[&str]) -> IcPrediction {
    match predict_ion_order(catalogue(), phase, eluent, conc, ions) {
        Ok(p) => p,
        Err(err) => panic!("{err}"),
    }
}

fn ids(p: &IcPrediction) -> Vec<&str> {
    p.ions.iter().map(|i| i.ion_id.as_str()).collect()
}

fn rr(p: &IcPrediction, id: &str) -> f64 {
    p.ions
        .iter()
        .find(|i| i.ion_id == id)
        .map_or(f64::NAN, |i| i.relative_retention)
}

const ANIONS: [&str; 7] = [
    "nitrate",
    "sulfate",
    "bromide",
    "nitrite",
    "chloride",
    "fluoride",
    "phosphate",
];

#[test]
fn common_anions_elute_fluoride_chloride_nitrite_bromide_nitrate() {
    // From memory of typical anion chromatograms on both phase types: F < Cl < NO2 < Br < NO3.
    for (phase, eluent) in [
        ("ic-anion-carbonate", "carbonate-bicarbonate"),
        ("ic-anion-hydroxide", "koh"),
    ] {
        let p = order(phase, eluent, None, &ANIONS);
        let monovalent: Vec<&str> = ids(&p)
            .into_iter()
            .filter(|id| !["sulfate", "phosphate"].contains(id))
            .collect();
        assert_eq!(
            monovalent,
            ["fluoride", "chloride", "nitrite", "bromide", "nitrate"],
            "{phase}"
        );
        assert_eq!(p.ions.len(), 7);
    }
}

#[test]
fn sulfate_elutes_last_on_carbonate_eluent() {
    // From memory: on carbonate-selective phases with carbonate/bicarbonate, phosphate then
    // sulfate elute after nitrate, sulfate last of the seven common anions.
    let p = order("ic-anion-carbonate", "carbonate-bicarbonate", None, &ANIONS);
    assert_eq!(ids(&p).last(), Some(&"sulfate"));
    assert!(rr(&p, "phosphate") > rr(&p, "nitrate"));
}

#[test]
fn cations_elute_sodium_ammonium_potassium_then_magnesium_calcium() {
    // From memory of typical cation chromatograms on carboxylate phases with acid eluent:
    // Li < Na < NH4 < K < Mg < Ca < Sr < Ba.
    let p = order(
        "ic-cation-carboxylate",
        "msa",
        None,
        &[
            "barium",
            "calcium",
            "Mg2+",
            "K+",
            "ammonium",
            "sodium",
            "lithium",
            "strontium",
        ],
    );
    assert_eq!(
        ids(&p),
        [
            "lithium",
            "sodium",
            "ammonium",
            "potassium",
            "magnesium",
            "calcium",
            "strontium",
            "barium"
        ]
    );
    assert_eq!(rr(&p, "sodium"), 1.0);
    assert_eq!(p.reference_ion_id, "sodium");
}

#[test]
fn stronger_eluent_moves_divalent_ions_forward_and_leaves_monovalent_ratios() {
    // Ion-exchange slope log k = c - (x/y) log C (Haddad & Jackson 1990, from memory):
    // a tenfold hydroxide increase divides a divalent ion's ratio to chloride by 10.
    let low = order("ic-anion-hydroxide", "koh", Some(10.0), &ANIONS);
    let high = order("ic-anion-hydroxide", "koh", Some(100.0), &ANIONS);
    assert!((rr(&low, "sulfate") / rr(&high, "sulfate") - 10.0).abs() < 1e-9);
    assert!((rr(&low, "nitrate") - rr(&high, "nitrate")).abs() < 1e-12);
    let high_ids = ids(&high);
    let sulfate = high_ids.iter().position(|id| *id == "sulfate");
    let nitrate = high_ids.iter().position(|id| *id == "nitrate");
    assert!(sulfate < nitrate, "{high_ids:?}");
}

#[test]
fn close_pairs_are_flagged_as_coeluting() {
    // From memory: chlorate and bromide are hard to separate with carbonate eluents.
    let p = order(
        "ic-anion-carbonate",
        "carbonate-bicarbonate",
        None,
        &["chlorate", "bromide", "chloride"],
    );
    let bromide = p.ions.iter().find(|i| i.ion_id == "bromide");
    assert!(bromide.is_some_and(|b| b.coelutes_with == ["chlorate"]));
    let chloride = p.ions.iter().find(|i| i.ion_id == "chloride");
    assert!(chloride.is_some_and(|c| c.coelutes_with.is_empty()));
}

#[test]
fn wrong_panel_and_eluent_ion_are_reported_not_predicted() {
    let p = order(
        "ic-anion-carbonate",
        "carbonate-bicarbonate",
        None,
        &["chloride", "sodium", "carbonate", "chloride"],
    );
    assert_eq!(ids(&p), ["chloride"]);
    let reasons: Vec<&str> = p.unpredicted.iter().map(|u| u.ion_id.as_str()).collect();
    assert_eq!(reasons, ["sodium", "carbonate"]);
}

#[test]
fn incompatible_or_unknown_inputs_are_errors() {
    let c = catalogue();
    let err = predict_ion_order(c, "ic-anion-carbonate", "msa", None, &["chloride"]).unwrap_err();
    assert!(matches!(err, IcError::IncompatibleEluent { .. }));
    assert!(err.to_string().contains("carbonate-bicarbonate"), "{err}");
    assert!(matches!(
        predict_ion_order(
            c,
            "ic-ion-exclusion",
            "sulfuric-exclusion",
            None,
            &["formate"]
        ),
        Err(IcError::ExclusionNotModelled { .. })
    ));
    assert!(matches!(
        predict_ion_order(c, "rp-c18", "koh", None, &["chloride"]),
        Err(IcError::NotIonExchange { .. })
    ));
    let err = predict_ion_order(c, "ic-anion-hydroxide", "koh", None, &["chlorid"]).unwrap_err();
    assert!(err.to_string().contains("chloride"), "{err}");
    for bad in [0.0, -1.0, f64::NAN, 1000.0] {
        assert!(matches!(
            predict_ion_order(c, "ic-anion-hydroxide", "koh", Some(bad), &["chloride"]),
            Err(IcError::BadConcentration { .. })
        ));
    }
    assert_eq!(
        predict_ion_order(c, "ic-anion-hydroxide", "koh", None, &[]),
        Err(IcError::NoIons)
    );
}

#[test]
fn phosphonate_phase_uses_proxy_with_wider_interval() {
    let proxy = order(
        "ic-cation-phosphonate",
        "msa",
        None,
        &["potassium", "calcium"],
    );
    let direct = order(
        "ic-cation-carboxylate",
        "msa",
        None,
        &["potassium", "calcium"],
    );
    let width = |p: &IcPrediction| p.ions.first().map_or(f64::NAN, |i| i.high_95 / i.low_95);
    assert!(width(&proxy) > width(&direct));
    assert!(!proxy.notes.is_empty());
}

#[test]
fn out_of_range_concentration_adds_a_note() {
    let p = order("ic-anion-hydroxide", "koh", Some(200.0), &["sulfate"]);
    assert!(
        p.notes
            .iter()
            .any(|n| n.contains("outside the typical range"))
    );
}

proptest! {
    #[test]
    fn ranks_follow_retention_and_intervals_contain_the_value(
        mask in 1u32..(1 << 12),
        conc in 1.0f64..100.0,
    ) {
        let pool = ["fluoride", "acetate", "formate", "chlorite", "bromate", "chloride", "nitrite",
            "chlorate", "bromide", "nitrate", "sulfate", "phosphate"];
        let chosen: Vec<&str> = pool.iter().enumerate().filter(|(i, _)| mask & (1 << i) != 0).map(|(_, s)| *s).collect();
        let p = order("ic-anion-hydroxide", "koh", Some(conc), &chosen);
        prop_assert_eq!(p.ions.len(), chosen.len());
        for (index, ion) in p.ions.iter().enumerate() {
            prop_assert_eq!(ion.elution_rank, index + 1);
            prop_assert!(ion.low_95 <= ion.relative_retention && ion.relative_retention <= ion.high_95);
        }
        for pair in p.ions.windows(2) {
            prop_assert!(pair[0].relative_retention <= pair[1].relative_retention);
        }
    }
}
