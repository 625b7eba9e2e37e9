/*
 * cmd_store.c - saving, loading, listing and deleting solutions in the
 * user's database (userdb.c), and exporting a recipe through the one
 * file writer (fileio.c).
 */
#include "cmd_store.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "cmd_correct.h"
#include "common.h"
#include "fileio.h"
#include "render.h"
#include "targets.h"
#include "usercomp.h"
#include "userdb.h"
#include "version.h"

int cmd_save(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	userdb *u;
	int failed = 0, version = 0, superseded = 0;
	render *r;
	if (ses_solution(ctx->ses, argc > 1 ? argv[1] : NULL, &s, err))
		return -1;
	if (!(u = ses_userdb(ctx->ses, 1, err, &failed)) ||
	    udb_save_v(u, s, &version, &superseded, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "saved", NULL, s->name);
	render_str(r, "database", NULL, ctx->ses->db_path);
	render_int(r, "compounds", NULL, s->n);
	render_int(r, "version", NULL, version);
	render_int(r, "superseded", NULL, superseded);
	if (superseded)
		render_text(r, "saved %s (%d compounds) to %s as version %d; it supersedes version "
			    "%d, which differs (`versions %s`, `load %s@%d`)", s->name, s->n,
			    ctx->ses->db_path, version, superseded, s->name, s->name, superseded);
	else if (version > 0)
		render_text(r, "saved %s (%d compounds) to %s as version %d", s->name, s->n,
			    ctx->ses->db_path, version);
	else
		render_text(r, "saved %s (%d compounds) to %s", s->name, s->n, ctx->ses->db_path);
	return render_done(r);
}

/* "NAME" or "NAME@N": the name into name (checked), the version into
 * *version (0: the latest). */
static int parse_ref(const char *arg, char *name, size_t n, int *version, char *err)
{
	const char *at = strchr(arg, '@');
	*version = 0;
	if (!at) {
		snprintf(name, n, "%s", arg);
		return ses_valid_name(name, err);
	}
	snprintf(name, n, "%.*s", (int)(at - arg < (long)n - 1 ? at - arg : (long)n - 1), arg);
	if (ses_valid_name(name, err))
		return -1;
	if (!at[1] || strspn(at + 1, "0123456789") != strlen(at + 1) || strlen(at + 1) > 6 ||
	    (*version = atoi(at + 1)) < 1)
		return im_fail(err, "'%.60s': a version is a number from 1 (see `versions %s`)",
			       arg, name);
	return 0;
}

int cmd_load(im_ctx *ctx, int argc, char **argv, char *err)
{
	userdb *u;
	solution *s, *open;
	char name[SOL_NAME_MAX + 8];
	int failed = 0, version, unsaved = 0;
	render *r;
	(void)argc;
	if (parse_ref(argv[1], name, sizeof name, &version, err))
		return -1;
	u = ses_userdb(ctx->ses, 0, err, &failed);
	if (!u)
		return failed ? -1 : im_fail(err, "no saved solution named '%s' (no database yet "
						   "at %s)", name, ctx->ses->db_path);
	/* the workspace copy, if it has changes that were never saved */
	if (ws_index_of(&ctx->ses->ws, name) >= 0) {
		open = ctx->ses->ws.sol[ws_index_of(&ctx->ses->ws, name)];
		unsaved = ses_unsaved(ctx->ses, open, err);
		if (unsaved < 0)
			return -1;
	}
	s = im_xmalloc(sizeof *s);
	if (version ? udb_load_version(u, ctx->ses->ref, name, version, s, err)
		    : udb_load(u, ctx->ses->ref, name, s, err)) {
		free(s);
		return -1;
	}
	ws_put(&ctx->ses->ws, s);
	ws_open(&ctx->ses->ws, name);
	r = render_new(ctx->out);
	render_str(r, "loaded", NULL, name);
	render_str(r, "database", NULL, ctx->ses->db_path);
	render_int(r, "compounds", NULL, s->n);
	if (version)
		render_int(r, "version", NULL, version);
	render_bool(r, "replaced_unsaved", NULL, unsaved);
	if (version)
		render_text(r, "loaded %s version %d (%d compounds)", name, version, s->n);
	else
		render_text(r, "loaded %s (%d compounds)", name, s->n);
	if (unsaved)
		render_note(r, "the workspace copy of %s had changes that were not saved; `undo` "
			    "brings them back", name);
	return render_done(r);
}

int cmd_versions(im_ctx *ctx, int argc, char **argv, char *err)
{
	userdb *u;
	udb_version *v = NULL;
	int failed = 0, n;
	render *r;
	(void)argc;
	if (ses_valid_name(argv[1], err))
		return -1;
	u = ses_userdb(ctx->ses, 0, err, &failed);
	if (!u)
		return failed ? -1 : im_fail(err, "no saved solution named '%s' (no database yet "
						   "at %s)", argv[1], ctx->ses->db_path);
	if ((n = udb_versions(u, argv[1], &v, err)) < 0)
		return -1;
	if (n == 0) {
		udb_versions_free(v, n);
		return im_fail(err, "no saved versions of '%s' (see `list`)", argv[1]);
	}
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, argv[1]);
	render_text(r, "versions of %s (`load %s@N` brings one back):", argv[1], argv[1]);
	render_table(r, "versions", NULL);
	for (int i = 0; i < n; i++) {
		render_row(r);
		render_int(r, "version", "version", v[i].version);
		render_str(r, "saved_at", "saved (UTC)", v[i].saved_at);
		render_str(r, "summary", "summary", v[i].summary);
	}
	render_table_end(r);
	udb_versions_free(v, n);
	return render_done(r);
}

int cmd_undo(im_ctx *ctx, int argc, char **argv, char *err)
{
	char what[512];
	render *r;
	solution *cur;
	(void)argc;
	(void)argv;
	if (ses_undo(ctx->ses, what, sizeof what, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "undone", NULL, what);
	render_int(r, "levels_left", NULL, ctx->ses->nundo);
	cur = ctx->ses->ws.current >= 0 ? ctx->ses->ws.sol[ctx->ses->ws.current] : NULL;
	if (cur)
		render_str(r, "current", NULL, cur->name);
	render_text(r, "undid the last change (%s); %d more level%s", what, ctx->ses->nundo,
		    ctx->ses->nundo == 1 ? "" : "s");
	return render_done(r);
}

int cmd_list(im_ctx *ctx, int argc, char **argv, char *err)
{
	char **names = NULL;
	const char **open;
	int n = 0, failed = 0;
	userdb *u;
	render *r;
	workspace *ws = &ctx->ses->ws;
	if (argc > 1) /* `list FILE.nwb`: the series of a recording */
		return cmd_correct_list_nwb(ctx, argv[1], err);
	u = ses_userdb(ctx->ses, 0, err, &failed);
	if (failed || (u && (n = udb_list(u, &names, err)) < 0))
		return -1;
	r = render_new(ctx->out);
	open = im_xcalloc((size_t)ws->n + 1, sizeof *open);
	render_text(r, "in the workspace:%s", ws->n ? "" : " none");
	for (int i = 0; i < ws->n; i++) {
		open[i] = ws->sol[i]->name;
		render_text(r, "  %s%s (%d compounds)", ws->sol[i]->name,
			    i == ws->current ? " *" : "", ws->sol[i]->n);
	}
	render_list(r, "workspace", NULL, open, ws->n);
	if (ws->current >= 0)
		render_str(r, "current", NULL, ws->sol[ws->current]->name);
	render_text(r, "saved in %s:%s", ctx->ses->db_path, n ? "" : " none");
	for (int i = 0; i < n; i++)
		render_text(r, "  %s", names[i]);
	render_list(r, "saved", NULL, (const char *const *)names, n);
	render_str(r, "database", NULL, ctx->ses->db_path);
	for (int i = 0; i < n; i++)
		free(names[i]);
	free(names);
	free(open);
	return render_done(r);
}

int cmd_delete(im_ctx *ctx, int argc, char **argv, char *err)
{
	userdb *u;
	int failed = 0;
	render *r;
	(void)argc;
	u = ses_userdb(ctx->ses, 0, err, &failed);
	if (!u)
		return failed ? -1 : im_fail(err, "no saved solution named '%.60s'", argv[1]);
	if (udb_delete(u, argv[1], err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "deleted", NULL, argv[1]);
	render_str(r, "database", NULL, ctx->ses->db_path);
	render_text(r, "deleted saved solution %s (the workspace copy, if any, stays)", argv[1]);
	return render_done(r);
}

/* One target as the command that sets it again when the recipe runs. */
static void write_target(FILE *fp, const solution *s, const sol_target *t)
{
	const sol_item *it = sol_find((solution *)s, t->with);
	fprintf(fp, "# %s: %.10g mM when exported\n", t->with->name, it ? it->mM : 0);
	if (t->kind == SOL_TG_PH)
		fprintf(fp, "ph %.10g with \"%s\"", t->value, t->with->name);
	else if (t->kind == SOL_TG_FREE)
		fprintf(fp, "free %s %.10g mM with \"%s\"", t->metal->symbol, t->value,
			t->with->name);
	else
		fprintf(fp, "osmo %.10g with \"%s\"", t->value, t->with->name);
	if (t->kind == SOL_TG_PH && it && it->stock_mM > 0)
		fprintf(fp, " stock %.10g mM", it->stock_mM);
	fprintf(fp, " at %.10g\n", t->at_C);
	if (t->kind != SOL_TG_PH && it && it->stock_mM > 0)
		fprintf(fp, "stock \"%s\" %.10g mM\n", t->with->name, it->stock_mM);
}

/* The definitions a recipe needs before its first line: every
 * user-defined ion the solution's user-defined compounds yield, then those
 * compounds (a replay in a database that has them already finds them the
 * same). */
static void write_defines(FILE *fp, const solution *s, const usercomp *uc)
{
	for (int i = 0; uc && i < s->n; i++) {
		const rd_compound *c = s->items[i].c;
		if (!uc_owns_compound(uc, c))
			continue;
		for (int k = 0; k < c->nyields; k++) {
			const rd_ion *ion = c->yields[k].ion;
			if (!uc_owns_ion(uc, ion))
				continue;
			fprintf(fp, "define ion \"%s\" charge %d", ion->symbol, ion->z);
			if (isfinite(ion->D_1e9_m2_s))
				fprintf(fp, " mobility %.10g source \"%s\"", ion->D_1e9_m2_s,
					ion->mobility_source ? ion->mobility_source->citation : "");
			if (isfinite(ion->mass_g_mol))
				fprintf(fp, " mass %.10g", ion->mass_g_mol);
			fputc('\n', fp);
		}
		fprintf(fp, "define \"%s\" formula \"%s\"", c->name, c->formula);
		if (c->nyields > 0 && !(c->nyields == 1 && c->yields[0].ion->z == 0))
			fputs(" yields", fp);
		for (int k = 0; k < c->nyields && !(c->nyields == 1 && c->yields[0].ion->z == 0); k++)
			fprintf(fp, " \"%s\" %.10g", c->yields[k].ion->symbol, c->yields[k].count);
		if (c->hazard)
			fprintf(fp, " hazard \"%s\"", c->hazard);
		const char *src = c->description ? strstr(c->description, "source: ") : NULL;
		if (src && strcmp(src + 8, "none given") != 0)
			fprintf(fp, " source \"%s\"", src + 8);
		fputc('\n', fp);
	}
}

/* Write the recipe of s to fp: a commented script that rebuilds it, the
 * targets as commands (each holds at its own temperature, so the recipe
 * gives the same amounts at any `temp`). */
static void write_recipe(FILE *fp, const solution *s, const usercomp *uc)
{
	char stamp[32];
	time_t now = time(NULL);
	strftime(stamp, sizeof stamp, "%Y-%m-%d", gmtime(&now));
	fprintf(fp, "# ionmix recipe: %s\n# exported %s by ionmix %s; replay with "
		    "`ionmix FILE` or `run FILE`\n", s->name, stamp, IONMIX_VERSION);
	write_defines(fp, s, uc);
	fprintf(fp, "solution %s\nclear\ngas off\n", s->name);
	for (int i = 0; i < s->n; i++) {
		const sol_item *it = &s->items[i];
		if (tg_of_compound(s, it->c) >= 0)
			continue;
		if (it->titrant && isfinite(s->ph_target)) /* without its rule: an older save */
			fprintf(fp, "# %s: the titrant to pH %.2f, kept as it was (no target)\n",
				it->c->name, s->ph_target);
		fprintf(fp, "set \"%s\" %.10g mM\n", it->c->name, it->mM);
		if (it->stock_mM > 0)
			fprintf(fp, "stock \"%s\" %.10g mM\n", it->c->name, it->stock_mM);
	}
	if (s->co2_frac > 0)
		fprintf(fp, "gas co2 %.10g%%%s pressure %.10g\n", 100 * s->co2_frac,
			s->co2_dry ? " dry" : "", s->co2_p_atm);
	/* the targets' amounts are solved again when the recipe runs */
	for (int k = 0; k < s->ntg; k++)
		write_target(fp, s, &s->tg[k]);
	/* the bottles' formula weights, once every compound is in */
	for (int i = 0; i < s->n; i++)
		if (s->items[i].fw_g_mol > 0)
			fprintf(fp, "fw \"%s\" %.10g\n", s->items[i].c->name, s->items[i].fw_g_mol);
}

int cmd_export(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	fio_file *f;
	render *r;
	(void)argc;
	char uerr[IM_ERRLEN];
	if (ses_solution(ctx->ses, argv[1], &s, err))
		return -1;
	const usercomp *uc = ses_defs(ctx->ses, uerr);
	if (uerr[0])
		return im_fail(err, "%s", uerr);
	if (fio_open(&f, argv[2], err))
		return -1;
	write_recipe(fio_stream(f), s, uc);
	if (fio_commit(f, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "exported", NULL, s->name);
	render_str(r, "file", NULL, argv[2]);
	render_text(r, "wrote the recipe of %s to %s", s->name, argv[2]);
	return render_done(r);
}
