//! The SMILES adapter: the only file that sees `smiles-rs` types.
//!
//! It turns a SMILES string into the project's own [`MolGraph`] the way RDKit's
//! `Chem.MolFromSmiles` with default sanitization does (the reference the
//! descriptors are checked against, RDKit 2026.09.1):
//!
//! - implicit hydrogens on unbracketed organic-subset atoms complete the
//!   smallest allowed RDKit valence (B 3; C 4; N 3; O 2; P 3/5/7; S 2/4/6;
//!   F, Cl, Br 1; I 1/3/5), bracket atoms carry exactly the H count written;
//! - explicit `[H]` atoms with one heavy neighbour are folded into that
//!   neighbour's hydrogen count (RDKit's `RemoveHs` default);
//! - aromaticity follows RDKit's default model, computed by `smiles-rs`
//!   (`AromaticityPolicy::RdkitDefault`), which the crate documents as a
//!   reproduction of RDKit and which the reference test checks;
//! - rings are RDKit's symmetrized SSSR, also from `smiles-rs`;
//! - atoms whose valence exceeds every allowed valence are rejected as RDKit
//!   rejects them, and radicals (an unbracketed-style valence deficit on a
//!   bracket atom, e.g. `[CH3]`) are rejected by [`parse_smiles`] because the
//!   project's models are for closed-shell analytes; [`parse_smiles_with`]
//!   can keep them;
//! - a multi-fragment input (salt, solvate) keeps its largest organic fragment
//!   and says so in [`Parsed::note`].

use std::collections::VecDeque;

use smiles_rs::Smiles;
use smiles_rs::atom::AtomSyntax;
use smiles_rs::bond::Bond as RawBond;

use super::graph::{Atom, Bond, BondOrder, MolGraph};

mod stereo;

/// Largest number of heavy atoms accepted in one SMILES (all fragments together).
///
/// The descriptors are linear or near-linear in size, but ring perception and
/// substructure typing are not; 1,000 heavy atoms is far beyond any analyte the
/// chromatography models are meant for (peptides of ~80 residues still fit), so
/// the limit only stops pathological input. Common practice, no source.
pub const MAX_HEAVY_ATOMS: usize = 1_000;

/// Longest SMILES string accepted, in bytes (checked before parsing).
pub const MAX_SMILES_BYTES: usize = 20_000;

/// What went wrong with a structure. Each variant names the offending SMILES
/// and, where one atom is at fault, its character position (0-based, in
/// Unicode characters).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum StructureError {
    /// The SMILES string was empty or only whitespace.
    #[error("empty SMILES: give a structure such as `CCO` (ethanol)")]
    Empty,
    /// The SMILES string is not valid SMILES syntax.
    #[error(
        "SMILES `{smiles}` is malformed at character {position}: {reason}; check brackets, ring-closure digits and bond symbols"
    )]
    Syntax {
        /// The input.
        smiles: String,
        /// Character position of the problem (0-based).
        position: usize,
        /// What the parser found.
        reason: String,
    },
    /// An atom that is not a concrete chemical element (wildcard `*`, unknown symbol).
    #[error(
        "SMILES `{smiles}`: atom `{element}` at character {position} is not a supported element; write a real element (wildcards and R-groups cannot be described)"
    )]
    UnsupportedElement {
        /// The input.
        smiles: String,
        /// Character position of the atom (0-based).
        position: usize,
        /// The symbol as written.
        element: String,
    },
    /// An atom with unpaired electrons (radical), e.g. `[CH3]`.
    #[error(
        "SMILES `{smiles}`: atom `{atom}` at character {position} has {electrons} unpaired electron(s); write all its hydrogens inside the brackets (e.g. `[CH4]`, `[NH4+]`) if a closed-shell molecule was meant"
    )]
    Radical {
        /// The input.
        smiles: String,
        /// Character position of the atom (0-based).
        position: usize,
        /// Element symbol of the atom.
        atom: String,
        /// Number of radical electrons.
        electrons: u8,
    },
    /// An atom has more bonds than any allowed valence of its element (RDKit rejects these too).
    #[error(
        "SMILES `{smiles}`: atom `{atom}` at character {position} has valence {valence}, more than its element allows; check bond orders, charges and hydrogen counts (e.g. nitro is `[N+](=O)[O-]`)"
    )]
    Valence {
        /// The input.
        smiles: String,
        /// Character position of the atom (0-based).
        position: usize,
        /// Element symbol of the atom.
        atom: String,
        /// The valence found.
        valence: u16,
    },
    /// Aromatic atoms written in lowercase for which no Kekulé structure exists.
    #[error(
        "SMILES `{smiles}`: the aromatic system cannot be kekulized ({reason}); pyrrole-type nitrogens need an explicit hydrogen, e.g. `c1cc[nH]c1`"
    )]
    Kekulization {
        /// The input.
        smiles: String,
        /// Why.
        reason: String,
    },
    /// An atom written aromatic (lower case) that is in no ring (RDKit rejects these too).
    #[error(
        "SMILES `{smiles}`: atom `{atom}` at character {position} is written aromatic (lower case) but is not in a ring; write it in upper case"
    )]
    AromaticOutsideRing {
        /// The input.
        smiles: String,
        /// Character position of the atom (0-based).
        position: usize,
        /// Element symbol of the atom.
        atom: String,
    },
    /// More heavy atoms (or a longer string) than the documented limit.
    #[error(
        "SMILES starting `{smiles_start}` is too large: {size} {unit} (limit {limit}); split it or describe a smaller structure"
    )]
    TooLarge {
        /// The first 40 characters of the input.
        smiles_start: String,
        /// Size found.
        size: usize,
        /// The limit ([`MAX_HEAVY_ATOMS`] or [`MAX_SMILES_BYTES`]).
        limit: usize,
        /// "heavy atoms" or "bytes".
        unit: &'static str,
    },
    /// A mass was needed for an element the project's table does not cover.
    #[error(
        "no atomic mass for element number {atomic_number} in the project's table (structure::elements); the structure cannot be weighed"
    )]
    UnknownMass {
        /// Atomic number without a mass.
        atomic_number: u8,
    },
}

/// Options for [`parse_smiles_with`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct ParseOptions {
    /// Keep radicals (recorded in [`Atom::radical_electrons`]) instead of failing.
    pub allow_radicals: bool,
    /// Leave [`MolGraph::stereo`] empty: only the canonical keys read the stereo marks, and
    /// working out a marked double bond is the slowest step of a parse (`describe`).
    pub skip_stereo: bool,
}

/// The result of parsing: the selected fragment as a graph, plus what was dropped.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Parsed {
    /// The kept fragment (the whole molecule when there was only one).
    pub graph: MolGraph,
    /// SMILES text of every dropped fragment (counter-ions, solvent), in input order.
    pub fragments_dropped: Vec<String>,
    /// Human-readable note when a fragment was dropped.
    pub note: Option<String>,
}

/// Parses a SMILES string as RDKit's default sanitization would, keeping the
/// largest organic fragment.
///
/// # Errors
/// A [`StructureError`] naming the SMILES and the character position for
/// malformed syntax, wildcard or unknown atoms, radicals, impossible valences,
/// non-kekulizable aromatic input, empty input or input above
/// [`MAX_HEAVY_ATOMS`].
///
/// # Examples
/// ```
/// use phasewise::structure::adapter::parse_smiles;
/// let parsed = parse_smiles("CC(=O)[O-].[Na+]").unwrap();
/// assert_eq!(parsed.graph.atoms.len(), 4);
/// assert_eq!(parsed.fragments_dropped, vec!["[Na+]".to_string()]);
/// ```
pub fn parse_smiles(smiles: &str) -> Result<Parsed, StructureError> {
    // the same string parsed twice in a row (a validity check, then its key) is parsed once
    if let Some(p) = LAST_PARSED.with(|last| {
        last.borrow()
            .as_ref()
            .filter(|(s, _)| s == smiles)
            .map(|(_, p)| p.clone())
    }) {
        return Ok(p);
    }
    let parsed = parse_smiles_with(smiles, &ParseOptions::default());
    if let Ok(p) = &parsed {
        remember_parsed(smiles);
        LAST_PARSED.with(|last| *last.borrow_mut() = Some((smiles.to_string(), p.clone())));
    }
    parsed
}

/// Most strings remembered by [`remember_parsed`]; the set is emptied when full.
const REMEMBERED: usize = 4096;

thread_local! {
    /// The string [`parse_smiles`] accepted last in this thread, with its result.
    static LAST_PARSED: std::cell::RefCell<Option<(String, Parsed)>> =
        const { std::cell::RefCell::new(None) };
    /// Strings that [`parse_smiles`] accepted with the default options in this thread.
    static PARSED_OK: std::cell::RefCell<std::collections::HashSet<String>> =
        std::cell::RefCell::new(std::collections::HashSet::new());
}

fn remember_parsed(smiles: &str) {
    PARSED_OK.with(|set| {
        let mut set = set.borrow_mut();
        if set.len() >= REMEMBERED {
            set.clear();
        }
        if !set.contains(smiles) {
            set.insert(smiles.to_string());
        }
    });
}

/// Whether [`parse_smiles`] accepted exactly this string in this thread (and it is still
/// remembered): parsing it again would succeed, as the parse is a pure function of the text.
pub(crate) fn recently_parsed(smiles: &str) -> bool {
    PARSED_OK.with(|set| set.borrow().contains(smiles))
}

/// As [`parse_smiles`], with options.
///
/// # Errors
/// As [`parse_smiles`]; radicals are accepted when `options.allow_radicals`.
pub fn parse_smiles_with(smiles: &str, options: &ParseOptions) -> Result<Parsed, StructureError> {
    let text = smiles.trim();
    if text.is_empty() {
        return Err(StructureError::Empty);
    }
    if text.len() > MAX_SMILES_BYTES {
        return Err(StructureError::TooLarge {
            smiles_start: text.chars().take(40).collect(),
            size: text.len(),
            limit: MAX_SMILES_BYTES,
            unit: "bytes",
        });
    }
    let positions = atom_positions(text);
    let raw: Smiles = text.parse().map_err(|e: smiles_rs::SmilesErrorWithSpan| {
        let position = char_index(text, e.start());
        match e.smiles_error() {
            smiles_rs::SmilesError::WildcardAtomNotAllowed => StructureError::UnsupportedElement {
                smiles: text.to_string(),
                position,
                element: "*".to_string(),
            },
            smiles_rs::SmilesError::InvalidElementName(c) => StructureError::UnsupportedElement {
                smiles: text.to_string(),
                position,
                element: c.to_string(),
            },
            other => StructureError::Syntax {
                smiles: text.to_string(),
                position,
                reason: other.to_string(),
            },
        }
    })?;
    let pos_of = |i: usize| positions.get(i).copied().unwrap_or(0);
    let n = raw.nodes().len();
    if n == 0 {
        return Err(StructureError::Empty);
    }

    // --- atoms as written ---------------------------------------------------
    let mut atoms: Vec<Atom> = Vec::with_capacity(n);
    let mut bracket: Vec<bool> = Vec::with_capacity(n);
    for (i, node) in raw.nodes().iter().enumerate() {
        let Some(element) = node.element() else {
            return Err(StructureError::UnsupportedElement {
                smiles: text.to_string(),
                position: pos_of(i),
                element: "*".to_string(),
            });
        };
        atoms.push(Atom {
            atomic_number: u8::from(element),
            aromatic: false,
            formal_charge: node.charge_value(),
            hydrogens: node.hydrogen_count(),
            isotope: node.isotope_mass_number(),
            radical_electrons: 0,
            in_ring: false,
        });
        bracket.push(matches!(node.syntax(), AtomSyntax::Bracket));
    }
    let heavy = atoms.iter().filter(|a| a.atomic_number != 1).count();
    if heavy > MAX_HEAVY_ATOMS {
        return Err(StructureError::TooLarge {
            smiles_start: text.chars().take(40).collect(),
            size: heavy,
            limit: MAX_HEAVY_ATOMS,
            unit: "heavy atoms",
        });
    }

    // --- bonds as written ---------------------------------------------------
    // (a, b, written order, written aromatic)
    let mut raw_bonds: Vec<(usize, usize, u8, bool)> = Vec::new();
    for i in 0..n {
        for edge in raw.edges_for_node(i) {
            let Some(j) = edge.other(i) else { continue };
            if j <= i {
                continue;
            }
            let order = match edge.bond() {
                RawBond::Single | RawBond::Up | RawBond::Down => 1,
                RawBond::Double => 2,
                RawBond::Triple => 3,
                RawBond::Quadruple => 4,
            };
            raw_bonds.push((i, j, order, edge.is_aromatic()));
        }
    }
    let any_aromatic_written =
        raw.nodes().iter().any(|a| a.aromatic()) || raw_bonds.iter().any(|b| b.3);

    // Kekulé form: the written one, or smiles-rs's kekulization of lowercase input.
    // `smiles-rs` 0.2.1 refuses to kekulize an aromatic system in which no
    // atom needs a double bond (e.g. `n1c(=O)n(C)c(=O)n(C)c1=O`, RDKit's own
    // output for trimethyl isocyanurate): "0 candidate atoms". Its Kekulé form
    // is then the written graph with every aromatic bond single, which is what
    // `written_orders` below means.
    // Ring bonds and atoms, and the rings of systems that are single cycles (structure::rings;
    // the topology is the same for the written and the Kekulé form).
    let edges: Vec<(usize, usize)> = raw_bonds.iter().map(|&(a, b, _, _)| (a, b)).collect();
    let perception = super::rings::perceive(n, &edges);
    if any_aromatic_written {
        // Checked before kekulization, which can take long on long chains of
        // lowercase atoms (a fuzzing find: 0.1 s for a 512-byte input).
        if let Some(i) = (0..n).find(|&i| raw.nodes()[i].aromatic() && !perception.atom_in_ring[i])
        {
            return Err(StructureError::AromaticOutsideRing {
                smiles: text.to_string(),
                position: pos_of(i),
                atom: symbol(atoms[i].atomic_number).to_string(),
            });
        }
    }
    let kekulized: Smiles;
    let mut written_orders = false;
    let kekule: &Smiles = if any_aromatic_written {
        match raw.kekulize() {
            Ok(k) => {
                kekulized = k;
                &kekulized
            }
            Err(smiles_rs::KekulizationError::NoPerfectMatching {
                candidate_atom_count: 0,
            }) => {
                written_orders = true;
                &raw
            }
            Err(e) => {
                return Err(StructureError::Kekulization {
                    smiles: text.to_string(),
                    reason: e.to_string(),
                });
            }
        }
    } else {
        &raw
    };
    let mut kekule_order: Vec<u8> = Vec::with_capacity(raw_bonds.len());
    for &(a, b, written, _) in &raw_bonds {
        if written_orders {
            kekule_order.push(written);
            continue;
        }
        let o = kekule
            .edge_for_node_pair((a, b))
            .map(|e| match e.bond() {
                RawBond::Single | RawBond::Up | RawBond::Down => 1,
                RawBond::Double => 2,
                RawBond::Triple => 3,
                RawBond::Quadruple => 4,
            })
            .unwrap_or(written);
        kekule_order.push(o);
    }

    clean_up_hypervalent(&mut atoms, &raw_bonds, &mut kekule_order);

    // --- implicit hydrogens and valence checks (on the Kekulé form) ---------
    let mut explicit_valence = vec![0u16; n];
    for (k, &(a, b, _, _)) in raw_bonds.iter().enumerate() {
        explicit_valence[a] += u16::from(kekule_order[k]);
        explicit_valence[b] += u16::from(kekule_order[k]);
    }
    for i in 0..n {
        let z = atoms[i].atomic_number;
        let charge = atoms[i].formal_charge;
        let ev = explicit_valence[i];
        if !bracket[i] && written_orders && raw.nodes()[i].aromatic() {
            // Lowercase atom of a system without double bonds: RDKit gives
            // `c` the hydrogens that complete valence 3 over its written
            // bonds, other lowercase atoms none.
            atoms[i].hydrogens = if z == 6 {
                u8::try_from(3u16.saturating_sub(ev)).unwrap_or(0)
            } else {
                0
            };
        } else if !bracket[i] && charge == 0 {
            match implicit_h_organic(z, ev) {
                Some(h) => atoms[i].hydrogens = h,
                None => {
                    return Err(StructureError::Valence {
                        smiles: text.to_string(),
                        position: pos_of(i),
                        atom: symbol(z).to_string(),
                        valence: ev,
                    });
                }
            }
        } else {
            // a bracket atom, or an unbracketed one charged by the clean-up above (its
            // hydrogens are those written: none)
            let total = ev + u16::from(atoms[i].hydrogens);
            if let Some(valences) = charged_valences(z, charge) {
                let max = valences.iter().copied().max().unwrap_or(0);
                if total > u16::from(max) {
                    return Err(StructureError::Valence {
                        smiles: text.to_string(),
                        position: pos_of(i),
                        atom: symbol(z).to_string(),
                        valence: total,
                    });
                }
                // RDKit assigns radicals to bracket atoms short of their
                // smallest allowed valence (GraphMol/MolOps.cpp assignRadicals).
                if let Some(&next) = valences.iter().find(|&&v| u16::from(v) >= total) {
                    let r = u16::from(next) - total;
                    atoms[i].radical_electrons = u8::try_from(r).unwrap_or(u8::MAX);
                }
            }
        }
    }

    // --- fold explicit [H] atoms into their neighbour (RDKit RemoveHs) ------
    let mut neighbours_raw: Vec<Vec<usize>> = vec![Vec::new(); n];
    for &(a, b, _, _) in &raw_bonds {
        neighbours_raw[a].push(b);
        neighbours_raw[b].push(a);
    }
    let mut removed = vec![false; n];
    for i in 0..n {
        let a = &atoms[i];
        if a.atomic_number == 1
            && a.isotope.is_none()
            && a.formal_charge == 0
            && a.hydrogens == 0
            && neighbours_raw[i].len() == 1
        {
            let j = neighbours_raw[i][0];
            if atoms[j].atomic_number != 1 {
                removed[i] = true;
                atoms[j].hydrogens = atoms[j].hydrogens.saturating_add(1);
            }
        }
    }

    // --- radical check --------------------------------------------------------
    if !options.allow_radicals
        && let Some(i) = (0..n).find(|&i| !removed[i] && atoms[i].radical_electrons > 0)
    {
        return Err(StructureError::Radical {
            smiles: text.to_string(),
            position: pos_of(i),
            atom: symbol(atoms[i].atomic_number).to_string(),
            electrons: atoms[i].radical_electrons,
        });
    }

    // --- fragments: keep the largest organic one -----------------------------
    let mut component = vec![usize::MAX; n];
    let mut components: Vec<Vec<usize>> = Vec::new();
    for start in 0..n {
        if removed[start] || component[start] != usize::MAX {
            continue;
        }
        let id = components.len();
        let mut members = Vec::new();
        let mut queue = VecDeque::from([start]);
        component[start] = id;
        while let Some(x) = queue.pop_front() {
            members.push(x);
            for &y in &neighbours_raw[x] {
                if !removed[y] && component[y] == usize::MAX {
                    component[y] = id;
                    queue.push_back(y);
                }
            }
        }
        members.sort_unstable();
        components.push(members);
    }
    // Rank: contains carbon, then heavy atoms, then all atoms; ties keep the first.
    let rank = |members: &Vec<usize>| {
        let has_c = members.iter().any(|&x| atoms[x].atomic_number == 6);
        let heavy = members
            .iter()
            .filter(|&&x| atoms[x].atomic_number != 1)
            .count();
        (has_c, heavy, members.len())
    };
    let mut keep = 0;
    for (c, members) in components.iter().enumerate() {
        if rank(members) > rank(&components[keep]) {
            keep = c;
        }
    }

    // --- aromaticity (RDKit default model, on the Kekulé form) --------------
    let assignment = kekule.aromaticity_assignment();

    // --- rings (RDKit symmetrized SSSR) -------------------------------------
    // Isolated rings only: each ring system's cycle is its ring (structure::rings). Fused or
    // bridged systems: the SMILES crate's symmetrized SSSR, completed below.
    let fused_result;
    let cycles: &[Vec<usize>] = match &perception.simple_cycles {
        Some(c) => c,
        None => {
            fused_result = kekule.symm_sssr_result();
            fused_result.cycles()
        }
    };

    // --- build the kept fragment --------------------------------------------
    let mut local = vec![usize::MAX; n];
    let mut graph = MolGraph {
        atoms: Vec::new(),
        bonds: Vec::new(),
        neighbours: Vec::new(),
        rings: Vec::new(),
        stereo: Vec::new(),
    };
    for &x in &components[keep] {
        local[x] = graph.atoms.len();
        let mut atom = atoms[x].clone();
        atom.aromatic = assignment.contains_atom(x);
        atom.in_ring = perception.atom_in_ring[x];
        graph.atoms.push(atom);
        graph.neighbours.push(Vec::new());
    }
    for (k, &(a, b, _, _)) in raw_bonds.iter().enumerate() {
        let (la, lb) = (local[a], local[b]);
        if la == usize::MAX || lb == usize::MAX {
            continue;
        }
        let order = if assignment.contains_edge(a, b) {
            BondOrder::Aromatic
        } else {
            match kekule_order[k] {
                2 => BondOrder::Double,
                3 | 4 => BondOrder::Triple,
                _ => BondOrder::Single,
            }
        };
        let index = graph.bonds.len();
        graph.bonds.push(Bond {
            a: la,
            b: lb,
            order,
            in_ring: perception.bond_in_ring[k],
        });
        graph.neighbours[la].push((lb, index));
        graph.neighbours[lb].push((la, index));
    }
    for cycle in cycles {
        if cycle.iter().all(|&x| x < n && local[x] != usize::MAX) {
            graph.rings.push(cycle.iter().map(|&x| local[x]).collect());
        }
    }
    if perception.simple_cycles.is_none() {
        add_interchangeable_rings(&mut graph);
    }
    if !options.skip_stereo {
        graph.stereo = stereo::marks(&raw, &local, &removed);
    }

    // --- dropped fragments as text -------------------------------------------
    let pieces = split_top_level_dots(text);
    let mut fragments_dropped = Vec::new();
    for (c, members) in components.iter().enumerate() {
        if c == keep {
            continue;
        }
        let mut piece_ids: Vec<usize> = members
            .iter()
            .map(|&x| piece_of(&pieces, pos_of(x)))
            .collect();
        piece_ids.sort_unstable();
        piece_ids.dedup();
        let piece_text: Vec<&str> = piece_ids
            .iter()
            .filter_map(|&p| pieces.get(p).map(|(_, _, s)| *s))
            .collect();
        fragments_dropped.push(piece_text.join("."));
    }
    let note = if fragments_dropped.is_empty() {
        None
    } else {
        Some(format!(
            "kept the largest organic fragment ({} heavy atoms) of {}; dropped {}: {}",
            graph.atoms.iter().filter(|a| a.atomic_number != 1).count(),
            components.len(),
            fragments_dropped.len(),
            fragments_dropped.join(", ")
        ))
    };
    Ok(Parsed {
        graph,
        fragments_dropped,
        note,
    })
}

/// Largest ring system (ring bonds) for which equal-size alternative rings are searched.
const MAX_RING_BONDS_FOR_SYMMETRIZATION: usize = 256;

/// Largest ring set the completion below may grow to.
const MAX_RINGS: usize = 512;

/// Completes the ring set the way RDKit's `symmetrizeSSSR` does where
/// `smiles-rs` keeps only one of two interchangeable rings. For a ring C of
/// the set and a strictly smaller ring R, the edge sum C + R (GF(2)) is
/// another ring of the same size exactly when R shares half its bonds with C;
/// such a C + R is a *relevant* cycle (Vismara, Electron. J. Combin. 1997, 4,
/// R9: not a sum of strictly smaller cycles, since C is not) and RDKit lists
/// it. Example: in `C1CCC2C3CCCCC2C3C1` two seven-membered rings each
/// complete the basis next to the four-membered ring; RDKit reports both
/// (5 rings), `smiles-rs` one (4). The closure is repeated on added rings.
fn add_interchangeable_rings(graph: &mut MolGraph) {
    if graph.rings.len() < 2 {
        return;
    }
    let smallest = graph.rings.iter().map(Vec::len).min().unwrap_or(0);
    if graph.rings.iter().all(|r| r.len() == smallest) {
        return;
    }
    let ring_bonds: Vec<usize> = (0..graph.bonds.len())
        .filter(|&b| graph.bonds[b].in_ring)
        .collect();
    let m = ring_bonds.len();
    if m == 0 || m > MAX_RING_BONDS_FOR_SYMMETRIZATION {
        return;
    }
    let mut edge_index = vec![usize::MAX; graph.bonds.len()];
    for (k, &b) in ring_bonds.iter().enumerate() {
        edge_index[b] = k;
    }
    let words = m.div_ceil(64);
    let edge_bits = |graph: &MolGraph, cycle: &[usize]| -> Option<Vec<u64>> {
        let mut bits = vec![0u64; words];
        for k in 0..cycle.len() {
            let b = graph.bond_between(cycle[k], cycle[(k + 1) % cycle.len()])?;
            let e = edge_index[b];
            if e == usize::MAX {
                return None;
            }
            bits[e / 64] |= 1 << (e % 64);
        }
        Some(bits)
    };
    let mut sets: Vec<Vec<u64>> = Vec::with_capacity(graph.rings.len());
    for r in &graph.rings {
        match edge_bits(graph, r) {
            Some(b) => sets.push(b),
            None => return,
        }
    }
    let mut i = 0;
    while i < sets.len() && sets.len() < MAX_RINGS {
        let len = graph.rings[i].len();
        for j in 0..sets.len() {
            let small = graph.rings[j].len();
            if small >= len {
                continue;
            }
            let shared: usize = sets[i]
                .iter()
                .zip(&sets[j])
                .map(|(a, b)| (a & b).count_ones() as usize)
                .sum();
            if 2 * shared != small {
                continue;
            }
            let x: Vec<u64> = sets[i].iter().zip(&sets[j]).map(|(a, b)| a ^ b).collect();
            if sets.contains(&x) {
                continue;
            }
            if let Some(cycle) = simple_cycle(graph, &ring_bonds, &x) {
                sets.push(x);
                graph.rings.push(cycle);
            }
        }
        i += 1;
    }
}

/// The atoms of the edge set `bits` (over `ring_bonds`) in cycle order, if it
/// is one simple cycle.
fn simple_cycle(graph: &MolGraph, ring_bonds: &[usize], bits: &[u64]) -> Option<Vec<usize>> {
    let edges: Vec<usize> = (0..ring_bonds.len())
        .filter(|&e| bits[e / 64] >> (e % 64) & 1 == 1)
        .map(|e| ring_bonds[e])
        .collect();
    let mut adjacency: std::collections::BTreeMap<usize, Vec<usize>> = Default::default();
    for &b in &edges {
        let (x, y) = (graph.bonds[b].a, graph.bonds[b].b);
        adjacency.entry(x).or_default().push(y);
        adjacency.entry(y).or_default().push(x);
    }
    if adjacency.values().any(|v| v.len() != 2) {
        return None;
    }
    let (&start, _) = adjacency.iter().next()?;
    let mut cycle = vec![start];
    let mut prev = usize::MAX;
    let mut cur = start;
    loop {
        let next = *adjacency.get(&cur)?.iter().find(|&&z| z != prev)?;
        if next == start {
            break;
        }
        if cycle.len() > edges.len() {
            return None;
        }
        cycle.push(next);
        prev = cur;
        cur = next;
    }
    (cycle.len() == edges.len()).then_some(cycle)
}

/// RDKit's clean-up of hypervalent forms before the valence check (`MolOps::cleanUp`,
/// RDKit 2026.09.1 behaviour checked with `Chem.MolFromSmiles`): a neutral chlorine, bromine
/// or iodine bonded only to oxygens with double bonds is written charge-separated
/// (`[O-]Cl(=O)=O`, chlorate, becomes `[O-][Cl+2]([O-])[O-]`; perchlorate, bromate, iodate
/// alike), and a neutral five-valent nitrogen with a double bond to a terminal oxygen takes
/// one charge pair (`[O-]N(=O)=O`, nitrate, becomes `O=[N+]([O-])[O-]`; an uncharged nitro
/// group `N(=O)=O` becomes `[N+](=O)[O-]`). Formula and net charge are unchanged.
fn clean_up_hypervalent(atoms: &mut [Atom], bonds: &[(usize, usize, u8, bool)], order: &mut [u8]) {
    let degree = |x: usize| bonds.iter().filter(|b| b.0 == x || b.1 == x).count();
    for i in 0..atoms.len() {
        let z = atoms[i].atomic_number;
        if atoms[i].formal_charge != 0 || !matches!(z, 7 | 17 | 35 | 53) {
            continue;
        }
        let mine: Vec<(usize, usize)> = bonds
            .iter()
            .enumerate()
            .filter_map(|(k, b)| match (b.0 == i, b.1 == i) {
                (true, _) => Some((k, b.1)),
                (_, true) => Some((k, b.0)),
                _ => None,
            })
            .collect();
        let valence: u16 = mine.iter().map(|&(k, _)| u16::from(order[k])).sum::<u16>()
            + u16::from(atoms[i].hydrogens);
        let terminal_oxo = |k: usize, j: usize, atoms: &[Atom], order: &[u8]| {
            order[k] == 2
                && atoms[j].atomic_number == 8
                && atoms[j].formal_charge == 0
                && atoms[j].hydrogens == 0
                && degree(j) == 1
        };
        if z == 7 {
            if valence != 5 {
                continue;
            }
            if let Some(&(k, j)) = mine
                .iter()
                .find(|&&(k, j)| terminal_oxo(k, j, atoms, order))
            {
                order[k] = 1;
                atoms[j].formal_charge = -1;
                atoms[i].formal_charge = 1;
            }
            continue;
        }
        if valence <= 1 || mine.iter().any(|&(_, j)| atoms[j].atomic_number != 8) {
            continue;
        }
        for &(k, j) in &mine {
            if terminal_oxo(k, j, atoms, order) {
                order[k] = 1;
                atoms[j].formal_charge = -1;
                atoms[i].formal_charge += 1;
            }
        }
    }
}

/// Implicit hydrogens of an unbracketed organic-subset atom: complete the
/// smallest allowed valence not below the explicit one (RDKit's rule and
/// valence lists, GraphMol/atomic_data.cpp). `None` when the explicit valence
/// exceeds every allowed valence.
fn implicit_h_organic(z: u8, explicit_valence: u16) -> Option<u8> {
    let allowed: &[u16] = match z {
        5 => &[3],
        6 => &[4],
        7 => &[3],
        8 => &[2],
        15 => &[3, 5, 7],
        16 => &[2, 4, 6],
        9 | 17 | 35 => &[1],
        53 => &[1, 3, 5],
        _ => return Some(0),
    };
    allowed
        .iter()
        .find(|&&v| v >= explicit_valence)
        .map(|&v| u8::try_from(v - explicit_valence).unwrap_or(0))
}

/// Allowed valences of a (possibly charged) main-group atom, using RDKit's
/// isoelectronic rule: a charged atom takes the valences of the element with
/// atomic number `z - charge` within the same block (N+ like C, O- like F).
/// `None` for elements where the project does not check valence (metals,
/// noble gases, unusual charges): they are accepted as written.
fn charged_valences(z: u8, charge: i8) -> Option<&'static [u8]> {
    let neutral = |z: i16| -> Option<&'static [u8]> {
        Some(match z {
            1 => &[1],
            5 => &[3],
            6 => &[4],
            7 => &[3],
            8 => &[2],
            9 => &[1],
            14 => &[4],
            15 => &[3, 5, 7],
            16 => &[2, 4, 6],
            17 => &[1],
            33 => &[3, 5, 7],
            34 => &[2, 4, 6],
            35 => &[1],
            53 => &[1, 3, 5],
            _ => return None,
        })
    };
    let zi = i16::from(z);
    if charge == 0 {
        return neutral(zi);
    }
    // Only the p-block elements RDKit treats isoelectronically, staying in the period.
    if !matches!(z, 5..=9 | 14..=17 | 33..=35 | 52 | 53) {
        return None;
    }
    let period = |z: i16| match z {
        1..=2 => 1,
        3..=10 => 2,
        11..=18 => 3,
        19..=36 => 4,
        37..=54 => 5,
        _ => 6,
    };
    let eff = zi - i16::from(charge);
    if period(eff) != period(zi) {
        return None;
    }
    neutral(eff)
}

/// Element symbol for error messages.
fn symbol(z: u8) -> &'static str {
    super::elements::element(z).map_or("?", |e| e.symbol)
}

/// Character (not byte) index of a byte offset, clamped to the string.
fn char_index(text: &str, byte: usize) -> usize {
    let mut b = byte.min(text.len());
    while b > 0 && !text.is_char_boundary(b) {
        b -= 1;
    }
    text[..b].chars().count()
}

/// Character position of each atom in SMILES order (bracket atoms, organic
/// subset symbols and `*`), for error messages and fragment text.
fn atom_positions(text: &str) -> Vec<usize> {
    let chars: Vec<char> = text.chars().collect();
    let mut out = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        match c {
            '[' => {
                out.push(i);
                while i < chars.len() && chars[i] != ']' {
                    i += 1;
                }
            }
            'C' | 'B' => {
                out.push(i);
                if chars.get(i + 1) == Some(&(if c == 'C' { 'l' } else { 'r' })) {
                    i += 1;
                }
            }
            'N' | 'O' | 'P' | 'S' | 'F' | 'I' | 'b' | 'c' | 'n' | 'o' | 's' | 'p' | '*' => {
                out.push(i);
            }
            '%' => {
                i += 2;
            }
            _ => {}
        }
        i += 1;
    }
    out
}

/// Top-level `.`-separated pieces of the input: (first char, end char, text).
fn split_top_level_dots(text: &str) -> Vec<(usize, usize, &str)> {
    let mut out = Vec::new();
    let mut depth = 0i32;
    let mut start_byte = 0;
    let mut start_char = 0;
    let mut char_i = 0;
    for (byte, c) in text.char_indices() {
        match c {
            '[' => depth += 1,
            ']' => depth -= 1,
            '.' if depth <= 0 => {
                out.push((start_char, char_i, &text[start_byte..byte]));
                start_byte = byte + 1;
                start_char = char_i + 1;
            }
            _ => {}
        }
        char_i += 1;
    }
    out.push((start_char, char_i, &text[start_byte..]));
    out
}

/// Index of the piece holding character position `pos`.
fn piece_of(pieces: &[(usize, usize, &str)], pos: usize) -> usize {
    pieces
        .iter()
        .position(|&(s, e, _)| pos >= s && pos < e.max(s + 1))
        .unwrap_or(0)
}

#[cfg(test)]
mod tests;

#[cfg(test)]
mod ring_perception_tests;
