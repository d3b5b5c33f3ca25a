//! A small SMARTS matcher over [`MolGraph`], enough for the published atom-type
//! and feature definitions the descriptors use (Wildman–Crippen types, RDKit's
//! H-bond donor/acceptor and rotatable-bond patterns).
//!
//! Supported (Daylight SMARTS theory manual semantics, as RDKit implements
//! them on a hydrogen-suppressed molecule): atoms `*`, `a`, `A`, organic
//! symbols (upper case aliphatic, lower case aromatic), `#n`, `H n` (total H
//! count), `D n` (explicit degree), `X n` (total connections), `v n` (total
//! valence), `R`/`R0` (ring membership), charges `+`, `+n`, `-`, `-n`,
//! recursive `$(...)`, the operators `!`, `&`, `,`, `;`; bonds `-`, `=`, `#`,
//! `:`, `~`, `@` with the same operators (an unwritten bond means "single or
//! aromatic"); branches. Ring closures are not supported (no pattern here
//! needs them) and are reported as an error when a pattern is compiled.
//! Patterns are compiled once, in code, from constant strings.

use super::graph::{BondOrder, MolGraph};

/// A compiled SMARTS pattern (a tree of atom and bond queries).
#[derive(Debug, Clone)]
pub struct Pattern {
    atoms: Vec<AtomQuery>,
    /// For atom `k > 0`: (parent index, bond query to the parent).
    parents: Vec<(usize, BondQuery)>,
    /// First primitive test that must hold for the root (cheap pre-filter):
    /// required atomic number, if the root fixes one.
    root_element: Option<u8>,
    /// Required aromaticity of the root, if the root fixes it.
    root_aromatic: Option<bool>,
}

#[derive(Debug, Clone)]
enum AtomQuery {
    True,
    Not(Box<AtomQuery>),
    And(Vec<AtomQuery>),
    Or(Vec<AtomQuery>),
    Element { z: u8, aromatic: Option<bool> },
    Aromatic(bool),
    TotalH(u32),
    Degree(u32),
    Connections(u32),
    Valence(u32),
    InRing(bool),
    Charge(i32),
    Recursive(Box<Pattern>),
}

#[derive(Debug, Clone)]
enum BondQuery {
    Default,
    Not(Box<BondQuery>),
    And(Vec<BondQuery>),
    Or(Vec<BondQuery>),
    Order(BondOrder),
    Any,
    Ring,
}

/// Why a pattern string could not be compiled (a programming error in a
/// constant pattern; surfaced by the unit tests).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PatternError {
    /// The pattern.
    pub pattern: String,
    /// Byte position.
    pub position: usize,
}

impl Pattern {
    /// Compiles a SMARTS string.
    ///
    /// # Errors
    /// [`PatternError`] with the position of the first unsupported or malformed token.
    pub fn new(smarts: &str) -> Result<Pattern, PatternError> {
        let mut p = Parser {
            s: smarts.as_bytes(),
            i: 0,
            bracket_start: usize::MAX,
            src: smarts,
        };
        let pat = p.pattern()?;
        if p.i != p.s.len() {
            return Err(p.err());
        }
        Ok(pat)
    }

    /// Does the pattern match with its first atom on `atom`?
    ///
    /// For many calls on one molecule, [`Pattern::matches_at_with`] with [`AtomFacts`]
    /// computed once is faster.
    pub fn matches_at(&self, g: &MolGraph, atom: usize) -> bool {
        self.matches_in(&Ctx { g, facts: None }, atom)
    }

    /// As [`Pattern::matches_at`] on the molecule of `facts`, reading hydrogen counts and
    /// valences from them.
    pub fn matches_at_with(&self, facts: &AtomFacts<'_>, atom: usize) -> bool {
        self.matches_in(&Ctx::with(facts), atom)
    }

    /// For a two-atom pattern: the number of `bonds` it matches (in either direction), each
    /// atom test made at most once per atom and end of the pattern.
    pub fn count_bond_matches(
        &self,
        facts: &AtomFacts<'_>,
        bonds: impl Iterator<Item = usize>,
    ) -> usize {
        if self.atoms.len() != 2 {
            return 0;
        }
        let ctx = Ctx::with(facts);
        let g = facts.graph;
        let q = &self.parents[1].1;
        // Per atom and pattern end: 0 unknown, 1 no, 2 yes.
        let mut memo = vec![[0u8; 2]; g.atoms.len()];
        let mut end = |k: usize, i: usize| -> bool {
            if memo[i][k] == 0 {
                memo[i][k] = if atom_ok(&self.atoms[k], &ctx, i) {
                    2
                } else {
                    1
                };
            }
            memo[i][k] == 2
        };
        bonds
            .filter(|&b| {
                let (x, y) = (g.bonds[b].a, g.bonds[b].b);
                bond_ok(q, g, b) && ((end(0, x) && end(1, y)) || (end(0, y) && end(1, x)))
            })
            .count()
    }

    fn matches_in(&self, ctx: &Ctx<'_>, atom: usize) -> bool {
        let g = ctx.g;
        if let Some(z) = self.root_element
            && g.atoms[atom].atomic_number != z
        {
            return false;
        }
        if let Some(ar) = self.root_aromatic
            && g.atoms[atom].aromatic != ar
        {
            return false;
        }
        if !atom_ok(&self.atoms[0], ctx, atom) {
            return false;
        }
        // Patterns are small: map on the stack when it fits.
        let n = self.atoms.len();
        if n == 1 {
            return true;
        }
        if n <= 16 {
            let mut map = [usize::MAX; 16];
            map[0] = atom;
            self.extend(ctx, &mut map[..n], 1)
        } else {
            let mut map = vec![usize::MAX; n];
            map[0] = atom;
            self.extend(ctx, &mut map, 1)
        }
    }

    /// The atomic number the first atom requires, when it requires one
    /// (lets callers skip patterns that cannot match an element).
    pub fn root_element(&self) -> Option<u8> {
        self.root_element
    }

    /// Number of atoms in the pattern.
    pub fn len(&self) -> usize {
        self.atoms.len()
    }

    /// Whether the pattern is empty (never, once compiled).
    pub fn is_empty(&self) -> bool {
        self.atoms.is_empty()
    }

    /// For a two-atom pattern: does it match the bond `bond` in either direction?
    pub fn matches_bond(&self, g: &MolGraph, bond: usize) -> bool {
        if self.atoms.len() != 2 {
            return false;
        }
        let b = &g.bonds[bond];
        let q = &self.parents[1].1;
        if !bond_ok(q, g, bond) {
            return false;
        }
        let ctx = Ctx { g, facts: None };
        (atom_ok(&self.atoms[0], &ctx, b.a) && atom_ok(&self.atoms[1], &ctx, b.b))
            || (atom_ok(&self.atoms[0], &ctx, b.b) && atom_ok(&self.atoms[1], &ctx, b.a))
    }

    fn extend(&self, ctx: &Ctx<'_>, map: &mut [usize], k: usize) -> bool {
        if k == self.atoms.len() {
            return true;
        }
        let g = ctx.g;
        let (parent, ref bq) = self.parents[k];
        let from = map[parent];
        for &(n, b) in &g.neighbours[from] {
            if map[..k].contains(&n) {
                continue;
            }
            if bond_ok(bq, g, b) && atom_ok(&self.atoms[k], ctx, n) {
                map[k] = n;
                if self.extend(ctx, map, k + 1) {
                    return true;
                }
                map[k] = usize::MAX;
            }
        }
        false
    }
}

/// Per-atom values that SMARTS primitives read again and again (total hydrogens, total
/// valence), computed once for a molecule. Typing one molecule's atoms against the
/// Wildman–Crippen table evaluates each of them dozens of times.
/// The facts keep the molecule they describe, so they cannot be read for another one.
#[derive(Debug, Clone)]
pub struct AtomFacts<'a> {
    graph: &'a MolGraph,
    total_h: Vec<u32>,
    valence: Vec<u32>,
}

impl<'a> AtomFacts<'a> {
    /// The facts of every atom of `g`.
    pub fn new(g: &'a MolGraph) -> AtomFacts<'a> {
        let n = g.atoms.len();
        AtomFacts {
            graph: g,
            total_h: (0..n).map(|i| g.total_hydrogens(i)).collect(),
            valence: (0..n).map(|i| g.total_valence(i)).collect(),
        }
    }

    /// The molecule these facts describe.
    pub fn graph(&self) -> &'a MolGraph {
        self.graph
    }
}

/// The molecule being matched, with its precomputed facts when the caller has them.
struct Ctx<'a> {
    g: &'a MolGraph,
    facts: Option<&'a AtomFacts<'a>>,
}

impl<'a> Ctx<'a> {
    fn with(facts: &'a AtomFacts<'a>) -> Ctx<'a> {
        Ctx {
            g: facts.graph,
            facts: Some(facts),
        }
    }

    fn total_h(&self, i: usize) -> u32 {
        self.facts
            .map_or_else(|| self.g.total_hydrogens(i), |f| f.total_h[i])
    }

    fn valence(&self, i: usize) -> u32 {
        self.facts
            .map_or_else(|| self.g.total_valence(i), |f| f.valence[i])
    }
}

fn atom_ok(q: &AtomQuery, ctx: &Ctx<'_>, i: usize) -> bool {
    let g = ctx.g;
    let a = &g.atoms[i];
    match q {
        AtomQuery::True => true,
        AtomQuery::Not(x) => !atom_ok(x, ctx, i),
        AtomQuery::And(v) => v.iter().all(|x| atom_ok(x, ctx, i)),
        AtomQuery::Or(v) => v.iter().any(|x| atom_ok(x, ctx, i)),
        AtomQuery::Element { z, aromatic } => {
            a.atomic_number == *z && aromatic.is_none_or(|ar| ar == a.aromatic)
        }
        AtomQuery::Aromatic(ar) => a.aromatic == *ar,
        AtomQuery::TotalH(h) => ctx.total_h(i) == *h,
        AtomQuery::Degree(d) => g.degree(i) as u32 == *d,
        AtomQuery::Connections(x) => g.degree(i) as u32 + u32::from(a.hydrogens) == *x,
        AtomQuery::Valence(v) => ctx.valence(i) == *v,
        AtomQuery::InRing(r) => a.in_ring == *r,
        AtomQuery::Charge(c) => i32::from(a.formal_charge) == *c,
        AtomQuery::Recursive(p) => p.matches_in(ctx, i),
    }
}

fn bond_ok(q: &BondQuery, g: &MolGraph, b: usize) -> bool {
    let bond = &g.bonds[b];
    match q {
        BondQuery::Default => matches!(bond.order, BondOrder::Single | BondOrder::Aromatic),
        BondQuery::Not(x) => !bond_ok(x, g, b),
        BondQuery::And(v) => v.iter().all(|x| bond_ok(x, g, b)),
        BondQuery::Or(v) => v.iter().any(|x| bond_ok(x, g, b)),
        BondQuery::Order(o) => bond.order == *o,
        BondQuery::Any => true,
        BondQuery::Ring => bond.in_ring,
    }
}

struct Parser<'a> {
    s: &'a [u8],
    i: usize,
    bracket_start: usize,
    src: &'a str,
}

impl Parser<'_> {
    fn err(&self) -> PatternError {
        PatternError {
            pattern: self.src.to_string(),
            position: self.i,
        }
    }

    fn peek(&self) -> Option<u8> {
        self.s.get(self.i).copied()
    }

    fn pattern(&mut self) -> Result<Pattern, PatternError> {
        let mut atoms = Vec::new();
        let mut parents = vec![(usize::MAX, BondQuery::Default)];
        atoms.push(self.atom()?);
        self.chain(&mut atoms, &mut parents, 0)?;
        let root_element = root_element(&atoms[0]);
        let root_aromatic = root_aromatic(&atoms[0]);
        Ok(Pattern {
            atoms,
            parents,
            root_element,
            root_aromatic,
        })
    }

    /// Parses what follows atom `prev` until the end of a branch or the pattern.
    fn chain(
        &mut self,
        atoms: &mut Vec<AtomQuery>,
        parents: &mut Vec<(usize, BondQuery)>,
        mut prev: usize,
    ) -> Result<(), PatternError> {
        loop {
            match self.peek() {
                None | Some(b')') => return Ok(()),
                Some(b'(') => {
                    self.i += 1;
                    let bond = self.bond()?;
                    atoms.push(self.atom()?);
                    parents.push((prev, bond));
                    let idx = atoms.len() - 1;
                    self.chain(atoms, parents, idx)?;
                    if self.peek() != Some(b')') {
                        return Err(self.err());
                    }
                    self.i += 1;
                }
                Some(c) if c.is_ascii_digit() || c == b'%' => return Err(self.err()),
                Some(_) => {
                    let bond = self.bond()?;
                    atoms.push(self.atom()?);
                    parents.push((prev, bond));
                    prev = atoms.len() - 1;
                }
            }
        }
    }

    fn bond(&mut self) -> Result<BondQuery, PatternError> {
        let start = self.i;
        let q = self.bond_low()?;
        if self.i == start {
            return Ok(BondQuery::Default);
        }
        Ok(q)
    }

    // ';' lowest, then ',', then '&'/implicit, then '!'
    fn bond_low(&mut self) -> Result<BondQuery, PatternError> {
        let mut parts = vec![self.bond_or()?];
        while self.peek() == Some(b';') {
            self.i += 1;
            parts.push(self.bond_or()?);
        }
        Ok(if parts.len() == 1 {
            parts.remove(0)
        } else {
            BondQuery::And(parts)
        })
    }

    fn bond_or(&mut self) -> Result<BondQuery, PatternError> {
        let mut parts = vec![self.bond_and()?];
        while self.peek() == Some(b',') {
            self.i += 1;
            parts.push(self.bond_and()?);
        }
        Ok(if parts.len() == 1 {
            parts.remove(0)
        } else {
            BondQuery::Or(parts)
        })
    }

    fn bond_and(&mut self) -> Result<BondQuery, PatternError> {
        let mut parts = Vec::new();
        loop {
            if self.peek() == Some(b'&') {
                self.i += 1;
                continue;
            }
            match self.bond_unary()? {
                Some(q) => parts.push(q),
                None => break,
            }
        }
        Ok(if parts.len() == 1 {
            parts.remove(0)
        } else {
            BondQuery::And(parts)
        })
    }

    fn bond_unary(&mut self) -> Result<Option<BondQuery>, PatternError> {
        let q = match self.peek() {
            Some(b'!') => {
                self.i += 1;
                match self.bond_unary()? {
                    Some(q) => return Ok(Some(BondQuery::Not(Box::new(q)))),
                    None => return Err(self.err()),
                }
            }
            Some(b'-') => BondQuery::Order(BondOrder::Single),
            Some(b'=') => BondQuery::Order(BondOrder::Double),
            Some(b'#') => BondQuery::Order(BondOrder::Triple),
            Some(b':') => BondQuery::Order(BondOrder::Aromatic),
            Some(b'~') => BondQuery::Any,
            Some(b'@') => BondQuery::Ring,
            _ => return Ok(None),
        };
        self.i += 1;
        Ok(Some(q))
    }

    fn atom(&mut self) -> Result<AtomQuery, PatternError> {
        match self.peek() {
            Some(b'[') => {
                self.i += 1;
                self.bracket_start = self.i;
                let q = self.atom_low()?;
                if self.peek() != Some(b']') {
                    return Err(self.err());
                }
                self.i += 1;
                Ok(q)
            }
            Some(b'*') => {
                self.i += 1;
                Ok(AtomQuery::True)
            }
            Some(b'a') => {
                self.i += 1;
                Ok(AtomQuery::Aromatic(true))
            }
            Some(b'A') => {
                self.i += 1;
                Ok(AtomQuery::Aromatic(false))
            }
            Some(_) => self.element_symbol(false),
            None => Err(self.err()),
        }
    }

    fn atom_low(&mut self) -> Result<AtomQuery, PatternError> {
        let mut parts = vec![self.atom_or()?];
        while self.peek() == Some(b';') {
            self.i += 1;
            parts.push(self.atom_or()?);
        }
        Ok(if parts.len() == 1 {
            parts.remove(0)
        } else {
            AtomQuery::And(parts)
        })
    }

    fn atom_or(&mut self) -> Result<AtomQuery, PatternError> {
        let mut parts = vec![self.atom_and()?];
        while self.peek() == Some(b',') {
            self.i += 1;
            parts.push(self.atom_and()?);
        }
        Ok(if parts.len() == 1 {
            parts.remove(0)
        } else {
            AtomQuery::Or(parts)
        })
    }

    fn atom_and(&mut self) -> Result<AtomQuery, PatternError> {
        let mut parts = Vec::new();
        loop {
            match self.peek() {
                Some(b'&') => {
                    self.i += 1;
                }
                None | Some(b']') | Some(b',') | Some(b';') | Some(b')') => break,
                _ => {
                    let first = self.i == self.bracket_start;
                    parts.push(self.atom_unary(first)?);
                }
            }
        }
        if parts.is_empty() {
            return Err(self.err());
        }
        Ok(if parts.len() == 1 {
            parts.remove(0)
        } else {
            AtomQuery::And(parts)
        })
    }

    fn number(&mut self) -> Option<u32> {
        let start = self.i;
        while self.peek().is_some_and(|c| c.is_ascii_digit()) {
            self.i += 1;
        }
        if self.i == start {
            None
        } else {
            std::str::from_utf8(&self.s[start..self.i])
                .ok()
                .and_then(|t| t.parse().ok())
        }
    }

    fn atom_unary(&mut self, first: bool) -> Result<AtomQuery, PatternError> {
        let Some(c) = self.peek() else {
            return Err(self.err());
        };
        match c {
            b'!' => {
                self.i += 1;
                Ok(AtomQuery::Not(Box::new(self.atom_unary(false)?)))
            }
            b'*' => {
                self.i += 1;
                Ok(AtomQuery::True)
            }
            b'#' => {
                self.i += 1;
                let n = self.number().ok_or_else(|| self.err())?;
                let z = u8::try_from(n).map_err(|_| self.err())?;
                Ok(AtomQuery::Element { z, aromatic: None })
            }
            b'$' => {
                self.i += 1;
                if self.peek() != Some(b'(') {
                    return Err(self.err());
                }
                self.i += 1;
                let inner = self.pattern()?;
                if self.peek() != Some(b')') {
                    return Err(self.err());
                }
                self.i += 1;
                Ok(AtomQuery::Recursive(Box::new(inner)))
            }
            b'+' | b'-' => {
                let sign: i32 = if c == b'+' { 1 } else { -1 };
                self.i += 1;
                if let Some(n) = self.number() {
                    return Ok(AtomQuery::Charge(sign * n as i32));
                }
                let mut count = 1;
                while self.peek() == Some(c) {
                    self.i += 1;
                    count += 1;
                }
                Ok(AtomQuery::Charge(sign * count))
            }
            b'H' if !first => {
                self.i += 1;
                Ok(AtomQuery::TotalH(self.number().unwrap_or(1)))
            }
            b'D' => {
                self.i += 1;
                Ok(AtomQuery::Degree(self.number().unwrap_or(1)))
            }
            b'X' => {
                self.i += 1;
                Ok(AtomQuery::Connections(self.number().unwrap_or(1)))
            }
            b'v' => {
                self.i += 1;
                Ok(AtomQuery::Valence(self.number().unwrap_or(1)))
            }
            b'R' => {
                self.i += 1;
                match self.number() {
                    Some(0) => Ok(AtomQuery::InRing(false)),
                    None => Ok(AtomQuery::InRing(true)),
                    Some(_) => Err(self.err()),
                }
            }
            b'a' if self.s.get(self.i + 1) != Some(&b's') => {
                self.i += 1;
                Ok(AtomQuery::Aromatic(true))
            }
            b'A' if !matches!(
                self.s.get(self.i + 1),
                Some(b'l' | b'r' | b's' | b'g' | b'u')
            ) =>
            {
                self.i += 1;
                Ok(AtomQuery::Aromatic(false))
            }
            _ => self.element_symbol(true),
        }
    }

    fn element_symbol(&mut self, in_bracket: bool) -> Result<AtomQuery, PatternError> {
        let rest = &self.s[self.i..];
        // Two-letter symbols first (only those the project's patterns use or may use).
        const TWO: &[(&[u8], u8)] = &[
            (b"Cl", 17),
            (b"Br", 35),
            (b"Si", 14),
            (b"Se", 34),
            (b"As", 33),
            (b"Na", 11),
            (b"Li", 3),
            (b"se", 34),
            (b"as", 33),
        ];
        if in_bracket || rest.starts_with(b"Cl") || rest.starts_with(b"Br") {
            for &(sym, z) in TWO {
                if rest.starts_with(sym) && (in_bracket || z == 17 || z == 35) {
                    self.i += 2;
                    let aromatic = sym[0].is_ascii_lowercase();
                    return Ok(AtomQuery::Element {
                        z,
                        aromatic: Some(aromatic),
                    });
                }
            }
        }
        let (z, aromatic) = match rest.first() {
            Some(b'H') => (1, false),
            Some(b'B') => (5, false),
            Some(b'C') => (6, false),
            Some(b'N') => (7, false),
            Some(b'O') => (8, false),
            Some(b'F') => (9, false),
            Some(b'P') => (15, false),
            Some(b'S') => (16, false),
            Some(b'I') => (53, false),
            Some(b'b') => (5, true),
            Some(b'c') => (6, true),
            Some(b'n') => (7, true),
            Some(b'o') => (8, true),
            Some(b'p') => (15, true),
            Some(b's') => (16, true),
            _ => return Err(self.err()),
        };
        self.i += 1;
        Ok(AtomQuery::Element {
            z,
            aromatic: Some(aromatic),
        })
    }
}

fn root_element(q: &AtomQuery) -> Option<u8> {
    match q {
        AtomQuery::Element { z, .. } => Some(*z),
        AtomQuery::And(v) => v.iter().find_map(root_element),
        _ => None,
    }
}

/// Aromaticity the query forces on its atom (a top-level conjunct fixing it).
fn root_aromatic(q: &AtomQuery) -> Option<bool> {
    match q {
        AtomQuery::Element {
            aromatic: Some(a), ..
        } => Some(*a),
        AtomQuery::Aromatic(a) => Some(*a),
        AtomQuery::And(v) => v.iter().find_map(root_aromatic),
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;

    fn g(s: &str) -> MolGraph {
        parse_smiles(s).unwrap().graph
    }

    #[test]
    fn primitives() {
        let m = g("CC(=O)O");
        let acid_o = Pattern::new("[OH1]C=O").unwrap();
        assert!(acid_o.matches_at(&m, 3));
        assert!(!acid_o.matches_at(&m, 2));
        let p = Pattern::new("[CH3][C;X3](=O)[O;H1,-1]").unwrap();
        assert!(p.matches_at(&m, 0));
        let b = g("c1ccccc1O");
        assert!(Pattern::new("[c](:a)(:a)-O").unwrap().matches_at(&b, 5));
        assert!(Pattern::new("[$(c-[OH])]").unwrap().matches_at(&b, 5));
        assert!(!Pattern::new("[$(c-[OH])]").unwrap().matches_at(&b, 0));
        assert!(Pattern::new("[c;R]").unwrap().matches_at(&b, 0));
        assert!(Pattern::new("[O;R0;v2]").unwrap().matches_at(&b, 6));
        let q = g("C[N+](C)(C)C");
        assert!(Pattern::new("[N+;X4]").unwrap().matches_at(&q, 1));
        assert!(Pattern::new("[#7;+1]").unwrap().matches_at(&q, 1));
        assert!(!Pattern::new("[#7;+0]").unwrap().matches_at(&q, 1));
    }

    #[test]
    fn cached_facts_and_bond_counts_agree_with_direct_matching() {
        let patterns: Vec<Pattern> = [
            "[CH3]C",
            "[N;v3;!$(N-*=!@[O,N,P,S])]",
            "[$([O,S;H1;v2]-[!$(*=[O,N,P,S])]),$([O,S;-])]",
            "[c](:a)(:a)-[#7,O]",
            "[!D1&!$(C(F)(F)F)]-!@[!D1]",
            "[NH2+0]",
            "[S;v6]",
        ]
        .iter()
        .map(|p| Pattern::new(p).unwrap())
        .collect();
        for smiles in [
            "CC(=O)Nc1ccc(O)cc1",
            "OCC(O)CO",
            "[NH3+]CC([O-])=O",
            "CS(=O)(=O)c1ccccc1C(F)(F)F",
            "[H]OC([H])([H])C",
        ] {
            let m = g(smiles);
            let facts = AtomFacts::new(&m);
            for p in &patterns {
                for i in 0..m.atoms.len() {
                    assert_eq!(
                        p.matches_at(&m, i),
                        p.matches_at_with(&facts, i),
                        "{smiles} atom {i}"
                    );
                }
                if p.len() == 2 {
                    let direct = (0..m.bonds.len())
                        .filter(|&b| p.matches_bond(&m, b))
                        .count();
                    assert_eq!(
                        direct,
                        p.count_bond_matches(&facts, 0..m.bonds.len()),
                        "{smiles}"
                    );
                }
            }
        }
    }

    #[test]
    fn distinct_atoms_required() {
        let m = g("FC(F)C");
        assert!(!Pattern::new("C(F)(F)F").unwrap().matches_at(&m, 1));
        let m = g("FC(F)(F)C");
        assert!(Pattern::new("C(F)(F)F").unwrap().matches_at(&m, 1));
    }

    #[test]
    fn bad_patterns_are_errors() {
        assert!(Pattern::new("C1CC1").is_err());
        assert!(Pattern::new("[C").is_err());
        assert!(Pattern::new("[]").is_err());
    }
}
