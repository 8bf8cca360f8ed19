#!/usr/bin/python3
# bench_reference.py: the reference pipeline of `make bench`: the same job
# done the way a chemist would script it in Python, with RDKit (Debian
# python3-rdkit) for SMARTS group perception and SciPy (Debian
# python3-scipy) for peak picking (scipy.signal.find_peaks) and the
# assignment (scipy.optimize.linear_sum_assignment). It reads the bench
# manifest and the same JCAMP-DX files and writes one JSON line per sample.
# It exists to be timed beside irrecon, not to be a second implementation:
# the band windows below are a short list of common group frequencies
# (common practice; from memory, after Silverstein, Webster & Kiemle).
#
#   bench_reference.py MANIFEST.csv OUT.jsonl
import csv
import json
import math
import os
import sys

import numpy as np
from rdkit import Chem, RDLogger
from scipy.optimize import linear_sum_assignment
from scipy.signal import find_peaks, savgol_filter

RDLogger.DisableLog("rdApp.*")

# SMARTS group -> expected bands (low, high, intensity class, label).
GROUPS = [
    ("alcohol", "[CX4][OX2H]", [(3200, 3550, "s", "O-H stretch"), (1000, 1260, "s", "C-O stretch")]),
    ("phenol", "c[OX2H]", [(3200, 3550, "s", "O-H stretch"), (1180, 1260, "s", "C-O stretch")]),
    ("carboxylic_acid", "[CX3](=O)[OX2H]", [(2500, 3300, "m", "O-H stretch"), (1680, 1725, "s", "C=O stretch")]),
    ("ester", "[#6][CX3](=O)[OX2][#6]", [(1715, 1750, "s", "C=O stretch"), (1000, 1300, "s", "C-O stretch")]),
    ("ketone", "[#6][CX3](=O)[#6]", [(1660, 1725, "s", "C=O stretch")]),
    ("aldehyde", "[CX3H1](=O)[#6]", [(1680, 1740, "s", "C=O stretch"), (2695, 2830, "w", "C-H stretch")]),
    ("amide", "[NX3][CX3](=[OX1])[#6]", [(1630, 1690, "s", "amide I")]),
    ("amide_nh", "[NX3;H1,H2][CX3](=[OX1])", [(3150, 3450, "m", "N-H stretch"), (1510, 1640, "m", "amide II")]),
    ("urea", "[NX3][CX3](=[OX1])[NX3]", [(1630, 1700, "s", "C=O stretch")]),
    ("carbamate", "[NX3][CX3](=[OX1])[OX2]", [(1680, 1740, "s", "C=O stretch")]),
    ("anhydride", "[CX3](=O)[OX2][CX3](=O)", [(1800, 1850, "s", "C=O stretch (sym)"), (1740, 1790, "s", "C=O stretch (asym)")]),
    ("acid_halide", "[CX3](=O)[Cl,Br]", [(1770, 1815, "s", "C=O stretch")]),
    ("lactam_imide", "[#6X3](=O)[#7X3;R]", [(1650, 1780, "s", "C=O stretch")]),
    ("aryl_carbonyl", "[#6X3;a](=[OX1])", [(1640, 1720, "s", "C=O stretch")]),
    ("primary_amine", "[NX3;H2][CX4,c]", [(3300, 3500, "m", "N-H stretch"), (1580, 1650, "m", "NH2 scissor")]),
    ("secondary_amine", "[NX3;H1]([CX4,c])[CX4,c]", [(3300, 3500, "w", "N-H stretch")]),
    ("tertiary_amine", "[NX3;H0;!$(NC=O);!$(N-a)]([CX4])([CX4])[CX4]", [(1020, 1250, "m", "C-N stretch")]),
    ("nitrile", "[CX2]#[NX1]", [(2210, 2260, "m", "C#N stretch")]),
    ("alkyne_terminal", "[CX2H1]#[CX2]", [(3260, 3330, "s", "C-H stretch"), (2100, 2140, "w", "C#C stretch")]),
    ("alkene", "[CX3]=[CX3]", [(1620, 1680, "w", "C=C stretch")]),
    ("alkene_ch", "[CX3H1,CX3H2]=[CX3]", [(3010, 3100, "w", "=C-H stretch")]),
    ("aromatic", "c1ccccc1", [(3000, 3100, "w", "aromatic C-H stretch"), (1580, 1620, "m", "ring mode"),
                              (1450, 1520, "m", "ring mode"), (690, 900, "s", "C-H out-of-plane")]),
    ("pyridine", "n1ccccc1", [(1570, 1610, "m", "ring mode")]),
    ("methyl", "[CH3][#6]", [(2950, 2975, "m", "CH3 stretch (asym)"), (1370, 1385, "m", "CH3 bend")]),
    ("methylene", "[CH2X4]", [(2915, 2935, "m", "CH2 stretch (asym)"), (1445, 1475, "m", "CH2 scissor")]),
    ("ether", "[OD2;!$(OC=O)]([#6])[#6]", [(1050, 1150, "s", "C-O-C stretch")]),
    ("aryl_ether", "c[OX2][CX4]", [(1200, 1275, "s", "aryl C-O stretch")]),
    ("nitro", "[N+](=O)[O-]", [(1500, 1570, "s", "NO2 stretch (asym)"), (1300, 1370, "s", "NO2 stretch (sym)")]),
    ("sulfonamide", "S(=O)(=O)[NX3]", [(1310, 1370, "s", "SO2 stretch (asym)"), (1140, 1180, "s", "SO2 stretch (sym)")]),
    ("sulfone", "[#6]S(=O)(=O)[#6]", [(1290, 1350, "s", "SO2 stretch (asym)"), (1120, 1160, "s", "SO2 stretch (sym)")]),
    ("sulfoxide", "[#6][SX3](=O)[#6]", [(1030, 1070, "s", "S=O stretch")]),
    ("sulfonyl_chloride", "S(=O)(=O)Cl", [(1360, 1410, "s", "SO2 stretch (asym)"), (1160, 1205, "s", "SO2 stretch (sym)")]),
    ("thiol", "[SX2H]", [(2550, 2600, "w", "S-H stretch")]),
    ("isocyanate", "N=C=O", [(2240, 2280, "s", "N=C=O stretch")]),
    ("c_f", "[CX4]F", [(1000, 1400, "s", "C-F stretch")]),
    ("c_cl", "[#6]Cl", [(550, 850, "s", "C-Cl stretch")]),
    ("c_br", "[#6]Br", [(500, 690, "m", "C-Br stretch")]),
    ("c_i", "[#6]I", [(485, 600, "m", "C-I stretch")]),
    ("imine", "[CX3]=[NX2;!a]", [(1620, 1690, "m", "C=N stretch")]),
    ("nh_heteroaromatic", "[nH]", [(3100, 3500, "m", "N-H stretch")]),
    ("hydrazine", "[NX3][NX3]", [(3200, 3400, "m", "N-H stretch")]),
    ("epoxide", "C1OC1", [(810, 950, "m", "ring C-O stretch")]),
    ("tetrazole", "c1nn[nH]n1", [(1400, 1500, "m", "ring mode")]),
]
COMPILED = [(name, Chem.MolFromSmarts(s), bands) for name, s, bands in GROUPS]
WEIGHT = {"s": 1.0, "m": 0.6, "w": 0.2}


# ---- JCAMP-DX (McDonald & Wilks 1988): ASDF decoding of ##XYDATA ----------
SQZ = {c: (i + 1) for i, c in enumerate("ABCDEFGHI")}
SQZ.update({c: -(i + 1) for i, c in enumerate("abcdefghi")})
SQZ["@"] = 0
DIF = {c: (i + 1) for i, c in enumerate("JKLMNOPQR")}
DIF.update({c: -(i + 1) for i, c in enumerate("jklmnopqr")})
DIF["%"] = 0
DUP = {c: (i + 1) for i, c in enumerate("STUVWXYZs")}


def tokens(line):
    out, i, n = [], 0, len(line)
    while i < n:
        c = line[i]
        if c in " \t,;":
            i += 1
            continue
        kind = "affn"
        if c in SQZ:
            kind, first = "sqz", str(SQZ[c]) if SQZ[c] >= 0 else str(SQZ[c])
        elif c in DIF:
            kind, first = "dif", str(DIF[c])
        elif c in DUP:
            kind, first = "dup", str(DUP[c])
        else:
            first = c
        j = i + 1
        while j < n:
            if line[j].isdigit() or (kind == "affn" and line[j] == "."):
                j += 1
            # An exponent only with its sign ("1.5E+03"): a bare E is the
            # SQZ digit +5 that starts the next value.
            elif (kind == "affn" and line[j] in "eE" and j + 2 < n + 1 and j + 1 < n
                  and line[j + 1] in "+-"):
                j += 2
            else:
                break
        out.append((kind, first + line[i + 1:j]))
        i = j
    return out


def read_jcamp(path):
    hdr, data = {}, []
    with open(path, encoding="latin-1") as f:
        lines = f.read().split("\n")
    i = 0
    while i < len(lines):
        l = lines[i].strip()
        if l.startswith("##"):
            k, _, v = l[2:].partition("=")
            k = k.strip().upper().replace(" ", "")
            hdr[k] = v.strip()
            if k == "XYDATA":
                i += 1
                while i < len(lines) and not lines[i].startswith("##"):
                    if lines[i].strip() and not lines[i].startswith("$$"):
                        data.append(lines[i].split("$$")[0])
                    i += 1
                continue
        i += 1
    yf = float(hdr.get("YFACTOR", "1"))
    ys = []
    prev_line_dif = False
    for line in data:
        toks = tokens(line)[1:]  # the abscissa leads each line
        vals, was_dif, delta = [], False, 0
        for kind, t in toks:
            if kind in ("affn", "sqz"):
                vals.append(float(t))
                was_dif = False
            elif kind == "dif":
                delta = int(t)
                vals.append((vals[-1] if vals else ys[-1]) + delta)
                was_dif = True
            else:  # DUP: the previous value, or difference, k-1 more times
                for _ in range(int(t) - 1):
                    vals.append(vals[-1] + delta if was_dif else vals[-1])
        # The Y-check: after a line ending in DIF form, a line's first value
        # repeats the last value of the line before.
        if prev_line_dif and vals and ys:
            vals = vals[1:]
        prev_line_dif = was_dif
        ys.extend(vals)
    y = np.array(ys) * yf
    n = int(float(hdr["NPOINTS"]))
    y = y[:n]
    x = np.linspace(float(hdr["FIRSTX"]), float(hdr["LASTX"]), len(y))
    units = hdr.get("YUNITS", "").upper()
    return x, y, units


def expected_bands(mol):
    bands = []
    for name, patt, blist in COMPILED:
        if mol.HasSubstructMatch(patt):
            for lo, hi, cls, label in blist:
                bands.append((lo, hi, cls, label, name))
    return bands


def check(row, base):
    x, y, units = read_jcamp(os.path.join(base, row["spectrum"]))
    if x[0] > x[-1]:
        x, y = x[::-1], y[::-1]
    if "TRANS" in units:
        y = -np.log10(np.clip(y, 1e-4, None))
    ys = savgol_filter(y, 15, 3)
    noise = 1.4826 * np.median(np.abs(np.diff(y) - np.median(np.diff(y)))) / math.sqrt(2)
    idx, props = find_peaks(ys, prominence=max(5 * noise, 1e-3), width=2)
    peaks = x[idx]
    heights = props["prominences"]
    rel = heights / heights.max() if len(heights) else heights

    mol = Chem.MolFromSmiles(row["structure"])
    if mol is None:
        return {"sample": row["sample"], "error": "bad SMILES"}
    bands = expected_bands(mol)
    others = [Chem.MolFromSmiles(s) for s in row.get("starting_materials", "").split(";") if s]
    other_bands = [expected_bands(m) for m in others if m is not None]

    cost = np.full((len(bands), len(peaks)), 1e3)
    for i, (lo, hi, cls, _, _) in enumerate(bands):
        mid, half = 0.5 * (lo + hi), 0.5 * (hi - lo)
        inside = (peaks >= lo) & (peaks <= hi)
        cost[i, inside] = np.abs(peaks[inside] - mid) / half + np.abs(WEIGHT[cls] - rel[inside])
    found = set()
    used = set()
    if len(bands) and len(peaks):
        r, c = linear_sum_assignment(cost)
        for i, j in zip(r, c):
            if cost[i, j] < 1e3:
                found.add(i)
                used.add(j)
    missing = [b for i, b in enumerate(bands) if i not in found and b[2] == "s"]
    unexplained = [float(peaks[j]) for j in range(len(peaks)) if j not in used and rel[j] > 0.3]
    attributed = []
    for p in list(unexplained):
        for ob in other_bands:
            if any(lo <= p <= hi for lo, hi, _, _, _ in ob):
                attributed.append(p)
                unexplained.remove(p)
                break
    if missing or unexplained:
        verdict = "inconsistent"
    elif attributed:
        verdict = "consistent_impure"
    else:
        verdict = "consistent"
    return {"sample": row["sample"], "verdict": verdict,
            "missing": [b[3] + " (" + b[4] + ")" for b in missing],
            "unexplained": unexplained, "attributed": attributed,
            "peaks": len(peaks), "expected": len(bands)}


def main():
    manifest, out = sys.argv[1], sys.argv[2]
    base = os.path.dirname(os.path.abspath(manifest))
    with open(manifest, newline="") as f, open(out, "w") as o:
        for row in csv.DictReader(f):
            o.write(json.dumps(check(row, base)) + "\n")


if __name__ == "__main__":
    main()
