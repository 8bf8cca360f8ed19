/* util.c: error printing, number formatting and atomic output for the
 * irrecon program. */
#include "cli/cli.h"

#include <errno.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

int cli_fail(const irr_error *err)
{
	char buf[2200];
	irr_error_format(err, buf, sizeof buf);
	fprintf(stderr, "irrecon: %s\n", buf[0] ? buf : "unknown error");
	return CLI_ERROR;
}

const char *cli_fmt(char *buf, size_t size, double v, int decimals)
{
	irr_format_double(buf, size, v, decimals);
	return buf;
}

int cli_usage_error(const char *cmd, const char *fmt, ...)
{
	va_list ap;
	fprintf(stderr, "irrecon: %s: ", cmd);
	va_start(ap, fmt);
	vfprintf(stderr, fmt, ap);
	va_end(ap);
	fprintf(stderr, " (see 'irrecon %s --help')\n", cmd);
	return CLI_ERROR;
}

int cli_temp_beside(const char *path, char **tmp, irr_error *err)
{
	size_t plen = strlen(path);
	int fd;
	if (!(*tmp = malloc(plen + 16)))
		return irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory"), -1;
	memcpy(*tmp, path, plen);
	memcpy(*tmp + plen, ".tmp.XXXXXX", 12);
	fd = mkstemp(*tmp);
	if (fd < 0) {
		int e = errno;
		char *t = *tmp;
		*tmp = NULL; /* before free: a signal handler may be reading it */
		free(t);
		return irr_error_set(err, IRR_EIO, path, 0, "cannot create a temporary file beside it: %s",
		                     strerror(e)), -1;
	}
	{
		/* mkstemp makes 0600; give the result the usual 0666 & ~umask. */
		mode_t um = umask(0);
		umask(um);
		fchmod(fd, 0666 & ~um);
	}
	return fd;
}

int cli_write_file_atomic(const char *path, const char *data, size_t len,
                          irr_error *err)
{
	char *tmp;
	FILE *f;
	int fd;
	if (!strcmp(path, "-")) {
		if (fwrite(data, 1, len, stdout) != len || fflush(stdout) != 0)
			return irr_error_set(err, IRR_EIO, "<stdout>", 0, "write failed: %s", strerror(errno));
		return IRR_OK;
	}
	if ((fd = cli_temp_beside(path, &tmp, err)) < 0)
		return err->code;
	f = fdopen(fd, "wb");
	if (!f || fwrite(data, 1, len, f) != len || fflush(f) != 0 || fsync(fd) != 0) {
		int e = errno;
		if (f)
			fclose(f);
		else
			close(fd);
		unlink(tmp);
		free(tmp);
		return irr_error_set(err, IRR_EIO, path, 0, "write failed: %s", strerror(e));
	}
	if (fclose(f) != 0 || rename(tmp, path) != 0) {
		int e = errno;
		unlink(tmp);
		free(tmp);
		return irr_error_set(err, IRR_EIO, path, 0, "cannot write: %s", strerror(e));
	}
	free(tmp);
	return IRR_OK;
}

int cli_read_structure_file(char **out, char **name, long *line_no, const char *path,
                            irr_error *err)
{
	FILE *f = fopen(path, "rb");
	char *line = NULL, *nm = NULL;
	size_t cap = 0;
	ssize_t len;
	long ln = 0;
	int rc;
	*out = NULL;
	if (name)
		*name = NULL;
	if (!f)
		return irr_error_set(err, IRR_EIO, path, 0, "cannot open: %s", strerror(errno));
	while ((len = getline(&line, &cap, f)) >= 0) {
		char *p = line, *e;
		ln++;
		/* A UTF-16 file or a binary one shows itself by NUL bytes. */
		if ((size_t)len != strlen(line)) {
			rc = irr_error_set(err, IRR_EINPUT, path, ln, "NUL byte: not a text file (UTF-16?)");
			goto done;
		}
		if (len > 65536) {
			rc = irr_error_set(err, IRR_ELIMIT, path, ln, "line longer than 64 KiB");
			goto done;
		}
		if (ln == 1 && !strncmp(p, "\xEF\xBB\xBF", 3)) /* UTF-8 byte-order mark */
			p += 3;
		p += strspn(p, " \t");
		if (!*p || *p == '\n' || *p == '\r' || *p == '#')
			continue;
		e = p + strcspn(p, " \t\r\n");
		if (name) {
			/* The rest of the line, trimmed, names the compound. */
			char *n = e + strspn(e, " \t"), *ne = n + strcspn(n, "\r\n");
			while (ne > n && (ne[-1] == ' ' || ne[-1] == '\t'))
				ne--;
			if (!(nm = strndup(n, (size_t)(ne - n)))) {
				rc = irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
				goto done;
			}
		}
		*e = '\0';
		for (char *q = p; *q; q++)
			if ((unsigned char)*q < 0x20 || (unsigned char)*q >= 0x7f) {
				rc = irr_error_set(err, IRR_EINPUT, path, ln,
				                   "not a SMILES (control or non-ASCII byte)");
				goto done;
			}
		if (!(*out = strdup(p))) {
			rc = irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
			goto done;
		}
		if (line_no)
			*line_no = ln;
		if (name)
			*name = nm, nm = NULL;
		rc = IRR_OK;
		goto done;
	}
	rc = irr_error_set(err, IRR_EINPUT, path, ln, "no SMILES in the file");
done:
	free(nm);
	free(line);
	fclose(f);
	return rc;
}
