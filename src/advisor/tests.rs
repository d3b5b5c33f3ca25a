//! Unit tests of the advisor's shared decisions (phase families, cautions).

use super::*;

#[test]
fn low_polarity_polysiloxanes_are_one_gc_family_and_not_aromatic() {
    assert_eq!(family("gc-5-phenyl"), family("gc-dimethyl"));
    assert_eq!(family("gc-6-cyanopropylphenyl"), family("gc-dimethyl"));
    assert_eq!(family("gc-wax"), family("gc-wax-acid"));
    assert_ne!(family("gc-wax"), family("gc-5-phenyl"));
    assert_ne!(family("gc-5-phenyl"), family("rp-phenyl-hexyl"));
    assert_eq!(family("rp-phenyl-hexyl"), family("rp-pfp"));
    assert_eq!(family("rp-c18"), family("rp-c8"));
}

fn conditions(modifier: &str) -> crate::report::advice::Conditions {
    crate::report::advice::Conditions {
        column_length_mm: 100.0,
        column_id_mm: 2.1,
        particle_um: Some(2.7),
        film_um: None,
        mobile_phase_a: Some("water".into()),
        mobile_phase_b: Some(modifier.into()),
        modifier: Some(modifier.into()),
        ph: Some(3.0),
        buffer: None,
        buffer_preparation: None,
        program: Vec::new(),
        program_unit: "% B".into(),
        flow_ml_min: Some(0.4),
        temperature_c: Some(35.0),
        carrier_gas: None,
        linear_velocity_cm_s: None,
        inlet: None,
        derivatisation: None,
        suppression: None,
        injection: String::new(),
        detection: String::new(),
        dead_time_min: 0.5,
        plate_number: 10000.0,
        run_time_min: 20.0,
        pressure_bar: None,
    }
}

/// The solvent caution names a modifier that only the back-up uses as the back-up's, and a
/// modifier both use without that note (rule:solvent-hazards; issue 15).
#[test]
fn a_solvent_only_the_backup_uses_is_named_as_the_backups() {
    let cat = Catalogue::builtin().unwrap();
    let rec = |phase: &str, modifier: &str| {
        let p = cat.phase(phase).unwrap();
        unscored_recommendation("rp", p, conditions(modifier), Vec::new(), Vec::new()).0
    };
    let first = rec("rp-c18", "acetonitrile");
    let backup = |m: &str| Backup {
        recommendation: rec("rp-phenyl-hexyl", m),
        changes: Vec::new(),
        why: String::new(),
    };
    let other = backup("methanol");
    let texts = |b: &Backup| -> Vec<String> {
        cautions(&first, Some(b), cat)
            .into_iter()
            .filter(|c| c.topic == "solvent")
            .map(|c| c.text)
            .collect()
    };
    let t = texts(&other);
    assert!(
        t.iter()
            .any(|x| x.to_lowercase().starts_with("methanol")
                && x.contains("the back-up's modifier")),
        "{t:?}"
    );
    assert!(
        t.iter()
            .any(|x| x.to_lowercase().starts_with("acetonitrile") && !x.contains("back-up")),
        "{t:?}"
    );
    let same = texts(&backup("acetonitrile"));
    assert!(same.iter().all(|x| !x.contains("back-up")), "{same:?}");
}
