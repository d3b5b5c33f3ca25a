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

use std::collections::BTreeMap;
use std::io::Read;

use serde::{Deserialize, Serialize};

use super::regression::{Additive, ChemClass, LcSystem, Mode, ModelError, Modifier, parse_program};

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
/// more likely a mis-annotation than an analyte effect (common practice, no source).
const RESIDUAL_CAP: f64 = 0.4;
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

fn fmt_opt(v: Option<f64>) -> String {
    v.map_or_else(String::new, |x| format!("{x}"))
}

impl MemoryTable {
    /// Measurements of an analyte: (system id, system, psi_k1).
    pub fn measurements<'a>(
        &'a self,
        inchikey: &str,
    ) -> impl Iterator<Item = (&'a str, &'a LcSystem, f64)> + 'a {
        self.entries
            .get(inchikey)
            .into_iter()
            .flatten()
            .filter_map(|(id, psi, _)| self.systems.get(id).map(|s| (id.as_str(), s, *psi)))
    }

    /// Number of analytes.
    pub fn n_analytes(&self) -> usize {
        self.entries.len()
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
            let g: Vec<String> = s
                .gradient
                .iter()
                .map(|p| format!("{}:{}", p.time_min, p.organic_pct))
                .collect();
            out.push_str(&format!(
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
            ));
        }
        for (key, list) in &self.entries {
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

    /// Reads a gzip-compressed table.
    ///
    /// # Errors
    /// `ModelError::Io` or `BadRow`.
    pub fn from_gz_bytes(bytes: &[u8], label: &str) -> Result<Self, ModelError> {
        let mut s = String::new();
        flate2::read::GzDecoder::new(bytes)
            .read_to_string(&mut s)
            .map_err(|e| ModelError::Io {
                path: label.to_owned(),
                reason: e.to_string(),
            })?;
        Self::from_tsv(&s, label)
    }

    /// Gzip-compressed TSV bytes (deterministic).
    ///
    /// # Errors
    /// `ModelError::Io` if compression fails.
    pub fn to_gz_bytes(&self) -> Result<Vec<u8>, ModelError> {
        super::regression::gzip(self.to_tsv().as_bytes())
    }

    /// Builds the table from training data: psi_k1 and rt averaged per (InChIKey, system).
    pub fn from_training(data: &super::regression::TrainingData) -> Self {
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

#[cfg(test)]
mod tests {
    use super::*;

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
}
