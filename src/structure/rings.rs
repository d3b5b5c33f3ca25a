//! Ring perception on the parsed graph, before any chemistry: which bonds lie on a cycle,
//! which atoms are ring atoms, and the rings of every ring system that is a single cycle.
//!
//! A bond is a ring bond exactly when it is not a bridge of the graph, and the ring systems are
//! the graph's blocks (biconnected components) with more than one bond. Both come from one
//! depth-first search (Hopcroft & Tarjan, Commun. ACM 16 (1973) 372, "Algorithm 447"; the
//! edge-stack form as in Cormen et al., *Introduction to Algorithms*, problem 22-2; from
//! memory). A block with as many bonds as atoms is one simple cycle, and then its cycle is the
//! only ring any ring definition can give: smallest set of smallest rings, RDKit's symmetrized
//! SSSR and the set of relevant cycles all coincide there. Spiro rings are separate blocks and
//! stay simple. Fused and bridged systems (a block with more bonds than atoms) need a real
//! smallest-set-of-smallest-rings search, which the adapter leaves to the SMILES crate; this
//! module only says that it is needed ([`RingPerception::simple_cycles`] is `None`).
//!
//! Why it exists: the SMILES crate computes ring membership and the symmetrized SSSR again each
//! time it is asked (about a fifth of the time of describing a molecule); for the most common
//! molecules, with isolated rings only, this search is exact and costs one pass over the bonds.

/// What one depth-first search finds about the rings of a graph.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RingPerception {
    /// Per edge (in the order given): does it lie on a cycle?
    pub bond_in_ring: Vec<bool>,
    /// Per atom: is it on a cycle?
    pub atom_in_ring: Vec<bool>,
    /// The cycle of every ring system, as atoms in cycle order (each ring starting at its
    /// lowest atom index, going first to the lower-numbered of its two ring neighbours), rings
    /// sorted by their atom lists. A fused or bridged system (more independent cycles than
    /// one) gives its rings when its smallest set of smallest rings is unique and it has at
    /// most [`MAX_ENUMERATED_CYCLOMATIC`] independent cycles; `None` when some system is
    /// larger or has interchangeable smallest rings, or two atoms share more than one edge.
    pub simple_cycles: Option<Vec<Vec<usize>>>,
}

/// Perceives the rings of the graph with `atom_count` atoms and the undirected `edges`.
///
/// Edges naming an atom outside `0..atom_count` are ignored.
///
/// # Examples
/// ```
/// use phasewise::structure::rings::perceive;
/// // Spiro[2.2]pentane: two three-membered rings sharing atom 2.
/// let edges = [(0, 1), (1, 2), (2, 0), (2, 3), (3, 4), (4, 2)];
/// let rings = perceive(5, &edges);
/// assert!(rings.bond_in_ring.iter().all(|&r| r));
/// assert_eq!(rings.simple_cycles, Some(vec![vec![0, 1, 2], vec![2, 3, 4]]));
/// // Bicyclo[1.1.0]butane: two three-membered rings; the four-membered envelope is their sum.
/// let fused = perceive(4, &[(0, 1), (1, 2), (2, 0), (2, 3), (3, 0)]);
/// assert_eq!(fused.simple_cycles, Some(vec![vec![0, 1, 2], vec![0, 2, 3]]));
/// ```
pub fn perceive(atom_count: usize, edges: &[(usize, usize)]) -> RingPerception {
    const UNSEEN: usize = usize::MAX;
    let adjacency = Adjacency::new(atom_count, edges);
    let mut bond_in_ring = vec![false; edges.len()];
    let mut atom_in_ring = vec![false; atom_count];
    let mut cycles: Vec<Vec<usize>> = Vec::new();
    let mut all_simple = true;

    let mut discovered = vec![UNSEEN; atom_count];
    let mut low = vec![0usize; atom_count];
    let mut timer = 0usize;
    // (atom, edge it was reached by, next adjacency position)
    let mut stack: Vec<(usize, usize, usize)> = Vec::new();
    let mut edge_stack: Vec<usize> = Vec::new();
    let mut block: Vec<usize> = Vec::new();
    for root in 0..atom_count {
        if discovered[root] != UNSEEN {
            continue;
        }
        discovered[root] = timer;
        low[root] = timer;
        timer += 1;
        stack.push((root, UNSEEN, 0));
        while let Some(top) = stack.last_mut() {
            let (v, via, next) = *top;
            if let Some(&(w, e)) = adjacency.of(v).get(next) {
                top.2 += 1;
                if e == via {
                    continue;
                }
                if discovered[w] == UNSEEN {
                    edge_stack.push(e);
                    discovered[w] = timer;
                    low[w] = timer;
                    timer += 1;
                    stack.push((w, e, 0));
                } else if discovered[w] < discovered[v] {
                    // Back edge to an ancestor.
                    edge_stack.push(e);
                    low[v] = low[v].min(discovered[w]);
                }
                continue;
            }
            stack.pop();
            let Some(&(u, _, _)) = stack.last() else {
                continue;
            };
            low[u] = low[u].min(low[v]);
            if low[v] < discovered[u] {
                continue;
            }
            // `u` separates the block containing edge `via` (u–v): pop it.
            block.clear();
            while let Some(e) = edge_stack.pop() {
                block.push(e);
                if e == via {
                    break;
                }
            }
            if block.len() < 2 {
                continue; // a bridge
            }
            for &e in &block {
                bond_in_ring[e] = true;
                atom_in_ring[edges[e].0] = true;
                atom_in_ring[edges[e].1] = true;
            }
            if all_simple {
                match block_cycle(edges, &block) {
                    Some(cycle) => cycles.push(cycle),
                    None => match relevant_cycles(edges, &block) {
                        Some(found) => cycles.extend(found),
                        None => all_simple = false,
                    },
                }
            }
        }
    }
    let simple_cycles = all_simple.then(|| {
        cycles.sort_unstable();
        cycles
    });
    RingPerception {
        bond_in_ring,
        atom_in_ring,
        simple_cycles,
    }
}

/// Largest number of independent cycles (bonds − atoms + 1) of a fused or bridged ring system
/// whose rings are found here by enumerating its cycle space (2^c − 1 edge sets); larger systems
/// go to the SMILES crate. Steroids have 4, cubane 5. Common practice, no source.
pub const MAX_ENUMERATED_CYCLOMATIC: usize = 8;

/// The rings of a fused or bridged block when its smallest set of smallest rings is unique.
///
/// The relevant cycles (Vismara, Electron. J. Combin. 4 (1997) R9: the cycles that are not a
/// sum, over GF(2), of strictly shorter cycles) are the union of all minimum cycle bases. When
/// there are exactly as many as independent cycles, the minimum cycle basis is unique, so every
/// SSSR search finds it and RDKit's symmetrization has no equally small alternative to add:
/// the set is RDKit's ring set (naphthalene, indole, steroids). Otherwise (bicyclo[2.2.2]octane,
/// cubane, adamantane) `None`, as when the block has more than 128 bonds, more than
/// [`MAX_ENUMERATED_CYCLOMATIC`] independent cycles, or is not a block of a simple graph.
fn relevant_cycles(edges: &[(usize, usize)], block: &[usize]) -> Option<Vec<Vec<usize>>> {
    let m = block.len();
    if m > 128 {
        return None;
    }
    // Local atom numbering, in increasing global index.
    let mut atoms: Vec<usize> = block
        .iter()
        .flat_map(|&e| [edges[e].0, edges[e].1])
        .collect();
    atoms.sort_unstable();
    atoms.dedup();
    let v = atoms.len();
    if m < v + 1 || m - v + 1 > MAX_ENUMERATED_CYCLOMATIC {
        return None;
    }
    let local = |x: usize| atoms.binary_search(&x).ok();
    let mut ends: Vec<(usize, usize)> = Vec::with_capacity(m);
    for &e in block {
        ends.push((local(edges[e].0)?, local(edges[e].1)?));
    }
    let incident = Adjacency::new(v, &ends);
    // Spanning tree by breadth-first search; `path[x]` = tree edges from the root to x.
    let mut path: Vec<Option<u128>> = vec![None; v];
    let mut tree = 0u128;
    path[0] = Some(0);
    let mut queue = std::collections::VecDeque::from([0usize]);
    while let Some(x) = queue.pop_front() {
        let px = path[x]?;
        for &(y, k) in incident.of(x) {
            if path[y].is_none() {
                path[y] = Some(px | 1 << k);
                tree |= 1 << k;
                queue.push_back(y);
            }
        }
    }
    let mut fundamental: Vec<u128> = Vec::new();
    for (k, &(a, b)) in ends.iter().enumerate() {
        if tree >> k & 1 == 0 {
            fundamental.push(path[a]? ^ path[b]? | 1 << k);
        }
    }
    if fundamental.len() != m - v + 1 {
        return None;
    }
    // Every element of the cycle space that is one simple cycle.
    let mut found: Vec<u128> = Vec::new();
    let mut degree = vec![0u8; v];
    // Gray-code order: each element differs from the previous one by one fundamental cycle.
    let mut set = 0u128;
    for step in 1u32..(1u32 << fundamental.len()) {
        set ^= fundamental[step.trailing_zeros() as usize];
        if is_simple_cycle(set, &ends, &incident, &mut degree) {
            found.push(set);
        }
    }
    found.sort_unstable_by_key(|s| (s.count_ones(), *s));
    // Relevant: not in the span of the strictly shorter cycles (Gaussian elimination on the
    // edge sets, basis kept with distinct leading bits).
    let mut basis: Vec<u128> = Vec::new();
    let reduce = |basis: &[u128], mut x: u128| {
        for &b in basis {
            let lead = 127 - b.leading_zeros();
            if x >> lead & 1 == 1 {
                x ^= b;
            }
        }
        x
    };
    let mut relevant: Vec<u128> = Vec::new();
    let mut i = 0;
    while i < found.len() {
        let len = found[i].count_ones();
        let j = found[i..]
            .iter()
            .position(|s| s.count_ones() != len)
            .map_or(found.len(), |p| i + p);
        for &c in &found[i..j] {
            if reduce(&basis, c) != 0 {
                relevant.push(c);
            }
        }
        for &c in &found[i..j] {
            let r = reduce(&basis, c);
            if r != 0 {
                basis.push(r);
                basis.sort_unstable_by(|a, b| b.cmp(a));
            }
        }
        i = j;
    }
    // More relevant cycles than independent ones: several minimum cycle bases exist, and which
    // of the interchangeable rings RDKit's symmetrization adds depends on its search order (15
    // cages of the shipped knowledge base get more relevant cycles than RDKit rings). Those
    // systems are left to the SMILES crate's reproduction of RDKit's search.
    if relevant.len() != fundamental.len() {
        return None;
    }
    let mut out = Vec::with_capacity(relevant.len());
    for set in relevant {
        let ring_edges: Vec<usize> = (0..m)
            .filter(|&k| set >> k & 1 == 1)
            .map(|k| block[k])
            .collect();
        out.push(block_cycle(edges, &ring_edges)?);
    }
    Some(out)
}

/// Is the edge set `set` (over `ends`) one simple cycle: every touched atom on exactly two of
/// its edges, all of them connected? `degree` is scratch space of the block's size.
fn is_simple_cycle(
    set: u128,
    ends: &[(usize, usize)],
    incident: &Adjacency,
    degree: &mut [u8],
) -> bool {
    let mut first = usize::MAX;
    let mut bits = set;
    while bits != 0 {
        let k = bits.trailing_zeros() as usize;
        bits &= bits - 1;
        let (a, b) = ends[k];
        degree[a] += 1;
        degree[b] += 1;
        first = first.min(a);
    }
    // Check the touched atoms and clear them for the next call.
    let mut two_each = true;
    let mut bits = set;
    while bits != 0 {
        let k = bits.trailing_zeros() as usize;
        bits &= bits - 1;
        let (a, b) = ends[k];
        two_each &= degree[a] == 2 || degree[a] == 0;
        two_each &= degree[b] == 2 || degree[b] == 0;
        degree[a] = 0;
        degree[b] = 0;
    }
    if first == usize::MAX || !two_each {
        return false;
    }
    // Walk the cycle from `first`; it must use every edge of the set.
    let (mut prev_edge, mut cur, mut steps) = (usize::MAX, first, 0u32);
    loop {
        let Some(&(next, k)) = incident
            .of(cur)
            .iter()
            .find(|&&(_, k)| set >> k & 1 == 1 && k != prev_edge)
        else {
            return false;
        };
        steps += 1;
        prev_edge = k;
        cur = next;
        if cur == first {
            break;
        }
        if steps > set.count_ones() {
            return false;
        }
    }
    steps == set.count_ones()
}

/// Neighbours of every atom in one flat array (compressed rows): (neighbour, edge index).
struct Adjacency {
    start: Vec<usize>,
    entries: Vec<(usize, usize)>,
}

impl Adjacency {
    /// Self-loops and edges naming an atom outside `0..atom_count` are left out.
    fn new(atom_count: usize, edges: &[(usize, usize)]) -> Adjacency {
        let usable = |a: usize, b: usize| a < atom_count && b < atom_count && a != b;
        let mut start = vec![0usize; atom_count + 1];
        for &(a, b) in edges {
            if usable(a, b) {
                start[a + 1] += 1;
                start[b + 1] += 1;
            }
        }
        for i in 0..atom_count {
            start[i + 1] += start[i];
        }
        let mut fill = start.clone();
        let mut entries = vec![(0, 0); start[atom_count]];
        for (e, &(a, b)) in edges.iter().enumerate() {
            if usable(a, b) {
                entries[fill[a]] = (b, e);
                fill[a] += 1;
                entries[fill[b]] = (a, e);
                fill[b] += 1;
            }
        }
        Adjacency { start, entries }
    }

    fn of(&self, atom: usize) -> &[(usize, usize)] {
        &self.entries[self.start[atom]..self.start[atom + 1]]
    }
}

/// The atoms of a block in cycle order when the block is one simple cycle (as many distinct
/// atoms as edges, each atom on exactly two of its edges, at least three edges).
fn block_cycle(edges: &[(usize, usize)], block: &[usize]) -> Option<Vec<usize>> {
    if block.len() < 3 {
        return None;
    }
    // (atom, its two neighbours in the block)
    let mut ends: Vec<(usize, [usize; 2], u8)> = Vec::with_capacity(block.len());
    for &e in block {
        let (a, b) = edges[e];
        for (x, y) in [(a, b), (b, a)] {
            match ends.iter_mut().find(|(atom, _, _)| *atom == x) {
                Some((_, n, count)) => {
                    if *count >= 2 {
                        return None;
                    }
                    n[usize::from(*count)] = y;
                    *count += 1;
                }
                None => ends.push((x, [y, usize::MAX], 1)),
            }
        }
    }
    if ends.len() != block.len() || ends.iter().any(|&(_, _, c)| c != 2) {
        return None;
    }
    ends.sort_unstable_by_key(|&(atom, _, _)| atom);
    let neighbours = |x: usize| -> Option<[usize; 2]> {
        ends.binary_search_by_key(&x, |&(atom, _, _)| atom)
            .ok()
            .map(|i| ends[i].1)
    };
    let start = ends[0].0;
    let [n1, n2] = ends[0].1;
    let mut cycle = Vec::with_capacity(block.len());
    cycle.push(start);
    let (mut prev, mut cur) = (start, n1.min(n2));
    while cur != start {
        if cycle.len() >= block.len() {
            return None;
        }
        cycle.push(cur);
        let [a, b] = neighbours(cur)?;
        let next = if a == prev { b } else { a };
        prev = cur;
        cur = next;
    }
    (cycle.len() == block.len()).then_some(cycle)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn chains_and_trees_have_no_rings() {
        let r = perceive(4, &[(0, 1), (1, 2), (1, 3)]);
        assert_eq!(r.bond_in_ring, vec![false; 3]);
        assert_eq!(r.atom_in_ring, vec![false; 4]);
        assert_eq!(r.simple_cycles, Some(vec![]));
    }

    #[test]
    fn isolated_rings_with_substituents_and_linkers() {
        // Biphenyl-like: two 4-rings joined by the bridge 3–4, with a tail 7–8.
        let edges = [
            (0, 1),
            (1, 2),
            (2, 3),
            (3, 0),
            (3, 4),
            (4, 5),
            (5, 6),
            (6, 7),
            (7, 4),
            (7, 8),
        ];
        let r = perceive(9, &edges);
        assert_eq!(
            r.bond_in_ring,
            vec![true, true, true, true, false, true, true, true, true, false]
        );
        assert!(!r.atom_in_ring[8]);
        assert_eq!(
            r.simple_cycles,
            Some(vec![vec![0, 1, 2, 3], vec![4, 5, 6, 7]])
        );
    }

    #[test]
    fn fused_systems_with_a_unique_smallest_ring_set_are_solved_here() {
        // Naphthalene skeleton: two 6-rings sharing the bond 0–5; the 10-ring envelope is their
        // sum and not relevant (RDKit: 2 rings; from memory).
        let naphthalene = [
            (0, 1),
            (1, 2),
            (2, 3),
            (3, 4),
            (4, 5),
            (5, 0),
            (5, 6),
            (6, 7),
            (7, 8),
            (8, 9),
            (9, 0),
        ];
        let r = perceive(10, &naphthalene);
        assert!(r.bond_in_ring.iter().all(|&x| x));
        assert_eq!(
            r.simple_cycles,
            Some(vec![vec![0, 1, 2, 3, 4, 5], vec![0, 5, 6, 7, 8, 9]])
        );
        // Bicyclo[2.2.2]octane: three equal bridges, so all three 6-rings are relevant but only
        // two are independent: interchangeable smallest rings, left to the crate's search.
        let bco = [
            (0, 1),
            (1, 2),
            (2, 3),
            (3, 4),
            (4, 5),
            (5, 0),
            (0, 6),
            (6, 7),
            (7, 3),
        ];
        let r = perceive(8, &bco);
        assert!(r.bond_in_ring.iter().all(|&x| x));
        assert_eq!(r.simple_cycles, None);
        // Cubane: six relevant 4-rings (each the sum of the other five, none of shorter ones),
        // five independent: also left to the crate.
        let cubane = [
            (0, 1),
            (1, 2),
            (2, 3),
            (3, 0),
            (4, 5),
            (5, 6),
            (6, 7),
            (7, 4),
            (0, 4),
            (1, 5),
            (2, 6),
            (3, 7),
        ];
        assert_eq!(perceive(8, &cubane).simple_cycles, None);
        // A steroid skeleton (6-6-6-5, cyclopenta[a]phenanthrene): four unique rings.
        let steroid = [
            (0, 1),
            (1, 2),
            (2, 3),
            (3, 4),
            (4, 5),
            (5, 0),
            (4, 6),
            (6, 7),
            (7, 8),
            (8, 9),
            (9, 3),
            (8, 10),
            (10, 11),
            (11, 12),
            (12, 13),
            (13, 9),
            (12, 14),
            (14, 15),
            (15, 16),
            (16, 13),
        ];
        let rings = perceive(17, &steroid).simple_cycles.unwrap_or_default();
        let sizes: Vec<usize> = rings.iter().map(Vec::len).collect();
        assert_eq!(sizes, vec![6, 6, 6, 5]);
    }

    #[test]
    fn large_ring_systems_and_multigraph_input_are_left_to_the_full_search() {
        // A ladder of 9 fused 4-rings has 9 independent cycles, over the enumeration limit.
        let mut ladder = Vec::new();
        for i in 0..10 {
            ladder.push((2 * i, 2 * i + 1));
            if i < 9 {
                ladder.push((2 * i, 2 * i + 2));
                ladder.push((2 * i + 1, 2 * i + 3));
            }
        }
        let r = perceive(20, &ladder);
        assert!(r.bond_in_ring.iter().all(|&x| x));
        assert_eq!(r.simple_cycles, None);
        // Eight fused 4-rings are enumerated: 8 rings.
        let r = perceive(18, &ladder[..ladder.len() - 3]);
        assert_eq!(r.simple_cycles.map(|c| c.len()), Some(8));
        // Two edges between the same atoms.
        let r = perceive(2, &[(0, 1), (0, 1)]);
        assert_eq!(r.simple_cycles, None);
        // Self-loops and edges outside the atom range are ignored.
        let r = perceive(2, &[(0, 0), (0, 7), (0, 1)]);
        assert_eq!(r.bond_in_ring, vec![false, false, false]);
    }

    #[test]
    fn deep_graphs_do_not_overflow_the_stack() {
        // A 100,000-atom ring: the search is iterative.
        let n = 100_000;
        let edges: Vec<(usize, usize)> = (0..n).map(|i| (i, (i + 1) % n)).collect();
        let r = perceive(n, &edges);
        let cycles = r.simple_cycles.unwrap_or_default();
        assert_eq!(cycles.len(), 1);
        assert_eq!(cycles[0].len(), n);
        assert_eq!(cycles[0][..3], [0, 1, 2]);
    }
}
