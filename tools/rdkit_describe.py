"""RDKit side of the `describe` speed comparison in docs/performance.md (issue 13).

Measurement only: RDKit is never needed by the crate, its tests or the binary. Reads one SMILES
per line and computes RDKit's Crippen logP, TPSA, molecular weight, H-bond donors and acceptors
(five of the descriptors `phasewise describe` computes) in one process; prints the count.
Usage: python3 tools/rdkit_describe.py smiles.txt   (timed with /usr/bin/time; see
tools/bench_lookup_describe.sh with RDKIT=1)
"""
import sys

from rdkit import Chem, RDLogger
from rdkit.Chem import Descriptors, rdMolDescriptors

RDLogger.DisableLog("rdApp.*")
out = []
for line in open(sys.argv[1]):
    m = Chem.MolFromSmiles(line.strip())
    if m is None:
        continue
    out.append((Descriptors.MolLogP(m), rdMolDescriptors.CalcTPSA(m), Descriptors.MolWt(m),
                rdMolDescriptors.CalcNumHBD(m), rdMolDescriptors.CalcNumHBA(m)))
print(len(out))
