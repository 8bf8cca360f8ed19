/* spectrum_read.c: the entry of the "read spectrum" stage: reads a file
 * (or memory) within the size limits, refuses binary and UTF-16 data, tells
 * JCAMP-DX from CSV/TSV by content, and hands the bytes to the reader
 * (jcamp.c, csvread.c), which fills a spectrum object (spectrum.c). */
#include "irrecon/spectrum.h"
#include "jcamp.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* ---- reading ---------------------------------------------------------- */

static long line_of(const char *data, size_t off)
{
	long line = 1;
	for (size_t i = 0; i < off; i++)
		if (data[i] == '\n')
			line++;
	return line;
}

/* UTF-16 text (Windows "Unicode" exports) has a byte order mark, or a NUL
 * in every other byte of ASCII text. */
static int looks_like_utf16(const unsigned char *p, size_t len)
{
	size_t zeros_even = 0, zeros_odd = 0, n = len < 512 ? len : 512;
	if (len >= 2 && ((p[0] == 0xFF && p[1] == 0xFE) || (p[0] == 0xFE && p[1] == 0xFF)))
		return 1;
	for (size_t i = 0; i < n; i++)
		if (!p[i]) {
			if (i % 2)
				zeros_odd++;
			else
				zeros_even++;
		}
	/* Text in UTF-16 has its NULs in one byte position only; NULs
	 * everywhere (/dev/zero, a sparse file) are binary data. */
	return n >= 8 && ((zeros_odd >= n / 2 - 1 && zeros_even <= n / 8) ||
	                  (zeros_even >= n / 2 - 1 && zeros_odd <= n / 8));
}

static int binary_error(const char *data, size_t len, size_t nul_at, const char *name,
                        irr_error *err)
{
	if (looks_like_utf16((const unsigned char *)data, len))
		return irr_spectrum__fail(err, IRR_EINPUT, name, 0,
		                     "the file is UTF-16 text; save it as ASCII or UTF-8");
	return irr_spectrum__fail(err, IRR_EINPUT, name, line_of(data, nul_at),
	                     "binary data (a NUL byte), not a JCAMP-DX or CSV text file");
}

#define SNIFF_BYTES ((size_t)65536)

static int looks_like_jcamp(const char *data, size_t len);

int irr_spectrum__slurp(char **out, size_t *len, const char *path,
                        size_t max_bytes, const irr_read_options *o, irr_error *err)
{
	int fd;
	struct stat st;
	char *buf = NULL;
	size_t cap = 0, n = 0;
	int rc = IRR_OK, sniffed = 0;
	*out = NULL;
	*len = 0;
	fd = open(path, O_RDONLY | O_CLOEXEC);
	if (fd < 0)
		return irr_spectrum__fail(err, IRR_EIO, path, 0, "cannot open: %s", strerror(errno));
	if (fstat(fd, &st) == 0 && S_ISDIR(st.st_mode)) {
		close(fd);
		return irr_spectrum__fail(err, IRR_EIO, path, 0, "is a directory, not a file");
	}
	/* The size limit is checked before anything is allocated, so an
	 * oversized file costs nothing. */
	if (S_ISREG(st.st_mode)) {
		if ((unsigned long long)st.st_size > (unsigned long long)max_bytes) {
			close(fd);
			return irr_spectrum__fail(err, IRR_ELIMIT, path, 0,
			                     "file is %lld bytes, more than the limit of %zu",
			                     (long long)st.st_size, max_bytes);
		}
		cap = (size_t)st.st_size + 1;
	} else {
		cap = SNIFF_BYTES + 1;
	}
	for (;;) {
		ssize_t r;
		size_t want;
		if (buf && n + 1 >= cap && S_ISREG(st.st_mode) && sniffed) {
			/* The whole file is in; one probe tells whether it grew
			 * meanwhile, without doubling a large buffer for nothing. */
			char probe;
			ssize_t pr = read(fd, &probe, 1);
			if (pr == 0)
				break;
			if (pr < 0 && errno == EINTR)
				continue;
			rc = irr_spectrum__fail(err, IRR_EIO, path, 0, "the file changed while it was read");
			goto done;
		}
		if (n + 1 >= cap || !buf) {
			size_t ncap = buf ? 2 * cap : cap;
			char *nb;
			if (buf && cap > max_bytes + 1) {
				rc = irr_spectrum__fail(err, IRR_ELIMIT, path, 0,
				                   "input is more than the limit of %zu bytes", max_bytes);
				goto done;
			}
			if (ncap > max_bytes + 2)
				ncap = max_bytes + 2;
			if (!(nb = realloc(buf, ncap))) {
				rc = irr_spectrum__fail(err, IRR_ENOMEM, path, 0, "out of memory");
				goto done;
			}
			buf = nb;
			cap = ncap;
		}
		/* The first 64 KiB are read on their own and looked at before
		 * the rest: binary data, or a text that fails as CSV in its first
		 * lines, is refused without reading (or paging in) a huge file. */
		want = cap - 1 - n;
		if (!sniffed && n < SNIFF_BYTES && want > SNIFF_BYTES - n)
			want = SNIFF_BYTES - n;
		r = read(fd, buf + n, want);
		if (r < 0) {
			if (errno == EINTR)
				continue;
			rc = irr_spectrum__fail(err, IRR_EIO, path, 0, "read error: %s", strerror(errno));
			goto done;
		}
		n += (size_t)r;
		if (!sniffed && (n >= SNIFF_BYTES || r == 0)) {
			const char *z = memchr(buf, '\0', n);
			sniffed = 1;
			if (z || looks_like_utf16((const unsigned char *)buf, n)) {
				rc = binary_error(buf, n, z ? (size_t)(z - buf) : 0, path, err);
				goto done;
			}
			if (o && r != 0 && !looks_like_jcamp(buf, n)) {
				const char *nl = buf + n;
				while (nl > buf && nl[-1] != '\n')
					nl--;
				if (nl > buf && (rc = irr_csv__check_prefix(buf, (size_t)(nl - buf), path, o, err)) < 0)
					goto done;
			}
		}
		if (r == 0)
			break;
		if (n > max_bytes) {
			rc = irr_spectrum__fail(err, IRR_ELIMIT, path, 0,
			                   "input is more than the limit of %zu bytes", max_bytes);
			goto done;
		}
	}
	buf[n] = '\0';
done:
	close(fd);
	if (rc < 0) {
		free(buf);
		return rc;
	}
	*out = buf;
	*len = n;
	return IRR_OK;
}

/* Files from classic Mac OS end lines with a lone CR; the JCAMP-DX
 * reader splits on LF, so such a buffer is turned into LF lines. */
static void cr_to_lf(char *data, size_t len)
{
	if (memchr(data, '\n', len) || !memchr(data, '\r', len))
		return;
	for (size_t i = 0; i < len; i++)
		if (data[i] == '\r')
			data[i] = '\n';
}

static int looks_like_jcamp(const char *data, size_t len)
{
	size_t i = 0;
	if (len >= 3 && (unsigned char)data[0] == 0xEF && (unsigned char)data[1] == 0xBB &&
	    (unsigned char)data[2] == 0xBF)
		i = 3;
	while (i < len && (data[i] == ' ' || data[i] == '\t' || data[i] == '\r' || data[i] == '\n'))
		i++;
	return i + 1 < len && data[i] == '#' && data[i + 1] == '#';
}

int irr_spectrum_read_memory(irr_spectrum **out, const char *data, size_t len,
                             const char *name, const irr_read_options *o,
                             irr_error *err)
{
	irr_read_options def;
	char *copy = NULL;
	const char *z;
	int rc;
	if (!out)
		return irr_spectrum__fail(err, IRR_EINPUT, name, 0, "no output pointer");
	*out = NULL;
	if (!name)
		name = "memory";
	if (!o) {
		irr_read_options_init(&def);
		o = &def;
	}
	if (!data)
		len = 0;
	if (len > irr_spectrum__max_bytes(o))
		return irr_spectrum__fail(err, IRR_ELIMIT, name, 0,
		                     "input is %zu bytes, more than the limit of %zu",
		                     len, irr_spectrum__max_bytes(o));
	if (len && ((z = memchr(data, '\0', len)) || looks_like_utf16((const unsigned char *)data, len)))
		return binary_error(data, len, z ? (size_t)(z - data) : 0, name, err);
	/* The readers rely on a terminating NUL; a caller's buffer need not
	 * have one. */
	if (!(copy = malloc(len + 1)))
		return irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
	if (len)
		memcpy(copy, data, len);
	copy[len] = '\0';
	if (looks_like_jcamp(copy, len)) {
		cr_to_lf(copy, len);
		rc = irr_jcamp__read(out, copy, len, name, o, err);
	}
	else
		rc = irr_csv__read(out, copy, len, name, o, err);
	free(copy);
	return rc;
}

int irr_spectrum_read_file(irr_spectrum **out, const char *path,
                           const irr_read_options *o, irr_error *err)
{
	irr_read_options def;
	char *buf;
	size_t len;
	const char *z;
	int rc;
	if (!out)
		return irr_spectrum__fail(err, IRR_EINPUT, path, 0, "no output pointer");
	*out = NULL;
	if (!path)
		return irr_spectrum__fail(err, IRR_EINPUT, "", 0, "no file name");
	if (!o) {
		irr_read_options_init(&def);
		o = &def;
	}
	if ((rc = irr_spectrum__slurp(&buf, &len, path, irr_spectrum__max_bytes(o), o, err)) < 0)
		return rc;
	if (len && ((z = memchr(buf, '\0', len)) || looks_like_utf16((const unsigned char *)buf, len)))
		rc = binary_error(buf, len, z ? (size_t)(z - buf) : 0, path, err);
	else if (looks_like_jcamp(buf, len)) {
		cr_to_lf(buf, len);
		rc = irr_jcamp__read(out, buf, len, path, o, err);
	}
	else
		rc = irr_csv__read(out, buf, len, path, o, err);
	free(buf);
	return rc;
}

int irr_jcamp_list_blocks(irr_block_info **out, size_t *count, const char *path,
                          irr_error *err)
{
	char *buf;
	size_t len;
	int rc;
	if (!out || !count)
		return irr_spectrum__fail(err, IRR_EINPUT, path, 0, "no output pointer");
	*out = NULL;
	*count = 0;
	if ((rc = irr_spectrum__slurp(&buf, &len, path, IRR_SPECTRUM__DEFAULT_MAX_BYTES, NULL, err)) < 0)
		return rc;
	if (!looks_like_jcamp(buf, len))
		rc = irr_spectrum__fail(err, IRR_EINPUT, path, 1,
		                   "not a JCAMP-DX file (it does not start with a ##LABEL= record)");
	else {
		cr_to_lf(buf, len);
		rc = irr_jcamp__list_blocks(out, count, buf, len, path, err);
	}
	free(buf);
	return rc;
}

