//! The project's own canonical structure key.
//!
//! Two SMILES strings of the same molecule, whatever their atom order, aromatic or Kekulé
//! form, explicit or implicit hydrogens, protonation state of acids and bases or salt
//! partner, give the same key; different molecules give different keys. The key is computed
//! from the parsed [`MolGraph`] (so it inherits the adapter's fragment choice: the largest
//! organic fragment, counter-ions and solvent dropped) in four steps:
//!
//! 1. **Normalised view.** Charges are neutralised where a neutral form exists (a carboxylate
//!    or phenolate gains its proton, a protonated amine loses it; charge pairs such as nitro
//!    or N-oxides stay; inorganic species, without carbon, keep their charges), imidic acids
//!    (`N=C-OH`, outside aromatic rings) are written as their amide tautomer and enols
//!    (`C=C-OH`, outside aromatic rings, not enediols) as their keto tautomer. Aromaticity is the adapter's (RDKit's default model, perceived on
//!    the Kekulé form), so aromatic and Kekulé input give the same bonds.
//! 2. **Canonical ranking.** Atom invariants (element, isotope, charge, hydrogen count,
//!    aromaticity, degree, radical electrons) are refined by the sorted multiset of
//!    neighbour classes and bond orders until the partition is stable (Morgan-style
//!    iterative refinement, H. L. Morgan, J. Chem. Doc. 1965, 5, 107; Weininger et al.,
//!    J. Chem. Inf. Comput. Sci. 1989, 29, 97). Remaining ties are broken by splitting the
//!    lowest tied class and refining again; in molecules, tied atoms after refinement are
//!    symmetry-equivalent, so the choice does not change the result.
//! 3. **Stereo.** A tetrahedral mark counts when its four neighbours (an implicit hydrogen
//!    being one) fall in four different classes; its parity is then expressed relative to
//!    the class order. A double-bond mark counts when neither end has two equivalent
//!    substituents; its configuration is expressed relative to the higher-ranked substituent
//!    on each side. The stereo elements then join the invariants and the refinement is run
//!    again (so mirror-image centres in otherwise symmetric molecules, as in meso
//!    compounds, are told apart). Marks on atoms that are not stereogenic are dropped.
//!    Limitation: centres that are stereogenic only through other stereo elements of
//!    equivalent neighbours (cis/trans 1,4-disubstituted cyclohexanes, pseudo-asymmetric
//!    centres) are not recognised; for them the stereo key equals the skeleton key.
//! 4. **Key.** The canonical string lists the atoms in rank order, the bonds by rank pair
//!    and the stereo elements; the key is a 128-bit FNV-1a digest of that string in hex,
//!    with a version prefix. The *skeleton* key ignores all stereo; the *stereo* key
//!    includes it and equals the skeleton key when no stereo element is present.
//!
//! A change here changes every key: bump [`KEY_VERSION`] (the knowledge base is then
//! rebuilt on next use, `kb::SEED_HASH`).

use serde::Serialize;

use super::adapter::{StructureError, parse_smiles};
use super::graph::{BondOrder, MolGraph, StereoMark};

/// Version of the key algorithm, the first part of every key.
pub const KEY_VERSION: &str = "pk3";

/// The canonical keys of one structure.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct StructureKey {
    /// Key without stereo (constitution, after normalisation).
    pub skeleton: String,
    /// Key with the stereo elements the input carried (equal to `skeleton` when none).
    pub stereo: String,
    /// Number of stereo elements (tetrahedral centres and double bonds) in the stereo key.
    pub stereo_elements: usize,
    /// What the normalisation changed, in plain words (empty when nothing).
    pub normalised: Vec<String>,
}

impl StructureKey {
    /// Whether the input carried stereo that counts.
    pub fn has_stereo(&self) -> bool {
        self.stereo_elements > 0
    }
}

/// Keys of a SMILES string (largest organic fragment).
///
/// # Errors
/// The parser's [`StructureError`].
///
/// # Examples
/// ```
/// use phasewise::structure::canon::structure_key;
/// let a = structure_key("CC(=O)Nc1ccc(O)cc1").unwrap();
/// let b = structure_key("OC1=CC=C(NC(C)=O)C=C1").unwrap();
/// assert_eq!(a, b);
/// ```
pub fn structure_key(smiles: &str) -> Result<StructureKey, StructureError> {
    Ok(key_of_graph(&parse_smiles(smiles)?.graph))
}

/// Keys of a parsed graph.
pub fn key_of_graph(g: &MolGraph) -> StructureKey {
    let view = View::of(g);
    let skeleton_ranks = canonical_ranks(&view, &[], &[]);
    let skeleton = digest(&canonical_string(&view, &skeleton_ranks, &[], &[]));
    let (atom_codes, bond_codes) = stereo_codes(&view, g);
    let elements = atom_codes.iter().filter(|&&c| c != 0).count()
        + bond_codes.iter().filter(|&&c| c != 0).count();
    let stereo = if elements == 0 {
        skeleton.clone()
    } else {
        let ranks = canonical_ranks(&view, &atom_codes, &bond_codes);
        digest(&canonical_string(&view, &ranks, &atom_codes, &bond_codes))
    };
    StructureKey {
        skeleton,
        stereo,
        stereo_elements: elements,
        normalised: view.notes,
    }
}

/// The canonical string (without digest) of a graph, with stereo when `with_stereo`; for
/// tests and diagnostics.
pub fn canonical_text(g: &MolGraph, with_stereo: bool) -> String {
    let view = View::of(g);
    if with_stereo {
        let (a, b) = stereo_codes(&view, g);
        let ranks = canonical_ranks(&view, &a, &b);
        canonical_string(&view, &ranks, &a, &b)
    } else {
        let ranks = canonical_ranks(&view, &[], &[]);
        canonical_string(&view, &ranks, &[], &[])
    }
}

/// The graph after normalisation, as the key sees it.
struct View {
    /// (atomic number, isotope, charge, hydrogens, aromatic, radical electrons)
    atoms: Vec<(u8, u16, i8, u8, bool, u8)>,
    /// (a, b, bond label: 1 single, 2 double, 3 triple, 4 aromatic)
    bonds: Vec<(usize, usize, u8)>,
    /// For each atom: (neighbour, bond index).
    adj: Vec<Vec<(usize, usize)>>,
    notes: Vec<String>,
}

impl View {
    fn of(g: &MolGraph) -> Self {
        let mut atoms: Vec<(u8, u16, i8, u8, bool, u8)> = g
            .atoms
            .iter()
            .map(|a| {
                (
                    a.atomic_number,
                    a.isotope.unwrap_or(0),
                    a.formal_charge,
                    a.hydrogens,
                    a.aromatic,
                    a.radical_electrons,
                )
            })
            .collect();
        let mut bonds: Vec<(usize, usize, u8)> = g
            .bonds
            .iter()
            .map(|b| {
                let label = match b.order {
                    BondOrder::Single => 1,
                    BondOrder::Double => 2,
                    BondOrder::Triple => 3,
                    BondOrder::Aromatic => 4,
                };
                (b.a, b.b, label)
            })
            .collect();
        let mut notes = Vec::new();
        // Oxo groups written charge-separated on a p-block atom that also has a hypervalent
        // form (`[O-][S+2]([O-])([O-])[O-]` and `O=S(=O)([O-])[O-]`, sulfate; `[O-][Cl+2]([O-])[O-]`
        // and `[O-]Cl(=O)=O`, chlorate; `C[S+](C)[O-]` and `CS(C)=O`) are one structure
        // written two ways: the key sees the double-bond form. Nitrogen keeps its charge pair
        // (nitro, N-oxides): it has no five-valent form. Not a chemical change, so no note.
        for i in 0..atoms.len() {
            if !matches!(atoms[i].0, 15 | 16 | 17 | 33 | 34 | 35 | 52 | 53) {
                continue;
            }
            for &(j, k) in &g.neighbours[i] {
                if atoms[i].2 <= 0 {
                    break;
                }
                if atoms[j].0 == 8
                    && atoms[j].2 == -1
                    && atoms[j].3 == 0
                    && bonds[k].2 == 1
                    && g.neighbours[j].len() == 1
                {
                    bonds[k].2 = 2;
                    atoms[j].2 = 0;
                    atoms[i].2 -= 1;
                }
            }
        }
        // Neutralise: an anion on O, S or N gains a proton, a cation on N with a hydrogen
        // loses it, unless the atom is part of a charge pair (nitro, N-oxide, ylide).
        let charge_of = |atoms: &[(u8, u16, i8, u8, bool, u8)], i: usize| atoms[i].2;
        // Inorganic species (no carbon) keep their charges: sulfate and sulfuric acid are
        // different analytes in ion chromatography.
        let organic = atoms.iter().any(|a| a.0 == 6);
        let mut changed = 0;
        for i in (0..atoms.len()).filter(|_| organic) {
            let (z, _, q, h, _, _) = atoms[i];
            let partner = |sign: i8| {
                g.neighbours[i]
                    .iter()
                    .any(|&(j, _)| charge_of(&atoms, j).signum() == sign)
            };
            if q == -1 && matches!(z, 7 | 8 | 16) && !partner(1) {
                atoms[i].2 = 0;
                atoms[i].3 = h.saturating_add(1);
                changed += 1;
            } else if q == 1 && z == 7 && h > 0 && !partner(-1) {
                atoms[i].2 = 0;
                atoms[i].3 = h - 1;
                changed += 1;
            }
        }
        if changed > 0 {
            notes.push(format!("{changed} charge(s) neutralised"));
        }
        // Imidic acid -> amide: N=C(-OH) outside aromatic rings becomes HN-C(=O).
        let mut tautomers = 0;
        for k in 0..bonds.len() {
            let (a, b, label) = bonds[k];
            if label != 2 {
                continue;
            }
            let (c, n) = match (atoms[a].0, atoms[b].0) {
                (6, 7) => (a, b),
                (7, 6) => (b, a),
                _ => continue,
            };
            if atoms[c].4 || atoms[n].4 || atoms[n].2 != 0 || atoms[c].2 != 0 {
                continue;
            }
            let hydroxy = g.neighbours[c].iter().find(|&&(o, ob)| {
                atoms[o].0 == 8 && atoms[o].3 == 1 && atoms[o].2 == 0 && bonds[ob].2 == 1
            });
            if let Some(&(o, ob)) = hydroxy {
                bonds[k].2 = 1;
                bonds[ob].2 = 2;
                atoms[o].3 = 0;
                atoms[n].3 += 1;
                tautomers += 1;
            }
        }
        if tautomers > 0 {
            notes.push(format!("{tautomers} imidic acid group(s) written as amide"));
        }
        // Enol -> keto: C=C(-OH) outside aromatic rings becomes HC-C(=O), the form of simple
        // carbonyl compounds (common practice, no source: acetone and its enol, propen-2-ol,
        // are one analyte). Enols written on either carbon of a 1,3-dicarbonyl give the same
        // keto form as well.
        let mut enols = 0;
        for k in 0..bonds.len() {
            let (a, b, label) = bonds[k];
            if label != 2 || atoms[a].0 != 6 || atoms[b].0 != 6 {
                continue;
            }
            if atoms[a].4 || atoms[b].4 || atoms[a].2 != 0 || atoms[b].2 != 0 {
                continue;
            }
            let hydroxy_on = |c: usize| {
                g.neighbours[c].iter().copied().find(|&(o, ob)| {
                    atoms[o].0 == 8
                        && atoms[o].3 == 1
                        && atoms[o].2 == 0
                        && bonds[ob].2 == 1
                        && g.neighbours[o].len() == 1
                })
            };
            let Some((c, (o, ob), other)) = hydroxy_on(a)
                .map(|h| (a, h, b))
                .or_else(|| hydroxy_on(b).map(|h| (b, h, a)))
            else {
                continue;
            };
            // an enediol (both ends carry OH, as in ascorbic acid) stays as written: which
            // end becomes the carbonyl is not a simple choice
            if hydroxy_on(other).is_some() || c == other {
                continue;
            }
            bonds[k].2 = 1;
            bonds[ob].2 = 2;
            atoms[o].3 = 0;
            atoms[other].3 += 1;
            enols += 1;
        }
        if enols > 0 {
            notes.push(format!("{enols} enol group(s) written as the keto form"));
        }
        View {
            atoms,
            bonds,
            adj: g.neighbours.clone(),
            notes,
        }
    }
}

/// Dense ranks (0..k) of `keys`, equal keys sharing a rank, ordered by key.
fn dense_ranks<K: Ord>(keys: &[K]) -> (Vec<u32>, usize) {
    let mut order: Vec<usize> = (0..keys.len()).collect();
    order.sort_by(|&x, &y| keys[x].cmp(&keys[y]));
    let mut ranks = vec![0u32; keys.len()];
    let mut distinct = 0usize;
    for (pos, &i) in order.iter().enumerate() {
        if pos > 0 && keys[order[pos - 1]] != keys[i] {
            distinct += 1;
        }
        ranks[i] = distinct as u32;
    }
    (ranks, if keys.is_empty() { 0 } else { distinct + 1 })
}

/// Refine `classes` by neighbour classes and bond labels until stable.
fn refine(view: &View, mut classes: Vec<u32>, bond_codes: &[u8]) -> (Vec<u32>, usize) {
    let n = view.atoms.len();
    let (c, mut count) = dense_ranks(&classes);
    classes = c;
    loop {
        let sigs: Vec<(u32, Vec<(u32, u8)>)> = (0..n)
            .map(|i| {
                let mut nb: Vec<(u32, u8)> = view.adj[i]
                    .iter()
                    .map(|&(j, b)| {
                        let stereo = bond_codes.get(b).copied().unwrap_or(0);
                        (classes[j], view.bonds[b].2 + 8 * stereo)
                    })
                    .collect();
                nb.sort_unstable();
                (classes[i], nb)
            })
            .collect();
        let (next, next_count) = dense_ranks(&sigs);
        classes = next;
        if next_count == count || next_count == n {
            return (classes, next_count);
        }
        count = next_count;
    }
}

/// Symmetry classes (no tie breaking) with optional stereo codes.
fn classes_of(view: &View, atom_codes: &[u8], bond_codes: &[u8]) -> Vec<u32> {
    type Invariant = (u8, u16, i8, u8, bool, u8, usize, u8);
    let init: Vec<Invariant> = (0..view.atoms.len())
        .map(|i| {
            let (z, iso, q, h, ar, rad) = view.atoms[i];
            let code = atom_codes.get(i).copied().unwrap_or(0);
            (z, iso, q, h, ar, rad, view.adj[i].len(), code)
        })
        .collect();
    let (c, _) = dense_ranks(&init);
    refine(view, c, bond_codes).0
}

/// Canonical ranks (a permutation of 0..n).
fn canonical_ranks(view: &View, atom_codes: &[u8], bond_codes: &[u8]) -> Vec<u32> {
    let n = view.atoms.len();
    let mut classes = classes_of(view, atom_codes, bond_codes);
    loop {
        let (_, count) = dense_ranks(&classes);
        if count == n {
            return classes;
        }
        // The lowest class with more than one member: its first atom goes first.
        let mut members = vec![0usize; n];
        for &c in &classes {
            members[c as usize] += 1;
        }
        let Some(tied) = (0..n).find(|&c| members[c] > 1) else {
            return classes;
        };
        let Some(pick) = (0..n).find(|&i| classes[i] as usize == tied) else {
            return classes;
        };
        let split: Vec<u32> = (0..n)
            .map(|i| {
                let c = 2 * classes[i];
                if classes[i] as usize == tied && i != pick {
                    c + 1
                } else {
                    c
                }
            })
            .collect();
        classes = refine(view, split, bond_codes).0;
    }
}

/// Stereo codes per atom (tetrahedral: 1 or 2) and per bond (double bond: 1 same side, 2
/// opposite), relative to symmetry classes; zero where there is no stereo element.
fn stereo_codes(view: &View, g: &MolGraph) -> (Vec<u8>, Vec<u8>) {
    let n = view.atoms.len();
    let mut atom_codes = vec![0u8; n];
    let mut bond_codes = vec![0u8; view.bonds.len()];
    if g.stereo.is_empty() {
        return (atom_codes, bond_codes);
    }
    // A few rounds: elements found in one round can split classes that make another
    // element determinable in the next.
    for _ in 0..4 {
        let classes = classes_of(view, &atom_codes, &bond_codes);
        let key = |x: Option<usize>| x.map_or(-1i64, |j| i64::from(classes[j]));
        let mut next_atoms = vec![0u8; n];
        let mut next_bonds = vec![0u8; view.bonds.len()];
        for mark in &g.stereo {
            match *mark {
                StereoMark::Tetrahedral {
                    centre,
                    neighbours,
                    anticlockwise,
                } => {
                    if centre >= n || neighbours.iter().any(|x| x.is_some_and(|j| j >= n)) {
                        continue;
                    }
                    let keys: Vec<i64> = neighbours.iter().map(|&x| key(x)).collect();
                    let mut distinct = keys.clone();
                    distinct.sort_unstable();
                    distinct.dedup();
                    if distinct.len() != 4 {
                        continue;
                    }
                    let mut inversions = 0;
                    for p in 0..4 {
                        for q in p + 1..4 {
                            if keys[p] > keys[q] {
                                inversions += 1;
                            }
                        }
                    }
                    let sorted_anticlockwise = anticlockwise ^ (inversions % 2 == 1);
                    next_atoms[centre] = if sorted_anticlockwise { 1 } else { 2 };
                }
                StereoMark::DoubleBond {
                    a,
                    b,
                    ref_a,
                    ref_b,
                    same_side,
                } => {
                    if a >= n || b >= n {
                        continue;
                    }
                    let Some(&(_, bond)) = view.adj[a].iter().find(|&&(j, _)| j == b) else {
                        continue;
                    };
                    if view.bonds[bond].2 != 2 {
                        continue;
                    }
                    let side =
                        |end: usize, other: usize, reference: Option<usize>| -> Option<bool> {
                            let mut cands: Vec<Option<usize>> = view.adj[end]
                                .iter()
                                .filter(|&&(j, _)| j != other)
                                .map(|&(j, _)| Some(j))
                                .collect();
                            for _ in 0..view.atoms[end].3 {
                                cands.push(None);
                            }
                            if cands.is_empty() || cands.len() > 2 || !cands.contains(&reference) {
                                return None;
                            }
                            let top = *cands.iter().max_by_key(|&&x| key(x))?;
                            if cands.len() == 2 && key(cands[0]) == key(cands[1]) {
                                return None;
                            }
                            Some(top != reference)
                        };
                    let (Some(flip_a), Some(flip_b)) = (side(a, b, ref_a), side(b, a, ref_b))
                    else {
                        continue;
                    };
                    let same = same_side ^ flip_a ^ flip_b;
                    next_bonds[bond] = if same { 1 } else { 2 };
                }
            }
        }
        let stable = next_atoms == atom_codes && next_bonds == bond_codes;
        atom_codes = next_atoms;
        bond_codes = next_bonds;
        if stable {
            break;
        }
    }
    (atom_codes, bond_codes)
}

/// The canonical string: atoms in rank order, bonds by rank pair, stereo elements.
fn canonical_string(view: &View, ranks: &[u32], atom_codes: &[u8], bond_codes: &[u8]) -> String {
    use std::fmt::Write;
    let n = view.atoms.len();
    let mut by_rank = vec![0usize; n];
    for (i, &r) in ranks.iter().enumerate() {
        by_rank[r as usize] = i;
    }
    let mut s = String::with_capacity(16 * n);
    for &i in &by_rank {
        let (z, iso, q, h, ar, rad) = view.atoms[i];
        let _ = write!(s, "{z}");
        if iso != 0 {
            let _ = write!(s, "i{iso}");
        }
        if q != 0 {
            let _ = write!(s, "q{q}");
        }
        if h != 0 {
            let _ = write!(s, "h{h}");
        }
        if ar {
            s.push('a');
        }
        if rad != 0 {
            let _ = write!(s, "r{rad}");
        }
        match atom_codes.get(i).copied().unwrap_or(0) {
            1 => s.push('@'),
            2 => s.push_str("@@"),
            _ => {}
        }
        s.push(';');
    }
    s.push('|');
    let mut edges: Vec<(u32, u32, u8, u8)> = view
        .bonds
        .iter()
        .enumerate()
        .map(|(k, &(a, b, label))| {
            let (x, y) = (ranks[a].min(ranks[b]), ranks[a].max(ranks[b]));
            (x, y, label, bond_codes.get(k).copied().unwrap_or(0))
        })
        .collect();
    edges.sort_unstable();
    for (x, y, label, code) in edges {
        let _ = write!(s, "{x}-{y}:{label}");
        match code {
            1 => s.push('Z'),
            2 => s.push('E'),
            _ => {}
        }
        s.push(';');
    }
    s
}

/// Versioned 128-bit FNV-1a digest of `text`, in hex.
fn digest(text: &str) -> String {
    const PRIME: u64 = 0x0100_0000_01b3;
    let mut h1: u64 = 0xcbf2_9ce4_8422_2325;
    let mut h2: u64 = 0x6c62_272e_07bb_0142;
    for &b in text.as_bytes() {
        h1 ^= u64::from(b);
        h1 = h1.wrapping_mul(PRIME);
        h2 = h2.wrapping_mul(PRIME);
        h2 ^= u64::from(b);
    }
    // Finalise with the length so prefixes of one another differ in both halves.
    h2 ^= text.len() as u64;
    h2 = h2.wrapping_mul(PRIME);
    format!("{KEY_VERSION}-{h1:016x}{h2:016x}")
}

#[cfg(test)]
#[path = "canon_tests.rs"]
mod tests;

/// Number of atoms and double bonds that could carry stereo in `g` (tetrahedral atoms of
/// carbon, nitrogen with four substituents, phosphorus or sulfur whose four neighbours,
/// an implicit hydrogen counting as one, are in four different symmetry classes; double
/// bonds outside rings whose ends each have two different substituents or one). Used to say
/// when a record without stereo stands for a compound that has stereoisomers.
pub fn possible_stereo_elements(g: &MolGraph) -> usize {
    let view = View::of(g);
    let classes = classes_of(&view, &[], &[]);
    let key = |x: Option<usize>| x.map_or(-1i64, |j| i64::from(classes[j]));
    let mut count = 0;
    for i in 0..view.atoms.len() {
        let (z, _, q, h, ar, _) = view.atoms[i];
        if ar || !matches!(z, 6 | 7 | 15 | 16) || (z == 7 && q != 1) {
            continue;
        }
        let mut nb: Vec<Option<usize>> = view.adj[i].iter().map(|&(j, _)| Some(j)).collect();
        if view.adj[i].iter().any(|&(_, b)| view.bonds[b].2 != 1) {
            continue;
        }
        for _ in 0..h {
            nb.push(None);
        }
        if nb.len() != 4 {
            continue;
        }
        let mut keys: Vec<i64> = nb.iter().map(|&x| key(x)).collect();
        keys.sort_unstable();
        keys.dedup();
        if keys.len() == 4 {
            count += 1;
        }
    }
    for (k, &(a, b, label)) in view.bonds.iter().enumerate() {
        if label != 2 || g.bonds.get(k).is_some_and(|x| x.in_ring) {
            continue;
        }
        let side = |end: usize, other: usize| {
            let mut c: Vec<i64> = view.adj[end]
                .iter()
                .filter(|&&(j, _)| j != other)
                .map(|&(j, _)| key(Some(j)))
                .collect();
            for _ in 0..view.atoms[end].3 {
                c.push(-1);
            }
            c.len() == 2 && c[0] != c[1] || c.len() == 1 && view.atoms[end].0 == 7
        };
        if side(a, b) && side(b, a) {
            count += 1;
        }
    }
    count
}

/// The skeleton key of a structure with every cyclic hemiacetal and hemiketal opened to its
/// chain form (a ring carbon bearing an OH and the ring O becomes a carbonyl, the ring O a
/// hydroxyl), and how many were opened. The pyranose, furanose and open-chain records of one
/// sugar (and its anomers, whose stereo the skeleton ignores) share this key: they are one
/// compound in solution, where they interconvert (mutarotation; common practice, no source).
/// Glycosidic acetals (no OH on the carbon) stay closed, so different disaccharides stay
/// different.
pub fn ring_chain_key(g: &MolGraph) -> (String, usize) {
    let mut view = View::of(g);
    let mut removed = vec![false; view.bonds.len()];
    let mut used = vec![false; view.atoms.len()];
    let mut opened = 0;
    for c in 0..view.atoms.len() {
        let (z, _, q, _, ar, _) = view.atoms[c];
        if z != 6 || q != 0 || ar || view.adj[c].iter().any(|&(_, b)| view.bonds[b].2 != 1) {
            continue;
        }
        let oxygen = |j: usize, h: u8, degree: usize| {
            let (zj, _, qj, hj, arj, _) = view.atoms[j];
            zj == 8 && qj == 0 && hj == h && !arj && view.adj[j].len() == degree
        };
        let hydroxy = view.adj[c].iter().copied().find(|&(j, _)| oxygen(j, 1, 1));
        let ring_o: Vec<(usize, usize)> = view.adj[c]
            .iter()
            .copied()
            .filter(|&(j, b)| {
                oxygen(j, 0, 2)
                    && !used[j]
                    && g.bonds.get(b).is_some_and(|x| x.in_ring)
                    && view.adj[j].iter().all(|&(k, _)| view.atoms[k].0 == 6)
            })
            .collect();
        let (Some((oh, ohb)), [(or, orb)]) = (hydroxy, ring_o.as_slice()) else {
            continue;
        };
        removed[*orb] = true;
        used[*or] = true;
        view.atoms[*or].3 += 1;
        view.bonds[ohb].2 = 2;
        view.atoms[oh].3 = 0;
        opened += 1;
    }
    if opened > 0 {
        let bonds: Vec<(usize, usize, u8)> = view
            .bonds
            .iter()
            .zip(&removed)
            .filter(|(_, r)| !**r)
            .map(|(b, _)| *b)
            .collect();
        let mut adj = vec![Vec::new(); view.atoms.len()];
        for (k, &(a, b, _)) in bonds.iter().enumerate() {
            adj[a].push((b, k));
            adj[b].push((a, k));
        }
        view.bonds = bonds;
        view.adj = adj;
    }
    let ranks = canonical_ranks(&view, &[], &[]);
    (digest(&canonical_string(&view, &ranks, &[], &[])), opened)
}
