#!/usr/bin/python3
# rdkit_counts.py: the reference side of tests/scripts/rdkit_counts.sh.
# Reads the same SMILES lines as tests/tools/countdump.c and prints the same
# bond counts computed with RDKit (Debian python3-rdkit):
#   smiles o_h n_h c_n_triple c_o_double aromatic_rings c_h_sp c_h_sp2 c_h_sp3
# Definitions (issue 2): an X-H count is the total hydrogens (explicit and
# implicit) on atoms of element X; C=O and C#N count bonds of that order;
# aromatic_rings counts rings of the SSSR whose atoms are all aromatic;
# c_h_spN sums hydrogens on carbons of that hybridization (RDKit's own).
import sys

from rdkit import Chem, RDLogger

RDLogger.DisableLog("rdApp.*")

HYB = {
    Chem.rdchem.HybridizationType.SP: "sp",
    Chem.rdchem.HybridizationType.SP2: "sp2",
    Chem.rdchem.HybridizationType.SP3: "sp3",
}


def counts(mol):
    k = dict(o_h=0, n_h=0, c_n_triple=0, c_o_double=0, aromatic_rings=0,
             sp=0, sp2=0, sp3=0)
    for a in mol.GetAtoms():
        z, h = a.GetAtomicNum(), a.GetTotalNumHs()
        if z == 8:
            k["o_h"] += h
        elif z == 7:
            k["n_h"] += h
        elif z == 6:
            hyb = HYB.get(a.GetHybridization())
            if hyb:
                k[hyb] += h
    for b in mol.GetBonds():
        pair = sorted((b.GetBeginAtom().GetAtomicNum(), b.GetEndAtom().GetAtomicNum()))
        if pair == [6, 7] and b.GetBondType() == Chem.rdchem.BondType.TRIPLE:
            k["c_n_triple"] += 1
        if pair == [6, 8] and b.GetBondType() == Chem.rdchem.BondType.DOUBLE:
            k["c_o_double"] += 1
    for ring in Chem.GetSSSR(mol):
        if all(mol.GetAtomWithIdx(i).GetIsAromatic() for i in ring):
            k["aromatic_rings"] += 1
    return [k["o_h"], k["n_h"], k["c_n_triple"], k["c_o_double"],
            k["aromatic_rings"], k["sp"], k["sp2"], k["sp3"]]


def main():
    for line in sys.stdin:
        s = line.strip()
        if not s or s.startswith("#"):
            continue
        smi = s.split()[0]
        mol = Chem.MolFromSmiles(smi)
        if mol is None:
            print(f"{smi}\tERROR")
            continue
        print("\t".join([smi] + [str(v) for v in counts(mol)]))


if __name__ == "__main__":
    main()
