//! The method plan: a reviewable write-up of an [`AdviceReport`] as one self-contained
//! Markdown or HTML file.
//!
//! The plan is a controlled document: a document-control block (identifier, version, date,
//! software and data checksums, author/reviewer/approver to sign) and an analytical target
//! profile come first, then ten numbered parts: scope (the analytes and every property value
//! with its unit and provenance), decision (mode, phase, runners-up, reasons with their rule or
//! model id), starting conditions as a set-up table with sample and standard preparation and
//! the equilibration/blank/carry-over steps, the predicted chromatogram (inline SVG from
//! [`super::chromatogram`]), the scouting design, risks, system-suitability targets each with a
//! verdict (meets, misses, not evaluated, with the reason), a robustness and validation
//! outline named after the ICH Q2(R2) characteristics, cautions and references. Both formats are built from one list of [`Block`]s, so the two
//! files always say the same thing. Every string that came from the user or the knowledge base
//! is escaped for the target format. The output is deterministic: the same report gives the
//! same bytes, apart from the optional date line.
//!
//! Files are written with [`write_atomically`] (temporary file in the same directory, then
//! rename), after [`check_writable`] has been called before any work is done.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::io::Write as _;
use std::path::{Path, PathBuf};

use super::advice::{AdviceReport, AnalyteSummary, Recommendation};
use super::chromatogram::render_svg;
use super::num;
use crate::property::{Property, PropertyKind};

/// Options for rendering a plan.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PlanOptions {
    /// Title of the plan (first heading and HTML `<title>`).
    pub title: String,
    /// Optional date line, e.g. `2026-12-01`; left out when `None` so that output stays
    /// byte-for-byte reproducible.
    pub date: Option<String>,
}

impl Default for PlanOptions {
    fn default() -> Self {
        PlanOptions {
            title: "Method plan".to_string(),
            date: None,
        }
    }
}

/// Errors from writing a plan to disk.
#[derive(Debug, thiserror::Error)]
pub enum PlanError {
    /// The target path has no file name (e.g. `/` or `..`).
    #[error("{path}: not a file path; give a file name such as plan.html")]
    NotAFile {
        /// The path given.
        path: PathBuf,
    },
    /// The directory the file should go into does not exist.
    #[error("directory {dir} does not exist; create it first or choose another output path")]
    MissingDirectory {
        /// The missing directory.
        dir: PathBuf,
    },
    /// The parent of the target exists but is not a directory.
    #[error("{dir} is not a directory, so {path} cannot be written; choose another output path")]
    NotADirectory {
        /// The parent that is not a directory.
        dir: PathBuf,
        /// The target path.
        path: PathBuf,
    },
    /// The target exists and is a directory.
    #[error("{path} is a directory; give a file name inside it")]
    TargetIsDirectory {
        /// The target path.
        path: PathBuf,
    },
    /// The directory is not writable (probe file could not be created).
    #[error("cannot write in {dir}: {source}; check permissions or choose another output path")]
    NotWritable {
        /// The directory.
        dir: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
    /// Writing or renaming failed.
    #[error("writing {path} failed: {source}; the previous file, if any, is unchanged")]
    Write {
        /// The target path.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
}

/// The directory a target file goes into (`.` for a bare file name).
fn parent_dir(path: &Path) -> Result<PathBuf, PlanError> {
    if path.file_name().is_none() {
        return Err(PlanError::NotAFile {
            path: path.to_path_buf(),
        });
    }
    Ok(match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    })
}

/// A temporary file name in `dir` that is unlikely to exist (process id and a counter).
fn temp_name(dir: &Path, path: &Path, tag: &str) -> PathBuf {
    use std::sync::atomic::{AtomicU64, Ordering};
    static COUNTER: AtomicU64 = AtomicU64::new(0);
    let n = COUNTER.fetch_add(1, Ordering::Relaxed);
    let stem = path
        .file_name()
        .map(|f| f.to_string_lossy().into_owned())
        .unwrap_or_default();
    dir.join(format!(".{stem}.{tag}-{}-{n}.tmp", std::process::id()))
}

/// Check, before any work is done, that `path` can be written: its directory exists, is a
/// directory, and accepts a new file (probed by creating and removing a temporary file).
///
/// # Errors
///
/// [`PlanError::MissingDirectory`], [`PlanError::NotADirectory`],
/// [`PlanError::TargetIsDirectory`], [`PlanError::NotAFile`] or [`PlanError::NotWritable`].
pub fn check_writable(path: &Path) -> Result<(), PlanError> {
    let dir = parent_dir(path)?;
    match std::fs::metadata(&dir) {
        Err(_) => {
            // A parent that is a regular file somewhere up the chain shows up as "not a
            // directory"; name the first existing ancestor that is a file.
            let mut anc = dir.as_path();
            while let Some(up) = anc.parent() {
                if up.is_file() {
                    return Err(PlanError::NotADirectory {
                        dir: up.to_path_buf(),
                        path: path.to_path_buf(),
                    });
                }
                anc = up;
            }
            return Err(PlanError::MissingDirectory { dir });
        }
        Ok(m) if !m.is_dir() => {
            return Err(PlanError::NotADirectory {
                dir,
                path: path.to_path_buf(),
            });
        }
        Ok(_) => {}
    }
    if path.is_dir() {
        return Err(PlanError::TargetIsDirectory {
            path: path.to_path_buf(),
        });
    }
    let probe = temp_name(&dir, path, "probe");
    match std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&probe)
    {
        Ok(f) => {
            drop(f);
            let _ = std::fs::remove_file(&probe);
            Ok(())
        }
        Err(source) => Err(PlanError::NotWritable { dir, source }),
    }
}

/// Write `contents` to `path` in one step: check the target, write a temporary file in the
/// same directory, flush it to disk, then rename it over `path`. On failure the temporary file
/// is removed and any previous file at `path` is left as it was; a half-written plan is never
/// left behind.
///
/// # Errors
///
/// Any error of [`check_writable`], or [`PlanError::Write`] when writing or renaming fails.
pub fn write_atomically(path: &Path, contents: impl AsRef<[u8]>) -> Result<(), PlanError> {
    check_writable(path)?;
    let dir = parent_dir(path)?;
    let tmp = temp_name(&dir, path, "part");
    let result = (|| -> std::io::Result<()> {
        let mut f = std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&tmp)?;
        f.write_all(contents.as_ref())?;
        f.sync_all()?;
        drop(f);
        std::fs::rename(&tmp, path)
    })();
    result.map_err(|source| {
        let _ = std::fs::remove_file(&tmp);
        PlanError::Write {
            path: path.to_path_buf(),
            source,
        }
    })
}

/// One piece of the plan, before it is written in a format. All text is plain (unescaped).
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// A heading, level 1–3.
    Heading(u8, String),
    /// A paragraph.
    Para(String),
    /// A bulleted list.
    List(Vec<String>),
    /// A table with a header row.
    Table {
        /// Column headings.
        header: Vec<String>,
        /// Rows of cells.
        rows: Vec<Vec<String>>,
    },
    /// A ready-made SVG image (already escaped by its renderer), with a caption.
    Svg {
        /// The SVG document.
        svg: String,
        /// Caption (plain text).
        caption: String,
    },
}

/// Human name of a mode id.
fn mode_name(mode: &str) -> String {
    match mode {
        "gc" => "gas chromatography (GC)".to_string(),
        "rp" => "reversed-phase liquid chromatography (RP-LC)".to_string(),
        "hilic" => "hydrophilic-interaction liquid chromatography (HILIC)".to_string(),
        "ic-anion" => "anion-exchange ion chromatography".to_string(),
        "ic-cation" => "cation-exchange ion chromatography".to_string(),
        "ion-exclusion" => "ion-exclusion chromatography".to_string(),
        other => other.to_string(),
    }
}

/// True for modes run on a liquid mobile phase with a pH.
fn is_lc(mode: &str) -> bool {
    matches!(mode, "rp" | "hilic")
}

/// Numbered provenance notes, in order of first use.
#[derive(Default)]
struct Provenance {
    notes: Vec<String>,
    index: BTreeMap<String, usize>,
}

impl Provenance {
    /// The note number for a provenance text, adding it when new.
    fn cite(&mut self, text: String) -> usize {
        if let Some(&i) = self.index.get(&text) {
            return i;
        }
        self.notes.push(text.clone());
        let i = self.notes.len();
        self.index.insert(text, i);
        i
    }

    /// Cite a property's provenance.
    fn cite_property(&mut self, p: &Property) -> usize {
        let kind = match p.kind {
            PropertyKind::Experimental => "experimental",
            PropertyKind::Estimated => "estimated",
        };
        let licence = if p.licence.is_empty() {
            String::new()
        } else {
            format!(" (licence {})", p.licence)
        };
        let what = match p.kind {
            PropertyKind::Experimental => "source",
            PropertyKind::Estimated => "method",
        };
        self.cite(format!("{kind}; {what}: {}{licence}", p.source))
    }
}

/// A value with its unit and provenance note, e.g. `2.1 (exp. [3])`, or for temperatures
/// `78.3 °C (351.4 K) (exp. [1])`: °C first as practitioners read it; an estimated temperature
/// (Joback, typical error about 30 K) to whole degrees, a measured one to 0.1.
fn value_cell(p: &Property, prov: &mut Provenance) -> String {
    let n = prov.cite_property(p);
    let kind = match p.kind {
        PropertyKind::Experimental => "exp.",
        PropertyKind::Estimated => "est.",
    };
    let mut v = if p.unit == "K" {
        let d = match p.kind {
            PropertyKind::Experimental => 1,
            PropertyKind::Estimated => 0,
        };
        format!("{} °C ({} K)", num(p.value - 273.15, d), num(p.value, d))
    } else if p.unit.is_empty() {
        num(p.value, 2)
    } else {
        format!("{} {}", num(p.value, 2), p.unit)
    };
    // "unspecified" says nothing a reader can use
    if let Some(t) = p.detail_value("type").filter(|t| *t != "unspecified") {
        let _ = write!(v, " {t}");
    }
    format!("{v} ({kind} [{n}])")
}

/// All values of one property, joined.
fn property_cells(a: &AnalyteSummary, name: &str, prov: &mut Provenance) -> String {
    let cells: Vec<String> = a
        .properties
        .iter()
        .filter(|p| p.property == name)
        .map(|p| value_cell(p, prov))
        .collect();
    if cells.is_empty() {
        "not known".to_string()
    } else {
        cells.join("; ")
    }
}

/// logD at the chosen pH: a stored `logd` property wins, else the ionisation estimate.
fn logd_cell(a: &AnalyteSummary, prov: &mut Provenance) -> String {
    let stored = property_cells(a, "logd", prov);
    if stored != "not known" {
        return stored;
    }
    match &a.ionisation {
        Some(ion) => match ion.log_d {
            Some(d) if d.is_finite() => {
                let n = prov.cite(
                    "estimated; method: logD = logP + log10(fraction neutral), pH-partition \
                     hypothesis with the pKa values shown (phasewise ionisation model)"
                        .to_string(),
                );
                format!("{} at pH {} (est. [{n}])", num(d, 2), ph_str(ion.ph))
            }
            _ => "not known".to_string(),
        },
        None => "not applicable".to_string(),
    }
}

/// Ionisation state text.
fn ionisation_cell(a: &AnalyteSummary) -> String {
    match &a.ionisation {
        Some(ion) => {
            let mut s = format!(
                "{} at pH {}: net charge {} e, {} % neutral",
                ion.charge_state,
                ph_str(ion.ph),
                num(ion.net_charge_e, 2),
                num(ion.fraction_neutral * 100.0, 1)
            );
            if ion.near_pka {
                s.push_str("; a pKa lies within 1.5 units of the pH");
            }
            s
        }
        None => "not applicable (no aqueous mobile phase)".to_string(),
    }
}

/// Substructure patterns (SMARTS, the structure engine's subset: no ring closures) of common
/// metal-chelating groups: phosphate/phosphonate, catechol, hydroxamic acid,
/// 8-hydroxyquinoline (the fused carbon next to the hydroxylated one carries the ring
/// nitrogen). Matched on the parsed structure, so Kekulé and aromatic spellings agree; common
/// practice, no source.
const CHELATING_PATTERNS: &[(&str, &str)] = &[
    ("P(=O)(O)O", "phosphate or phosphonate"),
    ("c([OH])c[OH]", "catechol"),
    ("C(=O)N[OH]", "hydroxamic acid"),
    ("[OH]c:c(:c):n", "8-hydroxyquinoline"),
];

/// Chelating group found in a structure, if any (None also when the SMILES cannot be read).
fn chelating_group(smiles: &str) -> Option<&'static str> {
    use std::sync::OnceLock;
    static COMPILED: OnceLock<Vec<(crate::structure::smarts::Pattern, &'static str)>> =
        OnceLock::new();
    let patterns = COMPILED.get_or_init(|| {
        CHELATING_PATTERNS
            .iter()
            .filter_map(|(p, name)| {
                crate::structure::smarts::Pattern::new(p)
                    .ok()
                    .map(|p| (p, *name))
            })
            .collect()
    });
    let g = crate::structure::parse_smiles(smiles).ok()?.graph;
    patterns
        .iter()
        .find(|(p, _)| (0..g.atoms.len()).any(|i| p.matches_at(&g, i)))
        .map(|(_, name)| *name)
}

/// Number of aromatic rings from the structure engine (aromaticity perceived as in RDKit's
/// default model, so Kekulé input such as `C1=CC=CC=C1` counts), or None when the SMILES cannot
/// be read. Used only to flag a possibly weak UV chromophore; string inspection would miss the
/// upper-case Kekulé SMILES the knowledge base stores.
fn aromatic_ring_count(smiles: &str) -> Option<u32> {
    crate::structure::parse_smiles(smiles)
        .ok()
        .map(|p| crate::structure::descriptors::aromatic_ring_count(&p.graph))
}

/// UV cutoff of a modifier, nm: the wavelength below which a 1 cm path of the neat solvent
/// absorbs strongly (handbook-style values, from memory).
fn uv_cutoff_nm(modifier: &str) -> Option<f64> {
    match modifier {
        "acetonitrile" => Some(190.0),
        "methanol" => Some(205.0),
        "ethanol" => Some(210.0),
        "isopropanol" | "2-propanol" => Some(205.0),
        "tetrahydrofuran" => Some(212.0),
        _ => None,
    }
}

/// A pH with one decimal, always shown (`3.0`, not `3`).
fn ph_str(ph: f64) -> String {
    format!("{ph:.1}")
}

/// An optional finite number with its unit.
fn fmt_opt(v: Option<f64>, digits: usize, unit: &str) -> Option<String> {
    v.filter(|x| x.is_finite())
        .map(|x| format!("{} {unit}", num(x, digits)))
}

/// Set-up table rows for one recommendation.
fn conditions_blocks(rec: &Recommendation, blocks: &mut Vec<Block>) {
    let c = &rec.conditions;
    let mut rows: Vec<Vec<String>> = Vec::new();
    let mut row = |k: &str, v: String| rows.push(vec![k.to_string(), v]);
    row(
        "Stationary phase",
        format!(
            "{} ({}; id {})",
            rec.phase.name, rec.phase.chemistry, rec.phase.id
        ),
    );
    // Capillary GC columns are given in metres, packed and LC columns in millimetres.
    let length = if c.column_length_mm >= 1000.0 {
        format!("{} m", num(c.column_length_mm / 1000.0, 1))
    } else {
        format!("{} mm", num(c.column_length_mm, 1))
    };
    let mut geometry = format!("{length} × {} mm i.d.", num(c.column_id_mm, 2));
    if let Some(p) = fmt_opt(c.particle_um, 1, "µm particles") {
        let _ = write!(geometry, ", {p}");
    }
    if let Some(f) = fmt_opt(c.film_um, 2, "µm film") {
        let _ = write!(geometry, ", {f}");
    }
    row("Column", geometry);
    if let Some(a) = &c.mobile_phase_a {
        row("Mobile phase A", a.clone());
    }
    if let Some(b) = &c.mobile_phase_b {
        row("Mobile phase B", b.clone());
    }
    if let Some(ph) = c.ph.filter(|p| p.is_finite()) {
        row("Aqueous pH", format!("{ph:.1}"));
    }
    // The advisor stores the buffer's catalogue id (`phosphate-1`) beside the recipe; the plan
    // gives the recipe in words and the id only as a reference (issue 16: no internal names).
    match (&c.buffer, &c.buffer_preparation) {
        (Some(b), Some(p)) if !b.trim().contains(char::is_whitespace) => {
            row(
                "Buffer or additive",
                format!("{p} (buffer id {b} in the phase catalogue, docs/phases.md)"),
            );
        }
        (b, p) => {
            if let Some(b) = b {
                row("Buffer or additive", b.clone());
            }
            if let Some(p) = p {
                row("Buffer preparation", p.clone());
            }
        }
    }
    if let Some(g) = &c.carrier_gas {
        row("Carrier gas", g.clone());
    }
    if let Some(v) = fmt_opt(c.linear_velocity_cm_s, 1, "cm/s") {
        row("Carrier linear velocity", v);
    }
    if let Some(f) = fmt_opt(c.flow_ml_min, 2, "mL/min") {
        row("Flow", f);
    }
    if let Some(t) = fmt_opt(c.temperature_c, 1, "°C") {
        row("Column temperature", t);
    }
    if let Some(i) = &c.inlet {
        row("Inlet", i.clone());
    }
    if let Some(d) = &c.derivatisation {
        row("Derivatisation", d.clone());
    }
    if let Some(s) = &c.suppression {
        row("Suppression", s.clone());
    }
    row("Injection", c.injection.clone());
    row("Detection", c.detection.clone());
    row(
        "Dead time (estimated)",
        format!("{} min", num(c.dead_time_min, 2)),
    );
    row("Plate number (estimated)", num(c.plate_number, 0));
    row("Run time", format!("{} min", num(c.run_time_min, 1)));
    if let Some(p) = fmt_opt(c.pressure_bar, 0, "bar (estimated back pressure)") {
        row("Pressure", p);
    }
    blocks.push(Block::Table {
        header: vec!["Setting".to_string(), "Value".to_string()],
        rows,
    });
    if !c.program.is_empty() {
        let what = if rec.mode == "gc" {
            "Oven program"
        } else if rec.mode.starts_with("ic") {
            "Eluent program"
        } else {
            "Gradient"
        };
        blocks.push(Block::Para(format!(
            "{what} (values in {}; linear change between rows):",
            c.program_unit
        )));
        let header = vec!["time (min)".to_string(), c.program_unit.clone()];
        let rows = c
            .program
            .iter()
            .map(|s| vec![num(s.time_min, 2), num(s.value, 1)])
            .collect();
        blocks.push(Block::Table { header, rows });
    }
}

fn prediction_table(rec: &Recommendation) -> Block {
    let gc = rec.predictions.iter().any(|p| p.retention_index.is_some());
    let mut header = vec![
        "Analyte".to_string(),
        "tR (min)".to_string(),
        "interval (min)".to_string(),
        "k".to_string(),
        "w½ (min)".to_string(),
        "path".to_string(),
    ];
    if gc {
        header.push("retention index".to_string());
    }
    let rows = rec
        .predictions
        .iter()
        .map(|p| {
            let mut r = vec![
                p.analyte.clone(),
                format!("{:.2}", p.retention_time_min),
                format!(
                    "{:.2} to {:.2} ({:.0} %)",
                    p.interval_low_min,
                    p.interval_high_min,
                    p.interval_coverage * 100.0
                ),
                format!("{:.2}", p.retention_factor),
                format!("{:.3}", p.peak_width_half_min),
                p.path.clone(),
            ];
            if gc {
                r.push(
                    p.retention_index
                        .map(|x| num(x, 0))
                        .unwrap_or_else(|| "-".to_string()),
                );
            }
            r
        })
        .collect();
    Block::Table { header, rows }
}

/// Build the plan as format-neutral blocks.
pub fn plan_blocks(report: &AdviceReport, opts: &PlanOptions) -> Vec<Block> {
    plan_blocks_with(report, opts, &DocumentControl::default())
}

/// The plan's blocks with a document-control block filled from `ctl` (blanks to fill where
/// `ctl` has no entry).
pub fn plan_blocks_with(
    report: &AdviceReport,
    opts: &PlanOptions,
    ctl: &DocumentControl,
) -> Vec<Block> {
    let mut b = Vec::new();
    b.push(Block::Heading(1, opts.title.clone()));
    if let Some(d) = &opts.date {
        b.push(Block::Para(format!("Date: {d}")));
    }
    b.push(Block::Para(format!(
        "Written by phasewise {} from an advice report (schema version {}). Everything below \
         is predicted from models and stored data, not measured; it is a starting point for \
         method development.",
        report.phasewise_version, report.schema_version
    )));
    b.extend(control::document_control(report, ctl, opts.date.as_deref()));
    b.extend(control::target_profile(report, ctl));
    let first = report.recommendations.iter().min_by_key(|r| r.rank);
    let mut prov = Provenance::default();

    // 1 Scope.
    b.push(Block::Heading(2, "1 Scope".to_string()));
    let ph_text = first
        .and_then(|r| r.conditions.ph)
        .map(|ph| format!("pH {}", ph_str(ph)))
        .unwrap_or_else(|| "the chosen conditions".to_string());
    // logD and ionisation only mean something with an aqueous mobile phase.
    let show_ionisation = report.analytes.iter().any(|a| a.ionisation.is_some())
        || first.is_some_and(|r| is_lc(&r.mode));
    let ionisation_note = if show_ionisation {
        format!("logD and ionisation refer to {ph_text}.")
    } else {
        "logD and ionisation are not shown: the recommended mode has no aqueous mobile phase."
            .to_string()
    };
    b.push(Block::Para(format!(
        "{} analyte(s) resolved, {} query(ies) unresolved. Values marked exp. are measured \
         (the note names the data set), est. are computed (the note names the method). \
         {ionisation_note}",
        report.analytes.len(),
        report.unresolved.len()
    )));
    let show_gc = first.is_some_and(|r| r.mode == "gc");
    let mut header: Vec<String> = vec![
        "Analyte".to_string(),
        "InChIKey".to_string(),
        "logP".to_string(),
    ];
    if show_ionisation {
        header.push("logD".to_string());
    }
    header.push("pKa".to_string());
    if show_ionisation {
        header.push("ionisation".to_string());
    }
    header.push("boiling point".to_string());
    header.push("charge".to_string());
    if show_gc {
        header.push("GC verdict".to_string());
    }
    let mut rows = Vec::new();
    for a in &report.analytes {
        let name = if a.query != a.name {
            format!("{} (query: {})", a.name, a.query)
        } else {
            a.name.clone()
        };
        let mut r = vec![
            name,
            a.inchikey
                .clone()
                .unwrap_or_else(|| "not known".to_string()),
            property_cells(a, "logp", &mut prov),
        ];
        if show_ionisation {
            r.push(logd_cell(a, &mut prov));
        }
        r.push(property_cells(a, "pka", &mut prov));
        if show_ionisation {
            r.push(ionisation_cell(a));
        }
        r.push(property_cells(a, "boiling_point", &mut prov));
        r.push(property_cells(a, "charge", &mut prov));
        if show_gc {
            let mut v = a.gc_suitability.clone();
            if !a.gc_reasons.is_empty() {
                let _ = write!(v, ": {}", a.gc_reasons.join("; "));
            }
            r.push(v);
        }
        rows.push(r);
    }
    b.push(Block::Table { header, rows });
    if !prov.notes.is_empty() {
        b.push(Block::Para("Provenance of the values above:".to_string()));
        b.push(Block::List(
            prov.notes
                .iter()
                .enumerate()
                .map(|(i, n)| format!("[{}] {n}", i + 1))
                .collect(),
        ));
    }
    if report.unresolved.is_empty() {
        b.push(Block::Para("Every query resolved.".to_string()));
    } else {
        b.push(Block::Para(
            "Unresolved queries (left out of everything below; suggestions are never used \
             automatically):"
                .to_string(),
        ));
        b.push(Block::List(
            report
                .unresolved
                .iter()
                .map(|u| {
                    let sugg = if u.suggestions.is_empty() {
                        "no close names".to_string()
                    } else {
                        let s: Vec<String> = u
                            .suggestions
                            .iter()
                            .map(|s| {
                                if s.name == s.compound {
                                    format!("{} ({})", s.name, num(s.similarity, 2))
                                } else {
                                    format!(
                                        "{} = {} ({})",
                                        s.name,
                                        s.compound,
                                        num(s.similarity, 2)
                                    )
                                }
                            })
                            .collect();
                        format!("did you mean: {}", s.join(", "))
                    };
                    format!("\"{}\": {}; {sugg}", u.query, u.reason)
                })
                .collect(),
        ));
    }

    // 2 Decision.
    b.push(Block::Heading(2, "2 Decision".to_string()));
    let Some(first) = first else {
        b.push(Block::Para(
            "No recommendation: the advisor found no mode that fits these analytes. See the \
             warnings under Risks."
                .to_string(),
        ));
        risks_and_rest(report, None, &mut b);
        return b;
    };
    b.push(Block::Para(format!(
        "Recommended: {} on {} ({}), score {} of 1.",
        mode_name(&first.mode),
        first.phase.name,
        first.phase.chemistry,
        num(first.score, 2)
    )));
    let mut others: Vec<&Recommendation> = report
        .recommendations
        .iter()
        .filter(|r| !std::ptr::eq(*r, first))
        .collect();
    others.sort_by_key(|r| r.rank);
    if !others.is_empty() {
        b.push(Block::Para("Runners-up:".to_string()));
        b.push(Block::Table {
            header: vec![
                "rank".to_string(),
                "mode".to_string(),
                "phase".to_string(),
                "score".to_string(),
            ],
            rows: others
                .iter()
                .map(|r| {
                    vec![
                        r.rank.to_string(),
                        mode_name(&r.mode),
                        r.phase.name.clone(),
                        num(r.score, 2),
                    ]
                })
                .collect(),
        });
    }
    if !report.mode_scores.is_empty() {
        b.push(Block::Para(
            "How each mode fits the list as a whole:".to_string(),
        ));
        b.push(Block::Table {
            header: vec![
                "mode".to_string(),
                "score".to_string(),
                "analytes that fit".to_string(),
                "analytes that do not".to_string(),
            ],
            rows: report
                .mode_scores
                .iter()
                .map(|m| {
                    let nf: Vec<String> = m
                        .not_fitting
                        .iter()
                        .map(|e| format!("{} ({})", e.analyte, e.reason))
                        .collect();
                    vec![
                        mode_name(&m.mode),
                        num(m.score, 2),
                        m.fitting.to_string(),
                        if nf.is_empty() {
                            "none".to_string()
                        } else {
                            nf.join("; ")
                        },
                    ]
                })
                .collect(),
        });
    }
    if !first.reasons.is_empty() {
        b.push(Block::Para(
            "Why (each reason names the rule or model behind it):".to_string(),
        ));
        b.push(Block::List(
            first
                .reasons
                .iter()
                .map(|r| {
                    let w = match r.weight {
                        Some(w) if w.is_finite() => {
                            format!(", score {}{}", if w >= 0.0 { "+" } else { "" }, num(w, 2))
                        }
                        _ => String::new(),
                    };
                    format!("{} [{}{w}]", r.text, r.source)
                })
                .collect(),
        ));
    }
    if first.excluded.is_empty() {
        b.push(Block::Para(
            "No analyte is left out of this mode.".to_string(),
        ));
    } else {
        b.push(Block::Para(
            "Left out of this mode, and what would serve them:".to_string(),
        ));
        b.push(Block::List(
            first
                .excluded
                .iter()
                .map(|e| match &e.better_mode {
                    Some(m) => format!(
                        "{}: {}. Analyse separately by {}.",
                        e.analyte,
                        e.reason,
                        mode_name(m)
                    ),
                    None => format!(
                        "{}: {}. No mode in the catalogue fits; consider a specific technique.",
                        e.analyte, e.reason
                    ),
                })
                .collect(),
        ));
    }

    // 3 Starting conditions.
    b.push(Block::Heading(2, "3 Starting conditions".to_string()));
    conditions_blocks(first, &mut b);
    b.extend(control::preparation(Some(first)));
    b.extend(control::sequence_steps(first));

    // 4 Predicted chromatogram.
    b.push(Block::Heading(2, "4 Predicted chromatogram".to_string()));
    b.push(Block::Svg {
        svg: render_svg(
            first,
            &format!("Predicted separation on {}", first.phase.name),
        ),
        caption: format!(
            "Figure 1. Predicted separation on {} at the starting conditions.",
            first.phase.name
        ),
    });
    b.push(prediction_table(first));
    if let Some(bk) = &report.backup {
        b.push(Block::Heading(3, "Back-up phase".to_string()));
        b.push(Block::Para(format!(
            "Back-up: {} on {} ({}). {}",
            mode_name(&bk.recommendation.mode),
            bk.recommendation.phase.name,
            bk.recommendation.phase.chemistry,
            bk.why
        )));
        conditions_blocks(&bk.recommendation, &mut b);
        b.push(Block::Svg {
            svg: render_svg(
                &bk.recommendation,
                &format!(
                    "Back-up: predicted separation on {}",
                    bk.recommendation.phase.name
                ),
            ),
            caption: format!(
                "Figure 2. Predicted separation on the back-up phase, {}.",
                bk.recommendation.phase.name
            ),
        });
        b.push(prediction_table(&bk.recommendation));
    }

    // 5 Scouting design.
    b.extend(control::scouting_design(report, first));

    risks_and_rest(report, Some(first), &mut b);
    b
}

mod control;
mod references;
mod render;
mod risks;
mod suitability;
#[cfg(test)]
mod tests;

pub use control::DocumentControl;
use references::{REFERENCES, provenance_haystack};
pub use render::{render_html, render_html_with, render_markdown, render_markdown_with};
use risks::risks_and_rest;
pub use suitability::{TargetRow, Verdict, target_rows};
