//! The parts of the plan that make it a controlled document: the document-control block, the
//! analytical target profile, sample and standard preparation, the scouting design, the
//! equilibration/blank/carry-over sequence, and the robustness and validation outline. Fields
//! the program cannot know are left as visible blanks to fill ("to be completed"), never
//! invented.

use super::Block;
use crate::report::advice::{AdviceReport, Recommendation};
use crate::report::num;

/// What the program cannot know about the document: identifiers, people, the sample. Every
/// field left `None` prints as a blank to fill.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct DocumentControl {
    /// Document identifier in the lab's document system.
    pub document_id: Option<String>,
    /// Version or revision (default "draft 0.1").
    pub version: Option<String>,
    /// Author, reviewer and approver names (signature and date are always left blank).
    pub author: Option<String>,
    /// Reviewer name.
    pub reviewer: Option<String>,
    /// Approver name.
    pub approver: Option<String>,
    /// Checksum (build hash) of the knowledge base that resolved the analytes.
    pub kb_checksum: Option<String>,
    /// Checksum of the retention-model files.
    pub model_checksum: Option<String>,
    /// Sample matrix (analytical target profile).
    pub matrix: Option<String>,
    /// Working range, e.g. "0.05 to 1.5 mg/mL" or "reporting threshold to 120 %".
    pub range: Option<String>,
    /// Required precision, e.g. "RSD ≤ 2 % at 100 %".
    pub precision: Option<String>,
}

/// Text printed for a field the user must fill in.
pub const TO_FILL: &str = "to be completed";

fn or_fill(v: &Option<String>) -> String {
    v.clone().unwrap_or_else(|| TO_FILL.to_string())
}

/// Document-control block: identity of the document, of the software and data that wrote it,
/// and the signature table.
pub fn document_control(
    report: &AdviceReport,
    ctl: &DocumentControl,
    date: Option<&str>,
) -> Vec<Block> {
    let row = |a: &str, b: String| vec![a.to_string(), b];
    vec![
        Block::Heading(2, "Document control".to_string()),
        Block::Table {
            header: vec!["field".to_string(), "entry".to_string()],
            rows: vec![
                row("document identifier", or_fill(&ctl.document_id)),
                row(
                    "version",
                    ctl.version
                        .clone()
                        .unwrap_or_else(|| "draft 0.1".to_string()),
                ),
                row("status", "draft for review (computed, not verified)".into()),
                row(
                    "date written",
                    date.map(str::to_string)
                        .unwrap_or_else(|| "not recorded (written with the date off)".into()),
                ),
                row(
                    "written by",
                    format!(
                        "phasewise {} (advice report schema {})",
                        report.phasewise_version, report.schema_version
                    ),
                ),
                row(
                    "knowledge base checksum",
                    ctl.kb_checksum
                        .clone()
                        .unwrap_or_else(|| "not recorded".into()),
                ),
                row(
                    "retention model checksum",
                    ctl.model_checksum
                        .clone()
                        .unwrap_or_else(|| "not recorded".into()),
                ),
            ],
        },
        Block::Table {
            header: vec![
                "role".to_string(),
                "name".to_string(),
                "signature".to_string(),
                "date".to_string(),
            ],
            rows: [
                ("author", &ctl.author),
                ("reviewer", &ctl.reviewer),
                ("approver", &ctl.approver),
            ]
            .into_iter()
            .map(|(role, name)| {
                vec![
                    role.to_string(),
                    or_fill(name),
                    String::new(),
                    String::new(),
                ]
            })
            .collect(),
        },
    ]
}

/// Analytical target profile: what the method must achieve, filled where known.
pub fn target_profile(report: &AdviceReport, ctl: &DocumentControl) -> Vec<Block> {
    let names: Vec<&str> = report.analytes.iter().map(|a| a.name.as_str()).collect();
    let row = |a: &str, b: String| vec![a.to_string(), b];
    vec![
        Block::Heading(2, "Analytical target profile".to_string()),
        Block::Para(
            "What the method has to achieve; the entries marked to be completed come from the \
             laboratory, not from this program."
                .to_string(),
        ),
        Block::Table {
            header: vec!["item".to_string(), "requirement".to_string()],
            rows: vec![
                row("analytes", names.join(", ")),
                row("sample matrix", or_fill(&ctl.matrix)),
                row("working range (concentration)", or_fill(&ctl.range)),
                row("required precision", or_fill(&ctl.precision)),
                row("required accuracy (recovery)", TO_FILL.into()),
                row("quantitation limit needed", TO_FILL.into()),
                row(
                    "intended use (assay, impurities, identification)",
                    TO_FILL.into(),
                ),
            ],
        },
    ]
}

/// Sample and standard preparation placeholders, with the diluent suggested from the
/// starting conditions.
pub fn preparation(first: Option<&Recommendation>) -> Vec<Block> {
    let diluent = match first {
        Some(r) if r.mode == "gc" => {
            "a volatile solvent that elutes before the analytes and dissolves them (to be chosen)"
                .to_string()
        }
        Some(r) => {
            let start = r
                .conditions
                .program
                .first()
                .map(|p| format!(" ({} % organic)", num(p.value, 0)))
                .unwrap_or_default();
            format!(
                "the starting mobile phase{start} or weaker, so that early peaks are not \
                 distorted (common practice, no source)"
            )
        }
        None => TO_FILL.to_string(),
    };
    vec![
        Block::Heading(3, "Sample and standard preparation".to_string()),
        Block::Table {
            header: vec!["item".to_string(), "entry".to_string()],
            rows: vec![
                vec!["diluent".into(), diluent],
                vec![
                    "standard stock solutions (substance, lot, weighed amount, volume)".into(),
                    TO_FILL.into(),
                ],
                vec![
                    "working standards (levels across the range)".into(),
                    TO_FILL.into(),
                ],
                vec![
                    "system-suitability solution".into(),
                    "a mixture containing at least the critical pair at about the working \
                     concentration"
                        .into(),
                ],
                vec![
                    "sample preparation (weighing, extraction, filtration)".into(),
                    TO_FILL.into(),
                ],
                vec![
                    "solution stability (time and storage)".into(),
                    TO_FILL.into(),
                ],
            ],
        },
    ]
}

/// Scouting design: which runs to do first, under which conditions, and what to decide.
pub fn scouting_design(report: &AdviceReport, first: &Recommendation) -> Vec<Block> {
    let mut runs: Vec<Vec<String>> = Vec::new();
    let program: Vec<String> = first
        .conditions
        .program
        .iter()
        .map(|p| format!("{}:{}", num(p.time_min, 1), num(p.value, 0)))
        .collect();
    let spec = program.join(",");
    let col = format!(
        "{} × {} mm",
        num(first.conditions.column_length_mm, 0),
        num(first.conditions.column_id_mm, 2)
    );
    if first.mode == "gc" {
        runs.push(vec![
            "1".into(),
            format!(
                "{} ({col}), oven {spec} ({})",
                first.phase.name, first.conditions.program_unit
            ),
            "retention of every analyte at the starting ramp".into(),
        ]);
        runs.push(vec![
            "2".into(),
            "same column, ramp rate 2 to 3 times slower (or faster)".into(),
            "second ramp for the fit ln k = A + B/T (`phasewise scout --mode gc`)".into(),
        ]);
    } else {
        runs.push(vec![
            "1".into(),
            format!("{} ({col}), gradient {spec}", first.phase.name),
            "retention of every analyte, first look at the critical pair".into(),
        ]);
        if program.len() >= 2 {
            runs.push(vec![
                "2".into(),
                "same column and eluents, gradient time three times longer".into(),
                "second gradient time for the fit of log kw and S (`phasewise scout`)".into(),
            ]);
        }
    }
    if let Some(bk) = &report.backup {
        runs.push(vec![
            (runs.len() + 1).to_string(),
            format!(
                "back-up: {} at its own starting conditions",
                bk.recommendation.phase.name
            ),
            "an orthogonal selectivity in case the critical pair stays unresolved".into(),
        ]);
    }
    vec![
        Block::Heading(2, "5 Scouting design".to_string()),
        Block::Table {
            header: vec![
                "run".to_string(),
                "conditions".to_string(),
                "purpose".to_string(),
            ],
            rows: runs,
        },
        Block::Para("Decisions from the scouting runs:".to_string()),
        Block::List(vec![
            "every analyte found and identified (standards injected singly where peaks are in \
             doubt)?"
                .to_string(),
            "first peak with k ≥ 1 (clear of the unretained front)? If not, start weaker."
                .to_string(),
            "critical pair with Rs ≥ 1.5 after optimising the fitted program (`phasewise \
             scout`)? If not, move to the back-up phase or change pH or modifier."
                .to_string(),
            "retention times of the two runs consistent with the fit (residuals under 2 % of \
             tR)? If not, repeat the run before trusting the optimum."
                .to_string(),
        ]),
    ]
}

/// Equilibration, blank and carry-over steps of every sequence.
pub fn sequence_steps(first: &Recommendation) -> Vec<Block> {
    let mut steps = Vec::new();
    if first.mode != "gc" {
        let vm = 0.5
            * (first.conditions.column_length_mm / 10.0)
            * (first.conditions.column_id_mm / 10.0).powi(2);
        let eq = match first.conditions.flow_ml_min {
            Some(f) if f > 0.0 && vm > 0.0 => format!(
                " (column volume about {} mL: {} min at {} mL/min)",
                num(vm, 2),
                num(10.0 * vm / f, 1),
                num(f, 2)
            ),
            _ => String::new(),
        };
        steps.push(format!(
            "Equilibrate with at least 10 column volumes of the starting eluent before the \
             first injection and between gradient runs{eq} (common practice, no source)."
        ));
    } else {
        steps.push(
            "Condition the column at its maximum programmed temperature (never above the \
             phase's limit) and run one blank temperature program before the first injection \
             (common practice, no source)."
                .to_string(),
        );
    }
    steps.push(
        "Inject a blank (diluent) before the standards: no peak above the reporting threshold \
         at the analytes' retention times."
            .to_string(),
    );
    steps.push(
        "Inject the system-suitability solution and check the targets of the system-suitability \
         section before samples."
            .to_string(),
    );
    steps.push(
        "Carry-over: inject a blank after the highest standard; the analyte response in it \
         should stay below the quantitation limit (common practice, no source)."
            .to_string(),
    );
    vec![
        Block::Heading(3, "Equilibration, blanks and carry-over".to_string()),
        Block::List(steps),
    ]
}

/// Robustness and validation outline named after the ICH Q2(R2) performance characteristics.
pub fn validation_outline(first: Option<&Recommendation>) -> Vec<Block> {
    let mut factors = vec![
        "column from a second lot of the same phase".to_string(),
        "column temperature ± 5 °C".to_string(),
        "flow ± 10 %".to_string(),
    ];
    if let Some(r) = first {
        if r.mode == "gc" {
            factors = vec![
                "column from a second lot of the same phase".to_string(),
                "initial oven temperature ± 5 °C, ramp rate ± 10 %".to_string(),
                "carrier-gas flow or velocity ± 10 %".to_string(),
                "inlet temperature ± 10 °C".to_string(),
            ];
        } else {
            if r.conditions.ph.is_some() {
                factors.push("eluent pH ± 0.2".to_string());
            }
            factors.push("organic fraction at the start ± 2 % (absolute)".to_string());
            if r.conditions.buffer.is_some() {
                factors.push("buffer concentration ± 10 %".to_string());
            }
        }
    }
    let row = |c: &str, how: &str| vec![c.to_string(), how.to_string(), TO_FILL.to_string()];
    vec![
        Block::Heading(2, "8 Robustness and validation outline".to_string()),
        Block::Para(
            "Robustness: vary one factor at a time (or in a small factorial design) around the \
             final conditions and watch the critical-pair resolution and the retention factors. \
             Suggested factors (common practice, no source):"
                .to_string(),
        ),
        Block::List(factors),
        Block::Para(
            "Validation: performance characteristics as named in ICH Q2(R2); the acceptance \
             criteria come from the analytical target profile and the laboratory's procedures."
                .to_string(),
        ),
        Block::Table {
            header: vec![
                "characteristic (ICH Q2(R2))".to_string(),
                "how it is shown".to_string(),
                "acceptance criterion".to_string(),
            ],
            rows: vec![
                row(
                    "specificity / selectivity",
                    "blank, placebo or matrix and spiked samples; peak purity where a detector allows",
                ),
                row(
                    "working range: response (linearity) and range",
                    "at least five levels across the range",
                ),
                row("accuracy", "recovery from spiked matrix at three levels"),
                row(
                    "precision: repeatability and intermediate precision",
                    "replicates on one day; other day, analyst or instrument",
                ),
                row(
                    "detection and quantitation limits (where relevant)",
                    "signal-to-noise or the standard deviation of the response",
                ),
                row("robustness (development, ICH Q14)", "the factors above"),
            ],
        },
    ]
}
