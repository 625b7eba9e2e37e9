/*
 * cmd_store.c - saving, loading, listing and deleting solutions in the
 * user's database (userdb.c), and exporting a recipe through the one
 * file writer (fileio.c).
 */
#include "cmd_store.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "cmd_correct.h"
#include "common.h"
#include "fileio.h"
#include "render.h"
#include "targets.h"
#include "userdb.h"
#include "version.h"

int cmd_save(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	userdb *u;
	int failed = 0;
	render *r;
	if (ses_solution(ctx->ses, argc > 1 ? argv[1] : NULL, &s, err))
		return -1;
	if (!(u = ses_userdb(ctx->ses, 1, err, &failed)) || udb_save(u, s, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "saved", NULL, s->name);
	render_str(r, "database", NULL, ctx->ses->db_path);
	render_int(r, "compounds", NULL, s->n);
	render_text(r, "saved %s (%d compounds) to %s", s->name, s->n, ctx->ses->db_path);
	return render_done(r);
}

int cmd_load(im_ctx *ctx, int argc, char **argv, char *err)
{
	userdb *u;
	solution *s;
	int failed = 0;
	render *r;
	(void)argc;
	if (ses_valid_name(argv[1], err))
		return -1;
	u = ses_userdb(ctx->ses, 0, err, &failed);
	if (!u)
		return failed ? -1 : im_fail(err, "no saved solution named '%s' (no database yet "
						   "at %s)", argv[1], ctx->ses->db_path);
	s = im_xmalloc(sizeof *s);
	if (udb_load(u, ctx->ses->ref, argv[1], s, err)) {
		free(s);
		return -1;
	}
	ws_put(&ctx->ses->ws, s);
	ws_open(&ctx->ses->ws, argv[1]);
	r = render_new(ctx->out);
	render_str(r, "loaded", NULL, argv[1]);
	render_str(r, "database", NULL, ctx->ses->db_path);
	render_int(r, "compounds", NULL, s->n);
	render_text(r, "loaded %s (%d compounds)", argv[1], s->n);
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

/* Write the recipe of s to fp: a commented script that rebuilds it, the
 * targets as commands (each holds at its own temperature, so the recipe
 * gives the same amounts at any `temp`). */
static void write_recipe(FILE *fp, const solution *s)
{
	char stamp[32];
	time_t now = time(NULL);
	strftime(stamp, sizeof stamp, "%Y-%m-%d", gmtime(&now));
	fprintf(fp, "# ionmix recipe: %s\n# exported %s by ionmix %s; replay with "
		    "`ionmix FILE` or `run FILE`\n", s->name, stamp, IONMIX_VERSION);
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
}

int cmd_export(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	fio_file *f;
	render *r;
	(void)argc;
	if (ses_solution(ctx->ses, argv[1], &s, err) || fio_open(&f, argv[2], err))
		return -1;
	write_recipe(fio_stream(f), s);
	if (fio_commit(f, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "exported", NULL, s->name);
	render_str(r, "file", NULL, argv[2]);
	render_text(r, "wrote the recipe of %s to %s", s->name, argv[2]);
	return render_done(r);
}
