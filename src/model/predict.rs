//! Prediction with the trained model: the descriptor path, and the retention-memory path that
//! projects the analyte's measured retention on other systems onto the target system; both
//! turned into a retention time with the interval of the route's calibration.

use super::features::AnalyteFeatures;
use super::fitted::Model;
use super::linear::{psi_bounds, system_features};
use super::lss::{lss_s, rt_from_psi};
use super::memory::SourceRelation;
use super::prediction::{Prediction, PredictionPath};
use super::system::{LcSystem, ModelError};

impl Model {
    /// Predicted `psi_k1` by the descriptor path.
    ///
    /// # Errors
    /// `ModelError::MissingDescriptor` if a descriptor is absent.
    pub fn predict_psi_descriptor(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
    ) -> Result<f64, ModelError> {
        let z = self.linear.standardise(f, sys)?;
        Ok(self
            .linear
            .predict_z(&z, &system_features(sys), &mut Vec::new()))
    }

    /// Predicts retention on a system. Uses the retention memory when the analyte's InChIKey
    /// has measurements on systems of the same mode, else the descriptors alone.
    ///
    /// # Errors
    /// Invalid system (`BadSystem`, `BadGradient`) or missing descriptors.
    pub fn predict(&self, f: &AnalyteFeatures, sys: &LcSystem) -> Result<Prediction, ModelError> {
        self.predict_excluding(f, sys, None)
    }

    /// As `predict`, but never uses memory entries of the system id `exclude` (for validation).
    ///
    /// # Errors
    /// As `predict`.
    pub fn predict_excluding(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
        exclude: Option<&str>,
    ) -> Result<Prediction, ModelError> {
        self.predict_with_memory(f, sys, exclude, &[])
    }

    /// As `predict_excluding`, with further retention-memory sources of this analyte beside
    /// the shipped table: `(system id, source system, measured psi_k1)`, e.g. the user's stored
    /// scouting fits on other systems. With no extra sources this is exactly
    /// `predict_excluding`.
    ///
    /// # Errors
    /// As `predict`; an invalid extra source system.
    pub fn predict_with_memory(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
        exclude: Option<&str>,
        extra: &[(String, LcSystem, f64)],
    ) -> Result<Prediction, ModelError> {
        self.predict_routed(f, sys, exclude, extra, true)
    }

    /// The structure-only (descriptor-path) prediction, even for an analyte with measured
    /// retention in the memory (what the model says without the measured data; `--no-memory`).
    ///
    /// # Errors
    /// As `predict`.
    pub fn predict_structure_only(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
    ) -> Result<Prediction, ModelError> {
        self.predict_routed(f, sys, None, &[], false)
    }

    fn predict_routed(
        &self,
        f: &AnalyteFeatures,
        sys: &LcSystem,
        exclude: Option<&str>,
        extra: &[(String, LcSystem, f64)],
        use_memory: bool,
    ) -> Result<Prediction, ModelError> {
        sys.validate()?;
        let mw = *f
            .descriptors
            .get("mw_g_mol")
            .filter(|v| v.is_finite() && **v > 0.0)
            .ok_or_else(|| ModelError::MissingDescriptor("mw_g_mol".into()))?;
        let s = lss_s(mw);
        let z = self.linear.standardise(f, sys)?;
        let mut buf = Vec::new();
        let base = self.linear.predict_z(&z, &system_features(sys), &mut buf);
        let mut psi = base;
        let mut path = PredictionPath::Descriptor;
        let shipped = match (&self.memory, &f.inchikey, use_memory) {
            (Some(mem), Some(key), true) => mem.measurements(key).collect::<Vec<_>>(),
            _ => Vec::new(),
        };
        let extra = if use_memory { extra } else { &[] };
        for (_, s, _) in extra {
            s.validate()?;
        }
        let user = extra.iter().map(|(id, s, psi)| (id.as_str(), s, *psi));
        let all: Vec<(&str, &LcSystem, f64)> = shipped.into_iter().chain(user).collect();
        if !all.is_empty() {
            let mut sources = Vec::new();
            for (sid, src_sys, measured) in all {
                if Some(sid) == exclude || src_sys.mode != sys.mode {
                    continue;
                }
                let z_src = self.linear.standardise(f, src_sys)?;
                let pred = self
                    .linear
                    .predict_z(&z_src, &system_features(src_sys), &mut buf);
                sources.push((
                    sid.to_owned(),
                    SourceRelation::between(src_sys, sys),
                    measured - pred,
                ));
            }
            if let Some((shift, used)) = self.memory_weights.combine(sys.mode, &sources) {
                psi = base + shift;
                path = PredictionPath::Memory {
                    source_systems: used,
                };
            }
        }
        let cal = self
            .calibration
            .get(&format!("{}/{}", sys.mode.label(), path.label()))
            .ok_or_else(|| {
                ModelError::TooLittleData(format!(
                    "no calibration for {}/{}",
                    sys.mode.label(),
                    path.label()
                ))
            })?;
        // bounded: psi_k1 stays inside the training target range; beyond the descriptors'
        // training range (or at a bound) the interval widens with the distance
        let excess = self.linear.extrapolation_sd(&z);
        let (psi_lo, psi_hi) = psi_bounds(sys.mode);
        let clamped = psi.clamp(psi_lo, psi_hi);
        let widen = 1.0 + 0.5 * excess + if clamped == psi { 0.0 } else { 0.5 };
        let psi = clamped;
        let rt = rt_from_psi(sys, s, psi);
        let lo = rt_from_psi(sys, s, psi + cal.q05 * widen);
        let hi = rt_from_psi(sys, s, psi + cal.q95 * widen);
        let h = 0.01;
        let slope = (rt_from_psi(sys, s, psi + h) - rt_from_psi(sys, s, psi - h)) / (2.0 * h);
        let t_out = rt - sys.t0_min - sys.dwell_min;
        Ok(Prediction {
            rt_min: rt,
            interval_min: (lo.min(rt), hi.max(rt)),
            organic_at_elution_pct: sys.organic_at_pct(t_out),
            psi_k1: psi,
            lss_s: s,
            elutes_after_program: rt - sys.t0_min > sys.program_end_min(),
            path,
            difference_sd_psi: cal.difference_sd.clone(),
            coelution_map_descriptor: self
                .calibration
                .get(&format!("{}/descriptor", sys.mode.label()))
                .map(|c| c.coelution_map.clone())
                .unwrap_or_default(),
            coelution_map_memory: self
                .calibration
                .get(&format!("{}/memory", sys.mode.label()))
                .map(|c| c.coelution_map.clone())
                .unwrap_or_default(),
            rt_slope_min: slope,
            system: sys.fingerprint(),
            extrapolated: widen > 1.0,
        })
    }
}
