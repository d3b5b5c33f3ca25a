//! Ion chromatography: elution order and relative retention of the ions in `data/ic_ions.tsv` on
//! the catalogue's anion- and cation-exchange phases, for a given eluent and concentration, with
//! an uncertainty and co-elution flags.
//!
//! Model. Each ion carries a relative retention r (retention-factor ratio to chloride for anions,
//! to sodium for cations) at the eluent's reference concentration C_ref, from memory of typical
//! elution orders on generic phases. For another concentration C the ion-exchange equilibrium
//! gives log k = const - (x / y) log C for an analyte of charge x and an eluent ion of charge y
//! (Haddad & Jackson, Ion Chromatography: Principles and Applications, 1990; from memory), so
//! r(C) = r_ref (C / C_ref)^(-(|x| - |x_ref|) / y): divalent ions move forward relative to
//! monovalent ones as the eluent gets stronger. Carboxylate-phosphonate cation exchangers reuse
//! the carboxylate data as a proxy with a wider interval. Ion exclusion is not modelled here.

use serde::Serialize;

use crate::phase::{Catalogue, IcEluent, IcExchanger, IcIon, IonPanel, PhaseError, PhaseMode};

/// Errors from the IC model.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum IcError {
    /// A phase, eluent or ion id is unknown (with suggestions).
    #[error(transparent)]
    Catalogue(#[from] PhaseError),
    /// The phase is not an ion-exchange phase.
    #[error("phase `{phase_id}` is a {mode} phase; choose an ic-anion or ic-cation phase")]
    NotIonExchange {
        /// Phase id.
        phase_id: String,
        /// Its mode.
        mode: PhaseMode,
    },
    /// Ion-exclusion phases separate weak acids by pKa; that order is not modelled here.
    #[error(
        "phase `{phase_id}` is an ion-exclusion phase: its order (weak acids by pKa and size) is not modelled; use an ion-exchange phase for these ions"
    )]
    ExclusionNotModelled {
        /// Phase id.
        phase_id: String,
    },
    /// The eluent is not used with this phase type.
    #[error(
        "eluent `{eluent_id}` is not used with phase `{phase_id}` ({exchanger}); use one of: {compatible}"
    )]
    IncompatibleEluent {
        /// Eluent id.
        eluent_id: String,
        /// Phase id.
        phase_id: String,
        /// Phase exchanger type.
        exchanger: String,
        /// Eluent ids that fit.
        compatible: String,
    },
    /// Invalid eluent concentration.
    #[error(
        "eluent concentration {conc_mm} mM is invalid; give a value above 0 and at most 500 mM"
    )]
    BadConcentration {
        /// Offending value.
        conc_mm: f64,
    },
    /// No ions were given.
    #[error("no ions given; list at least one ion by name, formula or id")]
    NoIons,
}

/// Two neighbouring ions with a selectivity below this are flagged as likely to co-elute (common
/// practice, no source: at typical IC plate numbers, alpha of about 1.1 or more is needed).
pub const MIN_SELECTIVITY: f64 = 1.10;

/// 1-sigma uncertainty of ln r for the from-memory values.
const SIGMA_LN_MEMORY: f64 = 0.15;
/// Extra 1-sigma of ln r per decade of concentration away from the reference (rough, no source).
const SIGMA_LN_PER_DECADE: f64 = 0.10;
/// Extra 1-sigma of ln r when carboxylate data stand in for a phosphonate phase (rough, no source).
const SIGMA_LN_PROXY: f64 = 0.20;

/// One ion's predicted retention.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IonRetention {
    /// Ion id.
    pub ion_id: String,
    /// Ion name.
    pub name: String,
    /// Charge of the listed species.
    pub charge: i8,
    /// Retention-factor ratio to the reference ion.
    pub relative_retention: f64,
    /// Lower end of the approximate 95 % interval.
    pub low_95: f64,
    /// Upper end of the approximate 95 % interval.
    pub high_95: f64,
    /// 1-based position in the elution order.
    pub elution_rank: usize,
    /// Neighbours within [`MIN_SELECTIVITY`].
    pub coelutes_with: Vec<String>,
}

/// An ion that could not be placed, with the reason.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UnpredictedIon {
    /// The ion id.
    pub ion_id: String,
    /// Why it has no prediction.
    pub reason: String,
}

/// Predicted elution order for a list of ions on one phase and eluent.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IcPrediction {
    /// Phase id.
    pub phase_id: String,
    /// Eluent id.
    pub eluent_id: String,
    /// Eluent concentration used.
    pub eluent_conc_mm: f64,
    /// Reference ion (relative retention 1).
    pub reference_ion_id: String,
    /// Ions in elution order.
    pub ions: Vec<IonRetention>,
    /// Ions without a prediction (wrong panel, eluent ion, no data).
    pub unpredicted: Vec<UnpredictedIon>,
    /// Cautions (concentration outside the typical range, proxy data).
    pub notes: Vec<String>,
    /// How the values were obtained.
    pub path: String,
}

fn data_value(ion: &IcIon, exchanger: IcExchanger) -> Option<f64> {
    match exchanger {
        IcExchanger::AnionHydroxide => ion.rr_hydroxide(),
        IcExchanger::AnionCarbonate => ion.rr_carbonate(),
        IcExchanger::CationCarboxylate | IcExchanger::CationPhosphonate => ion.rr_carboxylate(),
        IcExchanger::ExclusionSulfonate => None,
    }
}

fn compatible_eluents(catalogue: &Catalogue, exchanger: IcExchanger) -> String {
    catalogue
        .ic_eluents()
        .iter()
        .filter(|e| e.compatible_exchangers().contains(&exchanger))
        .map(IcEluent::id)
        .collect::<Vec<_>>()
        .join(", ")
}

/// Predicts the elution order of `ions` (ids, names, synonyms or formulas) on `phase_id` with
/// `eluent_id` at `eluent_conc_mm` (`None`: the eluent's reference concentration).
///
/// # Errors
/// [`IcError::Catalogue`] for unknown phase, eluent or ion names (with suggestions);
/// [`IcError::NotIonExchange`], [`IcError::ExclusionNotModelled`],
/// [`IcError::IncompatibleEluent`], [`IcError::BadConcentration`], [`IcError::NoIons`].
///
/// # Examples
/// ```
/// use phasewise::model::ic::predict_ion_order;
/// let catalogue = phasewise::phase::Catalogue::builtin().unwrap();
/// let p = predict_ion_order(catalogue, "ic-anion-carbonate", "carbonate-bicarbonate", None,
///     &["sulfate", "Cl-", "fluoride"]).unwrap();
/// let order: Vec<&str> = p.ions.iter().map(|i| i.ion_id.as_str()).collect();
/// assert_eq!(order, ["fluoride", "chloride", "sulfate"]);
/// ```
pub fn predict_ion_order(
    catalogue: &Catalogue,
    phase_id: &str,
    eluent_id: &str,
    eluent_conc_mm: Option<f64>,
    ions: &[&str],
) -> Result<IcPrediction, IcError> {
    predict_ion_order_with(catalogue, phase_id, eluent_id, eluent_conc_mm, ions, &[])
}

/// An ion outside the ion table, placed by the structure estimate of [`estimate`].
#[derive(Debug, Clone, PartialEq)]
pub struct EstimatedIon {
    /// The name to report (also its id in the prediction).
    pub name: String,
    /// Its structure features at the eluent pH.
    pub features: estimate::IonFeatures,
}

/// [`predict_ion_order`] with ions outside the table placed by the structure estimate
/// ([`estimate::estimate_relative_retention`], wider interval); an estimated ion that carries
/// too little charge at the eluent's pH is listed as unpredicted with the reason.
///
/// # Errors
/// As [`predict_ion_order`].
pub fn predict_ion_order_with(
    catalogue: &Catalogue,
    phase_id: &str,
    eluent_id: &str,
    eluent_conc_mm: Option<f64>,
    ions: &[&str],
    estimated: &[EstimatedIon],
) -> Result<IcPrediction, IcError> {
    let phase = catalogue.phase(phase_id)?;
    let exchanger = match (phase.mode(), phase.ic_exchanger()) {
        (PhaseMode::IonExclusion, _) => {
            return Err(IcError::ExclusionNotModelled {
                phase_id: phase.id().to_string(),
            });
        }
        (PhaseMode::IcAnion | PhaseMode::IcCation, Some(exchanger)) => exchanger,
        (mode, _) => {
            return Err(IcError::NotIonExchange {
                phase_id: phase.id().to_string(),
                mode,
            });
        }
    };
    let eluent = catalogue.ic_eluent(eluent_id)?;
    if !eluent.compatible_exchangers().contains(&exchanger) {
        return Err(IcError::IncompatibleEluent {
            eluent_id: eluent.id().to_string(),
            phase_id: phase.id().to_string(),
            exchanger: exchanger.as_str().to_string(),
            compatible: compatible_eluents(catalogue, exchanger),
        });
    }
    let conc = eluent_conc_mm.unwrap_or(eluent.reference_conc_mm());
    if !(conc.is_finite() && conc > 0.0 && conc <= 500.0) {
        return Err(IcError::BadConcentration { conc_mm: conc });
    }
    if ions.is_empty() && estimated.is_empty() {
        return Err(IcError::NoIons);
    }
    let (panel, reference_ion_id) = match phase.mode() {
        PhaseMode::IcCation => (IonPanel::Cation, "sodium"),
        _ => (IonPanel::Anion, "chloride"),
    };
    let reference_charge = f64::from(catalogue.ic_ion(reference_ion_id)?.charge().unsigned_abs());
    let mut notes = Vec::new();
    if conc < eluent.typical_conc_min_mm() || conc > eluent.typical_conc_max_mm() {
        notes.push(format!(
            "{conc} mM is outside the typical range {}-{} mM of `{}`; the prediction extrapolates",
            eluent.typical_conc_min_mm(),
            eluent.typical_conc_max_mm(),
            eluent.id()
        ));
    }
    let proxy = exchanger == IcExchanger::CationPhosphonate;
    if proxy {
        notes.push("carboxylate cation-exchanger data used as a proxy for the carboxylate-phosphonate phase; alkaline-earth ions are usually retained more there".to_string());
    }
    let decades = (conc / eluent.reference_conc_mm()).log10();
    let eluent_charge = f64::from(eluent.eluent_charge());
    let mut predicted: Vec<IonRetention> = Vec::new();
    let mut unpredicted = Vec::new();
    for query in ions {
        let ion = catalogue.ic_ion(query)?;
        if predicted.iter().any(|p| p.ion_id == ion.id())
            || unpredicted
                .iter()
                .any(|u: &UnpredictedIon| u.ion_id == ion.id())
        {
            continue;
        }
        if ion.panel() != panel {
            unpredicted.push(UnpredictedIon {
                ion_id: ion.id().to_string(),
                reason: format!(
                    "{} is not retained by {} phase `{}` (it elutes near the void)",
                    ion.name(),
                    phase.mode(),
                    phase.id()
                ),
            });
            continue;
        }
        let Some(reference_value) = data_value(ion, exchanger) else {
            unpredicted.push(UnpredictedIon {
                ion_id: ion.id().to_string(),
                reason: format!(
                    "no relative retention for {} on {} phases (e.g. it is the eluent ion itself)",
                    ion.name(),
                    exchanger.as_str()
                ),
            });
            continue;
        };
        let charge = f64::from(ion.charge().unsigned_abs());
        let exponent = -(charge - reference_charge) / eluent_charge;
        let relative_retention = reference_value * 10f64.powf(exponent * decades);
        let sigma = if ion.id() == reference_ion_id {
            0.0
        } else {
            (SIGMA_LN_MEMORY.powi(2)
                + (SIGMA_LN_PER_DECADE * decades).powi(2)
                + if proxy { SIGMA_LN_PROXY.powi(2) } else { 0.0 })
            .sqrt()
        };
        predicted.push(IonRetention {
            ion_id: ion.id().to_string(),
            name: ion.name().to_string(),
            charge: ion.charge(),
            relative_retention,
            low_95: relative_retention * (-1.96 * sigma).exp(),
            high_95: relative_retention * (1.96 * sigma).exp(),
            elution_rank: 0,
            coelutes_with: Vec::new(),
        });
    }
    for e in estimated {
        if predicted.iter().any(|p| p.ion_id == e.name) {
            continue;
        }
        let Some(reference_value) =
            estimate::estimate_relative_retention(catalogue, exchanger, &e.features)?
        else {
            unpredicted.push(UnpredictedIon {
                ion_id: e.name.clone(),
                reason: format!(
                    "{} carries a charge of only {:.2} of the exchanger's sign at the eluent's pH (about {:.1}): it is mostly neutral and passes near the void",
                    e.name,
                    e.features.charge.max(0.0),
                    estimate::eluent_ph(exchanger)
                ),
            });
            continue;
        };
        let charge = e.features.charge;
        let exponent = -(charge - reference_charge) / eluent_charge;
        let relative_retention = reference_value * 10f64.powf(exponent * decades);
        let sigma = (estimate::SIGMA_LN_ESTIMATE.powi(2)
            + (SIGMA_LN_PER_DECADE * decades).powi(2)
            + if proxy { SIGMA_LN_PROXY.powi(2) } else { 0.0 })
        .sqrt();
        let sign: f64 = if panel == IonPanel::Anion { -1.0 } else { 1.0 };
        predicted.push(IonRetention {
            ion_id: e.name.clone(),
            name: e.name.clone(),
            charge: (sign * charge.round()).clamp(-9.0, 9.0) as i8,
            relative_retention,
            low_95: relative_retention * (-1.96 * sigma).exp(),
            high_95: relative_retention * (1.96 * sigma).exp(),
            elution_rank: 0,
            coelutes_with: Vec::new(),
        });
    }
    if !estimated.is_empty()
        && predicted
            .iter()
            .any(|p| estimated.iter().any(|e| e.name == p.ion_id))
    {
        notes.push(format!(
            "ions outside the ion table are placed by a rough structure estimate (charge at the eluent's pH, halogens, size, aromatic rings; docs/science.md), with a 95 % interval of about a factor {:.1} either way",
            (1.96 * estimate::SIGMA_LN_ESTIMATE).exp()
        ));
    }
    predicted.sort_by(|a, b| {
        a.relative_retention
            .total_cmp(&b.relative_retention)
            .then_with(|| a.ion_id.cmp(&b.ion_id))
    });
    for index in 0..predicted.len() {
        predicted[index].elution_rank = index + 1;
        if index + 1 < predicted.len() {
            let alpha =
                predicted[index + 1].relative_retention / predicted[index].relative_retention;
            if alpha < MIN_SELECTIVITY {
                let (left, right) = (
                    predicted[index].ion_id.clone(),
                    predicted[index + 1].ion_id.clone(),
                );
                predicted[index].coelutes_with.push(right);
                predicted[index + 1].coelutes_with.push(left);
            }
        }
    }
    Ok(IcPrediction {
        phase_id: phase.id().to_string(),
        eluent_id: eluent.id().to_string(),
        eluent_conc_mm: conc,
        reference_ion_id: reference_ion_id.to_string(),
        ions: predicted,
        unpredicted,
        notes,
        path: format!(
            "relative retention from memory of typical orders on {} phases at {} mM, scaled by the ion-exchange slope -(x - x_ref)/y",
            exchanger.as_str(),
            eluent.reference_conc_mm()
        ),
    })
}

pub mod estimate;

#[cfg(test)]
mod tests;
