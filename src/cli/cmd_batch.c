/* cmd_batch.c: `irrecon batch MANIFEST`: checks every sample of a manifest
 * and writes one JSON line per sample, in manifest order, with a summary on
 * stderr. Parallel runs use worker processes (Open Babel keeps global
 * state and is not thread-safe); each worker takes every N-th sample and
 * streams its lines back through a pipe, and the parent merges them in
 * order, so the output does not depend on the number of jobs. */
#include <errno.h>
#include <poll.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "cli/cli.h"
#include "cli/cmd_check.h"
#include "irrecon/batch.h"
#include "irrecon/common.h"
#include "irrecon/reconcile.h"
#include "irrecon/request.h"
#include "irrecon/tables.h"

static const cli_opt opts[] = {
	{"--out", "FILE", "write the JSON lines to FILE (replaced atomically at the end)\n"
	                  "instead of stdout; --output is the same"},
	{"--jobs", "N", "run N worker processes (default 1)"},
	{"--shard", "K/N", "check only samples K, K+N, K+2N, ... (1 <= K <= N)"},
	{"--format", "FMT", "manifest format: csv or jsonl (default: from the extension\n"
	                    "or the content)"},
	{"--allow-outside", NULL, "accept absolute paths, '..' and links leading out of the\n"
	                          "manifest's folder"},
	{"--phase", "PHASE", "default for rows without one: condensed, solution, gas"},
	{"--sampling", "MODE", "default for rows without one: atr, transmission"},
	{"--tables", "DIR", "group-frequency tables folder (default: $IRRECON_TABLES,\n"
	                    "else the installed tables)"},
	{"--add-table", "FILE", "an extra group table; repeatable"},
	{"--max-bytes", "N", "refuse input files larger than N bytes (default 256 MiB)"},
	{"--max-points", "N", "refuse spectra of more than N points (default 1,000,000)"},
	{"--timing", NULL, "print the time spent per stage on stderr"},
	{"--no-cache", NULL, "read and perceive every row's structures anew, even\n"
	                     "when an earlier row had the same SMILES (same results)"},
	{"--quiet", NULL, "no progress bar and no summary"},
	{"--help", NULL, "show this help"},
	{NULL, NULL, NULL}
};

static void help(void)
{
	printf("usage: irrecon batch MANIFEST [OPTIONS]\n\n"
	       "Checks every sample of a manifest, as `irrecon check --json` would, and\n"
	       "writes one JSON line per sample in manifest order (schema irrecon.check/1;\n"
	       "a sample that cannot be checked gives an irrecon.error/1 line and the\n"
	       "batch goes on). A summary goes to stderr, with a progress bar when stderr\n"
	       "is a terminal.\n\n"
	       "The manifest is CSV with a header row, or JSON Lines (one object a line),\n"
	       "with the fields sample, structure (SMILES), spectrum or peaks (a file),\n"
	       "starting_materials, reagents, solvents (JSON arrays, or ';'-separated in\n"
	       "CSV), phase, sampling. Lines starting with '#' are comments. Files are\n"
	       "relative to the manifest's folder and must stay inside it unless\n"
	       "--allow-outside is given.\n\n"
	       "Options:\n");
	cli_opt_help(opts, 20);
	printf("\nShards: `--shard K/N` on N machines; merge the outputs in manifest order\n"
	       "with  paste -d '\\n' out.1 out.2 ... out.N | sed '/^$/d'\n\n"
	       "Exit status: 0 every sample consistent, 1 some sample not consistent,\n"
	       "2 some sample could not be checked (or the batch could not run).\n"
	       "A verdict is evidence, never proof of identity or purity.\n");
}

static const char *const aliases[] = {"--output", "--out", NULL};

/* ---- Output: stdout, or a temporary file renamed at the end ---------------- */

static char *tmp_path;           /* the temporary output while it exists */
/* The samples to run. File-level so that worker processes, which end with
 * _exit() in the middle of cmd_batch, still hold it (no leak reports). */
static size_t *volatile selection;

static void on_signal(int sig)
{
	/* unlink is async-signal-safe: an interrupted run leaves no half file. */
	if (tmp_path)
		unlink(tmp_path);
	signal(sig, SIG_DFL);
	raise(sig);
}

static void catch_signals(void (*fn)(int))
{
	signal(SIGINT, fn);
	signal(SIGTERM, fn);
	signal(SIGHUP, fn);
}

#define OUTPUT_BUFFER ((size_t)1 << 18)

typedef struct output {
	FILE *f;
	char *buf;         /* the stream's buffer, or NULL */
	const char *path;  /* final path, or NULL for stdout */
	int failed;
	int err_no;
} output;

static int output_open(output *o, const char *path, irr_error *err)
{
	int fd;
	memset(o, 0, sizeof *o);
	if (!path || !strcmp(path, "-")) {
		o->f = stdout;
		return IRR_OK;
	}
	catch_signals(on_signal);
	if ((fd = cli_temp_beside(path, &tmp_path, err)) < 0)
		return err->code;
	o->f = fdopen(fd, "wb");
	if (!o->f) {
		close(fd);
		unlink(tmp_path);
		return irr_error_set(err, IRR_EIO, path, 0, "cannot write: %s", strerror(errno));
	}
	/* Results run to some 15 kB a sample: a large buffer writes them in a
	 * few hundred calls instead of thousands (glibc sizes its own buffer
	 * by the file's block, whatever size setvbuf asks with no buffer). */
	if ((o->buf = malloc(OUTPUT_BUFFER)) != NULL)
		setvbuf(o->f, o->buf, _IOFBF, OUTPUT_BUFFER);
	o->path = path;
	return IRR_OK;
}

static void output_line(output *o, const char *line, size_t len)
{
	if (o->failed)
		return;
	if (fwrite(line, 1, len, o->f) != len || putc('\n', o->f) == EOF) {
		o->failed = 1;
		o->err_no = errno;
	}
}

/* Keeps the file on success; on failure removes the temporary file so that
 * an existing output is left as it was. */
static int output_close(output *o, int ok, irr_error *err)
{
	int rc = IRR_OK;
	if (o->f == stdout) {
		if (fflush(stdout) != 0 || o->failed)
			return irr_error_set(err, IRR_EIO, "<stdout>", 0, "write failed: %s",
			                     strerror(o->failed ? o->err_no : errno));
		return IRR_OK;
	}
	if (!o->f)
		return IRR_OK;
	if (fflush(o->f) != 0 || fsync(fileno(o->f)) != 0) {
		o->failed = 1;
		o->err_no = errno;
	}
	if (fclose(o->f) != 0 && !o->failed) {
		o->failed = 1;
		o->err_no = errno;
	}
	o->f = NULL;
	free(o->buf);
	o->buf = NULL;
	if (ok && !o->failed && rename(tmp_path, o->path) != 0) {
		o->failed = 1;
		o->err_no = errno;
	}
	if (!ok || o->failed) {
		unlink(tmp_path);
		if (o->failed)
			rc = irr_error_set(err, IRR_EIO, o->path, 0, "write failed: %s", strerror(o->err_no));
	}
	free(tmp_path);
	tmp_path = NULL;
	return rc;
}

/* ---- Summary and progress --------------------------------------------------- */

enum { N_VERDICTS = 4, FAILED = N_VERDICTS };
#define LIST_MAX 20

typedef struct tally {
	size_t count[N_VERDICTS + 1];
	size_t done, total;
	size_t nfail, nnot;
	char *fail_lines[LIST_MAX];
	char *not_lines[LIST_MAX];
	double start, last_draw;
	int progress;
} tally;

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static const char *label_of(const irr_manifest_sample *s, char *buf, size_t n)
{
	if (s->sample)
		return s->sample;
	snprintf(buf, n, "(line %ld)", s->line);
	return buf;
}

static void tally_add(tally *t, const irr_manifest_sample *s, int verdict, const char *msg)
{
	char buf[64], line[1400];
	t->done++;
	if (verdict < 0) {
		t->count[FAILED]++;
		if (t->nfail < LIST_MAX) {
			snprintf(line, sizeof line, "  %-20s %s", label_of(s, buf, sizeof buf), msg ? msg : "");
			t->fail_lines[t->nfail] = strdup(line);
		}
		t->nfail++;
		return;
	}
	t->count[verdict]++;
	if (verdict != IRR_VERDICT_CONSISTENT) {
		if (t->nnot < LIST_MAX) {
			snprintf(line, sizeof line, "  %-20s %s", label_of(s, buf, sizeof buf),
			         irr_verdict_name((irr_verdict)verdict));
			t->not_lines[t->nnot] = strdup(line);
		}
		t->nnot++;
	}
}

static void draw_progress(tally *t, int final)
{
	double now = now_s(), el, rate, left;
	int width = 24, fill;
	if (!t->progress || (!final && now - t->last_draw < 0.1))
		return;
	t->last_draw = now;
	if (final) {
		fputs("\r\033[K", stderr);
		return;
	}
	el = now - t->start;
	rate = el > 0 ? (double)t->done / el : 0;
	left = rate > 0 ? (double)(t->total - t->done) / rate : 0;
	fill = t->total ? (int)((double)width * (double)t->done / (double)t->total) : width;
	fprintf(stderr, "\r[%.*s%*s] %zu/%zu  %.0f/s  %d:%02d left\033[K",
	        fill, "########################", width - fill, "", t->done, t->total,
	        rate, (int)(left / 60), (int)left % 60);
	fflush(stderr);
}

static void print_summary(const tally *t, double secs, int jobs)
{
	static const char *names[N_VERDICTS + 1] = {
		"consistent", "consistent_impure", "inconsistent", "inconclusive", "failed"};
	fprintf(stderr, "irrecon batch: %zu samples in %.2f s (%.0f per second, %d job%s)\n",
	        t->done, secs, secs > 0 ? (double)t->done / secs : 0.0, jobs, jobs == 1 ? "" : "s");
	for (int v = 0; v <= N_VERDICTS; v++)
		fprintf(stderr, "  %-20s %8zu\n", names[v], t->count[v]);
	if (t->nfail) {
		fprintf(stderr, "could not be checked:\n");
		for (size_t i = 0; i < t->nfail && i < LIST_MAX; i++)
			fprintf(stderr, "%s\n", t->fail_lines[i]);
		if (t->nfail > LIST_MAX)
			fprintf(stderr, "  ... and %zu more (see the irrecon.error/1 lines)\n", t->nfail - LIST_MAX);
	}
	if (t->nnot) {
		fprintf(stderr, "not consistent:\n");
		for (size_t i = 0; i < t->nnot && i < LIST_MAX; i++)
			fprintf(stderr, "%s\n", t->not_lines[i]);
		if (t->nnot > LIST_MAX)
			fprintf(stderr, "  ... and %zu more\n", t->nnot - LIST_MAX);
	}
}

/* Peak resident memory of this process in KiB: VmHWM, which counts only
 * this program (getrusage's ru_maxrss also counts what the parent had
 * before exec), else ru_maxrss; 0 when neither is known. */
static long peak_memory_kib(void)
{
	FILE *f = fopen("/proc/self/status", "r");
	char line[256];
	long kib = 0;
	if (f) {
		while (fgets(line, sizeof line, f))
			if (!strncmp(line, "VmHWM:", 6)) {
				kib = strtol(line + 6, NULL, 10);
				break;
			}
		fclose(f);
	}
	if (!kib) {
		struct rusage ru;
		if (getrusage(RUSAGE_SELF, &ru) == 0)
			kib = ru.ru_maxrss;
	}
	return kib;
}

static void print_timing(const irr_batch_timing *tm)
{
	double n = tm->samples ? (double)tm->samples : 1;
	fprintf(stderr, "irrecon batch: time per sample (ms), %zu samples checked in this process:\n"
	                "  read %.4f  peaks %.4f  perceive %.4f  predict %.4f  reconcile %.4f  write %.4f  total %.4f\n",
	        tm->samples, 1e3 * tm->read / n, 1e3 * tm->peaks / n, 1e3 * tm->perceive / n,
	        1e3 * tm->predict / n, 1e3 * tm->reconcile / n, 1e3 * tm->write / n, 1e3 * tm->total / n);
	fprintf(stderr, "  peak memory of the parent process %.1f MB\n", (double)peak_memory_kib() / 1024.0);
}

/* ---- Running samples ------------------------------------------------------------ */

typedef struct job {
	const irr_manifest *m;
	const irr_request *base;
	const irr_tables *t;
	int allow_outside;
	irr_batch_timing *timing;
} job;

/* One sample into one line (result or error record). Returns the verdict,
 * or -1 for an error with its one-line message in msg. */
static int run_one(const job *j, size_t i, char **line, char *msg, size_t msgsize)
{
	irr_error err;
	irr_verdict v = IRR_VERDICT_INCONCLUSIVE;
	irr_error_clear(&err);
	if (irr_batch_run_sample(line, &v, j->m, i, j->base, j->t, j->allow_outside, j->timing, &err) == IRR_OK)
		return (int)v;
	irr_error_format(&err, msg, msgsize);
	if (irr_batch_error_record(line, j->m, i, &err) != IRR_OK)
		*line = NULL;
	return -1;
}

/* Frames on a worker's pipe: int32 verdict (-1 error), uint32 line length,
 * uint32 message length, then the line and the message. */
typedef struct frame_head {
	int32_t verdict;
	uint32_t len, msglen;
} frame_head;

static int write_all(int fd, const void *p, size_t n)
{
	const char *c = p;
	while (n) {
		ssize_t w = write(fd, c, n);
		if (w < 0) {
			if (errno == EINTR)
				continue;
			return -1;
		}
		c += w;
		n -= (size_t)w;
	}
	return 0;
}

static void worker(const job *j, const size_t *sel, size_t nsel, int k, int jobs, int fd)
{
	for (size_t q = (size_t)k; q < nsel; q += (size_t)jobs) {
		char *line = NULL, msg[2200] = "";
		frame_head h;
		h.verdict = run_one(j, sel[q], &line, msg, sizeof msg);
		h.len = line ? (uint32_t)strlen(line) : 0;
		h.msglen = h.verdict < 0 ? (uint32_t)strlen(msg) : 0;
		if (write_all(fd, &h, sizeof h) || write_all(fd, line ? line : "", h.len) ||
		    write_all(fd, msg, h.msglen))
			_exit(3);
		free(line);
	}
	if (j->timing) {
		/* The parent sums the workers' stage times. */
		frame_head h = {-2, (uint32_t)sizeof *j->timing, 0};
		if (write_all(fd, &h, sizeof h) || write_all(fd, j->timing, sizeof *j->timing))
			_exit(3);
	}
	_exit(0);
}

typedef struct wstate {
	pid_t pid;
	int fd;
	char *buf;
	size_t len, cap;
	int eof;
} wstate;

/* A complete frame at the head of w's buffer: its sizes, or 0. */
static int frame_ready(const wstate *w, frame_head *h)
{
	if (w->len < sizeof *h)
		return 0;
	memcpy(h, w->buf, sizeof *h);
	return w->len >= sizeof *h + h->len + h->msglen;
}

static void frame_pop(wstate *w, const frame_head *h)
{
	size_t n = sizeof *h + h->len + h->msglen;
	memmove(w->buf, w->buf + n, w->len - n);
	w->len -= n;
}

static int fill(wstate *w)
{
	ssize_t r;
	if (w->cap - w->len < 65536) {
		size_t cap = w->cap ? 2 * w->cap : 262144;
		char *b = realloc(w->buf, cap);
		if (!b)
			return -1;
		w->buf = b;
		w->cap = cap;
	}
	r = read(w->fd, w->buf + w->len, w->cap - w->len);
	if (r < 0)
		return errno == EINTR || errno == EAGAIN ? 0 : -1;
	if (r == 0)
		w->eof = 1;
	w->len += (size_t)r;
	return 0;
}

static void add_timing(irr_batch_timing *a, const irr_batch_timing *b)
{
	a->read += b->read;
	a->peaks += b->peaks;
	a->perceive += b->perceive;
	a->predict += b->predict;
	a->reconcile += b->reconcile;
	a->write += b->write;
	a->total += b->total;
	a->samples += b->samples;
}

/* Emits one sample's line and counts it. */
static void emit(output *o, tally *t, const irr_manifest *m, size_t i, int verdict,
                 const char *line, size_t len, const char *msg)
{
	output_line(o, line, len);
	tally_add(t, irr_manifest_get(m, i), verdict, msg);
	draw_progress(t, 0);
}

static int push_frame(wstate *w, int32_t verdict, const char *line, const char *msg)
{
	frame_head h = {verdict, (uint32_t)strlen(line), (uint32_t)strlen(msg)};
	size_t need = sizeof h + h.len + h.msglen;
	if (w->cap - w->len < need) {
		char *b = realloc(w->buf, w->len + need);
		if (!b)
			return -1;
		w->buf = b;
		w->cap = w->len + need;
	}
	memcpy(w->buf + w->len, &h, sizeof h);
	memcpy(w->buf + w->len + sizeof h, line, h.len);
	memcpy(w->buf + w->len + sizeof h + h.len, msg, h.msglen);
	w->len += need;
	return 0;
}

/* A worker ended before sending sample q (a crash in it, or killed): the
 * samples it still owed become error records, so the batch reports them
 * and goes on in order. */
static int synthesize_failures(const job *j, wstate *w, const size_t *sel,
                               size_t nsel, size_t q, size_t jobs)
{
	int st = 0;
	char why[200];
	w->len = 0; /* a partial frame, if any, is lost with the worker */
	if (w->pid > 0 && waitpid(w->pid, &st, 0) > 0) {
		if (WIFSIGNALED(st))
			snprintf(why, sizeof why, "the worker process checking this sample was ended by signal %d", WTERMSIG(st));
		else
			snprintf(why, sizeof why, "the worker process checking this sample ended early (status %d)", WEXITSTATUS(st));
	} else {
		snprintf(why, sizeof why, "the worker process checking this sample ended early");
	}
	w->pid = 0;
	for (size_t r = q; r < nsel; r += jobs) {
		irr_error err;
		char *line = NULL;
		irr_error_set(&err, IRR_ERROR, irr_manifest_name(j->m),
		              irr_manifest_get(j->m, sel[r])->line, "%s", why);
		if (irr_batch_error_record(&line, j->m, sel[r], &err) != IRR_OK)
			return -1;
		if (push_frame(w, -1, line, err.message) != 0) {
			free(line);
			return -1;
		}
		free(line);
		snprintf(why, sizeof why, "not run: the worker process for this sample ended early");
	}
	return 0;
}

static int run_parallel(const job *j, const size_t *sel, size_t nsel, int jobs,
                        output *o, tally *t)
{
	wstate *w = calloc((size_t)jobs, sizeof *w);
	int rc = 0;
	if (!w)
		return -1;
	fflush(NULL);
	for (int k = 0; k < jobs; k++) {
		int p[2];
		if (pipe(p) != 0) {
			rc = -1;
			jobs = k;
			break;
		}
		w[k].pid = fork();
		if (w[k].pid < 0) {
			close(p[0]);
			close(p[1]);
			rc = -1;
			jobs = k;
			break;
		}
		if (w[k].pid == 0) {
			/* The worker: no output file of its own (the parent's
			 * temporary name stays with the parent), default signals. */
			catch_signals(SIG_DFL);
			close(p[0]);
			for (int q = 0; q < k; q++)
				close(w[q].fd);
			worker(j, sel, nsel, k, jobs, p[1]);
		}
		close(p[1]);
		w[k].fd = p[0];
	}
	for (size_t q = 0; rc == 0 && q < nsel; q++) {
		wstate *ws = &w[q % (size_t)jobs];
		frame_head h;
		while (!frame_ready(ws, &h)) {
			struct pollfd pf[64];
			int np = 0;
			if (ws->eof) {
				if (synthesize_failures(j, ws, sel, nsel, q, (size_t)jobs) != 0) {
					rc = -1;
					break;
				}
				continue;
			}
			/* Read from every live worker so none blocks on a full pipe. */
			for (int k = 0; k < jobs && np < 64; k++)
				if (!w[k].eof) {
					pf[np].fd = w[k].fd;
					pf[np].events = POLLIN;
					np++;
				}
			if (poll(pf, (nfds_t)np, -1) < 0) {
				if (errno == EINTR)
					continue;
				rc = -1;
				break;
			}
			for (int x = 0; x < np; x++)
				if (pf[x].revents)
					for (int k = 0; k < jobs; k++)
						if (w[k].fd == pf[x].fd && !w[k].eof && fill(&w[k]) != 0)
							rc = -1;
			if (rc)
				break;
		}
		if (rc)
			break;
		{
			/* The message follows the line in the buffer. */
			char msg[2200];
			size_t ml = h.msglen < sizeof msg - 1 ? h.msglen : sizeof msg - 1;
			memcpy(msg, ws->buf + sizeof h + h.len, ml);
			msg[ml] = '\0';
			emit(o, t, j->m, sel[q], h.verdict, ws->buf + sizeof h, h.len, msg);
			frame_pop(ws, &h);
		}
	}
	/* Collect the stage times and reap the workers. */
	for (int k = 0; k < jobs; k++) {
		while (rc == 0 && !w[k].eof) {
			if (fill(&w[k]) != 0)
				break;
		}
		{
			frame_head h;
			while (frame_ready(&w[k], &h)) {
				if (h.verdict == -2 && h.len == sizeof(irr_batch_timing) && j->timing) {
					irr_batch_timing tm;
					memcpy(&tm, w[k].buf + sizeof h, sizeof tm);
					add_timing(j->timing, &tm);
				}
				frame_pop(&w[k], &h);
			}
		}
		close(w[k].fd);
		if (w[k].pid > 0) {
			if (rc)
				kill(w[k].pid, SIGTERM);
			waitpid(w[k].pid, NULL, 0);
		}
		free(w[k].buf);
	}
	free(w);
	return rc;
}

static int parse_shard(const char *s, long *k, long *n)
{
	char *e;
	*k = strtol(s, &e, 10);
	if (e == s || *e != '/')
		return -1;
	s = e + 1;
	*n = strtol(s, &e, 10);
	if (e == s || *e || *n < 1 || *k < 1 || *k > *n || *n > 1000000)
		return -1;
	return 0;
}

int cmd_batch(int argc, char **argv)
{
	const char *manifest_path = NULL, *out_path = NULL, *tables_dir = NULL;
	const char **extra = NULL;
	size_t nextra = 0, *sel = NULL, nsel = 0;
	long jobs = 1, shard_k = 1, shard_n = 1;
	int allow_outside = 0, want_timing = 0, quiet = 0, no_cache = 0, status = CLI_ERROR;
	irr_manifest_format fmt = IRR_MANIFEST_AUTO;
	irr_manifest *m = NULL;
	irr_tables *t = NULL;
	irr_request *base = NULL;
	irr_solvent_library *solvents = NULL;
	irr_structure_cache *structures = NULL;
	irr_batch_timing timing;
	irr_error err;
	output o;
	tally tl;
	job j;
	double start;

	memset(&o, 0, sizeof o);
	memset(&tl, 0, sizeof tl);
	memset(&timing, 0, sizeof timing);
	irr_error_clear(&err);
	if (irr_request_create(&base, &err) != IRR_OK)
		return cli_fail(&err);
	extra = calloc((size_t)argc, sizeof *extra);
	if (!extra) {
		irr_request_free(base);
		return cli_usage_error("batch", "out of memory");
	}
	cli_args args = {"batch", opts, argc, argv, 1,
	                 CLI_ARGS_OPERANDS | CLI_ARGS_DASH_H | CLI_ARGS_NEEDS_VALUE, aliases};
	const cli_opt *d;
	const char *v;
	int next;
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		const char *a = d ? d->name : "";
		if (next == CLI_ERROR) {
			status = CLI_ERROR;
			goto done;
		}
		if (!d) {
			if (manifest_path) {
				status = cli_usage_error("batch", "one MANIFEST only ('%s' and '%s')", manifest_path, v);
				goto done;
			}
			manifest_path = v;
		} else if (!strcmp(a, "--help")) {
			help();
			status = CLI_OK;
			goto done;
		} else if (!strcmp(a, "--out")) {
			out_path = v;
		} else if (!strcmp(a, "--jobs")) {
			char *e;
			jobs = strtol(v, &e, 10);
			if (e == v || *e || jobs < 1 || jobs > 64) {
				status = cli_usage_error("batch", "--jobs needs a whole number from 1 to 64, not '%s'", v);
				goto done;
			}
		} else if (!strcmp(a, "--shard")) {
			if (parse_shard(v, &shard_k, &shard_n) != 0) {
				status = cli_usage_error("batch", "--shard needs K/N with 1 <= K <= N, not '%s'", v);
				goto done;
			}
		} else if (!strcmp(a, "--format")) {
			if (!strcmp(v, "csv"))
				fmt = IRR_MANIFEST_CSV;
			else if (!strcmp(v, "jsonl"))
				fmt = IRR_MANIFEST_JSONL;
			else {
				status = cli_usage_error("batch", "--format is csv or jsonl, not '%s'", v);
				goto done;
			}
		} else if (!strcmp(a, "--max-bytes") || !strcmp(a, "--max-points")) {
			if (cli_count_option("batch", a, v, irr_request_read_options(base))) {
				status = CLI_ERROR;
				goto done;
			}
		} else if (!strcmp(a, "--allow-outside")) {
			allow_outside = 1;
		} else if (!strcmp(a, "--phase")) {
			irr_phase p;
			if (irr_phase_parse(v, &p) != IRR_OK) {
				status = cli_usage_error("batch", "--phase is condensed, solution or gas, not '%s'", v);
				goto done;
			}
			irr_request_set_phase(base, p);
		} else if (!strcmp(a, "--sampling")) {
			irr_sampling s;
			if (irr_sampling_parse(v, &s) != IRR_OK) {
				status = cli_usage_error("batch", "--sampling is atr or transmission, not '%s'", v);
				goto done;
			}
			irr_request_set_sampling(base, s);
		} else if (!strcmp(a, "--tables")) {
			tables_dir = v;
		} else if (!strcmp(a, "--add-table")) {
			extra[nextra++] = v;
		} else if (!strcmp(a, "--timing")) {
			want_timing = 1;
		} else if (!strcmp(a, "--no-cache")) {
			no_cache = 1;
		} else if (!strcmp(a, "--quiet")) {
			quiet = 1;
		}
	}
	if (!manifest_path) {
		status = cli_usage_error("batch", "no MANIFEST given");
		goto done;
	}
	/* One solvent library for every sample, as checks would load it. */
	if (irr_manifest_read_file(&m, manifest_path, fmt, 0, &err) != IRR_OK ||
	    irr_tables_load(&t, tables_dir, extra, nextra, &err) != IRR_OK ||
	    irr_solvents_load(&solvents, NULL, &err) != IRR_OK ||
	    (!no_cache && irr_structure_cache_create(&structures, t, 0, &err) != IRR_OK)) {
		status = cli_fail(&err);
		goto done;
	}
	irr_request_use_solvents(base, solvents);
	/* Each worker process fills its own copy: no sharing between them. */
	irr_request_use_structure_cache(base, structures);
	sel = selection = malloc((irr_manifest_count(m) + 1) * sizeof *sel);
	if (!sel) {
		status = cli_usage_error("batch", "out of memory");
		goto done;
	}
	for (size_t i = 0; i < irr_manifest_count(m); i++)
		if ((long)(i % (size_t)shard_n) == shard_k - 1)
			sel[nsel++] = i;
	if (jobs > (long)nsel)
		jobs = nsel ? (long)nsel : 1;

	if (output_open(&o, out_path, &err) != IRR_OK) {
		status = cli_fail(&err);
		goto done;
	}
	j.m = m;
	j.base = base;
	j.t = t;
	j.allow_outside = allow_outside;
	j.timing = want_timing ? &timing : NULL;
	tl.total = nsel;
	tl.progress = !quiet && isatty(STDERR_FILENO);
	start = tl.start = now_s();

	if (jobs == 1) {
		for (size_t q = 0; q < nsel; q++) {
			char *line = NULL, msg[2200] = "";
			int verdict = run_one(&j, sel[q], &line, msg, sizeof msg);
			if (!line) {
				irr_error_set(&err, IRR_ENOMEM, manifest_path, 0, "out of memory");
				break;
			}
			emit(&o, &tl, m, sel[q], verdict, line, strlen(line), msg);
			free(line);
		}
	} else if (run_parallel(&j, sel, nsel, (int)jobs, &o, &tl) != 0) {
		irr_error_set(&err, IRR_ERROR, manifest_path, 0, "a worker process could not be started or read: %s", strerror(errno));
	}
	draw_progress(&tl, 1);
	if (tl.done != nsel) {
		output_close(&o, 0, NULL);
		status = cli_fail(&err);
		goto done;
	}
	if (output_close(&o, 1, &err) != IRR_OK) {
		status = cli_fail(&err);
		goto done;
	}
	if (!quiet)
		print_summary(&tl, now_s() - start, (int)jobs);
	if (want_timing)
		print_timing(&timing);
	status = tl.count[FAILED] ? CLI_ERROR
	         : tl.count[IRR_VERDICT_CONSISTENT] == tl.done ? CLI_OK : CLI_NOT_CONSISTENT;
done:
	for (size_t i = 0; i < LIST_MAX; i++) {
		free(tl.fail_lines[i]);
		free(tl.not_lines[i]);
	}
	free(sel);
	selection = NULL;
	free(extra);
	irr_request_free(base);
	irr_structure_cache_free(structures);
	irr_solvents_free(solvents);
	irr_tables_free(t);
	irr_manifest_free(m);
	return status;
}
