//! Stereo marks of the input (part of the SMILES adapter: it reads the SMILES crate's
//! parsed stereo and turns it into [`StereoMark`]s over the project's graph).
//!
//! Only the marks as written are read here, with the parity relative to named
//! neighbours; whether a centre or double bond is stereogenic is decided by
//! `structure::canon` from the canonical atom classes.

use smiles_rs::Smiles;
use smiles_rs::bond::Bond as RawBond;

use crate::structure::graph::StereoMark;

/// Stereo marks of the kept fragment. `local[i]` maps a raw atom to the graph
/// (`usize::MAX` when not kept); `removed[i]` marks hydrogen atoms folded into
/// their neighbour's count.
pub(super) fn marks(raw: &Smiles, local: &[usize], removed: &[bool]) -> Vec<StereoMark> {
    let n = raw.nodes().len();
    let mut out = Vec::new();
    let map = |j: usize| -> Option<Option<usize>> {
        if removed.get(j).copied().unwrap_or(false) {
            Some(None)
        } else {
            let l = *local.get(j)?;
            (l != usize::MAX).then_some(Some(l))
        }
    };
    // Tetrahedral centres.
    for (i, &li) in local.iter().enumerate().take(n) {
        if raw.nodes()[i].chirality().is_none() || li == usize::MAX {
            continue;
        }
        let mut raw_nb: Vec<Option<usize>> = raw
            .edges_for_node(i)
            .filter_map(|e| e.other(i))
            .map(Some)
            .collect();
        for _ in 0..raw.nodes()[i].hydrogen_count() {
            raw_nb.push(None);
        }
        let Ok(four) = <[Option<usize>; 4]>::try_from(raw_nb) else {
            continue;
        };
        let Some(anticlockwise) = raw.tetrahedral_neighbors_anticlockwise(i, four) else {
            continue;
        };
        let mut neighbours = [None; 4];
        let mut ok = true;
        for (slot, nb) in four.iter().enumerate() {
            neighbours[slot] = match nb {
                None => None,
                Some(j) => match map(*j) {
                    Some(x) => x,
                    None => {
                        ok = false;
                        None
                    }
                },
            };
        }
        if ok && neighbours.iter().filter(|x| x.is_none()).count() <= 1 {
            out.push(StereoMark::Tetrahedral {
                centre: li,
                neighbours,
                anticlockwise,
            });
        }
    }
    // Double bonds next to a directional single bond.
    let directional = |i: usize| {
        raw.edges_for_node(i)
            .any(|e| matches!(e.bond(), RawBond::Up | RawBond::Down))
    };
    for (i, &li) in local.iter().enumerate().take(n) {
        if li == usize::MAX {
            continue;
        }
        for e in raw.edges_for_node(i) {
            let Some(j) = e.other(i) else { continue };
            if j <= i || !matches!(e.bond(), RawBond::Double) {
                continue;
            }
            if !directional(i) || !directional(j) {
                continue;
            }
            // each call below works out every stereo double bond of the molecule: the
            // configuration is asked for only when the bond has reference atoms
            let Some((ra, rb)) = raw.double_bond_stereo_atoms(i, j) else {
                continue;
            };
            let Some(config) = raw.double_bond_stereo_config(i, j) else {
                continue;
            };
            let (Some(Some(a)), Some(Some(b)), Some(ref_a), Some(ref_b)) =
                (map(i), map(j), map(ra), map(rb))
            else {
                continue;
            };
            out.push(StereoMark::DoubleBond {
                a,
                b,
                ref_a,
                ref_b,
                same_side: config == smiles_rs::DoubleBondStereoConfig::Z,
            });
        }
    }
    out
}
