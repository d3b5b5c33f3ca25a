"""Build tests/data/joback_sample.tsv: a seeded sample of Joback Tb predictions from the
`chemicals` 1.5.2 Python package (MIT licence, its own Joback implementation), joined to SMILES.

Inputs (local copies of chemicals 1.5.2 data files):
  Misc/joback_predictions.tsv                         CAS (integer, no dashes), Tm, Hfus, Hvap, Tb, ...
  Identifiers/chemical identifiers pubchem large.tsv  CID, CAS, formula, MW, SMILES, ...
Run: python3 tools/make_joback_sample.py PATH/TO/unpacked/chemicals-1.5.2/chemicals > tests/data/joback_sample.tsv
"""
import random
import re
import sys

# Domain of the comparison: one neutral molecule per row. The reference sums groups over every
# fragment of a salt or mixture and over ionic atoms (a meaningless "boiling point" for a salt),
# while phasewise keeps the largest fragment and refuses ions; such rows are excluded, and the
# number excluded is printed in the header.
NITRO = re.compile(r"\[N\+\]\(=O\)\[O-\]|\[N\+\]\(\[O-\]\)=O|\[O-\]\[N\+\](\(=O\)|=O)")
CHARGED = re.compile(r"\[[^\]]*[+-][^\]]*\]")


def single_neutral(smi):
    if "." in smi:
        return False
    return CHARGED.search(NITRO.sub("", smi)) is None

root = sys.argv[1]
SEED = 20261201
N = 2000

tb = {}
with open(f"{root}/Misc/joback_predictions.tsv", encoding="utf-8") as fh:
    header = fh.readline().rstrip("\n").split("\t")
    i_cas, i_tb = header.index("CAS"), header.index("Tb")
    for line in fh:
        cols = line.rstrip("\n").split("\t")
        if len(cols) > i_tb and cols[i_tb]:
            tb[cols[i_cas]] = cols[i_tb]

smiles = {}
with open(f"{root}/Identifiers/chemical identifiers pubchem large.tsv", encoding="utf-8") as fh:
    for line in fh:
        cols = line.rstrip("\n").split("\t")
        if len(cols) < 5:
            continue
        cas_int = cols[1].replace("-", "")
        if cas_int in tb and cols[4] and cas_int not in smiles:
            smiles[cas_int] = (cols[1], cols[4])

all_keys = sorted(smiles)
keys = [k for k in all_keys if single_neutral(smiles[k][1])]
rng = random.Random(SEED)
sample = sorted(rng.sample(keys, min(N, len(keys))), key=int)
print("# Joback normal boiling points predicted by the `chemicals` 1.5.2 Python package (MIT licence,")
print("# its own Joback implementation, Misc/joback_predictions.tsv), joined to SMILES from its")
print(f"# Identifiers/chemical identifiers pubchem large.tsv. Seeded sample (seed {SEED}) of {len(sample)} of {len(keys)} rows")
print(f"# that are one neutral molecule (excluded: {len(all_keys) - len(keys)} salts, mixtures and ionic SMILES of {len(all_keys)}).")
print("cas\tsmiles\ttb_k")
for k in sample:
    cas, smi = smiles[k]
    print(f"{cas}\t{smi}\t{tb[k]}")
