//! Whole-table tests over every row of the embedded data, plus lookup, restriction and error tests.

use super::*;
use proptest::prelude::*;

fn catalogue() -> &'static Catalogue {
    match Catalogue::builtin() {
        Ok(catalogue) => catalogue,
        Err(err) => panic!("built-in catalogue failed to load: {err}"),
    }
}

#[test]
fn builtin_catalogue_loads_with_rows_in_every_table() {
    let counts = catalogue().counts();
    assert!(counts.phases >= 33, "{counts:?}");
    assert!(counts.solvents >= 7, "{counts:?}");
    assert!(counts.buffers >= 20, "{counts:?}");
    assert!(counts.ic_eluents >= 5, "{counts:?}");
    assert_eq!(counts.carrier_gases, 3);
    assert!(counts.ic_ions >= 30, "{counts:?}");
}

#[test]
fn every_mode_is_covered() {
    for mode in PhaseMode::ALL {
        assert!(
            catalogue().phases_by_mode(mode).next().is_some(),
            "no phase for mode {mode}"
        );
    }
}

#[test]
fn required_phases_are_present() {
    // The phase list the task asks for (one id per required chemistry).
    let required = [
        "rp-c18",
        "rp-c8",
        "rp-phenyl-hexyl",
        "rp-biphenyl",
        "rp-pfp",
        "rp-polar-embedded",
        "rp-c18-aq",
        "rp-cyano",
        "rp-c18-hybrid",
        "rp-pgc",
        "hilic-silica",
        "hilic-amide",
        "hilic-diol",
        "hilic-zwitterionic",
        "ic-anion-hydroxide",
        "ic-anion-carbonate",
        "ic-cation-carboxylate",
        "ic-cation-phosphonate",
        "ic-ion-exclusion",
        "gc-dimethyl",
        "gc-5-phenyl",
        "gc-35-phenyl",
        "gc-50-phenyl",
        "gc-6-cyanopropylphenyl",
        "gc-14-cyanopropylphenyl",
        "gc-trifluoropropyl",
        "gc-wax",
        "gc-wax-acid",
        "gc-plot-porous-polymer",
        "gc-plot-alumina",
        "gc-plot-molecular-sieve",
    ];
    for id in required {
        assert!(catalogue().phase(id).is_ok(), "missing phase {id}");
    }
}

#[test]
fn every_row_of_every_table_has_a_source_and_unique_id() {
    let c = catalogue();
    let tables: Vec<(&str, Vec<(&str, &str)>)> = vec![
        (
            "phases",
            c.phases().iter().map(|r| (r.id(), r.source())).collect(),
        ),
        (
            "solvents",
            c.solvents().iter().map(|r| (r.id(), r.source())).collect(),
        ),
        (
            "buffers",
            c.buffers().iter().map(|r| (r.id(), r.source())).collect(),
        ),
        (
            "ic_eluents",
            c.ic_eluents()
                .iter()
                .map(|r| (r.id(), r.source()))
                .collect(),
        ),
        (
            "carrier_gases",
            c.carrier_gases()
                .iter()
                .map(|r| (r.id(), r.source()))
                .collect(),
        ),
        (
            "ic_ions",
            c.ic_ions().iter().map(|r| (r.id(), r.source())).collect(),
        ),
    ];
    for (table, rows) in tables {
        let mut ids: Vec<&str> = rows.iter().map(|(id, _)| *id).collect();
        ids.sort_unstable();
        ids.dedup();
        assert_eq!(ids.len(), rows.len(), "duplicate id in {table}");
        for (id, source) in rows {
            // A source is a named reference, "from memory" or "common practice, no source".
            let named = source.contains("from memory")
                || source.contains("no source")
                || source.contains("definition")
                || source.chars().any(|c| c.is_ascii_digit());
            assert!(named, "{table}/{id}: source `{source}` names no reference");
        }
    }
}

#[test]
fn lc_phases_have_ph_limits_and_training_classes_gc_phases_do_not() {
    for phase in catalogue().phases() {
        match phase.mode() {
            PhaseMode::Gc => {
                assert!(phase.ph_min().is_none() && phase.chem_class().is_none());
                let gc = phase.gc().map(GcParameters::typical_film_um);
                assert!(gc.is_some_and(|film| film > 0.0), "{}", phase.id());
            }
            PhaseMode::Rp | PhaseMode::Hilic => {
                assert!(phase.chem_class().is_some(), "{}", phase.id());
                let (low, high) = (
                    phase.ph_min().unwrap_or(-1.0),
                    phase.ph_max().unwrap_or(-1.0),
                );
                assert!((0.0..=14.0).contains(&low) && low < high && high <= 14.0);
                // Silica-based LC phases: 60 C or less is the usual limit (common practice, no source).
                assert!(phase.t_max_c() <= 150.0, "{}", phase.id());
            }
            _ => assert!(phase.ic_exchanger().is_some(), "{}", phase.id()),
        }
    }
}

#[test]
fn training_data_classes_are_spelled_as_in_systems_tsv() {
    // The classes of ../shared/data/retention/systems.tsv (RepoRT-derived, CC BY-SA 4.0).
    let known = [
        "C18",
        "C8",
        "cyano",
        "phenyl",
        "pentafluorophenyl",
        "porous_graphitic_carbon",
        "bare_silica",
        "amide",
        "zwitterionic",
        "unknown",
    ];
    for phase in catalogue().phases() {
        if let Some(class) = phase.chem_class() {
            assert!(known.contains(&class.as_str()));
            let json = serde_json::to_string(&class).unwrap_or_default();
            assert_eq!(json, format!("\"{}\"", class.as_str()));
        }
    }
}

#[test]
fn mcreynolds_polarity_rises_with_phenyl_content_and_peg_is_most_polar() {
    // Order of published phase polarities (from memory of McReynolds tables): 100 % methyl <
    // 5 % phenyl < 35 % phenyl < 50 % phenyl; polyethylene glycol far above all siloxanes.
    let sum = |id: &str| {
        catalogue()
            .phase(id)
            .ok()
            .and_then(|p| p.gc())
            .and_then(|g| g.mcreynolds())
            .map(McReynoldsConstants::sum_ri)
            .unwrap_or(f64::NAN)
    };
    assert!(sum("gc-dimethyl") < sum("gc-5-phenyl"));
    assert!(sum("gc-5-phenyl") < sum("gc-35-phenyl"));
    assert!(sum("gc-35-phenyl") < sum("gc-50-phenyl"));
    assert!(sum("gc-6-cyanopropylphenyl") < sum("gc-14-cyanopropylphenyl"));
    assert!(sum("gc-trifluoropropyl") < sum("gc-wax"));
    assert!(sum("gc-wax") < sum("gc-wax-acid"));
    let plot = catalogue()
        .phase("gc-plot-alumina")
        .ok()
        .and_then(|p| p.gc());
    assert!(plot.is_some_and(|g| g.mcreynolds().is_none()));
}

#[test]
fn solvent_values_follow_handbook_order() {
    // Handbook values from memory: acetonitrile has the lowest UV cutoff and viscosity of the
    // common RP modifiers; isopropanol is the most viscous; water is the weakest RP solvent.
    let c = catalogue();
    let get = |id: &str| c.solvent(id).ok().cloned();
    let (Some(acn), Some(meoh), Some(ipa), Some(water)) = (
        get("acetonitrile"),
        get("methanol"),
        get("isopropanol"),
        get("water"),
    ) else {
        panic!("solvent rows missing");
    };
    assert!(acn.uv_cutoff_nm() < meoh.uv_cutoff_nm());
    assert!(acn.viscosity_mpa_s_25c() < meoh.viscosity_mpa_s_25c());
    assert!(ipa.viscosity_mpa_s_25c() > water.viscosity_mpa_s_25c());
    assert!(water.rp_strength() < meoh.rp_strength());
    assert!(water.flash_point_c().is_none());
    for solvent in c.solvents() {
        assert!(!solvent.hazards().is_empty());
        if solvent.id() != "water" {
            assert!(solvent.hazards().contains("flammable"), "{}", solvent.id());
            assert!(
                solvent
                    .flash_point_c()
                    .is_some_and(|f| f < solvent.boiling_point_c())
            );
        }
    }
}

#[test]
fn buffers_are_consistent() {
    let c = catalogue();
    // Phosphate pKa values rise (from memory of pKa tables: 2.15, 7.20, 12.35).
    let pka = |id: &str| c.buffer(id).map(Buffer::pka_25c).unwrap_or(f64::NAN);
    assert!(pka("phosphate-1") < pka("phosphate-2") && pka("phosphate-2") < pka("phosphate-3"));
    assert!(c.buffer("phosphate-2").is_ok_and(|b| !b.volatile()));
    assert!(
        c.buffer("ammonium-formate-acid")
            .is_ok_and(Buffer::volatile)
    );
    for buffer in c.buffers() {
        let (low, high) = buffer.useful_ph_range();
        assert!((high - low - 2.0).abs() < 1e-12);
        assert!(buffer.typical_conc_mm().is_some() != buffer.typical_conc_pct_v_v().is_some());
    }
    let at_4_5: Vec<&str> = c.buffers_for_ph(4.5).iter().map(|b| b.id()).collect();
    assert!(at_4_5.contains(&"ammonium-acetate-acid"), "{at_4_5:?}");
    assert!(!at_4_5.contains(&"phosphate-2"));
}

#[test]
fn carrier_gases_keep_the_usual_optimum_order_and_hydrogen_warns() {
    // Optimum linear velocity order N2 < He < H2 (van Deemter curves in GC handbooks, from memory).
    let c = catalogue();
    let opt = |id: &str| {
        c.carrier_gas(id)
            .map(CarrierGas::u_opt_min_cm_s)
            .unwrap_or(f64::NAN)
    };
    assert!(opt("nitrogen") < opt("helium") && opt("helium") < opt("hydrogen"));
    let hydrogen = c
        .carrier_gas("hydrogen")
        .map(|g| g.hazards().to_string())
        .unwrap_or_default();
    assert!(hydrogen.contains("flammable") && hydrogen.contains("leak"));
}

#[test]
fn ions_match_by_name_synonym_and_id() {
    let c = catalogue();
    assert_eq!(c.ic_ion("Cl-").map(IcIon::id), Ok("chloride"));
    assert_eq!(c.ic_ion("sulphate").map(IcIon::id), Ok("sulfate"));
    assert_eq!(c.ic_ion("NH4+").map(IcIon::id), Ok("ammonium"));
    let err = c.ic_ion("chlorde").unwrap_err().to_string();
    assert!(err.contains("chloride"), "{err}");
    for ion in c.ic_ions() {
        assert!(!ion.smiles().is_empty() && !ion.formula().is_empty());
    }
}

#[test]
fn restrict_keeps_listed_phases_and_reports_unknown_ids_with_suggestions() {
    let c = catalogue();
    let lab = c.restrict(&["gc-wax", "rp-c18", "rp-c18"]);
    let ids: Vec<String> = lab
        .map(|l| l.phases().iter().map(|p| p.id().to_string()).collect())
        .unwrap_or_default();
    assert_eq!(ids, ["rp-c18", "gc-wax"]);
    let err = c.restrict(&["rp-c18", "rp-c81", "hilic-amid"]).unwrap_err();
    let PhaseError::UnknownIds { unknown, .. } = &err else {
        panic!("wrong error {err:?}");
    };
    assert_eq!(unknown.len(), 2);
    assert_eq!(
        unknown[0].did_you_mean.first().map(String::as_str),
        Some("rp-c18")
    );
    assert_eq!(
        unknown[1].did_you_mean.first().map(String::as_str),
        Some("hilic-amide")
    );
    assert!(err.to_string().contains("did you mean"));
    assert_eq!(c.restrict::<&str>(&[]), Err(PhaseError::EmptyRestriction));
    let owned = vec![String::from(" hilic-amide ")];
    assert!(c.restrict(&owned).is_ok_and(|l| l.phases().len() == 1));
}

fn with_phases(phases: &str) -> Result<Catalogue, PhaseError> {
    Catalogue::from_sources(&CatalogueSources {
        phases,
        ..CatalogueSources::BUILTIN
    })
}

#[test]
fn bad_data_errors_name_file_line_and_column() {
    let original = CatalogueSources::BUILTIN.phases;
    let broken = original.replacen("rp-c18\trp\t", "rp-c18\trq\t", 1);
    let err = with_phases(&broken).unwrap_err().to_string();
    let line = line_of(original, "rp-c18");
    assert!(
        err.contains("phases.tsv")
            && err.contains(&format!("line {line}"))
            && err.contains("`mode`"),
        "{err}"
    );

    let duplicated = format!(
        "{original}{}\n",
        original.lines().nth(line - 1).unwrap_or("")
    );
    assert!(matches!(
        with_phases(&duplicated),
        Err(PhaseError::DuplicateId { .. })
    ));

    let no_source = original.replacen(
        "\tfrom memory of published McReynolds phase-constant tables (McReynolds",
        "\t\t(McReynolds",
        1,
    );
    // Moving the source into a non-existent extra cell is a too-many-cells error.
    assert!(with_phases(&no_source).is_err());
}

#[test]
fn ph_range_and_mode_mixing_are_rejected() {
    let original = CatalogueSources::BUILTIN.phases;
    let bad_ph = original.replacen("\tC18\t1\t12\t80\t", "\tC18\t1\t15\t80\t", 1);
    let err = with_phases(&bad_ph).unwrap_err().to_string();
    assert!(err.contains("`ph_max`") && err.contains("15"), "{err}");
}

#[test]
fn eluents_reference_exchangers_that_exist() {
    let c = catalogue();
    for eluent in c.ic_eluents() {
        assert!(eluent.reference_conc_mm() >= eluent.typical_conc_min_mm());
        for exchanger in eluent.compatible_exchangers() {
            assert!(
                c.phases()
                    .iter()
                    .any(|p| p.ic_exchanger() == Some(*exchanger))
            );
        }
    }
}

/// ROT13, so that the deny-list below does not itself put product names into the source text
/// (the project rules keep brand names out of the program, its data and its docs).
fn rot13(text: &str) -> String {
    text.chars()
        .map(|c| match c {
            'a'..='m' | 'A'..='M' => char::from(c as u8 + 13),
            'n'..='z' | 'N'..='Z' => char::from(c as u8 - 13),
            _ => c,
        })
        .collect()
}

#[test]
fn no_brand_or_product_names_in_data_docs_or_code() {
    // Well-known column, instrument and software brand words (ROT13-encoded, lower case).
    const DENY_ROT13: &[&str] = &[
        "mbeonk",
        "xvargrk",
        "npdhvgl",
        "koevqtr",
        "kgreen",
        "flzzrgel",
        "fhasver",
        "yhan",
        "trzvav",
        "ulcrefvy",
        "ulcrepneo",
        "nfpragvf",
        "fhcrypb",
        "varegfvy",
        "ngynagvf",
        "pbegrpf",
        "cbebfuryy",
        "flaretv",
        "nrevf",
        "npphpber",
        "puebzbyvgu",
        "yvpuebfcure",
        "chebfcure",
        "ahpyrbqhe",
        "ahpyrbfvy",
        "fcurevfbeo",
        "xebznfvy",
        "pbfzbfvy",
        "lzp",
        "gfxtry",
        "pncpryy",
        "jngref",
        "ntvyrag",
        "curabzrark",
        "gurezb",
        "qvbark",
        "erfgrx",
        "fuvznqmh",
        "zrgebuz",
        "gbfbu",
        "pneobjnk",
        "fgnovyjnk",
        "vaabjnk",
        "fhcrypbjnk",
        "vbacnp",
        "zrgebfrc",
        "egk",
        "egk-1",
        "egk-5",
        "uc-5",
        "qo-1",
        "qo-5",
        "qo-jnk",
        "qo-624",
        "qo-1701",
        "mo-5",
        "bi-101",
        "bi-17",
        "bi-1701",
        "fr-30",
        "cbencnx",
        "unlrfrc",
        "ssnc",
        "mvp",
        "frdhnag",
        "rzcbjre",
        "puebzryrba",
        "bcrayno",
        "znffuhagre",
        "qelyno",
        "puebzfjbeq",
        "zbyfvrir",
    ];
    let deny: Vec<String> = DENY_ROT13.iter().map(|w| rot13(w)).collect();
    let texts: [(&str, &str); 18] = [
        ("phases.tsv", CatalogueSources::BUILTIN.phases),
        ("solvents.tsv", CatalogueSources::BUILTIN.solvents),
        ("buffers.tsv", CatalogueSources::BUILTIN.buffers),
        ("ic_eluents.tsv", CatalogueSources::BUILTIN.ic_eluents),
        ("carrier_gases.tsv", CatalogueSources::BUILTIN.carrier_gases),
        ("ic_ions.tsv", CatalogueSources::BUILTIN.ic_ions),
        ("docs/phases.md", include_str!("../../docs/phases.md")),
        ("src/phase/records.rs", include_str!("records.rs")),
        ("src/model/gc/mod.rs", include_str!("../model/gc/mod.rs")),
        (
            "src/model/gc/analyte.rs",
            include_str!("../model/gc/analyte.rs"),
        ),
        (
            "src/model/gc/boiling_point.rs",
            include_str!("../model/gc/boiling_point.rs"),
        ),
        (
            "src/model/gc/ladder.rs",
            include_str!("../model/gc/ladder.rs"),
        ),
        ("src/model/gc/oven.rs", include_str!("../model/gc/oven.rs")),
        (
            "src/model/gc/solvation.rs",
            include_str!("../model/gc/solvation.rs"),
        ),
        (
            "data/gc_system_constants.tsv",
            include_str!("../../data/gc_system_constants.tsv"),
        ),
        (
            "data/gc_fragment_priors.tsv",
            include_str!("../../data/gc_fragment_priors.tsv"),
        ),
        (
            "tests/data/gc_ri_reference.tsv",
            include_str!("../../tests/data/gc_ri_reference.tsv"),
        ),
        ("src/model/ic.rs", include_str!("../model/ic.rs")),
    ];
    for (name, text) in texts {
        let lower = text.to_lowercase();
        for token in lower.split(|c: char| !(c.is_alphanumeric() || c == '-')) {
            assert!(
                !deny.iter().any(|word| word == token),
                "{name}: brand-like word `{token}`"
            );
        }
    }
    assert_eq!(rot13(&rot13("Phase-5")), "Phase-5");
}

#[test]
fn suggestions_are_ranked_by_distance() {
    let known = ["gc-wax", "gc-wax-acid", "rp-c18"];
    assert_eq!(suggest("gc-wx", known), ["gc-wax"]);
    assert_eq!(suggest("gc-wax-ac", known), ["gc-wax-acid", "gc-wax"]);
    assert_eq!(edit_distance("rp-c81", "rp-c18"), 1);
    assert!(suggest("zzzzzzzzzz", known).is_empty());
    assert_eq!(edit_distance("kitten", "sitting"), 3);
}

proptest! {
    #[test]
    fn edit_distance_is_a_metric_on_samples(a in "[a-z-]{0,12}", b in "[a-z-]{0,12}") {
        prop_assert_eq!(edit_distance(&a, &a), 0);
        prop_assert_eq!(edit_distance(&a, &b), edit_distance(&b, &a));
        prop_assert!(edit_distance(&a, &b) <= a.len().max(b.len()));
    }
}

/// Replaces the first `from` after the row starting with `row_id` by `to` in one table.
fn mutate(text: &str, row_id: &str, from: &str, to: &str) -> String {
    let start = text.find(&format!("\n{row_id}\t")).unwrap_or(0);
    let (head, tail) = text.split_at(start);
    format!("{head}{}", tail.replacen(from, to, 1))
}

#[test]
fn out_of_range_values_are_rejected_in_every_table() {
    let b = CatalogueSources::BUILTIN;
    // Each case: a mutated table, the file and column the error must name.
    let solvents = mutate(b.solvents, "acetonitrile", "\t190\t", "\t1900\t");
    let buffers = mutate(b.buffers, "formic-acid", "\t3.75\t", "\t31.75\t");
    let eluents = mutate(b.ic_eluents, "koh", "\t25\t", "\t250\t");
    let gases = mutate(b.carrier_gases, "helium", "\t20\t40\t", "\t40\t20\t");
    let ions = mutate(b.ic_ions, "fluoride", "\t0.35\t", "\t-0.35\t");
    let film = mutate(b.phases, "gc-wax", "\t0.25\t", "\t250\t");
    let checks: [(CatalogueSources<'_>, &str, &str); 6] = [
        (
            CatalogueSources {
                solvents: &solvents,
                ..b
            },
            "solvents.tsv",
            "uv_cutoff_nm",
        ),
        (
            CatalogueSources {
                buffers: &buffers,
                ..b
            },
            "buffers.tsv",
            "pka_25c",
        ),
        (
            CatalogueSources {
                ic_eluents: &eluents,
                ..b
            },
            "ic_eluents.tsv",
            "reference_conc_mm",
        ),
        (
            CatalogueSources {
                carrier_gases: &gases,
                ..b
            },
            "carrier_gases.tsv",
            "u_opt_max_cm_s",
        ),
        (
            CatalogueSources {
                ic_ions: &ions,
                ..b
            },
            "ic_ions.tsv",
            "rr_hydroxide",
        ),
        (
            CatalogueSources { phases: &film, ..b },
            "phases.tsv",
            "gc_film_um",
        ),
    ];
    for (sources, file, column) in checks {
        let err = Catalogue::from_sources(&sources).unwrap_err().to_string();
        assert!(
            err.contains(file) && err.contains(&format!("`{column}`")),
            "{err}"
        );
    }
}

#[test]
fn catalogue_serialises_to_json() {
    let json = serde_json::to_string(catalogue()).unwrap_or_default();
    assert!(
        json.contains("\"id\":\"rp-c18\"") && json.contains("\"mode\":\"ic-anion\""),
        "{}",
        &json[..json.len().min(300)]
    );
    assert!(json.contains("\"chem_class\":\"porous_graphitic_carbon\""));
}
