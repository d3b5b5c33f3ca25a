//! Sections 6 to 10 of the plan: risks, system suitability, robustness and validation,
//! cautions, references.

use super::{
    Block, REFERENCES, aromatic_ring_count, chelating_group, control, is_lc, ph_str,
    provenance_haystack, suitability, uv_cutoff_nm,
};
use crate::report::advice::{AdviceReport, AnalyteSummary, Recommendation};
use crate::report::num;

/// Sections 6 to 10 (less the scouting design, section 5).
pub(super) fn risks_and_rest(
    report: &AdviceReport,
    first: Option<&Recommendation>,
    b: &mut Vec<Block>,
) {
    b.push(Block::Heading(2, "6 Risks".to_string()));
    if let Some(first) = first {
        b.push(Block::Heading(3, "Co-elution".to_string()));
        match (&first.critical_pair, first.critical_resolution) {
            (Some((x, y)), Some(rs)) if rs.is_finite() => b.push(Block::Para(format!(
                "Critical pair: {x} / {y}, predicted resolution {}.",
                num(rs, 2)
            ))),
            _ => {}
        }
        if first.coelutions.is_empty() {
            b.push(Block::Para(
                "No pair is flagged at risk of co-elution.".to_string(),
            ));
        } else {
            b.push(Block::Table {
                header: vec![
                    "pair".to_string(),
                    "probability not resolved (Rs < 1.0)".to_string(),
                    "predicted Rs".to_string(),
                    "why".to_string(),
                ],
                rows: first
                    .coelutions
                    .iter()
                    .map(|c| {
                        vec![
                            format!("{} / {}", c.a, c.b),
                            num(c.probability, 2),
                            num(c.resolution, 2),
                            c.note.clone().unwrap_or_else(|| "-".to_string()),
                        ]
                    })
                    .collect(),
            });
        }
        if let Some(bk) = &report.backup {
            if bk.changes.is_empty() {
                b.push(Block::Para(
                    "The back-up phase changes none of the flagged pairs.".to_string(),
                ));
            } else {
                // one sentence per pair: what moving to the back-up would do for it
                b.push(Block::Para(format!(
                    "If the risky pairs stay unresolved, the back-up ({}) is predicted to change \
                     them as follows:",
                    bk.recommendation.phase.name
                )));
                b.push(Block::List(
                    bk.changes
                        .iter()
                        .map(|c| {
                            let d = c.resolution_backup - c.resolution_first;
                            let outcome = if c.resolution_backup >= 1.5 {
                                "resolved on the back-up"
                            } else if d > 0.0 {
                                "better on the back-up, still below 1.5"
                            } else {
                                "no better on the back-up"
                            };
                            format!(
                                "{} / {}: Rs {} now, {} on the back-up ({outcome})",
                                c.a,
                                c.b,
                                num(c.resolution_first, 2),
                                num(c.resolution_backup, 2)
                            )
                        })
                        .collect(),
                ));
            }
        }

        b.push(Block::Heading(3, "Peak shape".to_string()));
        let mut shape = Vec::new();
        let silica = is_lc(&first.mode);
        let excluded = |a: &AnalyteSummary| first.excluded.iter().any(|e| e.analyte == a.name);
        let kept: Vec<&AnalyteSummary> = report.analytes.iter().filter(|a| !excluded(a)).collect();
        let ph_of = kept
            .iter()
            .find_map(|a| a.ionisation.as_ref().map(|i| i.ph))
            .map(ph_str)
            .unwrap_or_default();
        let cations: Vec<String> = kept
            .iter()
            .filter_map(|a| {
                let ion = a.ionisation.as_ref()?;
                (silica && ion.net_charge_e > 0.2)
                    .then(|| format!("{} ({} e)", a.name, num(ion.net_charge_e, 2)))
            })
            .collect();
        if !cations.is_empty() {
            shape.push(format!(
                "Positively charged at pH {ph_of}: {}. Bases can interact with residual silanols \
                 and tail on silica-based phases; keep the buffer strength up, or use a phase \
                 described as base-deactivated (common practice, no source).",
                cations.join(", ")
            ));
        }
        let near: Vec<&str> = kept
            .iter()
            .filter(|a| a.ionisation.as_ref().is_some_and(|i| i.near_pka))
            .map(|a| a.name.as_str())
            .collect();
        if !near.is_empty() {
            shape.push(format!(
                "A pKa within 1.5 units of pH {ph_of}: {}. Retention and peak shape move with \
                 small pH errors; prepare the buffer by weighing and check the pH before adding \
                 organic solvent (common practice, no source).",
                near.join(", ")
            ));
        }
        for a in &kept {
            if let Some(g) = a.smiles.as_deref().and_then(chelating_group) {
                shape.push(format!(
                    "{}: {g} group (SMILES text match); chelating analytes can tail or lose \
                     response on metal surfaces. Consider passivated or metal-free hardware or a \
                     chelator additive (common practice, no source).",
                    a.name
                ));
            }
        }
        if shape.is_empty() {
            b.push(Block::Para(
                "No peak-shape risk found in the data (charge at the pH, nearby pKa, chelating \
                 groups)."
                    .to_string(),
            ));
        } else {
            b.push(Block::List(shape));
        }

        b.push(Block::Heading(3, "Detectability".to_string()));
        let mut det = Vec::new();
        let detection = first.conditions.detection.to_lowercase();
        let words: Vec<&str> = detection
            .split(|c: char| !c.is_alphanumeric())
            .filter(|w| !w.is_empty())
            .collect();
        let has_word = |w: &str| words.contains(&w);
        if has_word("uv") || has_word("absorbance") {
            if let Some(cut) = first.conditions.modifier.as_deref().and_then(uv_cutoff_nm) {
                det.push(format!(
                    "UV: the modifier ({}) has a UV cutoff near {} nm (from memory); keep the \
                     wavelength well above it and check the buffer's own absorbance.",
                    first.conditions.modifier.as_deref().unwrap_or_default(),
                    num(cut, 0)
                ));
            }
            for a in report.analytes.iter().filter(|a| !excluded(a)) {
                if let Some(smi) = &a.smiles
                    && aromatic_ring_count(smi) == Some(0)
                {
                    det.push(format!(
                        "{}: no aromatic ring in its structure, so UV absorbance may be weak; \
                         use a low wavelength or a mass-sensitive detector (common practice, no \
                         source).",
                        a.name
                    ));
                }
            }
        }
        if has_word("ms") || has_word("mass") {
            let mut groups: [(&str, Vec<&str>); 3] = [
                (
                    "positive-ion electrospray should suit (charged as cations)",
                    Vec::new(),
                ),
                (
                    "negative-ion electrospray should suit (charged as anions)",
                    Vec::new(),
                ),
                (
                    "mostly neutral, electrospray response may be weak: check both polarities \
                     or a chemical-ionisation source",
                    Vec::new(),
                ),
            ];
            for a in report.analytes.iter().filter(|a| !excluded(a)) {
                if let Some(ion) = &a.ionisation {
                    let g = if ion.net_charge_e > 0.2 {
                        0
                    } else if ion.net_charge_e < -0.2 {
                        1
                    } else {
                        2
                    };
                    groups[g].1.push(a.name.as_str());
                }
            }
            for (what, names) in groups.iter().filter(|g| !g.1.is_empty()) {
                det.push(format!(
                    "MS: {}: {what} (common practice, no source).",
                    names.join(", ")
                ));
            }
        }
        if first.mode == "gc" && has_word("flame") {
            det.push(
                "Flame ionisation responds to nearly all organic analytes roughly by carbon \
                 count; heavily halogenated or oxygenated analytes respond less (common \
                 practice, no source)."
                    .to_string(),
            );
        }
        if det.is_empty() {
            b.push(Block::Para(
                "The report holds no data to judge detectability; check the response of each \
                 analyte with a standard."
                    .to_string(),
            ));
        } else {
            b.push(Block::List(det));
        }
    }
    if !report.warnings.is_empty() {
        b.push(Block::Heading(3, "Advisor warnings".to_string()));
        b.push(Block::List(report.warnings.clone()));
    }

    // 7 System suitability.
    b.push(Block::Heading(
        2,
        "7 System suitability targets".to_string(),
    ));
    b.push(Block::Para(
        "Each target with the predicted value and a verdict: meets, misses, or not evaluated \
         (with the reason)."
            .to_string(),
    ));
    b.extend(suitability::targets_blocks(first));

    // 8 Robustness and validation.
    b.extend(control::validation_outline(first));

    // 9 Cautions.
    b.push(Block::Heading(2, "9 Cautions".to_string()));
    // plain sentences (the topic id is for machines, in the JSON); the report's general
    // caution is replaced by the plan's fuller one below, never printed twice
    let mut cautions: Vec<String> = Vec::new();
    for c in report.cautions.iter().filter(|c| c.topic != "general") {
        let mut t = c.text.clone();
        if let Some(f) = t.get(..1) {
            let up = f.to_uppercase();
            t.replace_range(..1, &up);
        }
        if !t.ends_with('.') {
            t.push('.');
        }
        if !cautions.contains(&t) {
            cautions.push(t);
        }
    }
    cautions.push(
        "This plan is a computed starting point, not a validated method. Verify every \
         condition and prediction experimentally under the laboratory's own procedures; local \
         regulations, the laboratory's SOPs and licensed practice take precedence over \
         anything written here."
            .to_string(),
    );
    b.push(Block::List(cautions));

    // 10 References.
    b.push(Block::Heading(2, "10 References".to_string()));
    let hay = provenance_haystack(report);
    let mut refs: Vec<String> = REFERENCES
        .iter()
        .filter(|r| r.needles.iter().any(|n| hay.contains(n)))
        .map(|r| format!("[{}] {}", r.key, r.citation))
        .collect();
    refs.push(
        "[suitability] System-suitability quantities as defined in the general chromatography \
         chapters of the major pharmacopoeias (USP <621>, Ph. Eur. 2.2.46)."
            .to_string(),
    );
    let mut ids: Vec<&str> = report
        .recommendations
        .iter()
        .chain(report.backup.as_ref().map(|b| &b.recommendation))
        .flat_map(|r| r.reasons.iter().map(|x| x.source.as_str()))
        .collect();
    ids.sort_unstable();
    ids.dedup();
    if !ids.is_empty() {
        refs.push(format!(
            "[rules] phasewise rule and model ids used in this plan (documented in the \
             phasewise docs): {}.",
            ids.join(", ")
        ));
    }
    b.push(Block::List(refs));
}
