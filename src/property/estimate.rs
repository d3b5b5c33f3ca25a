//! Properties estimated from structure, each labelled with its method: what the knowledge
//! base stores as `estimated` rows when it is built or a compound is added, and what an
//! analyte known only from its SMILES gets at run time. One function serves both, so the
//! stored and the run-time estimates never disagree.

use crate::structure::adapter::parse_smiles_with;
use crate::structure::graph::MolGraph;
use crate::structure::ionisable::{IonisableSite, SiteKind, detect_sites};
use crate::structure::joback::{JobackOptions, joback_tb};
use crate::structure::{
    Descriptors, ParseOptions, Parsed, StructureError, describe_graph, parse_smiles,
};

/// Method label for Wildman–Crippen logP.
pub const METHOD_LOGP: &str =
    "Wildman-Crippen atom contributions (J. Chem. Inf. Comput. Sci. 1999, 39, 868)";
/// Method label for TPSA.
pub const METHOD_TPSA: &str =
    "topological polar surface area, N and O (Ertl, Rohde & Selzer, J. Med. Chem. 2000)";
/// Method label for molar refractivity.
pub const METHOD_MR: &str = "Wildman-Crippen molar refractivity (1999)";
/// Method label for the McGowan volume.
pub const METHOD_MCGOWAN: &str =
    "McGowan characteristic volume (Abraham & McGowan, Chromatographia 1987)";
/// Method label for H-bond counts.
pub const METHOD_HBOND: &str = "H-bond donor/acceptor patterns (RDKit-compatible definitions)";
/// Method label for the Joback boiling point.
pub const METHOD_JOBACK: &str = "Joback & Reid group contributions (Chem. Eng. Commun. 1987)";
/// Method label for typical group pKa values.
pub const METHOD_PKA: &str =
    "typical pKa of the ionisable group class (phasewise table, docs/ionisation-volatility.md)";
/// Method label for formal charge and molar mass.
pub const METHOD_STRUCTURE: &str = "computed from the structure (phasewise structure engine)";
/// Licence label of computed values.
pub const LICENCE_COMPUTED: &str = "computed by phasewise";

/// Everything estimated from one structure.
#[derive(Debug, Clone, PartialEq)]
pub struct StructureEstimate {
    /// The parsed graph (largest organic fragment).
    pub graph: MolGraph,
    /// Descriptors.
    pub descriptors: Descriptors,
    /// Ionisable sites with typical pKa values.
    pub sites: Vec<IonisableSite>,
    /// Whether site detection succeeded (`sites` is empty when it did not).
    pub sites_detected: bool,
    /// Joback normal boiling point, K, with its typical error, K.
    pub joback_tb_k: Option<(f64, f64)>,
    /// Why no Joback estimate was made, if none.
    pub joback_note: Option<String>,
    /// Fragment-selection note.
    pub note: Option<String>,
}

/// One estimated value: property name, value, unit, method, qualifiers.
#[derive(Debug, Clone, PartialEq)]
pub struct EstimatedValue {
    /// Property (see [`crate::property::KNOWN_PROPERTIES`]).
    pub property: &'static str,
    /// Value in `unit`.
    pub value: f64,
    /// Unit.
    pub unit: &'static str,
    /// Method.
    pub method: &'static str,
    /// Qualifiers (`type=acidic;class=...;spread=...`).
    pub detail: String,
}

/// Give an analyte known only from its SMILES (origin [`crate::property::Origin::Structure`]) the structure
/// estimates as properties (kind estimated, the method as source), and its formula and molar
/// mass; the properties are then sorted best first.
pub fn attach_estimates(analyte: &mut crate::property::Analyte, e: &StructureEstimate) {
    use crate::property::{Origin, Property, PropertyKind};
    for v in e.values() {
        analyte.properties.push(Property {
            property: v.property.to_string(),
            value: v.value,
            unit: v.unit.to_string(),
            kind: PropertyKind::Estimated,
            source: v.method.to_string(),
            licence: LICENCE_COMPUTED.to_string(),
            detail: v.detail,
            origin: Origin::Structure,
        });
    }
    analyte.formula = Some(e.descriptors.molecular_formula.clone());
    analyte.molar_mass_g_mol = e.descriptors.molar_mass_g_mol;
    analyte.sort_properties();
}

/// Parse `smiles` and estimate everything phasewise estimates from structure.
///
/// # Errors
/// [`StructureError`] when the SMILES string cannot be parsed.
pub fn estimate(smiles: &str) -> Result<StructureEstimate, StructureError> {
    estimate_parsed(parse_smiles(smiles)?)
}

/// As [`estimate`], with the graph's stereo marks left empty ([`ParseOptions::skip_stereo`]):
/// for reports of the estimates only (`describe`), whose numbers do not depend on them. The
/// graph cannot give a stereo key.
///
/// # Errors
/// As [`estimate`].
pub fn estimate_without_stereo(smiles: &str) -> Result<StructureEstimate, StructureError> {
    let options = ParseOptions {
        skip_stereo: true,
        ..ParseOptions::default()
    };
    estimate_parsed(parse_smiles_with(smiles, &options)?)
}

fn estimate_parsed(parsed: Parsed) -> Result<StructureEstimate, StructureError> {
    let descriptors = describe_graph(&parsed.graph);
    // Site detection and Joback work on a valid graph; their errors are reasons, not failures.
    let sites = detect_sites(&parsed.graph);
    let sites_detected = sites.is_ok();
    let sites = sites.unwrap_or_default();
    let (joback_tb_k, joback_note) = match joback_tb(&parsed.graph, JobackOptions::default()) {
        Ok(j) => (Some((j.tb_k, j.typical_error_k)), None),
        Err(e) => (None, Some(e.to_string())),
    };
    Ok(StructureEstimate {
        graph: parsed.graph,
        descriptors,
        sites,
        sites_detected,
        joback_tb_k,
        joback_note,
        note: parsed.note,
    })
}

impl StructureEstimate {
    /// The estimates as property values.
    pub fn values(&self) -> Vec<EstimatedValue> {
        let d = &self.descriptors;
        let v = |property, value, unit, method| EstimatedValue {
            property,
            value,
            unit,
            method,
            detail: String::new(),
        };
        let mut out = vec![
            v("logp", d.crippen_logp, "", METHOD_LOGP),
            v("tpsa", d.tpsa_a2, "Å²", METHOD_TPSA),
            v(
                "molar_refractivity",
                d.crippen_molar_refractivity_cm3_mol,
                "cm³/mol",
                METHOD_MR,
            ),
            v("hbd", f64::from(d.hbond_donors), "count", METHOD_HBOND),
            v("hba", f64::from(d.hbond_acceptors), "count", METHOD_HBOND),
            v("charge", f64::from(d.formal_charge), "e", METHOD_STRUCTURE),
        ];
        if let Some(vx) = d.mcgowan_vx_100cm3_mol {
            out.push(v("mcgowan_volume", vx, "cm³/mol/100", METHOD_MCGOWAN));
        }
        if let Some(m) = d.molar_mass_g_mol {
            out.push(v("molar_mass", m, "g/mol", METHOD_STRUCTURE));
        }
        if let Some((tb, err)) = self.joback_tb_k {
            let mut e = v("boiling_point", tb, "K", METHOD_JOBACK);
            e.detail = format!("typical_error_k={err:.0}");
            out.push(e);
        }
        for s in &self.sites {
            let Some(pka) = s.pka else { continue };
            let kind = match s.kind {
                SiteKind::Acid => "acidic",
                SiteKind::Base => "basic",
                _ => continue,
            };
            let mut e = v("pka", pka, "", METHOD_PKA);
            e.detail = format!(
                "type={kind};class={};spread={:.1}",
                crate::plain::words(&s.class),
                s.spread_pka
            );
            out.push(e);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn acetic_acid_gets_logp_an_acidic_pka_and_a_boiling_point() {
        let e = estimate("CC(=O)O").unwrap();
        let vals = e.values();
        let get = |p: &str| vals.iter().find(|v| v.property == p).map(|v| v.value);
        // RDKit Crippen logP of acetic acid is 0.0909 (RDKit 2026.09.1, computed reference)
        assert!((get("logp").unwrap() - 0.0909).abs() < 0.01);
        let pka = vals.iter().find(|v| v.property == "pka").unwrap();
        assert!(pka.detail.starts_with("type=acidic"));
        // typical carboxylic acid pKa 4-5 (textbook, from memory)
        assert!((3.5..5.5).contains(&pka.value), "{}", pka.value);
        // Joback Tb of acetic acid about 390 K vs experimental 391 K (handbook, from memory)
        assert!((get("boiling_point").unwrap() - 391.0).abs() < 30.0);
    }

    #[test]
    fn bad_smiles_is_an_error_with_a_message() {
        let e = estimate("C1CC(").unwrap_err().to_string();
        assert!(!e.is_empty());
    }
}
