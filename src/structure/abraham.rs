//! Abraham solute descriptors estimated from structure by fragment additivity.
//!
//! The solvation-parameter model (M. H. Abraham, Chem. Soc. Rev. 22 (1993) 73) describes a
//! solute by its excess molar refraction E, dipolarity/polarisability S, overall hydrogen-bond
//! acidity A and basicity B, the gas-hexadecane partition coefficient L at 25 C and the McGowan
//! volume V. Fragment (group-contribution) schemes for E, S, A, B and L were published by Platts,
//! Butina, Abraham and Hersey (J. Chem. Inf. Comput. Sci. 39 (1999) 835); this module follows
//! the same idea with its own, smaller set of atom-centred fragments ([`Fragment`]) whose
//! values live in `data/gc_solute_fragments.tsv` (values and their provenance documented
//! there and in `docs/gc-retention.md`). V is the exact McGowan volume ([`super::mcgowan`]).
//!
//! The typing is this project's own: every heavy atom gets one fragment; the atoms of a
//! functional group (the two oxygens of an ester, the oxygens of a nitro group, the nitrile
//! carbon) are folded into the group's fragment on one atom and count as [`Fragment::InGroup`].
//! One non-additive correction is typed as a pseudo-fragment: a phenolic OH next to a
//! hydrogen-bond acceptor on the neighbouring ring atom (intramolecular hydrogen bond, which
//! removes most of its acidity: 2-nitrophenol A = 0.05 against phenol 0.60, from memory of
//! Abraham's descriptor tables).

use super::graph::{BondOrder, MolGraph};
use super::mcgowan;

/// Atom-centred fragments of the descriptor scheme. The text ids (see [`Fragment::id`]) are the
/// keys of `data/gc_solute_fragments.tsv`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Fragment {
    /// sp3 carbon with 3 H.
    Ch3,
    /// sp3 carbon with 2 H.
    Ch2,
    /// sp3 carbon with 1 H.
    Ch,
    /// sp3 carbon without H.
    C,
    /// sp3 carbon in a small ring (3- or 4-membered) or a bridged cage atom, any H count.
    CRingStrained,
    /// Non-aromatic C=C carbon with 2 H.
    AlkeneCh2,
    /// Non-aromatic C=C carbon with 1 H.
    AlkeneCh,
    /// Non-aromatic C=C carbon without H.
    AlkeneC,
    /// Triple-bonded carbon (not nitrile).
    AlkyneC,
    /// Aromatic carbon with H.
    AromaticCh,
    /// Aromatic carbon bearing a substituent.
    AromaticCSubstituted,
    /// Aromatic carbon shared by fused rings (bonded to three aromatic atoms).
    AromaticCFused,
    /// Ketone carbonyl (C and O).
    Ketone,
    /// Aldehyde carbonyl (C, H and O).
    Aldehyde,
    /// Ester or lactone (C(=O)O: both oxygens included).
    Ester,
    /// Carboxylic acid (C(=O)OH).
    CarboxylicAcid,
    /// Amide (C(=O)N with the nitrogen).
    Amide,
    /// Aliphatic hydroxyl on a primary carbon (or methanol).
    AlcoholOh,
    /// Aliphatic hydroxyl on a secondary carbon (2-propanol-type: lower A and S, higher B than
    /// a primary alcohol; Abraham's tables, from memory).
    AlcoholOhSecondary,
    /// Aliphatic hydroxyl on a tertiary carbon (tert-butanol-type).
    AlcoholOhTertiary,
    /// Hydroxyl on an aromatic ring.
    PhenolOh,
    /// Ether oxygen between aliphatic carbons.
    EtherO,
    /// Ether oxygen on one aromatic and one aliphatic carbon (anisole-type).
    ArylEtherO,
    /// Ether oxygen between two aromatic carbons (diphenyl ether-type: the two rings twist out of
    /// conjugation, so less dipolarity and basicity than two anisole oxygens would give).
    DiarylEtherO,
    /// Aromatic oxygen (furan-type).
    AromaticO,
    /// Primary amine on aliphatic carbon.
    AmineNh2,
    /// Primary amine on an aromatic ring (aniline-type).
    AnilineNh2,
    /// Secondary amine on aliphatic carbons.
    AmineNh,
    /// Secondary amine on an aromatic ring (N-alkylaniline-type).
    ArylNh,
    /// Tertiary amine (aliphatic or aryl).
    AmineN,
    /// Pyridine-type aromatic nitrogen.
    PyridineN,
    /// Pyrrole-type aromatic nitrogen with H.
    PyrroleNh,
    /// Nitro group (N and both O).
    Nitro,
    /// Nitrile group (C and N).
    Nitrile,
    /// Fluorine.
    F,
    /// Chlorine on aliphatic carbon.
    Cl,
    /// Chlorine on an aromatic ring.
    ClAromatic,
    /// Bromine.
    Br,
    /// Iodine.
    I,
    /// Divalent sulfur (thiol, thioether).
    S,
    /// Aromatic sulfur (thiophene-type).
    AromaticS,
    /// Phosphorus (phosphate, thiophosphate esters; with its double-bonded O or S).
    P,
    /// Silicon.
    Si,
    /// Phenolic OH with a strong acceptor (nitro, carbonyl, ester, acid) on the neighbouring
    /// ring atom: a six-membered intramolecular hydrogen bond that removes almost all of its
    /// acidity (2-nitrophenol A 0.05 against phenol 0.60; counted in addition to
    /// [`Fragment::PhenolOh`]).
    OrthoHBond,
    /// Phenolic OH with a weak acceptor (halogen, ether oxygen) on the neighbouring ring atom: a
    /// five-membered intramolecular hydrogen bond that removes about half of its acidity and
    /// makes it more volatile (2-chlorophenol A 0.32 against 4-chlorophenol 0.67, guaiacol A
    /// 0.22; from memory of Abraham's tables).
    OrthoHBondWeak,
    /// Two non-polar substituents on neighbouring aromatic ring atoms, at least one of them a
    /// carbon (ortho pair; o-xylene against m- and p-xylene: E +0.04, S +0.04, L +0.10, from
    /// memory of Abraham's tables), counted once per pair.
    OrthoPair,
    /// Two halogens on neighbouring aromatic ring atoms (1,2-dichlorobenzene E 0.872 S 0.78
    /// L 4.518 against 1,3-dichlorobenzene E 0.847 S 0.73 L 4.410, from memory), counted once
    /// per pair, and not when a halogen para to either member cancels the pair's dipole.
    OrthoPairHalogen,
    /// Two substituents on neighbouring aromatic ring atoms of which at least one is a planar
    /// polar group conjugated with the ring (nitro, carbonyl, ester, acid, amide, nitrile):
    /// steric crowding twists it out of the ring plane and lowers L (2-nitrotoluene L 4.88
    /// against 4-nitrotoluene 5.15, from memory), counted once per pair.
    OrthoPairPolar,
    /// Two substituents on neighbouring aromatic ring atoms of which at least one is attached
    /// through a heteroatom (OH, NH2, OMe, SR, phosphate) and none is a planar polar group:
    /// the crowded OH or NH is a weaker hydrogen-bond donor (o-cresol A 0.52 L 4.218 against
    /// p-cresol A 0.57 L 4.312, from memory), counted once per pair.
    OrthoPairHetero,
    /// A substituent on an aromatic carbon next to a pyridine-type nitrogen: it shields the
    /// nitrogen's lone pair (2-methylpyridine S 0.75 L 3.422 against 3-methylpyridine S 0.81
    /// L 3.631, from memory), counted once per substituted neighbour.
    PyridineAlphaSubstituent,
    /// An electron-withdrawing substituent (halogen, nitro, nitrile, carbonyl, ester, acid) on
    /// a ring bearing a phenolic OH or an aromatic NH: raises the hydrogen-bond acidity of the
    /// OH or NH (4-chlorophenol A 0.67 against phenol 0.60, 4-nitrophenol 0.82; 4-chloroaniline
    /// A 0.30 against aniline 0.26; from memory), counted once per substituent and acidic group.
    RingEwgOnAcidicH,
    /// Hydrogen-bond-acidic C-H of a carbon carrying two or more Cl or Br (dichloromethane,
    /// chloroform: A 0.10-0.15; counted in addition to the carbon's own fragment).
    AcidicCh,
    /// A carbon in a non-aromatic ring (any fragment of its own, including ring alkene,
    /// carbonyl and bridged carbons), counted in addition to its own fragment: ring closure
    /// makes a hydrocarbon more polarisable than its open chain (cyclohexane E 0.305 S 0.10
    /// L 2.964 and cyclopentane E 0.263 S 0.10 L 2.477 against E = S = 0 and L = 0.505 per CH2
    /// of the n-alkanes, from memory of Abraham's tables), which a polar phase sees.
    AlicyclicRingCarbon,
    /// Atom folded into another atom's group fragment.
    InGroup,
}

/// Every fragment in table order (the order of `data/gc_solute_fragments.tsv`).
pub const ALL_FRAGMENTS: [Fragment; 54] = [
    Fragment::Ch3,
    Fragment::Ch2,
    Fragment::Ch,
    Fragment::C,
    Fragment::CRingStrained,
    Fragment::AlkeneCh2,
    Fragment::AlkeneCh,
    Fragment::AlkeneC,
    Fragment::AlkyneC,
    Fragment::AromaticCh,
    Fragment::AromaticCSubstituted,
    Fragment::AromaticCFused,
    Fragment::Ketone,
    Fragment::Aldehyde,
    Fragment::Ester,
    Fragment::CarboxylicAcid,
    Fragment::Amide,
    Fragment::AlcoholOh,
    Fragment::AlcoholOhSecondary,
    Fragment::AlcoholOhTertiary,
    Fragment::PhenolOh,
    Fragment::EtherO,
    Fragment::ArylEtherO,
    Fragment::DiarylEtherO,
    Fragment::AromaticO,
    Fragment::AmineNh2,
    Fragment::AnilineNh2,
    Fragment::AmineNh,
    Fragment::ArylNh,
    Fragment::AmineN,
    Fragment::PyridineN,
    Fragment::PyrroleNh,
    Fragment::Nitro,
    Fragment::Nitrile,
    Fragment::F,
    Fragment::Cl,
    Fragment::ClAromatic,
    Fragment::Br,
    Fragment::I,
    Fragment::S,
    Fragment::AromaticS,
    Fragment::P,
    Fragment::Si,
    Fragment::OrthoHBond,
    Fragment::OrthoHBondWeak,
    Fragment::OrthoPair,
    Fragment::OrthoPairHalogen,
    Fragment::OrthoPairPolar,
    Fragment::OrthoPairHetero,
    Fragment::PyridineAlphaSubstituent,
    Fragment::RingEwgOnAcidicH,
    Fragment::AcidicCh,
    Fragment::AlicyclicRingCarbon,
    Fragment::InGroup,
];

impl Fragment {
    /// The fragment's key in `data/gc_solute_fragments.tsv`.
    pub fn id(self) -> &'static str {
        match self {
            Fragment::Ch3 => "CH3",
            Fragment::Ch2 => "CH2",
            Fragment::Ch => "CH",
            Fragment::C => "C",
            Fragment::CRingStrained => "C-strained-or-bridged",
            Fragment::AlkeneCh2 => "=CH2",
            Fragment::AlkeneCh => "=CH-",
            Fragment::AlkeneC => "=C<",
            Fragment::AlkyneC => "#C",
            Fragment::AromaticCh => "aCH",
            Fragment::AromaticCSubstituted => "aC-substituted",
            Fragment::AromaticCFused => "aC-fused",
            Fragment::Ketone => "ketone C=O",
            Fragment::Aldehyde => "aldehyde CH=O",
            Fragment::Ester => "ester C(=O)O",
            Fragment::CarboxylicAcid => "acid C(=O)OH",
            Fragment::Amide => "amide C(=O)N",
            Fragment::AlcoholOh => "alcohol OH",
            Fragment::AlcoholOhSecondary => "secondary alcohol OH",
            Fragment::AlcoholOhTertiary => "tertiary alcohol OH",
            Fragment::PhenolOh => "phenol OH",
            Fragment::EtherO => "ether O",
            Fragment::ArylEtherO => "aryl ether O",
            Fragment::DiarylEtherO => "diaryl ether O",
            Fragment::AromaticO => "aromatic o",
            Fragment::AmineNh2 => "amine NH2",
            Fragment::AnilineNh2 => "aryl NH2",
            Fragment::AmineNh => "amine NH",
            Fragment::ArylNh => "aryl NH",
            Fragment::AmineN => "amine N",
            Fragment::PyridineN => "pyridine n",
            Fragment::PyrroleNh => "pyrrole nH",
            Fragment::Nitro => "nitro NO2",
            Fragment::Nitrile => "nitrile C#N",
            Fragment::F => "F",
            Fragment::Cl => "Cl",
            Fragment::ClAromatic => "aCl",
            Fragment::Br => "Br",
            Fragment::I => "I",
            Fragment::S => "S",
            Fragment::AromaticS => "aromatic s",
            Fragment::P => "P",
            Fragment::Si => "Si",
            Fragment::OrthoHBond => "ortho OH...acceptor",
            Fragment::OrthoHBondWeak => "ortho OH...halogen or ether",
            Fragment::OrthoPair => "ortho pair",
            Fragment::OrthoPairHalogen => "ortho pair, halogens",
            Fragment::OrthoPairPolar => "ortho pair, polar",
            Fragment::OrthoPairHetero => "ortho pair, heteroatom",
            Fragment::PyridineAlphaSubstituent => "substituent next to pyridine n",
            Fragment::RingEwgOnAcidicH => "withdrawing group on OH/NH ring",
            Fragment::AcidicCh => "acidic CHX2",
            Fragment::AlicyclicRingCarbon => "alicyclic ring carbon",
            Fragment::InGroup => "in-group",
        }
    }

    /// True for a non-additive correction (counted in addition to the atoms' own fragments);
    /// false for an atom-centred fragment.
    pub fn is_correction(self) -> bool {
        matches!(
            self,
            Fragment::OrthoHBond
                | Fragment::OrthoHBondWeak
                | Fragment::OrthoPair
                | Fragment::OrthoPairHalogen
                | Fragment::OrthoPairPolar
                | Fragment::OrthoPairHetero
                | Fragment::PyridineAlphaSubstituent
                | Fragment::RingEwgOnAcidicH
                | Fragment::AcidicCh
                | Fragment::AlicyclicRingCarbon
        )
    }

    /// True when a zero in this fragment's prior is a physical zero (the property is absent),
    /// not a lack of prior knowledge: every atom-centred fragment, the alicyclic ring carbon
    /// (no hydrogen-bond acidity or basicity from ring closure) and the two non-polar ortho
    /// pairs (two carbons or halogens side by side have no hydrogen-bond donor or acceptor to
    /// change).
    pub fn zero_is_physical(self) -> bool {
        !self.is_correction()
            || matches!(
                self,
                Fragment::AlicyclicRingCarbon | Fragment::OrthoPair | Fragment::OrthoPairHalogen
            )
    }

    /// Fragment with this id.
    pub fn from_id(id: &str) -> Option<Fragment> {
        ALL_FRAGMENTS.iter().copied().find(|f| f.id() == id)
    }
}

/// Abraham solute descriptors.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize, serde::Deserialize)]
pub struct SoluteDescriptors {
    /// Excess molar refraction E, (cm3/mol)/10.
    pub e: f64,
    /// Dipolarity/polarisability S.
    pub s: f64,
    /// Overall hydrogen-bond acidity A.
    pub a: f64,
    /// Overall hydrogen-bond basicity B.
    pub b: f64,
    /// log10 of the gas-hexadecane partition coefficient at 25 C, L.
    pub l: f64,
    /// McGowan characteristic volume V, (cm3/mol)/100.
    pub v: f64,
}

/// Why a structure gets no descriptors.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum FragmentError {
    /// An atom the scheme has no fragment for.
    #[error(
        "atom {index} ({element}) has no fragment in the solute-descriptor scheme (charged or unusual atom)"
    )]
    UntypedAtom {
        /// Atom index in the graph.
        index: usize,
        /// Element symbol or atomic number.
        element: String,
    },
    /// No heavy atoms.
    #[error("the structure has no heavy atoms")]
    Empty,
}

fn symbol(z: u8) -> String {
    super::elements::element(z).map_or_else(|| format!("Z={z}"), |e| e.symbol.to_string())
}

/// Fragment counts of a structure, in [`ALL_FRAGMENTS`] order.
///
/// # Errors
/// [`FragmentError`] when an atom cannot be typed.
pub fn fragment_counts(g: &MolGraph) -> Result<Vec<(Fragment, u32)>, FragmentError> {
    let types = type_atoms(g)?;
    let mut counts: Vec<(Fragment, u32)> = ALL_FRAGMENTS.iter().map(|&f| (f, 0)).collect();
    for t in types {
        if let Some(slot) = counts.iter_mut().find(|(f, _)| *f == t) {
            slot.1 += 1;
        }
    }
    counts.retain(|(_, n)| *n > 0);
    Ok(counts)
}

fn order(g: &MolGraph, bond: usize) -> BondOrder {
    g.bonds[bond].order
}

/// Atoms in a 3- or 4-membered ring, or shared by two rings of a bridged (non-fused) system.
fn strained_or_bridged(g: &MolGraph, atom: usize) -> bool {
    let rings: Vec<&Vec<usize>> = g.rings.iter().filter(|r| r.contains(&atom)).collect();
    if rings.iter().any(|r| r.len() <= 4) {
        return true;
    }
    // bridged: two rings through this atom sharing more than two atoms (norbornane-type)
    for (i, r1) in rings.iter().enumerate() {
        for r2 in rings.iter().skip(i + 1) {
            if r1.iter().filter(|a| r2.contains(a)).count() > 2 {
                return true;
            }
        }
    }
    false
}

fn type_atoms(g: &MolGraph) -> Result<Vec<Fragment>, FragmentError> {
    let n = g.atoms.len();
    if n == 0 {
        return Err(FragmentError::Empty);
    }
    let z = |i: usize| g.atoms[i].atomic_number;
    let mut types: Vec<Option<Fragment>> = vec![None; n];
    let double_o = |c: usize| -> Option<usize> {
        g.neighbours[c]
            .iter()
            .find(|&&(m, b)| z(m) == 8 && order(g, b) == BondOrder::Double)
            .map(|&(m, _)| m)
    };
    // 1. groups first: nitro, nitrile, carbonyl groups, phosphorus groups
    for i in 0..n {
        let a = &g.atoms[i];
        match a.atomic_number {
            7 => {
                let oxygens: Vec<usize> = g.neighbours[i]
                    .iter()
                    .filter(|&&(m, _)| z(m) == 8 && g.degree(m) == 1)
                    .map(|&(m, _)| m)
                    .collect();
                if oxygens.len() == 2 {
                    types[i] = Some(Fragment::Nitro);
                    for o in oxygens {
                        types[o] = Some(Fragment::InGroup);
                    }
                    continue;
                }
                if let Some(&(c, _)) = g.neighbours[i]
                    .iter()
                    .find(|&&(m, b)| z(m) == 6 && order(g, b) == BondOrder::Triple)
                {
                    types[i] = Some(Fragment::Nitrile);
                    types[c] = Some(Fragment::InGroup);
                }
            }
            15 => {
                types[i] = Some(Fragment::P);
                for &(m, b) in &g.neighbours[i] {
                    if order(g, b) == BondOrder::Double && matches!(z(m), 8 | 16) {
                        types[m] = Some(Fragment::InGroup);
                    }
                }
            }
            6 if !a.aromatic => {
                let Some(o) = double_o(i) else { continue };
                let others: Vec<(usize, usize)> = g.neighbours[i]
                    .iter()
                    .copied()
                    .filter(|&(m, _)| m != o)
                    .collect();
                let hetero_o = others
                    .iter()
                    .find(|&&(m, b)| z(m) == 8 && order(g, b) == BondOrder::Single)
                    .map(|&(m, _)| m);
                let hetero_n = others
                    .iter()
                    .find(|&&(m, b)| z(m) == 7 && order(g, b) == BondOrder::Single)
                    .map(|&(m, _)| m);
                types[o] = Some(Fragment::InGroup);
                if let Some(os) = hetero_o {
                    if g.atoms[os].hydrogens >= 1 {
                        types[i] = Some(Fragment::CarboxylicAcid);
                    } else {
                        types[i] = Some(Fragment::Ester);
                    }
                    types[os] = Some(Fragment::InGroup);
                } else if let Some(ns) = hetero_n {
                    types[i] = Some(Fragment::Amide);
                    if types[ns].is_none() {
                        types[ns] = Some(Fragment::InGroup);
                    }
                } else if a.hydrogens >= 1 {
                    types[i] = Some(Fragment::Aldehyde);
                } else {
                    types[i] = Some(Fragment::Ketone);
                }
            }
            _ => {}
        }
    }
    // 2. every other atom
    #[allow(clippy::needless_range_loop)] // i indexes the graph's atoms and neighbours too
    for i in 0..n {
        if types[i].is_some() {
            continue;
        }
        let a = &g.atoms[i];
        let nb = &g.neighbours[i];
        let aromatic_neighbours = nb.iter().filter(|&&(m, _)| g.atoms[m].aromatic).count();
        let t = match a.atomic_number {
            6 if a.formal_charge == 0 => {
                if a.aromatic {
                    if a.hydrogens > 0 {
                        Fragment::AromaticCh
                    } else if aromatic_neighbours >= 3 {
                        Fragment::AromaticCFused
                    } else {
                        Fragment::AromaticCSubstituted
                    }
                } else if nb.iter().any(|&(_, b)| order(g, b) == BondOrder::Triple) {
                    Fragment::AlkyneC
                } else if nb.iter().any(|&(_, b)| order(g, b) == BondOrder::Double) {
                    match a.hydrogens {
                        0 => Fragment::AlkeneC,
                        1 => Fragment::AlkeneCh,
                        _ => Fragment::AlkeneCh2,
                    }
                } else if a.in_ring && strained_or_bridged(g, i) {
                    Fragment::CRingStrained
                } else {
                    match a.hydrogens {
                        0 => Fragment::C,
                        1 => Fragment::Ch,
                        2 => Fragment::Ch2,
                        _ => Fragment::Ch3,
                    }
                }
            }
            8 if a.formal_charge == 0 => {
                if a.aromatic {
                    Fragment::AromaticO
                } else if a.hydrogens >= 1 {
                    if aromatic_neighbours > 0 {
                        Fragment::PhenolOh
                    } else {
                        // carbinol carbon: how many heavy atoms besides this O it carries
                        let carbon_substituents = nb
                            .first()
                            .map_or(0, |&(c, _)| g.degree(c).saturating_sub(1));
                        match carbon_substituents {
                            0 | 1 => Fragment::AlcoholOh,
                            2 => Fragment::AlcoholOhSecondary,
                            _ => Fragment::AlcoholOhTertiary,
                        }
                    }
                } else if aromatic_neighbours >= 2 {
                    Fragment::DiarylEtherO
                } else if aromatic_neighbours > 0 {
                    Fragment::ArylEtherO
                } else {
                    Fragment::EtherO
                }
            }
            7 if a.formal_charge == 0 => {
                if a.aromatic {
                    if a.hydrogens > 0 {
                        Fragment::PyrroleNh
                    } else {
                        Fragment::PyridineN
                    }
                } else {
                    match a.hydrogens {
                        2.. if aromatic_neighbours > 0 => Fragment::AnilineNh2,
                        2.. => Fragment::AmineNh2,
                        1 if aromatic_neighbours > 0 => Fragment::ArylNh,
                        1 => Fragment::AmineNh,
                        _ => Fragment::AmineN,
                    }
                }
            }
            9 => Fragment::F,
            17 if aromatic_neighbours > 0 => Fragment::ClAromatic,
            17 => Fragment::Cl,
            35 => Fragment::Br,
            53 => Fragment::I,
            16 if a.formal_charge == 0 => {
                if a.aromatic {
                    Fragment::AromaticS
                } else {
                    Fragment::S
                }
            }
            14 => Fragment::Si,
            _ => {
                return Err(FragmentError::UntypedAtom {
                    index: i,
                    element: symbol(a.atomic_number),
                });
            }
        };
        types[i] = Some(t);
    }
    let mut out: Vec<Fragment> = Vec::with_capacity(n + 1);
    for (i, t) in types.iter().enumerate() {
        let t = t.ok_or_else(|| FragmentError::UntypedAtom {
            index: i,
            element: symbol(z(i)),
        })?;
        out.push(t);
    }
    push_ring_corrections(g, &mut out);
    // carbons of non-aromatic rings
    let alicyclic = g
        .atoms
        .iter()
        .filter(|a| a.atomic_number == 6 && a.in_ring && !a.aromatic)
        .count();
    out.extend(std::iter::repeat_n(
        Fragment::AlicyclicRingCarbon,
        alicyclic,
    ));
    // acidic C-H next to two or more heavy halogens
    for i in 0..n {
        let a = &g.atoms[i];
        if a.atomic_number == 6 && !a.aromatic && a.hydrogens > 0 {
            let halogens = g.neighbours[i]
                .iter()
                .filter(|&&(m, _)| matches!(z(m), 17 | 35))
                .count();
            if halogens >= 2 {
                out.push(Fragment::AcidicCh);
            }
        }
    }
    Ok(out)
}

/// Substituent atoms of aromatic ring atom `r`: neighbours outside the aromatic ring system
/// (non-aromatic, or aromatic but not in a ring).
fn ring_substituents(g: &MolGraph, r: usize) -> impl Iterator<Item = usize> + '_ {
    g.neighbours[r]
        .iter()
        .map(|&(m, _)| m)
        .filter(move |&m| !g.atoms[m].aromatic || !g.atoms[m].in_ring)
}

/// A substituent that accepts a strong (six-membered) intramolecular hydrogen bond from a
/// neighbouring phenolic OH.
fn strong_ortho_acceptor(t: Fragment) -> bool {
    matches!(
        t,
        Fragment::Nitro
            | Fragment::Ketone
            | Fragment::Aldehyde
            | Fragment::Ester
            | Fragment::CarboxylicAcid
    )
}

/// A substituent that accepts a weak (five-membered) intramolecular hydrogen bond.
fn weak_ortho_acceptor(t: Fragment) -> bool {
    matches!(
        t,
        Fragment::ClAromatic
            | Fragment::Br
            | Fragment::I
            | Fragment::F
            | Fragment::ArylEtherO
            | Fragment::DiarylEtherO
    )
}

/// An electron-withdrawing ring substituent (raises the acidity of a ring OH or NH).
fn withdrawing(g: &MolGraph, x: usize, t: Fragment) -> bool {
    matches!(
        t,
        Fragment::ClAromatic
            | Fragment::Br
            | Fragment::I
            | Fragment::F
            | Fragment::Nitro
            | Fragment::Ketone
            | Fragment::Aldehyde
            | Fragment::Ester
            | Fragment::CarboxylicAcid
    ) || (t == Fragment::InGroup && g.atoms[x].atomic_number == 6)
}

/// A planar polar ortho substituent conjugated with the ring (the carbon or nitrogen of a
/// nitro, carbonyl, ester, acid, amide or nitrile group).
fn planar_polar_substituent(t: Fragment) -> bool {
    matches!(
        t,
        Fragment::Nitro
            | Fragment::Ketone
            | Fragment::Aldehyde
            | Fragment::Ester
            | Fragment::CarboxylicAcid
            | Fragment::Amide
            | Fragment::InGroup
    )
}

fn is_halogen(g: &MolGraph, x: usize) -> bool {
    matches!(g.atoms[x].atomic_number, 9 | 17 | 35 | 53)
}

/// True when the atom para to `a` in the six-membered ring through `a` and `b` carries a
/// halogen.
fn para_halogen(g: &MolGraph, a: usize, b: usize) -> bool {
    g.rings
        .iter()
        .filter(|r| r.len() == 6 && r.contains(&a) && r.contains(&b))
        .any(|r| {
            let Some(ia) = r.iter().position(|&x| x == a) else {
                return false;
            };
            ring_substituents(g, r[(ia + 3) % 6]).any(|x| is_halogen(g, x))
        })
}

/// Non-additive corrections of aromatic rings: intramolecular hydrogen bonds of phenols, ortho
/// pairs, and withdrawing groups on rings carrying an acidic OH or NH.
fn push_ring_corrections(g: &MolGraph, out: &mut Vec<Fragment>) {
    let n = g.atoms.len();
    // intramolecular hydrogen bond of a phenolic OH with an acceptor on the neighbouring ring atom
    for i in 0..n {
        if out[i] != Fragment::PhenolOh {
            continue;
        }
        let Some(&(ring_c, _)) = g.neighbours[i].first() else {
            continue;
        };
        let ortho_types: Vec<Fragment> = g.neighbours[ring_c]
            .iter()
            .filter(|&&(m, _)| m != i && g.atoms[m].aromatic)
            .flat_map(|&(m, _)| ring_substituents(g, m).map(|x| out[x]))
            .collect();
        if ortho_types.iter().any(|&t| strong_ortho_acceptor(t)) {
            out.push(Fragment::OrthoHBond);
        } else if ortho_types.iter().any(|&t| weak_ortho_acceptor(t)) {
            out.push(Fragment::OrthoHBondWeak);
        }
    }
    // substituents on neighbouring aromatic atoms (not across a ring fusion)
    for bond in &g.bonds {
        if bond.order != BondOrder::Aromatic
            || g.atoms[bond.a].hydrogens > 0
            || g.atoms[bond.b].hydrogens > 0
        {
            continue;
        }
        let subs_a: Vec<usize> = ring_substituents(g, bond.a).collect();
        let subs_b: Vec<usize> = ring_substituents(g, bond.b).collect();
        if subs_a.is_empty() || subs_b.is_empty() {
            continue;
        }
        let both = || subs_a.iter().chain(&subs_b);
        out.push(if both().any(|&x| planar_polar_substituent(out[x])) {
            Fragment::OrthoPairPolar
        } else if both().any(|&x| matches!(g.atoms[x].atomic_number, 7 | 8 | 15 | 16)) {
            Fragment::OrthoPairHetero
        } else if both().all(|&x| is_halogen(g, x)) {
            // the pair's dipole is what retains it: a halogen para to either member cancels it
            // (1,2-dichlorobenzene 2.5 D; 1,2,4-trichloro- and hexachlorobenzene much less)
            if para_halogen(g, bond.a, bond.b) || para_halogen(g, bond.b, bond.a) {
                continue;
            }
            Fragment::OrthoPairHalogen
        } else {
            Fragment::OrthoPair
        });
    }
    // substituted aromatic carbons next to a pyridine-type nitrogen
    for i in 0..n {
        if out[i] != Fragment::PyridineN {
            continue;
        }
        let substituted = g.neighbours[i]
            .iter()
            .filter(|&&(c, _)| {
                g.atoms[c].aromatic
                    && g.atoms[c].hydrogens == 0
                    && ring_substituents(g, c).next().is_some()
            })
            .count();
        out.extend(std::iter::repeat_n(
            Fragment::PyridineAlphaSubstituent,
            substituted,
        ));
    }
    // withdrawing substituents on a ring that carries a phenolic OH or aromatic NH
    for i in 0..n {
        if !matches!(
            out[i],
            Fragment::PhenolOh | Fragment::AnilineNh2 | Fragment::ArylNh
        ) {
            continue;
        }
        let Some(&(ring_c, _)) = g.neighbours[i].iter().find(|&&(m, _)| g.atoms[m].aromatic) else {
            continue;
        };
        let Some(ring) = g.rings.iter().find(|r| r.contains(&ring_c)) else {
            continue;
        };
        let count = ring
            .iter()
            .filter(|&&q| q != ring_c)
            .flat_map(|&q| ring_substituents(g, q))
            .filter(|&x| withdrawing(g, x, out[x]))
            .count();
        out.extend(std::iter::repeat_n(Fragment::RingEwgOnAcidicH, count));
    }
}

/// True for an unbranched acyclic alkane (CnH2n+2, n >= 1): its descriptors are exact by the
/// ladder definition.
pub fn is_n_alkane(g: &MolGraph) -> bool {
    !g.atoms.is_empty()
        && g.rings.is_empty()
        && g.atoms.iter().enumerate().all(|(i, a)| {
            a.atomic_number == 6
                && !a.aromatic
                && a.formal_charge == 0
                && g.degree(i) <= 2
                && usize::from(a.hydrogens) + g.degree(i) == 4
        })
}

/// Values of one fragment: contributions to E, S, A, B and L.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct FragmentValues {
    /// Contribution to E.
    pub e: f64,
    /// Contribution to S.
    pub s: f64,
    /// Contribution to A.
    pub a: f64,
    /// Contribution to B.
    pub b: f64,
    /// Contribution to L.
    pub l: f64,
}

/// Sums fragment values over the counts and adds the McGowan volume of `g`.
pub fn descriptors_from_counts(
    g: &MolGraph,
    counts: &[(Fragment, u32)],
    table: &dyn Fn(Fragment) -> FragmentValues,
) -> SoluteDescriptors {
    let mut d = SoluteDescriptors {
        v: mcgowan::mcgowan_volume_cm3_mol(g).map_or(0.0, |v| v / 100.0),
        ..SoluteDescriptors::default()
    };
    for &(f, n) in counts {
        let v = table(f);
        let n = f64::from(n);
        d.e += n * v.e;
        d.s += n * v.s;
        d.a += n * v.a;
        d.b += n * v.b;
        d.l += n * v.l;
    }
    // descriptors A and B are not negative (Abraham's definitions)
    d.a = d.a.max(0.0);
    d.b = d.b.max(0.0);
    d.s = d.s.max(0.0);
    d
}

#[cfg(test)]
mod tests;
