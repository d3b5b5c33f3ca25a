//! Bare names of compounds with stereoisomers (sugars, sugar alcohols, α-amino acids) resolve
//! to the isomer a practitioner means, never to a stereo-less record that merely carries a
//! stripped name (`hexopyranose` for mannose, `hexitol` for mannitol) nor to the unnatural
//! enantiomer. Expected CAS numbers: from memory (the CAS numbers of the D-sugars, D-polyols
//! and L-amino acids as sold for standards); the convention that a bare amino-acid name is the
//! L-isomer and a bare sugar name the D-sugar is common practice, no source.

mod common;

use common::Ctx;

fn lookup(ctx: &Ctx, names: &[&str]) -> Vec<serde_json::Value> {
    let mut args = vec!["lookup", "--format", "json"];
    args.extend_from_slice(names);
    let (v, code) = ctx.json(&args);
    assert_eq!(code, 0, "{v}");
    v["analytes"].as_array().expect("analytes").clone()
}

#[test]
fn bare_names_of_stereoisomers_resolve_to_the_usual_isomer() {
    let ctx = Ctx::new();
    let cases = [
        ("fructose", "57-48-7"),
        ("mannitol", "69-65-8"),
        ("sorbitol", "50-70-4"),
        ("alanine", "56-41-7"),
        ("glutamic acid", "56-86-0"),
        ("proline", "147-85-3"),
        ("serine", "56-45-1"),
        ("leucine", "61-90-5"),
        ("valine", "72-18-4"),
        ("threonine", "72-19-5"),
    ];
    let names: Vec<&str> = cases.iter().map(|c| c.0).collect();
    let got = lookup(&ctx, &names);
    assert_eq!(got.len(), cases.len());
    for (a, (q, cas)) in got.iter().zip(cases) {
        assert_eq!(a["query"], q);
        assert_eq!(a["cas"], cas, "{q}: {a}");
        assert!(
            a["smiles"].as_str().is_some_and(|s| s.contains('@')),
            "{q} keeps its stereo: {a}"
        );
    }
}

#[test]
fn a_sugar_name_never_becomes_a_stereo_less_generic_ring() {
    let ctx = Ctx::new();
    for a in lookup(
        &ctx,
        &["mannose", "galactose", "glucose", "xylose", "arabinose"],
    ) {
        let q = a["query"].as_str().unwrap_or_default().to_string();
        let name = a["name"].as_str().unwrap_or_default().to_lowercase();
        assert!(name.contains(&q), "{q} resolved to {name}");
        assert!(
            a["smiles"].as_str().is_some_and(|s| s.contains('@')),
            "{q}: {a}"
        );
    }
}

#[test]
fn a_descriptor_the_user_gives_is_kept() {
    let ctx = Ctx::new();
    for a in lookup(&ctx, &["d-alanine", "d-proline", "l-mannitol"]) {
        let q = a["query"].as_str().unwrap_or_default();
        assert_eq!(
            a["name"].as_str().map(str::to_lowercase).as_deref(),
            Some(q)
        );
    }
}

/// The key table's stored stereo facts (read by the standardisation of a name match instead of
/// parsing the record again) are what parsing the record's SMILES gives: checked on every
/// 40th record of the shipped base, and on every record with a stereo mark among them.
#[test]
fn stored_stereo_facts_match_a_fresh_parse() {
    use phasewise::structure::canon::{key_of_graph, possible_stereo_elements};
    let conn = rusqlite::Connection::open_with_flags(
        common::shipped_kb(),
        rusqlite::OpenFlags::SQLITE_OPEN_READ_ONLY,
    )
    .expect("open the shared base");
    let mut st = conn
        .prepare(
            "SELECT c.smiles, k.skeleton, k.stereo_elements, k.possible_stereo
             FROM structure_key k JOIN compound c ON c.id = k.compound_id
             WHERE k.compound_id % 40 = 0 ORDER BY k.compound_id",
        )
        .expect("key table with stereo columns");
    let rows: Vec<(String, String, i64, i64)> = st
        .query_map([], |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?, r.get(3)?)))
        .expect("query")
        .collect::<Result<_, _>>()
        .expect("rows");
    assert!(rows.len() > 1_000, "{} rows", rows.len());
    let (mut with_stereo, mut possible_without) = (0, 0);
    for (smiles, skeleton, elements, possible) in &rows {
        let parsed = phasewise::structure::parse_smiles(smiles).expect("stored records parse");
        let key = key_of_graph(&parsed.graph);
        assert_eq!(&key.skeleton, skeleton, "{smiles}");
        assert_eq!(key.stereo_elements as i64, *elements, "{smiles}");
        let expected = if key.stereo_elements == 0 {
            possible_stereo_elements(&parsed.graph) as i64
        } else {
            with_stereo += 1;
            0
        };
        if key.stereo_elements == 0 && expected > 0 {
            possible_without += 1;
        }
        assert_eq!(*possible, expected, "{smiles}");
    }
    // the sample holds both kinds, so the test can fail on either column
    assert!(
        with_stereo > 50 && possible_without > 50,
        "{with_stereo} {possible_without}"
    );
}
