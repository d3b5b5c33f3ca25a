//! Training data of the LC model: RepoRT systems and retention times read from TSV, flow
//! programs turned into volume time, and the seeded split of systems into folds.

use std::collections::BTreeMap;
use std::io::Read;
use std::path::Path;

use super::features::{AnalyteFeatures, DescriptorSource};
use super::lss::{lss_s, psi_from_rt};
use super::prediction::apply_map;
use super::system::{Additive, ChemClass, GradientPoint, LcSystem, Mode, ModelError, Modifier};

// ---------------------------------------------------------------------------------------------
// Training data
// ---------------------------------------------------------------------------------------------

/// One training system: RepoRT dataset id plus the model's view of it.
#[derive(Debug, Clone, PartialEq)]
pub struct TrainingSystem {
    /// RepoRT dataset id.
    pub id: String,
    /// System as the model reads it (dwell 0: RepoRT gives no dwell volume).
    pub system: LcSystem,
    /// Gradient duration (min) as given in systems.tsv.
    pub gradient_duration_min: f64,
    /// Flow program `(time min, flow mL/min)` where the flow changes before the end of the
    /// separation window (empty: constant nominal flow). When present, `system.gradient` is on
    /// the volume-equivalent time axis `τ(t) = ∫₀ᵗ F dt / F_nominal` (see `volume_time`).
    pub flow_program: Vec<(f64, f64)>,
}

impl TrainingSystem {
    /// Volume-equivalent time `τ(t) = ∫₀ᵗ F(t') dt' / F_nominal` (min) of a real time `t`; the
    /// identity for a constant flow. Retention is a matter of volume (V_R = V0 (1 + k) in the
    /// gradient integral written in volume), so on the τ axis a flow program becomes a
    /// constant-flow problem at the nominal flow with the same dead time (common practice,
    /// no source).
    pub fn volume_time(&self, t_min: f64) -> f64 {
        volume_time(&self.flow_program, self.system.flow_ml_min, t_min)
    }
    /// Real time (min) at which the volume-equivalent time is `tau_min` (inverse of
    /// `volume_time`).
    pub fn real_time(&self, tau_min: f64) -> f64 {
        if self.flow_program.is_empty() {
            return tau_min;
        }
        // volume_time is increasing (flows > 0): bisection to 1e-9 min
        let (mut lo, mut hi) = (0.0, tau_min.max(0.0) + 1.0);
        while self.volume_time(hi) < tau_min {
            hi *= 2.0;
        }
        for _ in 0..80 {
            let mid = 0.5 * (lo + hi);
            if self.volume_time(mid) < tau_min {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        0.5 * (lo + hi)
    }
}

/// Flow (mL/min) at time t of a piecewise-linear flow program, held before the first and after
/// the last point (the same interpolation as a calibration map); 1 mL/min without a program.
fn flow_at(program: &[(f64, f64)], t: f64) -> f64 {
    if program.is_empty() {
        return 1.0;
    }
    apply_map(program, t)
}

/// `∫₀ᵗ F dt / F_nominal` for a piecewise-linear flow program (exact: between the program's
/// breakpoints the flow is linear, so the midpoint rule is exact; steps are handled too).
pub(crate) fn volume_time(program: &[(f64, f64)], nominal_ml_min: f64, t_min: f64) -> f64 {
    if program.is_empty() {
        return t_min;
    }
    let mut knots: Vec<f64> = program
        .iter()
        .map(|p| p.0)
        .filter(|&x| x > 0.0 && x < t_min)
        .collect();
    knots.insert(0, 0.0);
    knots.push(t_min.max(0.0));
    let mut v = 0.0;
    for w in knots.windows(2) {
        v += flow_at(program, 0.5 * (w[0] + w[1])) * (w[1] - w[0]);
    }
    v / nominal_ml_min
}

/// One measured retention row with its descriptors resolved.
#[derive(Debug, Clone, PartialEq)]
pub struct TrainingRow {
    /// Index into the systems list.
    pub system: usize,
    /// InChIKey.
    pub inchikey: String,
    /// Index into the analyte list.
    pub analyte: usize,
    /// Measured retention time (min).
    pub rt_min: f64,
    /// psi_k1 from the measured time.
    pub psi_k1: f64,
}

/// Training data read from the systems and retention tables.
#[derive(Debug, Clone)]
pub struct TrainingData {
    /// Systems.
    pub systems: Vec<TrainingSystem>,
    /// Distinct analytes (by SMILES) with their features.
    pub analytes: Vec<AnalyteFeatures>,
    /// Rows usable for training (retained, readable structure).
    pub rows: Vec<TrainingRow>,
    /// Rows skipped and why (reason → count).
    pub skipped: BTreeMap<String, usize>,
}

fn read_text(path: &Path) -> Result<String, ModelError> {
    let bytes = std::fs::read(path).map_err(|e| ModelError::Io {
        path: path.display().to_string(),
        reason: e.to_string(),
    })?;
    if path.extension().is_some_and(|e| e == "gz") {
        let mut s = String::new();
        flate2::read::GzDecoder::new(&bytes[..])
            .read_to_string(&mut s)
            .map_err(|e| ModelError::Io {
                path: path.display().to_string(),
                reason: e.to_string(),
            })?;
        Ok(s)
    } else {
        String::from_utf8(bytes).map_err(|e| ModelError::Io {
            path: path.display().to_string(),
            reason: e.to_string(),
        })
    }
}

/// Reads a TSV with a header into rows of (column → value).
pub(crate) fn parse_tsv(text: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let mut lines = text.lines();
    let header: Vec<String> = lines
        .next()
        .unwrap_or("")
        .split('\t')
        .map(str::to_owned)
        .collect();
    let rows = lines
        .filter(|l| !l.trim().is_empty())
        .map(|l| l.split('\t').map(str::to_owned).collect())
        .collect();
    (header, rows)
}

/// Parses a `time:%;time:%` program string.
///
/// # Errors
/// `ModelError::BadGradient` naming the bad token.
pub fn parse_program(s: &str) -> Result<Vec<GradientPoint>, ModelError> {
    s.split(';')
        .filter(|t| !t.trim().is_empty())
        .map(|tok| {
            let (t, p) = tok
                .split_once(':')
                .ok_or_else(|| ModelError::BadGradient(format!("token {tok:?} lacks ':'")))?;
            let time_min: f64 = t
                .trim()
                .parse()
                .map_err(|_| ModelError::BadGradient(format!("time {t:?}")))?;
            let organic_pct: f64 = p
                .trim()
                .parse()
                .map_err(|_| ModelError::BadGradient(format!("composition {p:?}")))?;
            Ok(GradientPoint {
                time_min,
                organic_pct,
            })
        })
        .collect()
}

/// Parses one systems.tsv row into a training system.
fn system_from_row(col: &dyn Fn(&str) -> Option<String>) -> Result<TrainingSystem, String> {
    let get = |k: &str| col(k).ok_or_else(|| format!("missing column {k}"));
    let num = |k: &str| -> Result<f64, String> {
        get(k)?
            .parse::<f64>()
            .map_err(|_| format!("column {k} is not a number"))
    };
    let opt = |k: &str| col(k).and_then(|v| v.parse::<f64>().ok());
    let mode = match get("mode")?.as_str() {
        "RP" => Mode::ReversedPhase,
        "HILIC" => Mode::Hilic,
        other => return Err(format!("mode {other:?}")),
    };
    let chem = get("chem_class")?;
    let chem_class = ChemClass::parse(&chem).ok_or_else(|| format!("chem_class {chem:?}"))?;
    let mut gradient = parse_program(&get("gradient_org")?).map_err(|e| e.to_string())?;
    // A program whose first point is after 0 holds its first composition from injection on.
    if let Some(first) = gradient.first().copied().filter(|p| p.time_min > 0.0) {
        gradient.insert(
            0,
            GradientPoint {
                time_min: 0.0,
                organic_pct: first.organic_pct,
            },
        );
    }
    // Cut the program at the end of the final hold: the return to the start composition is
    // re-equilibration, not part of the separation.
    if let Some(end) = opt("t_window_end") {
        let at_end = LcSystem {
            mode,
            chem_class,
            modifier: Modifier::Other,
            ph: None,
            additive: Additive::Other,
            gradient: gradient.clone(),
            t0_min: 1.0,
            dwell_min: 0.0,
            flow_ml_min: 1.0,
            temperature_c: None,
        }
        .organic_at_pct(end);
        gradient.retain(|p| p.time_min < end);
        gradient.push(GradientPoint {
            time_min: end,
            organic_pct: at_end,
        });
    }
    // Flow programs that change the flow inside the separation window: the program is moved
    // onto the volume-equivalent time axis (breakpoints of both programs, ramps of the flow
    // subdivided so that the composition stays close to linear in τ).
    let nominal = num("flow_ml_min")?;
    let mut flow_program: Vec<(f64, f64)> = Vec::new();
    if let Some(fp) = col("gradient_flow") {
        let mut pts = Vec::new();
        for tok in fp.split(';').filter(|t| !t.trim().is_empty()) {
            let (t, f) = tok
                .split_once(':')
                .ok_or_else(|| format!("gradient_flow token {tok:?} lacks ':'"))?;
            let t: f64 = t
                .trim()
                .parse()
                .map_err(|_| format!("gradient_flow time {t:?}"))?;
            let f: f64 = f
                .trim()
                .parse()
                .map_err(|_| format!("gradient_flow flow {f:?}"))?;
            if !(t.is_finite() && t >= 0.0 && f.is_finite() && f > 0.0) {
                return Err(format!("gradient_flow point {tok:?}"));
            }
            pts.push((t, f));
        }
        let end = gradient.last().map_or(0.0, |p| p.time_min);
        // the flow anywhere in [0, end] differs from the nominal flow
        let changes = std::iter::once(0.0)
            .chain(pts.iter().map(|p| p.0).filter(|&t| t <= end))
            .chain([end])
            .any(|t| (flow_at(&pts, t) - nominal).abs() > 1e-9);
        if changes && !pts.is_empty() {
            flow_program = pts;
        }
    }
    if !flow_program.is_empty() {
        let probe = LcSystem {
            mode,
            chem_class,
            modifier: Modifier::Other,
            ph: None,
            additive: Additive::Other,
            gradient: gradient.clone(),
            t0_min: 1.0,
            dwell_min: 0.0,
            flow_ml_min: 1.0,
            temperature_c: None,
        };
        let end = gradient.last().map_or(0.0, |p| p.time_min);
        let mut times: Vec<f64> = gradient.iter().map(|p| p.time_min).collect();
        for w in flow_program.windows(2) {
            let ((ta, fa), (tb, fb)) = (w[0], w[1]);
            let pieces = if (fb - fa).abs() > 1e-12 { 8 } else { 1 };
            for k in 0..=pieces {
                times.push(ta + (tb - ta) * f64::from(k) / f64::from(pieces));
            }
        }
        times.retain(|&t| (0.0..=end).contains(&t));
        times.sort_by(f64::total_cmp);
        times.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
        gradient = times
            .iter()
            .map(|&t| GradientPoint {
                time_min: (volume_time(&flow_program, nominal, t) * 1e6).round() / 1e6,
                organic_pct: probe.organic_at_pct(t),
            })
            .collect();
    }
    let system = LcSystem {
        mode,
        chem_class,
        modifier: Modifier::parse(&get("modifier_B")?),
        ph: opt("pH_aqueous").filter(|p| *p > 0.0),
        additive: Additive::parse(&get("additive_main")?),
        gradient,
        t0_min: num("t0_min")?,
        dwell_min: 0.0,
        flow_ml_min: num("flow_ml_min")?,
        temperature_c: opt("temp_c"),
    };
    system.validate().map_err(|e| e.to_string())?;
    Ok(TrainingSystem {
        id: get("id")?,
        system,
        gradient_duration_min: num("gradient_duration_min")?,
        flow_program,
    })
}

impl TrainingData {
    /// Reads systems.tsv and retention.tsv (plain or .gz) and computes descriptors with the
    /// given source. Rows whose retention time is not above t0 or whose structure cannot be
    /// read are skipped and counted.
    ///
    /// # Errors
    /// `ModelError::Io`/`BadRow` for unreadable files or malformed rows.
    pub fn load(
        systems_path: &Path,
        retention_path: &Path,
        source: &dyn DescriptorSource,
    ) -> Result<Self, ModelError> {
        let (hdr, rows) = parse_tsv(&read_text(systems_path)?);
        let mut systems = Vec::new();
        for (i, r) in rows.iter().enumerate() {
            let col = |k: &str| {
                hdr.iter()
                    .position(|h| h == k)
                    .and_then(|j| r.get(j))
                    .filter(|v| !v.is_empty() && v.as_str() != "NA")
                    .cloned()
            };
            let s = system_from_row(&col).map_err(|reason| ModelError::BadRow {
                path: systems_path.display().to_string(),
                line: i + 2,
                reason,
            })?;
            systems.push(s);
        }
        systems.sort_by(|a, b| a.id.cmp(&b.id));
        let index: BTreeMap<String, usize> = systems
            .iter()
            .enumerate()
            .map(|(i, s)| (s.id.clone(), i))
            .collect();
        let (hdr, rows) = parse_tsv(&read_text(retention_path)?);
        let pos = |k: &str| {
            hdr.iter()
                .position(|h| h == k)
                .ok_or_else(|| ModelError::BadRow {
                    path: retention_path.display().to_string(),
                    line: 1,
                    reason: format!("missing column {k}"),
                })
        };
        let (c_ds, c_smi, c_key, c_rt) = (
            pos("dataset_id")?,
            pos("smiles")?,
            pos("inchikey")?,
            pos("rt_min")?,
        );
        let mut analytes: Vec<AnalyteFeatures> = Vec::new();
        let mut by_smiles: BTreeMap<String, Option<usize>> = BTreeMap::new();
        let mut out = Vec::new();
        let mut skipped: BTreeMap<String, usize> = BTreeMap::new();
        for (i, r) in rows.iter().enumerate() {
            let field = |c: usize| r.get(c).map(String::as_str).unwrap_or("");
            let bad = |reason: String| ModelError::BadRow {
                path: retention_path.display().to_string(),
                line: i + 2,
                reason,
            };
            let Some(&si) = index.get(field(c_ds)) else {
                *skipped.entry("unknown system".into()).or_default() += 1;
                continue;
            };
            let rt: f64 = field(c_rt)
                .parse()
                .map_err(|_| bad(format!("rt_min {:?}", field(c_rt))))?;
            let smiles = field(c_smi);
            let key = field(c_key);
            let analyte = match by_smiles.get(smiles) {
                Some(a) => *a,
                None => {
                    let a = source.describe(smiles).ok().map(|d| {
                        analytes.push(AnalyteFeatures {
                            inchikey: Some(key.to_owned()),
                            descriptors: d,
                        });
                        analytes.len() - 1
                    });
                    by_smiles.insert(smiles.to_owned(), a);
                    a
                }
            };
            let Some(analyte) = analyte else {
                *skipped.entry("unreadable structure".into()).or_default() += 1;
                continue;
            };
            let mw = analytes[analyte]
                .descriptors
                .get("mw_g_mol")
                .copied()
                .unwrap_or(0.0);
            match psi_from_rt(&systems[si].system, lss_s(mw), systems[si].volume_time(rt)) {
                Ok(psi) if psi.is_finite() => out.push(TrainingRow {
                    system: si,
                    inchikey: key.to_owned(),
                    analyte,
                    rt_min: rt,
                    psi_k1: psi,
                }),
                _ => *skipped.entry("rt not above t0".into()).or_default() += 1,
            }
        }
        Ok(Self {
            systems,
            analytes,
            rows: out,
            skipped,
        })
    }
}

/// Deterministic split of system indices into `k` folds (seeded Fisher–Yates with splitmix64).
pub fn system_folds(n_systems: usize, k: usize, seed: u64) -> Vec<usize> {
    let mut order: Vec<usize> = (0..n_systems).collect();
    let mut state = seed ^ 0x9E37_79B9_7F4A_7C15;
    let mut next = || {
        state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = state;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    };
    for i in (1..n_systems).rev() {
        let j = (next() % (i as u64 + 1)) as usize;
        order.swap(i, j);
    }
    let mut fold = vec![0; n_systems];
    for (rank, &s) in order.iter().enumerate() {
        fold[s] = rank % k.max(1);
    }
    fold
}
