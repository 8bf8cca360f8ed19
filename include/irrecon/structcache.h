/* irrecon/structcache.h: structures read and perceived once per run. A
 * batch meets the same SMILES many times (a plate's shared starting
 * materials and reagents, a week of QC samples of one product); a cache
 * handed to checks (irr_check_use_structure_cache, or
 * irr_request_use_structure_cache for every check a request runs) parses
 * and perceives each distinct SMILES once. Results are the same with or
 * without it. Not thread-safe: one cache per thread or process. */
#ifndef IRRECON_STRUCTCACHE_H
#define IRRECON_STRUCTCACHE_H

#include <stddef.h>

#include "irrecon/common.h"
#include "irrecon/tables.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_structure_cache irr_structure_cache;

/* A cache for structures perceived with tables `t` (borrowed: they must
 * outlive the cache), holding at most `capacity` structures (0: 256); when
 * it is full it starts afresh. On success *out is owned by the caller
 * (irr_structure_cache_free). */
int irr_structure_cache_create(irr_structure_cache **out, const irr_tables *t,
                               size_t capacity, irr_error *err);

/* Frees the cache (NULL: no-op). Checks that still use structures from it
 * keep them until they are freed themselves. */
void irr_structure_cache_free(irr_structure_cache *sc);

/* Structures held now, and lookups answered from the cache so far. */
size_t irr_structure_cache_count(const irr_structure_cache *sc);
size_t irr_structure_cache_hits(const irr_structure_cache *sc);

#ifdef __cplusplus
}
#endif
#endif
