//! Analytes and their properties with provenance.
//!
//! Every property value carries its unit, whether it was measured (`experimental`, with its
//! source) or computed (`estimated`, with its method), and the licence under which the value
//! may be passed on. When several values exist for one property the precedence is:
//! experimental before estimated whatever the origin (a measured value always beats a computed
//! one); within each kind the user's own overlay before the shipped base and phasewise's own
//! structure estimates; ties keep their stored order.

pub mod estimate;
pub mod ionisation;
pub mod panel;
pub mod unresolved;

pub use unresolved::{Candidate, Suggestion, Unresolved};

use serde::{Deserialize, Serialize};

/// Whether a value was measured or computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum PropertyKind {
    /// Measured; `source` names the data set or publication.
    Experimental,
    /// Computed; `source` names the method.
    Estimated,
}

impl PropertyKind {
    /// The word stored in the knowledge base.
    pub fn as_str(self) -> &'static str {
        match self {
            PropertyKind::Experimental => "experimental",
            PropertyKind::Estimated => "estimated",
        }
    }

    /// Parse the stored word.
    pub fn parse(s: &str) -> Option<Self> {
        match s {
            "experimental" => Some(PropertyKind::Experimental),
            "estimated" => Some(PropertyKind::Estimated),
            _ => None,
        }
    }
}

/// Where a compound record came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Origin {
    /// The knowledge base shipped with phasewise.
    Shipped,
    /// The user's own overlay database.
    User,
    /// Not in any database: known only from the SMILES the user gave.
    Structure,
    /// Estimated by phasewise from a structure the user stored in the overlay (a compound new
    /// to the shipped base): computed, not supplied by the user.
    Computed,
}

/// The properties phasewise knows by name, with their canonical units.
pub const KNOWN_PROPERTIES: &[(&str, &str, &str)] = &[
    ("logp", "", "octanol-water partition coefficient, log10"),
    (
        "pka",
        "",
        "acid dissociation constant, -log10; detail gives type=acidic|basic",
    ),
    ("boiling_point", "K", "normal boiling point"),
    ("vapour_pressure", "kPa", "vapour pressure at 25 °C"),
    ("molar_mass", "g/mol", "average molar mass"),
    ("charge", "e", "net formal charge of the stored structure"),
    ("tpsa", "Å²", "topological polar surface area"),
    ("hbd", "count", "hydrogen-bond donors"),
    ("hba", "count", "hydrogen-bond acceptors"),
    ("molar_refractivity", "cm³/mol", "molar refractivity"),
    (
        "mcgowan_volume",
        "cm³/mol/100",
        "McGowan characteristic volume",
    ),
];

/// The canonical unit of a known property, if it is one.
pub fn canonical_unit(property: &str) -> Option<&'static str> {
    KNOWN_PROPERTIES
        .iter()
        .find(|(p, _, _)| *p == property)
        .map(|(_, u, _)| *u)
}

/// One property value with its unit and provenance.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Property {
    /// Property name, one of [`KNOWN_PROPERTIES`] or a user-defined name.
    pub property: String,
    /// The value, in `unit`.
    pub value: f64,
    /// Unit (empty for dimensionless logarithmic quantities such as logP and pKa).
    pub unit: String,
    /// Measured or computed.
    pub kind: PropertyKind,
    /// Data set, publication or method.
    pub source: String,
    /// Licence under which the value is shipped (SPDX-style where possible).
    pub licence: String,
    /// Extra qualifiers, `key=value` pairs separated by `;` (e.g. `type=acidic;temp_c=25`).
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub detail: String,
    /// Which database holds the value.
    pub origin: Origin,
}

impl Property {
    /// A qualifier from `detail`, e.g. `detail_value("type")`.
    pub fn detail_value(&self, key: &str) -> Option<&str> {
        self.detail
            .split(';')
            .filter_map(|kv| kv.split_once('='))
            .find(|(k, _)| k.trim() == key)
            .map(|(_, v)| v.trim())
    }
}

/// A resolved analyte: identity plus all known properties.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Analyte {
    /// What the user typed.
    pub query: String,
    /// Preferred name.
    pub name: String,
    /// Standard InChIKey, when known.
    pub inchikey: Option<String>,
    /// SMILES as stored.
    pub smiles: Option<String>,
    /// Molecular formula (Hill order).
    pub formula: Option<String>,
    /// Average molar mass, g/mol.
    pub molar_mass_g_mol: Option<f64>,
    /// PubChem compound id.
    pub cid: Option<i64>,
    /// CAS registry number.
    pub cas: Option<String>,
    /// Where the compound record came from.
    pub origin: Origin,
    /// How the query matched (`name`, `synonym`, `cas`, `inchikey`, `cid`, `smiles`).
    pub matched_by: String,
    /// All property values, best first within each property (see [`Analyte::best`]).
    pub properties: Vec<Property>,
}

impl Analyte {
    /// Sort properties by name, then by precedence (experimental > estimated; within a kind,
    /// user > shipped and computed).
    pub fn sort_properties(&mut self) {
        self.properties.sort_by(|a, b| {
            a.property
                .cmp(&b.property)
                .then_with(|| precedence(a).cmp(&precedence(b)))
        });
    }

    /// The winning value of a property, if any.
    pub fn best(&self, property: &str) -> Option<&Property> {
        self.properties
            .iter()
            .filter(|p| p.property == property)
            .min_by_key(|p| precedence(p))
    }

    /// All values of a property, best first.
    pub fn all<'a>(&'a self, property: &'a str) -> impl Iterator<Item = &'a Property> + 'a {
        self.properties
            .iter()
            .filter(move |p| p.property == property)
    }

    /// The user's own label for this analyte: the text or table name they gave (`query`),
    /// unless it only repeats the resolved name (same letters and digits, whatever the case
    /// and punctuation) or is the bare SMILES string the analyte was found by.
    pub fn label(&self) -> Option<&str> {
        let q = self.query.trim();
        if q.is_empty() || same_words(q, &self.name) {
            return None;
        }
        let forced = q.strip_prefix("smiles:");
        let bare = forced.unwrap_or(q).trim();
        let by_structure = forced.is_some()
            || self.origin == Origin::Structure
            || self.matched_by.starts_with("structure")
            || self.matched_by.starts_with("smiles");
        if by_structure
            && !bare.contains(char::is_whitespace)
            && crate::structure::is_valid_smiles(bare)
        {
            return None;
        }
        Some(q)
    }

    /// The name shown in tables: the user's label first, then the resolved name in
    /// parentheses (`Impurity A (acetaminophen)`); the resolved name alone without a label.
    pub fn display_name(&self) -> String {
        match self.label() {
            Some(l) => format!("{l} ({})", self.name),
            None => self.name.clone(),
        }
    }
}

/// Whether two names have the same letters and digits in the same order (case, spaces and
/// punctuation ignored).
fn same_words(a: &str, b: &str) -> bool {
    let key = |s: &str| -> Vec<char> {
        s.chars()
            .filter(|c| c.is_alphanumeric())
            .flat_map(char::to_lowercase)
            .collect()
    };
    key(a) == key(b)
}

/// Rank of a value: kind first (measured beats computed whatever the origin), then origin
/// (the user's own values beat the shipped base and phasewise's structure estimates).
fn precedence(p: &Property) -> (u8, u8) {
    let kind = match p.kind {
        PropertyKind::Experimental => 0,
        PropertyKind::Estimated => 1,
    };
    let origin = match p.origin {
        Origin::User => 0,
        Origin::Shipped | Origin::Structure | Origin::Computed => 1,
    };
    (kind, origin)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn prop(value: f64, kind: PropertyKind, origin: Origin) -> Property {
        Property {
            property: "logp".into(),
            value,
            unit: String::new(),
            kind,
            source: "test".into(),
            licence: "CC0-1.0".into(),
            detail: String::new(),
            origin,
        }
    }

    #[test]
    fn experimental_beats_estimated_whatever_the_origin() {
        let mut a = Analyte {
            query: "x".into(),
            name: "x".into(),
            inchikey: None,
            smiles: None,
            formula: None,
            molar_mass_g_mol: None,
            cid: None,
            cas: None,
            origin: Origin::Shipped,
            matched_by: "name".into(),
            properties: vec![
                prop(1.0, PropertyKind::Estimated, Origin::Shipped),
                prop(2.0, PropertyKind::Experimental, Origin::Shipped),
            ],
        };
        assert_eq!(a.best("logp").unwrap().value, 2.0);
        // a user (or phasewise-computed) estimate never outranks a shipped measured value
        a.properties
            .push(prop(3.0, PropertyKind::Estimated, Origin::User));
        a.properties
            .push(prop(3.5, PropertyKind::Estimated, Origin::Computed));
        assert_eq!(a.best("logp").unwrap().value, 2.0);
        // the user's measured value beats the shipped measured value
        a.properties
            .push(prop(4.0, PropertyKind::Experimental, Origin::User));
        assert_eq!(a.best("logp").unwrap().value, 4.0);
        a.sort_properties();
        let order: Vec<f64> = a.properties.iter().map(|p| p.value).collect();
        assert_eq!(order, vec![4.0, 2.0, 3.0, 1.0, 3.5]);
    }

    #[test]
    fn detail_values_are_read_by_key() {
        let mut p = prop(4.2, PropertyKind::Experimental, Origin::Shipped);
        p.detail = "type=acidic;temp_c=25".into();
        assert_eq!(p.detail_value("type"), Some("acidic"));
        assert_eq!(p.detail_value("temp_c"), Some("25"));
        assert_eq!(p.detail_value("x"), None);
    }
}
