/* irrecon/keys.h: the perception-key vocabulary shared by perception (which
 * produces the keys) and the group tables (which name them with "key"). The
 * meaning and attributes of each key are described in perceive.h. */
#ifndef IRRECON_KEYS_H
#define IRRECON_KEYS_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Trade name of a perception key ("alcohol_primary" -> "primary alcohol"),
 * or NULL when `key` is not a perception key. Static string. */
const char *irr_key_name(const char *key);
/* The keys in sorted order: count, and the i-th (static string, NULL when
 * out of range). */
size_t irr_key_count(void);
const char *irr_key_at(size_t i);

#ifdef __cplusplus
}
#endif
#endif
