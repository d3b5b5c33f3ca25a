//! The method plan: a reviewable write-up of an [`AdviceReport`] as one self-contained
//! Markdown or HTML file.
//!
//! The plan has eight numbered parts: scope (the analytes and every property value with its
//! unit and provenance), decision (mode, phase, runners-up, reasons with their rule or model
//! id), starting conditions as a set-up table, the predicted chromatogram (inline SVG from
//! [`super::chromatogram`]), risks, system-suitability targets with where each comes from,
//! cautions and references. Both formats are built from one list of [`Block`]s, so the two
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
use super::chromatogram::{escape_xml, render_svg};
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

/// A value with its unit and provenance note, e.g. `2.1 [3]` or `351.4 K (78.3 °C) [1]`.
fn value_cell(p: &Property, prov: &mut Provenance) -> String {
    let n = prov.cite_property(p);
    let kind = match p.kind {
        PropertyKind::Experimental => "exp.",
        PropertyKind::Estimated => "est.",
    };
    let mut v = if p.unit.is_empty() {
        num(p.value, 2)
    } else {
        format!("{} {}", num(p.value, 2), p.unit)
    };
    if p.unit == "K" {
        let _ = write!(v, " ({} °C)", num(p.value - 273.15, 1));
    }
    if let Some(t) = p.detail_value("type") {
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

/// Reference catalogue: key, the words that show the method or data set was used, citation.
struct RefEntry {
    key: &'static str,
    needles: &'static [&'static str],
    citation: &'static str,
}

const REFERENCES: &[RefEntry] = &[
    RefEntry {
        key: "pubchem-chemicals",
        needles: &["chemicals", "pubchem"],
        citation: "Compound identifiers, names and structures: PubChem (public domain, US \
                   National Library of Medicine) as packaged in the `chemicals` Python package \
                   by C. Bell and contributors (MIT licence).",
    },
    RefEntry {
        key: "wikidata",
        needles: &["wikidata"],
        citation: "Wikidata property values (boiling point, logP), CC0 1.0, via the \
                   `chemicals` package.",
    },
    RefEntry {
        key: "pka-ccby",
        needles: &["baltruschat", "czodrowski", "pka-ccby"],
        citation: "Experimental pKa: M. Baltruschat, P. Czodrowski, \"Machine learning meets \
                   pKa\", F1000Research 9:113 (2020), data CC BY 4.0 (only rows under that \
                   licence are used).",
    },
    RefEntry {
        key: "crippen",
        needles: &["crippen"],
        citation: "logP and molar refractivity estimates: S. A. Wildman, G. M. Crippen, J. \
                   Chem. Inf. Comput. Sci. 39 (1999) 868-873 (atom contributions).",
    },
    RefEntry {
        key: "ertl",
        needles: &["ertl", "tpsa"],
        citation: "Polar surface area: P. Ertl, B. Rohde, P. Selzer, J. Med. Chem. 43 (2000) \
                   3714-3717 (topological PSA).",
    },
    RefEntry {
        key: "joback",
        needles: &["joback"],
        citation: "Boiling point estimates: K. G. Joback, R. C. Reid, Chem. Eng. Commun. 57 \
                   (1987) 233-243 (group contributions).",
    },
    RefEntry {
        key: "report",
        needles: &["report", "memory", "descriptor", "lc-regression"],
        citation: "Open retention data used to train and check the LC retention model: RepoRT, \
                   F. Kretschmer et al., Nature Methods (2024), CC BY-SA 4.0.",
    },
    RefEntry {
        key: "gradient",
        needles: &["gradient", "lss", "snyder"],
        citation: "Gradient retention and peak width from the linear-solvent-strength model: \
                   L. R. Snyder, J. W. Dolan, High-Performance Gradient Elution, Wiley (2007).",
    },
    RefEntry {
        key: "mcreynolds",
        needles: &["mcreynolds", "retention-index", "gc-"],
        citation: "GC phase polarity constants: W. O. McReynolds, J. Chromatogr. Sci. 8 (1970) \
                   685-691.",
    },
    RefEntry {
        key: "kovats",
        needles: &["retention-index", "kovats", "van den dool"],
        citation: "Retention indices: E. Kováts, Helv. Chim. Acta 41 (1958) 1915-1932; \
                   temperature-programmed form: H. van den Dool, P. D. Kratz, J. Chromatogr. 11 \
                   (1963) 463-471.",
    },
    RefEntry {
        key: "ionisation",
        needles: &["ionisation", "henderson", "logd"],
        citation: "Ionisation and logD: Henderson-Hasselbalch relation with the pH-partition \
                   hypothesis (independent sites); see A. Avdeef, Absorption and Drug \
                   Development, Wiley (2012), ch. 3-4.",
    },
];

/// Lower-cased text of everything in the report that can name a method or data source.
fn provenance_haystack(report: &AdviceReport) -> String {
    let mut h = String::new();
    for a in &report.analytes {
        for p in &a.properties {
            let _ = write!(h, " {} {} {}", p.property, p.source, p.licence);
        }
        if a.ionisation.is_some() {
            h.push_str(" ionisation");
        }
    }
    let recs = report
        .recommendations
        .iter()
        .chain(report.backup.as_ref().map(|b| &b.recommendation));
    for r in recs {
        let _ = write!(h, " {}-{}", r.mode, r.phase.id);
        if is_lc(&r.mode) && r.conditions.program.len() > 1 {
            h.push_str(" gradient");
        }
        for p in &r.predictions {
            let _ = write!(h, " {}", p.path);
        }
        for reason in &r.reasons {
            let _ = write!(h, " {}", reason.source);
        }
    }
    h.to_lowercase()
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
    if let Some(b) = &c.buffer {
        row("Buffer or additive", b.clone());
    }
    if let Some(p) = &c.buffer_preparation {
        row("Buffer preparation", p.clone());
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

    risks_and_rest(report, Some(first), &mut b);
    b
}

/// Sections 5 to 8.
fn risks_and_rest(report: &AdviceReport, first: Option<&Recommendation>, b: &mut Vec<Block>) {
    b.push(Block::Heading(2, "5 Risks".to_string()));
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
                b.push(Block::Para(format!(
                    "What the back-up ({}) changes for the risky pairs:",
                    bk.recommendation.phase.name
                )));
                b.push(Block::Table {
                    header: vec![
                        "pair".to_string(),
                        "Rs, first choice".to_string(),
                        "Rs, back-up".to_string(),
                        "change".to_string(),
                    ],
                    rows: bk
                        .changes
                        .iter()
                        .map(|c| {
                            let d = c.resolution_backup - c.resolution_first;
                            vec![
                                format!("{} / {}", c.a, c.b),
                                num(c.resolution_first, 2),
                                num(c.resolution_backup, 2),
                                format!("{}{}", if d >= 0.0 { "+" } else { "" }, num(d, 2)),
                            ]
                        })
                        .collect(),
                });
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

    // 6 System suitability.
    b.push(Block::Heading(
        2,
        "6 System suitability targets".to_string(),
    ));
    let pharmacopoeia = "general chromatography chapters of the major pharmacopoeias (USP <621>, \
                         Ph. Eur. 2.2.46) define the quantity";
    let mut rows = Vec::new();
    let crit = first
        .and_then(|f| f.critical_pair.as_ref())
        .map(|(x, y)| format!("{x} / {y}"))
        .unwrap_or_else(|| "the least resolved pair".to_string());
    let pred_rs = first
        .and_then(|f| f.critical_resolution)
        .filter(|r| r.is_finite())
        .map(|r| {
            let verdict = if r >= 2.0 {
                "meets the proposed target"
            } else if r >= 1.5 {
                "meets the minimum only"
            } else {
                "below the minimum: optimise, or try the back-up"
            };
            format!("{r:.2} ({verdict})")
        })
        .unwrap_or_else(|| "-".to_string());
    rows.push(vec![
        format!("Resolution of the critical pair ({crit})"),
        "≥ 2.0 proposed, ≥ 1.5 minimum".to_string(),
        pred_rs,
        format!(
            "{pharmacopoeia}; 1.5 is baseline separation of two equal Gaussian peaks (from \
             memory); 2.0 leaves margin for column ageing (common practice, no source)"
        ),
    ]);
    let ks: Vec<f64> = first
        .map(|f| {
            f.predictions
                .iter()
                .map(|p| p.retention_factor)
                .filter(|k| k.is_finite())
                .collect()
        })
        .unwrap_or_default();
    let k_range = match (
        ks.iter().copied().reduce(f64::min),
        ks.iter().copied().reduce(f64::max),
    ) {
        (Some(lo), Some(hi)) => format!("{} to {}", num(lo, 2), num(hi, 2)),
        _ => "-".to_string(),
    };
    rows.push(vec![
        "Retention factor k of every analyte".to_string(),
        "1 to 20; first peak ≥ 2 preferred".to_string(),
        k_range,
        "common practice, no source (peaks with k < 1 elute with unretained matrix; k > 20 \
         wastes time and broadens peaks)"
            .to_string(),
    ]);
    let n_est = first
        .map(|f| f.conditions.plate_number)
        .filter(|n| n.is_finite() && *n > 0.0);
    rows.push(vec![
        "Plate number N (critical-pair peak)".to_string(),
        match n_est {
            Some(n) => format!("≥ {} (half the estimated column value)", num(n / 2.0, 0)),
            None => "≥ 2000".to_string(),
        },
        n_est.map(|n| num(n, 0)).unwrap_or_else(|| "-".to_string()),
        format!("{pharmacopoeia}; the half-of-estimate target is common practice, no source"),
    ]);
    rows.push(vec![
        "Tailing factor (symmetry factor) of every peak".to_string(),
        "≤ 2.0".to_string(),
        "not predicted".to_string(),
        format!("{pharmacopoeia}; ≤ 2.0 is a common general limit (from memory)"),
    ]);
    rows.push(vec![
        "Repeatability of retention time (replicate injections)".to_string(),
        "RSD ≤ 1 %".to_string(),
        "not predicted".to_string(),
        "common practice, no source".to_string(),
    ]);
    b.push(Block::Table {
        header: vec![
            "quantity".to_string(),
            "target".to_string(),
            "predicted".to_string(),
            "where the target comes from".to_string(),
        ],
        rows,
    });

    // 7 Cautions.
    b.push(Block::Heading(2, "7 Cautions".to_string()));
    let mut cautions: Vec<String> = report
        .cautions
        .iter()
        .map(|c| format!("{}: {}", c.topic, c.text))
        .collect();
    cautions.push(
        "This plan is a computed starting point, not a validated method. Verify every \
         condition and prediction experimentally under the laboratory's own procedures; local \
         regulations, the laboratory's SOPs and licensed practice take precedence over \
         anything written here."
            .to_string(),
    );
    b.push(Block::List(cautions));

    // 8 References.
    b.push(Block::Heading(2, "8 References".to_string()));
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

/// Escape text for Markdown: HTML-significant characters become entities, Markdown
/// punctuation is backslash-escaped, line breaks become spaces.
fn md_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '\\' | '`' | '*' | '_' | '[' | ']' | '|' | '#' => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            c if c.is_control() => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// Render the plan as one self-contained Markdown file (the chromatograms are inline SVG
/// blocks; every table is also given as text).
pub fn render_markdown(report: &AdviceReport, opts: &PlanOptions) -> String {
    let mut s = String::new();
    for block in plan_blocks(report, opts) {
        match block {
            Block::Heading(level, text) => {
                let _ = writeln!(s, "{} {}\n", "#".repeat(level as usize), md_escape(&text));
            }
            Block::Para(text) => {
                let _ = writeln!(s, "{}\n", md_escape(&text));
            }
            Block::List(items) => {
                for i in items {
                    let _ = writeln!(s, "- {}", md_escape(&i));
                }
                s.push('\n');
            }
            Block::Table { header, rows } => {
                let h: Vec<String> = header.iter().map(|c| md_escape(c)).collect();
                let _ = writeln!(s, "| {} |", h.join(" | "));
                let _ = writeln!(s, "|{}", "---|".repeat(h.len()));
                for r in rows {
                    let cells: Vec<String> = r.iter().map(|c| md_escape(c)).collect();
                    let _ = writeln!(s, "| {} |", cells.join(" | "));
                }
                s.push('\n');
            }
            Block::Svg { svg, caption } => {
                // CommonMark HTML block: starts with the complete <svg> tag on its own line and
                // runs to the next blank line, so the SVG must hold none.
                let body: String = svg
                    .lines()
                    .filter(|l| !l.trim().is_empty())
                    .collect::<Vec<_>>()
                    .join("\n");
                let _ = writeln!(s, "{body}\n");
                let _ = writeln!(s, "*{}*\n", md_escape(&caption));
            }
        }
    }
    while s.ends_with("\n\n") {
        s.pop();
    }
    s
}

/// Inline style sheet of the HTML plan: print-friendly, black on white.
const CSS: &str = "body{font-family:sans-serif;max-width:1040px;margin:1.5em auto;padding:0 1em;\
color:#000;background:#fff;line-height:1.4}\
h1{font-size:1.6em;border-bottom:2px solid #000;padding-bottom:.2em}\
h2{font-size:1.25em;border-bottom:1px solid #000;margin-top:1.6em}\
h3{font-size:1.05em;margin-top:1.2em}\
table{border-collapse:collapse;margin:.6em 0;font-size:.9em}\
th,td{border:1px solid #000;padding:.25em .5em;text-align:left;vertical-align:top}\
th{background:#eee}\
figure{margin:1em 0}figcaption{font-style:italic;font-size:.9em}\
svg{max-width:100%;height:auto}\
@media print{h2{page-break-after:avoid}figure,table{page-break-inside:avoid}}";

/// Render the plan as one self-contained HTML file (inline CSS and SVG, no scripts, no
/// external resources).
pub fn render_html(report: &AdviceReport, opts: &PlanOptions) -> String {
    let mut s = String::new();
    s.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    let _ = writeln!(s, "<title>{}</title>", escape_xml(&opts.title));
    let _ = writeln!(s, "<style>{CSS}</style>\n</head>\n<body>");
    for block in plan_blocks(report, opts) {
        match block {
            Block::Heading(level, text) => {
                let _ = writeln!(s, "<h{level}>{}</h{level}>", escape_xml(&text));
            }
            Block::Para(text) => {
                let _ = writeln!(s, "<p>{}</p>", escape_xml(&text));
            }
            Block::List(items) => {
                s.push_str("<ul>\n");
                for i in items {
                    let _ = writeln!(s, "<li>{}</li>", escape_xml(&i));
                }
                s.push_str("</ul>\n");
            }
            Block::Table { header, rows } => {
                s.push_str("<table>\n<thead><tr>");
                for h in header {
                    let _ = write!(s, "<th>{}</th>", escape_xml(&h));
                }
                s.push_str("</tr></thead>\n<tbody>\n");
                for r in rows {
                    s.push_str("<tr>");
                    for c in r {
                        let _ = write!(s, "<td>{}</td>", escape_xml(&c));
                    }
                    s.push_str("</tr>\n");
                }
                s.push_str("</tbody>\n</table>\n");
            }
            Block::Svg { svg, caption } => {
                let _ = writeln!(
                    s,
                    "<figure>\n{svg}<figcaption>{}</figcaption>\n</figure>",
                    escape_xml(&caption)
                );
            }
        }
    }
    s.push_str("</body>\n</html>\n");
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markdown_escaping_keeps_tables_intact() {
        assert_eq!(md_escape("a|b\nc"), "a\\|b c");
        assert_eq!(md_escape("<b>*x*</b>"), "&lt;b&gt;\\*x\\*&lt;/b&gt;");
    }

    #[test]
    fn aromatic_rings_come_from_the_structure_not_the_letters() {
        // Aromatic and Kekulé forms of the same rings (benzene, N-methylpyrrole, aspirin as the
        // knowledge base stores it): ring counts as RDKit's CalcNumAromaticRings gives them.
        assert_eq!(aromatic_ring_count("c1ccccc1"), Some(1));
        assert_eq!(aromatic_ring_count("C1=CC=CC=C1"), Some(1));
        assert_eq!(aromatic_ring_count("Cn1cccc1"), Some(1));
        assert_eq!(aromatic_ring_count("CN1C=CC=C1"), Some(1));
        assert_eq!(aromatic_ring_count("CC(=O)OC1=CC=CC=C1C(=O)O"), Some(1));
        // Two-letter elements and aliphatic rings are not aromatic.
        assert_eq!(aromatic_ring_count("ClCCl"), Some(0));
        assert_eq!(aromatic_ring_count("CCO"), Some(0));
        assert_eq!(aromatic_ring_count("C1CCCCC1"), Some(0));
        // Unreadable SMILES: no claim either way.
        assert_eq!(aromatic_ring_count("C1CC"), None);
    }

    #[test]
    fn chelating_groups_are_found_by_smiles_text() {
        assert_eq!(chelating_group("Oc1ccccc1O"), Some("catechol"));
        assert_eq!(chelating_group("CCO"), None);
    }

    #[test]
    fn missing_directory_is_reported_before_writing() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("no-such-dir").join("plan.html");
        let err = check_writable(&target).unwrap_err();
        assert!(matches!(err, PlanError::MissingDirectory { .. }), "{err}");
        assert!(write_atomically(&target, "x").is_err());
        assert!(!target.exists());
    }

    #[test]
    fn parent_that_is_a_file_is_reported() {
        let dir = tempfile::tempdir().unwrap();
        let file = dir.path().join("plain-file");
        std::fs::write(&file, "not a directory").unwrap();
        let target = file.join("plan.html");
        let err = check_writable(&target).unwrap_err();
        assert!(matches!(err, PlanError::NotADirectory { .. }), "{err}");
        let err = write_atomically(&target, "x").unwrap_err();
        assert!(err.to_string().contains("plain-file"), "{err}");
        assert_eq!(std::fs::read_to_string(&file).unwrap(), "not a directory");
    }

    #[test]
    fn atomic_write_replaces_and_leaves_no_temporary_file() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("plan.md");
        std::fs::write(&target, "old").unwrap();
        write_atomically(&target, "new contents").unwrap();
        assert_eq!(std::fs::read_to_string(&target).unwrap(), "new contents");
        let names: Vec<String> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        assert_eq!(names, vec!["plan.md".to_string()]);
    }

    #[test]
    fn a_directory_as_target_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let err = check_writable(dir.path()).unwrap_err();
        assert!(matches!(err, PlanError::TargetIsDirectory { .. }), "{err}");
    }

    #[test]
    fn chelating_groups_are_found_in_kekule_and_aromatic_spellings() {
        // every pattern compiles
        for (p, _) in CHELATING_PATTERNS {
            assert!(crate::structure::smarts::Pattern::new(p).is_ok(), "{p}");
        }
        // catechol, aromatic and Kekulé
        assert_eq!(chelating_group("Oc1ccccc1O"), Some("catechol"));
        assert_eq!(chelating_group("OC1=CC=CC=C1O"), Some("catechol"));
        // phenol and anisole-like ethers are not catechols
        assert_eq!(chelating_group("Oc1ccccc1"), None);
        assert_eq!(chelating_group("COc1ccccc1OC"), None);
        assert_eq!(
            chelating_group("OP(=O)(O)OC"),
            Some("phosphate or phosphonate")
        );
        assert_eq!(chelating_group("CC(=O)NO"), Some("hydroxamic acid"));
        assert_eq!(
            chelating_group("Oc1cccc2cccnc12"),
            Some("8-hydroxyquinoline")
        );
        assert_eq!(
            chelating_group("OC1=CC=CC2=C1N=CC=C2"),
            Some("8-hydroxyquinoline")
        );
        // 3-hydroxypyridine has no fused carbon: not flagged
        assert_eq!(chelating_group("Oc1cccnc1"), None);
        assert_eq!(chelating_group("not a smiles"), None);
    }
}
