#!/usr/bin/python3
# rdkit_groups.py: a second, independent opinion on the groups irrecon
# perceives: for keys with a plain textbook definition (functional-group
# classes as in Silverstein, Webster & Kiemle, 7th ed., ch. 2; from memory),
# the number of unique matches of a SMARTS written from that definition
# (Daylight SMARTS syntax), matched by RDKit (Debian python3-rdkit), and for
# benzene_ring the all-carbon aromatic six-rings of RDKit's SSSR (and the
# five-membered N-heteroaromatic rings likewise, below). Reads
# `countdump -g` output on stdin; prints "smiles<TAB>key<TAB>irrecon<TAB>rdkit"
# for every disagreement (tests/scripts/rdkit_counts.sh checks them).
import sys

from rdkit import Chem, RDLogger

RDLogger.DisableLog("rdApp.*")

# key -> SMARTS; each match is one instance of the group.
DEFS = {
    # C#N on carbon or N; HCN and CN- are cyanide, C#N on S or O a
    # thiocyanate or cyanate ester
    "nitrile": "[C;X2;!$([CH1]);!$(C-[#8,#16])]#[N;X1;+0]",
    "cyanide": "[$([CX1-]),$([CH1])]#[NX1]",
    "thiocyanate": "[#6]-[SX2]-C#[NX1]",
    "thiocyanate_ion": "[SX1-]-C#[NX1]",
    "cyanate_ester": "[#6]-[OX2]-C#[NX1]",
    "aldehyde": "[CX3;H1,H2;!$(C[O,N,S,F,Cl,Br,I])]=[OX1]",
    "phenol": "[OX2H1]-c",
    "carboxylic_acid": "[CX3;$([CH1]),$(C-[#6])](=[OX1])[OX2H1]",
    "nitro": "[#6]-[N+](=O)[O-]",
    "thiol": "[#6;!$([#6]=[O,S])]-[SX2H1]",
    "epoxide": "[OX2]1[#6][#6]1",
    "azide": "[N;X1,X2]=[N+]=[N-]",
    "isocyanate": "[NX2]=C=O",
    "isothiocyanate": "[NX2]=C=S",
    "sulfone": "[#6][SX4](=[OX1])(=[OX1])[#6]",
    "sulfonamide": "[#6,#7][SX4](=[OX1])(=[OX1])[NX3]",
    "disulfide": "[#6][SX2][SX2][#6]",
    "alkyne_terminal": "[CX2H1]#[CX2]",
    "alkyne_internal": "[CX2H0;!$(C[#7,#8])]#[CX2H0;!$(C[#7,#8])]",
    "methyl": "[CX4H3]",
    "c_f": "[#6;!$(C=O)]-F",
    "c_cl": "[#6;!$(C=O)]-Cl",
    "c_br": "[#6;!$(C=O)]-Br",
    "c_i": "[#6;!$(C=O)]-I",
    "water": "[OH2;D0]",
    "acid_halide": "[CX3;$(C[F,Cl,Br,I])]=[OX1]",
    "isonitrile": "[C-]#[N+]",
    "si_h": "[Si;!H0]",
    "boronic_acid": "[BX3]([OH1])[OH1]",
    "ether": "[OX2;!a;!r3]([#6;!$([#6]=[!#6]);!$([#6]#[!#6])])[#6;!$([#6]=[!#6]);!$([#6]#[!#6])]",
    "ester": "[#6][#6X3](=[OX1])!@[OX2][#6;!$([#6]=[O,S])]",
    "lactone": "[#6][#6X3](=[OX1])@[#8X2]@[#6;!$([#6]=[O,S])]",
    "alkene": "[CX3;!a]=[CX3;!a]",
    # sulfate esters: (RO)2SO2, and ROSO3- / ROSO3H
    "sulfate_ester": "[SX4](=[OX1])(=[OX1])([OX2]-[#6])[OX2]-[#6]",
    "alkyl_sulfate": "[SX4](=[OX1])(=[OX1])([OX2]-[#6])[$([OX1-]),$([OX2H1])]",
    # thiol ester R-C(=O)-S-R' (R = C or H on the acyl side); thioacids,
    # thiocarbonates and thiocarbamates have no C or H there
    "thioester": "[CX3;$([CH1]),$(C-[#6])](=[OX1])-[SX2]-[#6]",
    # the other carbonyls on a neutral S: R-C(=O)-SH, R2N-C(=O)-S-R',
    # R-O-C(=O)-S-R'
    "thioacid": "[CX3;$([CH1]),$(C-[#6])](=[OX1])-[SX2H1;+0]",
    "thiocarbamate": "[NX3]-[CX3](=[OX1])-[SX2]-[#6]",
    "thiocarbonate": "[#6]-[OX2]-[CX3](=[OX1])-[SX2]-[#6]",
    # N-O and N=N groups: R-O-NO2, R2N-NO2, NO3-, R-O-N=O, C-N=N-C
    "nitrate_ester": "[#6][OX2][N+](=[OX1])[OX1-]",
    "nitramine": "[#7X3]-[N+](=[OX1])[OX1-]",
    "nitrate_ion": "[N+X3](=[OX1])([OX1-])[OX1-]",
    "nitrite_ester": "[#6][OX2][NX2]=[OX1]",
    "azo": "[#6]-[NX2;!a;+0]=[NX2;!a;+0]-[#6]",
    # amine oxides and aromatic N-oxides (not nitro, not nitrones)
    "n_oxide": "[$([NX4+]),$([n+X3])]-[OX1-]",
    # sulfonyl fluorides; the sulfate and carbonate ions as written with O-
    "sulfonyl_fluoride": "[#6][SX4](=[OX1])(=[OX1])F",
    "sulfate_ion": "[SX4](=[OX1])(=[OX1])([OX1-])[OX1-]",
    "carbonate_ion": "[CX3](=[OX1])([OX1-])[OX1-]",
    # PO4 3-, HPO4 2-, H2PO4- (at least one O-, no O-C); any B-H
    "phosphate_ion": "[PX4;$(P[OX1-])](=[OX1])([$([OX1-]),$([OX2H1])])([$([OX1-]),$([OX2H1])])"
                     "[$([OX1-]),$([OX2H1])]",
    "b_h": "[#5;!H0]",
    # one per P or Si atom that carries an aromatic ring
    "p_aryl": "[#15;$([#15]-c)]",
    "si_aryl": "[Si;$([Si]-c)]",
}

# Five-membered aromatic rings of RDKit's SSSR, by their ring atoms
# (heteroaromatic ring classes as in Joule & Mills, Heterocyclic Chemistry,
# 5th ed.; from memory): pyrrole_ring has one N and four C; azole_ring has
# an N and at least one more N, O or S. A ring N-H is azole_nh when its ring
# also has an N without H (imidazole, pyrazole, triazole, tetrazole), else
# pyrrole_nh.
FIVE_RING_KEYS = ("pyrrole_ring", "azole_ring", "pyrrole_nh", "azole_nh")
# Six-membered aromatic rings with an N that has no H and two neighbours
# (or a third, the O- of an N-oxide):
# pyridine_ring with one ring N, azine_ring with two or more (diazines,
# triazines).
SIX_RING_KEYS = ("pyridine_ring", "azine_ring")


def aromatic_rings(mol, size):
    """The atoms of each all-aromatic ring of the given size in RDKit's SSSR."""
    for r in Chem.GetSSSR(mol):
        atoms = [mol.GetAtomWithIdx(i) for i in r]
        if len(r) == size and all(a.GetIsAromatic() for a in atoms):
            yield atoms


def six_rings(mol):
    n_of = dict.fromkeys(SIX_RING_KEYS, 0)
    for atoms in aromatic_rings(mol, 6):
        n = sum(a.GetAtomicNum() == 7 for a in atoms)
        if not any(a.GetAtomicNum() == 7 and a.GetTotalNumHs() == 0 and
                   (a.GetDegree() == 2 or (a.GetDegree() == 3 and a.GetFormalCharge() == 1 and
                                           any(b.GetAtomicNum() == 8 and b.GetFormalCharge() == -1
                                               for b in a.GetNeighbors())))
                   for a in atoms):
            continue
        n_of["azine_ring" if n >= 2 else "pyridine_ring"] += 1
    return n_of


def five_rings(mol):
    n_of = dict.fromkeys(FIVE_RING_KEYS, 0)
    for atoms in aromatic_rings(mol, 5):
        z = [a.GetAtomicNum() for a in atoms]
        n, o, s, c = z.count(7), z.count(8), z.count(16), z.count(6)
        if n >= 1 and n + o + s >= 2:
            n_of["azole_ring"] += 1
        elif n == 1 and c == 4:
            n_of["pyrrole_ring"] += 1
        acceptor = any(a.GetAtomicNum() == 7 and a.GetTotalNumHs() == 0 and
                       a.GetDegree() == 2 for a in atoms)
        for a in atoms:
            if a.GetAtomicNum() == 7 and a.GetTotalNumHs() > 0 and a.GetFormalCharge() == 0:
                n_of["azole_nh" if acceptor else "pyrrole_nh"] += 1
    return n_of



def main():
    pats = {k: Chem.MolFromSmarts(v) for k, v in DEFS.items()}
    pats["benzene_ring"] = None
    for key in FIVE_RING_KEYS + SIX_RING_KEYS:
        pats[key] = None
    for line in sys.stdin:
        parts = line.rstrip("\n").split("\t")
        smi = parts[0]
        if len(parts) > 1 and parts[1] == "ERROR":
            continue
        ours = {}
        for g in parts[1:]:
            if g.startswith("CAUTION"):
                continue
            toks = g.split()
            ours[toks[0]] = ours.get(toks[0], 0) + int(toks[-1][1:])
        mol = Chem.MolFromSmiles(smi)
        if mol is None:
            print(f"{smi}\tRDKIT_REJECTS\t-\t-")
            continue
        for key, pat in pats.items():
            if key == "benzene_ring":
                n = sum(1 for atoms in aromatic_rings(mol, 6)
                        if all(a.GetAtomicNum() == 6 for a in atoms))
            elif key in FIVE_RING_KEYS:
                n = five_rings(mol)[key]
            elif key in SIX_RING_KEYS:
                n = six_rings(mol)[key]
            else:
                n = len(mol.GetSubstructMatches(pat))
            if n != ours.get(key, 0):
                print(f"{smi}\t{key}\t{ours.get(key, 0)}\t{n}")


if __name__ == "__main__":
    main()
