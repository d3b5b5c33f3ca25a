//! Tests of the canonical structure key (`structure::canon`). Expected equalities are
//! chemical identities (common practice, no source); the RDKit-generated randomised SMILES
//! check over 2,000+ compounds is `tests/identity_random_smiles.rs`.

use std::io::Read;
use std::sync::OnceLock;

use proptest::prelude::*;

use super::*;
use crate::structure::graph::{Bond, StereoMark};

fn key(s: &str) -> StructureKey {
    structure_key(s).unwrap_or_else(|e| panic!("{s}: {e}"))
}

fn same(a: &str, b: &str) {
    let (ka, kb) = (key(a), key(b));
    assert_eq!(ka.skeleton, kb.skeleton, "skeleton {a} vs {b}");
    assert_eq!(ka.stereo, kb.stereo, "stereo {a} vs {b}");
}

fn differ(a: &str, b: &str) {
    assert_ne!(key(a).skeleton, key(b).skeleton, "{a} vs {b}");
}

#[test]
fn atom_order_aromatic_kekule_and_hydrogens_do_not_matter() {
    // paracetamol
    same("CC(=O)Nc1ccc(O)cc1", "OC1=CC=C(NC(C)=O)C=C1");
    same("CC(=O)Nc1ccc(O)cc1", "c1cc(ccc1NC(=O)C)O");
    // toluene
    same("c1ccccc1C", "Cc1ccccc1");
    same("Cc1ccccc1", "CC1=CC=CC=C1");
    same("Cc1ccccc1", "C1=CC(C)=CC=C1");
    same("Cc1ccccc1", "[CH3]c1ccccc1");
    same("Cc1ccccc1", "C([H])([H])([H])c1ccccc1");
    same("Cc1ccccc1", "[H]c1c([H])c([H])c(C)c([H])c1[H]");
    // heteroaromatics: pyrrole, pyridine, furan, thiophene, indole, caffeine
    same("c1cc[nH]c1", "C1=CNC=C1");
    same("c1ccncc1", "C1=CC=NC=C1");
    same("c1ccoc1", "C1=COC=C1");
    same("c1ccsc1", "C1=CSC=C1");
    same("c1ccc2[nH]ccc2c1", "C1=CC=C2C(=C1)C=CN2");
    same("Cn1cnc2c1c(=O)n(C)c(=O)n2C", "CN1C=NC2=C1C(=O)N(C)C(=O)N2C");
    // naphthalene in both Kekulé structures
    same("C1=CC=C2C=CC=CC2=C1", "C1=CC2=CC=CC=C2C=C1");
}

#[test]
fn different_molecules_differ() {
    differ("CCO", "COC");
    differ("Cc1ccccc1C", "Cc1cccc(C)c1");
    differ("Cc1cccc(C)c1", "Cc1ccc(C)cc1");
    differ("CCCC", "CC(C)C");
    differ("c1ccccc1", "C1CCCCC1");
    differ("CC(=O)O", "CC(=O)OC");
    differ("[13CH4]", "C");
    differ("OCC", "[2H]OCC");
    // two rings vs one big ring (same degree sequence)
    differ("C1CCC2CCCCC2C1", "C1CCCCCCCCC1");
    // decalin vs bicyclopentyl
    differ("C1CCC2CCCCC2C1", "C1CCC(C1)C1CCCC1");
}

#[test]
fn salts_charges_and_imidic_acids_normalise() {
    same("CC(=O)[O-].[Na+]", "CC(=O)O");
    same("[NH3+]CC(=O)[O-]", "NCC(=O)O");
    same("C[NH+](C)C.[Cl-]", "CN(C)C");
    same("[O-]c1ccccc1.[K+]", "Oc1ccccc1");
    // nitro and N-oxide charge pairs are kept as written
    same("C[N+](=O)[O-]", "[O-][N+](C)=O");
    differ("C[N+](C)(C)C", "CN(C)C");
    // imidic acid written as the amide
    same("CC(O)=N", "CC(N)=O");
    same("OC(=NC)c1ccccc1", "CNC(=O)c1ccccc1");
    assert!(!key("CC(O)=N").normalised.is_empty());
    assert!(key("CC(N)=O").normalised.is_empty());
}

#[test]
fn enols_are_written_as_the_keto_form() {
    // acetone and prop-1-en-2-ol; acetaldehyde and vinyl alcohol; cyclohexanone and its
    // enol; acetylacetone and its enol (common practice, no source)
    same("CC(O)=C", "CC(C)=O");
    same("OC=C", "CC=O");
    same("OC1=CCCCC1", "O=C1CCCCC1");
    same("CC(O)=CC(C)=O", "CC(=O)CC(C)=O");
    // 1,3-cyclohexanedione, enol written on the other side
    same("OC1=CC(=O)CCC1", "O=C1CC(=O)CCC1");
    assert!(!key("CC(O)=C").normalised.is_empty());
    // phenols (aromatic), enol ethers (no OH) and enediols stay as they are
    differ("Oc1ccccc1", "O=C1CC=CC=C1");
    differ("COC=C", "COCC");
    differ("OC1=C(O)C(=O)OC1C(O)CO", "O=C1C(O)C(=O)OC1C(O)CO");
    // a keto form and a different ketone stay different
    differ("CC(O)=CC", "CCCC=O");
}

#[test]
fn ring_and_chain_forms_of_a_sugar_share_the_ring_chain_key() {
    let rc = |s: &str| ring_chain_key(&parse_smiles(s).unwrap().graph);
    // glucopyranose (stereo-less), alpha-D-glucopyranose, open-chain D-glucose and
    // beta-D-glucofuranose (common practice, no source)
    let (pyranose, n) = rc("OCC1OC(O)C(O)C(O)C1O");
    assert_eq!(n, 1);
    assert_eq!(rc("OC[C@H]1O[C@H](O)[C@H](O)[C@@H](O)[C@@H]1O").0, pyranose);
    assert_eq!(rc("O=C[C@H](O)[C@@H](O)[C@H](O)[C@H](O)CO").0, pyranose);
    assert_eq!(
        rc("OC[C@@H](O)[C@H]1O[C@@H](O)[C@H](O)[C@@H]1O").0,
        pyranose
    );
    // fructose: fructopyranose and open-chain keto form (a hemiketal)
    assert_eq!(rc("OCC1(O)OCC(O)C(O)C1O").0, rc("OCC(=O)C(O)C(O)C(O)CO").0);
    // lactose: the reducing end opens, the glycosidic bond stays
    let (lac, n) = rc("OCC1OC(OC2C(CO)OC(O)C(O)C2O)C(O)C(O)C1O");
    assert_eq!(n, 1);
    assert_eq!(rc("O=CC(O)C(O)C(OC1OC(CO)C(O)C(O)C1O)C(O)CO").0, lac);
    // sucrose has no hemiacetal: nothing opens, and it differs from lactose
    let (suc, n) = rc("OCC1OC(OC2(CO)OC(CO)C(O)C2O)C(O)C(O)C1O");
    assert_eq!(n, 0);
    assert_ne!(suc, lac);
    // a methyl glycoside (acetal, no OH) stays closed and differs from the sugar
    let (methyl, n) = rc("COC1OC(CO)C(O)C(O)C1O");
    assert_eq!(n, 0);
    assert_ne!(methyl, pyranose);
    // without a hemiacetal the key is the skeleton key
    assert_eq!(rc("CCO").0, key("CCO").skeleton);
}

#[test]
fn tetrahedral_stereo() {
    // L-alanine written four ways
    let l = key("N[C@@H](C)C(=O)O");
    same("N[C@@H](C)C(=O)O", "C[C@H](N)C(=O)O");
    same("N[C@@H](C)C(=O)O", "OC(=O)[C@H](C)N");
    same("N[C@@H](C)C(=O)O", "[C@H](N)(C)C(=O)O");
    same("N[C@@H](C)C(=O)O", "N[C@@]([H])(C)C(=O)O");
    assert_eq!(l.stereo_elements, 1);
    let d = key("N[C@H](C)C(=O)O");
    assert_eq!(l.skeleton, d.skeleton);
    assert_ne!(l.stereo, d.stereo);
    let racemic = key("NC(C)C(=O)O");
    assert_eq!(racemic.stereo, racemic.skeleton);
    assert_eq!(racemic.skeleton, l.skeleton);
    assert_ne!(racemic.stereo, l.stereo);
    // a mark on a centre that is not stereogenic is dropped
    let k = key("C[C@H](C)O");
    assert_eq!(k.stereo_elements, 0);
    assert_eq!(k.stereo, key("CC(C)O").stereo);
}

#[test]
fn meso_and_chiral_tartaric_acid() {
    // Written symmetrically, equal marks are the meso form and unequal marks a chiral one
    // (each centre's neighbour order runs from the other end for the second centre).
    let meso = "OC(=O)[C@H](O)[C@H](O)C(=O)O";
    let chiral_a = "OC(=O)[C@H](O)[C@@H](O)C(=O)O";
    let chiral_b = "OC(=O)[C@@H](O)[C@H](O)C(=O)O";
    same(meso, "OC(=O)[C@@H](O)[C@@H](O)C(=O)O");
    assert_ne!(key(meso).stereo, key(chiral_a).stereo);
    assert_ne!(key(meso).stereo, key(chiral_b).stereo);
    assert_ne!(key(chiral_a).stereo, key(chiral_b).stereo);
    assert_eq!(key(meso).skeleton, key(chiral_a).skeleton);
    // the chiral form written from a branch instead of the chain
    same(chiral_a, "O=C(O)[C@H](O)[C@@H](O)C(=O)O");
}

#[test]
fn double_bond_stereo() {
    same("C/C=C/C", "C\\C=C\\C");
    same("C/C=C/C", "C(\\C)=C/C");
    let e = key("C/C=C/C");
    let z = key("C/C=C\\C");
    assert_eq!(e.skeleton, z.skeleton);
    assert_ne!(e.stereo, z.stereo);
    assert_eq!(e.stereo_elements, 1);
    same("F/C=C/F", "F\\C=C\\F");
    // a mark on a double bond with two equal substituents on one end is dropped
    assert_eq!(key("C/C(C)=C/F").stereo_elements, 0);
    // E/Z around explicit hydrogens
    same("C/C=C/C", "C/C(/[H])=C/C");
}

/// SMILES of the shipped base, read once.
fn shipped_smiles() -> &'static Vec<String> {
    static CELL: OnceLock<Vec<String>> = OnceLock::new();
    CELL.get_or_init(|| {
        let bytes = include_bytes!("../../data/kb/compounds.tsv.gz");
        let mut text = String::new();
        flate2::read::GzDecoder::new(&bytes[..])
            .read_to_string(&mut text)
            .unwrap();
        text.lines()
            .skip(1)
            .filter_map(|l| l.split('\t').nth(5))
            .filter(|s| !s.is_empty())
            .step_by(97)
            .map(str::to_string)
            .collect()
    })
}

/// The graph with its atoms renumbered by `perm` (new index of atom i) and its bonds
/// and neighbour lists reordered by `rot`.
fn permuted(g: &MolGraph, perm: &[usize], rot: usize) -> MolGraph {
    let n = g.atoms.len();
    let mut atoms = g.atoms.clone();
    for i in 0..n {
        atoms[perm[i]] = g.atoms[i].clone();
    }
    let m = g.bonds.len();
    let mut bonds = Vec::with_capacity(m);
    for k in 0..m {
        let b = &g.bonds[(k + rot) % m.max(1)];
        let (a, c) = (perm[b.a], perm[b.b]);
        let (a, c) = if (k + rot).is_multiple_of(2) {
            (a, c)
        } else {
            (c, a)
        };
        bonds.push(Bond {
            a,
            b: c,
            order: b.order,
            in_ring: b.in_ring,
        });
    }
    let mut neighbours = vec![Vec::new(); n];
    for (k, b) in bonds.iter().enumerate().rev() {
        neighbours[b.a].push((b.b, k));
        neighbours[b.b].push((b.a, k));
    }
    let map = |x: Option<usize>| x.map(|j| perm[j]);
    let stereo = g
        .stereo
        .iter()
        .map(|s| match *s {
            StereoMark::Tetrahedral {
                centre,
                neighbours,
                anticlockwise,
            } => StereoMark::Tetrahedral {
                centre: perm[centre],
                neighbours: neighbours.map(map),
                anticlockwise,
            },
            StereoMark::DoubleBond {
                a,
                b,
                ref_a,
                ref_b,
                same_side,
            } => StereoMark::DoubleBond {
                a: perm[a],
                b: perm[b],
                ref_a: map(ref_a),
                ref_b: map(ref_b),
                same_side,
            },
        })
        .collect();
    MolGraph {
        atoms,
        bonds,
        neighbours,
        rings: Vec::new(),
        stereo,
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]
    /// Shuffling the atom and bond order of shipped structures never changes either key.
    #[test]
    fn key_is_invariant_under_atom_order(pick in 0usize..100_000, seed in any::<u64>(), rot in 0usize..64) {
        let all = shipped_smiles();
        let smiles = &all[pick % all.len()];
        let Ok(parsed) = parse_smiles(smiles) else { return Ok(()); };
        let g = parsed.graph;
        let n = g.atoms.len();
        // Fisher-Yates with a small LCG (deterministic per case)
        let mut perm: Vec<usize> = (0..n).collect();
        let mut s = seed | 1;
        for i in (1..n).rev() {
            s = s.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1_442_695_040_888_963_407);
            let j = (s >> 33) as usize % (i + 1);
            perm.swap(i, j);
        }
        let before = key_of_graph(&g);
        let after = key_of_graph(&permuted(&g, &perm, rot));
        prop_assert_eq!(&before.skeleton, &after.skeleton, "{}", smiles);
        prop_assert_eq!(&before.stereo, &after.stereo, "{}", smiles);
    }
}

#[test]
fn shipped_structures_mostly_distinct() {
    // Different InChIKey skeletons in the sample should have different keys; a collision
    // here would mean the ranking misses a distinction.
    let all = shipped_smiles();
    let mut seen = std::collections::HashMap::new();
    let mut collisions = Vec::new();
    for s in all {
        if let Ok(k) = structure_key(s)
            && let Some(prev) = seen.insert(k.stereo.clone(), s.clone())
            && prev != *s
        {
            collisions.push((prev, s.clone()));
        }
    }
    // Different records of one molecule (salt vs parent) may collide legitimately; print
    // them for inspection and bound them.
    assert!(collisions.len() * 50 < all.len(), "{collisions:?}");
}

#[test]
fn inorganic_ions_keep_their_charge() {
    differ("[O-]S(=O)(=O)[O-]", "OS(=O)(=O)O");
    same("[O-]S(=O)([O-])=O", "O=S(=O)([O-])[O-]");
    differ("[Na+]", "[Na]");
}

#[test]
fn possible_stereo() {
    let n = |s: &str| possible_stereo_elements(&parse_smiles(s).unwrap().graph);
    assert_eq!(n("CC(N)C(=O)O"), 1); // alanine
    assert_eq!(n("CCO"), 0);
    assert_eq!(n("CC=CC"), 1); // 2-butene
    assert_eq!(n("CC(C)=CC"), 0);
    assert_eq!(n("OC(=O)C(O)C(O)C(=O)O"), 2); // tartaric acid
    assert_eq!(n("c1ccccc1"), 0);
}

/// Oxyanions and oxoacids written hypervalent (`[O-]Cl(=O)=O`, as ion tables write them) or
/// charge-separated (`[O-][Cl+2]([O-])[O-]`, RDKit's output) are one structure; so are
/// sulfoxides, sulfates and phosphates written either way. The pairs are RDKit 2026.09.1
/// readings (`Chem.MolFromSmiles` gives the charge-separated halogen and nitrogen forms and
/// one InChIKey for each pair).
#[test]
fn hypervalent_and_charge_separated_oxo_forms_are_one_structure() {
    // chlorate, perchlorate, chlorite, bromate, iodate, periodate
    same("[O-]Cl(=O)=O", "[O-][Cl+2]([O-])[O-]");
    same("[O-]Cl(=O)(=O)=O", "[O-][Cl+3]([O-])([O-])[O-]");
    same("[O-]Cl=O", "[O-][Cl+][O-]");
    same("[O-]Br(=O)=O", "[O-][Br+2]([O-])[O-]");
    same("[O-]I(=O)=O", "[O-][I+2]([O-])[O-]");
    same("[O-]I(=O)(=O)=O", "[O-][I+3]([O-])([O-])[O-]");
    same("OCl(=O)(=O)=O", "O[Cl+3]([O-])([O-])[O-]");
    // nitrate and nitric acid, a nitro group written without charges
    same("[O-]N(=O)=O", "[O-][N+](=O)[O-]");
    same("ON(=O)=O", "O[N+](=O)[O-]");
    same("CN(=O)=O", "C[N+](=O)[O-]");
    // sulfate, selenate, phosphate, arsenate, DMSO, a sulfone
    same("[O-]S(=O)(=O)[O-]", "[O-][S+2]([O-])([O-])[O-]");
    same("[O-][Se](=O)(=O)[O-]", "[O-][Se+2]([O-])([O-])[O-]");
    same("[O-]P(=O)([O-])[O-]", "[O-][P+]([O-])([O-])[O-]");
    same("[O-][As](=O)([O-])[O-]", "[O-][As+]([O-])([O-])[O-]");
    same("CS(C)=O", "C[S+](C)[O-]");
    same("CS(=O)(=O)c1ccccc1", "C[S+2]([O-])([O-])c1ccccc1");
    // but the anions stay apart from their acids, and N-oxides from amines
    assert_ne!(key("[O-]Cl(=O)=O").stereo, key("OCl(=O)=O").stereo);
    assert_ne!(key("[O-]S(=O)(=O)[O-]").stereo, key("OS(=O)(=O)O").stereo);
    differ("C[N+](C)(C)[O-]", "CN(C)C");
    // formula and charge survive the clean-up of the hypervalent form
    let p = parse_smiles("[O-]Cl(=O)=O").expect("chlorate parses");
    let charge: i32 = p
        .graph
        .atoms
        .iter()
        .map(|a| i32::from(a.formal_charge))
        .sum();
    assert_eq!(charge, -1);
    assert_eq!(p.graph.atoms.len(), 4);
}
