/*
 * cmd_correct.c - the `correct` command: parse the words, find the LJP
 * (given, or Henderson from two solutions), call correct.c, report.
 */
#include "cmd_correct.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "session.h"
#include "common.h"
#include "correct.h"
#include "fileio.h"
#include "version.h"
#include "junction.h"
#include "ljp.h"
#include "nwb.h"

#include <time.h>
#include "signals.h"
#include "render.h"

#define CONVENTION "Vm = Vrecorded - LJP"

/* Where the LJP came from. */
typedef struct ljp_src {
	corr_ljp ljp;          /* what is subtracted, exact */
	int henderson;         /* 1: computed from two solutions */
	const char *pip, *bath;
	double henderson_mV;   /* the unrounded Henderson value */
	double lo_mV, hi_mV;   /* its interval from the mobility uncertainties */
	char range[64];        /* "13.1 to 15.0 mV" (Henderson only; else "") */
} ljp_src;

/* The Henderson LJP of PIPETTE against BATH at the session temperature,
 * from total concentrations, the same way `junction` computes it. */
static int henderson(im_ctx *ctx, const char *pip, const char *bath, double *ljp_mV,
		     double *lo_mV, double *hi_mV, char *err)
{
	solution *sp, *sb;
	sol_state st[2];
	char e2[IM_ERRLEN];
	int rc;
	if (ses_solution(ctx->ses, pip, &sp, err) || ses_solution(ctx->ses, bath, &sb, err))
		return -1;
	if (sol_compute(sp, ses_env(ctx->ses), &st[0], err))
		return -1;
	if (sol_compute(sb, ses_env(ctx->ses), &st[1], err)) {
		sol_state_free(&st[0]);
		return -1;
	}
	rc = ljp_pair_mV(&st[0], &st[1], 0, ctx->ses->temp_C, ljp_mV, lo_mV, hi_mV, e2);
	if (rc)
		im_fail(err, "LJP of %s against %s: %s", pip, bath, e2);
	sol_state_free(&st[0]);
	sol_state_free(&st[1]);
	return rc;
}

static int get_ljp(im_ctx *ctx, const char *by, const char *pip, const char *bath,
		   ljp_src *src, char *err)
{
	memset(src, 0, sizeof *src);
	if (by && pip)
		return im_fail(err, "give either `by MV` or `for PIPETTE BATH`, not both");
	if (!by && !pip)
		return im_fail(err, "say which LJP to subtract: `by MV` (in mV) or"
			       " `for PIPETTE BATH` (Henderson, from two solutions)");
	if (by)
		return corr_ljp_parse(by, &src->ljp, err);
	src->henderson = 1;
	src->pip = pip;
	src->bath = bath;
	if (henderson(ctx, pip, bath, &src->henderson_mV, &src->lo_mV, &src->hi_mV, err) < 0)
		return -1;
	snprintf(src->range, sizeof src->range, "%.1f to %.1f mV", src->lo_mV, src->hi_mV);
	return corr_ljp_from_mV(src->henderson_mV, CMD_CORRECT_HENDERSON_DECIMALS,
				&src->ljp, err);
}

/* One human line saying where the LJP came from (text only). */
static void ljp_text(render *r, const ljp_src *s, double t_C)
{
	char l[32];
	corr_ljp_format(&s->ljp, l, sizeof l);
	if (s->henderson)
		render_text(r, "LJP %s mV from the Henderson equation (pipette solution %s,"
			    " bath solution %s, %.1f C, concentrations): %.3f mV, rounded to"
			    " 0.1 mV (%.1f to %.1f mV with the mobility uncertainties)", l,
			    s->pip, s->bath, t_C, s->henderson_mV, s->lo_mV, s->hi_mV);
	else
		render_text(r, "LJP %s mV, as given", l);
}

/* The same, as JSON-only fields. */
static void ljp_json(render *r, const ljp_src *s, double t_C)
{
	render_numj(r, "ljp_mV", NULL, NULL, corr_ljp_mV(&s->ljp), UNITS_SIG(6), 12);
	render_str(r, "ljp_from", NULL, s->henderson ? "henderson" : "given");
	if (s->henderson) {
		render_str(r, "pipette", NULL, s->pip);
		render_str(r, "bath", NULL, s->bath);
		render_numj(r, "temperature_C", NULL, NULL, t_C, UNITS_SIG(6), 6);
		render_numj(r, "henderson_ljp_mV", NULL, NULL, s->henderson_mV, UNITS_SIG(6), 6);
		render_range(r, "ljp_range_mV", NULL, "mV", s->lo_mV, s->hi_mV, UNITS_DEC(1));
	}
	render_str(r, "convention", NULL, CONVENTION);
}

/* Split `VALUES... by MV|for PIPETTE BATH` (from argv[2]); *nv values. */
static int values_words(int argc, char **argv, int *nv, const char **by, const char **pip,
			const char **bath, char *err)
{
	int i = 2;
	*nv = 0;
	while (i < argc && strcmp(argv[i], "by") != 0 && strcmp(argv[i], "for") != 0) {
		i++;
		(*nv)++;
	}
	if (*nv == 0)
		return im_fail(err, "give the recorded values in mV: correct value MV [MV...]"
			       " by MV|for PIPETTE BATH");
	for (; i < argc; i++) {
		if (strcmp(argv[i], "by") == 0 && i + 1 < argc && !*by) {
			*by = argv[++i];
		} else if (strcmp(argv[i], "for") == 0 && i + 2 < argc && !*pip) {
			*pip = argv[++i];
			*bath = argv[++i];
		} else if (strcmp(argv[i], "by") == 0 || strcmp(argv[i], "for") == 0) {
			if (*by || *pip)
				return im_fail(err, "give `by MV` or `for PIPETTE BATH` once");
			return im_fail(err, "`%s` needs %s", argv[i],
				       strcmp(argv[i], "by") == 0 ? "MV" : "PIPETTE BATH");
		} else {
			return im_fail(err, "unexpected '%.40s' after the values; expected"
				       " `by MV` or `for PIPETTE BATH`", argv[i]);
		}
	}
	return 0;
}

/* correct value MV [MV...] by MV|for PIPETTE BATH */
static int correct_values(im_ctx *ctx, int argc, char **argv, char *err)
{
	const char *by = NULL, *pip = NULL, *bath = NULL;
	int nv;
	ljp_src src;
	if (values_words(argc, argv, &nv, &by, &pip, &bath, err) < 0 ||
	    get_ljp(ctx, by, pip, bath, &src, err) < 0)
		return -1;
	char (*res)[256] = im_xcalloc((size_t)nv, sizeof *res);
	for (int k = 0; k < nv; k++) {
		const char *v = argv[2 + k];
		size_t len;
		char e2[IM_ERRLEN];
		int rc = strlen(v) > 64 ? -1
			: corr_cell(v, strlen(v), &src.ljp, 0, res[k], sizeof res[k], &len, e2);
		if (rc != 0) {
			if (rc == 1 || strlen(v) > 64)
				snprintf(e2, sizeof e2, "'%.40s' is not a number", v);
			free(res);
			return im_fail(err, "value %d: %s", k + 1, e2);
		}
	}
	render *r = render_new(ctx->out);
	ljp_text(r, &src, ctx->ses->temp_C);
	render_text(r, "sign: %s (LJP: the bath relative to the pipette solution)", CONVENTION);
	ljp_json(r, &src, ctx->ses->temp_C);
	render_int(r, "corrected", NULL, nv);
	render_table(r, "values", NULL);
	for (int k = 0; k < nv; k++) {
		render_row(r);
		render_numj(r, "recorded_mV", NULL, NULL, strtod(argv[2 + k], NULL), 0, 15);
		render_numj(r, "Vm_mV", NULL, NULL, strtod(res[k], NULL), 0, 15);
		render_str(r, "Vm_text", NULL, res[k]);
	}
	render_table_end(r);
	render_text(r, "  %14s  %14s", "recorded mV", "Vm mV");
	for (int k = 0; k < nv; k++)
		render_text(r, "  %14s  %14s", argv[2 + k], res[k]);
	free(res);
	return render_done(r);
}

static const char *unit_name(const corr_column *c)
{
	return c->unit_exp == -3 ? "V" : c->unit_exp == 3 ? "uV" : "mV";
}

/* The text lines of a file run. */
static void report_text(render *rd, const char *in, const char *outp, const char *note,
			const corr_result *r)
{
	/* every piece is bounded: a column name is at most CORR_NAME_MAX bytes */
	size_t cap = strlen(in) + (outp ? strlen(outp) : 0) + 64 +
		     (size_t)r->ncols * (CORR_NAME_MAX + 48);
	char *line = im_xmalloc(cap);
	size_t n = (size_t)snprintf(line, cap, "%s -> %s: corrected column%s",
				    strcmp(in, "-") ? in : "standard input",
				    outp && strcmp(outp, "-") ? outp : "standard output",
				    r->ncols == 1 ? "" : "s");
	for (int i = 0; i < r->ncols; i++) {
		const corr_column *c = &r->cols[i];
		n += (size_t)snprintf(line + n, cap - n, "%s %d%s%s%s (%s%s)", i ? "," : "",
				      c->index, c->name[0] ? " \"" : "", c->name,
				      c->name[0] ? "\"" : "", unit_name(c),
				      c->unit_assumed ? ", assumed" : "");
	}
	render_text(rd, "%s", line);
	free(line);
	render_text(rd, "%s: %s (LJP: the bath relative to the pipette solution)",
		    corr_config_name(r->config), corr_config_formula(r->config));
	if (r->meta)
		render_text(rd, "metadata lines kept before the header: %ld%s", r->meta,
			    r->comment ? ", and a comment line recording the correction" : "");
	render_text(rd, "rows %ld, corrected %ld, skipped %ld (not a number or missing %ld,"
		    " ragged rows %ld), blank lines %ld", r->rows, r->corrected, r->skipped,
		    r->bad, r->ragged, r->blank);
	render_text(rd, "%s-delimited, header row: %s%s%s", corr_delim_name(r->delim),
		    r->header ? "yes" : "no", note ? "; what was done is recorded in " : "",
		    note ? note : "");
}

/* The summary of a file run, on o (the result stream, or the error stream
 * when the data went to the result stream). */
static void report(out *o, const ljp_src *src, double t_C, const char *in,
		   const char *outp, const char *note, const corr_result *r)
{
	render *rd = render_new(o);
	ljp_text(rd, src, t_C);
	report_text(rd, in, outp, note, r);
	render_str(rd, "configuration", NULL, corr_config_name(r->config));
	render_str(rd, "formula", NULL, corr_config_formula(r->config));
	render_int(rd, "metadata_lines", NULL, r->meta);
	render_bool(rd, "comment_line", NULL, r->comment);
	render_int(rd, "rows", NULL, r->rows);
	render_int(rd, "corrected", NULL, r->corrected);
	render_int(rd, "skipped", NULL, r->skipped);
	ljp_json(rd, src, t_C);
	render_int(rd, "bad", NULL, r->bad);
	render_int(rd, "ragged_rows", NULL, r->ragged);
	render_int(rd, "blank_lines", NULL, r->blank);
	render_str(rd, "input", NULL, in);
	render_str(rd, "output", NULL, outp);
	render_str(rd, "note", NULL, note);
	render_str(rd, "delimiter", NULL, corr_delim_name(r->delim));
	render_bool(rd, "header", NULL, r->header);
	render_table(rd, "columns", NULL);
	for (int i = 0; i < r->ncols; i++) {
		render_row(rd);
		render_int(rd, "index", NULL, r->cols[i].index);
		render_str(rd, "name", NULL, r->cols[i].name[0] ? r->cols[i].name : NULL);
		render_str(rd, "unit", NULL, unit_name(&r->cols[i]));
		render_bool(rd, "unit_assumed", NULL, r->cols[i].unit_assumed);
	}
	render_table_end(rd);
	for (int i = 0; i < r->ncols; i++)
		if (r->cols[i].unit_assumed)
			render_note(rd, "column %d has no unit in its header; its values were taken"
				    " as mV", r->cols[i].index);
	render_done(rd);
}

/* ---- NWB recordings: the logic is in nwb.c ---- */

/* The date of a record, ISO 8601 UTC; SOURCE_DATE_EPOCH (the reproducible-
 * builds convention) fixes it for tests. */
static void utc_now(char *buf, size_t n)
{
	time_t t = time(NULL);
	const char *e = getenv("SOURCE_DATE_EPOCH");
	if (e && *e) {
		char *end;
		long long v = strtoll(e, &end, 10);
		if (*end == '\0' && v >= 0)
			t = (time_t)v;
	}
	struct tm tm;
	gmtime_r(&t, &tm);
	strftime(buf, n, "%Y-%m-%dT%H:%M:%SZ", &tm);
}

static int is_nwb_word(const char *w)
{
	return strcmp(w, "for") == 0 || strcmp(w, "by") == 0 || strcmp(w, "to") == 0 ||
	       strcmp(w, "again") == 0 || strcmp(w, "series") == 0;
}

/* The words of an NWB correction. */
typedef struct nwb_args {
	const char *by, *pip, *bath, *to;
	const char **names;   /* owned array, argc long */
	int nn, again;
} nwb_args;

/* by MV|for PIPETTE BATH [series NAME...] [to OUT.nwb] [again], from argv[2] */
static int nwb_words(int argc, char **argv, nwb_args *a, char *err)
{
	for (int i = 2; i < argc; i++) {
		const char *w = argv[i];
		int more = argc - 1 - i, k = 0;
		if (strcmp(w, "series") == 0) {
			while (i + 1 < argc && !is_nwb_word(argv[i + 1])) {
				a->names[a->nn++] = argv[++i];
				k++;
			}
			if (k == 0)
				return im_fail(err, "`series` needs one or more series names");
		} else if (strcmp(w, "by") == 0 && more >= 1 && !a->by) {
			a->by = argv[++i];
		} else if (strcmp(w, "for") == 0 && more >= 2 && !a->pip) {
			a->pip = argv[++i];
			a->bath = argv[++i];
		} else if (strcmp(w, "to") == 0 && more >= 1 && !a->to) {
			a->to = argv[++i];
		} else if (strcmp(w, "again") == 0) {
			a->again = 1;
		} else if (is_nwb_word(w)) {
			return im_fail(err, "`%s` given twice or without its %s", w,
				       strcmp(w, "for") == 0 ? "PIPETTE BATH" :
				       strcmp(w, "to") == 0 ? "file name" : "value");
		} else {
			return im_fail(err, "unexpected '%.40s'; expected by, for, series, to or"
				       " again", w);
		}
	}
	return 0;
}

/* What an NWB correction did, as text lines and JSON fields. */
static void nwb_render(im_ctx *ctx, const char *in, const nwb_args *a, const ljp_src *src,
		       const char *date, const nwb_result *res)
{
	const char *dest = a->to ? a->to : in;
	render *r = render_new(ctx->out);
	ljp_text(r, src, ctx->ses->temp_C);
	render_text(r, "%s -> %s: offset changed in %d series, data untouched", in, dest,
		    res->n);
	render_text(r, "sign: %s (value = data * conversion + offset)", CONVENTION);
	for (int i = 0; i < res->n; i++)
		render_text(r, "  %-24s offset %.6g -> %.6g %s%s", res->c[i].name,
			    res->c[i].old_offset, res->c[i].new_offset, res->c[i].unit,
			    res->c[i].again ? " (corrected before: again)" : "");
	render_text(r, "what was done is recorded in each series' comments");
	if (res->recovered)
		render_note(r, "%s", res->recovered);
	render_str(r, "input", NULL, in);
	render_str(r, "output", NULL, dest);
	render_bool(r, "in_place", NULL, a->to == NULL || fio_same_file(in, a->to));
	ljp_json(r, src, ctx->ses->temp_C);
	render_str(r, "date", NULL, date);
	render_table(r, "series", NULL);
	for (int i = 0; i < res->n; i++) {
		render_row(r);
		render_str(r, "name", NULL, res->c[i].name);
		render_str(r, "path", NULL, res->c[i].path);
		render_str(r, "unit", NULL, res->c[i].unit);
		render_numj(r, "old_offset", NULL, NULL, res->c[i].old_offset, 0, 12);
		render_numj(r, "new_offset", NULL, NULL, res->c[i].new_offset, 0, 12);
		render_numj(r, "offset_change", NULL, NULL, res->c[i].delta, 0, 12);
		render_bool(r, "corrected_before", NULL, res->c[i].again);
	}
	render_table_end(r);
	render_done(r);
}

/* correct FILE.nwb by MV|for PIPETTE BATH [series NAME...] [to OUT.nwb] [again] */
static int correct_nwb(im_ctx *ctx, int argc, char **argv, char *err)
{
	nwb_args a = {.names = im_xcalloc((size_t)argc, sizeof *a.names)};
	ljp_src src;
	nwb_result res;
	char ljp_text_buf[32], date[32];
	int rc = -1;
	if (nwb_words(argc, argv, &a, err) < 0 || get_ljp(ctx, a.by, a.pip, a.bath, &src, err) < 0)
		goto out;
	corr_ljp_format(&src.ljp, ljp_text_buf, sizeof ljp_text_buf);
	utc_now(date, sizeof date);
	nwb_record rec = {
		.ljp_text = ljp_text_buf,
		.ljp_mV = corr_ljp_mV(&src.ljp),
		.pipette = src.henderson ? a.pip : NULL,
		.bath = src.henderson ? a.bath : NULL,
		.has_range = src.henderson,
		.lo_mV = src.lo_mV,
		.hi_mV = src.hi_mV,
		.has_temp = src.henderson,
		.t_C = ctx->ses->temp_C,
		.model = src.henderson ? "Henderson equation from concentrations, rounded to"
					 " 0.1 mV" : "given by the user",
		.version = IONMIX_VERSION,
		.date = date,
	};
	if (nwb_correct(argv[1], a.to, a.names, a.nn, a.again, &rec, &res, err))
		goto out;
	nwb_render(ctx, argv[1], &a, &src, date, &res);
	nwb_result_free(&res);
	rc = 0;
out:
	free(a.names);
	return rc;
}

/* One series of a listing as a text line. */
static void list_line(render *r, const nwb_series *s)
{
	char off[32], corr[64];
	if (s->has_offset)
		snprintf(off, sizeof off, "%.6g", s->offset);
	else
		snprintf(off, sizeof off, "none");
	if (!nwb_kind_is_potential(s->kind))
		snprintf(corr, sizeof corr, "- (%s)", nwb_kind_what(s->kind));
	else if (s->corrections == 0)
		snprintf(corr, sizeof corr, s->has_offset ? "none" : "none (no offset: NWB before 2.5)");
	else
		snprintf(corr, sizeof corr, "%+.4g mV%s", s->last_ljp_mV,
			 s->corrections > 1 ? " (the last of several)" : "");
	render_text(r, "  %-22s %-27s %-8s %11.6g %11s  %s", s->name, s->type,
		    s->unit[0] ? s->unit : "?", s->conversion, off, corr);
}

/* One series of a listing as a JSON row. */
static void list_row(render *r, const nwb_series *s)
{
	render_row(r);
	render_str(r, "name", NULL, s->name);
	render_str(r, "path", NULL, s->path);
	render_str(r, "neurodata_type", NULL, s->type);
	render_str(r, "holds", NULL, nwb_kind_what(s->kind));
	render_bool(r, "correctable", NULL, nwb_kind_is_potential(s->kind) && s->has_offset);
	render_str(r, "unit", NULL, s->unit);
	render_numj(r, "conversion", NULL, NULL, s->conversion, 0, 12);
	if (s->has_offset)
		render_numj(r, "offset", NULL, NULL, s->offset, 0, 12);
	else
		render_null(r, "offset", NULL);
	render_int(r, "corrections", NULL, s->corrections);
	if (s->corrections)
		render_numj(r, "last_ljp_mV", NULL, NULL, s->last_ljp_mV, 0, 8);
	render_str(r, "comments", NULL, s->comments);
}

int cmd_correct_list_nwb(im_ctx *ctx, const char *path, char *err)
{
	nwb_file f;
	if (nwb_read(path, &f, err))
		return -1;
	render *r = render_new(ctx->out);
	render_text(r, "%s: NWB %s, %d patch-clamp series", path, f.version, f.n);
	if (f.n)
		render_text(r, "  %-22s %-27s %-8s %11s %11s  %s", "series", "type", "unit",
			    "conversion", "offset", "LJP correction");
	for (int i = 0; i < f.n; i++)
		list_line(r, &f.s[i]);
	if (f.recovered)
		render_note(r, "%s", f.recovered);
	render_str(r, "file", NULL, path);
	render_str(r, "nwb_version", NULL, f.version);
	render_table(r, "series", NULL);
	for (int i = 0; i < f.n; i++)
		list_row(r, &f.s[i]);
	render_table_end(r);
	render_done(r);
	nwb_file_free(&f);
	return 0;
}

/* The words of a text-file correction. */
typedef struct file_args {
	const char *by, *pip, *bath, *to;
	const char *cols[CORR_MAXCOLS];
	int ncols, skip_bad, have_cfg;
	long skip;
	corr_config cfg;
} file_args;

/* `skip N`: a count of metadata lines. */
static int skip_word(const char *n, long *skip, char *err)
{
	char *end;
	errno = 0;
	*skip = strtol(n, &end, 10);
	if (!*n || *end || errno || *skip < 0 || *skip > CMD_CORRECT_SKIP_MAX || n[0] == '+' ||
	    n[0] == ' ')
		return im_fail(err, "`skip` takes a count of lines, 0 to %d, not '%.40s'",
			       CMD_CORRECT_SKIP_MAX, n);
	return 0;
}

/* One word that takes n following words: is it there, and only once? */
static int once(const char *w, int more, int n, const char *seen, const char *what, char *err)
{
	if (more < n)
		return im_fail(err, "`%s` needs %s", w, what);
	if (seen)
		return im_fail(err, "`%s` given twice", w);
	return 0;
}

/* column N|NAME, by MV, for PIPETTE BATH, to OUT, skip N, skip-bad, a
 * configuration; from argv[2] */
static int file_words(int argc, char **argv, file_args *a, char *err)
{
	for (int i = 2; i < argc; i++) {
		const char *w = argv[i];
		int more = argc - 1 - i;
		if (strcmp(w, "column") == 0) {
			if (more < 1)
				return im_fail(err, "`column` needs a number or a header name");
			if (a->ncols == CORR_MAXCOLS)
				return im_fail(err, "more than %d columns", CORR_MAXCOLS);
			a->cols[a->ncols++] = argv[++i];
		} else if (strcmp(w, "by") == 0) {
			if (once(w, more, 1, a->by, "the LJP in mV", err) < 0)
				return -1;
			a->by = argv[++i];
		} else if (strcmp(w, "for") == 0) {
			if (once(w, more, 2, a->pip, "two solutions: PIPETTE BATH", err) < 0)
				return -1;
			a->pip = argv[++i];
			a->bath = argv[++i];
		} else if (strcmp(w, "to") == 0) {
			if (once(w, more, 1, a->to, "a file name", err) < 0)
				return -1;
			a->to = argv[++i];
		} else if (strcmp(w, "skip-bad") == 0) {
			a->skip_bad = 1;
		} else if (strcmp(w, "skip") == 0) {
			if (more < 1)
				return im_fail(err, "`skip` needs the number of metadata lines");
			if (skip_word(argv[++i], &a->skip, err) < 0)
				return -1;
		} else if (corr_config_parse(w, &a->cfg) == 0) {
			if (a->have_cfg++)
				return im_fail(err, "give one recording configuration");
		} else {
			return im_fail(err, "unexpected '%.40s'; expected column, by, for, to,"
				       " skip, skip-bad, whole-cell, outside-out, inside-out or"
				       " cell-attached", w);
		}
	}
	return 0;
}

/* Refuse to pour a large file onto a terminal (unless `to -`). */
static int tty_guard(im_ctx *ctx, const char *in, const char *to, char *err)
{
	struct stat st;
	if (to || !isatty(fileno(ctx->out->fp)))
		return 0;
	int fd = strcmp(in, "-") == 0 ? STDIN_FILENO : -1;
	int big = fd >= 0 ? fstat(fd, &st) == 0 : stat(in, &st) == 0;
	if (big && S_ISREG(st.st_mode) && st.st_size > CMD_CORRECT_TTY_MAX)
		return im_fail(err, "%s is %.1f MB, too much for the terminal: add `to OUT` to"
			       " write a file (or `to -` to print it anyway)",
			       fd >= 0 ? "standard input" : in, (double)st.st_size / 1e6);
	return 0;
}

/* Run the correction of a text file and report it. */
static int correct_text(im_ctx *ctx, const char *in, const file_args *a, const ljp_src *src,
			corr_opts *o, char *err)
{
	corr_result r;
	if (a->to && strcmp(a->to, "-") != 0) {
		if (corr_file(in, a->to, NULL, o, &r, err) < 0)
			return -1;
		char *note = NULL;
		if (r.note) {
			note = im_xmalloc(strlen(a->to) + sizeof CORR_NOTE_SUFFIX);
			sprintf(note, "%s%s", a->to, CORR_NOTE_SUFFIX);
		}
		report(ctx->out, src, ctx->ses->temp_C, in, a->to, note, &r);
		free(note);
		return 0;
	}
	if (tty_guard(ctx, in, a->to, err) < 0 || corr_file(in, NULL, ctx->out->fp, o, &r, err) < 0)
		return -1;
	/* the data went to the result stream: the summary goes beside it */
	out side = *ctx->out;
	side.fp = ctx->out->errfp;
	fflush(ctx->out->fp); /* the data first, also in a script (ctx->batch) */
	report(&side, src, ctx->ses->temp_C, in, "-", NULL, &r);
	fflush(side.fp);
	return 0;
}

int cmd_correct(im_ctx *ctx, int argc, char **argv, char *err)
{
	file_args a = {.cfg = CORR_WHOLE_CELL};
	ljp_src src;
	corr_about about = {.temperature_C = NAN};
	char date[32];
	if (argc < 2)
		return im_fail(err, "usage: correct FILE|- [column N|NAME]... by MV|for PIPETTE"
			       " BATH [to OUT|-] [skip N] [skip-bad] [whole-cell|outside-out|"
			       "inside-out|cell-attached], or correct value MV... by MV");
	if (strcmp(argv[1], "value") == 0)
		return correct_values(ctx, argc, argv, err);
	/* a Ctrl-C typed at the prompt before this command does not cancel it
	 * (the shell clears the flag before each command too; signals.h) */
	sig_clear();
	if (nwb_is_nwb(argv[1]))
		return correct_nwb(ctx, argc, argv, err);
	if (file_words(argc, argv, &a, err) < 0 || get_ljp(ctx, a.by, a.pip, a.bath, &src, err) < 0)
		return -1;
	if (src.henderson) {
		about.pipette = src.pip;
		about.bath = src.bath;
		about.model = "Henderson (concentrations), rounded to 0.1 mV";
		about.range = src.range;
		about.temperature_C = ctx->ses->temp_C;
	}
	corr_about_stamp(&about, date, sizeof date);
	corr_opts o = {
		.columns = a.cols, .ncolumns = a.ncols, .ljp = src.ljp, .skip_bad = a.skip_bad,
		.skip = a.skip, .config = a.cfg, .comment = 1, .about = &about,
	};
	return correct_text(ctx, argv[1], &a, &src, &o, err);
}
