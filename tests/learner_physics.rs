//! Physics of the structure-only learner (issue 14, part 3): a gradient-boosted residual model
//! trained on the inputs of `model::learner_features` with the RP monotone constraints never
//! lowers predicted retention when a CH2 is added to an alkyl chain, and never moves a neutral
//! analyte with pH. The training targets below are adversarial on purpose (they fall with
//! chain length and change with pH), so an unconstrained learner on the same data does break
//! the rule (checked too: the test can fail).

use std::collections::HashMap;

use forust_ml::constraints::Constraint;
use forust_ml::objective::ObjectiveType;
use forust_ml::{GradientBooster, Matrix};
use phasewise::model::features::AnalyteFeatures;
use phasewise::model::fingerprint::fingerprint_smiles;
use phasewise::model::learner_features::{N_INPUTS, learner_inputs, monotone_indices};
use phasewise::model::regression::{Additive, ChemClass, GradientPoint, LcSystem, Mode, Modifier};
use proptest::prelude::*;

fn sys(ph: f64) -> LcSystem {
    LcSystem {
        mode: Mode::ReversedPhase,
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

/// Head groups (chain appended at the end of the SMILES); common practice, no source.
const HEADS: [&str; 10] = [
    "c1ccccc1",
    "N#C",
    "COC(=O)",
    "CC(=O)",
    "Clc1ccc(cc1)",
    "O=C(Oc1ccccc1)",
    "OC(=O)",
    "OC(=O)c1ccc(cc1)",
    "CN(C)",
    "c1ccncc1",
];

fn inputs(smiles: &str, ph: f64) -> Vec<f64> {
    let f = AnalyteFeatures::from_smiles(smiles, None).unwrap();
    let (fp, n) = fingerprint_smiles(smiles).unwrap();
    learner_inputs(&f, &fp, n, &sys(ph))
}

/// Adversarial residual targets: retention falling with chain length, a pH term for everyone.
fn train(constrained: bool) -> GradientBooster {
    let mut rows = Vec::new();
    let mut y = Vec::new();
    for (h, head) in HEADS.iter().enumerate() {
        for chain in 1..=8usize {
            for ph in [2.5, 4.5, 7.0, 9.0] {
                rows.push(inputs(&format!("{head}{}", "C".repeat(chain)), ph));
                y.push(-0.08 * chain as f64 + 0.02 * ph + 0.01 * h as f64);
            }
        }
    }
    let n = rows.len();
    let mut x = vec![0.0; n * N_INPUTS];
    for (i, r) in rows.iter().enumerate() {
        for (j, v) in r.iter().enumerate() {
            x[j * n + i] = *v;
        }
    }
    let mut b = GradientBooster::default()
        .set_objective_type(ObjectiveType::SquaredLoss)
        .set_base_score(0.0)
        .set_iterations(60)
        .set_learning_rate(0.2)
        .set_max_depth(4)
        .set_min_leaf_weight(1.0)
        .set_seed(42)
        .set_parallel(false);
    if constrained {
        let map: HashMap<usize, Constraint> = monotone_indices()
            .map(|j| (j, Constraint::Positive))
            .collect();
        b = b.set_monotone_constraints(Some(map));
    }
    b.fit(&Matrix::new(&x, n, N_INPUTS), &y, &vec![1.0; n], None)
        .unwrap();
    b
}

fn predict(b: &GradientBooster, smiles: &str, ph: f64) -> f64 {
    let x = inputs(smiles, ph);
    b.predict(&Matrix::new(&x, 1, N_INPUTS), false)[0]
}

#[test]
fn training_twice_gives_the_same_learner() {
    // forust writes its constraint map (a HashMap) in random order, so compare parsed JSON
    // (objects compare as maps): the trees must be identical.
    let dump = || -> serde_json::Value {
        serde_json::from_str(&train(true).json_dump().unwrap()).unwrap()
    };
    assert_eq!(dump(), dump());
}

#[test]
fn unconstrained_learner_breaks_the_chain_rule_on_these_targets() {
    let b = train(false);
    let falls = HEADS.iter().any(|h| {
        predict(&b, &format!("{h}CCCCCC"), 3.0) < predict(&b, &format!("{h}C"), 3.0) - 1e-6
    });
    assert!(
        falls,
        "the adversarial targets should make an unconstrained learner fall"
    );
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// Adding CH2 to an alkyl chain never lowers the constrained learner's correction, at any pH,
    /// for heads seen and unseen in training.
    #[test]
    fn constrained_learner_never_falls_with_one_more_ch2(
        head in 0..HEADS.len() + 3,
        chain in 1usize..12,
        ph in 2.0f64..10.0,
    ) {
        use std::sync::OnceLock;
        static B: OnceLock<GradientBooster> = OnceLock::new();
        let b = B.get_or_init(|| train(true));
        let extra = ["c1ccc2ccccc2c1", "NC(=O)c1ccccc1", "COc1ccc(cc1)"];
        let head = HEADS.iter().chain(extra.iter()).nth(head).copied().unwrap_or("N#C");
        let a = predict(b, &format!("{head}{}", "C".repeat(chain)), ph);
        let c = predict(b, &format!("{head}{}", "C".repeat(chain + 1)), ph);
        prop_assert!(c >= a - 1e-12, "{head} chain {chain}: {a} -> {c}");
    }

    /// A neutral analyte's correction is the same at every pH.
    #[test]
    fn neutral_correction_does_not_depend_on_ph(
        head in 0..6usize,
        chain in 1usize..10,
        ph_a in 2.0f64..10.0,
        ph_b in 2.0f64..10.0,
    ) {
        use std::sync::OnceLock;
        static B: OnceLock<GradientBooster> = OnceLock::new();
        let b = B.get_or_init(|| train(false));
        let smiles = format!("{}{}", HEADS[head], "C".repeat(chain));
        prop_assert_eq!(predict(b, &smiles, ph_a), predict(b, &smiles, ph_b));
    }
}
