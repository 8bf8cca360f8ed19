/* perceive.c: the "perceive groups" stage. Walks the heavy-atom graph of a
 * molecule (structure.c) and names its functional groups with the context
 * that moves their bands: conjugation, ring size, N-H count, substitution
 * pattern, intramolecular H-bonds; counts bonds to hydrogen; collects the
 * safety cautions. User-table groups given by SMARTS are matched here too.
 *
 * Everything except the SMARTS groups works directly on the graph in a few
 * linear passes (no SMARTS, no recursion), so perception costs a few
 * microseconds for a drug-sized molecule. The group definitions follow the
 * usual textbook classification of functional groups (e.g. Silverstein,
 * Webster & Kiemle, Spectrometric Identification of Organic Compounds,
 * ch. 2, and IUPAC class names). */
#include "irrecon/perceive.h"
#include "irrecon/tables.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------- inventory */

typedef struct instance {
	char id[40];
	irr_group_attrs attrs;
	size_t atom_off, natoms;
} instance;

struct irr_inventory {
	size_t ngroups;
	irr_group *groups;
	int *atoms;
	irr_counts counts;
	size_t ncautions;
	const char *cautions[16];
};

/* ---------------------------------------------------------------- cautions */

/* One line each; they defer to local rules because hazards depend on
 * scale, state and handling that the structure does not tell. */
enum {
	CAU_AZIDE, CAU_ACYL_AZIDE, CAU_DIAZO, CAU_DIAZONIUM, CAU_PEROXIDE,
	CAU_POLYNITRO, CAU_NITRATE, CAU_ISOCYANATE, CAU_ISONITRILE,
	CAU_NITROSAMINE, CAU_CYANIDE, CAU_PERCHLORATE, CAU_HYDRAZINE, CAU_PHOSGENE,
	CAU_DIALKYL_SULFATE, CAU_NITRAMINE, CAU_NITRITE, CAU_AZO_ALKYL, CAU_N
};
static const char *const caution_text[CAU_N] = {
	"azide: organic and inorganic azides can decompose explosively and give toxic "
	"hydrazoic acid with acids; follow local safety rules and the lab's approved procedures",
	"acyl or sulfonyl azide: thermally unstable, can decompose violently on warming; "
	"follow local safety rules and the lab's approved procedures",
	"diazo compound: toxic and prone to violent decomposition (heat, light, acids, rough "
	"surfaces); follow local safety rules and the lab's approved procedures",
	"diazonium salt: shock- and heat-sensitive, especially when dry; follow local safety "
	"rules and the lab's approved procedures",
	"peroxide (O-O): can detonate on heating, friction or concentration; test and handle "
	"as local safety rules and the lab's approved procedures require",
	"two or more nitro groups: potentially explosive; follow local safety rules and the "
	"lab's approved procedures",
	"nitrate ester: potentially explosive and a vasodilator; follow local safety rules and "
	"the lab's approved procedures",
	"isocyanate: toxic by inhalation and a respiratory sensitiser; follow local safety "
	"rules and the lab's approved procedures",
	"isonitrile: toxic, with an intensely foul smell; follow local safety rules and the "
	"lab's approved procedures",
	"N-nitroso compound: probable human carcinogen; follow local safety rules and the "
	"lab's approved procedures",
	"cyanide (HCN or cyanide ion): very toxic, gives HCN with acids; follow local safety "
	"rules and the lab's approved procedures",
	"perchlorate: strong oxidiser, explosive with organic matter; follow local safety "
	"rules and the lab's approved procedures",
	"hydrazine: toxic and a suspected carcinogen; follow local safety rules and the lab's "
	"approved procedures",
	"phosgene (carbonyl dihalide): very toxic by inhalation; follow local safety rules "
	"and the lab's approved procedures",
	"dialkyl sulfate: a strong alkylating agent, very toxic (delayed effects) and a "
	"probable human carcinogen; follow local safety rules and the lab's approved procedures",
	"N-nitro compound (nitramine): potentially explosive; follow local safety rules and "
	"the lab's approved procedures",
	"alkyl nitrite: volatile and flammable, a vasodilator when inhaled; follow local safety "
	"rules and the lab's approved procedures",
	"aliphatic azo compound: decomposes on warming with release of nitrogen (azo "
	"initiators are self-reactive); follow local safety rules and the lab's approved procedures"};

/* ---------------------------------------------------------------- context */

enum { CL_NONE = 0, CL_KETONE, CL_ALDEHYDE, CL_ACID, CL_CARBOXYLATE, CL_ESTER,
       CL_ANHYDRIDE, CL_AMIDE, CL_ACID_HALIDE, CL_UREA, CL_CARBAMATE, CL_CARBONATE,
       CL_THIOESTER, CL_THIOCARBAMATE, CL_THIOCARBONATE, CL_THIOACID, CL_CARBONATE_ION };

/* Atom flags: which group already holds the atom (so that, e.g., an ester
 * O is not also an ether O, an amide N not also an amine N). */
enum { F_CLAIMED = 1, F_ALKENE_DONE = 2 };

typedef struct ctx {
	const irr_molecule *m;
	const irr_atom *at;    /* structure.c keeps atoms and bonds in one array each */
	const irr_bond *bd;
	size_t n, nb;
	size_t *ns;            /* neighbour CSR: ns[i] .. ns[i+1]-1 */
	int *na, *no, *nbid;   /* neighbour atom, bond order, bond index */
	size_t *rs;            /* rings per atom CSR */
	int *ra;
	int *carbonyl_o;       /* for each carbon: its carbonyl O, or -1 */
	int *cls;              /* carbonyl class of each carbon */
	unsigned char *flags;
	/* instances */
	instance *inst;
	size_t ninst, cap_inst;
	int *iatoms;
	size_t niatoms, cap_iatoms;
	int caution[CAU_N];
	int nitro_groups;
	int oom;
} ctx;

#define EL(c, i) ((c)->at[i].element)
#define HC(c, i) ((c)->at[i].h_count)
#define DEG(c, i) ((c)->at[i].degree)
#define AROM(c, i) ((c)->at[i].aromatic)
#define FOR_NB(c, i, e) for (size_t e = (c)->ns[i]; e < (c)->ns[(i) + 1]; e++)

static int is_halogen(int z) { return z == 9 || z == 17 || z == 35 || z == 53; }

static int is_metal(int z)
{
	/* Everything that is not a non-metal or metalloid. */
	static const int nonmetal[] = {0, 1, 2, 5, 6, 7, 8, 9, 10, 14, 15, 16, 17, 18, 32,
	                               33, 34, 35, 36, 52, 53, 54, 85, 86};
	for (size_t k = 0; k < sizeof nonmetal / sizeof nonmetal[0]; k++)
		if (z == nonmetal[k])
			return 0;
	return 1;
}

/* Opens a new instance; atoms follow with add_atom. */
static instance *new_instance(ctx *c, const char *id)
{
	if (c->oom)
		return NULL;
	if (c->ninst == c->cap_inst) {
		size_t ncap = c->cap_inst ? 2 * c->cap_inst : 32;
		instance *p = realloc(c->inst, ncap * sizeof *p);
		if (!p) {
			c->oom = 1;
			return NULL;
		}
		c->inst = p;
		c->cap_inst = ncap;
	}
	instance *x = &c->inst[c->ninst++];
	memset(x, 0, sizeof *x);
	strncpy(x->id, id, sizeof x->id - 1);
	x->atom_off = c->niatoms;
	return x;
}

static void add_atom(ctx *c, instance *x, int a)
{
	if (!x || c->oom || a < 0)
		return;
	if (c->niatoms == c->cap_iatoms) {
		size_t ncap = c->cap_iatoms ? 2 * c->cap_iatoms : 128;
		int *p = realloc(c->iatoms, ncap * sizeof *p);
		if (!p) {
			c->oom = 1;
			return;
		}
		c->iatoms = p;
		c->cap_iatoms = ncap;
	}
	c->iatoms[c->niatoms++] = a;
	x->natoms++;
}

static instance *emit(ctx *c, const char *id, int a, int b, int d)
{
	instance *x = new_instance(c, id);
	add_atom(c, x, a);
	add_atom(c, x, b);
	add_atom(c, x, d);
	return x;
}

static void set_pattern(instance *x, const char *p)
{
	if (x)
		strncpy(x->attrs.pattern, p, sizeof x->attrs.pattern - 1);
}

/* Smallest SSSR ring holding both atoms (b < 0: only a); 0 when none. */
static int ring_with(const ctx *c, int a, int b)
{
	int best = 0;
	for (size_t k = c->rs[a]; k < c->rs[a + 1]; k++) {
		const int *ring;
		int r = c->ra[k];
		int size = (int)irr_molecule_ring(c->m, (size_t)r, &ring);
		int has_b = b < 0;
		for (int q = 0; q < size && !has_b; q++)
			if (ring[q] == b)
				has_b = 1;
		if (has_b && (best == 0 || size < best))
			best = size;
	}
	return best;
}

static int bond_between(const ctx *c, int a, int b)
{
	FOR_NB(c, a, e)
		if (c->na[e] == b)
			return c->no[e];
	return 0;
}

/* O (or S) attached to `center` as an oxo ligand: one partner, no H, and a
 * double bond or the charge-separated form (S+-O-, N+-O-, P+-O-). */
static int is_oxo(const ctx *c, int center, int o, int order, int z)
{
	if (EL(c, o) != z || DEG(c, o) != 1 || HC(c, o) != 0)
		return 0;
	if (order == 2)
		return 1;
	return order == 1 && c->at[o].charge < 0 && c->at[center].charge > 0;
}

static int oxo_count(const ctx *c, int center)
{
	int k = 0;
	FOR_NB(c, center, e)
		if (is_oxo(c, center, c->na[e], c->no[e], 8))
			k++;
	return k;
}

/* Carbon j offers a pi system to a neighbour: aromatic, or a C=C / C#C,
 * (with `hetero`) also C=O, C=N, C#N, not counting the bond to `skip`. */
static int pi_carbon(const ctx *c, int j, int skip, int hetero)
{
	if (EL(c, j) != 6)
		return 0;
	if (AROM(c, j))
		return 1;
	FOR_NB(c, j, e) {
		int k = c->na[e], ord = c->no[e];
		if (k == skip || (ord != 2 && ord != 3))
			continue;
		if (EL(c, k) == 6)
			return 1;
		if (hetero && (EL(c, k) == 8 || EL(c, k) == 7))
			return 1;
	}
	return 0;
}

/* The group on atom x (its multiple bond to `partner`) is conjugated with
 * a C=C, C#C or aromatic ring through a single bond of x; an aromatic x is
 * conjugated with its own ring. */
static int conjugated_at(const ctx *c, int x, int partner, int hetero)
{
	if (AROM(c, x))
		return 1;
	FOR_NB(c, x, e) {
		int j = c->na[e];
		if (j == partner || c->no[e] != 1)
			continue;
		if (pi_carbon(c, j, x, hetero))
			return 1;
	}
	return 0;
}

/* Carbon with a double bond to C that is not aromatic (a vinyl position). */
static int vinyl_carbon(const ctx *c, int j)
{
	if (EL(c, j) != 6 || AROM(c, j))
		return 0;
	FOR_NB(c, j, e)
		if (c->no[e] == 2 && EL(c, c->na[e]) == 6)
			return 1;
	return 0;
}

/* ---------------------------------------------------------------- carbonyls */

/* The O that links carbonyl carbon i to another carbonyl carbon, or -1. */
static int bridge_o(const ctx *c, int i)
{
	FOR_NB(c, i, e) {
		int x = c->na[e];
		if (EL(c, x) != 8 || x == c->carbonyl_o[i] || DEG(c, x) != 2)
			continue;
		FOR_NB(c, x, f) {
			int y = c->na[f];
			if (y != i && EL(c, y) == 6 && c->carbonyl_o[y] >= 0)
				return x;
		}
	}
	return -1;
}

/* Whether the S on carbonyl carbon i carries a carbon on its other side
 * (a thioester, not a thioacid C(=O)SH or its salt). */
static int thio_carbon(const ctx *c, int i)
{
	FOR_NB(c, i, e) {
		int s = c->na[e];
		if (EL(c, s) != 16 || c->no[e] != 1 || DEG(c, s) != 2 || c->at[s].charge)
			continue;
		FOR_NB(c, s, f)
			if (c->na[f] != i && EL(c, c->na[f]) == 6)
				return 1;
	}
	return 0;
}

/* Whether carbon j is a C#N carbon (a nitrile, thiocyanate or cyanate C). */
static int cyano_carbon(const ctx *c, int j)
{
	FOR_NB(c, j, e)
		if (c->no[e] == 3 && EL(c, c->na[e]) == 7 && DEG(c, c->na[e]) == 1)
			return 1;
	return 0;
}

/* Whether the S on carbonyl carbon i is an S-H (a thioacid R-C(=O)-SH). */
static int thio_hydrogen(const ctx *c, int i)
{
	FOR_NB(c, i, e) {
		int s = c->na[e];
		if (EL(c, s) == 16 && c->no[e] == 1 && DEG(c, s) == 1 && HC(c, s) == 1 &&
		    !c->at[s].charge)
			return 1;
	}
	return 0;
}

static void find_carbonyls(ctx *c)
{
	for (size_t i = 0; i < c->n; i++) {
		c->carbonyl_o[i] = -1;
		c->cls[i] = CL_NONE;
		if (EL(c, i) != 6)
			continue;
		int o = -1, ndouble = 0;
		FOR_NB(c, i, e) {
			if (c->no[e] == 2 || c->no[e] == 3)
				ndouble++;
			if (c->no[e] == 2 && EL(c, c->na[e]) == 8 && DEG(c, c->na[e]) == 1)
				o = c->na[e];
		}
		/* Ketenes, isocyanates, CO2: cumulated, not carbonyls here. */
		if (o < 0 || ndouble != 1)
			continue;
		c->carbonyl_o[i] = o;
	}
	for (size_t i = 0; i < c->n; i++) {
		int o = c->carbonyl_o[i];
		if (o < 0)
			continue;
		int nO = 0, nN = 0, nX = 0, nC = 0, nS = 0, nOther = 0;
		int hC = HC(c, i);
		FOR_NB(c, i, e) {
			int j = c->na[e], z = EL(c, j);
			if (j == o)
				continue;
			if (z == 8)
				nO++;
			else if (z == 7)
				nN++;
			else if (is_halogen(z))
				nX++;
			else if (z == 6)
				nC++;
			else if (z == 16)
				nS++;
			else
				nOther++;
		}
		int cl = CL_NONE;
		int only_s = nS == 1 && !nX && !nOther;
		if (only_s && !nO && !nN && nC + hC == 1 && thio_carbon(c, (int)i))
			cl = CL_THIOESTER; /* R-C(=O)-S-R', thiolactones too */
		else if (only_s && nN == 1 && !nO && thio_carbon(c, (int)i))
			cl = CL_THIOCARBAMATE; /* R2N-C(=O)-S-R' */
		else if (only_s && nO == 1 && !nN && thio_carbon(c, (int)i))
			cl = CL_THIOCARBONATE; /* R-O-C(=O)-S-R' */
		else if (only_s && !nO && !nN && nC + hC == 1 && thio_hydrogen(c, (int)i))
			cl = CL_THIOACID; /* R-C(=O)-SH */
		else if (nS || nOther)
			cl = CL_NONE; /* thioacid salts, dithiocarbonates, acylsilanes...: no key */
		else if (nX >= 1)
			cl = CL_ACID_HALIDE; /* also chloroformates, carbamoyl chlorides, phosgene */
		else if (nN >= 2)
			cl = CL_UREA;
		else if (nN == 1 && nO == 1)
			cl = CL_CARBAMATE;
		else if (nO >= 2)
			cl = CL_CARBONATE;
		else if (nO == 1 && nC + hC == 1)
			cl = CL_ESTER; /* refined below: acid, carboxylate, anhydride */
		else if (nN == 1 && nC + hC == 1)
			cl = CL_AMIDE;
		else if (nC + hC == 2)
			cl = hC ? CL_ALDEHYDE : CL_KETONE;
		c->cls[i] = cl;
	}
	/* Dicarbonates (Boc2O) and carbonic-carboxylic anhydrides: an O that
	 * bridges two carbonyl carbons makes an anhydride (two coupled C=O).
	 * With both O anionic (or on a metal) it is the carbonate ion of K2CO3;
	 * with one of them O-H, a hydrogencarbonate, which has no key. */
	for (size_t i = 0; i < c->n; i++) {
		if (c->cls[i] != CL_CARBONATE)
			continue;
		if (bridge_o(c, (int)i) >= 0) {
			c->cls[i] = CL_ANHYDRIDE;
			continue;
		}
		int ionic = 0, oh = 0;
		FOR_NB(c, (int)i, e) {
			int x = c->na[e], other = -1;
			if (x == c->carbonyl_o[i] || EL(c, x) != 8)
				continue;
			FOR_NB(c, x, f)
				if (c->na[f] != (int)i)
					other = c->na[f];
			ionic += c->at[x].charge < 0 || (other >= 0 && is_metal(EL(c, other)));
			oh += HC(c, x) > 0;
		}
		if (ionic == 2)
			c->cls[i] = CL_CARBONATE_ION;
		else if (ionic && oh)
			c->cls[i] = CL_NONE;
	}
	/* Refine the C(=O)O family by what the single-bonded O carries. */
	for (size_t i = 0; i < c->n; i++) {
		if (c->cls[i] != CL_ESTER)
			continue;
		int o = c->carbonyl_o[i];
		FOR_NB(c, i, e) {
			int x = c->na[e];
			if (x == o || EL(c, x) != 8)
				continue;
			int other = -1;
			FOR_NB(c, x, f)
				if (c->na[f] != (int)i)
					other = c->na[f];
			if (c->at[x].charge < 0 || (other >= 0 && is_metal(EL(c, other))))
				c->cls[i] = CL_CARBOXYLATE;
			else if (HC(c, x) > 0)
				c->cls[i] = CL_ACID;
			else if (other >= 0 && EL(c, other) == 6 && c->carbonyl_o[other] >= 0 &&
			         c->cls[other] != CL_NONE)
				c->cls[i] = CL_ANHYDRIDE;
		}
	}
}

/* The single-bonded heteroatom neighbour of carbonyl carbon i with element z. */
static int hetero_of(const ctx *c, int i, int z)
{
	FOR_NB(c, i, e)
		if (EL(c, c->na[e]) == z && c->na[e] != c->carbonyl_o[i])
			return c->na[e];
	return -1;
}

/* Carbon neighbour (acyl side) conjugation for carbonyl carbon i. */
static int carbonyl_conjugated(const ctx *c, int i)
{
	return conjugated_at(c, i, c->carbonyl_o[i], 0);
}

static void claim(ctx *c, int a)
{
	if (a >= 0)
		c->flags[a] |= F_CLAIMED;
}

static int is_quinone_ring(const ctx *c, const int *ring, int size, int *k1, int *k2)
{
	int found[2], nk = 0;
	if (size != 6)
		return 0;
	for (int q = 0; q < 6; q++) {
		int a = ring[q];
		if (EL(c, a) != 6)
			return 0;
		if (c->cls[a] == CL_KETONE) {
			if (nk < 2)
				found[nk] = a;
			nk++;
		} else if (c->at[a].hybridization != 2) {
			return 0; /* an sp3 ring atom: a cyclohexenedione, not a quinone */
		}
	}
	if (nk != 2)
		return 0;
	/* ortho (bonded) or para (no common neighbour); meta is no quinone. */
	if (!bond_between(c, found[0], found[1])) {
		FOR_NB(c, found[0], e)
			if (bond_between(c, c->na[e], found[1]))
				return 0;
	}
	*k1 = found[0];
	*k2 = found[1];
	return 1;
}

static void perceive_carbonyls(ctx *c)
{
	unsigned char *done = calloc(c->n ? c->n : 1, 1);
	if (!done) {
		c->oom = 1;
		return;
	}
	/* Quinones first: they take both of their ketone carbonyls. */
	for (size_t r = 0; r < irr_molecule_ring_count(c->m); r++) {
		const int *ring;
		int size = (int)irr_molecule_ring(c->m, r, &ring), k1, k2;
		if (is_quinone_ring(c, ring, size, &k1, &k2) && !done[k1] && !done[k2]) {
			instance *x = new_instance(c, "quinone");
			add_atom(c, x, k1);
			add_atom(c, x, c->carbonyl_o[k1]);
			add_atom(c, x, k2);
			add_atom(c, x, c->carbonyl_o[k2]);
			done[k1] = done[k2] = 1;
		}
	}
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii, o = c->carbonyl_o[i];
		if (o < 0 || done[i])
			continue;
		instance *x = NULL;
		switch (c->cls[i]) {
		case CL_KETONE: {
			/* 1,2-diketone: two ketone carbonyls bonded to each other. */
			int partner = -1, mid = -1, enol = -1, enol_c = -1;
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (c->cls[j] == CL_KETONE && !done[j] && c->no[e] == 1)
					partner = j;
			}
			if (partner >= 0) {
				x = emit(c, "diketone_1_2", i, o, partner);
				add_atom(c, x, c->carbonyl_o[partner]);
				done[partner] = 1;
				break;
			}
			/* 1,3: keto form C(=O)-CHn-C(=O), enol form C(=O)-C=C(OH). */
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (EL(c, j) != 6 || j == o)
					continue;
				FOR_NB(c, j, f) {
					int k = c->na[f];
					if (k == i)
						continue;
					if (c->no[e] == 1 && c->no[f] == 1 && c->cls[k] == CL_KETONE &&
					    !done[k] && c->at[j].hybridization == 3 && partner < 0) {
						partner = k;
						mid = j;
					}
					if (c->no[f] == 2 && EL(c, k) == 6 && !AROM(c, k) && enol < 0) {
						FOR_NB(c, k, g) {
							int oh = c->na[g];
							if (EL(c, oh) == 8 && HC(c, oh) > 0 && DEG(c, oh) == 1 &&
							    c->no[g] == 1) {
								enol = oh;
								enol_c = k;
								mid = j;
							}
						}
					}
				}
			}
			if (partner >= 0) {
				x = emit(c, "diketone_1_3", i, o, mid);
				add_atom(c, x, partner);
				add_atom(c, x, c->carbonyl_o[partner]);
				done[partner] = 1;
				break;
			}
			if (enol >= 0) {
				x = emit(c, "diketone_1_3", i, o, mid);
				add_atom(c, x, enol_c);
				add_atom(c, x, enol);
				x->attrs.hbond_intra = 1;
				claim(c, enol);
				c->flags[mid] |= F_ALKENE_DONE;
				c->flags[enol_c] |= F_ALKENE_DONE;
				break;
			}
			x = emit(c, "ketone", i, o, -1);
			if (x) {
				x->attrs.conjugated = carbonyl_conjugated(c, i);
				x->attrs.ring_size = c->at[i].in_ring ? c->at[i].ring_size : 0;
			}
			break;
		}
		case CL_ALDEHYDE:
			x = emit(c, "aldehyde", i, o, -1);
			if (x) {
				x->attrs.conjugated = carbonyl_conjugated(c, i);
				FOR_NB(c, i, e)
					if (c->na[e] != o && AROM(c, c->na[e]))
						x->attrs.aryl = 1;
			}
			break;
		case CL_ACID:
		case CL_THIOACID: {
			/* The O-H or S-H is the acid's own: no alcohol or thiol beside it. */
			int thio = c->cls[i] == CL_THIOACID;
			int xh = hetero_of(c, i, thio ? 16 : 8);
			x = emit(c, thio ? "thioacid" : "carboxylic_acid", i, o, xh);
			claim(c, xh);
			if (x)
				x->attrs.conjugated = carbonyl_conjugated(c, i);
			break;
		}
		case CL_CARBOXYLATE: {
			int o2 = hetero_of(c, i, 8);
			x = emit(c, "carboxylate", i, o, o2);
			claim(c, o2);
			break;
		}
		case CL_ANHYDRIDE: {
			int bridge = bridge_o(c, i), other = -1;
			if (bridge < 0)
				break;
			FOR_NB(c, bridge, e)
				if (c->na[e] != i)
					other = c->na[e];
			x = emit(c, "anhydride", i, o, bridge);
			add_atom(c, x, other);
			if (other >= 0) {
				add_atom(c, x, c->carbonyl_o[other]);
				done[other] = 1;
			}
			claim(c, bridge);
			if (x) {
				x->attrs.ring_size = ring_with(c, i, bridge);
				x->attrs.conjugated = carbonyl_conjugated(c, i) ||
				                      (other >= 0 && carbonyl_conjugated(c, other));
			}
			break;
		}
		case CL_ESTER: {
			int eo = hetero_of(c, i, 8), alk = -1;
			FOR_NB(c, eo, e)
				if (c->na[e] != i)
					alk = c->na[e];
			claim(c, eo);
			int ring = ring_with(c, i, eo);
			if (HC(c, i) > 0) {
				x = emit(c, "formate", i, o, eo);
			} else if (ring) {
				x = emit(c, "lactone", i, o, eo);
				if (x) {
					x->attrs.ring_size = ring;
					x->attrs.conjugated = carbonyl_conjugated(c, i);
				}
			} else {
				x = emit(c, "ester", i, o, eo);
				if (x) {
					x->attrs.conjugated = carbonyl_conjugated(c, i);
					x->attrs.aryl = alk >= 0 && (AROM(c, alk) || vinyl_carbon(c, alk));
				}
			}
			add_atom(c, x, alk);
			break;
		}
		case CL_AMIDE: {
			int nn = hetero_of(c, i, 7), other = -1;
			FOR_NB(c, nn, e) {
				int j = c->na[e];
				if (j != i && c->cls[j] == CL_AMIDE && c->no[e] == 1)
					other = j;
			}
			claim(c, nn);
			if (other >= 0) {
				x = emit(c, "imide", nn, i, o);
				add_atom(c, x, other);
				add_atom(c, x, c->carbonyl_o[other]);
				done[other] = 1;
				if (x) {
					int r1 = ring_with(c, nn, i), r2 = ring_with(c, nn, other);
					x->attrs.ring_size = r1 && (!r2 || r1 < r2) ? r1 : r2;
					x->attrs.n_h = HC(c, nn);
				}
				break;
			}
			/* Lactam: the C(=O)-N bond itself lies in a ring. */
			int ring = 0;
			FOR_NB(c, i, e)
				if (c->na[e] == nn && c->bd[c->nbid[e]].in_ring)
					ring = ring_with(c, i, nn);
			if (ring) {
				x = emit(c, "lactam", i, o, nn);
				if (x) {
					x->attrs.ring_size = ring;
					x->attrs.n_h = HC(c, nn);
				}
			} else {
				x = emit(c, "amide", i, o, nn);
				if (x) {
					x->attrs.n_h = HC(c, nn);
					x->attrs.conjugated = carbonyl_conjugated(c, i);
				}
			}
			break;
		}
		case CL_ACID_HALIDE: {
			x = emit(c, "acid_halide", i, o, -1);
			int nhal = 0;
			FOR_NB(c, i, e)
				if (is_halogen(EL(c, c->na[e]))) {
					add_atom(c, x, c->na[e]);
					claim(c, c->na[e]);
					nhal++;
				}
			if (nhal == 2)
				c->caution[CAU_PHOSGENE] = 1;
			if (x)
				x->attrs.conjugated = carbonyl_conjugated(c, i);
			break;
		}
		case CL_UREA: {
			x = emit(c, "urea", i, o, -1);
			int nh = 0;
			FOR_NB(c, i, e)
				if (EL(c, c->na[e]) == 7) {
					add_atom(c, x, c->na[e]);
					claim(c, c->na[e]);
					nh += HC(c, c->na[e]);
				}
			if (x)
				x->attrs.n_h = nh;
			break;
		}
		case CL_CARBAMATE:
		case CL_THIOCARBAMATE: {
			/* R2N-C(=O)-O-R' or R2N-C(=O)-S-R': the N and the O or S are the group's. */
			int thio = c->cls[i] == CL_THIOCARBAMATE;
			int nn = hetero_of(c, i, 7), xo = hetero_of(c, i, thio ? 16 : 8);
			x = emit(c, thio ? "thiocarbamate" : "carbamate", i, o, nn);
			add_atom(c, x, xo);
			claim(c, nn);
			claim(c, xo);
			if (x)
				x->attrs.n_h = HC(c, nn);
			break;
		}
		case CL_THIOESTER: {
			/* The S is the thioester's: no sulfide beside it. */
			int sx = hetero_of(c, i, 16), r = -1;
			FOR_NB(c, sx, e)
				if (c->na[e] != i)
					r = c->na[e];
			x = emit(c, "thioester", i, o, sx);
			add_atom(c, x, r);
			claim(c, sx);
			if (x) {
				x->attrs.conjugated = carbonyl_conjugated(c, i);
				x->attrs.aryl = r >= 0 && (AROM(c, r) || vinyl_carbon(c, r));
				x->attrs.ring_size = ring_with(c, i, sx);
			}
			break;
		}
		case CL_THIOCARBONATE: {
			int oo = hetero_of(c, i, 8), sx = hetero_of(c, i, 16);
			x = emit(c, "thiocarbonate", i, o, oo);
			add_atom(c, x, sx);
			claim(c, oo);
			claim(c, sx);
			if (x)
				x->attrs.ring_size = ring_with(c, i, sx);
			break;
		}
		case CL_CARBONATE_ION: {
			x = emit(c, "carbonate_ion", i, o, -1);
			FOR_NB(c, i, e)
				claim(c, c->na[e]);
			break;
		}
		case CL_CARBONATE: {
			x = emit(c, "carbonate", i, o, -1);
			int ring = 0;
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (j != o && EL(c, j) == 8) {
					add_atom(c, x, j);
					claim(c, j);
					int r = ring_with(c, i, j);
					if (r && (!ring || r < ring))
						ring = r;
				}
			}
			if (x)
				x->attrs.ring_size = ring;
			break;
		}
		default:
			break;
		}
		done[i] = 1;
	}
	free(done);
}

/* ---------------------------------------------------------------- O-H */

/* Acceptor for a six-membered chelate ring from a donor on atom `base`
 * through its neighbour `via`: a C=O, NO2 or C=N on `via`. */
static int chelate_acceptor(const ctx *c, int via)
{
	if (EL(c, via) == 6) {
		FOR_NB(c, via, e) {
			int k = c->na[e];
			if (c->no[e] == 2 && (EL(c, k) == 8 || EL(c, k) == 7))
				return 1;
		}
	}
	if (EL(c, via) == 7 && oxo_count(c, via) == 2)
		return 1;
	return 0;
}

static void perceive_oh(ctx *c)
{
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii;
		if (EL(c, i) != 8 || HC(c, i) == 0 || (c->flags[i] & F_CLAIMED) || c->at[i].charge)
			continue;
		if (DEG(c, i) != 1)
			continue; /* water is handled with the components */
		int j = c->na[c->ns[i]];
		if (EL(c, j) != 6 || c->no[c->ns[i]] != 1)
			continue;
		if (AROM(c, j)) {
			/* Phenol; chelated when an ortho position carries C=O, C=N or NO2
			 * (salicylaldehyde, methyl salicylate, 2-nitrophenol). */
			instance *x = emit(c, "phenol", i, j, -1);
			FOR_NB(c, j, e) {
				int k = c->na[e];
				if (k == i || !AROM(c, k))
					continue;
				FOR_NB(c, k, f) {
					int s = c->na[f];
					if (s != j && !AROM(c, s) && c->no[f] == 1 && chelate_acceptor(c, s) && x)
						x->attrs.hbond_intra = 1;
				}
			}
			continue;
		}
		if (c->at[j].hybridization != 3)
			continue; /* enols: only the 1,3-diketone enol has a key */
		int subs = DEG(c, j) - 1;
		const char *id = subs <= 1 ? "alcohol_primary" : subs == 2 ? "alcohol_secondary"
		                                                           : "alcohol_tertiary";
		instance *x = emit(c, id, i, j, -1);
		/* beta-hydroxy carbonyl (aldol type): a six-membered chelate. */
		FOR_NB(c, j, e) {
			int k = c->na[e];
			if (k != i && c->no[e] == 1 && c->carbonyl_o[k] < 0) {
				FOR_NB(c, k, f) {
					int s = c->na[f];
					if (s != j && c->no[f] == 1 && c->carbonyl_o[s] >= 0 && x)
						x->attrs.hbond_intra = 1;
				}
			}
		}
	}
}

/* ---------------------------------------------------------------- nitrogen */

static void perceive_nitrogen(ctx *c)
{
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii;
		const irr_atom *a = &c->at[i];
		if (a->element != 7)
			continue;
		int oxo = oxo_count(c, i);
		int nbr_n = 0;
		FOR_NB(c, i, e)
			nbr_n += EL(c, c->na[e]) == 7;
		/* Nitro, nitrate ester, nitramine: N with two oxo O. */
		if (oxo == 2 && a->degree == 3) {
			int rest = -1;
			FOR_NB(c, i, e)
				if (!is_oxo(c, i, c->na[e], c->no[e], 8))
					rest = c->na[e];
			FOR_NB(c, i, e)
				claim(c, c->na[e]);
			c->nitro_groups++;
			if (rest >= 0 && EL(c, rest) == 6) {
				instance *x = emit(c, "nitro", i, rest, -1);
				if (x)
					x->attrs.aryl = AROM(c, rest);
			} else if (rest >= 0 && EL(c, rest) == 8) {
				emit(c, "nitrate_ester", i, rest, -1);
				c->caution[CAU_NITRATE] = 1;
				claim(c, rest);
			} else if (rest >= 0 && EL(c, rest) == 7) {
				emit(c, "nitramine", i, rest, -1);
				c->caution[CAU_NITRAMINE] = 1;
				claim(c, rest);
			}
			claim(c, i);
			continue;
		}
		/* N-oxides: an amine oxide (R3N+-O-, NMO) or an aromatic N-oxide
		 * (pyridine N-oxide); not a nitrone, whose N+ is also double-bonded. */
		if (oxo == 1 && a->charge == 1 &&
		    ((a->degree == 4 && !a->aromatic) || (a->degree == 3 && a->aromatic))) {
			int ox = -1;
			FOR_NB(c, i, e)
				if (is_oxo(c, i, c->na[e], c->no[e], 8))
					ox = c->na[e];
			instance *x = emit(c, "n_oxide", i, ox, -1);
			if (x)
				x->attrs.aryl = a->aromatic;
			claim(c, ox);
			claim(c, i);
			continue;
		}
		/* Nitrate ion (NO3-, written with N+ and two O-). */
		if (oxo == 3 && a->degree == 3) {
			emit(c, "nitrate_ion", i, -1, -1);
			FOR_NB(c, i, e)
				claim(c, c->na[e]);
			claim(c, i);
			continue;
		}
		/* Nitroso: R-N=O (C- or N-nitroso). */
		if (oxo == 1 && a->degree == 2 && a->charge == 0) {
			int rest = -1;
			FOR_NB(c, i, e)
				if (EL(c, c->na[e]) != 8 || c->no[e] != 2)
					rest = c->na[e];
			if (rest >= 0 && (EL(c, rest) == 6 || EL(c, rest) == 7)) {
				emit(c, "nitroso", i, rest, -1);
				if (EL(c, rest) == 7) {
					c->caution[CAU_NITROSAMINE] = 1;
					claim(c, rest);
				}
				claim(c, i);
			} else if (rest >= 0 && EL(c, rest) == 8 && DEG(c, rest) == 2) {
				/* R-O-N=O: a nitrite ester, not a nitroso compound. */
				emit(c, "nitrite_ester", i, rest, -1);
				c->caution[CAU_NITRITE] = 1;
				claim(c, rest);
				claim(c, i);
			}
			continue;
		}
		/* Azo: C-N=N-C with neither N aromatic (azobenzene, AIBN). Each pair
		 * once, from its lower-numbered N. */
		if (a->charge == 0 && a->degree == 2 && !a->aromatic && !(c->flags[i] & F_CLAIMED)) {
			int partner = -1, carbon = -1;
			FOR_NB(c, i, e) {
				int k = c->na[e];
				if (EL(c, k) == 7 && c->no[e] == 2)
					partner = k;
				else if (EL(c, k) == 6 && c->no[e] == 1)
					carbon = k;
			}
			if (partner > i && carbon >= 0 && c->at[partner].charge == 0 &&
			    DEG(c, partner) == 2 && !AROM(c, partner)) {
				int carbon2 = -1;
				FOR_NB(c, partner, e)
					if (EL(c, c->na[e]) == 6 && c->no[e] == 1)
						carbon2 = c->na[e];
				if (carbon2 >= 0) {
					instance *x = emit(c, "azo", i, partner, -1);
					int aryl = AROM(c, carbon) + AROM(c, carbon2);
					if (x)
						x->attrs.aryl = aryl;
					if (aryl == 0)
						c->caution[CAU_AZO_ALKYL] = 1;
					claim(c, i);
					claim(c, partner);
					continue;
				}
			}
		}
		/* Azide, diazo, diazonium: a central N+ between N or C and a terminal N. */
		if (a->charge == 1 && a->degree == 2 && nbr_n >= 1 && !a->aromatic) {
			int term = -1, other = -1, term_order = 0;
			FOR_NB(c, i, e) {
				int k = c->na[e];
				if (EL(c, k) == 7 && DEG(c, k) == 1 && term < 0) {
					term = k;
					term_order = c->no[e];
				}
			}
			FOR_NB(c, i, e)
				if (c->na[e] != term)
					other = c->na[e];
			if (term >= 0 && other >= 0) {
				if (EL(c, other) == 7) {
					emit(c, "azide", other, i, term);
					c->caution[CAU_AZIDE] = 1;
					FOR_NB(c, other, e) {
						int k = c->na[e];
						if ((EL(c, k) == 6 && c->carbonyl_o[k] >= 0) ||
						    (EL(c, k) == 16 && oxo_count(c, k) == 2))
							c->caution[CAU_ACYL_AZIDE] = 1;
					}
					claim(c, other);
					claim(c, term);
					claim(c, i);
					continue;
				}
				if (EL(c, other) == 6) {
					int co = bond_between(c, i, other);
					if (term_order == 3 && co == 1 && c->at[other].charge == 0) {
						c->caution[CAU_DIAZONIUM] = 1;
					} else {
						emit(c, "diazo", other, i, term);
						c->caution[CAU_DIAZO] = 1;
					}
					claim(c, term);
					claim(c, i);
					continue;
				}
			}
		}
	}
	/* Second pass: what the N-O and N-N groups above left. */
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii;
		const irr_atom *a = &c->at[i];
		if (a->element != 7 || (c->flags[i] & F_CLAIMED))
			continue;
		int maxord = 0;
		FOR_NB(c, i, e)
			if (c->no[e] > maxord)
				maxord = c->no[e];
		/* Ammonium: four single bonds (or an aromatic N-H+), no O- partner. */
		if (a->charge == 1) {
			int has_ominus = 0;
			FOR_NB(c, i, e)
				if (EL(c, c->na[e]) == 8 && c->at[c->na[e]].charge < 0)
					has_ominus = 1;
			if (!has_ominus && ((maxord <= 1 && a->degree + a->h_count == 4) ||
			                    (a->aromatic && a->h_count > 0))) {
				instance *x = emit(c, "ammonium", i, -1, -1);
				if (x)
					x->attrs.n_h = a->h_count;
				claim(c, i);
			}
			continue;
		}
		/* Amine: neutral, three single bonds, not acylated or sulfonylated. */
		if (a->charge != 0 || a->aromatic || maxord > 1 || a->degree + a->h_count != 3)
			continue;
		int acyl = 0, aryl = 0;
		FOR_NB(c, i, e) {
			int k = c->na[e];
			if (AROM(c, k))
				aryl = 1;
			FOR_NB(c, k, f) {
				int z = EL(c, c->na[f]);
				if (c->na[f] != i && c->no[f] == 2 && (z == 8 || z == 16) &&
				    EL(c, k) != 7)
					acyl = 1; /* amide-like (C=O, C=S, S=O, P=O) */
			}
		}
		if (acyl)
			continue;
		instance *x = emit(c, "amine", i, -1, -1);
		if (x) {
			x->attrs.n_h = a->h_count;
			x->attrs.aryl = aryl;
		}
	}

	/* Hydrazines (N-N single bond between two amine-type N). */
	for (size_t k = 0; k < c->nb; k++) {
		const irr_bond *b = &c->bd[k];
		if (b->order != 1 || EL(c, b->a) != 7 || EL(c, b->b) != 7)
			continue;
		int ok = 1;
		for (int s = 0; s < 2; s++) {
			int x = s ? b->b : b->a;
			if (AROM(c, x) || c->at[x].charge || (c->flags[x] & F_CLAIMED) ||
			    c->at[x].degree + c->at[x].h_count != 3)
				ok = 0;
			FOR_NB(c, x, e)
				if (c->no[e] != 1)
					ok = 0;
		}
		if (ok)
			c->caution[CAU_HYDRAZINE] = 1;
	}
}

/* Hydrogen halides written as separate components ("CCN.Cl"): the usual
 * way to write an amine hydrohalide salt. The amines they protonate (the
 * most basic first: aliphatic, then aryl) are reported as ammonium. */
static void protonate_amine_salts(ctx *c)
{
	int acids = 0;
	for (size_t i = 0; i < c->n; i++) {
		int z = EL(c, i);
		if ((z == 17 || z == 35 || z == 53) && c->at[i].degree == 0 && HC(c, i) == 1 &&
		    c->at[i].charge == 0)
			acids++;
	}
	for (int pass = 0; pass < 2 && acids > 0; pass++) {
		for (size_t k = 0; k < c->ninst && acids > 0; k++) {
			instance *x = &c->inst[k];
			if (strcmp(x->id, "amine") != 0 || x->attrs.aryl != pass)
				continue;
			strcpy(x->id, "ammonium");
			x->attrs.n_h += 1;
			x->attrs.aryl = 0;
			acids--;
		}
	}
	/* Then pyridine-type ring N (pyridine hydrochloride: pyridinium N-H). */
	for (size_t i = 0; i < c->n && acids > 0; i++) {
		if (EL(c, i) == 7 && AROM(c, i) && HC(c, i) == 0 && DEG(c, i) == 2 &&
		    c->at[i].charge == 0) {
			instance *x = emit(c, "ammonium", (int)i, -1, -1);
			if (x)
				x->attrs.n_h = 1;
			acids--;
		}
	}
}

/* C=N (imine, oxime, hydrazone), cumulated systems, C#N, C#C. */
static void perceive_multiple_bonds(ctx *c)
{
	for (size_t k = 0; k < c->nb; k++) {
		const irr_bond *b = &c->bd[k];
		int p = b->a, q = b->b;
		if (b->order == 3) {
			int cc = EL(c, p) == 6 ? p : q, other = cc == p ? q : p;
			if (EL(c, cc) != 6)
				continue;
			if (EL(c, other) == 7) {
				if (c->at[cc].charge < 0 && c->at[other].charge > 0 && DEG(c, other) == 2) {
					emit(c, "isonitrile", cc, other, -1);
					c->caution[CAU_ISONITRILE] = 1;
				} else if (DEG(c, other) == 1 && c->at[other].charge == 0) {
					/* C#N on S or O: a thiocyanate (R-S-CN, SCN-) or a
					 * cyanate ester (R-O-CN), whose C#N bands lie apart
					 * from a nitrile's; the S or O is theirs. */
					int het = -1;
					FOR_NB(c, cc, e)
						if (c->na[e] != other && (EL(c, c->na[e]) == 16 || EL(c, c->na[e]) == 8))
							het = c->na[e];
					const char *id = "nitrile";
					int cyanide = DEG(c, cc) == 1 && (HC(c, cc) > 0 || c->at[cc].charge < 0);
					if (cyanide)
						id = "cyanide"; /* HCN or CN-: C#N near 2080, not 2250 */
					else if (het >= 0 && EL(c, het) == 16)
						id = DEG(c, het) == 1 && c->at[het].charge < 0 ? "thiocyanate_ion"
						     : DEG(c, het) == 2                        ? "thiocyanate"
						                                               : "nitrile";
					else if (het >= 0 && DEG(c, het) == 2 && c->at[het].charge == 0)
						id = "cyanate_ester";
					int nitrile = !strcmp(id, "nitrile");
					instance *x = emit(c, id, cc, other, nitrile || cyanide ? -1 : het);
					if (cyanide)
						c->caution[CAU_CYANIDE] = 1;
					else if (!nitrile)
						claim(c, het);
					else if (x)
						x->attrs.conjugated = conjugated_at(c, cc, other, 0);
				}
			} else if (EL(c, other) == 6) {
				const char *id = HC(c, p) > 0 || HC(c, q) > 0 ? "alkyne_terminal"
				                                               : "alkyne_internal";
				emit(c, id, p, q, -1);
			}
			continue;
		}
		if (b->order != 2)
			continue;
		/* C=N: the carbon must not be cumulated (isocyanates, carbodiimides). */
		if ((EL(c, p) == 6 && EL(c, q) == 7) || (EL(c, p) == 7 && EL(c, q) == 6)) {
			int cc = EL(c, p) == 6 ? p : q, nn = cc == p ? q : p;
			int dbl = 0;
			FOR_NB(c, cc, e)
				dbl += c->no[e] == 2 || c->no[e] == 3;
			if (dbl != 1 || c->at[nn].charge != 0)
				continue;
			const char *id = "imine";
			int third = -1;
			FOR_NB(c, nn, e)
				if (c->na[e] != cc && c->no[e] == 1) {
					int z = EL(c, c->na[e]);
					if (z == 8 && strcmp(id, "imine") == 0) {
						id = "oxime";
						third = c->na[e];
					} else if (z == 7) {
						id = "hydrazone";
						third = c->na[e];
					}
				}
			emit(c, id, cc, nn, third);
			claim(c, nn);
			if (third >= 0 && strcmp(id, "oxime") == 0)
				claim(c, third);
			continue;
		}
		if (EL(c, p) == 6 && EL(c, q) == 16 && DEG(c, q) == 1) {
			int dbl = 0;
			FOR_NB(c, p, e)
				dbl += c->no[e] == 2;
			if (dbl == 1)
				emit(c, "thiocarbonyl", p, q, -1);
			continue;
		}
		if (EL(c, q) == 6 && EL(c, p) == 16 && DEG(c, p) == 1) {
			int dbl = 0;
			FOR_NB(c, q, e)
				dbl += c->no[e] == 2;
			if (dbl == 1)
				emit(c, "thiocarbonyl", q, p, -1);
			continue;
		}
	}

	/* Cumulated centres: a carbon with two double bonds. */
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii, d[2], nd = 0;
		if (EL(c, i) != 6)
			continue;
		FOR_NB(c, i, e)
			if (c->no[e] == 2 && nd < 2)
				d[nd++] = c->na[e];
			else if (c->no[e] == 2)
				nd++;
		if (nd != 2)
			continue;
		int z1 = EL(c, d[0]), z2 = EL(c, d[1]);
		if (z1 > z2) {
			int t = d[0];
			d[0] = d[1];
			d[1] = t;
			t = z1;
			z1 = z2;
			z2 = t;
		}
		if (z1 == 6 && z2 == 6) {
			emit(c, "allene", d[0], i, d[1]);
			c->flags[d[0]] |= F_ALKENE_DONE;
			c->flags[d[1]] |= F_ALKENE_DONE;
			c->flags[i] |= F_ALKENE_DONE;
		} else if (z1 == 7 && z2 == 8) {
			emit(c, "isocyanate", d[0], i, d[1]);
			c->caution[CAU_ISOCYANATE] = 1;
			claim(c, d[0]);
		} else if (z1 == 7 && z2 == 16) {
			emit(c, "isothiocyanate", d[0], i, d[1]);
			claim(c, d[0]);
		} else if (z1 == 7 && z2 == 7) {
			emit(c, "carbodiimide", d[0], i, d[1]);
			claim(c, d[0]);
			claim(c, d[1]);
		}
	}
}

/* ---------------------------------------------------------------- alkenes */

static void perceive_alkenes(ctx *c)
{
	for (size_t k = 0; k < c->nb; k++) {
		const irr_bond *b = &c->bd[k];
		int p = b->a, q = b->b;
		if (b->order != 2 || EL(c, p) != 6 || EL(c, q) != 6 || AROM(c, p) || AROM(c, q))
			continue;
		if ((c->flags[p] & F_ALKENE_DONE) && (c->flags[q] & F_ALKENE_DONE))
			continue;
		int cumulated = 0;
		FOR_NB(c, p, e)
			cumulated += c->na[e] != q && (c->no[e] == 2 || c->no[e] == 3);
		FOR_NB(c, q, e)
			cumulated += c->na[e] != p && (c->no[e] == 2 || c->no[e] == 3);
		if (cumulated)
			continue; /* ketenes, allenes: not an alkene C=C */
		int sp = DEG(c, p) - 1, sq = DEG(c, q) - 1;
		int tot = sp + sq;
		const char *pat;
		int ring = b->in_ring ? ring_with(c, p, q) : 0;
		if (tot == 0)
			pat = "unsubstituted";
		else if (tot == 1)
			pat = "vinyl";
		else if (tot == 2 && (sp == 2 || sq == 2))
			pat = "vinylidene";
		else if (tot == 2) {
			/* A C=C in a ring of up to seven atoms can only be cis. */
			if (ring && ring <= 7)
				pat = "cis";
			else
				pat = b->stereo == 1 ? "cis" : b->stereo == 2 ? "trans" : "unknown";
		} else if (tot == 3)
			pat = "trisubstituted";
		else
			pat = "tetrasubstituted";
		instance *x = emit(c, "alkene", p, q, -1);
		set_pattern(x, pat);
		if (x) {
			x->attrs.ring_size = ring;
			x->attrs.conjugated = conjugated_at(c, p, q, 1) || conjugated_at(c, q, p, 1);
		}
	}
}

/* ---------------------------------------------------------------- rings */

/* The ring's atoms in bonded order, starting at ring[0]; 0 when the ring
 * cannot be walked (it always can for an SSSR ring). */
static int ring_in_order(const ctx *c, const int *ring, int size, int *order)
{
	order[0] = ring[0];
	int prev = -1;
	for (int q = 1; q < size; q++) {
		int cur = order[q - 1], next = -1;
		FOR_NB(c, cur, e) {
			int j = c->na[e];
			if (j == prev)
				continue;
			for (int t = 0; t < size; t++)
				if (ring[t] == j) {
					next = j;
					break;
				}
			if (next >= 0)
				break;
		}
		if (next < 0)
			return 0;
		prev = cur;
		order[q] = next;
	}
	return 1;
}

/* A heteroaromatic ring group over the ring's atoms: n_h is its ring C-H
 * count (the C-H bands go when it is 0), pattern the parent's name. */
static void ring_group(ctx *c, const char *id, const int *atoms, int size, const char *kind)
{
	instance *x = new_instance(c, id);
	int ch = 0;
	for (int q = 0; q < size; q++) {
		add_atom(c, x, atoms[q]);
		ch += EL(c, atoms[q]) == 6 && HC(c, atoms[q]) > 0;
	}
	if (x) {
		x->attrs.n_h = ch;
		if (kind)
			set_pattern(x, kind);
	}
}

/* The six-membered ring's parent name from its N positions (1,2 pyridazine;
 * 1,3 pyrimidine; 1,4 pyrazine). */
static const char *azine_kind(const ctx *c, const int *order)
{
	int pos[6], n = 0;
	for (int q = 0; q < 6; q++)
		if (EL(c, order[q]) == 7)
			pos[n++] = q;
	if (n == 2) {
		int d = pos[1] - pos[0];
		if (d > 3)
			d = 6 - d;
		return d == 1 ? "pyridazine" : d == 2 ? "pyrimidine" : "pyrazine";
	}
	if (n == 3)
		return pos[1] - pos[0] == 2 && pos[2] - pos[1] == 2 ? "1,3,5-triazine" : "triazine";
	return n == 4 ? "tetrazine" : "azine";
}

/* Whether the five-membered aromatic ring holding N-H atom `a` also holds
 * an N without H (an azole rather than a pyrrole). */
static int ring_has_acceptor_n(const ctx *c, int a)
{
	for (size_t r = 0; r < irr_molecule_ring_count(c->m); r++) {
		const int *ring;
		size_t size = irr_molecule_ring(c->m, r, &ring), q;
		if (size != 5)
			continue;
		for (q = 0; q < size && ring[q] != a; q++)
			;
		if (q == size)
			continue;
		for (q = 0; q < size; q++)
			if (ring[q] != a && EL(c, ring[q]) == 7 && HC(c, ring[q]) == 0 &&
			    DEG(c, ring[q]) == 2)
				return 1;
	}
	return 0;
}

/* The parent ring's name, for the report: which heteroatoms, and whether two
 * of them are bonded (pyrazole vs imidazole, isoxazole vs oxazole). */
static const char *azole_kind(const ctx *c, const int *order)
{
	int nN = 0, nO = 0, nS = 0, adjacent = 0;
	for (int q = 0; q < 5; q++) {
		int z = EL(c, order[q]), zn = EL(c, order[(q + 1) % 5]);
		nN += z == 7;
		nO += z == 8;
		nS += z == 16;
		if (z != 6 && zn != 6)
			adjacent = 1;
	}
	if (nO + nS == 0)
		return nN == 2 ? (adjacent ? "pyrazole" : "imidazole") : nN == 3 ? "triazole"
		       : nN == 4                                            ? "tetrazole"
		                                                            : "azole";
	if (nO == 1 && nS == 0)
		return nN == 1 ? (adjacent ? "isoxazole" : "oxazole") : nN == 2 ? "oxadiazole" : "azole";
	if (nS == 1 && nO == 0)
		return nN == 1 ? (adjacent ? "isothiazole" : "thiazole") : nN == 2 ? "thiadiazole" : "azole";
	return "azole";
}

static void perceive_rings(ctx *c)
{
	for (size_t r = 0; r < irr_molecule_ring_count(c->m); r++) {
		const int *ring;
		int size = (int)irr_molecule_ring(c->m, r, &ring);
		int all_arom = 1, nC = 0, nN = 0, nN_py = 0, nO = 0, nS = 0;
		for (int q = 0; q < size; q++) {
			int a = ring[q];
			if (!AROM(c, a))
				all_arom = 0;
			int z = EL(c, a);
			nC += z == 6;
			nN += z == 7;
			nO += z == 8;
			nS += z == 16;
			/* Pyridine-type: no H, two ring bonds; its N-oxide too. */
			if (z == 7 && HC(c, a) == 0 &&
			    (DEG(c, a) == 2 || (DEG(c, a) == 3 && c->at[a].charge == 1 && oxo_count(c, a) == 1)))
				nN_py++;
		}
		if (!all_arom)
			continue;
		if (size == 6 && nC == 6) {
			/* Mark positions bearing anything outside the ring. */
			int order[6], subst[6], nsub = 0;
			if (!ring_in_order(c, ring, 6, order))
				continue;
			for (int q = 0; q < 6; q++) {
				int a = order[q], out = 0;
				FOR_NB(c, a, e) {
					int j = c->na[e], inside = 0;
					for (int t = 0; t < 6; t++)
						if (ring[t] == j)
							inside = 1;
					if (!inside)
						out = 1;
				}
				subst[q] = out;
				nsub += out;
			}
			const char *pat = "other";
			if (nsub == 0)
				pat = "unsubstituted";
			else if (nsub == 1)
				pat = "mono";
			else if (nsub >= 5)
				pat = "penta_hexa";
			else if (nsub == 2) {
				int p1 = -1, p2 = -1;
				for (int q = 0; q < 6; q++)
					if (subst[q]) {
						if (p1 < 0)
							p1 = q;
						else
							p2 = q;
					}
				int d = p2 - p1;
				if (d > 3)
					d = 6 - d;
				pat = d == 1 ? "ortho" : d == 2 ? "meta" : "para";
			} else if (nsub == 3) {
				/* Count substituted neighbours pairs around the ring. */
				int adj = 0;
				for (int q = 0; q < 6; q++)
					if (subst[q] && subst[(q + 1) % 6])
						adj++;
				pat = adj == 2 ? "1,2,3" : adj == 0 ? "1,3,5" : "1,2,4";
			}
			instance *x = new_instance(c, "benzene_ring");
			for (int q = 0; q < 6; q++)
				add_atom(c, x, order[q]);
			set_pattern(x, pat);
		} else if (size == 6 && nN_py > 0 && nN >= 2) {
			/* Diazines and triazines: their ring modes sit lower than a
			 * pyridine's, and a 1,3,5-triazine adds its strong ring bend. */
			int order[6];
			if (ring_in_order(c, ring, 6, order))
				ring_group(c, "azine_ring", order, 6, azine_kind(c, order));
		} else if (size == 6 && nN_py > 0) {
			instance *x = new_instance(c, "pyridine_ring");
			for (int q = 0; q < size; q++)
				add_atom(c, x, ring[q]);
		} else if (size == 5 && nN >= 1 && nN + nO + nS >= 2) {
			/* Before furan/thiophene: oxazole and thiazole rings have their C=N. */
			int order[5];
			if (ring_in_order(c, ring, 5, order))
				ring_group(c, "azole_ring", order, 5, azole_kind(c, order));
		} else if (size == 5 && nO > 0) {
			instance *x = new_instance(c, "furan_ring");
			for (int q = 0; q < size; q++)
				add_atom(c, x, ring[q]);
		} else if (size == 5 && nS > 0) {
			instance *x = new_instance(c, "thiophene_ring");
			for (int q = 0; q < size; q++)
				add_atom(c, x, ring[q]);
		} else if (size == 5 && nN == 1 && nC == 4) {
			ring_group(c, "pyrrole_ring", ring, 5, NULL);
		}
	}
	/* A ring N-H next to (or across from) a ring N without H: the N-H...N
	 * chains of imidazoles, pyrazoles, triazoles and tetrazoles in the solid
	 * put their N-H stretch far below a pyrrole's or an indole's. */
	for (size_t i = 0; i < c->n; i++)
		if (EL(c, i) == 7 && AROM(c, i) && HC(c, i) > 0 && c->at[i].ring_size == 5 &&
		    c->at[i].charge == 0)
			emit(c, ring_has_acceptor_n(c, (int)i) ? "azole_nh" : "pyrrole_nh", (int)i, -1, -1);
}

/* ---------------------------------------------------------------- alkyl */

static int is_methyl(const ctx *c, int j)
{
	return EL(c, j) == 6 && HC(c, j) == 3 && DEG(c, j) == 1 && c->at[j].hybridization == 3;
}

static void perceive_alkyl(ctx *c)
{
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii;
		if (EL(c, i) != 6 || c->at[i].hybridization != 3)
			continue;
		int h = HC(c, i);
		if (h == 3)
			emit(c, "methyl", i, -1, -1);
		else if (h == 2)
			emit(c, "methylene", i, -1, -1);
		else if (h == 1)
			emit(c, "methine", i, -1, -1);
		int nme = 0, me[4];
		FOR_NB(c, i, e)
			if (is_methyl(c, c->na[e]) && nme < 4)
				me[nme++] = c->na[e];
		const char *id = NULL;
		if (nme >= 3 && h == 0)
			id = "tert_butyl";
		else if (nme == 2 && h == 1)
			id = "isopropyl";
		else if (nme == 2 && h == 0)
			id = "gem_dimethyl";
		if (id) {
			instance *x = emit(c, id, i, -1, -1);
			for (int q = 0; q < nme; q++)
				add_atom(c, x, me[q]);
		}
	}
	/* Runs of >= 4 open-chain CH2 (the CH2 rock near 720 cm-1 needs them):
	 * such CH2 have exactly two neighbours, so the runs are simple paths;
	 * walked iteratively from each end. */
	unsigned char *seen = calloc(c->n ? c->n : 1, 1);
	if (!seen) {
		c->oom = 1;
		return;
	}
#define CHAIN_CH2(i) (EL(c, i) == 6 && HC(c, i) == 2 && DEG(c, i) == 2 && \
	              !c->at[i].in_ring && c->at[i].hybridization == 3)
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii;
		if (seen[i] || !CHAIN_CH2(i))
			continue;
		/* Find one end of the run. */
		int start = i, prev = -1;
		for (;;) {
			int next = -1;
			FOR_NB(c, start, e) {
				int j = c->na[e];
				if (j != prev && CHAIN_CH2(j))
					next = j;
			}
			if (next < 0 || next == i)
				break;
			prev = start;
			start = next;
		}
		/* Walk to the other end, collecting the run. */
		size_t off = c->niatoms;
		int len = 0, cur = start;
		prev = -1;
		instance tmp;
		memset(&tmp, 0, sizeof tmp);
		while (cur >= 0 && !seen[cur]) {
			seen[cur] = 1;
			add_atom(c, &tmp, cur);
			len++;
			int next = -1;
			FOR_NB(c, cur, e) {
				int j = c->na[e];
				if (j != prev && CHAIN_CH2(j) && !seen[j])
					next = j;
			}
			prev = cur;
			cur = next;
		}
		if (len >= 4 && !c->oom) {
			/* Turn the collected atoms into an instance in place. */
			size_t natoms = tmp.natoms;
			c->niatoms = off;
			instance *x = new_instance(c, "long_chain");
			if (x) {
				x->atom_off = off;
				x->natoms = natoms;
				c->niatoms = off + natoms;
			}
		} else {
			c->niatoms = off;
		}
	}
#undef CHAIN_CH2
	free(seen);
}

/* ---------------------------------------------------------------- S, P, Si, B */

/* P or Si carrying aromatic rings (PPh3, Ph3PO, Wittig salts, TBDPS): one
 * instance per P or Si, with aryl = how many rings it carries. The
 * phenyl's X-sensitive ring modes near 1435 and 1110 are this group's. */
static void aryl_on(ctx *c, int i, const char *id)
{
	int n = 0;
	FOR_NB(c, i, e)
		n += EL(c, c->na[e]) == 6 && AROM(c, c->na[e]);
	if (n) {
		instance *x = emit(c, id, i, -1, -1);
		if (x)
			x->attrs.aryl = n;
	}
}

static void perceive_heteroatoms(ctx *c)
{
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii, z = EL(c, i);
		const irr_atom *a = &c->at[i];
		if (z == 16 && !a->aromatic) {
			int oxo = oxo_count(c, i), nC = 0, nN = -1, nOH = -1, nOR = -1, nOm = -1,
			    nCl = -1, nOR2 = -1, nF = -1, n_ominus = 0, cyano = 0;
			FOR_NB(c, i, e) {
				int j = c->na[e], zj = EL(c, j);
				if (is_oxo(c, i, j, c->no[e], 8))
					continue;
				if (zj == 6) {
					nC++;
					cyano += cyano_carbon(c, j);
				} else if (zj == 7)
					nN = j;
				else if (zj == 8 && c->at[j].charge < 0)
					nOm = j, n_ominus++;
				else if (zj == 8 && HC(c, j) > 0)
					nOH = j;
				else if (zj == 8 && nOR >= 0)
					nOR2 = j;
				else if (zj == 8)
					nOR = j;
				else if (zj == 17)
					nCl = j;
				else if (zj == 9)
					nF = j;
			}
			if (oxo == 0 && a->charge == 0) {
				if (a->h_count > 0 && a->degree == 1 && nC == 1 &&
				    !(c->flags[i] & F_CLAIMED))
					emit(c, "thiol", i, c->na[c->ns[i]], -1);
				else if (a->degree == 2 && nC == 2 && a->h_count == 0 && !cyano &&
				         !(c->flags[i] & F_CLAIMED))
					emit(c, "sulfide", i, -1, -1); /* R-S-C#N: a thiocyanate, below */
			} else if (oxo == 1 && a->degree == 3 && nC == 2) {
				emit(c, "sulfoxide", i, -1, -1);
			} else if (oxo == 2 && a->degree == 4) {
				instance *x = NULL;
				if (nC == 2)
					x = emit(c, "sulfone", i, -1, -1);
				else if (nN >= 0 && nOR < 0 && nOH < 0 && nOm < 0) {
					x = emit(c, "sulfonamide", i, nN, -1);
					if (x)
						x->attrs.n_h = HC(c, nN);
					claim(c, nN);
				} else if (nC == 1 && nOR >= 0) {
					x = emit(c, "sulfonate_ester", i, nOR, -1);
					claim(c, nOR);
				} else if (nC == 1 && nOH >= 0) {
					x = emit(c, "sulfonic_acid", i, nOH, -1);
					claim(c, nOH);
				} else if (nC == 1 && nOm >= 0) {
					x = emit(c, "sulfonate", i, nOm, -1);
					claim(c, nOm);
				} else if (nC == 1 && nCl >= 0) {
					x = emit(c, "sulfonyl_chloride", i, nCl, -1);
					claim(c, nCl);
				} else if (nC == 1 && nF >= 0) {
					x = emit(c, "sulfonyl_fluoride", i, nF, -1);
					claim(c, nF);
				} else if (nC == 0 && n_ominus == 2 && nOR < 0 && nOH < 0) {
					/* SO4 2- (Na2SO4, MgSO4: drying agents). */
					x = emit(c, "sulfate_ion", i, -1, -1);
					FOR_NB(c, i, e)
						claim(c, c->na[e]);
				} else if (nC == 0 && nOR >= 0 && nOR2 >= 0) {
					/* (RO)2SO2: the two ester O are the sulfate's,
					 * not ethers. */
					x = emit(c, "sulfate_ester", i, nOR, nOR2);
					claim(c, nOR);
					claim(c, nOR2);
					c->caution[CAU_DIALKYL_SULFATE] = 1;
				} else if (nC == 0 && nOR >= 0 && (nOm >= 0 || nOH >= 0)) {
					/* ROSO3- (or ROSO3H): detergents such as SDS. */
					x = emit(c, "alkyl_sulfate", i, nOR, nOm >= 0 ? nOm : nOH);
					claim(c, nOR);
					claim(c, nOH);
				}
				(void)x;
			}
		} else if (z == 15) {
			int oxo = oxo_count(c, i), nO = 0, nC = 0, nOC = 0, nOm = 0;
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (is_oxo(c, i, j, c->no[e], 8))
					continue;
				if (EL(c, j) == 8) {
					nO++;
					nOm += c->at[j].charge < 0;
					FOR_NB(c, j, f)
						nOC += EL(c, c->na[f]) == 6;
					claim(c, j);
				} else if (EL(c, j) == 6) {
					nC++;
				}
			}
			if (oxo == 0 && a->charge == 0 && a->degree + a->h_count == 3 &&
			    nC == a->degree)
				emit(c, "phosphine", i, -1, -1);
			else if (oxo == 1 && nO == 3 && nOC == 0 && nOm > 0)
				emit(c, "phosphate_ion", i, -1, -1); /* PO4 3-, HPO4 2-, H2PO4- */
			else if (oxo == 1 && nO == 3 && nOC == 0)
				; /* phosphoric acid: no key */
			else if (oxo == 1 && nO == 3)
				emit(c, "phosphate", i, -1, -1);
			else if (oxo == 1 && nO >= 1)
				emit(c, "phosphonate", i, -1, -1);
			else if (oxo == 1 && nO == 0)
				emit(c, "phosphine_oxide", i, -1, -1);
			if (a->h_count > 0)
				emit(c, "p_h", i, -1, -1);
			aryl_on(c, i, "p_aryl");
		} else if (z == 14) {
			if (a->h_count > 0)
				emit(c, "si_h", i, -1, -1);
			aryl_on(c, i, "si_aryl");
			instance *x = NULL;
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (EL(c, j) == 6 && HC(c, j) == 3 && DEG(c, j) == 1) {
					if (!x)
						x = emit(c, "si_methyl", i, -1, -1);
					add_atom(c, x, j);
				}
				if (EL(c, j) == 8 && DEG(c, j) == 2 && !(c->flags[j] & F_CLAIMED)) {
					int other = -1;
					FOR_NB(c, j, f)
						if (c->na[f] != i)
							other = c->na[f];
					if (other >= 0 && (EL(c, other) == 14 || EL(c, other) == 6)) {
						emit(c, "siloxane", i, j, other);
						claim(c, j);
					}
				}
			}
		} else if (z == 5) {
			int oh = 0, orr = 0;
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (EL(c, j) != 8 || c->no[e] != 1)
					continue;
				if (HC(c, j) > 0)
					oh++;
				else if (DEG(c, j) == 2)
					orr++;
				claim(c, j);
			}
			if (oh >= 2)
				emit(c, "boronic_acid", i, -1, -1);
			else if (orr >= 2)
				emit(c, "boronic_ester", i, -1, -1);
			if (a->h_count > 0) /* NaBH4, NaBH3CN, STAB, boranes */
				emit(c, "b_h", i, -1, -1);
		} else if (z == 17 && a->degree == 4) {
			/* ClO4 (ester or anion, however the charges are written). */
			c->caution[CAU_PERCHLORATE] = 1;
		}
	}
	/* S-S and O-O bonds. */
	for (size_t k = 0; k < c->nb; k++) {
		const irr_bond *b = &c->bd[k];
		if (b->order != 1)
			continue;
		if (EL(c, b->a) == 16 && EL(c, b->b) == 16 && DEG(c, b->a) == 2 &&
		    DEG(c, b->b) == 2 && !oxo_count(c, b->a) && !oxo_count(c, b->b)) {
			emit(c, "disulfide", b->a, b->b, -1);
		}
		if (EL(c, b->a) == 8 && EL(c, b->b) == 8) {
			emit(c, "peroxide", b->a, b->b, -1);
			claim(c, b->a);
			claim(c, b->b);
			c->caution[CAU_PEROXIDE] = 1;
		}
	}
}

/* ---------------------------------------------------------------- ethers, halides */

static int carbon_has_hetero_double(const ctx *c, int j)
{
	FOR_NB(c, j, e) {
		int z = EL(c, c->na[e]);
		if (c->no[e] == 2 && z != 6)
			return 1;
	}
	return 0;
}

static void perceive_ethers_halides(ctx *c)
{
	for (size_t ii = 0; ii < c->n; ii++) {
		int i = (int)ii, z = EL(c, i);
		const irr_atom *a = &c->at[i];
		if (z == 8 && a->degree == 2 && a->h_count == 0 && a->charge == 0 && !a->aromatic &&
		    !(c->flags[i] & F_CLAIMED)) {
			int j1 = -1, j2 = -1, ok = 1;
			FOR_NB(c, i, e) {
				int j = c->na[e];
				if (EL(c, j) != 6 || c->no[e] != 1 || carbon_has_hetero_double(c, j))
					ok = 0;
				if (j1 < 0)
					j1 = j;
				else
					j2 = j;
			}
			if (!ok)
				continue;
			if (a->in_ring && a->ring_size == 3) {
				emit(c, "epoxide", j1, i, j2);
				continue;
			}
			instance *x = emit(c, "ether", j1, i, j2);
			if (x)
				x->attrs.aryl = (AROM(c, j1) || vinyl_carbon(c, j1)) +
				                (AROM(c, j2) || vinyl_carbon(c, j2));
			continue;
		}
		if (is_halogen(z) && a->degree == 1 && !(c->flags[i] & F_CLAIMED)) {
			int j = c->na[c->ns[i]];
			if (EL(c, j) != 6 || c->no[c->ns[i]] != 1)
				continue;
			const char *id = z == 9 ? "c_f" : z == 17 ? "c_cl" : z == 35 ? "c_br" : "c_i";
			instance *x = emit(c, id, j, i, -1);
			if (x)
				x->attrs.aryl = AROM(c, j);
		}
	}
}

/* ---------------------------------------------------------------- counts */

static void count_bonds(ctx *c, irr_counts *k)
{
	memset(k, 0, sizeof *k);
	for (size_t i = 0; i < c->n; i++) {
		const irr_atom *a = &c->at[i];
		if (a->element == 8)
			k->o_h += a->h_count;
		else if (a->element == 7)
			k->n_h += a->h_count;
		else if (a->element == 6) {
			if (a->hybridization == 1)
				k->c_h_sp += a->h_count;
			else if (a->hybridization == 2)
				k->c_h_sp2 += a->h_count;
			else if (a->hybridization == 3) {
				k->c_h_sp3 += a->h_count;
				if (a->h_count == 3)
					k->ch3++;
				else if (a->h_count == 2)
					k->ch2++;
				else if (a->h_count == 1)
					k->ch++;
			}
		}
	}
	for (size_t b = 0; b < c->nb; b++) {
		int za = EL(c, c->bd[b].a), zb = EL(c, c->bd[b].b);
		int lo = za < zb ? za : zb, hi = za < zb ? zb : za;
		if (lo == 6 && hi == 7 && c->bd[b].order == 3)
			k->c_n_triple++;
		if (lo == 6 && hi == 8 && c->bd[b].order == 2)
			k->c_o_double++;
	}
	for (size_t r = 0; r < irr_molecule_ring_count(c->m); r++) {
		const int *ring;
		size_t size = irr_molecule_ring(c->m, r, &ring), q;
		for (q = 0; q < size && AROM(c, ring[q]); q++)
			;
		if (q == size)
			k->aromatic_rings++;
	}
	k->heavy_atoms = (int)c->n;
	k->components = irr_molecule_components(c->m);
}

static void perceive_water(ctx *c)
{
	for (size_t i = 0; i < c->n; i++)
		if (EL(c, i) == 8 && DEG(c, i) == 0 && HC(c, i) == 2 && c->at[i].charge == 0)
			emit(c, "water", (int)i, -1, -1);
}

/* Bonds to deuterium (or tritium): one instance per bond, so that CDCl3
 * and CD2Cl2 give 1 and 2 C-D (the stretch sits near 2100-2300 cm-1,
 * about 1/sqrt(2) of the C-H one: reduced-mass isotope shift). */
static void perceive_deuterium(ctx *c)
{
	for (size_t i = 0; i < c->n; i++) {
		int z = EL(c, i);
		const char *id = z == 6 ? "c_d" : z == 8 ? "o_d" : z == 7 ? "n_d" : NULL;
		for (int k = 0; id && k < c->at[i].d_count; k++)
			emit(c, id, (int)i, -1, -1);
	}
}

/* ---------------------------------------------------------------- SMARTS groups */

/* Compiled SMARTS of the last tables seen, so that a batch compiles each
 * pattern once. Keyed by the tables' content digest, not only the pointer. */
static struct {
	const irr_tables *t;
	char digest[80];
	size_t n;
	irr_smarts **pat;   /* one per table group; NULL when it has no SMARTS */
} smarts_cache;

static void smarts_cache_clear(void)
{
	for (size_t i = 0; i < smarts_cache.n; i++)
		irr_smarts_free(smarts_cache.pat[i]);
	free(smarts_cache.pat);
	memset(&smarts_cache, 0, sizeof smarts_cache);
}

static int smarts_cache_fill(const irr_tables *t, irr_error *err)
{
	const char *dg = irr_tables_digest(t);
	size_t n = irr_tables_group_count(t);
	if (smarts_cache.t == t && smarts_cache.n == n && dg &&
	    strcmp(smarts_cache.digest, dg) == 0)
		return IRR_OK;
	smarts_cache_clear();
	smarts_cache.pat = calloc(n ? n : 1, sizeof *smarts_cache.pat);
	if (!smarts_cache.pat)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	smarts_cache.n = n;
	for (size_t i = 0; i < n; i++) {
		const irr_table_group *g = irr_tables_group(t, i);
		if (!g || !g->smarts || !*g->smarts || (g->key && *g->key))
			continue;
		irr_error e2;
		irr_error_clear(&e2);
		int rc = irr_smarts_compile(&smarts_cache.pat[i], g->smarts, &e2);
		if (rc != IRR_OK) {
			int code = irr_error_set(err, rc, g->file ? g->file : "", 0,
			                         "group \"%s\": %s", g->id ? g->id : "?", e2.message);
			smarts_cache_clear();
			return code;
		}
	}
	smarts_cache.t = t;
	snprintf(smarts_cache.digest, sizeof smarts_cache.digest, "%s", dg ? dg : "");
	return IRR_OK;
}

static int perceive_smarts(ctx *c, const irr_tables *t, irr_error *err)
{
	int rc = smarts_cache_fill(t, err);
	if (rc != IRR_OK)
		return rc;
	for (size_t i = 0; i < smarts_cache.n; i++) {
		if (!smarts_cache.pat[i])
			continue;
		const irr_table_group *g = irr_tables_group(t, i);
		int *atoms = NULL, width = 0;
		int nmatch = irr_smarts_match(smarts_cache.pat[i], c->m, &atoms, &width);
		if (nmatch < 0) {
			free(atoms);
			return irr_error_set(err, nmatch, g->file ? g->file : "", 0,
			                     "group \"%s\": SMARTS matching failed", g->id);
		}
		for (int k = 0; k < nmatch; k++) {
			instance *x = new_instance(c, g->id);
			for (int q = 0; q < width; q++)
				add_atom(c, x, atoms[k * width + q]);
		}
		free(atoms);
	}
	return IRR_OK;
}

/* ---------------------------------------------------------------- assembly */

static int attrs_equal(const irr_group_attrs *a, const irr_group_attrs *b)
{
	return a->conjugated == b->conjugated && a->ring_size == b->ring_size &&
	       a->n_h == b->n_h && a->aryl == b->aryl && a->hbond_intra == b->hbond_intra &&
	       strcmp(a->pattern, b->pattern) == 0;
}

/* Merges instances with equal id and attributes into group entries, in
 * order of first appearance. */
static int assemble(ctx *c, irr_inventory *inv)
{
	size_t *gidx = malloc((c->ninst ? c->ninst : 1) * sizeof *gidx);
	if (!gidx)
		return IRR_ENOMEM;
	inv->groups = calloc(c->ninst ? c->ninst : 1, sizeof *inv->groups);
	inv->atoms = malloc((c->niatoms ? c->niatoms : 1) * sizeof *inv->atoms);
	if (!inv->groups || !inv->atoms) {
		free(gidx);
		return IRR_ENOMEM;
	}
	size_t ng = 0;
	for (size_t k = 0; k < c->ninst; k++) {
		const instance *x = &c->inst[k];
		size_t g;
		for (g = 0; g < ng; g++)
			if (strcmp(inv->groups[g].id, x->id) == 0 &&
			    attrs_equal(&inv->groups[g].attrs, &x->attrs))
				break;
		if (g == ng) {
			irr_group *gr = &inv->groups[ng++];
			memcpy(gr->id, x->id, sizeof gr->id);
			gr->attrs = x->attrs;
		}
		inv->groups[g].count++;
		inv->groups[g].natoms += x->natoms;
		gidx[k] = g;
	}
	/* Lay the atoms out group by group. */
	size_t off = 0;
	size_t *fill = calloc(ng ? ng : 1, sizeof *fill);
	if (!fill) {
		free(gidx);
		return IRR_ENOMEM;
	}
	for (size_t g = 0; g < ng; g++) {
		fill[g] = off;
		inv->groups[g].atoms = inv->atoms + off;
		off += inv->groups[g].natoms;
	}
	for (size_t k = 0; k < c->ninst; k++) {
		const instance *x = &c->inst[k];
		memcpy(inv->atoms + fill[gidx[k]], c->iatoms + x->atom_off, x->natoms * sizeof(int));
		fill[gidx[k]] += x->natoms;
	}
	inv->ngroups = ng;
	free(fill);
	free(gidx);
	return IRR_OK;
}

static int build_context(ctx *c, const irr_molecule *m)
{
	memset(c, 0, sizeof *c);
	c->m = m;
	c->n = irr_molecule_atom_count(m);
	c->nb = irr_molecule_bond_count(m);
	c->at = irr_molecule_atom(m, 0);
	c->bd = c->nb ? irr_molecule_bond(m, 0) : NULL;
	size_t n1 = c->n ? c->n : 1;
	c->ns = calloc(c->n + 1, sizeof *c->ns);
	c->na = malloc((c->nb ? 2 * c->nb : 1) * sizeof *c->na);
	c->no = malloc((c->nb ? 2 * c->nb : 1) * sizeof *c->no);
	c->nbid = malloc((c->nb ? 2 * c->nb : 1) * sizeof *c->nbid);
	c->rs = calloc(c->n + 1, sizeof *c->rs);
	c->carbonyl_o = malloc(n1 * sizeof *c->carbonyl_o);
	c->cls = malloc(n1 * sizeof *c->cls);
	c->flags = calloc(n1, 1);
	if (!c->ns || !c->na || !c->no || !c->nbid || !c->rs || !c->carbonyl_o || !c->cls ||
	    !c->flags)
		return IRR_ENOMEM;
	size_t pos = 0;
	for (size_t i = 0; i < c->n; i++) {
		const int *bonds;
		size_t k = irr_molecule_neighbours(m, i, &bonds);
		c->ns[i] = pos;
		for (size_t q = 0; q < k; q++) {
			const irr_bond *b = &c->bd[bonds[q]];
			c->na[pos] = b->a == (int)i ? b->b : b->a;
			c->no[pos] = b->order == 5 ? 5 : b->order;
			c->nbid[pos] = bonds[q];
			pos++;
		}
	}
	c->ns[c->n] = pos;
	/* Rings per atom. */
	size_t nr = irr_molecule_ring_count(m), total = 0;
	for (size_t r = 0; r < nr; r++) {
		const int *ring;
		size_t s = irr_molecule_ring(m, r, &ring);
		total += s;
		for (size_t q = 0; q < s; q++)
			c->rs[ring[q] + 1]++;
	}
	for (size_t i = 0; i < c->n; i++)
		c->rs[i + 1] += c->rs[i];
	c->ra = malloc((total ? total : 1) * sizeof *c->ra);
	size_t *fill = calloc(n1, sizeof *fill);
	if (!c->ra || !fill) {
		free(fill);
		return IRR_ENOMEM;
	}
	for (size_t r = 0; r < nr; r++) {
		const int *ring;
		size_t s = irr_molecule_ring(m, r, &ring);
		for (size_t q = 0; q < s; q++)
			c->ra[c->rs[ring[q]] + fill[ring[q]]++] = (int)r;
	}
	free(fill);
	return IRR_OK;
}

static void free_context(ctx *c)
{
	free(c->ns);
	free(c->na);
	free(c->no);
	free(c->nbid);
	free(c->rs);
	free(c->ra);
	free(c->carbonyl_o);
	free(c->cls);
	free(c->flags);
	free(c->inst);
	free(c->iatoms);
}

int irr_perceive(irr_inventory **out, const irr_molecule *m, const struct irr_tables *tables,
                 irr_error *err)
{
	ctx c;
	irr_inventory *inv = NULL;
	int rc;

	*out = NULL;
	if (!m)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no molecule to perceive");
	rc = build_context(&c, m);
	if (rc != IRR_OK)
		goto done;

	/* Order matters: carbonyl families claim their O and N before the
	 * alcohol, amine and ether passes look at what is left. */
	find_carbonyls(&c);
	perceive_carbonyls(&c);
	perceive_heteroatoms(&c);
	perceive_nitrogen(&c);
	perceive_multiple_bonds(&c);
	perceive_oh(&c);
	perceive_alkenes(&c);
	perceive_rings(&c);
	perceive_ethers_halides(&c);
	perceive_alkyl(&c);
	perceive_water(&c);
	perceive_deuterium(&c);
	protonate_amine_salts(&c);
	if (c.oom) {
		rc = IRR_ENOMEM;
		goto done;
	}
	if (tables) {
		rc = perceive_smarts(&c, tables, err);
		if (rc != IRR_OK)
			goto fail_keep_msg;
	}
	if (c.oom) {
		rc = IRR_ENOMEM;
		goto done;
	}

	inv = calloc(1, sizeof *inv);
	if (!inv) {
		rc = IRR_ENOMEM;
		goto done;
	}
	rc = assemble(&c, inv);
	if (rc != IRR_OK)
		goto done;
	count_bonds(&c, &inv->counts);
	if (c.nitro_groups >= 2)
		c.caution[CAU_POLYNITRO] = 1;
	for (int k = 0; k < CAU_N; k++)
		if (c.caution[k] && inv->ncautions < sizeof inv->cautions / sizeof inv->cautions[0])
			inv->cautions[inv->ncautions++] = caution_text[k];
	free_context(&c);
	*out = inv;
	return IRR_OK;

done:
	free_context(&c);
	irr_inventory_free(inv);
	if (rc == IRR_ENOMEM)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	return rc;
fail_keep_msg:
	free_context(&c);
	irr_inventory_free(inv);
	return rc;
}

void irr_inventory_free(irr_inventory *inv)
{
	if (!inv)
		return;
	free(inv->groups);
	free(inv->atoms);
	free(inv);
}

size_t irr_inventory_group_count(const irr_inventory *inv)
{
	return inv ? inv->ngroups : 0;
}

const irr_group *irr_inventory_group(const irr_inventory *inv, size_t i)
{
	return inv && i < inv->ngroups ? &inv->groups[i] : NULL;
}

const irr_group *irr_inventory_find(const irr_inventory *inv, const char *id)
{
	if (!inv || !id)
		return NULL;
	for (size_t i = 0; i < inv->ngroups; i++)
		if (strcmp(inv->groups[i].id, id) == 0)
			return &inv->groups[i];
	return NULL;
}

const irr_counts *irr_inventory_counts(const irr_inventory *inv)
{
	return inv ? &inv->counts : NULL;
}

size_t irr_inventory_caution_count(const irr_inventory *inv)
{
	return inv ? inv->ncautions : 0;
}

const char *irr_inventory_caution(const irr_inventory *inv, size_t i)
{
	return inv && i < inv->ncautions ? inv->cautions[i] : NULL;
}
