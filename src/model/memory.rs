//! Retention memory: measured retention of known analytes (by InChIKey) on the shipped RepoRT
//! systems, and its projection onto a target system.
//!
//! Projection works through the descriptor model: on every source system the analyte's
//! residual `r = psi_measured − psi_model` is computed; residuals of one analyte are correlated
//! across systems (the analyte-specific part the descriptors miss), more strongly between
//! systems of the same chemistry class and modifier. The target prediction is the model value
//! plus the best linear predictor of the target residual from the source residuals under an
//! equicorrelation model, `Σ ρᵢ rᵢ / (1 + (n − 1) ρ̄)` (the BLUP of a random analyte effect,
//! e.g. Searle, Casella & McCulloch, "Variance Components", 1992; from memory), with the
//! correlations ρ estimated from cross-validated residual pairs per mode and relation.
//! A linear map per system pair would need compounds shared with the *user's* system, which a
//! new system never has; the model-residual route needs none.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

use super::gz::{gunzip, gzip};
use super::prediction::{Prediction, PredictionPath};
use super::system::{Additive, ChemClass, LcSystem, Mode, ModelError, Modifier};
use super::training_data::{TrainingData, parse_program};

/// How a source system relates to the target system.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum SourceRelation {
    /// Same mode, chemistry class and modifier.
    SameClassSameModifier,
    /// Same mode and chemistry class, other modifier.
    SameClass,
    /// Same mode only.
    SameMode,
}

impl SourceRelation {
    /// Relation of `source` to `target` (both assumed of the same mode).
    pub fn between(source: &LcSystem, target: &LcSystem) -> Self {
        if source.chem_class == target.chem_class {
            if source.modifier == target.modifier {
                SourceRelation::SameClassSameModifier
            } else {
                SourceRelation::SameClass
            }
        } else {
            SourceRelation::SameMode
        }
    }
    /// Name used in keys.
    pub fn name(self) -> &'static str {
        match self {
            SourceRelation::SameClassSameModifier => "same_class_same_modifier",
            SourceRelation::SameClass => "same_class",
            SourceRelation::SameMode => "same_mode",
        }
    }
    /// All relations.
    pub const ALL: [SourceRelation; 3] = [
        SourceRelation::SameClassSameModifier,
        SourceRelation::SameClass,
        SourceRelation::SameMode,
    ];
}

/// Residual correlations per `"<mode>/<relation>"`, estimated by cross-validation.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
pub struct MemoryWeights {
    /// Correlation of model residuals of one analyte between two systems.
    pub rho: BTreeMap<String, f64>,
    /// Number of residual pairs behind each correlation.
    pub n_pairs: BTreeMap<String, usize>,
}

/// Largest residual magnitude (psi units) taken from one source; beyond it a measurement is
/// more likely a mis-annotation than an analyte effect (common practice, no source). Chosen by
/// the system-grouped CV (docs/model.md, "What was tried"): 0.8 lowered the RP memory-path
/// median MAE against 0.4 on three fold seeds; 0.3 raised it.
const RESIDUAL_CAP: f64 = 0.8;
/// Correlations below this are not used (too little information to move a prediction).
const MIN_RHO: f64 = 0.05;

impl MemoryWeights {
    /// Correlation for a mode and relation, if estimated and useful.
    pub fn rho(&self, mode: Mode, rel: SourceRelation) -> Option<f64> {
        self.rho
            .get(&format!("{}/{}", mode.label(), rel.name()))
            .copied()
            .filter(|r| *r >= MIN_RHO)
    }

    /// Combines source residuals `(system id, relation, residual)` (several rows of one system
    /// are averaged first) into a shift of the target prediction; `None` if no usable source.
    /// Returns the shift and the sorted source ids used.
    pub fn combine(
        &self,
        mode: Mode,
        sources: &[(String, SourceRelation, f64)],
    ) -> Option<(f64, Vec<String>)> {
        let mut per_system: BTreeMap<&str, (SourceRelation, f64, usize)> = BTreeMap::new();
        for (id, rel, r) in sources {
            let e = per_system.entry(id.as_str()).or_insert((*rel, 0.0, 0));
            e.1 += r;
            e.2 += 1;
        }
        let mut num = 0.0;
        let mut rho_sum = 0.0;
        let mut used = Vec::new();
        for (id, (rel, sum, n)) in &per_system {
            let Some(rho) = self.rho(mode, *rel) else {
                continue;
            };
            let r = (sum / *n as f64).clamp(-RESIDUAL_CAP, RESIDUAL_CAP);
            num += rho * r;
            rho_sum += rho;
            used.push((*id).to_owned());
        }
        if used.is_empty() {
            return None;
        }
        let n = used.len() as f64;
        let rho_bar = rho_sum / n;
        Some((num / (1.0 + (n - 1.0) * rho_bar), used))
    }
}

/// Measured retention of analytes on the shipped systems.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct MemoryTable {
    /// Systems by RepoRT dataset id.
    pub systems: BTreeMap<String, LcSystem>,
    /// InChIKey → (system id, psi_k1, measured rt in min), sorted by system id.
    pub entries: BTreeMap<String, Vec<(String, f64, f64)>>,
    /// Analyte records not parsed yet (the bundled table: read per analyte on demand, since a
    /// run needs a handful of its ~15,000 records). Consulted after `entries`.
    lazy: Option<LazyAnalytes>,
}

/// The `analyte` records of a table as text, with an index sorted by InChIKey.
#[derive(Debug, Clone, PartialEq, Default)]
struct LazyAnalytes {
    text: String,
    /// (key start, key end, items end) byte offsets into `text`, sorted by key.
    index: Vec<(usize, usize, usize)>,
}

impl LazyAnalytes {
    fn items(&self, inchikey: &str) -> Option<&str> {
        let i = self
            .index
            .binary_search_by(|&(a, b, _)| self.text[a..b].cmp(inchikey))
            .ok()?;
        let (_, b, c) = self.index[i];
        self.text.get(b + 1..c)
    }
}

/// Licence header of the memory table.
pub const MEMORY_LICENCE: &str = "# Retention memory derived from RepoRT (Kretschmer et al., Nature Methods 21 (2024) 153-155), CC BY-SA 4.0 (https://creativecommons.org/licenses/by-sa/4.0/). Dwell time assumed 0 (RepoRT gives none).";

fn modifier_code(m: Modifier) -> &'static str {
    match m {
        Modifier::Acetonitrile => "acn",
        Modifier::Methanol => "meoh",
        Modifier::Other => "other",
    }
}

fn additive_code(a: Additive) -> &'static str {
    match a {
        Additive::FormicAcid => "formic",
        Additive::AceticAcid => "acetic",
        Additive::TrifluoroaceticAcid => "trifluoroacetic",
        Additive::AmmoniumAcetate => "nh4ac",
        Additive::AmmoniumFormate => "nh4form",
        Additive::AmmoniumCarbonate => "nh4carb",
        Additive::AmmoniumHydroxide => "nh4oh",
        Additive::AmmoniumFluoride => "nh4f",
        Additive::Other => "other",
    }
}

/// One `system` record of the TSV form.
fn system_line(id: &str, s: &LcSystem) -> String {
    let g: Vec<String> = s
        .gradient
        .iter()
        .map(|p| format!("{}:{}", p.time_min, p.organic_pct))
        .collect();
    format!(
        "system\t{id}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\n",
        s.mode.label(),
        s.chem_class.name(),
        modifier_code(s.modifier),
        fmt_opt(s.ph),
        additive_code(s.additive),
        s.t0_min,
        s.flow_ml_min,
        fmt_opt(s.temperature_c),
        g.join(";")
    )
}

fn fmt_opt(v: Option<f64>) -> String {
    v.map_or_else(String::new, |x| format!("{x}"))
}

impl MemoryTable {
    /// Measurements of an analyte: (system id, system, psi_k1). An InChIKey with a stereo
    /// layer that the memory does not hold finds the measurements stored under its
    /// stereo-less key (same skeleton block and protonation flag, `UHFFFAOYSA` second block):
    /// the open retention data often give structures without stereo, and what they measured
    /// is the same compound (its enantiomers retain alike on achiral phases; a diastereomer
    /// rarely has its own record). Common practice, no source.
    pub fn measurements<'a>(
        &'a self,
        inchikey: &str,
    ) -> impl Iterator<Item = (&'a str, &'a LcSystem, f64)> + 'a {
        let inchikey = self.stored_key(inchikey);
        let inchikey = inchikey.as_str();
        let eager = self
            .entries
            .get(inchikey)
            .into_iter()
            .flatten()
            .filter_map(|(id, psi, _)| {
                self.systems
                    .get_key_value(id)
                    .map(|(k, s)| (k.as_str(), s, *psi))
            });
        // lazy records were checked when the table was built and by the test
        // `bundled_table_parses_completely`; an item that does not parse is skipped
        let lazy = self
            .lazy
            .as_ref()
            .and_then(|l| l.items(inchikey))
            .into_iter()
            .flat_map(|items| items.split(','))
            .filter_map(|item| {
                let mut parts = item.split(':');
                let (id, psi) = (parts.next()?, parts.next()?.parse::<f64>().ok()?);
                self.systems
                    .get_key_value(id)
                    .map(|(k, s)| (k.as_str(), s, psi))
            });
        eager.chain(lazy)
    }

    /// Whether the memory holds measurements under exactly this key.
    fn holds(&self, inchikey: &str) -> bool {
        self.entries.get(inchikey).is_some_and(|v| !v.is_empty())
            || self
                .lazy
                .as_ref()
                .and_then(|l| l.items(inchikey))
                .is_some_and(|i| !i.is_empty())
    }

    /// The key the memory holds this analyte under: the key itself, else its stereo-less form
    /// when that is held (see [`MemoryTable::measurements`]).
    fn stored_key(&self, inchikey: &str) -> String {
        if self.holds(inchikey) {
            return inchikey.to_string();
        }
        let b = inchikey.as_bytes();
        if b.len() == 27 && b[14] == b'-' && b[25] == b'-' {
            let stereo_less = format!("{}-UHFFFAOYSA-{}", &inchikey[..14], &inchikey[26..]);
            if stereo_less != inchikey && self.holds(&stereo_less) {
                return stereo_less;
            }
        }
        inchikey.to_string()
    }

    /// Number of analytes.
    pub fn n_analytes(&self) -> usize {
        match &self.lazy {
            None => self.entries.len(),
            Some(l) => {
                let extra = self.entries.keys().filter(|k| l.items(k).is_none()).count();
                l.index.len() + extra
            }
        }
    }

    /// The table with every record parsed (a lazily read table materialised).
    ///
    /// # Errors
    /// `ModelError::BadRow` for a record that does not parse.
    pub fn materialised(&self) -> Result<MemoryTable, ModelError> {
        let Some(l) = &self.lazy else {
            return Ok(self.clone());
        };
        let mut text = String::from("# header\n");
        for (id, s) in &self.systems {
            text.push_str(&system_line(id, s));
        }
        text.push_str(&l.text);
        let mut t = MemoryTable::from_tsv(&text, "lazily read memory table")?;
        for (k, v) in &self.entries {
            t.entries
                .entry(k.clone())
                .or_default()
                .extend(v.iter().cloned());
        }
        Ok(t)
    }

    /// Writes the table as TSV text: `system` records then `analyte` records
    /// (`inchikey`, then `system:psi_k1:rt_min` joined by `,`).
    pub fn to_tsv(&self) -> String {
        let mut out = String::new();
        out.push_str(MEMORY_LICENCE);
        out.push('\n');
        out.push_str("# system\tid\tmode\tchem_class\tmodifier\tph\tadditive\tt0_min\tflow_ml_min\ttemperature_c\tgradient_org\n");
        out.push_str("# analyte\tinchikey\tsystem_id:psi_k1:rt_min,...\n");
        for (id, s) in &self.systems {
            out.push_str(&system_line(id, s));
        }
        let materialised;
        let entries = if self.lazy.is_some() {
            materialised = self.materialised().map(|t| t.entries).unwrap_or_default();
            &materialised
        } else {
            &self.entries
        };
        for (key, list) in entries {
            let items: Vec<String> = list
                .iter()
                .map(|(id, psi, rt)| format!("{id}:{psi:.4}:{rt:.3}"))
                .collect();
            out.push_str(&format!("analyte\t{key}\t{}\n", items.join(",")));
        }
        out
    }

    /// Reads the TSV text written by `to_tsv`.
    ///
    /// # Errors
    /// `ModelError::BadRow` naming the line.
    pub fn from_tsv(text: &str, label: &str) -> Result<Self, ModelError> {
        // Read straight from the text (no per-cell allocation): the table has ~15,000 analyte
        // records and is read on every advise/predict run.
        let mut t = MemoryTable::default();
        for (i, l) in text.lines().enumerate().skip(1) {
            let line = i + 1;
            if l.trim().is_empty() {
                continue;
            }
            let bad = |reason: String| ModelError::BadRow {
                path: label.to_owned(),
                line,
                reason,
            };
            let mut cells = l.split('\t');
            let kind = cells.next().unwrap_or("");
            match kind {
                "system" => {
                    let r: Vec<&str> = l.split('\t').collect();
                    let f = |j: usize| r.get(j).copied().unwrap_or("");
                    let num = |j: usize| -> Result<f64, ModelError> {
                        f(j).parse()
                            .map_err(|_| bad(format!("not a number: {:?}", f(j))))
                    };
                    let opt = |j: usize| -> Result<Option<f64>, ModelError> {
                        if f(j).is_empty() {
                            Ok(None)
                        } else {
                            num(j).map(Some)
                        }
                    };
                    let mode = match f(2) {
                        "RP" => Mode::ReversedPhase,
                        "HILIC" => Mode::Hilic,
                        m => return Err(bad(format!("mode {m:?}"))),
                    };
                    let sys = LcSystem {
                        mode,
                        chem_class: ChemClass::parse(f(3))
                            .ok_or_else(|| bad(format!("chem_class {:?}", f(3))))?,
                        modifier: Modifier::parse(f(4)),
                        ph: opt(5)?,
                        additive: Additive::parse(f(6)),
                        t0_min: num(7)?,
                        dwell_min: 0.0,
                        flow_ml_min: num(8)?,
                        temperature_c: opt(9)?,
                        gradient: parse_program(f(10)).map_err(|e| bad(e.to_string()))?,
                    };
                    sys.validate().map_err(|e| bad(e.to_string()))?;
                    t.systems.insert(f(1).to_owned(), sys);
                }
                "analyte" => {
                    let key = cells.next().unwrap_or("");
                    let items = cells.next().unwrap_or("");
                    let mut list =
                        Vec::with_capacity(items.bytes().filter(|&b| b == b',').count() + 1);
                    for item in items.split(',') {
                        let mut parts = item.split(':');
                        let (Some(id), Some(psi), Some(rt), None) =
                            (parts.next(), parts.next(), parts.next(), parts.next())
                        else {
                            return Err(bad(format!("entry {item:?}")));
                        };
                        let psi: f64 = psi.parse().map_err(|_| bad(format!("psi {psi:?}")))?;
                        let rt: f64 = rt.parse().map_err(|_| bad(format!("rt {rt:?}")))?;
                        let Some((id, _)) = t.systems.get_key_value(id) else {
                            return Err(bad(format!("unknown system {id:?}")));
                        };
                        list.push((id.clone(), psi, rt));
                    }
                    t.entries.insert(key.to_owned(), list);
                }
                other if other.starts_with('#') => {}
                other => return Err(bad(format!("record kind {other:?}"))),
            }
        }
        Ok(t)
    }

    /// Reads the TSV text written by `to_tsv`, parsing the `system` records and indexing the
    /// `analyte` records, which are parsed when an analyte is asked for. The records must be
    /// sorted by InChIKey (as `to_tsv` writes them).
    ///
    /// # Errors
    /// `ModelError::BadRow` naming the line: a bad system record, an analyte record without
    /// its fields, or records out of order.
    pub fn from_tsv_lazy(text: &str, label: &str) -> Result<Self, ModelError> {
        let split = text
            .match_indices("\nanalyte\t")
            .next()
            .map_or(text.len(), |(i, _)| i + 1);
        let mut t = MemoryTable::from_tsv(&text[..split], label)?;
        let head_lines = text[..split].lines().count();
        let body = text[split..].to_string();
        let mut index = Vec::new();
        let mut pos = 0;
        for (n, line) in body.split_inclusive('\n').enumerate() {
            let bad = |reason: String| ModelError::BadRow {
                path: label.to_owned(),
                line: head_lines + n + 1,
                reason,
            };
            let content = line.trim_end_matches(['\n', '\r']);
            let start = pos;
            pos += line.len();
            if content.trim().is_empty() || content.starts_with('#') {
                continue;
            }
            let rest = content
                .strip_prefix("analyte\t")
                .ok_or_else(|| bad("expected an analyte record after the first one".into()))?;
            let key_len = rest
                .find('\t')
                .ok_or_else(|| bad("analyte record without entries".into()))?;
            let key_start = start + "analyte\t".len();
            let entry = (key_start, key_start + key_len, start + content.len());
            if let Some(&(a, b, _)) = index.last()
                && body[a..b] >= body[entry.0..entry.1]
            {
                return Err(bad("analyte records are not sorted by InChIKey".into()));
            }
            index.push(entry);
        }
        t.lazy = Some(LazyAnalytes { text: body, index });
        Ok(t)
    }

    /// Reads a gzip-compressed table.
    ///
    /// # Errors
    /// `ModelError::Io` or `BadRow`.
    pub fn from_gz_bytes(bytes: &[u8], label: &str) -> Result<Self, ModelError> {
        Self::from_tsv(&gunzip(bytes, label)?, label)
    }

    /// Reads a gzip-compressed table lazily ([`MemoryTable::from_tsv_lazy`]).
    ///
    /// # Errors
    /// `ModelError::Io` or `BadRow`.
    pub fn from_gz_bytes_lazy(bytes: &[u8], label: &str) -> Result<Self, ModelError> {
        Self::from_tsv_lazy(&gunzip(bytes, label)?, label)
    }

    /// Gzip-compressed TSV bytes (deterministic).
    ///
    /// # Errors
    /// `ModelError::Io` if compression fails.
    pub fn to_gz_bytes(&self) -> Result<Vec<u8>, ModelError> {
        gzip(self.to_tsv().as_bytes())
    }

    /// Builds the table from training data: psi_k1 and rt averaged per (InChIKey, system).
    pub fn from_training(data: &TrainingData) -> Self {
        let mut t = MemoryTable::default();
        for s in &data.systems {
            t.systems.insert(s.id.clone(), s.system.clone());
        }
        let mut acc: BTreeMap<(&str, usize), (f64, f64, usize)> = BTreeMap::new();
        for r in &data.rows {
            let e = acc
                .entry((r.inchikey.as_str(), r.system))
                .or_insert((0.0, 0.0, 0));
            e.0 += r.psi_k1;
            e.1 += r.rt_min;
            e.2 += 1;
        }
        for ((key, si), (psi, rt, n)) in acc {
            let n = n as f64;
            // Round as written so that a table read back from disk gives the same values.
            let psi = (psi / n * 1e4).round() / 1e4;
            let rt = (rt / n * 1e3).round() / 1e3;
            t.entries.entry(key.to_owned()).or_default().push((
                data.systems[si].id.clone(),
                psi,
                rt,
            ));
        }
        for list in t.entries.values_mut() {
            list.sort_by(|a, b| a.0.cmp(&b.0));
        }
        t
    }
}

// ---------------------------------------------------------------------------------------------
// The user's own scouting fits
// ---------------------------------------------------------------------------------------------

/// Largest pH difference at which a stored fit counts as measured on the target system
/// (common practice for method robustness ranges, ±0.2 pH; no source).
pub const FIT_PH_TOLERANCE: f64 = 0.2;
/// Largest temperature difference, °C, at which a stored fit counts as measured on the target
/// system, when both temperatures are known (common practice, no source).
pub const FIT_TEMPERATURE_TOLERANCE_C: f64 = 5.0;
/// Run-to-run retention error of one run, min: the repeatability the scouting fit assumes
/// (`measured::scout::RETENTION_ERROR_MIN`; common practice, no source).
pub const FIT_RETENTION_ERROR_MIN: f64 = 0.01;
/// z value of a central 90 % normal interval.
const Z90: f64 = 1.644_853_6;

/// log kw and S fitted to the user's own scouting runs (`phasewise scout --store`), with the
/// system they were measured on, as the retention model uses them.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct StoredFit {
    /// InChIKey of the analyte.
    pub inchikey: String,
    /// Stationary-phase id of the runs (catalogue id).
    pub phase_id: String,
    /// The scouting system as the model reads it: mode, chemistry class, modifier, pH,
    /// temperature, the first run's gradient program, dead and dwell time, and the additive
    /// read from the recorded buffer ([`Additive::from_buffer_text`]; `Other` when no buffer
    /// was recorded, as before the overlay's migration 3); the flow is 1 mL/min when not given
    /// (the model's system features do not use the flow).
    pub system: LcSystem,
    /// The buffer or additive of the runs as the user gave it (`scout --store --buffer`), when
    /// recorded.
    #[serde(default)]
    pub buffer: Option<String>,
    /// Fitted parameters, log k = log kw − S ψ with ψ the strong-solvent fraction of the
    /// system's mode: the organic fraction in RP, the water fraction 1 − %organic/100 in HILIC
    /// (docs/model.md §1), so S is positive in both. Rows stored before the overlay's
    /// migration 3 were HILIC fits in the organic fraction; they are converted when read
    /// (`cli::knowledge::stored_fit_from` in the binary).
    pub lss: crate::model::gradient::LssParameters,
    /// 1σ uncertainty of log kw.
    pub log_kw_uncertainty: f64,
    /// 1σ uncertainty of S.
    pub s_uncertainty: f64,
    /// Correlation of the two estimates.
    pub correlation: f64,
    /// RMS retention residual of the fit, min.
    pub rms_residual_min: f64,
    /// The user's source text.
    pub source: String,
}

impl StoredFit {
    /// Strong-solvent fraction at which k = 1, the retention memory's `psi_k1`: log kw / S,
    /// since the parameters are written in the strong-solvent fraction of the mode (organic in
    /// RP, water in HILIC; the model's convention, see `lss` module docs).
    pub fn psi_k1(&self) -> f64 {
        self.lss.log_kw / self.lss.s
    }

    /// The id this fit carries as a retention-memory source: the user's source text and the
    /// system, e.g. `user: notebook 12 p. 4 [rp-c18, acetonitrile, pH 3]`.
    pub fn system_id(&self) -> String {
        format!(
            "user: {} [{}, {}, pH {}{}{}]",
            self.source,
            self.phase_id,
            match self.system.modifier {
                Modifier::Methanol => "methanol",
                _ => "acetonitrile",
            },
            self.system
                .ph
                .map_or_else(|| "?".to_string(), |p| format!("{p}")),
            self.system
                .temperature_c
                .map_or_else(String::new, |t| format!(", {t} °C")),
            self.buffer
                .as_deref()
                .map_or_else(String::new, |b| format!(", {b}"))
        )
    }

    /// Whether the fit was measured on the target system: same phase id and modifier, pH
    /// within [`FIT_PH_TOLERANCE`], temperature within [`FIT_TEMPERATURE_TOLERANCE_C`]
    /// when both are known (`target_temperature_c` is `None` when the user did not give one),
    /// and the same additive when both are known (a fit whose buffer was not recorded, or not
    /// recognised, matches any additive: it cannot be told apart).
    pub fn matches(
        &self,
        phase_id: &str,
        target: &LcSystem,
        target_temperature_c: Option<f64>,
    ) -> bool {
        let ph_ok = match (self.system.ph, target.ph) {
            (Some(a), Some(b)) => (a - b).abs() <= FIT_PH_TOLERANCE + 1e-9,
            _ => false,
        };
        let t_ok = match (self.system.temperature_c, target_temperature_c) {
            (Some(a), Some(b)) => (a - b).abs() <= FIT_TEMPERATURE_TOLERANCE_C + 1e-9,
            _ => true,
        };
        let additive_ok = self.system.additive == Additive::Other
            || target.additive == Additive::Other
            || self.system.additive == target.additive;
        self.phase_id == phase_id
            && self.system.mode == target.mode
            && self.system.modifier == target.modifier
            && ph_ok
            && t_ok
            && additive_ok
    }

    /// Predict retention on `target` (which [`StoredFit::matches`]) directly from the fitted
    /// log kw and S with the gradient equation ([`crate::model::gradient::gradient_elution`]).
    ///
    /// Interval: a central 90 % normal interval, `tR ± 1.645 σ`, with
    /// `σ² = σt² + gᵀ C g`: σt the retention error of one run (the fit's RMS residual, at least
    /// the scouting fit's assumed 0.01 min repeatability), C the covariance of (log kw, S) from
    /// the fit and g the gradient of tR with respect to (log kw, S) on the target program
    /// (central differences). The first term is the new run's own scatter, the second the
    /// extrapolation of the fit to a program it was not measured on.
    ///
    /// # Errors
    /// An invalid target system or a gradient on which the analyte does not elute.
    pub fn predict(
        &self,
        target: &LcSystem,
        coelution_map_memory: Vec<(f64, f64)>,
        coelution_map_descriptor: Vec<(f64, f64)>,
    ) -> Result<Prediction, ModelError> {
        use crate::model::gradient::{
            GradientPoint as Point, GradientProgram, GradientSystem, LssParameters,
            gradient_elution,
        };
        target.validate()?;
        let points: Vec<Point> = target
            .gradient
            .iter()
            .map(|p| Point {
                time_min: p.time_min,
                organic_pct: p.organic_pct,
            })
            .collect();
        let as_run = GradientProgram::from_points(&points)
            .map_err(|e| ModelError::BadGradient(e.to_string()))?;
        // The parameters are in the strong-solvent fraction: water in HILIC.
        let program = match self.system.mode {
            Mode::ReversedPhase => as_run,
            Mode::Hilic => as_run.complement(),
        };
        let gsys = GradientSystem {
            dead_time_min: target.t0_min,
            dwell_time_min: target.dwell_min,
        };
        let rt_of = |p: &LssParameters| -> Result<f64, ModelError> {
            gradient_elution(p, &program, &gsys)
                .map(|e| e.retention_time_min)
                .map_err(|e| ModelError::BadGradient(e.to_string()))
        };
        let elution = gradient_elution(&self.lss, &program, &gsys)
            .map_err(|e| ModelError::BadGradient(e.to_string()))?;
        let rt = elution.retention_time_min;
        let (a, s) = (self.lss.log_kw, self.lss.s);
        let (ha, hs) = (1e-4, 1e-4 * s.abs().max(1.0));
        let d_a = (rt_of(&LssParameters { log_kw: a + ha, s })?
            - rt_of(&LssParameters { log_kw: a - ha, s })?)
            / (2.0 * ha);
        let d_s = (rt_of(&LssParameters {
            log_kw: a,
            s: s + hs,
        })? - rt_of(&LssParameters {
            log_kw: a,
            s: s - hs,
        })?) / (2.0 * hs);
        let (sa, ss) = (self.log_kw_uncertainty, self.s_uncertainty);
        let rho = self.correlation.clamp(-1.0, 1.0);
        let var_param = (d_a * sa).powi(2) + (d_s * ss).powi(2) + 2.0 * d_a * d_s * rho * sa * ss;
        let sigma_run = self.rms_residual_min.max(FIT_RETENTION_ERROR_MIN);
        let sigma = (sigma_run.powi(2) + var_param.max(0.0)).sqrt();
        // d tR / d psi_k1 at fixed S: psi = log kw / S in the strong solvent, so
        // d log kw = S d psi
        let slope = d_a * s;
        let sd_psi = if slope.abs() > 1e-12 {
            sigma / slope.abs()
        } else {
            0.05
        };
        let t_out = rt - target.t0_min - target.dwell_min;
        Ok(Prediction {
            rt_min: rt,
            interval_min: ((rt - Z90 * sigma).max(target.t0_min), rt + Z90 * sigma),
            organic_at_elution_pct: target.organic_at_pct(t_out),
            psi_k1: self.psi_k1(),
            lss_s: s,
            elutes_after_program: rt - target.t0_min > target.program_end_min(),
            path: PredictionPath::ScoutingFit {
                source: self.source.clone(),
            },
            difference_sd_psi: vec![(10.0, sd_psi)],
            rt_slope_min: slope,
            coelution_map_descriptor,
            coelution_map_memory,
            system: target.fingerprint(),
            extrapolated: false,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::gradient::{
        GradientProgram, GradientSystem, LssParameters, gradient_elution,
    };
    use crate::model::system::GradientPoint;

    fn rp_system(ph: f64, temperature_c: Option<f64>, program: &[(f64, f64)]) -> LcSystem {
        LcSystem {
            mode: Mode::ReversedPhase,
            chem_class: ChemClass::C18,
            modifier: Modifier::Acetonitrile,
            ph: Some(ph),
            additive: Additive::Other,
            gradient: program
                .iter()
                .map(|&(time_min, organic_pct)| GradientPoint {
                    time_min,
                    organic_pct,
                })
                .collect(),
            t0_min: 1.0,
            dwell_min: 0.5,
            flow_ml_min: 1.0,
            temperature_c,
        }
    }

    /// Invented fit (not a measured compound).
    fn fit(ph: f64, temperature_c: Option<f64>) -> StoredFit {
        StoredFit {
            inchikey: "KEY".into(),
            phase_id: "rp-c18".into(),
            system: rp_system(ph, temperature_c, &[(0.0, 5.0), (10.0, 95.0)]),
            lss: LssParameters {
                log_kw: 2.0,
                s: 4.0,
            },
            log_kw_uncertainty: 0.01,
            s_uncertainty: 0.03,
            correlation: 0.9,
            rms_residual_min: 0.0,
            source: "notebook (invented)".into(),
            buffer: None,
        }
    }

    #[test]
    fn a_recorded_buffer_must_match_a_known_target_additive() {
        let mut f = fit(3.0, None);
        f.buffer = Some("0.1 % formic acid".into());
        f.system.additive = Additive::from_buffer_text("0.1 % formic acid");
        assert_eq!(f.system.additive, Additive::FormicAcid);
        let mut target = rp_system(3.0, None, &[(0.0, 5.0), (20.0, 95.0)]);
        // the target's additive unknown: cannot be told apart, matches
        assert!(f.matches("rp-c18", &target, None));
        target.additive = Additive::FormicAcid;
        assert!(f.matches("rp-c18", &target, None));
        target.additive = Additive::AmmoniumFormate;
        assert!(!f.matches("rp-c18", &target, None));
        // shown in the memory-source id
        assert!(
            f.system_id().ends_with("pH 3, 0.1 % formic acid]"),
            "{}",
            f.system_id()
        );
        // buffer texts and catalogue ids
        for (text, want) in [
            ("10 mM Ammonium Formate pH 3.5", Additive::AmmoniumFormate),
            ("ammonium-acetate-2", Additive::AmmoniumAcetate),
            ("0.05 % TFA", Additive::TrifluoroaceticAcid),
            ("formic-acid", Additive::FormicAcid),
            ("20 mM potassium phosphate", Additive::Other),
        ] {
            assert_eq!(Additive::from_buffer_text(text), want, "{text}");
        }
    }

    #[test]
    fn a_fit_matches_only_its_own_system_within_the_tolerances() {
        let f = fit(3.0, Some(30.0));
        let target = |ph, t| rp_system(ph, t, &[(0.0, 5.0), (20.0, 95.0)]);
        assert!(f.matches("rp-c18", &target(3.2, Some(35.0)), Some(35.0)));
        assert!(f.matches("rp-c18", &target(2.8, None), None));
        assert!(!f.matches("rp-c18", &target(3.3, None), None));
        assert!(!f.matches("rp-c18", &target(3.0, Some(40.0)), Some(40.0)));
        assert!(!f.matches("rp-c8", &target(3.0, None), None));
        let mut meoh = target(3.0, None);
        meoh.modifier = Modifier::Methanol;
        assert!(!f.matches("rp-c18", &meoh, None));
    }

    #[test]
    fn psi_k1_is_log_kw_over_s_in_the_strong_solvent() {
        let mut f = fit(3.0, None);
        assert!((f.psi_k1() - 0.5).abs() < 1e-12);
        // HILIC fits are in the water fraction too (positive S): psi = log kw / S as well.
        f.system.mode = Mode::Hilic;
        assert!((f.psi_k1() - 0.5).abs() < 1e-12);
        f.lss.log_kw = 1.0;
        assert!((f.psi_k1() - 0.25).abs() < 1e-12);
        assert!(
            f.system_id()
                .starts_with("user: notebook (invented) [rp-c18")
        );
    }

    #[test]
    fn direct_prediction_is_the_gradient_equation_with_an_interval_around_it() {
        let f = fit(3.0, None);
        let target = rp_system(3.0, None, &[(0.0, 5.0), (20.0, 95.0), (25.0, 95.0)]);
        let p = f.predict(&target, Vec::new(), Vec::new()).unwrap();
        let want = gradient_elution(
            &f.lss,
            &GradientProgram::parse("0:5,20:95,25:95").unwrap(),
            &GradientSystem {
                dead_time_min: 1.0,
                dwell_time_min: 0.5,
            },
        )
        .unwrap()
        .retention_time_min;
        assert!((p.rt_min - want).abs() < 1e-9);
        assert_eq!(p.path.label(), "scouting fit");
        let (lo, hi) = p.interval_min;
        // at least ±1.645 × 0.01 min (the run repeatability) and symmetric
        assert!(lo < want - 0.016 && hi > want + 0.016, "{lo} {hi}");
        assert!(((want - lo) - (hi - want)).abs() < 1e-9);
        // a larger parameter uncertainty widens it
        let mut g = fit(3.0, None);
        g.s_uncertainty = 0.3;
        let q = g.predict(&target, Vec::new(), Vec::new()).unwrap();
        assert!(q.interval_min.1 - q.interval_min.0 > hi - lo);
        // an invalid target is an error naming the value
        let mut bad = target.clone();
        bad.t0_min = -1.0;
        assert!(f.predict(&bad, Vec::new(), Vec::new()).is_err());
    }

    #[test]
    fn a_hilic_fit_predicts_on_the_water_content_of_the_program() {
        // Invented HILIC fit in the water fraction: log kw = 1.2, S = 6 (psi_k1 = 0.2, i.e.
        // k = 1 at 20 % water = 80 % acetonitrile). On a 95 → 60 % acetonitrile program it must
        // elute as the gradient equation says on the water program 5 → 40 %.
        let mut f = fit(3.0, None);
        f.system.mode = Mode::Hilic;
        f.lss = LssParameters {
            log_kw: 1.2,
            s: 6.0,
        };
        let mut target = rp_system(3.0, None, &[(0.0, 95.0), (15.0, 60.0), (20.0, 60.0)]);
        target.mode = Mode::Hilic;
        let p = f.predict(&target, Vec::new(), Vec::new()).unwrap();
        let want = gradient_elution(
            &f.lss,
            &GradientProgram::parse("0:5,15:40,20:40").unwrap(),
            &GradientSystem {
                dead_time_min: 1.0,
                dwell_time_min: 0.5,
            },
        )
        .unwrap()
        .retention_time_min;
        assert!((p.rt_min - want).abs() < 1e-9, "{} vs {want}", p.rt_min);
        assert!((p.psi_k1 - 0.2).abs() < 1e-12);
        // More retention (larger log kw) elutes later: the slope is positive.
        assert!(p.rt_slope_min > 0.0);
    }

    #[test]
    fn combine_single_and_many_sources() {
        let mut w = MemoryWeights::default();
        w.rho.insert("RP/same_mode".into(), 0.5);
        let one = w
            .combine(
                Mode::ReversedPhase,
                &[("a".into(), SourceRelation::SameMode, 0.1)],
            )
            .unwrap();
        // One source: rho · r (BLUP with n = 1).
        assert!((one.0 - 0.05).abs() < 1e-12);
        let many: Vec<_> = (0..99)
            .map(|i| (format!("s{i:02}"), SourceRelation::SameMode, 0.1))
            .collect();
        let m = w.combine(Mode::ReversedPhase, &many).unwrap();
        // Many sources: n rho/(1+(n−1) rho) → 1, so the shift approaches the mean residual.
        assert!(m.0 > 0.098 && m.0 < 0.1);
        assert_eq!(m.1.len(), 99);
        assert!(w.combine(Mode::Hilic, &many).is_none());
    }

    #[test]
    fn tsv_round_trip_and_bad_rows() {
        let text = format!(
            "{MEMORY_LICENCE}\nsystem\t0001\tRP\tC18\tacn\t2.7\tformic\t1.2\t0.3\t40\t0:5;10:95\nanalyte\tKEY-A\t0001:0.4512:5.123\n"
        );
        let t = MemoryTable::from_tsv(&text, "x").unwrap();
        assert_eq!(t.n_analytes(), 1);
        let back = MemoryTable::from_tsv(&t.to_tsv(), "y").unwrap();
        assert_eq!(t, back);
        let bad = text.replace("0001:0.4512", "0002:0.4512");
        assert!(
            MemoryTable::from_tsv(&bad, "x")
                .unwrap_err()
                .to_string()
                .contains("0002")
        );
        let bad = text.replace("\tRP\t", "\tGC\t");
        assert!(MemoryTable::from_tsv(&bad, "x").is_err());
    }

    #[test]
    fn bundled_table_parses_completely() {
        // every record of the shipped table parses, and the lazy reader gives the same
        // measurements as the eager one for every analyte
        let bytes = include_bytes!("../../data/retention_memory.tsv.gz");
        let eager = MemoryTable::from_gz_bytes(bytes, "bundled").unwrap();
        let lazy = MemoryTable::from_gz_bytes_lazy(bytes, "bundled").unwrap();
        assert!(eager.n_analytes() > 10_000, "{}", eager.n_analytes());
        assert_eq!(lazy.n_analytes(), eager.n_analytes());
        for key in eager.entries.keys() {
            let a: Vec<_> = eager.measurements(key).collect();
            let b: Vec<_> = lazy.measurements(key).collect();
            assert_eq!(a, b, "{key}");
        }
        assert_eq!(lazy.materialised().unwrap(), eager);
        assert_eq!(lazy.to_tsv(), eager.to_tsv());
        assert_eq!(lazy.measurements("NOT-A-KEY").count(), 0);
    }

    #[test]
    fn lazy_reader_rejects_unsorted_and_broken_records() {
        let head = "# x\nsystem\ts1\tRP\tC18\tacn\t3\tformic\t1\t0.5\t30\t0:5;10:95\n";
        let ok = format!("{head}analyte\tAAA\ts1:0.3:4.0\nanalyte\tBBB\ts1:0.4:5.0\n");
        let t = MemoryTable::from_tsv_lazy(&ok, "t").unwrap();
        assert_eq!(
            t.measurements("BBB").map(|m| m.2).collect::<Vec<_>>(),
            [0.4]
        );
        let unsorted = format!("{head}analyte\tBBB\ts1:0.3:4.0\nanalyte\tAAA\ts1:0.4:5.0\n");
        let e = MemoryTable::from_tsv_lazy(&unsorted, "t")
            .unwrap_err()
            .to_string();
        assert!(e.contains("sorted") && e.contains('4'), "{e}");
        let broken = format!("{head}analyte\tAAA\ts1:0.3:4.0\nsystem\ts2\n");
        assert!(MemoryTable::from_tsv_lazy(&broken, "t").is_err());
    }
}
