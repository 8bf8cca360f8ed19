/* jcamp.c: JCAMP-DX reader (being written; this first version only refuses). */
#include "jcamp.h"

int irr_jcamp__read(irr_spectrum **out, const char *data, size_t len,
                    const char *name, const irr_read_options *o, irr_error *err)
{
	(void)data, (void)len, (void)o;
	*out = NULL;
	return irr_error_set(err, IRR_EINPUT, name, 1, "JCAMP-DX reading is not available yet");
}

int irr_jcamp__list_blocks(irr_block_info **out, size_t *count, const char *data,
                           size_t len, const char *name, irr_error *err)
{
	(void)data, (void)len;
	*out = NULL;
	*count = 0;
	return irr_error_set(err, IRR_EINPUT, name, 1, "JCAMP-DX reading is not available yet");
}
