/* structure.c: the "read structure" stage. Checks the SMILES text, has the
 * Open Babel shim parse it, and keeps the heavy-atom graph (atoms, bonds,
 * neighbour lists, SSSR rings, components) that perception works on;
 * wraps SMARTS compilation and matching for user tables.
 *
 * Not thread-safe: Open Babel's state is process-global (see obshim.h). */
#include "irrecon/structure.h"
#include "obshim.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

struct irr_molecule {
	char *smiles;
	size_t natoms, nbonds, nrings;
	irr_atom *atoms;
	irr_bond *bonds;
	size_t *nbr_start;   /* natoms + 1 */
	int *nbr_bonds;      /* 2 * nbonds bond indices */
	size_t *ring_start;  /* nrings + 1 */
	int *ring_atoms;
	int ncomponents;
	double mass;
	char *formula;
	irr_obshim_mol *ob;
};

struct irr_smarts {
	irr_obshim_smarts *p;
};

/* Longest SMILES text accepted before any parsing (about 40 characters per
 * heavy atom leaves room for bracket atoms, stereo marks and ring bonds). */
#define MAX_SMILES_CHARS ((size_t)IRR_MAX_HEAVY_ATOMS * 40)

static const char *const element_symbols[] = {
	"*", "H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne", "Na", "Mg", "Al",
	"Si", "P", "S", "Cl", "Ar", "K", "Ca", "Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co",
	"Ni", "Cu", "Zn", "Ga", "Ge", "As", "Se", "Br", "Kr", "Rb", "Sr", "Y", "Zr",
	"Nb", "Mo", "Tc", "Ru", "Rh", "Pd", "Ag", "Cd", "In", "Sn", "Sb", "Te", "I",
	"Xe", "Cs", "Ba", "La", "Ce", "Pr", "Nd", "Pm", "Sm", "Eu", "Gd", "Tb", "Dy",
	"Ho", "Er", "Tm", "Yb", "Lu", "Hf", "Ta", "W", "Re", "Os", "Ir", "Pt", "Au",
	"Hg", "Tl", "Pb", "Bi", "Po", "At", "Rn", "Fr", "Ra", "Ac", "Th", "Pa", "U",
	"Np", "Pu", "Am", "Cm", "Bk", "Cf", "Es", "Fm", "Md", "No", "Lr", "Rf", "Db",
	"Sg", "Bh", "Hs", "Mt", "Ds", "Rg", "Cn", "Nh", "Fl", "Mc", "Lv", "Ts", "Og"};
#define N_ELEMENTS ((int)(sizeof element_symbols / sizeof element_symbols[0]))

static int element_of(const char *sym, size_t len)
{
	for (int z = 1; z < N_ELEMENTS; z++)
		if (strlen(element_symbols[z]) == len && memcmp(element_symbols[z], sym, len) == 0)
			return z;
	return -1;
}

/* The element symbol at s inside a bracket atom: its length, or 0 when s
 * does not start with a known element. *is_h: hydrogen; *arom: an aromatic
 * (lower-case) spelling. */
static size_t bracket_symbol(const char *s, int *is_h, int *arom)
{
	static const char *const aromatic[] = {"se", "as", "te", "si", "c", "n", "o", "p", "s", "b"};
	*is_h = 0;
	*arom = 0;
	if (*s == '*')
		return 1;
	for (size_t i = 0; i < sizeof aromatic / sizeof aromatic[0]; i++) {
		size_t n = strlen(aromatic[i]);
		if (strncmp(s, aromatic[i], n) == 0) {
			*arom = 1;
			return n;
		}
	}
	if (*s < 'A' || *s > 'Z')
		return 0;
	if (s[1] >= 'a' && s[1] <= 'z' && element_of(s, 2) > 0)
		return 2;
	if (element_of(s, 1) > 0) {
		*is_h = (*s == 'H');
		return 1;
	}
	return 0;
}

/* What the syntax pass learns besides errors: the heavy atoms in SMILES
 * order, with the ones written aromatic (lower case) and their positions. */
typedef struct syntax_info {
	size_t heavy;
	unsigned char *aromatic; /* per heavy atom, 1 when written lower case */
	size_t *pos;             /* per heavy atom, 1-based position in the text */
	size_t cap;
	/* every atom (hydrogens too): the atom it hangs on in the chain, -1 */
	long natoms;
	long *pred;
	size_t pcap;
	/* ring-bond pairs (atom indices as in pred) */
	long *ring_pairs;
	size_t nring_pairs, rcap;
} syntax_info;

static int note_ring_bond(syntax_info *si, long a, long b)
{
	if (si->nring_pairs == si->rcap) {
		size_t ncap = si->rcap ? 2 * si->rcap : 32;
		long *p = realloc(si->ring_pairs, 2 * ncap * sizeof *p);
		if (!p)
			return IRR_ENOMEM;
		si->ring_pairs = p;
		si->rcap = ncap;
	}
	si->ring_pairs[2 * si->nring_pairs] = a;
	si->ring_pairs[2 * si->nring_pairs + 1] = b;
	si->nring_pairs++;
	return IRR_OK;
}

static long uf_find(long *parent, long x)
{
	while (parent[x] != x) {
		parent[x] = parent[parent[x]];
		x = parent[x];
	}
	return x;
}

/* The number of independent rings (cyclomatic number, edges - vertices + 1)
 * of the largest ring system: bridges found by an iterative depth-first
 * search (Tarjan 1974), the rest grouped by union-find. Open Babel's
 * aromaticity perception grows about with the cube of this number, so it
 * is limited before Open Babel sees the molecule. */
static int largest_ring_system(const syntax_info *si, long *out)
{
	long n = si->natoms, m = 0;
	int rc = IRR_ENOMEM;
	*out = 0;
	if (n == 0)
		return IRR_OK;
	for (long v = 0; v < n; v++)
		m += si->pred[v] >= 0;
	m += (long)si->nring_pairs;
	long *ea = malloc((size_t)(m ? m : 1) * sizeof *ea), *eb = malloc((size_t)(m ? m : 1) * sizeof *eb);
	long *start = calloc((size_t)n + 1, sizeof *start), *adj = malloc((size_t)(2 * m + 1) * sizeof *adj);
	long *disc = malloc((size_t)n * sizeof *disc), *low = malloc((size_t)n * sizeof *low);
	long *pedge = malloc((size_t)n * sizeof *pedge), *iter = malloc((size_t)n * sizeof *iter);
	long *stack = malloc((size_t)n * sizeof *stack), *parent = malloc((size_t)n * sizeof *parent);
	long *ve = calloc((size_t)n, sizeof *ve), *vn = calloc((size_t)n, sizeof *vn);
	unsigned char *bridge = calloc((size_t)(m ? m : 1), 1);
	if (!ea || !eb || !start || !adj || !disc || !low || !pedge || !iter || !stack || !parent ||
	    !ve || !vn || !bridge)
		goto done;
	long k = 0;
	for (long v = 0; v < n; v++)
		if (si->pred[v] >= 0) {
			ea[k] = si->pred[v];
			eb[k++] = v;
		}
	for (size_t r = 0; r < si->nring_pairs; r++) {
		ea[k] = si->ring_pairs[2 * r];
		eb[k++] = si->ring_pairs[2 * r + 1];
	}
	for (long e = 0; e < m; e++) {
		start[ea[e] + 1]++;
		start[eb[e] + 1]++;
	}
	for (long v = 0; v < n; v++)
		start[v + 1] += start[v];
	for (long v = 0; v < n; v++)
		iter[v] = start[v];
	for (long e = 0; e < m; e++) {
		adj[iter[ea[e]]++] = e;
		adj[iter[eb[e]]++] = e;
	}
	for (long v = 0; v < n; v++) {
		disc[v] = -1;
		iter[v] = start[v];
	}
	long time = 0;
	for (long root = 0; root < n; root++) {
		if (disc[root] >= 0)
			continue;
		long top = 0;
		stack[top++] = root;
		disc[root] = low[root] = time++;
		pedge[root] = -1;
		while (top > 0) {
			long v = stack[top - 1];
			if (iter[v] < start[v + 1]) {
				long e = adj[iter[v]++];
				if (e == pedge[v])
					continue;
				long w = ea[e] == v ? eb[e] : ea[e];
				if (disc[w] < 0) {
					disc[w] = low[w] = time++;
					pedge[w] = e;
					stack[top++] = w;
				} else if (disc[w] < low[v]) {
					low[v] = disc[w];
				}
			} else {
				top--;
				if (pedge[v] >= 0) {
					long u = ea[pedge[v]] == v ? eb[pedge[v]] : ea[pedge[v]];
					if (low[v] < low[u])
						low[u] = low[v];
					if (low[v] > disc[u])
						bridge[pedge[v]] = 1;
				}
			}
		}
	}
	for (long v = 0; v < n; v++)
		parent[v] = v;
	for (long e = 0; e < m; e++)
		if (!bridge[e])
			parent[uf_find(parent, ea[e])] = uf_find(parent, eb[e]);
	for (long e = 0; e < m; e++)
		if (!bridge[e])
			ve[uf_find(parent, ea[e])]++;
	for (long v = 0; v < n; v++)
		vn[uf_find(parent, v)]++;
	for (long v = 0; v < n; v++)
		if (ve[v] > 0 && ve[v] - vn[v] + 1 > *out)
			*out = ve[v] - vn[v] + 1;
	rc = IRR_OK;
done:
	free(ea);
	free(eb);
	free(start);
	free(adj);
	free(disc);
	free(low);
	free(pedge);
	free(iter);
	free(stack);
	free(parent);
	free(ve);
	free(vn);
	free(bridge);
	return rc;
}

/* Records a new atom bonded (through the chain) to `cur`; returns its
 * index or -1 when out of memory. */
static long chain_atom(syntax_info *si, long cur)
{
	if ((size_t)si->natoms == si->pcap) {
		size_t ncap = si->pcap ? 2 * si->pcap : 64;
		long *p = realloc(si->pred, ncap * sizeof *p);
		if (!p)
			return -1;
		si->pred = p;
		si->pcap = ncap;
	}
	si->pred[si->natoms] = cur;
	return si->natoms++;
}

static int note_atom(syntax_info *si, int is_h, int arom, size_t pos)
{
	if (is_h)
		return IRR_OK;
	if (si->heavy == si->cap) {
		size_t ncap = si->cap ? 2 * si->cap : 64;
		unsigned char *a = realloc(si->aromatic, ncap);
		if (!a)
			return IRR_ENOMEM;
		si->aromatic = a;
		size_t *p = realloc(si->pos, ncap * sizeof *p);
		if (!p)
			return IRR_ENOMEM;
		si->pos = p;
		si->cap = ncap;
	}
	si->aromatic[si->heavy] = (unsigned char)arom;
	si->pos[si->heavy] = pos;
	si->heavy++;
	return IRR_OK;
}

/* The inside of a bracket atom, after the element symbol: chirality,
 * hydrogen count, charge, atom class, in that order (OpenSMILES). Returns
 * NULL when well formed, else what is wrong. */
static const char *bracket_tail_problem(const char *p, const char *close)
{
	if (p < close && *p == '@') {
		p++;
		if (p < close && *p == '@')
			p++;
		else if (p + 1 < close && p[0] >= 'A' && p[0] <= 'Z' && p[1] >= 'A' && p[1] <= 'Z') {
			p += 2; /* @TH1, @SP2, @OH12 ... */
			while (p < close && *p >= '0' && *p <= '9')
				p++;
		}
		if (p < close && *p == '@')
			return "bad stereo (chirality) mark";
	}
	if (p < close && *p == 'H') {
		p++;
		while (p < close && *p >= '0' && *p <= '9')
			p++;
	}
	if (p < close && (*p == '+' || *p == '-')) {
		char sign = *p++;
		if (p < close && *p >= '0' && *p <= '9') {
			while (p < close && *p >= '0' && *p <= '9')
				p++;
		} else {
			while (p < close && *p == sign)
				p++;
		}
		if (p < close && (*p == '+' || *p == '-'))
			return "charge given more than once";
	}
	if (p < close && *p == ':') {
		p++;
		if (p == close || *p < '0' || *p > '9')
			return "atom class ':' needs a number";
		while (p < close && *p >= '0' && *p <= '9')
			p++;
	}
	if (p == close)
		return NULL;
	if (*p == '@')
		return "stereo (chirality) mark out of place";
	if (*p == 'H')
		return "hydrogen count out of place";
	if (*p == '+' || *p == '-')
		return "charge out of place";
	return "unexpected text";
}

enum tok { T_START, T_ATOM, T_RING, T_BOND, T_OPEN, T_CLOSE, T_DOT };

/* A syntax pass of our own, before Open Babel: Open Babel 3.1.1 silently
 * accepts many malformed strings ("CC(C", "C=", "CN()C", "OC(=)O", a
 * trailing '.') and rejects others without a reason, so the grammar of
 * OpenSMILES (atoms, bonds, branches, ring bonds, dots) is checked here,
 * naming the position. One loop, no recursion: the input length cannot
 * grow the stack. */
static int check_syntax(const char *s, syntax_info *si, char *why, size_t why_size)
{
	size_t depth = 0;
	size_t *opens = NULL; /* positions of unclosed '(' (a stack) */
	long *branch_atom = NULL; /* the atom each open branch hangs on */
	size_t cap = 0;
	int rc = IRR_OK;
	enum tok prev = T_START, before_bond = T_START;
	long cur = -1;            /* the atom the next one bonds to */
	long ring_open[100];      /* ring-bond number -> atom that opened it */
	for (int k = 0; k < 100; k++)
		ring_open[k] = -1;
#define FAIL(...) do { snprintf(why, why_size, __VA_ARGS__); rc = IRR_EINPUT; goto done; } while (0)
	for (size_t i = 0; s[i]; i++) {
		unsigned char c = (unsigned char)s[i];
		size_t at = i + 1;
		if (c <= ' ' || c >= 127)
			FAIL("%s at position %zu",
			     c == ' ' || c == '\t' ? "blank inside the SMILES" :
			     c >= 127 ? "non-ASCII character" : "control character", at);
		if (c == '(') {
			if (prev != T_ATOM && prev != T_RING && prev != T_CLOSE)
				FAIL("branch '(' at position %zu does not follow an atom", at);
			if (depth == cap) {
				size_t ncap = cap ? 2 * cap : 16;
				size_t *n = realloc(opens, ncap * sizeof *n);
				long *b = realloc(branch_atom, ncap * sizeof *b);
				if (n)
					opens = n;
				if (b)
					branch_atom = b;
				if (!n || !b) {
					rc = IRR_ENOMEM;
					goto done;
				}
				cap = ncap;
			}
			branch_atom[depth] = cur;
			opens[depth++] = i;
			prev = T_OPEN;
		} else if (c == ')') {
			if (depth == 0)
				FAIL("unbalanced ')' at position %zu (no branch open)", at);
			if (prev == T_OPEN)
				FAIL("empty branch '()' at position %zu", at - 1);
			if (prev == T_BOND || prev == T_DOT)
				FAIL("'%c' at position %zu has no atom after it", s[i - 1], at - 1);
			depth--;
			cur = branch_atom[depth];
			prev = T_CLOSE;
		} else if (c == '[') {
			const char *close = strchr(s + i, ']');
			const char *open2 = strchr(s + i + 1, '[');
			size_t j = i + 1;
			int is_h, arom;
			if (!close || (open2 && open2 < close))
				FAIL("unclosed '[' at position %zu", at);
			while (s[j] >= '0' && s[j] <= '9')
				j++;
			size_t n = bracket_symbol(s + j, &is_h, &arom);
			if (n == 0) {
				size_t len = 0;
				while (s + j + len < close && len < 8)
					len++;
				FAIL("unknown element '%.*s' at position %zu", (int)len, s + j, j + 1);
			}
			const char *bad = bracket_tail_problem(s + j + n, close);
			if (bad)
				FAIL("malformed bracket atom '%.*s' at position %zu: %s",
				     (int)(close - (s + i) + 1), s + i, at, bad);
			if ((rc = note_atom(si, is_h, arom, at)) != IRR_OK)
				goto done;
			if ((cur = chain_atom(si, prev == T_DOT ? -1 : cur)) < 0) {
				rc = IRR_ENOMEM;
				goto done;
			}
			i = (size_t)(close - s);
			prev = T_ATOM;
		} else if (c == ']') {
			FAIL("unbalanced ']' at position %zu", at);
		} else if ((c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || c == '*') {
			/* Outside brackets only the organic subset may appear. */
			if ((c == 'C' && s[i + 1] == 'l') || (c == 'B' && s[i + 1] == 'r'))
				i++;
			else if (c != '*' && !strchr("BCNOPSFIbcnops", c))
				FAIL("unknown element or stray letter '%c' at position %zu "
				     "(other elements need brackets, e.g. [Na+])", c, at);
			if ((rc = note_atom(si, 0, c >= 'a' && c <= 'z', at)) != IRR_OK)
				goto done;
			if ((cur = chain_atom(si, prev == T_DOT ? -1 : cur)) < 0) {
				rc = IRR_ENOMEM;
				goto done;
			}
			prev = T_ATOM;
		} else if ((c >= '0' && c <= '9') || c == '%') {
			int num;
			if (c == '%') {
				if (s[i + 1] == '(')
					FAIL("ring-bond number '%%(...)' at position %zu: only %%10 to %%99 are "
					     "supported", at);
				if (!(s[i + 1] >= '0' && s[i + 1] <= '9' && s[i + 2] >= '0' && s[i + 2] <= '9'))
					FAIL("'%%' at position %zu needs two digits", at);
				num = (s[i + 1] - '0') * 10 + (s[i + 2] - '0');
			} else {
				num = c - '0';
			}
			if (!(prev == T_ATOM || prev == T_RING ||
			      (prev == T_BOND && (before_bond == T_ATOM || before_bond == T_RING))))
				FAIL("ring bond '%.*s' at position %zu does not follow an atom",
				     c == '%' ? 3 : 1, s + i, at);
			if (ring_open[num] < 0) {
				ring_open[num] = cur;
			} else {
				long other = ring_open[num];
				ring_open[num] = -1;
				if ((rc = note_ring_bond(si, other, cur)) != IRR_OK)
					goto done;
				if (other == cur)
					FAIL("ring bond '%.*s' at position %zu joins an atom to itself",
					     c == '%' ? 3 : 1, s + i, at);
				if (si->pred[cur] == other || si->pred[other] == cur)
					FAIL("ring bond '%.*s' at position %zu joins two atoms already bonded",
					     c == '%' ? 3 : 1, s + i, at);
			}
			if (c == '%')
				i += 2;
			prev = T_RING;
		} else if (strchr("-=#$:/\\", c)) {
			if (prev != T_ATOM && prev != T_RING && prev != T_CLOSE && prev != T_OPEN)
				FAIL("bond '%c' at position %zu does not follow an atom", c, at);
			before_bond = prev;
			prev = T_BOND;
		} else if (c == '.') {
			if (prev != T_ATOM && prev != T_RING && prev != T_CLOSE)
				FAIL("'.' at position %zu does not follow an atom", at);
			prev = T_DOT;
		} else {
			FAIL("unexpected character '%c' at position %zu", c, at);
		}
	}
	if (depth > 0)
		FAIL("unbalanced '(' at position %zu (branch never closed)", opens[depth - 1] + 1);
	if (prev == T_BOND || prev == T_DOT)
		FAIL("the SMILES ends with '%c', which needs an atom after it", s[strlen(s) - 1]);
#undef FAIL
done:
	free(opens);
	free(branch_atom);
	return rc;
}

/* Hybridization from the bond orders, the convention RDKit and most
 * textbooks use for carbon: a triple bond or two double bonds is sp, one
 * double bond or an aromatic ring sp2, otherwise sp3. A carbocation is
 * sp2. N and O with only single bonds count as sp2 when next to a
 * pi system (amide and aniline N, enol and phenol O: lone pair delocalised),
 * as RDKit does. Elements beyond the second period with four or more
 * partners (sulfone S, phosphate P) are sp3 whatever the formal bonds. */
static void assign_hybridization(irr_molecule *m)
{
	int *pi = calloc(m->natoms ? m->natoms : 1, sizeof *pi);
	int *triple = calloc(m->natoms ? m->natoms : 1, sizeof *triple);
	if (!pi || !triple) {
		free(pi);
		free(triple);
		return; /* hybridization stays 0 (unknown) */
	}
	for (size_t k = 0; k < m->nbonds; k++) {
		const irr_bond *b = &m->bonds[k];
		int inc = b->order == 2 ? 1 : b->order == 3 ? 2 : 0;
		pi[b->a] += inc;
		pi[b->b] += inc;
		if (b->order == 3) {
			triple[b->a] = 1;
			triple[b->b] = 1;
		}
	}
	for (size_t i = 0; i < m->natoms; i++) {
		irr_atom *a = &m->atoms[i];
		int z = a->element, partners = a->degree + a->h_count;
		int hyb;
		if (z == 0 || (z > 2 && z != 5 && z != 6 && z != 7 && z != 8 && z != 9 &&
		               z != 14 && z != 15 && z != 16 && z != 17 && z != 33 &&
		               z != 34 && z != 35 && z != 53)) {
			hyb = 0; /* metals and the rest: no useful convention */
		} else if (partners == 0 && z != 6) {
			hyb = 0;
		} else if (z > 10 && partners >= 4) {
			hyb = 3;
		} else if (triple[i] || pi[i] >= 2) {
			hyb = (z > 10 && !triple[i]) ? 2 : 1;
		} else if (pi[i] == 1 || a->aromatic) {
			hyb = 2;
		} else if (z == 6 && a->charge > 0 && partners == 3) {
			hyb = 2;
		} else {
			hyb = 3;
		}
		a->hybridization = hyb;
	}
	/* Lone pairs next to a pi system (second pass: needs the first). */
	for (size_t i = 0; i < m->natoms; i++) {
		irr_atom *a = &m->atoms[i];
		if ((a->element != 7 && a->element != 8) || a->hybridization != 3 || pi[i] ||
		    a->charge > 0)
			continue;
		for (size_t e = m->nbr_start[i]; e < m->nbr_start[i + 1]; e++) {
			const irr_bond *b = &m->bonds[m->nbr_bonds[e]];
			int o = b->a == (int)i ? b->b : b->a;
			int h = m->atoms[o].hybridization;
			if ((h == 1 || h == 2) && (pi[o] || m->atoms[o].aromatic)) {
				a->hybridization = 2;
				break;
			}
		}
	}
	free(pi);
	free(triple);
}

static int build_neighbours(irr_molecule *m)
{
	m->nbr_start = calloc(m->natoms + 1, sizeof *m->nbr_start);
	m->nbr_bonds = calloc(m->nbonds ? 2 * m->nbonds : 1, sizeof *m->nbr_bonds);
	size_t *fill = calloc(m->natoms + 1, sizeof *fill);
	if (!m->nbr_start || !m->nbr_bonds || !fill) {
		free(fill);
		return IRR_ENOMEM;
	}
	for (size_t k = 0; k < m->nbonds; k++) {
		m->nbr_start[m->bonds[k].a + 1]++;
		m->nbr_start[m->bonds[k].b + 1]++;
	}
	for (size_t i = 0; i < m->natoms; i++)
		m->nbr_start[i + 1] += m->nbr_start[i];
	for (size_t k = 0; k < m->nbonds; k++) {
		int a = m->bonds[k].a, b = m->bonds[k].b;
		m->nbr_bonds[m->nbr_start[a] + fill[a]++] = (int)k;
		m->nbr_bonds[m->nbr_start[b] + fill[b]++] = (int)k;
	}
	free(fill);
	return IRR_OK;
}

/* Connected components by breadth-first search with an explicit queue,
 * numbered in order of their first atom. */
static int assign_components(irr_molecule *m)
{
	int *queue = malloc((m->natoms ? m->natoms : 1) * sizeof *queue);
	if (!queue)
		return IRR_ENOMEM;
	for (size_t i = 0; i < m->natoms; i++)
		m->atoms[i].component = -1;
	int comp = 0;
	for (size_t s = 0; s < m->natoms; s++) {
		if (m->atoms[s].component >= 0)
			continue;
		size_t head = 0, tail = 0;
		queue[tail++] = (int)s;
		m->atoms[s].component = comp;
		while (head < tail) {
			int i = queue[head++];
			for (size_t e = m->nbr_start[i]; e < m->nbr_start[i + 1]; e++) {
				const irr_bond *b = &m->bonds[m->nbr_bonds[e]];
				int o = b->a == i ? b->b : b->a;
				if (m->atoms[o].component < 0) {
					m->atoms[o].component = comp;
					queue[tail++] = o;
				}
			}
		}
		comp++;
	}
	m->ncomponents = comp;
	free(queue);
	return IRR_OK;
}

static void assign_ring_sizes(irr_molecule *m)
{
	for (size_t r = 0; r < m->nrings; r++) {
		int size = (int)(m->ring_start[r + 1] - m->ring_start[r]);
		for (size_t k = m->ring_start[r]; k < m->ring_start[r + 1]; k++) {
			irr_atom *a = &m->atoms[m->ring_atoms[k]];
			if (a->ring_size == 0 || size < a->ring_size)
				a->ring_size = size;
		}
	}
}

/* Hill order: C, then H, then the rest alphabetically; without carbon,
 * everything alphabetically. Stray hydrogens (H2, [H+]) are included. */
static int build_formula(irr_molecule *m, int stray_h)
{
	long count[130] = {0};
	long hydrogens = stray_h, deuterium = 0;
	for (size_t i = 0; i < m->natoms; i++) {
		int z = m->atoms[i].element;
		if (z > 0 && z < N_ELEMENTS)
			count[z]++;
		hydrogens += m->atoms[i].h_count;
		deuterium += m->atoms[i].d_count;
	}
	count[1] += hydrogens;
	size_t size = 16 * (N_ELEMENTS + 1);
	char *out = malloc(size), *p = out;
	if (!out)
		return IRR_ENOMEM;
	*p = '\0';
	int order[130], n = 0;
	int has_c = count[6] > 0;
	if (has_c) {
		order[n++] = 6;
		if (count[1])
			order[n++] = 1;
	}
	/* Remaining symbols in alphabetical order (selection over the table). */
	int used[130] = {0};
	for (int k = 0; k < n; k++)
		used[order[k]] = 1;
	for (;;) {
		int best = -1;
		for (int z = 1; z < N_ELEMENTS; z++)
			if (count[z] && !used[z] &&
			    (best < 0 || strcmp(element_symbols[z], element_symbols[best]) < 0))
				best = z;
		if (best < 0)
			break;
		used[best] = 1;
		order[n++] = best;
	}
	/* Heavy hydrogens are written D: after H (or after C when there is no
	 * H: "CDCl3"); without carbon in alphabetical place ("D2O"). */
	for (int k = 0; k < n; k++) {
		int z = order[k];
		if (deuterium && !has_c && z != 1 && strcmp("D", element_symbols[z]) < 0) {
			p += deuterium == 1 ? sprintf(p, "D") : sprintf(p, "D%ld", deuterium);
			deuterium = 0;
		}
		p += count[z] == 1 ? sprintf(p, "%s", element_symbols[z])
		                   : sprintf(p, "%s%ld", element_symbols[z], count[z]);
		if (deuterium && has_c && (z == 1 || (z == 6 && !count[1]))) {
			p += deuterium == 1 ? sprintf(p, "D") : sprintf(p, "D%ld", deuterium);
			deuterium = 0;
		}
	}
	if (deuterium)
		p += deuterium == 1 ? sprintf(p, "D") : sprintf(p, "D%ld", deuterium);
	m->formula = out;
	return IRR_OK;
}

int irr_molecule_from_smiles(irr_molecule **out, const char *smiles, const char *name,
                             irr_error *err)
{
	char why[512] = "";
	irr_molecule *m = NULL;
	irr_obshim_graph g;
	irr_obshim_mol *ob = NULL;
	const char *file = name ? name : "SMILES";
	size_t heavy = 0, len;
	syntax_info si;
	int rc;

	memset(&g, 0, sizeof g);
	memset(&si, 0, sizeof si);
	*out = NULL;
	if (!smiles)
		return irr_error_set(err, IRR_EINPUT, file, 0, "no SMILES given");
	/* Surrounding blanks (a trailing newline from a file) are not part of it. */
	while (*smiles == ' ' || *smiles == '\t' || *smiles == '\n' || *smiles == '\r')
		smiles++;
	len = strlen(smiles);
	while (len && (smiles[len - 1] == ' ' || smiles[len - 1] == '\t' ||
	               smiles[len - 1] == '\n' || smiles[len - 1] == '\r'))
		len--;
	if (len == 0)
		return irr_error_set(err, IRR_EINPUT, file, 0, "empty SMILES");
	if (len > MAX_SMILES_CHARS)
		return irr_error_set(err, IRR_ELIMIT, file, 0,
		                     "SMILES of %zu characters is longer than the limit of %zu",
		                     len, MAX_SMILES_CHARS);

	m = calloc(1, sizeof *m);
	if (!m || !(m->smiles = malloc(len + 1))) {
		rc = irr_error_set(err, IRR_ENOMEM, file, 0, "out of memory");
		goto fail;
	}
	memcpy(m->smiles, smiles, len);
	m->smiles[len] = '\0';

	rc = check_syntax(m->smiles, &si, why, sizeof why);
	heavy = si.heavy;
	if (rc == IRR_OK && heavy > IRR_MAX_HEAVY_ATOMS) {
		snprintf(why, sizeof why, "%zu heavy atoms, more than the limit of %d",
		         heavy, IRR_MAX_HEAVY_ATOMS);
		rc = IRR_ELIMIT;
	}
	if (rc == IRR_OK) {
		long rings = 0;
		rc = largest_ring_system(&si, &rings);
		if (rc == IRR_OK && rings > IRR_MAX_RING_SYSTEM) {
			snprintf(why, sizeof why, "a ring system of %ld fused or bridged rings, more "
			         "than the limit of %d", rings, IRR_MAX_RING_SYSTEM);
			rc = IRR_ELIMIT;
		}
	}
	if (rc == IRR_OK)
		rc = irr_obshim__read_smiles(m->smiles, IRR_MAX_HEAVY_ATOMS, &ob, &g, why, sizeof why);
	if (rc != IRR_OK) {
		const char *what = rc == IRR_ELIMIT ? "SMILES too large:" : "cannot read";
		if (rc == IRR_ENOMEM)
			snprintf(why, sizeof why, "out of memory");
		rc = irr_error_set(err, rc, file, 0, "%s \"%.60s%s\": %s", what, m->smiles,
		                   len > 60 ? "..." : "", why[0] ? why : "unknown reason");
		goto fail;
	}
	if (g.natoms == 0) {
		rc = irr_error_set(err, IRR_EINPUT, file, 0,
		                   "SMILES \"%.60s\" has no heavy atom", m->smiles);
		goto fail;
	}
	m->ob = ob;
	ob = NULL;
	m->natoms = g.natoms;
	m->nbonds = g.nbonds;
	m->nrings = g.nrings;
	m->atoms = g.atoms;
	m->bonds = g.bonds;
	m->ring_start = g.ring_start;
	m->ring_atoms = g.ring_atoms;
	m->mass = g.mass;
	g.atoms = NULL;
	g.bonds = NULL;
	g.ring_start = NULL;
	g.ring_atoms = NULL;

	if (build_neighbours(m) != IRR_OK || assign_components(m) != IRR_OK ||
	    build_formula(m, g.stray_h) != IRR_OK) {
		rc = irr_error_set(err, IRR_ENOMEM, file, 0, "out of memory");
		goto fail;
	}
	/* Lower case means "aromatic ring atom": outside a ring it is an error
	 * (Open Babel quietly makes such an atom aliphatic). Heavy atoms keep
	 * their SMILES order, so the syntax pass's list lines up. */
	if (si.heavy == m->natoms) {
		for (size_t i = 0; i < m->natoms; i++)
			if (si.aromatic[i] && !m->atoms[i].in_ring) {
				rc = irr_error_set(err, IRR_EINPUT, file, 0,
				                   "cannot read \"%.60s%s\": atom at position %zu is written "
				                   "aromatic (lower case) but is not in a ring",
				                   m->smiles, len > 60 ? "..." : "", si.pos[i]);
				goto fail;
			}
	}
	assign_ring_sizes(m);
	assign_hybridization(m);
	irr_obshim__graph_release(&g);
	free(si.aromatic);
	free(si.pos);
	free(si.pred);
	free(si.ring_pairs);
	*out = m;
	return IRR_OK;

fail:
	free(si.aromatic);
	free(si.pos);
	free(si.pred);
	free(si.ring_pairs);
	irr_obshim__graph_release(&g);
	irr_obshim__mol_free(ob);
	irr_molecule_free(m);
	return rc;
}

void irr_molecule_free(irr_molecule *m)
{
	if (!m)
		return;
	free(m->smiles);
	free(m->atoms);
	free(m->bonds);
	free(m->nbr_start);
	free(m->nbr_bonds);
	free(m->ring_start);
	free(m->ring_atoms);
	free(m->formula);
	irr_obshim__mol_free(m->ob);
	free(m);
}

size_t irr_molecule_atom_count(const irr_molecule *m)
{
	return m ? m->natoms : 0;
}

const irr_atom *irr_molecule_atom(const irr_molecule *m, size_t i)
{
	return m && i < m->natoms ? &m->atoms[i] : NULL;
}

size_t irr_molecule_bond_count(const irr_molecule *m)
{
	return m ? m->nbonds : 0;
}

const irr_bond *irr_molecule_bond(const irr_molecule *m, size_t i)
{
	return m && i < m->nbonds ? &m->bonds[i] : NULL;
}

size_t irr_molecule_neighbours(const irr_molecule *m, size_t i, const int **bonds)
{
	if (!m || i >= m->natoms) {
		if (bonds)
			*bonds = NULL;
		return 0;
	}
	if (bonds)
		*bonds = m->nbr_bonds + m->nbr_start[i];
	return m->nbr_start[i + 1] - m->nbr_start[i];
}

size_t irr_molecule_ring_count(const irr_molecule *m)
{
	return m ? m->nrings : 0;
}

size_t irr_molecule_ring(const irr_molecule *m, size_t r, const int **atoms)
{
	if (!m || r >= m->nrings) {
		if (atoms)
			*atoms = NULL;
		return 0;
	}
	if (atoms)
		*atoms = m->ring_atoms + m->ring_start[r];
	return m->ring_start[r + 1] - m->ring_start[r];
}

int irr_molecule_components(const irr_molecule *m)
{
	return m ? m->ncomponents : 0;
}

const char *irr_molecule_smiles(const irr_molecule *m)
{
	return m ? m->smiles : "";
}

const char *irr_molecule_formula(const irr_molecule *m)
{
	return m && m->formula ? m->formula : "";
}

double irr_molecule_mass(const irr_molecule *m)
{
	return m ? m->mass : 0.0;
}

int irr_smarts_compile(irr_smarts **out, const char *smarts, irr_error *err)
{
	char why[512] = "";
	irr_smarts *p;
	int rc;
	*out = NULL;
	if (!smarts || !*smarts)
		return irr_error_set(err, IRR_EINPUT, "", 0, "empty SMARTS");
	/* Brackets and parentheses first: Open Babel 3.1.1 leaks part of its
	 * parse tree on such errors, and its message gives no position. */
	{
		long sq = 0, par = 0;
		size_t open_sq = 0, open_par = 0;
		for (size_t i = 0; smarts[i]; i++) {
			char ch = smarts[i];
			if (ch == '[' && sq++ == 0)
				open_sq = i;
			else if (ch == '(' && par++ == 0)
				open_par = i;
			else if ((ch == ']' && --sq < 0) || (ch == ')' && --par < 0))
				return irr_error_set(err, IRR_EINPUT, "", 0,
				                     "bad SMARTS \"%.80s\": unbalanced '%c' at position %zu",
				                     smarts, ch, i + 1);
		}
		if (sq > 0 || par > 0)
			return irr_error_set(err, IRR_EINPUT, "", 0,
			                     "bad SMARTS \"%.80s\": unclosed '%c' at position %zu", smarts,
			                     sq > 0 ? '[' : '(', (sq > 0 ? open_sq : open_par) + 1);
	}
	p = calloc(1, sizeof *p);
	if (!p)
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	rc = irr_obshim__smarts_compile(smarts, &p->p, why, sizeof why);
	if (rc != IRR_OK) {
		free(p);
		if (rc == IRR_ENOMEM)
			return irr_error_set(err, rc, "", 0, "out of memory");
		return irr_error_set(err, rc, "", 0, "bad SMARTS \"%.80s\": %s", smarts, why);
	}
	*out = p;
	return IRR_OK;
}

void irr_smarts_free(irr_smarts *p)
{
	if (!p)
		return;
	irr_obshim__smarts_free(p->p);
	free(p);
}

int irr_smarts_match(const irr_smarts *p, const irr_molecule *m, int **atoms, int *width)
{
	if (atoms)
		*atoms = NULL;
	if (width)
		*width = 0;
	if (!p || !m)
		return IRR_EINPUT;
	return irr_obshim__smarts_match(p->p, m->ob, atoms, width);
}
