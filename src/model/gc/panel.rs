//! Indices and times for a whole panel on one phase, one row per analyte: an analyte the model
//! cannot handle gets a note on its own row and never stops the others; an analyte the caller
//! knows to be unsuitable for GC is still predicted when asked for explicitly, with the caution
//! attached (issue 18). This is the library side of `predict --mode gc`.

use serde::Serialize;

use super::{
    AlkaneLadder, GcAnalyte, GcError, RetentionIndexPrediction, RetentionTimePrediction,
    predict_analyte_index,
};
use crate::phase::StationaryPhase;
use crate::structure::graph::MolGraph;

/// One analyte of a panel as the GC model sees it.
#[derive(Debug, Clone, Copy)]
pub struct PanelAnalyte<'a> {
    /// Name to report.
    pub name: &'a str,
    /// Structure, when known and parsed.
    pub graph: Option<&'a MolGraph>,
    /// Boiling-point route input, when a boiling point is known.
    pub fallback: Option<&'a GcAnalyte>,
    /// A caution the caller attaches (e.g. the GC-suitability verdict "not volatile or thermally
    /// labile"); the analyte is predicted anyway.
    pub caution: Option<&'a str>,
}

/// The outcome for one analyte.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PanelRow {
    /// Name.
    pub name: String,
    /// Predicted index, when the model could make one.
    pub index: Option<RetentionIndexPrediction>,
    /// Predicted time under the program, when the index lies on the eluted ladder.
    pub time: Option<RetentionTimePrediction>,
    /// Caution attached by the caller (kept with the prediction).
    pub caution: Option<String>,
    /// Why the index or time is missing.
    pub note: Option<String>,
}

/// Predicts every analyte of `panel` on `phase`, times on `ladder` when given. Errors that
/// concern the phase itself (not a GC phase, no constants) are returned once; per-analyte
/// problems become notes on their rows.
///
/// # Errors
/// [`GcError::NotGcPhase`] or [`GcError::ModelData`] (a build defect).
pub fn predict_panel(
    panel: &[PanelAnalyte<'_>],
    phase: &StationaryPhase,
    ladder: Option<&AlkaneLadder>,
) -> Result<Vec<PanelRow>, GcError> {
    let mut rows = Vec::with_capacity(panel.len());
    for a in panel {
        let mut row = PanelRow {
            name: a.name.to_string(),
            index: None,
            time: None,
            caution: a.caution.map(str::to_string),
            note: None,
        };
        match predict_analyte_index(a.graph, a.fallback, phase) {
            Ok(index) => {
                if let Some(ladder) = ladder {
                    match ladder.predict_time(index.clone()) {
                        Ok(t) => row.time = Some(t),
                        Err(e) => row.note = Some(e.to_string()),
                    }
                }
                row.index = Some(index);
            }
            Err(e @ (GcError::NotGcPhase { .. } | GcError::ModelData(_))) => return Err(e),
            Err(e) => row.note = Some(e.to_string()),
        }
        rows.push(row);
    }
    Ok(rows)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::gc::{GcColumn, OvenProgram, alkane_ladder};
    use crate::phase::Catalogue;
    use crate::structure::parse_smiles;

    #[test]
    fn one_bad_analyte_does_not_stop_the_panel_and_cautions_are_kept() {
        let phase = Catalogue::builtin()
            .and_then(|c| c.phase("gc-5-phenyl"))
            .unwrap();
        let column = GcColumn::new(30.0, 0.25, 0.25, 35.0).unwrap();
        let program = OvenProgram::new(40.0, 1.0, 10.0, 300.0, 5.0).unwrap();
        let ladder = alkane_ladder(phase, &column, &program).unwrap();
        let toluene = parse_smiles("Cc1ccccc1").unwrap().graph;
        let organomercury = parse_smiles("C[Hg]C").unwrap().graph;
        let sugar = parse_smiles("OCC1OC(O)C(O)C(O)C1O").unwrap().graph;
        let panel = [
            PanelAnalyte {
                name: "toluene",
                graph: Some(&toluene),
                fallback: None,
                caution: None,
            },
            PanelAnalyte {
                name: "odd",
                graph: Some(&organomercury),
                fallback: None,
                caution: None,
            },
            PanelAnalyte {
                name: "glucose",
                graph: Some(&sugar),
                fallback: None,
                caution: Some("not volatile or thermally labile: derivatise before GC"),
            },
            PanelAnalyte {
                name: "unknown",
                graph: None,
                fallback: None,
                caution: None,
            },
        ];
        let rows = predict_panel(&panel, phase, Some(&ladder)).unwrap();
        assert_eq!(rows.len(), 4);
        let t = rows[0].time.as_ref().expect("toluene has a time");
        assert!(t.retention_time_min > ladder.holdup_time_min());
        assert!(rows[1].index.is_none() && rows[1].note.as_ref().unwrap().contains("Hg"));
        assert!(
            rows[2].index.is_some(),
            "explicitly asked: predicted anyway"
        );
        assert!(rows[2].caution.as_ref().unwrap().contains("derivatise"));
        assert!(
            rows[3]
                .note
                .as_ref()
                .unwrap()
                .contains("nothing to predict")
        );
        // the phase itself being wrong is one error, not four notes
        let rp = Catalogue::builtin()
            .and_then(|c| c.phase("rp-c18"))
            .unwrap();
        assert!(predict_panel(&panel, rp, None).is_err());
    }
}
