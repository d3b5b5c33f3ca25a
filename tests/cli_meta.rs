//! Shell completions, manual pages and analyte tables through the binary.

mod common;

use common::{Ctx, stderr, stdout};

#[test]
fn completion_scripts_name_every_command() {
    let ctx = Ctx::new();
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let out = ctx.run(&["completions", shell]);
        assert!(out.status.success(), "{shell}: {}", stderr(&out));
        let text = stdout(&out);
        for cmd in [
            "advise",
            "predict",
            "scout",
            "suitability",
            "transfer",
            "describe",
        ] {
            assert!(text.contains(cmd), "{shell} completion lacks `{cmd}`");
        }
        assert!(
            text.contains("phases-available"),
            "{shell}: options missing"
        );
    }
    // an unknown shell is a usage error naming it
    let out = ctx.run(&["completions", "tcsh"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("tcsh"), "{}", stderr(&out));
}

#[test]
fn manual_pages_cover_every_command_with_its_example() {
    let ctx = Ctx::new();
    let dir = ctx.dir.path().join("man").join("man1");
    let out = ctx.run(&["manpages", "--output-dir", dir.to_str().unwrap()]);
    assert!(out.status.success(), "{}", stderr(&out));
    for page in [
        "phasewise.1",
        "phasewise-advise.1",
        "phasewise-kb-add.1",
        "phasewise-model-train.1",
        "phasewise-scout.1",
    ] {
        let text =
            std::fs::read_to_string(dir.join(page)).unwrap_or_else(|e| panic!("{page}: {e}"));
        assert!(
            text.starts_with(".ie") || text.contains(".TH"),
            "{page} is not roff"
        );
    }
    let advise = std::fs::read_to_string(dir.join("phasewise-advise.1")).unwrap();
    assert!(advise.contains("Example"), "advise page lacks its example");
    // no temporary files left behind
    let leftovers: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| !e.file_name().to_string_lossy().ends_with(".1"))
        .collect();
    assert!(leftovers.is_empty(), "{leftovers:?}");
    // a target that is a file, not a directory, is an error naming it
    let file = ctx.dir.path().join("plain-file");
    std::fs::write(&file, "x").unwrap();
    let out = ctx.run(&["manpages", "--output-dir", file.to_str().unwrap()]);
    assert_ne!(out.status.code(), Some(0));
    assert!(stderr(&out).contains("plain-file"), "{}", stderr(&out));
}

#[test]
fn analyte_tables_resolve_by_smiles_and_keep_their_names() {
    let ctx = Ctx::new();
    let list = ctx.dir.path().join("panel.tsv");
    // invented scenario: an unnamed process impurity given only as a structure, next to a
    // known compound given by name only
    std::fs::write(
        &list,
        "# invented panel\nname\tsmiles\tnote\ninvented impurity Q\tCC(=O)Nc1ccc(O)cc1C\tfrom a synthesis route\ncaffeine\t\tknown\n",
    )
    .unwrap();
    let out = ctx.run(&[
        "lookup",
        "--format",
        "json",
        "--input",
        list.to_str().unwrap(),
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    assert!(text.contains("invented impurity Q"), "{text}");
    assert!(text.contains("caffeine"), "{text}");
    // the structure the base does not hold comes with what phasewise computes from it
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    let q = v["analytes"]
        .as_array()
        .unwrap()
        .iter()
        .find(|a| a["query"] == "invented impurity Q")
        .unwrap();
    assert_eq!(q["formula"], "C9H11NO2", "{q}");
    let logp = q["properties"]
        .as_array()
        .unwrap()
        .iter()
        .find(|p| p["property"] == "logp")
        .expect("an estimated logP");
    assert_eq!(logp["kind"], "estimated");
    assert!(
        logp["source"].as_str().unwrap().contains("Crippen"),
        "{logp}"
    );
    // a tab in a plain list is an error naming the line, not a silent failed lookup
    std::fs::write(&list, "caffeine\nCCO\tethanol\n").unwrap();
    let out = ctx.run(&["lookup", "--input", list.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("line 2"), "{}", stderr(&out));
}
