#!/usr/bin/env python3
"""Reference set for phasewise's canonical structure key (structure::canon).

Writes tests/data/random_smiles.tsv: for compounds of the open retention data
(../shared/data/retention/retention.tsv, RepoRT, CC BY-SA 4.0) and of the shipped
knowledge base (data/kb/compounds.tsv.gz, see data/ATTRIBUTION.md), several SMILES of
the same molecule written by RDKit in other forms:

  random     random atom order, aromatic form
  kekule     random atom order, Kekulé form (no aromatic atoms)
  explicit_h random atom order with every hydrogen written as an [H] atom
  kekule_h   Kekulé form with explicit hydrogens

each with the InChIKey of the source record and the source SMILES it was generated
from (`reference`). The test (tests/identity_random_smiles.rs) checks that every variant
resolves to the record with that InChIKey. RDKit is only needed to regenerate the file
(`pip install rdkit`); `cargo test` reads the file.

Usage: python3 tools/make_random_smiles.py [--retention PATH] [--n-retention 1500]
       [--n-shipped 800] [--seed 13]
Deterministic for a given RDKit version, seed and input.
"""
import argparse, csv, gzip, os, random, sys

from rdkit import Chem, RDLogger

RDLogger.DisableLog("rdApp.*")
HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)


def shuffled(mol, rng):
    """The molecule with its atoms renumbered in a random order (deterministic per rng)."""
    order = list(range(mol.GetNumAtoms()))
    rng.shuffle(order)
    return Chem.RenumberAtoms(mol, order)


def variants(mol, rng):
    out = [("random", Chem.MolToSmiles(shuffled(mol, rng), canonical=False))]
    k = shuffled(mol, rng)
    try:
        Chem.Kekulize(k, clearAromaticFlags=True)
        out.append(("kekule", Chem.MolToSmiles(k, canonical=False, kekuleSmiles=True)))
    except Exception:
        k = None
    h = shuffled(Chem.AddHs(mol), rng)
    out.append(("explicit_h", Chem.MolToSmiles(h, canonical=False)))
    if k is not None:
        kh = shuffled(Chem.AddHs(mol), rng)
        try:
            Chem.Kekulize(kh, clearAromaticFlags=True)
            out.append(("kekule_h", Chem.MolToSmiles(kh, canonical=False, kekuleSmiles=True)))
        except Exception:
            pass
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--retention", default=os.path.join(ROOT, "..", "shared", "data", "retention", "retention.tsv"))
    ap.add_argument("--n-retention", type=int, default=1500)
    ap.add_argument("--n-shipped", type=int, default=800)
    ap.add_argument("--seed", type=int, default=13)
    ap.add_argument("--out", default=os.path.join(ROOT, "tests", "data", "random_smiles.tsv"))
    a = ap.parse_args()
    rng = random.Random(a.seed)

    retention = {}
    with open(a.retention, newline="") as f:
        for row in csv.DictReader(f, delimiter="\t"):
            key, smi = row["inchikey"], row["smiles"]
            if key and smi and key not in retention:
                retention[key] = smi
    shipped = {}
    with gzip.open(os.path.join(ROOT, "data", "kb", "compounds.tsv.gz"), "rt") as f:
        for row in csv.DictReader(f, delimiter="\t"):
            if row["smiles"] and row["inchikey"] and row["inchikey"] not in retention:
                shipped.setdefault(row["inchikey"], row["smiles"])

    picked = []
    for source, pool, n in (("retention", retention, a.n_retention), ("shipped", shipped, a.n_shipped)):
        keys = sorted(pool)
        rng.shuffle(keys)
        count = 0
        for key in keys:
            if count >= n:
                break
            smi = pool[key]
            mol = Chem.MolFromSmiles(smi)
            if mol is None or mol.GetNumHeavyAtoms() > 100 or mol.GetNumHeavyAtoms() < 2:
                continue
            # One fragment, closed shell: salts and mixtures are standardised to their parent
            # (tests/data/identity_corpus.tsv checks those) and radicals are refused by design.
            if len(Chem.GetMolFrags(mol)) > 1 or any(a.GetNumRadicalElectrons() for a in mol.GetAtoms()):
                continue
            # Only records whose SMILES is the molecule of their InChIKey (a few source rows
            # disagree; those are data errors, not tests of the key).
            if Chem.MolToInchiKey(mol) != key:
                continue
            picked.append((source, key, smi, mol))
            count += 1

    rows = 0
    with open(a.out, "w", newline="") as f:
        f.write("# Randomised SMILES written by RDKit %s (tools/make_random_smiles.py, seed %d).\n" % (Chem.rdBase.rdkitVersion, a.seed))
        f.write("# Sources: retention = RepoRT-derived open retention data (CC BY-SA 4.0, ../shared/data/retention);\n")
        f.write("# shipped = phasewise's shipped knowledge base (data/kb/compounds.tsv.gz; licences in data/ATTRIBUTION.md).\n")
        f.write("source\tinchikey\tform\tsmiles\treference\n")
        for source, key, smi, mol in picked:
            for form, s in variants(mol, rng):
                f.write("\t".join((source, key, form, s, smi)) + "\n")
                rows += 1
    print("%d compounds, %d SMILES -> %s" % (len(picked), rows, a.out), file=sys.stderr)


if __name__ == "__main__":
    main()
