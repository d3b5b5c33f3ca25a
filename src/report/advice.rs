//! The `advise` report model: the JSON schema of `phasewise advise --format json` (documented
//! field by field in `docs/json-schema.md`, versioned by [`super::SCHEMA_VERSION`]) and the
//! input of the method-plan renderers.

use serde::{Deserialize, Serialize};

use crate::kb::resolve::Unresolved;
use crate::property::Property;

/// Everything `advise` found, best recommendation first.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AdviceReport {
    /// JSON schema version.
    pub schema_version: u32,
    /// phasewise version that wrote the report.
    pub phasewise_version: String,
    /// The resolved analytes with the properties that drove the decision.
    pub analytes: Vec<AnalyteSummary>,
    /// Queries that did not resolve, with suggestions.
    pub unresolved: Vec<Unresolved>,
    /// Recommendations, best first (`rank` 1 is the recommendation).
    pub recommendations: Vec<Recommendation>,
    /// The orthogonal back-up to the first recommendation, if one was found.
    pub backup: Option<Backup>,
    /// Modes considered and how each scored for the list as a whole.
    pub mode_scores: Vec<ModeScore>,
    /// Non-fatal problems (estimated properties used for decisions, analytes the models could
    /// not predict, etc.).
    pub warnings: Vec<String>,
    /// Safety notes that apply to the recommended conditions.
    pub cautions: Vec<Caution>,
}

/// One analyte as the advisor saw it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AnalyteSummary {
    /// What the user typed.
    pub query: String,
    /// The user's own label (a table's `name` cell, the label of `label=SMILES`, or the text
    /// typed when it differs from the resolved name); `null` when the user gave none. Tables
    /// show it first, then `name`.
    #[serde(default)]
    pub label: Option<String>,
    /// Preferred name.
    pub name: String,
    /// InChIKey, when known.
    pub inchikey: Option<String>,
    /// SMILES used for structure-based estimates.
    pub smiles: Option<String>,
    /// Properties with value, unit, kind and source (experimental or estimated), including
    /// the estimates computed from structure for this run (logP, pKa sites, boiling point,
    /// TPSA, charge) and logD at the recommended pH.
    pub properties: Vec<Property>,
    /// Ionisation at the recommended pH, when the first recommendation is an LC mode.
    pub ionisation: Option<IonisationSummary>,
    /// GC verdict: `suitable`, `suitable after derivatisation` or `unsuitable`, with reasons.
    pub gc_suitability: String,
    /// Reasons behind the GC verdict.
    pub gc_reasons: Vec<String>,
}

/// Charge state at a pH.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct IonisationSummary {
    /// pH.
    pub ph: f64,
    /// Mean net charge (elementary charges).
    pub net_charge_e: f64,
    /// Fraction in the neutral form, 0–1.
    pub fraction_neutral: f64,
    /// Label: `neutral`, `cationic`, `anionic`, `zwitterionic`, `permanently charged`.
    pub charge_state: String,
    /// logD at this pH (estimated unless stated otherwise in `properties`).
    pub log_d: Option<f64>,
    /// True when a pKa lies within 1.5 units of the pH (peak shape and retention sensitive to
    /// small pH changes).
    pub near_pka: bool,
}

/// How a separation mode scored for the whole list.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModeScore {
    /// Mode: `gc`, `rp`, `hilic`, `ic-anion`, `ic-cation`, `ion-exclusion`.
    pub mode: String,
    /// Score 0–1 for the list as a whole: the mean per-analyte fit plus the stated
    /// `preference` (capped at 1). Both the mode table and the ranking of recommendations use
    /// this score.
    pub score: f64,
    /// Mean per-analyte fit, 0–1 (before the preference).
    #[serde(default)]
    pub fit: f64,
    /// The usual-first-choice preference added to `fit`, with its reason (`weight` is the
    /// amount); `None` for modes without one.
    #[serde(default)]
    pub preference: Option<Reason>,
    /// Analytes that fit the mode.
    pub fitting: usize,
    /// Analytes that do not, with the reason.
    pub not_fitting: Vec<Excluded>,
}

/// An analyte left out of a recommendation, and what would serve it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Excluded {
    /// Analyte name.
    pub analyte: String,
    /// Why it does not fit.
    pub reason: String,
    /// The mode that would serve it.
    pub better_mode: Option<String>,
}

/// One recommended method.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Recommendation {
    /// 1 = first choice.
    pub rank: u32,
    /// Separation mode (see [`ModeScore::mode`]).
    pub mode: String,
    /// Stationary phase.
    pub phase: PhaseRef,
    /// Overall score 0–1 (higher is better).
    pub score: f64,
    /// Starting conditions.
    pub conditions: Conditions,
    /// Predicted retention of every analyte, in elution order.
    pub predictions: Vec<PredictionRow>,
    /// Pairs at risk of co-elution, most likely first.
    pub coelutions: Vec<Coelution>,
    /// Why this phase and these conditions: each reason names its rule or model number.
    pub reasons: Vec<Reason>,
    /// Analytes outside this mode, with why and what would serve them.
    pub excluded: Vec<Excluded>,
    /// Predicted minimum resolution over adjacent pairs (dimensionless).
    pub critical_resolution: Option<f64>,
    /// The critical pair (names).
    pub critical_pair: Option<(String, String)>,
    /// Analytes this recommendation predicts; with `total_analytes` the table shows
    /// "predicted for n of m analytes". Analytes not predicted count against the method.
    #[serde(default)]
    pub predicted_analytes: usize,
    /// Analytes in the request.
    #[serde(default)]
    pub total_analytes: usize,
}

/// A stationary phase as shown in reports.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PhaseRef {
    /// Catalogue id (e.g. `rp-c18`).
    pub id: String,
    /// Generic name.
    pub name: String,
    /// Chemistry description.
    pub chemistry: String,
}

/// A reason behind a score.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Reason {
    /// Rule id (e.g. `rule:pi-rich-analytes`) or model id (e.g. `model:lc-regression`).
    pub source: String,
    /// Plain sentence.
    pub text: String,
    /// Contribution to the score (positive helps), if the reason moved it.
    pub weight: Option<f64>,
}

/// One gradient or oven-program step.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ProgramStep {
    /// Time from injection, min.
    pub time_min: f64,
    /// In the unit of [`Conditions::program_unit`]: % organic or % B (LC), eluent concentration
    /// in mM (IC), or oven temperature in °C (GC).
    pub value: f64,
}

/// Starting conditions. Fields that do not apply to the mode are `None`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Conditions {
    /// Column length, mm.
    pub column_length_mm: f64,
    /// Column inner diameter, mm.
    pub column_id_mm: f64,
    /// Particle size (LC), µm.
    pub particle_um: Option<f64>,
    /// Film thickness (GC), µm.
    pub film_um: Option<f64>,
    /// Mobile phase A (LC: aqueous with buffer; IC: eluent).
    pub mobile_phase_a: Option<String>,
    /// Mobile phase B (LC: organic modifier).
    pub mobile_phase_b: Option<String>,
    /// Organic modifier id (`acetonitrile`, `methanol`).
    pub modifier: Option<String>,
    /// Aqueous pH (LC).
    pub ph: Option<f64>,
    /// Buffer or additive, with concentration.
    pub buffer: Option<String>,
    /// How to prepare the buffer.
    pub buffer_preparation: Option<String>,
    /// Gradient, eluent or oven program (values in `program_unit`).
    pub program: Vec<ProgramStep>,
    /// What `program` values are: `% organic` (RP, and LC programs the user gave), `% B (...)`
    /// with B's composition (the advisor's HILIC programs), `mM <eluent>` (IC), `°C` (GC).
    pub program_unit: String,
    /// Flow, mL/min (LC, IC) or carrier linear velocity in cm/s (GC, see `carrier_gas`).
    pub flow_ml_min: Option<f64>,
    /// Column temperature, °C (LC, IC).
    pub temperature_c: Option<f64>,
    /// Carrier gas (GC).
    pub carrier_gas: Option<String>,
    /// Carrier linear velocity, cm/s (GC).
    pub linear_velocity_cm_s: Option<f64>,
    /// Inlet mode (GC): split, splitless, headspace.
    pub inlet: Option<String>,
    /// Derivatisation advice (GC).
    pub derivatisation: Option<String>,
    /// Suppression (IC).
    pub suppression: Option<String>,
    /// Injection volume guidance.
    pub injection: String,
    /// Detector and its settings.
    pub detection: String,
    /// Column dead time, min.
    pub dead_time_min: f64,
    /// Estimated plate number of the column (dimensionless).
    pub plate_number: f64,
    /// Run time, min.
    pub run_time_min: f64,
    /// Estimated back pressure, bar (LC), if computed.
    pub pressure_bar: Option<f64>,
}

/// Predicted retention of one analyte.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PredictionRow {
    /// Analyte name.
    pub analyte: String,
    /// Predicted retention time, min.
    pub retention_time_min: f64,
    /// Lower end of the prediction interval, min.
    pub interval_low_min: f64,
    /// Upper end of the prediction interval, min.
    pub interval_high_min: f64,
    /// Coverage of the interval (e.g. 0.9).
    pub interval_coverage: f64,
    /// Retention factor at elution (dimensionless).
    pub retention_factor: f64,
    /// Predicted peak width at half height, min.
    pub peak_width_half_min: f64,
    /// Which path predicted it (`scouting fit`, `memory`, `descriptor`, `retention-index`,
    /// `ion-table`, ...).
    pub path: String,
    /// For the `scouting fit` path: the user's source text of the stored runs; for `memory`
    /// with the user's stored fits among the sources: those sources' ids.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub path_source: Option<String>,
    /// Retention index (GC) where applicable.
    pub retention_index: Option<f64>,
    /// For `memory` predictions, the ids of the source systems (RepoRT dataset ids) whose
    /// measurements were projected onto this system; empty for every other path.
    #[serde(default)]
    pub source_systems: Vec<String>,
}

impl PredictionRow {
    /// The path with the user's source when there is one, e.g.
    /// `scouting fit (notebook 12 p. 4)`, for tables.
    pub fn path_label(&self) -> String {
        match &self.path_source {
            Some(src) => format!("{} ({src})", self.path),
            None => self.path.clone(),
        }
    }
}

/// A pair at risk of co-eluting.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Coelution {
    /// First analyte (earlier predicted).
    pub a: String,
    /// Second analyte.
    pub b: String,
    /// Probability 0–1 that the pair is not resolved (resolution below 1.0).
    pub probability: f64,
    /// Predicted resolution (dimensionless).
    pub resolution: f64,
    /// Why the pair is hard (e.g. positional isomers), if a rule flagged it.
    pub note: Option<String>,
}

/// The orthogonal back-up.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Backup {
    /// The back-up recommendation (full detail, `rank` 0).
    pub recommendation: Recommendation,
    /// What it changes for the first choice's risky pairs.
    pub changes: Vec<PairChange>,
    /// Why it is orthogonal.
    pub why: String,
}

/// How a pair's resolution changes on the back-up phase.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct PairChange {
    /// First analyte.
    pub a: String,
    /// Second analyte.
    pub b: String,
    /// Resolution on the first choice.
    pub resolution_first: f64,
    /// Resolution on the back-up.
    pub resolution_backup: f64,
}

/// A safety note.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Caution {
    /// Topic: `solvent`, `pressure`, `ph`, `gas`, `general`.
    pub topic: String,
    /// The note.
    pub text: String,
}

impl AdviceReport {
    /// Render as aligned text tables (the default output of `advise`).
    pub fn render_table(&self) -> String {
        use super::num;
        use super::table::{printable, render};
        let mut out = String::new();
        out.push_str(
            "Modes for the whole list (score 0-1 = mean fit + preference; ranks the recommendations)\n",
        );
        let rows: Vec<Vec<String>> = self
            .mode_scores
            .iter()
            .map(|m| {
                vec![
                    m.mode.clone(),
                    num(m.score, 2),
                    num(m.fit, 2),
                    m.preference
                        .as_ref()
                        .and_then(|p| p.weight)
                        .map_or("-".into(), |w| format!("{w:+.2}")),
                    format!("{} of {}", m.fitting, self.analytes.len()),
                ]
            })
            .collect();
        out.push_str(&render(
            &[
                "mode",
                "score",
                "mean fit",
                "preference",
                "analytes fitting",
            ],
            &rows,
        ));
        out.push('\n');
        for p in self
            .mode_scores
            .iter()
            .filter_map(|m| m.preference.as_ref())
        {
            out.push_str(&format!(
                "  - [{}{}] {}\n",
                p.source,
                reason_weight(p),
                printable(&p.text)
            ));
        }
        for (i, r) in self.recommendations.iter().enumerate() {
            let label = if i == 0 {
                "Recommendation"
            } else {
                "Alternative"
            };
            out.push_str(&format!(
                "\n{label} {}: {} on {} [{}], score {}\n",
                r.rank,
                r.mode,
                r.phase.name,
                r.phase.id,
                num(r.score, 2)
            ));
            if i > 0 {
                continue;
            }
            out.push_str(&conditions_text(&r.conditions));
            out.push_str(&predictions_table(r));
            for reason in &r.reasons {
                out.push_str(&format!(
                    "  - [{}{}] {}\n",
                    reason.source,
                    reason_weight(reason),
                    printable(&reason.text)
                ));
            }
            for e in &r.excluded {
                out.push_str(&format!(
                    "  ! {} does not fit {}: {}{}\n",
                    printable(&e.analyte),
                    r.mode,
                    e.reason,
                    e.better_mode
                        .as_ref()
                        .map(|m| format!("; try {m}"))
                        .unwrap_or_default()
                ));
            }
        }
        if let Some(b) = &self.backup {
            let r = &b.recommendation;
            out.push_str(&format!(
                "\nOrthogonal back-up: {} on {} [{}], score {} ({})\n",
                r.mode,
                r.phase.name,
                r.phase.id,
                num(r.score, 2),
                b.why
            ));
            for c in &b.changes {
                out.push_str(&format!(
                    "  {} / {}: resolution {} -> {}\n",
                    printable(&c.a),
                    printable(&c.b),
                    num(c.resolution_first, 2),
                    num(c.resolution_backup, 2)
                ));
            }
        }
        if !self.unresolved.is_empty() {
            out.push_str("\nUnresolved (not advised on)\n");
            for u in &self.unresolved {
                let s: Vec<&str> = u.suggestions.iter().map(|s| s.compound.as_str()).collect();
                out.push_str(&format!(
                    "  {}: {}{}\n",
                    printable(&u.query),
                    u.reason,
                    if s.is_empty() {
                        String::new()
                    } else {
                        format!("; did you mean: {}", s.join(", "))
                    }
                ));
            }
            out.push_str(&super::candidates::candidate_table(&self.unresolved));
        }
        if !self.warnings.is_empty() {
            out.push_str("\nWarnings\n");
            for w in &self.warnings {
                out.push_str(&format!("  - {}\n", printable(w)));
            }
        }
        out.push_str("\nCautions\n");
        for c in &self.cautions {
            // plain sentences: the topic (`solvent`, `ph`) stays in the JSON, not in the table
            let mut chars = c.text.chars();
            let text = match chars.next() {
                Some(first) => first.to_uppercase().chain(chars).collect::<String>(),
                None => String::new(),
            };
            out.push_str(&format!("  - {text}\n"));
        }
        out
    }
}

/// How a reason's weight is shown in the table: `, weight +0.12`; a rule of weight 0 is
/// `, weight 0: noted, not scored` so that it does not read as a supporting reason.
pub fn reason_weight(r: &Reason) -> String {
    match r.weight {
        Some(0.0) => ", weight 0: noted, not scored".into(),
        Some(w) => format!(", weight {w:+.2}"),
        None => String::new(),
    }
}

/// Column names of [`AdviceReport::render_delimited`], in order.
pub const DELIMITED_COLUMNS: [&str; 13] = [
    "role",
    "rank",
    "mode",
    "phase_id",
    "analyte",
    "retention_time_min",
    "interval_low_min",
    "interval_high_min",
    "interval_coverage",
    "retention_factor",
    "peak_width_half_min",
    "retention_index",
    "path",
];

impl AdviceReport {
    /// Render as CSV (`delim` ',') or TSV ('\t'): a header row, then one row per predicted
    /// analyte of each listed recommendation (`role` `recommendation`, `rank` 1, 2, ...) and of
    /// the back-up (`role` `backup`, `rank` 0), in elution order; an empty `retention_index`
    /// cell where none applies. Numbers follow the CSV rule of [`super::csv_num`].
    pub fn render_delimited(&self, delim: char) -> String {
        use super::{csv_cell, csv_num, csv_opt};
        let d = delim.to_string();
        let mut out = DELIMITED_COLUMNS.join(&d);
        out.push('\n');
        let recs = self
            .recommendations
            .iter()
            .map(|r| ("recommendation", r))
            .chain(self.backup.iter().map(|b| ("backup", &b.recommendation)));
        for (role, r) in recs {
            for p in &r.predictions {
                let cells = [
                    role.to_string(),
                    r.rank.to_string(),
                    csv_cell(&r.mode, delim),
                    csv_cell(&r.phase.id, delim),
                    csv_cell(&p.analyte, delim),
                    csv_num(p.retention_time_min, None),
                    csv_num(p.interval_low_min, None),
                    csv_num(p.interval_high_min, None),
                    csv_num(p.interval_coverage, None),
                    csv_num(p.retention_factor, None),
                    csv_num(p.peak_width_half_min, None),
                    csv_opt(p.retention_index, None),
                    csv_cell(&p.path, delim),
                ];
                out.push_str(&cells.join(&d));
                out.push('\n');
            }
        }
        out
    }
}

fn conditions_text(c: &Conditions) -> String {
    use super::num;
    let mut s = String::new();
    let col = if c.program_unit == "°C" {
        format!(
            "{} m x {} mm, film {} µm",
            num(c.column_length_mm / 1000.0, 1),
            num(c.column_id_mm, 2),
            num(c.film_um.unwrap_or(0.0), 2)
        )
    } else {
        format!(
            "{} x {} mm, {} µm particles",
            num(c.column_length_mm, 0),
            num(c.column_id_mm, 1),
            num(c.particle_um.unwrap_or(0.0), 1)
        )
    };
    s.push_str(&format!("  column: {col}\n"));
    if let Some(a) = &c.mobile_phase_a {
        s.push_str(&format!("  mobile phase A: {a}\n"));
    }
    if let Some(b) = &c.mobile_phase_b {
        s.push_str(&format!("  mobile phase B: {b}\n"));
    }
    if let Some(p) = &c.buffer_preparation {
        s.push_str(&format!("  preparation: {p}\n"));
    }
    let prog: Vec<String> = c
        .program
        .iter()
        .map(|p| {
            format!(
                "{} min {} {}",
                num(p.time_min, 1),
                num(p.value, 1),
                c.program_unit
            )
        })
        .collect();
    s.push_str(&format!("  program: {}\n", prog.join(" -> ")));
    if let Some(f) = c.flow_ml_min {
        s.push_str(&format!("  flow: {} mL/min\n", num(f, 3)));
    }
    if let Some(t) = c.temperature_c {
        s.push_str(&format!("  column temperature: {} °C\n", num(t, 0)));
    }
    if let Some(g) = &c.carrier_gas {
        s.push_str(&format!(
            "  carrier: {g}, {} cm/s\n",
            num(c.linear_velocity_cm_s.unwrap_or(0.0), 0)
        ));
    }
    if let Some(i) = &c.inlet {
        s.push_str(&format!("  inlet: {i}\n"));
    }
    if let Some(d) = &c.derivatisation {
        s.push_str(&format!("  derivatisation: {d}\n"));
    }
    if let Some(x) = &c.suppression {
        s.push_str(&format!("  suppression: {x}\n"));
    }
    s.push_str(&format!(
        "  injection: {}\n  detection: {}\n",
        c.injection, c.detection
    ));
    s.push_str(&format!(
        "  dead time {} min, estimated plate number {}, run time {} min{}\n",
        num(c.dead_time_min, 2),
        num(c.plate_number, 0),
        num(c.run_time_min, 1),
        c.pressure_bar
            .map(|p| format!(", estimated back pressure {} bar", num(p, 0)))
            .unwrap_or_default()
    ));
    s
}

fn predictions_table(r: &Recommendation) -> String {
    use super::num;
    let rows: Vec<Vec<String>> = r
        .predictions
        .iter()
        .map(|p| {
            let (rt, interval, k) = super::elution_cells(
                p.retention_time_min,
                p.interval_low_min,
                p.interval_high_min,
                p.retention_factor,
                r.conditions.run_time_min,
            );
            vec![
                p.analyte.clone(),
                rt,
                interval,
                k,
                num(p.peak_width_half_min, 3),
                p.retention_index.map_or("-".into(), |ri| num(ri, 0)),
                p.path_label(),
            ]
        })
        .collect();
    let mut s = super::table::render(
        &[
            "analyte",
            "tR (min)",
            "interval (min)",
            "k",
            "w½ (min)",
            "RI",
            "predicted by",
        ],
        &rows,
    );
    s.push('\n');
    if !r.coelutions.is_empty() {
        let rows: Vec<Vec<String>> = r
            .coelutions
            .iter()
            .map(|c| {
                vec![
                    c.a.clone(),
                    c.b.clone(),
                    num(c.probability, 2),
                    num(c.resolution, 2),
                    c.note.clone().unwrap_or_default(),
                ]
            })
            .collect();
        s.push_str("Co-elution risks\n");
        s.push_str(&super::table::render(
            &[
                "analyte a",
                "analyte b",
                "probability",
                "resolution",
                "note",
            ],
            &rows,
        ));
        s.push('\n');
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rule_weights_are_shown_and_weight_0_reads_as_not_scored() {
        let r = |w| Reason {
            source: "rule:x".into(),
            text: "t".into(),
            weight: w,
        };
        assert_eq!(reason_weight(&r(Some(0.12))), ", weight +0.12");
        assert_eq!(reason_weight(&r(Some(-0.05))), ", weight -0.05");
        assert!(reason_weight(&r(Some(0.0))).contains("not scored"));
        assert_eq!(reason_weight(&r(None)), "");
    }

    /// Issue 16: cautions in the table are plain sentences; the topic (`solvent`, `ph`) is a
    /// JSON field, not a prefix a reader has to decode.
    #[test]
    fn table_cautions_are_sentences_without_topic_tags() {
        let mut report: AdviceReport =
            serde_json::from_str(include_str!("../../tests/data/plan/lc_impurity_panel.json"))
                .unwrap();
        report.cautions = vec![
            Caution {
                topic: "solvent".into(),
                text: "acetonitrile: highly flammable liquid and vapour".into(),
            },
            Caution {
                topic: "ph".into(),
                text: "keep the mobile-phase pH inside the column's stated range".into(),
            },
        ];
        let table = report.render_table();
        let block = &table[table.find("\nCautions\n").expect("cautions block")..];
        assert!(
            block.contains("  - Acetonitrile: highly flammable"),
            "{block}"
        );
        assert!(block.contains("  - Keep the mobile-phase pH"), "{block}");
        assert!(
            !block.contains("[solvent]") && !block.contains("[ph]"),
            "{block}"
        );
    }
}
