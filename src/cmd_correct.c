/*
 * cmd_correct.c - the `correct` command: parse the words, find the LJP
 * (given, or Henderson from two solutions), call correct.c, report.
 */
#include "cmd_correct.h"
#include "cmd_junction.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "session.h"
#include "common.h"
#include "correct.h"
#include "junction.h"

#define CONVENTION "Vm = Vrecorded - LJP"

/* Where the LJP came from. */
typedef struct ljp_src {
	corr_ljp ljp;          /* what is subtracted, exact */
	int henderson;         /* 1: computed from two solutions */
	const char *pip, *bath;
	double henderson_mV;   /* the unrounded Henderson value */
} ljp_src;

/* The Henderson LJP of PIPETTE against BATH at the session temperature,
 * from total concentrations, the same way `junction` computes it. */
static int henderson(im_ctx *ctx, const char *pip, const char *bath, double *ljp_mV,
		     char *err)
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
	rc = cmdj_henderson_mV(&st[0], &st[1], 0, ctx->ses->temp_C, ljp_mV, e2);
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
	if (henderson(ctx, pip, bath, &src->henderson_mV, err) < 0)
		return -1;
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
			   " 0.1 mV\n", l, s->pip, s->bath, t_C, s->henderson_mV);
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
	out_printf(o, "%s -> %s: subtracted from column%s", in, outp ? outp : "standard output",
		   r->ncols == 1 ? "" : "s");
	for (int i = 0; i < r->ncols; i++) {
		const corr_column *c = &r->cols[i];
		out_printf(o, "%s %d", i ? "," : "", c->index);
		if (c->name[0])
			out_printf(o, " \"%s\"", c->name);
		out_printf(o, " (%s%s)", unit_name(c), c->unit_assumed ? ", assumed" : "");
	}
	out_printf(o, "\n");
	out_printf(o, "sign: %s (LJP: the bath relative to the pipette solution)\n",
		   CONVENTION);
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

int cmd_correct(im_ctx *ctx, int argc, char **argv, char *err)
{
	const char *by = NULL, *pip = NULL, *bath = NULL, *to = NULL;
	const char *cols[CORR_MAXCOLS];
	int ncols = 0, skip_bad = 0;
	ljp_src src;
	corr_opts o;
	corr_result r;

	if (argc < 2)
		return im_fail(err, "usage: correct FILE [column N|NAME]... by MV|for PIPETTE"
			       " BATH [to OUT] [skip-bad], or correct value MV... by MV");
	if (strcmp(argv[1], "value") == 0)
		return correct_values(ctx, argc, argv, err);
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
		} else {
			return im_fail(err, "unexpected '%.40s'; expected column, by, for, to or"
				       " skip-bad", w);
		}
	}
	if (get_ljp(ctx, by, pip, bath, &src, err) < 0)
		return -1;
	memset(&o, 0, sizeof o);
	o.columns = cols;
	o.ncolumns = ncols;
	o.ljp = src.ljp;
	o.skip_bad = skip_bad;

	if (to) {
		if (corr_file(argv[1], to, NULL, &o, &r, err) < 0)
			return -1;
		char *note = im_xmalloc(strlen(to) + sizeof CORR_NOTE_SUFFIX);
		sprintf(note, "%s%s", to, CORR_NOTE_SUFFIX);
		report(ctx->out, &src, ctx->ses->temp_C, argv[1], to, note, &r);
		free(note);
		return 0;
	}
	if (corr_file(argv[1], NULL, ctx->out->fp, &o, &r, err) < 0)
		return -1;
	/* the data went to the result stream: the summary goes beside it */
	out side = *ctx->out;
	side.fp = ctx->out->errfp;
	report(&side, &src, ctx->ses->temp_C, argv[1], NULL, NULL, &r);
	fflush(side.fp);
	return 0;
}
