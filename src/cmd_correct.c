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

/* One human line saying where the LJP came from. */
static void say_ljp(out *o, const ljp_src *s, double t_C)
{
	char l[32];
	corr_ljp_format(&s->ljp, l, sizeof l);
	if (s->henderson)
		out_printf(o, "LJP %s mV from the Henderson equation (pipette solution %s,"
			   " bath solution %s, %.1f C, concentrations): %.3f mV, rounded to"
			   " 0.1 mV (%.1f to %.1f mV with the mobility uncertainties)\n", l,
			   s->pip, s->bath, t_C, s->henderson_mV, s->lo_mV, s->hi_mV);
	else
		out_printf(o, "LJP %s mV, as given\n", l);
}

static void json_ljp(jw *w, const ljp_src *s, double t_C)
{
	jw_num(w, "ljp_mV", corr_ljp_mV(&s->ljp), 12);
	jw_str(w, "ljp_from", s->henderson ? "henderson" : "given");
	if (s->henderson) {
		jw_str(w, "pipette", s->pip);
		jw_str(w, "bath", s->bath);
		jw_num(w, "temperature_C", t_C, 6);
		jw_num(w, "henderson_ljp_mV", s->henderson_mV, 6);
		jw_arr(w, "ljp_range_mV");
		jw_num(w, NULL, s->lo_mV, 6);
		jw_num(w, NULL, s->hi_mV, 6);
		jw_close(w);
	}
	jw_str(w, "convention", CONVENTION);
}

/* correct value MV [MV...] by MV|for PIPETTE BATH */
static int correct_values(im_ctx *ctx, int argc, char **argv, char *err)
{
	const char *by = NULL, *pip = NULL, *bath = NULL;
	int nv = 0, i = 2;
	ljp_src src;
	while (i < argc && strcmp(argv[i], "by") != 0 && strcmp(argv[i], "for") != 0) {
		i++;
		nv++;
	}
	if (nv == 0)
		return im_fail(err, "give the recorded values in mV: correct value MV [MV...]"
			       " by MV|for PIPETTE BATH");
	for (; i < argc; i++) {
		if (strcmp(argv[i], "by") == 0 && i + 1 < argc && !by) {
			by = argv[++i];
		} else if (strcmp(argv[i], "for") == 0 && i + 2 < argc && !pip) {
			pip = argv[++i];
			bath = argv[++i];
		} else if (strcmp(argv[i], "by") == 0 || strcmp(argv[i], "for") == 0) {
			if (by || pip)
				return im_fail(err, "give `by MV` or `for PIPETTE BATH` once");
			return im_fail(err, "`%s` needs %s", argv[i],
				       strcmp(argv[i], "by") == 0 ? "MV" : "PIPETTE BATH");
		} else {
			return im_fail(err, "unexpected '%.40s' after the values; expected"
				       " `by MV` or `for PIPETTE BATH`", argv[i]);
		}
	}
	if (get_ljp(ctx, by, pip, bath, &src, err) < 0)
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
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		json_ljp(&w, &src, ctx->ses->temp_C);
		jw_int(&w, "corrected", nv);
		jw_arr(&w, "values");
		for (int k = 0; k < nv; k++) {
			jw_obj(&w, NULL);
			jw_num(&w, "recorded_mV", strtod(argv[2 + k], NULL), 15);
			jw_num(&w, "Vm_mV", strtod(res[k], NULL), 15);
			jw_str(&w, "Vm_text", res[k]);
			jw_close(&w);
		}
		jw_end(&w);
	} else {
		say_ljp(ctx->out, &src, ctx->ses->temp_C);
		out_printf(ctx->out, "sign: %s (LJP: the bath relative to the pipette"
			   " solution)\n", CONVENTION);
		out_printf(ctx->out, "  %14s  %14s\n", "recorded mV", "Vm mV");
		for (int k = 0; k < nv; k++)
			out_printf(ctx->out, "  %14s  %14s\n", argv[2 + k], res[k]);
	}
	free(res);
	return 0;
}

static const char *unit_name(const corr_column *c)
{
	return c->unit_exp == -3 ? "V" : c->unit_exp == 3 ? "uV" : "mV";
}

/* The summary of a file run, on o (the result stream, or the error stream
 * when the data went to the result stream). */
static void report(out *o, const ljp_src *src, double t_C, const char *in,
		   const char *outp, const char *note, const corr_result *r)
{
	if (o->json) {
		jw w;
		jw_begin(&w, o);
		jw_str(&w, "configuration", corr_config_name(r->config));
		jw_str(&w, "formula", corr_config_formula(r->config));
		jw_int(&w, "metadata_lines", r->meta);
		jw_bool(&w, "comment_line", r->comment);
		jw_int(&w, "rows", r->rows);
		jw_int(&w, "corrected", r->corrected);
		jw_int(&w, "skipped", r->skipped);
		json_ljp(&w, src, t_C);
		jw_int(&w, "bad", r->bad);
		jw_int(&w, "ragged_rows", r->ragged);
		jw_int(&w, "blank_lines", r->blank);
		jw_str(&w, "input", in);
		jw_str(&w, "output", outp);
		jw_str(&w, "note", note);
		jw_str(&w, "delimiter", corr_delim_name(r->delim));
		jw_bool(&w, "header", r->header);
		jw_arr(&w, "columns");
		for (int i = 0; i < r->ncols; i++) {
			jw_obj(&w, NULL);
			jw_int(&w, "index", r->cols[i].index);
			jw_str(&w, "name", r->cols[i].name[0] ? r->cols[i].name : NULL);
			jw_str(&w, "unit", unit_name(&r->cols[i]));
			jw_bool(&w, "unit_assumed", r->cols[i].unit_assumed);
			jw_close(&w);
		}
		jw_end(&w);
		return;
	}
	say_ljp(o, src, t_C);
	out_printf(o, "%s -> %s: corrected column%s", strcmp(in, "-") ? in : "standard input",
		   outp && strcmp(outp, "-") ? outp : "standard output",
		   r->ncols == 1 ? "" : "s");
	for (int i = 0; i < r->ncols; i++) {
		const corr_column *c = &r->cols[i];
		out_printf(o, "%s %d", i ? "," : "", c->index);
		if (c->name[0])
			out_printf(o, " \"%s\"", c->name);
		out_printf(o, " (%s%s)", unit_name(c), c->unit_assumed ? ", assumed" : "");
	}
	out_printf(o, "\n");
	out_printf(o, "%s: %s (LJP: the bath relative to the pipette solution)\n",
		   corr_config_name(r->config), corr_config_formula(r->config));
	if (r->meta)
		out_printf(o, "metadata lines kept before the header: %ld%s\n", r->meta,
			   r->comment ? ", and a comment line recording the correction" : "");
	out_printf(o, "rows %ld, corrected %ld, skipped %ld (not a number or missing %ld,"
		   " ragged rows %ld), blank lines %ld\n", r->rows, r->corrected, r->skipped,
		   r->bad, r->ragged, r->blank);
	out_printf(o, "%s-delimited, header row: %s", corr_delim_name(r->delim),
		   r->header ? "yes" : "no");
	if (note)
		out_printf(o, "; what was done is recorded in %s", note);
	out_printf(o, "\n");
	for (int i = 0; i < r->ncols; i++)
		if (r->cols[i].unit_assumed)
			out_note(o, "note: column %d has no unit in its header; its values were"
				 " taken as mV", r->cols[i].index);
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

/* correct FILE.nwb by MV|for PIPETTE BATH [series NAME...] [to OUT.nwb] [again] */
static int correct_nwb(im_ctx *ctx, int argc, char **argv, char *err)
{
	const char *by = NULL, *pip = NULL, *bath = NULL, *to = NULL;
	const char **names = im_xcalloc((size_t)argc, sizeof *names);
	int nn = 0, again = 0, rc = -1;
	ljp_src src;
	for (int i = 2; i < argc; i++) {
		const char *w = argv[i];
		int more = argc - 1 - i;
		if (strcmp(w, "series") == 0) {
			int k = 0;
			while (i + 1 < argc && !is_nwb_word(argv[i + 1])) {
				names[nn++] = argv[++i];
				k++;
			}
			if (k == 0) {
				im_fail(err, "`series` needs one or more series names");
				goto out;
			}
		} else if (strcmp(w, "by") == 0 && more >= 1 && !by) {
			by = argv[++i];
		} else if (strcmp(w, "for") == 0 && more >= 2 && !pip) {
			pip = argv[++i];
			bath = argv[++i];
		} else if (strcmp(w, "to") == 0 && more >= 1 && !to) {
			to = argv[++i];
		} else if (strcmp(w, "again") == 0) {
			again = 1;
		} else if (is_nwb_word(w)) {
			im_fail(err, "`%s` given twice or without its %s", w,
				strcmp(w, "for") == 0 ? "PIPETTE BATH" : strcmp(w, "to") == 0 ?
				"file name" : "value");
			goto out;
		} else {
			im_fail(err, "unexpected '%.40s'; expected by, for, series, to or again", w);
			goto out;
		}
	}
	if (get_ljp(ctx, by, pip, bath, &src, err) < 0)
		goto out;
	char ljp_text[32], date[32];
	corr_ljp_format(&src.ljp, ljp_text, sizeof ljp_text);
	utc_now(date, sizeof date);
	nwb_record rec = {
		.ljp_text = ljp_text,
		.ljp_mV = corr_ljp_mV(&src.ljp),
		.pipette = src.henderson ? pip : NULL,
		.bath = src.henderson ? bath : NULL,
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
	nwb_result r;
	if (nwb_correct(argv[1], to, names, nn, again, &rec, &r, err))
		goto out;
	const char *dest = to ? to : argv[1];
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "input", argv[1]);
		jw_str(&w, "output", dest);
		jw_bool(&w, "in_place", to == NULL || fio_same_file(argv[1], to));
		json_ljp(&w, &src, ctx->ses->temp_C);
		jw_str(&w, "date", date);
		jw_arr(&w, "series");
		for (int i = 0; i < r.n; i++) {
			jw_obj(&w, NULL);
			jw_str(&w, "name", r.c[i].name);
			jw_str(&w, "path", r.c[i].path);
			jw_str(&w, "unit", r.c[i].unit);
			jw_num(&w, "old_offset", r.c[i].old_offset, 12);
			jw_num(&w, "new_offset", r.c[i].new_offset, 12);
			jw_num(&w, "offset_change", r.c[i].delta, 12);
			jw_bool(&w, "corrected_before", r.c[i].again);
			jw_close(&w);
		}
		jw_close(&w);
		jw_end(&w);
	} else {
		say_ljp(ctx->out, &src, ctx->ses->temp_C);
		out_printf(ctx->out, "%s -> %s: offset changed in %d series, data untouched\n",
			   argv[1], dest, r.n);
		out_printf(ctx->out, "sign: %s (value = data * conversion + offset)\n", CONVENTION);
		for (int i = 0; i < r.n; i++)
			out_printf(ctx->out, "  %-24s offset %.6g -> %.6g %s%s\n", r.c[i].name,
				   r.c[i].old_offset, r.c[i].new_offset, r.c[i].unit,
				   r.c[i].again ? " (corrected before: again)" : "");
		out_printf(ctx->out, "what was done is recorded in each series' comments\n");
	}
	nwb_result_free(&r);
	rc = 0;
out:
	free(names);
	return rc;
}

int cmd_correct_list_nwb(im_ctx *ctx, const char *path, char *err)
{
	nwb_file f;
	if (nwb_read(path, &f, err))
		return -1;
	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		jw_str(&w, "file", path);
		jw_str(&w, "nwb_version", f.version);
		jw_arr(&w, "series");
		for (int i = 0; i < f.n; i++) {
			const nwb_series *s = &f.s[i];
			jw_obj(&w, NULL);
			jw_str(&w, "name", s->name);
			jw_str(&w, "path", s->path);
			jw_str(&w, "neurodata_type", s->type);
			jw_str(&w, "holds", nwb_kind_what(s->kind));
			jw_bool(&w, "correctable", nwb_kind_is_potential(s->kind) && s->has_offset);
			jw_str(&w, "unit", s->unit);
			jw_num(&w, "conversion", s->conversion, 12);
			if (s->has_offset)
				jw_num(&w, "offset", s->offset, 12);
			else
				jw_str(&w, "offset", NULL);
			jw_int(&w, "corrections", s->corrections);
			if (s->corrections)
				jw_num(&w, "last_ljp_mV", s->last_ljp_mV, 8);
			jw_str(&w, "comments", s->comments);
			jw_close(&w);
		}
		jw_close(&w);
		jw_end(&w);
	} else {
		out_printf(ctx->out, "%s: NWB %s, %d patch-clamp series\n", path, f.version, f.n);
		if (f.n)
			out_printf(ctx->out, "  %-22s %-27s %-8s %11s %11s  %s\n", "series", "type",
				   "unit", "conversion", "offset", "LJP correction");
		for (int i = 0; i < f.n; i++) {
			const nwb_series *s = &f.s[i];
			char off[32], corr[64];
			if (s->has_offset)
				snprintf(off, sizeof off, "%.6g", s->offset);
			else
				snprintf(off, sizeof off, "none");
			if (!nwb_kind_is_potential(s->kind))
				snprintf(corr, sizeof corr, "- (%s)", nwb_kind_what(s->kind));
			else if (s->corrections == 0)
				snprintf(corr, sizeof corr, s->has_offset ? "none" :
					 "none (no offset: NWB before 2.5)");
			else
				snprintf(corr, sizeof corr, "%+.4g mV%s", s->last_ljp_mV,
					 s->corrections > 1 ? " (the last of several)" : "");
			out_printf(ctx->out, "  %-22s %-27s %-8s %11.6g %11s  %s\n", s->name, s->type,
				   s->unit[0] ? s->unit : "?", s->conversion, off, corr);
		}
	}
	nwb_file_free(&f);
	return 0;
}

int cmd_correct(im_ctx *ctx, int argc, char **argv, char *err)
{
	const char *by = NULL, *pip = NULL, *bath = NULL, *to = NULL;
	const char *cols[CORR_MAXCOLS];
	int ncols = 0, skip_bad = 0, have_cfg = 0;
	long skip = 0;
	corr_config cfg = CORR_WHOLE_CELL;
	ljp_src src;
	corr_opts o;
	corr_result r;
	corr_about about;
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
	for (int i = 2; i < argc; i++) {
		const char *w = argv[i];
		int more = argc - 1 - i;
		if (strcmp(w, "column") == 0) {
			if (more < 1)
				return im_fail(err, "`column` needs a number or a header name");
			if (ncols == CORR_MAXCOLS)
				return im_fail(err, "more than %d columns", CORR_MAXCOLS);
			cols[ncols++] = argv[++i];
		} else if (strcmp(w, "by") == 0) {
			if (more < 1)
				return im_fail(err, "`by` needs the LJP in mV");
			if (by)
				return im_fail(err, "`by` given twice");
			by = argv[++i];
		} else if (strcmp(w, "for") == 0) {
			if (more < 2)
				return im_fail(err, "`for` needs two solutions: PIPETTE BATH");
			if (pip)
				return im_fail(err, "`for` given twice");
			pip = argv[++i];
			bath = argv[++i];
		} else if (strcmp(w, "to") == 0) {
			if (more < 1)
				return im_fail(err, "`to` needs a file name");
			if (to)
				return im_fail(err, "`to` given twice");
			to = argv[++i];
		} else if (strcmp(w, "skip-bad") == 0) {
			skip_bad = 1;
		} else if (strcmp(w, "skip") == 0) {
			char *end;
			if (more < 1)
				return im_fail(err, "`skip` needs the number of metadata lines");
			const char *n = argv[++i];
			errno = 0;
			skip = strtol(n, &end, 10);
			if (!*n || *end || errno || skip < 0 || skip > CMD_CORRECT_SKIP_MAX ||
			    n[0] == '+' || n[0] == ' ')
				return im_fail(err, "`skip` takes a count of lines, 0 to %d, not"
					       " '%.40s'", CMD_CORRECT_SKIP_MAX, n);
		} else if (corr_config_parse(w, &cfg) == 0) {
			if (have_cfg++)
				return im_fail(err, "give one recording configuration");
		} else {
			return im_fail(err, "unexpected '%.40s'; expected column, by, for, to,"
				       " skip, skip-bad, whole-cell, outside-out, inside-out or"
				       " cell-attached", w);
		}
	}
	if (get_ljp(ctx, by, pip, bath, &src, err) < 0)
		return -1;
	memset(&about, 0, sizeof about);
	about.temperature_C = NAN;
	if (src.henderson) {
		about.pipette = src.pip;
		about.bath = src.bath;
		about.model = "Henderson (concentrations), rounded to 0.1 mV";
		about.range = src.range;
		about.temperature_C = ctx->ses->temp_C;
	}
	corr_about_stamp(&about, date, sizeof date);
	memset(&o, 0, sizeof o);
	o.columns = cols;
	o.ncolumns = ncols;
	o.ljp = src.ljp;
	o.skip_bad = skip_bad;
	o.skip = skip;
	o.config = cfg;
	o.comment = 1;
	o.about = &about;

	if (to && strcmp(to, "-") != 0) {
		if (corr_file(argv[1], to, NULL, &o, &r, err) < 0)
			return -1;
		char *note = NULL;
		if (r.note) {
			note = im_xmalloc(strlen(to) + sizeof CORR_NOTE_SUFFIX);
			sprintf(note, "%s%s", to, CORR_NOTE_SUFFIX);
		}
		report(ctx->out, &src, ctx->ses->temp_C, argv[1], to, note, &r);
		free(note);
		return 0;
	}
	/* to the result stream: a large file is not poured onto a terminal
	 * unless asked for with `to -` */
	if (!to && isatty(fileno(ctx->out->fp))) {
		struct stat st;
		int fd = strcmp(argv[1], "-") == 0 ? STDIN_FILENO : -1;
		int big = fd >= 0 ? fstat(fd, &st) == 0 : stat(argv[1], &st) == 0;
		if (big && S_ISREG(st.st_mode) && st.st_size > CMD_CORRECT_TTY_MAX)
			return im_fail(err, "%s is %.1f MB, too much for the terminal: add"
				       " `to OUT` to write a file (or `to -` to print it anyway)",
				       fd >= 0 ? "standard input" : argv[1],
				       (double)st.st_size / 1e6);
	}
	if (corr_file(argv[1], NULL, ctx->out->fp, &o, &r, err) < 0)
		return -1;
	/* the data went to the result stream: the summary goes beside it */
	out side = *ctx->out;
	side.fp = ctx->out->errfp;
	report(&side, &src, ctx->ses->temp_C, argv[1], "-", NULL, &r);
	fflush(side.fp);
	return 0;
}
