/* batch.c: batch manifests (CSV per RFC 4180, or JSON Lines), the
 * confinement of the paths they name to the manifest's folder, and the run
 * of one row into a one-line JSON result or error record. */
#include "irrecon/batch.h"
#include "irrecon/report.h"
#include "json_write.h"
#include "request_internal.h"

#include <errno.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <time.h>

#include <cJSON.h>

#define MANIFEST_MAX_BYTES ((size_t)256 * 1024 * 1024)

enum { F_SAMPLE, F_STRUCTURE, F_SPECTRUM, F_PEAKS, F_SM, F_REAGENTS, F_SOLVENTS,
       F_PHASE, F_SAMPLING, F_COUNT };
static const char *const field_names[F_COUNT] = {
	"sample", "structure", "spectrum", "peaks", "starting_materials",
	"reagents", "solvents", "phase", "sampling"};

typedef struct row {
	irr_manifest_sample pub;
	char *text[F_COUNT];       /* owned strings (lists: unused) */
	irr_strlist lists[3];      /* starting materials, reagents, solvents */
	irr_error *err;            /* failed rows only */
} row;

/* The folder of the last path checked: the rows of a manifest mostly name
 * files in one or two folders, and realpath() costs a getcwd and a readlink
 * per path component for every file. */
typedef struct dir_memo {
	char *dir;  /* folder part of the last path, as written */
	int inside; /* its realpath lies inside base_real: 1, 0; -1 unknown */
} dir_memo;

struct irr_manifest {
	char *name;
	char *base_dir;
	char *base_real;           /* realpath of base_dir, or NULL */
	dir_memo *memo;            /* mutable behind a const manifest; NULL: none */
	irr_manifest_format format;
	row *rows;
	size_t n, cap;
};

static char *dup_n(const char *s, size_t n)
{
	char *d = malloc(n + 1);
	if (d) {
		memcpy(d, s, n);
		d[n] = '\0';
	}
	return d;
}

static char *dup_s(const char *s)
{
	return s ? dup_n(s, strlen(s)) : NULL;
}

static void row_release(row *r)
{
	for (int f = 0; f < F_COUNT; f++)
		free(r->text[f]);
	free(r->err);
	for (int k = 0; k < 3; k++) {
		for (size_t i = 0; i < r->lists[k].n; i++)
			free(r->lists[k].v[i]);
		free(r->lists[k].v);
	}
}

void irr_manifest_free(irr_manifest *m)
{
	if (!m)
		return;
	for (size_t i = 0; i < m->n; i++)
		row_release(&m->rows[i]);
	free(m->rows);
	free(m->name);
	free(m->base_dir);
	free(m->base_real);
	if (m->memo)
		free(m->memo->dir);
	free(m->memo);
	free(m);
}

static row *new_row(irr_manifest *m, long line)
{
	row *r;
	if (m->n == m->cap) {
		size_t cap = m->cap ? 2 * m->cap : 64;
		row *v = realloc(m->rows, cap * sizeof *v);
		if (!v)
			return NULL;
		m->rows = v;
		m->cap = cap;
	}
	r = &m->rows[m->n++];
	memset(r, 0, sizeof *r);
	r->pub.index = m->n - 1;
	r->pub.line = line;
	return r;
}

/* Header names: case-insensitive; ' ' and '-' count as '_'. */
static int field_of(const char *s, size_t n)
{
	char buf[40];
	size_t i;
	while (n && (*s == ' ' || *s == '\t'))
		s++, n--;
	while (n && (s[n - 1] == ' ' || s[n - 1] == '\t' || s[n - 1] == '\r'))
		n--;
	if (n == 0 || n >= sizeof buf)
		return -1;
	for (i = 0; i < n; i++) {
		char c = s[i];
		if (c >= 'A' && c <= 'Z')
			c = (char)(c - 'A' + 'a');
		if (c == ' ' || c == '-')
			c = '_';
		buf[i] = c;
	}
	buf[n] = '\0';
	for (int f = 0; f < F_COUNT; f++)
		if (!strcmp(buf, field_names[f]))
			return f;
	return -1;
}

/* Stores one field's text into the row; lists are split at ';'. */
static int row_set(row *r, int f, const char *s, size_t n)
{
	while (n && (*s == ' ' || *s == '\t'))
		s++, n--;
	while (n && (s[n - 1] == ' ' || s[n - 1] == '\t' || s[n - 1] == '\r'))
		n--;
	if (n == 0)
		return IRR_OK;
	if (f == F_SM || f == F_REAGENTS || f == F_SOLVENTS) {
		char *tmp = dup_n(s, n);
		int rc;
		if (!tmp)
			return IRR_ENOMEM;
		rc = irr_request__add_split(&r->lists[f - F_SM], tmp);
		free(tmp);
		return rc;
	}
	free(r->text[f]);
	r->text[f] = dup_n(s, n);
	return r->text[f] ? IRR_OK : IRR_ENOMEM;
}

static void row_publish(row *r)
{
	irr_manifest_sample *p = &r->pub;
	p->sample = r->text[F_SAMPLE];
	p->structure = r->text[F_STRUCTURE];
	p->spectrum = r->text[F_SPECTRUM];
	p->peaks = r->text[F_PEAKS];
	p->phase = r->text[F_PHASE];
	p->sampling = r->text[F_SAMPLING];
	p->n_starting_materials = r->lists[0].n;
	p->starting_materials = (const char *const *)r->lists[0].v;
	p->n_reagents = r->lists[1].n;
	p->reagents = (const char *const *)r->lists[1].v;
	p->n_solvents = r->lists[2].n;
	p->solvents = (const char *const *)r->lists[2].v;
}

/* Only failed rows carry an error record: it is 2 KB, and a manifest may
 * have a million rows. */
static int row_fail(row *r, const char *name, long line, const char *fmt, const char *a)
{
	r->pub.failed = 1;
	if (!r->err && !(r->err = malloc(sizeof *r->err)))
		return IRR_ENOMEM;
	irr_error_set(r->err, IRR_EINPUT, name, line, fmt, a ? a : "");
	r->pub.error = r->err;
	return IRR_OK;
}

/* ---- CSV (RFC 4180: quoted fields, doubled quotes, CRLF or LF) ---------- */

typedef struct csv_field {
	size_t start, len;  /* into the unquoted buffer */
} csv_field;

/* Reads one record starting at *pos. Unquoted text goes to `buf`; fields
 * are described in `fields`. Returns the field count, or -1 with *why set
 * for an unterminated quote or text after a closing quote. */
static long csv_record(const char *d, size_t len, size_t *pos, long *line,
                       char *buf, csv_field *fields, size_t maxf, const char **why)
{
	size_t p = *pos, b = 0, nf = 0;
	int quoted = 0, was_quoted = 0;
	fields[0].start = 0;
	for (;;) {
		char c = p < len ? d[p] : '\n';
		int at_end = p >= len;
		if (quoted) {
			if (at_end) {
				*why = "a quoted field is not closed";
				return -1;
			}
			if (c == '"') {
				if (p + 1 < len && d[p + 1] == '"') {
					buf[b++] = '"';
					p += 2;
					continue;
				}
				quoted = 0;
				p++;
				continue;
			}
			if (c == '\n')
				(*line)++;
			buf[b++] = c;
			p++;
			continue;
		}
		if (c == '"') {
			if (b != fields[nf].start || was_quoted) {
				*why = "a quote inside an unquoted field (quote the whole field and double inner quotes)";
				return -1;
			}
			quoted = was_quoted = 1;
			p++;
			continue;
		}
		if (c == ',' || c == '\n') {
			if (nf >= maxf) {
				*why = "too many fields";
				return -1;
			}
			fields[nf].len = b - fields[nf].start;
			/* A CR before LF belongs to the line ending. */
			if (c == '\n' && !was_quoted && fields[nf].len && buf[b - 1] == '\r')
				fields[nf].len--;
			nf++;
			if (c == '\n') {
				*pos = at_end ? len : p + 1;
				return (long)nf;
			}
			p++;
			fields[nf].start = b;
			was_quoted = 0;
			continue;
		}
		if (was_quoted && c != '\r' && c != ' ' && c != '\t') {
			*why = "text after a closing quote";
			return -1;
		}
		if (!was_quoted || c != '\r')
			buf[b++] = c;
		p++;
	}
}

static int line_is_blank_or_comment(const char *d, size_t len, size_t p)
{
	while (p < len && (d[p] == ' ' || d[p] == '\t' || d[p] == '\r'))
		p++;
	return p >= len || d[p] == '\n' || d[p] == '#';
}

static size_t skip_line(const char *d, size_t len, size_t p)
{
	const char *nl = memchr(d + p, '\n', len - p);
	return nl ? (size_t)(nl - d) + 1 : len;
}

#define CSV_MAX_FIELDS 64

static int read_csv(irr_manifest *m, const char *d, size_t len, irr_error *err)
{
	size_t pos = 0;
	long line = 1;
	int col[CSV_MAX_FIELDS];
	long ncol = -1;
	csv_field fields[CSV_MAX_FIELDS + 1];
	char *buf = malloc(len + 2);
	int rc = IRR_OK, seen[F_COUNT] = {0};
	if (!buf)
		return irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
	while (pos < len) {
		long start = line, nf;
		const char *why = NULL;
		row *r;
		if (line_is_blank_or_comment(d, len, pos)) {
			pos = skip_line(d, len, pos);
			line++;
			continue;
		}
		nf = csv_record(d, len, &pos, &line, buf, fields, CSV_MAX_FIELDS, &why);
		line++;
		if (ncol < 0) {
			/* The header row. */
			if (nf < 0) {
				rc = irr_error_set(err, IRR_EINPUT, m->name, start, "header row: %s", why);
				goto done;
			}
			for (long i = 0; i < nf; i++) {
				int f = field_of(buf + fields[i].start, fields[i].len);
				if (f < 0) {
					rc = irr_error_set(err, IRR_EINPUT, m->name, start,
					                   "unknown column '%.*s' (columns: sample, structure, spectrum, peaks, starting_materials, reagents, solvents, phase, sampling)",
					                   (int)(fields[i].len > 60 ? 60 : fields[i].len), buf + fields[i].start);
					goto done;
				}
				if (seen[f]) {
					rc = irr_error_set(err, IRR_EINPUT, m->name, start, "column '%s' appears twice", field_names[f]);
					goto done;
				}
				seen[f] = 1;
				col[i] = f;
			}
			ncol = nf;
			if (!seen[F_STRUCTURE] || (!seen[F_SPECTRUM] && !seen[F_PEAKS])) {
				rc = irr_error_set(err, IRR_EINPUT, m->name, start,
				                   "the header needs a 'structure' column and a 'spectrum' or 'peaks' column");
				goto done;
			}
			continue;
		}
		if (!(r = new_row(m, start))) {
			rc = irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
			goto done;
		}
		if (nf < 0) {
			row_fail(r, m->name, start, "%s", why);
			row_publish(r);
			/* An unclosed quote swallows the rest of the file; any other
			 * fault costs only its line. */
			if (!strcmp(why, "a quoted field is not closed"))
				pos = len;
			else
				pos = skip_line(d, len, pos);
			line = start + 1;
			continue;
		}
		/* The sample id first, so that even a broken row names its sample. */
		for (long i = 0; i < nf && i < ncol; i++)
			if (col[i] == F_SAMPLE && row_set(r, F_SAMPLE, buf + fields[i].start, fields[i].len)) {
				rc = irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
				goto done;
			}
		if (nf != ncol) {
			char msg[80];
			snprintf(msg, sizeof msg, "%ld fields, but the header has %ld", nf, ncol);
			row_fail(r, m->name, start, "%s", msg);
		} else {
			for (long i = 0; i < nf; i++)
				if (col[i] != F_SAMPLE && row_set(r, col[i], buf + fields[i].start, fields[i].len)) {
					rc = irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
					goto done;
				}
		}
		row_publish(r);
	}
	if (ncol < 0)
		rc = irr_error_set(err, IRR_EINPUT, m->name, 1, "empty manifest: no header row");
done:
	free(buf);
	return rc;
}

/* ---- JSON Lines ----------------------------------------------------------- */

static int jsonl_row(irr_manifest *m, row *r, const char *d, size_t n, long line)
{
	cJSON *root = NULL, *e;
	irr_error perr;
	if (irr_request__parse_json(&root, d, n, m->name, line, &perr) != IRR_OK) {
		if (!(r->err = malloc(sizeof *r->err)))
			return IRR_ENOMEM;
		*r->err = perr;
		r->pub.failed = 1;
		r->pub.error = r->err;
		return IRR_OK;
	}
	if (!cJSON_IsObject(root)) {
		cJSON_Delete(root);
		return row_fail(r, m->name, line, "a manifest line must be a JSON object%s", NULL);
	}
	e = cJSON_GetObjectItemCaseSensitive(root, "sample");
	if (cJSON_IsString(e) && row_set(r, F_SAMPLE, e->valuestring, strlen(e->valuestring)))
		goto nomem;
	cJSON_ArrayForEach(e, root) {
		int f = field_of(e->string, strlen(e->string));
		if (f < 0) {
			row_fail(r, m->name, line, "unknown key \"%s\"", e->string);
			break;
		}
		if (cJSON_IsNull(e) || (f == F_SAMPLE && cJSON_IsString(e)))
			continue;
		if ((f == F_SM || f == F_REAGENTS || f == F_SOLVENTS) && cJSON_IsArray(e)) {
			const cJSON *x;
			cJSON_ArrayForEach(x, e) {
				if (!cJSON_IsString(x) || !x->valuestring[0]) {
					row_fail(r, m->name, line, "\"%s\" must hold only non-empty strings", field_names[f]);
					goto out;
				}
				if (row_set(r, f, x->valuestring, strlen(x->valuestring)))
					goto nomem;
			}
			continue;
		}
		if (!cJSON_IsString(e)) {
			row_fail(r, m->name, line, (f == F_SM || f == F_REAGENTS || f == F_SOLVENTS)
			         ? "\"%s\" must be an array of strings" : "\"%s\" must be a string", field_names[f]);
			break;
		}
		if (row_set(r, f, e->valuestring, strlen(e->valuestring)))
			goto nomem;
	}
out:
	cJSON_Delete(root);
	return IRR_OK;
nomem:
	cJSON_Delete(root);
	return IRR_ENOMEM;
}

static int read_jsonl(irr_manifest *m, const char *d, size_t len, irr_error *err)
{
	size_t pos = 0;
	long line = 1;
	while (pos < len) {
		size_t end = skip_line(d, len, pos);
		row *r;
		if (line_is_blank_or_comment(d, len, pos)) {
			pos = end;
			line++;
			continue;
		}
		if (!(r = new_row(m, line)) || jsonl_row(m, r, d + pos, end - pos, line) != IRR_OK)
			return irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
		row_publish(r);
		pos = end;
		line++;
	}
	return IRR_OK;
}

/* ---- Reading -------------------------------------------------------------- */

static irr_manifest_format detect(const char *name, const char *d, size_t len)
{
	const char *dot = name ? strrchr(name, '.') : NULL;
	size_t p = 0;
	if (dot && !strchr(dot, '/')) {
		if (!strcasecmp(dot, ".csv"))
			return IRR_MANIFEST_CSV;
		if (!strcasecmp(dot, ".jsonl") || !strcasecmp(dot, ".ndjson") || !strcasecmp(dot, ".json"))
			return IRR_MANIFEST_JSONL;
	}
	while (p < len) {
		if (line_is_blank_or_comment(d, len, p)) {
			p = skip_line(d, len, p);
			continue;
		}
		while (d[p] == ' ' || d[p] == '\t')
			p++;
		return d[p] == '{' ? IRR_MANIFEST_JSONL : IRR_MANIFEST_CSV;
	}
	return IRR_MANIFEST_CSV;
}

int irr_manifest_read_memory(irr_manifest **out, const char *data, size_t len,
                             const char *name, const char *base_dir,
                             irr_manifest_format format, irr_error *err)
{
	irr_manifest *m;
	int rc;
	*out = NULL;
	if (!name)
		name = "<manifest>";
	{
		const char *nul = memchr(data, '\0', len);
		if (nul) {
			long line = 1;
			for (const char *p = data; p < nul; p++)
				line += *p == '\n';
			return irr_error_set(err, IRR_EINPUT, name, line, "binary data (a NUL byte): not a CSV or JSON Lines manifest");
		}
	}
	/* A UTF-8 byte order mark, as spreadsheet programs write it. */
	if (len >= 3 && !memcmp(data, "\xEF\xBB\xBF", 3))
		data += 3, len -= 3;
	if (len >= 2 && ((unsigned char)data[0] == 0xFF || (unsigned char)data[0] == 0xFE))
		return irr_error_set(err, IRR_EINPUT, name, 1, "UTF-16 text: save the manifest as UTF-8");
	m = calloc(1, sizeof *m);
	if (!m || !(m->name = dup_s(name)) || !(m->base_dir = dup_s(base_dir ? base_dir : "."))) {
		irr_manifest_free(m);
		return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	m->base_real = realpath(m->base_dir, NULL);
	m->memo = calloc(1, sizeof *m->memo); /* optional: without it every path is resolved whole */
	m->format = format == IRR_MANIFEST_AUTO ? detect(name, data, len) : format;
	rc = m->format == IRR_MANIFEST_JSONL ? read_jsonl(m, data, len, err) : read_csv(m, data, len, err);
	if (rc == IRR_OK && m->n == 0)
		rc = irr_error_set(err, IRR_EINPUT, name, 0, "no samples in the manifest");
	if (rc != IRR_OK) {
		irr_manifest_free(m);
		return rc;
	}
	*out = m;
	return IRR_OK;
}

int irr_manifest_read_file(irr_manifest **out, const char *path,
                           irr_manifest_format format, size_t max_bytes,
                           irr_error *err)
{
	char *data, *dir;
	size_t len;
	int rc;
	*out = NULL;
	rc = irr_request__slurp(&data, &len, path, max_bytes ? max_bytes : MANIFEST_MAX_BYTES, err);
	if (rc != IRR_OK)
		return rc;
	if (irr_request__dirname(&dir, path) != IRR_OK) {
		free(data);
		return irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
	}
	rc = irr_manifest_read_memory(out, data, len, path, dir, format, err);
	free(data);
	free(dir);
	return rc;
}

size_t irr_manifest_count(const irr_manifest *m) { return m ? m->n : 0; }
const irr_manifest_sample *irr_manifest_get(const irr_manifest *m, size_t i)
{
	return m && i < m->n ? &m->rows[i].pub : NULL;
}
const char *irr_manifest_name(const irr_manifest *m) { return m->name; }
const char *irr_manifest_base_dir(const irr_manifest *m) { return m->base_dir; }
irr_manifest_format irr_manifest_detected_format(const irr_manifest *m) { return m->format; }

/* ---- Paths ---------------------------------------------------------------- */

static int has_dotdot(const char *p)
{
	while (*p) {
		const char *e = strchr(p, '/');
		size_t n = e ? (size_t)(e - p) : strlen(p);
		if (n == 2 && p[0] == '.' && p[1] == '.')
			return 1;
		if (!e)
			break;
		p = e + 1;
	}
	return 0;
}

static int under_base(const irr_manifest *m, const char *real)
{
	size_t bl = strlen(m->base_real);
	return !strncmp(real, m->base_real, bl) &&
	       (real[bl] == '/' || (bl == 1 && m->base_real[0] == '/'));
}

/* Whether file d resolves to a place inside the manifest's folder; 1 when it
 * cannot be resolved (missing: the reader reports it). A file that is not
 * itself a link lies where its folder lies, and the folder's answer is
 * remembered from the row before. */
static int path_inside(const irr_manifest *m, const char *d)
{
	const char *slash = strrchr(d, '/');
	struct stat st;
	if (m->memo && slash && slash > d && lstat(d, &st) == 0 && !S_ISLNK(st.st_mode)) {
		size_t dl = (size_t)(slash - d);
		dir_memo *mm = m->memo;
		if (!mm->dir || strlen(mm->dir) != dl || memcmp(mm->dir, d, dl)) {
			char *dir = dup_n(d, dl), *real = dir ? realpath(dir, NULL) : NULL;
			free(mm->dir);
			mm->dir = dir;
			mm->inside = !real ? -1 : !strcmp(real, m->base_real) || under_base(m, real);
			free(real);
		}
		if (mm->inside >= 0)
			return mm->inside;
	}
	char *real = realpath(d, NULL);
	int inside = !real || under_base(m, real);
	free(real);
	return inside;
}

int irr_manifest_resolve_path(char **out, const irr_manifest *m, long line,
                              const char *path, int allow_outside,
                              irr_error *err)
{
	size_t nb, np;
	char *d;
	*out = NULL;
	if (!path || !*path)
		return irr_error_set(err, IRR_EINPUT, m->name, line, "empty file name");
	if (!allow_outside && path[0] == '/')
		return irr_error_set(err, IRR_EINPUT, m->name, line,
		                     "absolute path '%s' refused: files must lie inside the manifest's folder (--allow-outside permits it)", path);
	if (!allow_outside && has_dotdot(path))
		return irr_error_set(err, IRR_EINPUT, m->name, line,
		                     "path '%s' refused: '..' leaves the manifest's folder (--allow-outside permits it)", path);
	np = strlen(path);
	if (path[0] == '/' || !strcmp(m->base_dir, ".")) {
		d = dup_s(path);
	} else {
		nb = strlen(m->base_dir);
		d = malloc(nb + np + 2);
		if (d) {
			memcpy(d, m->base_dir, nb);
			d[nb] = '/';
			memcpy(d + nb + 1, path, np + 1);
		}
	}
	if (!d)
		return irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
	/* A symbolic link inside the folder may still point out of it. Files
	 * that do not exist are left to the reader, which names them. */
	if (!allow_outside && m->base_real && !path_inside(m, d)) {
		free(d);
		return irr_error_set(err, IRR_EINPUT, m->name, line,
		                     "path '%s' refused: a symbolic link leads outside the manifest's folder (--allow-outside permits it)", path);
	}
	*out = d;
	return IRR_OK;
}

/* ---- Rows into requests --------------------------------------------------- */

int irr_manifest_sample_request(irr_request **out, const irr_manifest *m,
                                size_t i, const irr_request *base,
                                int allow_outside, irr_error *err)
{
	const irr_manifest_sample *s = irr_manifest_get(m, i);
	irr_request *r = NULL;
	char *path = NULL;
	int rc;
	*out = NULL;
	if (!s)
		return irr_error_set(err, IRR_EINPUT, m->name, 0, "no sample %zu", i);
	if (s->failed && !s->error)
		return irr_error_set(err, IRR_ENOMEM, m->name, s->line, "out of memory");
	if (s->failed) {
		if (err)
			*err = *s->error;
		return s->error->code ? s->error->code : IRR_EINPUT;
	}
	if (!s->structure)
		return irr_error_set(err, IRR_EINPUT, m->name, s->line, "no structure given for this sample");
	if (s->spectrum && s->peaks)
		return irr_error_set(err, IRR_EINPUT, m->name, s->line, "give a spectrum or a peak list, not both");
	if (!s->spectrum && !s->peaks)
		return irr_error_set(err, IRR_EINPUT, m->name, s->line, "no spectrum or peak list given for this sample");
	rc = base ? irr_request_clone(&r, base, err) : irr_request_create(&r, err);
	if (rc != IRR_OK)
		return rc;
	/* Paths come resolved, so the request needs no folder of its own. */
	if (irr_request_set_base_dir(r, NULL) || irr_request__set_name(r, m->name) ||
	    irr_request_set_sample(r, s->sample) || irr_request_set_structure(r, s->structure))
		goto nomem;
	if ((rc = irr_manifest_resolve_path(&path, m, s->line, s->spectrum ? s->spectrum : s->peaks,
	                                    allow_outside, err)) != IRR_OK)
		goto fail;
	if ((s->spectrum ? irr_request_set_spectrum_file(r, path) : irr_request_set_peaks_file(r, path)))
		goto nomem;
	for (size_t k = 0; k < s->n_starting_materials; k++)
		if (irr_request_add_starting_material(r, s->starting_materials[k]))
			goto nomem;
	for (size_t k = 0; k < s->n_reagents; k++)
		if (irr_request_add_reagent(r, s->reagents[k]))
			goto nomem;
	for (size_t k = 0; k < s->n_solvents; k++)
		if (irr_request_add_solvent(r, s->solvents[k]))
			goto nomem;
	if (s->phase) {
		irr_phase ph;
		if (irr_phase_parse(s->phase, &ph) != IRR_OK) {
			rc = irr_error_set(err, IRR_EINPUT, m->name, s->line, "unknown phase '%s' (condensed, solution, gas)", s->phase);
			goto fail;
		}
		irr_request_set_phase(r, ph);
	}
	if (s->sampling) {
		irr_sampling sa;
		if (irr_sampling_parse(s->sampling, &sa) != IRR_OK) {
			rc = irr_error_set(err, IRR_EINPUT, m->name, s->line, "unknown sampling '%s' (atr, transmission)", s->sampling);
			goto fail;
		}
		irr_request_set_sampling(r, sa);
	}
	free(path);
	*out = r;
	return IRR_OK;
nomem:
	rc = irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
fail:
	free(path);
	irr_request_free(r);
	return rc;
}

/* ---- One row run into one JSON line ------------------------------------- */

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int irr_batch_run_sample(char **json_out, irr_verdict *verdict,
                         const irr_manifest *m, size_t i,
                         const irr_request *base, const irr_tables *t,
                         int allow_outside, irr_batch_timing *timing,
                         irr_error *err)
{
	const irr_manifest_sample *s = irr_manifest_get(m, i);
	irr_request *r = NULL;
	irr_check *c = NULL;
	double t0 = 0, t1 = 0, read_s = 0;
	int rc;
	*json_out = NULL;
	if ((rc = irr_manifest_sample_request(&r, m, i, base, allow_outside, err)) != IRR_OK)
		goto done;
	if (timing)
		t0 = now_s();
	rc = irr_request__run_timed(&c, r, t, &read_s, err);
	if (rc != IRR_OK) {
		/* Errors without a line that are not about the input file (a bad
		 * SMILES of the product or of a starting material) are in this
		 * row of the manifest: name it and its line. */
		const char *in = irr_request_spectrum_file(r) ? irr_request_spectrum_file(r)
		                                              : irr_request_peaks_file(r);
		if (err && s && err->line == 0 && (!in || strcmp(err->file, in))) {
			if (err->file[0] && strcmp(err->file, m->name)) {
				char msg[sizeof err->file + sizeof err->message + 4];
				snprintf(msg, sizeof msg, "%s: %s", err->file, err->message);
				snprintf(err->message, sizeof err->message, "%.*s",
				         (int)sizeof err->message - 1, msg);
			}
			snprintf(err->file, sizeof err->file, "%s", m->name);
			err->line = s->line;
		}
		goto done;
	}
	if (timing)
		t1 = now_s();
	if (irr_report__json_line(json_out, c) != IRR_OK) {
		rc = irr_error_set(err, IRR_ENOMEM, m->name, 0, "out of memory");
		goto done;
	}
	if (verdict)
		*verdict = irr_check_verdict(c);
	if (timing) {
		irr_check_timing ct;
		double t2 = now_s();
		irr_check_get_timing(c, &ct);
		timing->read += read_s;
		timing->peaks += ct.peaks;
		timing->perceive += ct.perceive;
		timing->predict += ct.predict;
		timing->reconcile += ct.reconcile;
		timing->write += t2 - t1;
		timing->total += t2 - t0;
		timing->samples++;
	}
done:
	irr_check_free(c);
	irr_request_free(r);
	return rc;
}

int irr_batch_error_record(char **out, const irr_manifest *m, size_t i,
                           const irr_error *e)
{
	const irr_manifest_sample *s = irr_manifest_get(m, i);
	cJSON *o = cJSON_CreateObject(), *er;
	*out = NULL;
	if (!o)
		return IRR_ENOMEM;
	cJSON_AddStringToObject(o, "schema", IRR_BATCH_ERROR_SCHEMA);
	if (s && s->sample)
		cJSON_AddStringToObject(o, "sample", s->sample);
	else
		cJSON_AddNullToObject(o, "sample");
	cJSON_AddStringToObject(o, "manifest", m->name);
	cJSON_AddNumberToObject(o, "manifest_line", s ? (double)s->line : 0);
	er = cJSON_AddObjectToObject(o, "error");
	if (er) {
		cJSON_AddStringToObject(er, "message", e->message);
		if (e->file[0])
			cJSON_AddStringToObject(er, "file", e->file);
		else
			cJSON_AddNullToObject(er, "file");
		if (e->line > 0)
			cJSON_AddNumberToObject(er, "line", (double)e->line);
		else
			cJSON_AddNullToObject(er, "line");
	}
	*out = cJSON_PrintUnformatted(o);
	cJSON_Delete(o);
	return *out ? IRR_OK : IRR_ENOMEM;
}
