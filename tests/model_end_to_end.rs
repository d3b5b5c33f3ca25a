//! End-to-end checks of the retention model on a small RepoRT subset (tests/data/README-retention-subset.md):
//! training, deterministic model bytes, system-grouped evaluation against a logP-only baseline,
//! predictions with intervals and paths, co-elution probabilities, and the bundled model.

use std::path::Path;

use phasewise::model::eval::evaluate;
use phasewise::model::features::{AnalyteFeatures, PhasewiseDescriptors};
use phasewise::model::memory::MemoryTable;
use phasewise::model::regression::{
    Additive, ChemClass, GradientPoint, LcSystem, Mode, Model, Modifier, PredictionPath,
    TrainingData, coelution_probability, train, train_on,
};

fn subset() -> TrainingData {
    TrainingData::load(
        Path::new("tests/data/systems_subset.tsv"),
        Path::new("tests/data/retention_subset.tsv"),
        &PhasewiseDescriptors,
    )
    .unwrap()
}

fn c18_system() -> LcSystem {
    // Invented example system (not from any dataset): C18, water/acetonitrile with formic acid,
    // 5 → 95 % over 15 min after a 1 min hold.
    LcSystem {
        mode: Mode::ReversedPhase,
        chem_class: ChemClass::C18,
        modifier: Modifier::Acetonitrile,
        ph: Some(2.7),
        additive: Additive::FormicAcid,
        gradient: [(0.0, 5.0), (1.0, 5.0), (16.0, 95.0), (19.0, 95.0)]
            .iter()
            .map(|&(t, p)| GradientPoint {
                time_min: t,
                organic_pct: p,
            })
            .collect(),
        t0_min: 0.8,
        dwell_min: 0.5,
        flow_ml_min: 0.4,
        temperature_c: Some(40.0),
    }
}

#[test]
fn training_twice_gives_identical_bytes() {
    let a = train(
        Path::new("tests/data/systems_subset.tsv"),
        Path::new("tests/data/retention_subset.tsv"),
        11,
    )
    .unwrap();
    let b = train(
        Path::new("tests/data/systems_subset.tsv"),
        Path::new("tests/data/retention_subset.tsv"),
        11,
    )
    .unwrap();
    let (ja, jb) = (
        serde_json::to_string_pretty(&a).unwrap(),
        serde_json::to_string_pretty(&b).unwrap(),
    );
    if ja != jb {
        let first = ja
            .lines()
            .zip(jb.lines())
            .enumerate()
            .find(|(_, (x, y))| x != y);
        panic!("models differ at line {first:?}");
    }
    let (ba, bb) = (a.to_gz_bytes().unwrap(), b.to_gz_bytes().unwrap());
    assert!(ba == bb, "gzip bytes differ");
    let back = Model::from_gz_bytes(&ba, "test").unwrap();
    assert_eq!(back.to_gz_bytes().unwrap(), ba);
    assert!(back.licence.contains("CC BY-SA 4.0"));
}

#[test]
fn evaluation_on_subset_beats_logp_baseline() {
    let data = subset();
    assert_eq!(data.systems.len(), 11);
    let report = evaluate(&data, 3, 5).unwrap();
    assert_eq!(report.baseline_descriptor, "logp");
    let get = |k: &str| report.summary.get(k).map(|m| m.median).unwrap();
    let base = get("RP/baseline/spearman");
    let desc = get("RP/descriptor/spearman");
    let mem = get("RP/memory+descriptor/spearman");
    // Sane, non-trivial figures: on this 11-system subset (about 9 training systems per fold)
    // the 41-descriptor model with system interactions ranks about as well as logP alone (on
    // the full 289 systems it is far ahead, docs/model.md); memory ranks better than logP,
    // errors are finite fractions of the gradient.
    assert!(desc > base - 0.01, "descriptor {desc} vs baseline {base}");
    assert!(mem > base, "memory {mem} vs baseline {base}");
    assert!(desc > 0.5, "descriptor Spearman {desc}");
    assert!(mem >= desc - 0.02, "memory {mem} vs descriptor {desc}");
    let mae = get("RP/descriptor/mae_pct_gradient");
    assert!(mae > 0.0 && mae < 60.0, "MAE {mae} %");
    let auc = get("RP/memory+descriptor/coelution_auc");
    assert!(auc > 0.5 && auc <= 1.0, "AUC {auc}");
    assert!(report.to_markdown().contains("| RP | descriptor |"));
}

#[test]
fn predictions_carry_interval_path_and_coelution() {
    let data = subset();
    let mut model = train_on(&data, 5).unwrap();
    model.memory = Some(MemoryTable::from_training(&data));
    let sys = c18_system();
    // Caffeine and theophylline (structures from memory); an unknown InChIKey forces the
    // descriptor path.
    let caffeine =
        AnalyteFeatures::from_smiles("Cn1cnc2c1c(=O)n(C)c(=O)n2C", Some("NOT-IN-MEMORY")).unwrap();
    let theo = AnalyteFeatures::from_smiles("Cn1c(=O)c2[nH]cnc2n(C)c1=O", None).unwrap();
    let a = model.predict(&caffeine, &sys).unwrap();
    let b = model.predict(&theo, &sys).unwrap();
    for p in [&a, &b] {
        assert_eq!(p.path, PredictionPath::Descriptor);
        assert!(p.rt_min > sys.t0_min && p.rt_min < 40.0, "{}", p.rt_min);
        assert!(p.interval_min.0 <= p.rt_min && p.rt_min <= p.interval_min.1);
        assert!(p.interval_min.1 > p.interval_min.0);
    }
    let pc = coelution_probability(&a, &b, 0.1).unwrap();
    assert!((0.0..=1.0).contains(&pc));
    let hexyl = AnalyteFeatures::from_smiles("CCCCCCc1ccccc1", None).unwrap();
    let h = model.predict(&hexyl, &sys).unwrap();
    assert!(h.rt_min > a.rt_min + 1.0, "{} vs {}", h.rt_min, a.rt_min);
    assert!(
        coelution_probability(&a, &a, 0.1).unwrap() > coelution_probability(&a, &h, 0.1).unwrap()
    );
    assert!(coelution_probability(&a, &b, -1.0).is_err());
    let mut other = sys.clone();
    other.t0_min = 1.0;
    let c = model.predict(&theo, &other).unwrap();
    assert!(coelution_probability(&a, &c, 0.1).is_err());

    // An analyte measured in the subset goes through memory, naming its source systems.
    let row = data
        .rows
        .iter()
        .find(|r| data.systems[r.system].system.mode == Mode::ReversedPhase)
        .unwrap();
    let f = AnalyteFeatures {
        inchikey: Some(row.inchikey.clone()),
        ..data.analytes[row.analyte].clone()
    };
    let p = model.predict(&f, &sys).unwrap();
    match &p.path {
        PredictionPath::Memory { source_systems } => assert!(!source_systems.is_empty()),
        PredictionPath::Descriptor => {}
        PredictionPath::ScoutingFit { .. } => panic!("no stored scouting fits here: {p:?}"),
    }

    // Bad input is an error naming the value, never a made-up number.
    let mut bad = sys.clone();
    bad.gradient[1].organic_pct = 150.0;
    assert!(
        model
            .predict(&theo, &bad)
            .unwrap_err()
            .to_string()
            .contains("150")
    );
    let empty = AnalyteFeatures::default();
    assert!(model.predict(&empty, &sys).is_err());
}

#[test]
fn builtin_model_loads_and_predicts() {
    let model = Model::load_builtin().unwrap();
    assert!(model.licence.contains("CC BY-SA 4.0"));
    assert!(model.n_systems > 200);
    let sys = c18_system();
    let f = AnalyteFeatures::from_smiles("CCCCCCc1ccccc1", None).unwrap();
    let g = AnalyteFeatures::from_smiles("OCC(O)CO", None).unwrap();
    let hexylbenzene = model.predict(&f, &sys).unwrap();
    let glycerol = model.predict(&g, &sys).unwrap();
    // Hexylbenzene is far more retained than glycerol in RP (common practice, no source).
    assert!(hexylbenzene.rt_min > glycerol.rt_min + 3.0);
}

/// A stereo InChIKey finds measurements the retention memory holds under its stereo-less key.
#[test]
fn a_stereo_key_finds_measurements_stored_without_stereo() {
    // Invented keys of the InChIKey shape (no real compounds); only the stereo-less one is held
    let head = "# x\nsystem\ts1\tRP\tC18\tacn\t3\tformic\t1\t0.5\t30\t0:5;10:95\n";
    let text = format!(
        "{head}analyte\tAAAAAAAAAAAAAA-UHFFFAOYSA-N\ts1:0.3:4.0\nanalyte\tBBBBBBBBBBBBBB-WESIUVDSSA-N\ts1:0.5:6.0\n"
    );
    for t in [
        MemoryTable::from_tsv_lazy(&text, "t"),
        MemoryTable::from_tsv(&text, "t"),
    ] {
        let t = t.unwrap();
        let psi = |k: &str| t.measurements(k).map(|m| m.2).collect::<Vec<_>>();
        assert_eq!(psi("AAAAAAAAAAAAAA-WESIUVDSSA-N"), [0.3]);
        assert_eq!(psi("AAAAAAAAAAAAAA-UHFFFAOYSA-N"), [0.3]);
        // an exact stereo record wins; a stereo-less query never borrows a stereo record
        assert_eq!(psi("BBBBBBBBBBBBBB-WESIUVDSSA-N"), [0.5]);
        assert!(psi("BBBBBBBBBBBBBB-UHFFFAOYSA-N").is_empty());
        // another protonation flag is another species
        assert!(psi("AAAAAAAAAAAAAA-WESIUVDSSA-M").is_empty());
    }
}
