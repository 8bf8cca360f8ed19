/* obshim.cpp: the only C++ file of irrecon. Wraps Open Babel 3 behind the
 * C functions of obshim.h: read a SMILES into a heavy-atom graph, compile
 * and match SMARTS. Nothing Open Babel logs reaches the terminal; its
 * messages are collected and returned as the reason of an error.
 *
 * Not thread-safe (Open Babel's plugin registry, option registry, error
 * log and locale switching are process-global). */
#include "obshim.h"

#include <openbabel/babelconfig.h>
#include <openbabel/obconversion.h>
#include <openbabel/mol.h>
#include <openbabel/atom.h>
#include <openbabel/bond.h>
#include <openbabel/ring.h>
#include <openbabel/oberror.h>
#include <openbabel/parsmart.h>
#include <openbabel/plugin.h>
#include <openbabel/obiter.h>
#include <openbabel/stereo/stereo.h>
#include <openbabel/stereo/cistrans.h>

#include <dlfcn.h>
#include <cstdlib>
#include <cstring>
#include <new>
#include <ostream>
#include <string>
#include <vector>

using namespace OpenBabel;

struct irr_obshim_mol {
	OBMol mol;
	std::vector<int> heavy_of;   /* Open Babel atom index (1-based) -> heavy index or -1 */
};

struct irr_obshim_smarts {
	OBSmartsPattern pattern;
};

namespace {

/* Open Babel loads every plugin library (127 of them, ~25 ms) the first
 * time any plugin is looked up. irrecon needs only the SMILES reader, so
 * it loads that one library itself and then tells the registry that
 * loading is done. OBPlugin::AllPluginsLoaded is protected; a derived
 * class reaches it. */
struct PluginGate : public OBPlugin {
	static void mark_loaded() { AllPluginsLoaded = 1; }
};

/* A stream that swallows everything: Open Babel's log output goes here. */
std::ostream &null_stream()
{
	static std::ostream os(nullptr);
	return os;
}

std::string plugin_dir()
{
	const char *env = std::getenv("BABEL_LIBDIR");
	if (env && *env)
		return env;
	/* The plugins live beside the library: <libdir>/openbabel/<version>. */
	Dl_info info;
	if (dladdr(reinterpret_cast<void *>(&obErrorLog), &info) && info.dli_fname) {
		std::string lib(info.dli_fname);
		std::string::size_type slash = lib.rfind('/');
		if (slash != std::string::npos)
			return lib.substr(0, slash) + "/openbabel/" BABEL_VERSION;
	}
	return "";
}

OBConversion *reader(void)
{
	static OBConversion *conv;
	static bool tried;
	if (tried)
		return conv;
	tried = true;
	obErrorLog.SetOutputStream(&null_stream());
	obErrorLog.SetOutputLevel(obError);
	obErrorLog.StartLogging();
	std::string dir = plugin_dir();
	OBFormat *fmt = nullptr;
	if (!dir.empty()) {
		std::string path = dir + "/smilesformat.so";
		if (dlopen(path.c_str(), RTLD_NOW | RTLD_GLOBAL)) {
			PluginGate::mark_loaded();
			fmt = OBConversion::FindFormat("smi");
		}
	}
	if (!fmt) /* fall back to Open Babel's own full plugin search */
		fmt = OBConversion::FindFormat("smi");
	if (!fmt)
		return nullptr;
	conv = new (std::nothrow) OBConversion;
	if (conv && !conv->SetInFormat(fmt)) {
		delete conv;
		conv = nullptr;
	}
	return conv;
}

void copy_text(char *dst, size_t size, const std::string &s)
{
	if (!dst || !size)
		return;
	size_t n = s.size() < size - 1 ? s.size() : size - 1;
	std::memcpy(dst, s.data(), n);
	dst[n] = '\0';
}

/* Open Babel formats each message as a banner line, a "*** ... in Func"
 * line and the text; keep the text only, joined into one line. */
std::string log_text(obMessageLevel worst)
{
	std::string out;
	for (int lv = obError; lv <= worst; lv++) {
		std::vector<std::string> msgs =
			obErrorLog.GetMessagesOfLevel(static_cast<obMessageLevel>(lv));
		for (const std::string &m : msgs) {
			size_t pos = 0;
			while (pos < m.size()) {
				size_t nl = m.find('\n', pos);
				if (nl == std::string::npos)
					nl = m.size();
				std::string line = m.substr(pos, nl - pos);
				pos = nl + 1;
				size_t a = line.find_first_not_of(" \t\r");
				if (a == std::string::npos)
					continue;
				line = line.substr(a);
				size_t b = line.find_last_not_of(" \t\r");
				line = line.substr(0, b + 1);
				if (line.compare(0, 3, "===") == 0 || line.compare(0, 3, "***") == 0)
					continue;
				if (!out.empty())
					out += "; ";
				out += line;
			}
		}
	}
	return out;
}

/* Open Babel reports a SMARTS syntax error as the pattern with a caret
 * line under the fault; turn that into a position. */
std::string smarts_reason()
{
	std::vector<std::string> msgs = obErrorLog.GetMessagesOfLevel(obError);
	for (const std::string &m : msgs) {
		size_t pos = 0;
		while (pos < m.size()) {
			size_t nl = m.find('\n', pos);
			if (nl == std::string::npos)
				nl = m.size();
			std::string line = m.substr(pos, nl - pos);
			pos = nl + 1;
			size_t caret = line.find('^');
			if (caret != std::string::npos &&
			    line.find_first_not_of(" ^") == std::string::npos)
				return "syntax error at position " + std::to_string(caret + 1);
		}
	}
	return "";
}

/* The message counters are cumulative and not resettable; remember them. */
struct LogMark {
	unsigned errors, warnings;
	LogMark()
	{
		obErrorLog.ClearLog();
		errors = obErrorLog.GetErrorMessageCount();
		warnings = obErrorLog.GetWarningMessageCount();
	}
	bool problem() const
	{
		return obErrorLog.GetErrorMessageCount() != errors ||
		       obErrorLog.GetWarningMessageCount() != warnings;
	}
};

/* The largest valence (bond orders plus hydrogens) that the common
 * organic elements take in a given charge state; -1 when not checked
 * (metals, hypervalent main-group atoms). A neutral N may be written
 * pentavalent only in the old nitro / N-oxide spelling with =O. */
int max_valence(int z, int q)
{
	switch (z) {
	case 6:
		return 4 - (q < 0 ? -q : q);
	case 7:
		return q == 0 ? 3 : q == 1 ? 4 : q == -1 ? 2 : -1;
	case 8:
		return q == 0 ? 2 : q == 1 ? 3 : q == -1 ? 1 : -1;
	case 9:
		return q == 0 ? 1 : q == -1 ? 0 : -1;
	case 5:
		return q == 0 ? 3 : q == -1 ? 4 : -1;
	case 14:
		return q == 0 ? 4 : -1;
	default:
		return -1;
	}
}

std::string valence_problem(OBAtom *a)
{
	int z = static_cast<int>(a->GetAtomicNum());
	int q = a->GetFormalCharge();
	int lim = max_valence(z, q);
	if ((z == 9 || z == 17 || z == 35 || z == 53) && q == -1 &&
	    a->GetExplicitValence() + a->GetImplicitHCount() > 0)
		return std::string("atom ") + std::to_string(a->GetIdx()) +
		       " is a halide ion with a bond (write the ion as its own component)";
	if ((z == 17 || z == 35 || z == 53) && q == 0) {
		/* Halogens: one bond, or the odd valences of oxyhalogen and
		 * hypervalent iodine compounds whose extra bonds go to O or F. */
		int v = static_cast<int>(a->GetExplicitValence() + a->GetImplicitHCount());
		int other = static_cast<int>(a->GetImplicitHCount());
		FOR_BONDS_OF_ATOM(b, a) {
			int zn = static_cast<int>(b->GetNbrAtom(a)->GetAtomicNum());
			if (zn != 8 && zn != 9)
				other += static_cast<int>(b->GetBondOrder());
		}
		if (v == 1 || (v % 2 == 1 && v <= 7 && other <= 1))
			return "";
		return std::string("atom ") + std::to_string(a->GetIdx()) + " (" +
		       (z == 17 ? "Cl" : z == 35 ? "Br" : "I") + ") has valence " + std::to_string(v) +
		       "; a halogen takes one bond (more only to O or F)";
	}
	if (lim < 0)
		return "";
	int v = static_cast<int>(a->GetExplicitValence() + a->GetImplicitHCount());
	if (v <= lim)
		return "";
	if (z == 7 && q == 0 && v == 5 && a->GetImplicitHCount() == 0) {
		FOR_BONDS_OF_ATOM(b, a)
			if (b->GetBondOrder() == 2 && b->GetNbrAtom(a)->GetAtomicNum() == 8)
				return "";
	}
	static const char *const sym[] = {"", "H", "He", "Li", "Be", "B", "C", "N", "O", "F",
	                                  "Ne", "Na", "Mg", "Al", "Si"};
	unsigned imp = a->GetImplicitHCount();
	return std::string("atom ") + std::to_string(a->GetIdx()) + " (" + sym[z] +
	       (q ? (q > 0 ? ", charge +" + std::to_string(q) : ", charge " + std::to_string(q)) : "") +
	       ") has valence " + std::to_string(v) +
	       (imp ? " (with " + std::to_string(imp) + " implied H)" : std::string()) +
	       ", more than " + std::to_string(lim);
}

int heavy_neighbour_other_than(OBAtom *a, OBAtom *not_this)
{
	int best = -1;
	FOR_NBORS_OF_ATOM(nb, a) {
		if (nb->GetAtomicNum() == 1 || &*nb == not_this)
			continue;
		int idx = static_cast<int>(nb->GetIdx());
		if (best < 0 || idx < best)
			best = idx;
	}
	return best;
}

int extract(irr_obshim_mol *m, size_t max_heavy, irr_obshim_graph *g, char *why, size_t why_size)
{
	OBMol &mol = m->mol;
	size_t nall = mol.NumAtoms();
	size_t nheavy = 0;
	m->heavy_of.assign(nall + 1, -1);
	for (size_t i = 1; i <= nall; i++) {
		OBAtom *a = mol.GetAtom(static_cast<int>(i));
		if (a->GetAtomicNum() != 1)
			m->heavy_of[i] = static_cast<int>(nheavy++);
	}
	/* A hydrogen takes one bond; "[2H]" written inside a ring or chain
	 * ("c1c[2H]ccc1") is a valence error, not a molecule. */
	for (size_t i = 1; i <= nall; i++) {
		OBAtom *a = mol.GetAtom(static_cast<int>(i));
		if (a->GetAtomicNum() == 1 && a->GetExplicitDegree() > 1) {
			copy_text(why, why_size, "hydrogen atom " + std::to_string(i) + " has " +
			          std::to_string(a->GetExplicitDegree()) + " bonds (a hydrogen takes one)");
			return IRR_EINPUT;
		}
	}
	/* Valence: Open Babel reads "FCC(F)F" or "PO=C=O" without complaint. */
	for (size_t i = 1; i <= nall; i++) {
		OBAtom *a = mol.GetAtom(static_cast<int>(i));
		std::string bad = valence_problem(a);
		if (!bad.empty()) {
			copy_text(why, why_size, bad);
			return IRR_EINPUT;
		}
	}
	if (nheavy > max_heavy) {
		copy_text(why, why_size, "molecule has " + std::to_string(nheavy) +
		          " heavy atoms, more than the limit of " + std::to_string(max_heavy));
		return IRR_ELIMIT;
	}
	/* Without a multiple bond in any ring nothing can be aromatic; telling
	 * Open Babel so spares its aromaticity perception, which is slow on
	 * large saturated polycycles (seconds for a few hundred rings). */
	if (!mol.HasAromaticPerceived()) {
		bool ring_pi = false;
		FOR_BONDS_OF_MOL(b, mol)
			if (b->IsInRing() && (b->GetBondOrder() > 1 ||
			                      b->GetBeginAtom()->GetAtomicNum() == 5 ||
			                      b->GetEndAtom()->GetAtomicNum() == 5)) {
				/* (boron's empty p orbital makes B-N rings such as
				 * borazine aromatic without a multiple bond) */
				ring_pi = true;
				break;
			}
		if (!ring_pi)
			mol.SetAromaticPerceived();
	}
	g->natoms = nheavy;
	g->atoms = static_cast<irr_atom *>(std::calloc(nheavy ? nheavy : 1, sizeof(irr_atom)));
	if (!g->atoms)
		return IRR_ENOMEM;
	g->mass = mol.GetMolWt(true);

	for (size_t i = 1; i <= nall; i++) {
		OBAtom *a = mol.GetAtom(static_cast<int>(i));
		int h = m->heavy_of[i];
		if (h < 0) {
			bool on_heavy = false;
			FOR_NBORS_OF_ATOM(nb, a)
				if (nb->GetAtomicNum() != 1)
					on_heavy = true;
			if (!on_heavy)
				g->stray_h += 1;
			continue;
		}
		irr_atom *x = &g->atoms[h];
		x->element = static_cast<int>(a->GetAtomicNum());
		x->charge = a->GetFormalCharge();
		x->isotope = a->GetIsotope();
		x->aromatic = a->IsAromatic() ? 1 : 0;
		x->h_count = static_cast<int>(a->GetImplicitHCount());
		FOR_NBORS_OF_ATOM(nb, a)
			if (nb->GetAtomicNum() == 1) {
				if (nb->GetIsotope() >= 2)
					x->d_count += 1;
				else
					x->h_count += 1;
			}
		x->in_ring = a->IsInRing() ? 1 : 0;
		int deg = 0;
		FOR_NBORS_OF_ATOM(nb, a)
			if (nb->GetAtomicNum() != 1)
				deg++;
		x->degree = deg;
	}

	size_t nb_heavy = 0;
	FOR_BONDS_OF_MOL(b, mol)
		if (b->GetBeginAtom()->GetAtomicNum() != 1 && b->GetEndAtom()->GetAtomicNum() != 1)
			nb_heavy++;
	g->bonds = static_cast<irr_bond *>(std::calloc(nb_heavy ? nb_heavy : 1, sizeof(irr_bond)));
	if (!g->bonds)
		return IRR_ENOMEM;
	OBStereoFacade stereo(&mol, false); /* only what the SMILES said */
	size_t k = 0;
	FOR_BONDS_OF_MOL(b, mol) {
		OBAtom *a1 = b->GetBeginAtom(), *a2 = b->GetEndAtom();
		if (a1->GetAtomicNum() == 1 || a2->GetAtomicNum() == 1)
			continue;
		irr_bond *y = &g->bonds[k++];
		y->a = m->heavy_of[a1->GetIdx()];
		y->b = m->heavy_of[a2->GetIdx()];
		y->order = b->IsAromatic() ? 5 : static_cast<int>(b->GetBondOrder());
		y->in_ring = b->IsInRing() ? 1 : 0;
		y->stereo = 0;
		if (b->GetBondOrder() == 2 && stereo.HasCisTransStereo(b->GetId())) {
			/* Relative to the lowest-numbered heavy neighbour on each end. */
			OBCisTransStereo *ct = stereo.GetCisTransStereo(b->GetId());
			int r1 = heavy_neighbour_other_than(a1, a2);
			int r2 = heavy_neighbour_other_than(a2, a1);
			if (ct && ct->GetConfig().specified && r1 > 0 && r2 > 0) {
				unsigned long id1 = mol.GetAtom(r1)->GetId();
				unsigned long id2 = mol.GetAtom(r2)->GetId();
				if (ct->IsCis(id1, id2))
					y->stereo = 1;
				else if (ct->IsTrans(id1, id2))
					y->stereo = 2;
			}
		}
	}
	g->nbonds = k;

	std::vector<OBRing *> &sssr = mol.GetSSSR();
	size_t total = 0;
	for (OBRing *r : sssr)
		total += r->_path.size();
	g->nrings = sssr.size();
	g->ring_start = static_cast<size_t *>(std::calloc(g->nrings + 1, sizeof(size_t)));
	g->ring_atoms = static_cast<int *>(std::calloc(total ? total : 1, sizeof(int)));
	if (!g->ring_start || !g->ring_atoms)
		return IRR_ENOMEM;
	size_t pos = 0;
	for (size_t r = 0; r < sssr.size(); r++) {
		g->ring_start[r] = pos;
		for (int idx : sssr[r]->_path)
			if (idx > 0 && static_cast<size_t>(idx) <= nall && m->heavy_of[idx] >= 0)
				g->ring_atoms[pos++] = m->heavy_of[static_cast<size_t>(idx)];
	}
	g->ring_start[g->nrings] = pos;

	/* From here on the molecule serves SMARTS matching: implicit hydrogens
	 * only, so H-count primitives behave the same for every spelling. */
	mol.DeleteHydrogens();
	size_t nleft = mol.NumAtoms();
	m->heavy_of.assign(nleft + 1, -1);
	size_t hv = 0;
	for (size_t i = 1; i <= nleft; i++)
		if (mol.GetAtom(static_cast<int>(i))->GetAtomicNum() != 1)
			m->heavy_of[i] = static_cast<int>(hv++);
	return IRR_OK;
}

} /* namespace */

extern "C" int irr_obshim__read_smiles(const char *smiles, size_t max_heavy,
                                       irr_obshim_mol **mol_out, irr_obshim_graph *graph,
                                       char *why, size_t why_size)
{
	*mol_out = nullptr;
	std::memset(graph, 0, sizeof *graph);
	if (why && why_size)
		why[0] = '\0';
	irr_obshim_mol *m = nullptr;
	int rc = IRR_OK;
	try {
		OBConversion *conv = reader();
		if (!conv) {
			copy_text(why, why_size, "Open Babel's SMILES reader (smilesformat) could not be loaded");
			return IRR_ERROR;
		}
		m = new irr_obshim_mol;
		LogMark mark;
		bool ok = conv->ReadString(&m->mol, smiles);
		if (!ok || mark.problem()) {
			std::string text = log_text(obWarning);
			if (text.empty())
				text = "Open Babel could not read it";
			copy_text(why, why_size, text);
			rc = IRR_EINPUT;
		} else {
			rc = extract(m, max_heavy, graph, why, why_size);
			if (rc == IRR_OK && mark.problem()) {
				/* Ring or aromaticity perception complained. */
				copy_text(why, why_size, log_text(obWarning));
				rc = IRR_EINPUT;
			}
		}
	} catch (const std::bad_alloc &) {
		rc = IRR_ENOMEM;
	} catch (const std::exception &e) {
		copy_text(why, why_size, std::string("Open Babel failed: ") + e.what());
		rc = IRR_ERROR;
	} catch (...) {
		copy_text(why, why_size, "Open Babel failed");
		rc = IRR_ERROR;
	}
	obErrorLog.ClearLog();
	if (rc != IRR_OK) {
		delete m;
		irr_obshim__graph_release(graph);
		return rc;
	}
	*mol_out = m;
	return IRR_OK;
}

extern "C" void irr_obshim__mol_free(irr_obshim_mol *mol)
{
	delete mol;
}

extern "C" void irr_obshim__graph_release(irr_obshim_graph *g)
{
	if (!g)
		return;
	std::free(g->atoms);
	std::free(g->bonds);
	std::free(g->ring_start);
	std::free(g->ring_atoms);
	std::memset(g, 0, sizeof *g);
}

extern "C" int irr_obshim__smarts_compile(const char *smarts, irr_obshim_smarts **out,
                                          char *why, size_t why_size)
{
	*out = nullptr;
	if (why && why_size)
		why[0] = '\0';
	irr_obshim_smarts *p = nullptr;
	try {
		reader(); /* sets up the silent log */
		p = new irr_obshim_smarts;
		LogMark mark;
		bool ok = p->pattern.Init(smarts);
		if (!ok || mark.problem()) {
			std::string text = smarts_reason();
			if (text.empty())
				text = log_text(obWarning);
			copy_text(why, why_size, text.empty() ? "Open Babel rejected the SMARTS" : text);
			delete p;
			obErrorLog.ClearLog();
			return IRR_EINPUT;
		}
	} catch (const std::bad_alloc &) {
		delete p;
		return IRR_ENOMEM;
	} catch (...) {
		delete p;
		copy_text(why, why_size, "Open Babel failed on the SMARTS");
		return IRR_ERROR;
	}
	obErrorLog.ClearLog();
	*out = p;
	return IRR_OK;
}

extern "C" void irr_obshim__smarts_free(irr_obshim_smarts *p)
{
	delete p;
}

extern "C" int irr_obshim__smarts_match(const irr_obshim_smarts *p, const irr_obshim_mol *mol,
                                        int **atoms, int *width)
{
	if (atoms)
		*atoms = nullptr;
	int w = static_cast<int>(p->pattern.NumAtoms());
	if (width)
		*width = w;
	try {
		std::vector<std::vector<int> > maps;
		/* Matching perceives rings and aromaticity lazily, which writes to
		 * the molecule's caches; the molecule is otherwise unchanged. */
		OBMol &m = const_cast<OBMol &>(mol->mol);
		p->pattern.Match(m, maps, OBSmartsPattern::AllUnique);
		obErrorLog.ClearLog();
		if (atoms && !maps.empty()) {
			int *out = static_cast<int *>(std::malloc(maps.size() * (w ? w : 1) * sizeof(int)));
			if (!out)
				return IRR_ENOMEM;
			size_t k = 0;
			for (const std::vector<int> &mp : maps)
				for (int i = 0; i < w; i++) {
					int idx = i < static_cast<int>(mp.size()) ? mp[i] : 0;
					out[k++] = (idx > 0 && static_cast<size_t>(idx) < mol->heavy_of.size())
					               ? mol->heavy_of[idx] : -1;
				}
			*atoms = out;
		}
		return static_cast<int>(maps.size());
	} catch (const std::bad_alloc &) {
		return IRR_ENOMEM;
	} catch (...) {
		return IRR_ERROR;
	}
}
