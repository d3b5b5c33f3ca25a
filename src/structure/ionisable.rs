//! Ionisable groups found on a [`MolGraph`], each with a typical aqueous pKa and a spread.
//!
//! This is a **typical-value method**: every site gets the pKa of its group class (values from
//! memory of standard textbook and handbook tables; each constant says so beside it), corrected
//! only where a correction has a well-known published form:
//! - Hammett σ·ρ for substituents on benzene rings bearing a carboxylic acid, phenol or aniline,
//!   and on pyridine rings (σ constants and ρ values from memory of the standard compilation,
//!   Hansch, Leo & Taft, Chem. Rev. 91 (1991) 165, not re-checked against it);
//! - additive α/β-substituent decrements for aliphatic amines, in the style of Perrin, Dempsey &
//!   Serjeant, "pKa Prediction for Organic Acids and Bases" (Chapman & Hall 1981); the
//!   decrement values are from memory.
//!
//! Pre-ionised input (carboxylates, protonated amines, pyridinium) is read through the
//! neutralised view of [`GraphView`], so `CC(=O)[O-]` and `CC(=O)O` give the same site.
//! Quaternary ammonium, sulfonium and phosphonium centres are permanent cations.
//!
//! Experimental values from the knowledge base replace estimates through
//! [`apply_experimental`]; the matching rule is documented there.

use serde::{Deserialize, Serialize};

use super::graph::{BondOrder, MolGraph};
use super::query::{GraphError, GraphView};

/// Ionisable group classes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum GroupClass {
    /// Aliphatic carboxylic acid R-COOH.
    CarboxylicAcid,
    /// Carboxylic acid on an aromatic ring (benzoic-acid type).
    AromaticCarboxylicAcid,
    /// α-Amino acid carboxyl (zwitterion-forming).
    AminoAcidCarboxyl,
    /// Sulfonic acid or sulfuric monoester.
    SulfonicAcid,
    /// First acidic OH of a phosphonic / phosphoric / phosphinic acid.
    PhosphorusAcidFirst,
    /// Second acidic OH of a phosphonic / phosphoric acid.
    PhosphorusAcidSecond,
    /// 5-Substituted 1H-tetrazole.
    Tetrazole,
    /// Acyl sulfonamide (and sulfonylurea) N-H.
    AcylSulfonamide,
    /// Imide, ureide (barbiturate, hydantoin, uracil) N-H flanked by two carbonyls.
    Imide,
    /// Lactam-type N-H in an aromatic ring between C=O and C=N (pyrimidinone, quinazolinone).
    AromaticLactam,
    /// Enol conjugated to a carbonyl (1,3-dione enol, 4-hydroxycoumarin, tetronic acid).
    VinylogousAcid,
    /// Sulfonamide N-H carrying an aryl or heteroaryl group.
    SulfonamideNAryl,
    /// Primary or N-alkyl sulfonamide N-H.
    Sulfonamide,
    /// Hydroxamic acid.
    HydroxamicAcid,
    /// Phenol (hydroxyl on an aromatic ring).
    Phenol,
    /// Aliphatic thiol.
    Thiol,
    /// Aromatic thiol (thiophenol).
    AromaticThiol,
    /// Primary aliphatic amine.
    PrimaryAmine,
    /// Secondary aliphatic amine.
    SecondaryAmine,
    /// Tertiary aliphatic amine.
    TertiaryAmine,
    /// Amidine.
    Amidine,
    /// Guanidine.
    Guanidine,
    /// Acyl- or aryl-substituted guanidine (weaker).
    AcylGuanidine,
    /// Pyridine-like ring nitrogen in a six-membered aromatic ring with no other ring N.
    PyridineNitrogen,
    /// Ring nitrogen of a diazine (pyrimidine, pyrazine, pyridazine) or triazine.
    DiazineNitrogen,
    /// Imidazole-like ring nitrogen (1,3-relation to a pyrrole-type N).
    ImidazoleNitrogen,
    /// Benzimidazole-like ring nitrogen.
    BenzimidazoleNitrogen,
    /// Other azole ring nitrogen (pyrazole, triazole, oxazole, thiazole): weakly basic.
    WeakAzoleNitrogen,
    /// Aniline (amine N on an aromatic carbon).
    Aniline,
    /// Diarylamine: very weak base.
    Diarylamine,
    /// Quaternary ammonium or N-alkylated aromatic N (permanent cation).
    QuaternaryAmmonium,
    /// Sulfonium (permanent cation).
    Sulfonium,
    /// Phosphonium (permanent cation).
    Phosphonium,
    /// Tetracoordinate boron anion (permanent anion).
    Borate,
}

/// Whether a site gives up or takes up a proton, or carries a fixed charge.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum SiteKind {
    /// HA ⇌ A⁻ + H⁺.
    Acid,
    /// BH⁺ ⇌ B + H⁺ (pKa of the conjugate acid).
    Base,
    /// Fixed positive charge at every pH.
    PermanentCation,
    /// Fixed negative charge at every pH.
    PermanentAnion,
}

/// Acid or base, as a knowledge-base pKa record states it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum AcidBase {
    /// An acidic pKa.
    Acid,
    /// A basic pKa (of the conjugate acid).
    Base,
}

/// Where a site's pKa came from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", tag = "kind")]
pub enum PkaSource {
    /// Typical class value, with the corrections applied (human-readable path).
    Estimated {
        /// The class value and corrections, e.g. "phenol 10.0; Hammett 4-NO2 -2.8".
        path: String,
    },
    /// Experimental value from the knowledge base.
    Experimental,
    /// Permanent charge: no pKa.
    Permanent,
}

/// One ionisable site.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct IonisableSite {
    /// Group class.
    pub class: GroupClass,
    /// Acid, base or permanent charge.
    pub kind: SiteKind,
    /// Aqueous pKa at 25 °C (conjugate acid for bases); `None` for permanent charges.
    pub pka: Option<f64>,
    /// Typical spread of the class (± pKa units, about one standard deviation).
    pub spread_pka: f64,
    /// Atoms of the group (sorted indices into the graph).
    pub atoms: Vec<usize>,
    /// True when the input SMILES already showed this site in its ionised form.
    pub ionised_in_input: bool,
    /// Where the pKa came from.
    pub pka_source: PkaSource,
}

/// Errors from ionisable-group detection and merging.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum IonisableError {
    /// The molecular graph is malformed.
    #[error(transparent)]
    Graph(#[from] GraphError),
    /// An experimental pKa is not a finite number in the aqueous range.
    #[error(
        "experimental pKa {value} is outside -5..=20 or not a number; check the knowledge-base record"
    )]
    ExperimentalOutOfRange {
        /// The value given.
        value: f64,
    },
}

/// The result of [`apply_experimental`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ExperimentalMerge {
    /// Sites with experimental values in place of the matched estimates.
    pub sites: Vec<IonisableSite>,
    /// Experimental values that found no site (e.g. a group the detector does not know).
    pub unmatched: Vec<(f64, Option<AcidBase>)>,
}

/// Spread given to a site whose pKa was replaced by an experimental value: a typical
/// inter-laboratory reproducibility of potentiometric pKa values (common practice, no source).
pub const EXPERIMENTAL_SPREAD_PKA: f64 = 0.2;

mod acids;
mod aromatic;
mod classes;
mod experimental;
mod nitrogen;

pub use experimental::{DUPLICATE_WINDOW_PKA, apply_experimental, match_window_pka};

pub use classes::class_value;
use classes::*;

/// Detect the ionisable sites of `graph`, sorted by (first atom, class).
///
/// # Errors
/// [`IonisableError::Graph`] when the graph's indices are inconsistent.
///
/// # Examples
/// ```
/// use phasewise::structure::adapter::parse_smiles;
/// use phasewise::structure::ionisable::{detect_sites, GroupClass};
/// let g = parse_smiles("CC(=O)O").unwrap().graph;
/// let sites = detect_sites(&g).unwrap();
/// assert_eq!(sites.len(), 1);
/// assert_eq!(sites[0].class, GroupClass::CarboxylicAcid);
/// ```
pub fn detect_sites(graph: &MolGraph) -> Result<Vec<IonisableSite>, IonisableError> {
    let v = GraphView::new(graph)?;
    let mut d = Detector {
        v: &v,
        sites: Vec::new(),
    };
    d.run();
    let mut sites = d.sites;
    for s in &mut sites {
        s.atoms.sort_unstable();
        s.atoms.dedup();
    }
    sites.sort_by(|a, b| {
        a.atoms
            .first()
            .cmp(&b.atoms.first())
            .then(a.class.cmp(&b.class))
            .then(a.atoms.cmp(&b.atoms))
    });
    sites.dedup_by(|a, b| a.class == b.class && a.atoms == b.atoms);
    Ok(sites)
}

struct Detector<'v, 'g> {
    v: &'v GraphView<'g>,
    sites: Vec<IonisableSite>,
}

impl Detector<'_, '_> {
    fn push(&mut self, class: GroupClass, atoms: Vec<usize>, shift: f64, path: String, extra: f64) {
        let (pka, spread) = class_value(class);
        let ionised_in_input = atoms.iter().any(|&a| self.v.input_charge(a) != 0);
        let (pka, source) = match pka {
            Some(p) => (
                Some(round2(p + shift)),
                PkaSource::Estimated {
                    path: if path.is_empty() {
                        format!("{} {p:.1}", class_words(class))
                    } else {
                        format!("{} {p:.1}; {path}", class_words(class))
                    },
                },
            ),
            None => (None, PkaSource::Permanent),
        };
        self.sites.push(IonisableSite {
            class,
            kind: kind_of(class),
            pka,
            spread_pka: round2(spread + extra),
            atoms,
            ionised_in_input,
            pka_source: source,
        });
    }

    fn run(&mut self) {
        let v = self.v;
        for i in 0..v.len() {
            match v.z(i) {
                6 => self.carbon(i),
                7 => self.nitrogen(i),
                8 => self.oxygen(i),
                16 => self.sulfur(i),
                15 => self.phosphorus(i),
                5 if v.input_charge(i) < 0 && v.degree(i) + usize::from(v.h(i)) == 4 => {
                    self.push(GroupClass::Borate, vec![i], 0.0, String::new(), 0.0);
                }
                _ => {}
            }
        }
        self.azines();
    }
}

/// Replace estimates by experimental pKa values from the knowledge base.
///
#[derive(Debug, Clone, Copy, PartialEq)]
enum HammettKind {
    Benzoic,
    Phenol,
    Aniline,
}

/// The class in plain words (its snake_case serde name with spaces, as the reports write it),
/// so that the estimate's path never shows a Rust name.
fn class_words(class: GroupClass) -> String {
    match serde_json::to_value(class) {
        Ok(serde_json::Value::String(s)) => s.replace('_', " "),
        _ => "ionisable group".to_string(),
    }
}

/// Join two correction descriptions, skipping empty ones.
fn join_path(first: &str, rest: &str) -> String {
    match (first.is_empty(), rest.is_empty()) {
        (_, true) => first.to_string(),
        (true, false) => rest.to_string(),
        (false, false) => format!("{first}, {rest}"),
    }
}

fn round2(x: f64) -> f64 {
    (x * 100.0).round() / 100.0
}

/// True when ring atom `k` carries an exocyclic =O or =S.
fn exocyclic_oxo(v: &GraphView<'_>, k: usize) -> bool {
    v.z(k) == 6
        && v.heavy(k)
            .any(|(j, o)| o == BondOrder::Double && matches!(v.z(j), 8 | 16) && v.degree(j) == 1)
}

/// True when the aromatic ring of atom `r` (smallest ring containing it) has a non-carbon atom.
fn ring_has_heteroatom(v: &GraphView<'_>, r: usize) -> bool {
    v.smallest_ring(r)
        .is_some_and(|ring| ring.iter().any(|&a| a < v.len() && v.z(a) != 6))
}

/// Shortest distance along the ring between two ring atoms (0..=3 for a 6-ring).
fn ring_distance(ring: &[usize], a: usize, b: usize) -> Option<usize> {
    let ia = ring.iter().position(|&x| x == a)?;
    let ib = ring.iter().position(|&x| x == b)?;
    let d = ia.abs_diff(ib);
    Some(d.min(ring.len() - d))
}

/// Substituents on ring atoms: (ring atom, substituent class, Some(ring atom) when the
/// substituent is itself a reaction centre we skip for that atom).
fn ring_substituents(
    v: &GraphView<'_>,
    ring: &[usize],
) -> Vec<(usize, Substituent, Option<usize>)> {
    let mut out = Vec::new();
    for &r in ring {
        if r >= v.len() {
            continue;
        }
        for (s, o) in v.heavy(r) {
            if ring.contains(&s) || o != BondOrder::Single {
                continue;
            }
            // Ring-fusion atoms belong to another aromatic ring sharing this bond: not substituents.
            if v.aromatic(s) && v.in_ring(s) && v.heavy(s).any(|(k, _)| ring.contains(&k) && k != r)
            {
                continue;
            }
            if let Some(sub) = classify_substituent(v, s, r) {
                out.push((r, sub, Some(r)));
            }
        }
    }
    out
}

/// Classify the substituent whose first atom is `s`, attached to ring atom `r`.
fn classify_substituent(v: &GraphView<'_>, s: usize, r: usize) -> Option<Substituent> {
    use Substituent::*;
    let others: Vec<(usize, BondOrder)> = v.heavy(s).filter(|&(j, _)| j != r).collect();
    Some(match v.z(s) {
        9 => Fluoro,
        17 => Chloro,
        35 => Bromo,
        53 => Iodo,
        7 => {
            let o_count = others.iter().filter(|&&(j, _)| v.z(j) == 8).count();
            if o_count >= 2 {
                Nitro
            } else if v.aromatic(s) {
                return None;
            } else if others.iter().any(|&(j, _)| v.is_acyl_like(j)) {
                Acylamino
            } else if others
                .iter()
                .all(|&(j, o)| o == BondOrder::Single && v.z(j) == 6)
            {
                Amino
            } else {
                return None;
            }
        }
        8 => {
            if v.h(s) >= 1 {
                Hydroxy
            } else if others.iter().any(|&(j, _)| v.is_acyl_like(j)) {
                Acylamino // acyloxy: sigma close to acylamino (OAc 0.39/0.31); rough
            } else {
                Alkoxy
            }
        }
        16 => {
            if v.doubles_to(s, 8).len() >= 2 {
                Sulfonyl
            } else if v.doubles_to(s, 8).is_empty() {
                Alkylthio
            } else {
                Sulfonyl
            }
        }
        6 if v.aromatic(s) => return None,
        6 => {
            let f = others.iter().filter(|&&(j, _)| v.z(j) == 9).count();
            if f == 3 {
                Trifluoromethyl
            } else if others
                .iter()
                .any(|&(j, o)| o == BondOrder::Triple && v.z(j) == 7)
            {
                Cyano
            } else if v.double_to(s, 8) {
                if others
                    .iter()
                    .any(|&(j, o)| o == BondOrder::Single && v.z(j) == 8)
                {
                    Ester
                } else if others
                    .iter()
                    .any(|&(j, o)| o == BondOrder::Single && v.z(j) == 7)
                {
                    Carboxamide
                } else {
                    Acyl
                }
            } else {
                Alkyl
            }
        }
        _ => return None,
    })
}

/// The most acidic acid site (lowest pKa), if any.
pub fn most_acidic(sites: &[IonisableSite]) -> Option<&IonisableSite> {
    sites
        .iter()
        .filter(|s| s.kind == SiteKind::Acid && s.pka.is_some())
        .min_by(|a, b| {
            a.pka
                .unwrap_or(f64::NAN)
                .total_cmp(&b.pka.unwrap_or(f64::NAN))
        })
}

/// The most basic base site (highest conjugate-acid pKa), if any.
pub fn most_basic(sites: &[IonisableSite]) -> Option<&IonisableSite> {
    sites
        .iter()
        .filter(|s| s.kind == SiteKind::Base && s.pka.is_some())
        .max_by(|a, b| {
            a.pka
                .unwrap_or(f64::NAN)
                .total_cmp(&b.pka.unwrap_or(f64::NAN))
                .then(b.atoms.cmp(&a.atoms))
        })
}

#[cfg(test)]
mod tests;
