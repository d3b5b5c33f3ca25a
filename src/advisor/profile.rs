//! An analyte as the advisor sees it: the knowledge-base record plus what the structure engine
//! adds (descriptors, ionisable sites with experimental pKa winning over typical values,
//! boiling point, GC verdict, functional-group counts for the GC retention index).

use crate::model::gc::{GcAnalyte, RingSubstitution};
use crate::property::estimate::{StructureEstimate, estimate};
use crate::property::ionisation;
use crate::property::{Analyte, Origin, PropertyKind};
use crate::structure::chromophore::{ChromophoreClass, classify};
use crate::structure::graph::{BondOrder, MolGraph};
use crate::structure::ionisable::{AcidBase, IonisableSite, SiteKind, apply_experimental};
use crate::structure::volatility::{
    GC_HIGH_TB_K, GcAssessment, GcVerdict, TbSource, assess_gc, assess_gc_with_tb,
};

/// The ion of the ion-chromatography table an analyte is, or is analysed as (a salt by its
/// ion), whatever name the user gave it.
#[derive(Debug, Clone, PartialEq)]
pub struct IonMatch {
    /// Ion id in the ion table (`data/ic_ions.tsv`).
    pub id: String,
    /// Charge of the ion.
    pub charge: i8,
    /// How the match was made, in plain words.
    pub how: String,
}

/// Counter-ions that a salt is rarely analysed for: a salt of one of them is analysed by its
/// other ion (sodium nitrate by nitrate); common practice, no source.
const COMMON_COUNTER_IONS: [&str; 3] = ["sodium", "potassium", "chloride"];

/// Most N-H and O-H hydrogens for which the index route ([`elution_by_index`]) is used: the
/// boiling point of an H-bond donor is raised by self-association that a dimethylpolysiloxane
/// index does not see, and its adsorption and lability are what limit it in GC.
const INDEX_ROUTE_MAX_DONOR_H: u32 = 1;

/// The GC assessment with the alkane-equivalent boiling point of the retention index predicted
/// on dimethylpolysiloxane (solvation-parameter model, `model::gc::solvation`) in place of the
/// Joback estimate: elution in GC is decided by the index, and the index route covers elements
/// Joback has no groups for (organophosphorus pesticides) and large non-polar molecules where
/// Joback's error grows to 30-70 K (pyrethroids). Used only when no experimental boiling point
/// is known, the Joback estimate is missing or above `GC_HIGH_TB_K`, and the analyte has at
/// most [`INDEX_ROUTE_MAX_DONOR_H`] N-H/O-H hydrogens (rule:gc-elution-by-index; the n-alkane
/// boiling points of Kreglewski & Zwolinski 1961, from memory). The 1σ is the index's,
/// converted, and never below the Joback floor. `None` when the model gives no index.
fn elution_by_index(graph: &MolGraph) -> Option<GcAssessment> {
    let donor_h: u32 = graph
        .atoms
        .iter()
        .filter(|a| matches!(a.atomic_number, 7 | 8))
        .map(|a| u32::from(a.hydrogens))
        .sum();
    if donor_h > INDEX_ROUTE_MAX_DONOR_H {
        return None;
    }
    let cat = crate::phase::Catalogue::builtin().ok()?;
    let phase = cat.phase("gc-dimethyl").ok()?;
    let ri = crate::model::gc::predict_retention_index_from_structure(graph, phase).ok()?;
    if !(ri.retention_index.is_finite() && ri.retention_index > 0.0) {
        return None;
    }
    let n = ri.retention_index / 100.0;
    let tb = crate::model::gc::alkane_boiling_point_k(n);
    let slope = crate::model::gc::alkane_boiling_point_k(n + 0.5)
        - crate::model::gc::alkane_boiling_point_k(n - 0.5);
    let sigma = (ri.sigma_ri / 100.0 * slope).max(JOBACK_TB_SIGMA_FLOOR_K);
    assess_gc_with_tb(graph, tb, sigma, TbSource::AlkaneEquivalentFromIndex).ok()
}

/// Match an analyte to the ion table: by the name or query as typed (`fluoride`, `methylamine`),
/// by the words of a salt name (`potassium nitrate`), or by the components of a salt SMILES.
pub fn match_ion(analyte: &Analyte) -> Option<IonMatch> {
    let cat = crate::phase::Catalogue::builtin().ok()?;
    for q in [&analyte.query, &analyte.name] {
        if let Ok(ion) = cat.ic_ion(q.trim()) {
            return Some(IonMatch {
                id: ion.id().to_string(),
                charge: ion.charge(),
                how: format!("`{}` is the {} ion of the ion table", q.trim(), ion.name()),
            });
        }
    }
    let pick = |ions: Vec<&crate::phase::IcIon>, what: &str| -> Option<IonMatch> {
        if ions.len() < 2 {
            return None;
        }
        let analysed: Vec<&&crate::phase::IcIon> = ions
            .iter()
            .filter(|i| !COMMON_COUNTER_IONS.contains(&i.id()))
            .collect();
        let ion = match analysed.as_slice() {
            [one] => **one,
            _ => *ions.iter().find(|i| i.charge() < 0).unwrap_or(&ions[0]),
        };
        let others: Vec<&str> = ions
            .iter()
            .filter(|i| i.id() != ion.id())
            .map(|i| i.name())
            .collect();
        Some(IonMatch {
            id: ion.id().to_string(),
            charge: ion.charge(),
            how: format!(
                "{what}: analysed as its {} ion ({} the counter-ion)",
                ion.name(),
                others.join(", ")
            ),
        })
    };
    for q in [&analyte.query, &analyte.name] {
        let words: Vec<&str> = q
            .split(|c: char| c.is_whitespace() || c == ',')
            .filter(|w| !w.is_empty() && !w.eq_ignore_ascii_case("ion"))
            .collect();
        let ions: Vec<&crate::phase::IcIon> =
            words.iter().filter_map(|w| cat.ic_ion(w).ok()).collect();
        if ions.len() == words.len()
            && let Some(m) = pick(ions, &format!("`{}` is a salt", q.trim()))
        {
            return Some(m);
        }
    }
    let smiles = analyte.smiles.as_deref()?;
    if smiles.contains('.') {
        let parts: Vec<&str> = smiles.split('.').collect();
        let ions: Vec<&crate::phase::IcIon> = parts
            .iter()
            .filter_map(|p| cat.ic_ions().iter().find(|i| i.smiles() == *p))
            .collect();
        if ions.len() == parts.len() {
            return pick(ions, "a salt of table ions");
        }
    }
    None
}

/// Standard uncertainty taken for an experimental boiling point, K (handbook and database
/// values; assumption, from memory).
pub const EXPERIMENTAL_TB_SIGMA_K: f64 = 1.0;
/// Uncertainty of a Joback estimate when its own `typical_error_k` is not at hand, K: the
/// lowest value Joback's `typical_error_k` takes (`structure::joback`).
pub const JOBACK_TB_SIGMA_FLOOR_K: f64 = 18.0;
/// Source text of the boiling-point estimate the advisor uses.
pub const TB_ESTIMATE_SOURCE: &str = "Joback & Reid group contributions (Chem. Eng. Commun. 1987) with the Stein & Brown (1994) correction, as used by every advisor decision";

/// The advisor's view of one analyte.
#[derive(Debug, Clone)]
pub struct AnalyteProfile {
    /// The resolved analyte, with estimated properties appended when it came from structure.
    pub analyte: Analyte,
    /// Structure-based estimates (when a SMILES string is known and parses).
    pub estimate: Option<StructureEstimate>,
    /// Ionisable sites, with experimental pKa values applied.
    pub sites: Vec<IonisableSite>,
    /// Best logP value and whether it is experimental.
    pub log_p: Option<(f64, PropertyKind)>,
    /// The one normal boiling point every decision uses (mode fit, GC verdict, retention
    /// index), K, and whether it is experimental: the experimental value when one is stored,
    /// else the structure engine's Joback estimate with the Stein & Brown correction (the
    /// value the GC verdict uses), else a stored estimate.
    pub tb_k: Option<(f64, PropertyKind)>,
    /// Standard uncertainty of `tb_k`, K: 1 K for an experimental value, Joback's
    /// `typical_error_k` for the estimate (18 K and more; `structure::joback`).
    pub tb_sigma_k: Option<f64>,
    /// GC suitability.
    pub gc: Option<GcAssessment>,
    /// Net formal charge of the structure.
    pub formal_charge: i32,
    /// True for an ion without carbon (nitrate, sodium, ...) or a small ion such as acetate.
    pub inorganic_ion: bool,
    /// Molar mass, g/mol.
    pub molar_mass_g_mol: Option<f64>,
    /// Things the advisor should say about this analyte.
    pub notes: Vec<String>,
    /// The ion-table ion the analyte is analysed as, when it is one (or a salt of one).
    pub ion: Option<IonMatch>,
    /// The strongest UV chromophore of the structure (`None` without a structure).
    pub chromophore: Option<ChromophoreClass>,
    /// Measured reversed-phase retention from the open retention data (the retention memory):
    /// the median strong-solvent fraction at which k = 1 over the RP systems that measured the
    /// analyte, and their number. Filled by the advisor (`evidence::with_measured_rp`); `None`
    /// without measurements or with `--no-memory`.
    pub measured_rp_psi_k1: Option<(f64, usize)>,
    /// The name shown in every table: the user's label first, then the resolved name
    /// ([`Analyte::display_name`]).
    display: String,
}

impl AnalyteProfile {
    /// Build the profile of a resolved analyte.
    pub fn new(mut analyte: Analyte) -> AnalyteProfile {
        let mut notes = Vec::new();
        // a doubled backslash is never valid SMILES: it is an escaping error (about 3 % of the
        // shipped structures, those with cis/trans double bonds, carry it); read the structure
        // with single backslashes and fill the estimates the knowledge base could not make
        if let Some(s) = analyte.smiles.clone()
            && s.contains("\\\\")
            && estimate(&s).is_err()
        {
            let fixed = s.replace("\\\\", "\\");
            if let Ok(e) = estimate(&fixed) {
                notes.push(
                    "the stored SMILES has doubled backslashes (an escaping error); read with single ones".into(),
                );
                let mut filled = analyte.clone();
                filled.properties.clear();
                crate::property::estimate::attach_estimates(&mut filled, &e);
                for p in filled.properties {
                    if analyte.best(&p.property).is_none() {
                        analyte.properties.push(p);
                    }
                }
                if analyte.formula.is_none() {
                    analyte.formula = filled.formula;
                }
                if analyte.molar_mass_g_mol.is_none() {
                    analyte.molar_mass_g_mol = filled.molar_mass_g_mol;
                }
                analyte.smiles = Some(fixed);
            }
        }
        let est = analyte.smiles.as_deref().and_then(|s| match estimate(s) {
            Ok(e) => Some(e),
            Err(err) => {
                notes.push(format!(
                    "structure could not be read ({err}); structure-based estimates are missing"
                ));
                None
            }
        });
        if let Some(e) = &est {
            if let Some(n) = &e.note {
                notes.push(n.clone());
            }
            // Analytes known only from structure get the estimates as properties.
            if analyte.origin == Origin::Structure {
                crate::property::estimate::attach_estimates(&mut analyte, e);
            }
        }
        let experimental_pka: Vec<(f64, Option<AcidBase>)> = analyte
            .all("pka")
            .filter(|p| p.kind == PropertyKind::Experimental)
            .map(|p| {
                let t = match p.detail_value("type") {
                    Some("acidic") => Some(AcidBase::Acid),
                    Some("basic") => Some(AcidBase::Base),
                    _ => None,
                };
                (p.value, t)
            })
            .collect();
        let mut sites = est.as_ref().map(|e| e.sites.clone()).unwrap_or_default();
        if !experimental_pka.is_empty()
            && !sites.is_empty()
            && let Ok(m) = apply_experimental(&sites, &experimental_pka)
        {
            sites = m.sites;
        }
        let log_p = analyte.best("logp").map(|p| (p.value, p.kind));
        let stored_tb = analyte.best("boiling_point").map(|p| (p.value, p.kind));
        // a value the lab stored itself (user overlay) is used as given, like an experimental one
        let user_tb = analyte
            .best("boiling_point")
            .is_some_and(|p| p.origin == Origin::User);
        let exp_tb = stored_tb
            .filter(|(_, k)| *k == PropertyKind::Experimental || user_tb)
            .map(|(v, _)| v);
        let gc = est.as_ref().and_then(|e| assess_gc(&e.graph, exp_tb).ok());
        let gc = match (gc, exp_tb, est.as_ref()) {
            (Some(g), None, Some(e)) if g.tb_k.is_none_or(|t| t > GC_HIGH_TB_K) => {
                Some(elution_by_index(&e.graph).unwrap_or(g))
            }
            (gc, _, _) => gc,
        };
        // one boiling point and one uncertainty for every decision (docs/science.md §
        // boiling point): experimental, else the GC assessment's corrected Joback estimate
        let (tb_k, tb_sigma_k) = match (exp_tb, gc.as_ref().and_then(|g| g.tb_k)) {
            (Some(t), _) => match stored_tb {
                Some((_, PropertyKind::Estimated)) => (
                    Some((t, PropertyKind::Estimated)),
                    Some(JOBACK_TB_SIGMA_FLOOR_K),
                ),
                _ => (
                    Some((t, PropertyKind::Experimental)),
                    Some(EXPERIMENTAL_TB_SIGMA_K),
                ),
            },
            (None, Some(t)) => (
                Some((t, PropertyKind::Estimated)),
                gc.as_ref()
                    .and_then(|g| g.tb_error_k)
                    .or(Some(JOBACK_TB_SIGMA_FLOOR_K)),
            ),
            (None, None) => (stored_tb, stored_tb.map(|_| JOBACK_TB_SIGMA_FLOOR_K)),
        };
        // the estimated boiling point shown in reports is the one used
        if exp_tb.is_none()
            && let Some((t, _)) = tb_k
            && gc.as_ref().and_then(|g| g.tb_k).is_some()
        {
            for p in analyte.properties.iter_mut().filter(|p| {
                p.property == "boiling_point"
                    && p.kind == PropertyKind::Estimated
                    && p.origin != Origin::User
            }) {
                if (p.value - t).abs() > 1e-9 {
                    p.detail = format!("joback_sum_k={:.1}", p.value);
                    p.value = t;
                    p.source = TB_ESTIMATE_SOURCE.into();
                }
            }
        }
        let formal_charge = est.as_ref().map_or(0, |e| e.descriptors.formal_charge);
        let carbon = est
            .as_ref()
            .is_some_and(|e| e.graph.atoms.iter().any(|a| a.atomic_number == 6));
        let molar_mass_g_mol = analyte
            .molar_mass_g_mol
            .or_else(|| est.as_ref().and_then(|e| e.descriptors.molar_mass_g_mol));
        let ion = match_ion(&analyte);
        // a salt (charged components summing to zero) is ionic too
        let salt = est.as_ref().is_some_and(|e| {
            e.graph.atoms.iter().any(|a| a.formal_charge != 0)
                && analyte.smiles.as_deref().is_some_and(|s| s.contains('.'))
        });
        // an ion of the ion table (or a salt of one) is treated as that ion, whatever the
        // name (common practice, no source: ions are analysed by IC)
        let inorganic_ion = ion.is_some()
            || ((formal_charge != 0 || salt)
                && (!carbon || molar_mass_g_mol.is_some_and(|m| m < 90.0)));
        let formal_charge = ion.as_ref().map_or(formal_charge, |i| i32::from(i.charge));
        let chromophore = est.as_ref().map(|e| classify(&e.graph));
        let analyte_display = analyte.display_name();
        AnalyteProfile {
            analyte,
            estimate: est,
            sites,
            log_p,
            tb_k,
            tb_sigma_k,
            gc,
            formal_charge,
            inorganic_ion,
            molar_mass_g_mol,
            notes,
            ion,
            chromophore,
            measured_rp_psi_k1: None,
            display: analyte_display,
        }
    }

    /// Display name: the user's label first, then the resolved name (`Impurity A
    /// (acetaminophen)`); the resolved name alone when the user gave no label of their own.
    pub fn name(&self) -> &str {
        &self.display
    }

    /// logD at a pH for chromatographic decisions (estimated from logP and the ionisable
    /// sites; logP when no site): microspecies-aware, so that every species partitions, a
    /// zwitterion as an inner salt and a charged species as an ion pair
    /// ([`ionisation::log_d_microspecies`] with [`ionisation::CHROMATOGRAPHIC_PARTITION`]);
    /// a permanent charge counts as one charge.
    pub fn log_d(&self, ph: f64) -> Option<f64> {
        let (lp, _) = self.log_p?;
        ionisation::log_d_microspecies(lp, &self.sites, ph, &ionisation::CHROMATOGRAPHIC_PARTITION)
            .ok()
            .or(Some(lp))
    }

    /// The largest logD over a pH range (the best retention reversed phase can give).
    pub fn max_log_d(&self, ph_lo: f64, ph_hi: f64) -> Option<f64> {
        let mut best: Option<f64> = None;
        let mut ph = ph_lo;
        while ph <= ph_hi + 1e-9 {
            if let Some(d) = self.log_d(ph) {
                best = Some(best.map_or(d, |b: f64| b.max(d)));
            }
            ph += 0.5;
        }
        best
    }

    /// pKa values of acid and base sites.
    pub fn pkas(&self) -> Vec<(f64, SiteKind)> {
        self.sites
            .iter()
            .filter_map(|s| s.pka.map(|p| (p, s.kind)))
            .collect()
    }

    /// Whether a base with pKa above `threshold` is present (tails on silanols when protonated).
    pub fn strong_base(&self, threshold: f64) -> bool {
        self.sites
            .iter()
            .any(|s| s.kind == SiteKind::Base && s.pka.is_some_and(|p| p > threshold))
    }

    /// Whether an acid site is present.
    pub fn has_acid(&self) -> bool {
        self.sites.iter().any(|s| s.kind == SiteKind::Acid)
    }

    /// Whether a permanent charge is present.
    pub fn permanently_charged(&self) -> bool {
        self.inorganic_ion
            || self
                .sites
                .iter()
                .any(|s| matches!(s.kind, SiteKind::PermanentAnion | SiteKind::PermanentCation))
    }

    /// GC verdict (unsuitable when unknown and not volatile).
    pub fn gc_verdict(&self) -> Option<GcVerdict> {
        self.gc.as_ref().map(|g| g.verdict)
    }

    /// Number of aromatic rings.
    pub fn aromatic_rings(&self) -> u32 {
        self.estimate
            .as_ref()
            .map_or(0, |e| e.descriptors.aromatic_ring_count)
    }

    /// Number of halogen atoms.
    pub fn halogens(&self) -> u32 {
        self.estimate.as_ref().map_or(0, |e| {
            e.graph
                .atoms
                .iter()
                .filter(|a| matches!(a.atomic_number, 9 | 17 | 35 | 53))
                .count() as u32
        })
    }

    /// The GC retention-index input, when a boiling point is known.
    pub fn gc_analyte(&self) -> Option<GcAnalyte> {
        let (tb, _) = self.tb_k?;
        let e = self.estimate.as_ref();
        let counts = e.map(|e| group_counts(&e.graph)).unwrap_or_default();
        let typical_error = self.tb_sigma_k.unwrap_or(JOBACK_TB_SIGMA_FLOOR_K);
        Some(GcAnalyte {
            tb_k: tb,
            tb_sigma_k: typical_error,
            molar_mass_g_mol: self.molar_mass_g_mol.unwrap_or(100.0),
            n_aromatic_rings: self.aromatic_rings(),
            n_hydroxyl: counts.hydroxyl,
            n_carboxylic_acid: counts.carboxylic_acid,
            n_carbonyl: counts.carbonyl,
            n_ether: counts.ether,
            n_ester: counts.ester,
            n_nitrile: counts.nitrile,
            n_nitro: counts.nitro,
            n_halogen: self.halogens(),
            n_amine: counts.amine,
            n_pyridine_like: counts.pyridine_like,
            ring_substitution: e.map_or(RingSubstitution::NotApplicable, |e| {
                ring_substitution(&e.graph)
            }),
            is_n_alkane_carbon_count: e.and_then(|e| n_alkane(&e.graph)),
        })
    }
}

/// A profile from a name and a SMILES string alone (structure-based estimates only), for
/// tests of the advisor's rules.
#[cfg(test)]
pub(crate) fn test_profile(name: &str, smiles: &str) -> AnalyteProfile {
    AnalyteProfile::new(Analyte {
        query: name.into(),
        name: name.into(),
        inchikey: None,
        smiles: Some(smiles.into()),
        formula: None,
        molar_mass_g_mol: None,
        cid: None,
        cas: None,
        origin: Origin::Structure,
        matched_by: "test".into(),
        properties: Vec::new(),
    })
}

/// Functional-group counts used by the GC retention-index model.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct GroupCounts {
    /// O-H on carbon (alcohols, phenols), not acids.
    pub hydroxyl: u32,
    /// C(=O)OH.
    pub carboxylic_acid: u32,
    /// Ketone and aldehyde C=O.
    pub carbonyl: u32,
    /// C-O-C, not esters.
    pub ether: u32,
    /// C(=O)O-C.
    pub ester: u32,
    /// C#N.
    pub nitrile: u32,
    /// N(=O)=O.
    pub nitro: u32,
    /// sp3 N with H or C only (not amides).
    pub amine: u32,
    /// Aromatic N without H.
    pub pyridine_like: u32,
}

fn order(g: &MolGraph, b: usize) -> BondOrder {
    g.bonds[b].order
}

/// Count functional groups on the graph (simple patterns; common practice, no source).
pub fn group_counts(g: &MolGraph) -> GroupCounts {
    let mut c = GroupCounts::default();
    let z = |i: usize| g.atoms[i].atomic_number;
    for (i, a) in g.atoms.iter().enumerate() {
        let nb = &g.neighbours[i];
        match a.atomic_number {
            8 if !a.aromatic => {
                let carbons: Vec<(usize, usize)> =
                    nb.iter().copied().filter(|&(n, _)| z(n) == 6).collect();
                let single = nb.iter().all(|&(_, b)| order(g, b) == BondOrder::Single);
                if !single {
                    continue;
                }
                // is a neighbouring carbon a carbonyl carbon?
                let acyl = |cidx: usize| {
                    g.neighbours[cidx]
                        .iter()
                        .any(|&(n, b)| n != i && z(n) == 8 && order(g, b) == BondOrder::Double)
                };
                if a.hydrogens >= 1 && carbons.len() == 1 {
                    if acyl(carbons[0].0) {
                        c.carboxylic_acid += 1;
                    } else {
                        c.hydroxyl += 1;
                    }
                } else if carbons.len() == 2 {
                    if carbons.iter().any(|&(ci, _)| acyl(ci)) {
                        c.ester += 1;
                    } else {
                        c.ether += 1;
                    }
                }
            }
            6 => {
                for &(n, b) in nb {
                    if z(n) == 8 && order(g, b) == BondOrder::Double {
                        let other_hetero = nb.iter().any(|&(m, _)| m != n && matches!(z(m), 7 | 8));
                        if !other_hetero {
                            c.carbonyl += 1;
                        }
                    }
                    if z(n) == 7 && order(g, b) == BondOrder::Triple {
                        c.nitrile += 1;
                    }
                }
            }
            7 => {
                let oxygens = nb.iter().filter(|&&(n, _)| z(n) == 8).count();
                if oxygens == 2 && a.formal_charge == 1 {
                    c.nitro += 1;
                } else if a.aromatic && a.hydrogens == 0 && nb.len() == 2 {
                    c.pyridine_like += 1;
                } else if !a.aromatic
                    && nb.iter().all(|&(_, b)| order(g, b) == BondOrder::Single)
                    && nb.iter().all(|&(n, _)| {
                        z(n) == 6
                            && !g.neighbours[n].iter().any(|&(m, b)| {
                                matches!(z(m), 8 | 16) && order(g, b) == BondOrder::Double
                            })
                    })
                {
                    c.amine += 1;
                }
            }
            _ => {}
        }
    }
    c
}

/// Substitution pattern of a disubstituted benzene ring (ortho/meta/para), for the GC model.
pub fn ring_substitution(g: &MolGraph) -> RingSubstitution {
    for ring in &g.rings {
        if ring.len() != 6
            || !ring
                .iter()
                .all(|&i| g.atoms[i].aromatic && g.atoms[i].atomic_number == 6)
        {
            continue;
        }
        let substituted: Vec<usize> = ring
            .iter()
            .copied()
            .filter(|&i| g.neighbours[i].iter().any(|&(n, _)| !ring.contains(&n)))
            .collect();
        if substituted.len() == 2 {
            let (x, y) = (substituted[0], substituted[1]);
            let ring_nb = |i: usize| -> Vec<usize> {
                g.neighbours[i]
                    .iter()
                    .map(|&(n, _)| n)
                    .filter(|n| ring.contains(n))
                    .collect()
            };
            return if ring_nb(x).contains(&y) {
                RingSubstitution::Ortho
            } else if ring_nb(x).iter().any(|n| ring_nb(y).contains(n)) {
                RingSubstitution::Meta
            } else {
                RingSubstitution::Para
            };
        }
    }
    RingSubstitution::NotApplicable
}

/// Carbon count of an unbranched n-alkane (RI = 100·n by definition), else `None`.
fn n_alkane(g: &MolGraph) -> Option<u32> {
    if g.atoms.is_empty() || !g.rings.is_empty() {
        return None;
    }
    let all_c = g
        .atoms
        .iter()
        .all(|a| a.atomic_number == 6 && !a.aromatic && a.formal_charge == 0);
    let single = g.bonds.iter().all(|b| b.order == BondOrder::Single);
    let unbranched = g.neighbours.iter().all(|n| n.len() <= 2);
    (all_c && single && unbranched).then_some(g.atoms.len() as u32)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::parse_smiles;

    fn structure_only(smiles: &str) -> AnalyteProfile {
        AnalyteProfile::new(Analyte {
            query: "test".into(),
            name: "test".into(),
            inchikey: None,
            smiles: Some(smiles.into()),
            formula: None,
            molar_mass_g_mol: None,
            cid: None,
            cas: None,
            origin: Origin::Structure,
            matched_by: "test".into(),
            properties: Vec::new(),
        })
    }

    #[test]
    fn one_boiling_point_and_one_uncertainty_serve_every_decision() {
        // caffeine: the raw Joback sum (about 640 K) and the corrected estimate differ by
        // about 50 K, so a mix-up shows (Joback 1987; Stein & Brown 1994, from memory)
        let p = structure_only("Cn1c(=O)c2c(ncn2C)n(C)c1=O");
        let gc = p.gc.as_ref().expect("GC assessment");
        let (tb, kind) = p.tb_k.expect("a boiling point");
        assert_eq!(kind, PropertyKind::Estimated);
        assert_eq!(Some(tb), gc.tb_k, "mode fit and GC verdict use one value");
        let a = p.gc_analyte().expect("GC input");
        assert_eq!(a.tb_k, tb, "retention index uses the same value");
        assert_eq!(Some(a.tb_sigma_k), gc.tb_error_k, "one uncertainty");
        assert_eq!(p.tb_sigma_k, gc.tb_error_k);
        let shown = p.analyte.best("boiling_point").expect("shown");
        assert_eq!(shown.value, tb, "the report shows the value used");
        assert!(shown.detail.contains("joback_sum_k="));
    }

    #[test]
    fn xylenes_get_their_substitution_pattern() {
        let sub = |s: &str| ring_substitution(&parse_smiles(s).unwrap().graph);
        assert_eq!(sub("Cc1ccccc1C"), RingSubstitution::Ortho);
        assert_eq!(sub("Cc1cccc(C)c1"), RingSubstitution::Meta);
        assert_eq!(sub("Cc1ccc(C)cc1"), RingSubstitution::Para);
        assert_eq!(sub("Cc1ccccc1"), RingSubstitution::NotApplicable);
    }

    #[test]
    fn functional_groups_are_counted() {
        let c = |s: &str| group_counts(&parse_smiles(s).unwrap().graph);
        assert_eq!(c("CCO").hydroxyl, 1);
        assert_eq!(c("CC(=O)O").carboxylic_acid, 1);
        assert_eq!(c("CC(=O)OCC").ester, 1);
        assert_eq!(c("CCOCC").ether, 1);
        assert_eq!(c("CC(C)=O").carbonyl, 1);
        assert_eq!(c("CC#N").nitrile, 1);
        assert_eq!(c("c1ccncc1").pyridine_like, 1);
        assert_eq!(c("CCN").amine, 1);
        assert_eq!(c("CC(N)=O").amine, 0);
        assert_eq!(c("c1ccccc1[N+](=O)[O-]").nitro, 1);
        assert_eq!(n_alkane(&parse_smiles("CCCCCC").unwrap().graph), Some(6));
        assert_eq!(n_alkane(&parse_smiles("CC(C)C").unwrap().graph), None);
    }
}

#[cfg(test)]
mod repair_tests {
    use super::*;

    #[test]
    fn a_doubled_backslash_smiles_is_read_and_its_estimates_filled() {
        // methyl oleate as stored with an escaping error (cis double bond)
        let p = AnalyteProfile::new(Analyte {
            query: "methyl oleate".into(),
            name: "methyl oleate".into(),
            inchikey: None,
            smiles: Some("CCCCCCCC/C=C\\\\CCCCCCCC(=O)OC".into()),
            formula: None,
            molar_mass_g_mol: None,
            cid: None,
            cas: None,
            origin: Origin::Shipped,
            matched_by: "test".into(),
            properties: Vec::new(),
        });
        assert!(p.estimate.is_some(), "{:?}", p.notes);
        assert!(p.log_p.is_some() && p.tb_k.is_some());
        assert_eq!(
            p.analyte.smiles.as_deref(),
            Some("CCCCCCCC/C=C\\CCCCCCCC(=O)OC")
        );
    }
}
