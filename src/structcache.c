/* structcache.c: structures read and perceived once per run (see
 * irrecon/structcache.h). An open-addressing hash table (FNV-1a over the
 * SMILES text, linear probing) of reference-counted entries; when it is
 * full it is emptied, which keeps it bounded without bookkeeping and costs
 * one parse per structure at the next meeting. */
#include "structcache_internal.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#define DEFAULT_CAPACITY 256

struct irr_structure_cache {
	const irr_tables *t;
	irr_sc_entry **slot; /* nslots, a power of two, at least twice capacity */
	size_t nslots, count, capacity, hits;
};

static uint64_t fnv1a(const char *s)
{
	uint64_t h = 1469598103934665603ULL;
	for (; *s; s++) {
		h ^= (unsigned char)*s;
		h *= 1099511628211ULL;
	}
	return h;
}

int irr_structure_cache_create(irr_structure_cache **out, const irr_tables *t,
                               size_t capacity, irr_error *err)
{
	irr_structure_cache *sc;
	size_t n = 16;
	if (!out)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no place for the cache");
	*out = NULL;
	if (!t)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no group tables given");
	if (capacity == 0)
		capacity = DEFAULT_CAPACITY;
	if (capacity > ((size_t)1 << 20))
		capacity = (size_t)1 << 20;
	while (n < 2 * capacity)
		n *= 2;
	sc = calloc(1, sizeof *sc);
	if (!sc || !(sc->slot = calloc(n, sizeof *sc->slot))) {
		free(sc);
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	sc->t = t;
	sc->nslots = n;
	sc->capacity = capacity;
	*out = sc;
	return IRR_OK;
}

void irr_sc_entry__release(irr_sc_entry *e)
{
	if (!e || --e->refs > 0)
		return;
	irr_prediction_free(e->pred);
	irr_inventory_free(e->inv);
	irr_molecule_free(e->mol);
	free(e->smiles);
	free(e);
}

static void empty(irr_structure_cache *sc)
{
	for (size_t i = 0; i < sc->nslots; i++) {
		irr_sc_entry__release(sc->slot[i]);
		sc->slot[i] = NULL;
	}
	sc->count = 0;
}

void irr_structure_cache_free(irr_structure_cache *sc)
{
	if (!sc)
		return;
	empty(sc);
	free(sc->slot);
	free(sc);
}

const irr_tables *irr_structure_cache__tables(const irr_structure_cache *sc)
{
	return sc ? sc->t : NULL;
}

size_t irr_structure_cache_count(const irr_structure_cache *sc)
{
	return sc ? sc->count : 0;
}

size_t irr_structure_cache_hits(const irr_structure_cache *sc)
{
	return sc ? sc->hits : 0;
}

int irr_structure_cache__get(irr_structure_cache *sc, const char *smiles,
                             const char *name, irr_sc_entry **out,
                             int *perceive_failed, irr_error *err)
{
	size_t mask = sc->nslots - 1, i = (size_t)fnv1a(smiles) & mask;
	irr_sc_entry *e;
	int rc;
	*out = NULL;
	*perceive_failed = 0;
	for (; sc->slot[i]; i = (i + 1) & mask)
		if (!strcmp(sc->slot[i]->smiles, smiles)) {
			sc->hits++;
			sc->slot[i]->refs++;
			*out = sc->slot[i];
			return IRR_OK;
		}
	if (!(e = calloc(1, sizeof *e)) || !(e->smiles = strdup(smiles))) {
		free(e);
		return irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
	}
	e->refs = 1;
	if ((rc = irr_molecule_from_smiles(&e->mol, smiles, name, err)) != IRR_OK) {
		irr_sc_entry__release(e);
		return rc;
	}
	if ((rc = irr_perceive(&e->inv, e->mol, sc->t, err)) != IRR_OK) {
		*perceive_failed = 1;
		irr_sc_entry__release(e);
		return rc;
	}
	if (sc->count == sc->capacity) {
		empty(sc);
		i = (size_t)fnv1a(smiles) & mask;
	}
	while (sc->slot[i])
		i = (i + 1) & mask;
	sc->slot[i] = e;
	sc->count++;
	e->refs++; /* the cache's own */
	*out = e;
	return IRR_OK;
}
