/*
 * cmd_bench.c - the bench sheet and stock solutions.  Amounts come from
 * weigh.c; these handlers only parse and render.
 */
#include "cmd_bench.h"

#include <math.h>
#include <string.h>

#include "benchsheet.h"
#include "common.h"
#include "fileio.h"
#include "render.h"
#include "units.h"
#include "version.h"
#include "weigh.h"

static int weigh_word(const char *w)
{
	return strcmp(w, "html") == 0 || strcmp(w, "csv") == 0 || strcmp(w, "prep") == 0;
}

typedef struct weigh_args {
	double mL, prep_C;        /* volume; preparation temperature (NAN: none) */
	const char *html, *csv;   /* output files, or NULL */
} weigh_args;

static int weigh_parse(int argc, char **argv, weigh_args *a, char *err)
{
	int i = 2;
	const char *unit = argc > 2 && !weigh_word(argv[2]) ? argv[i++] : NULL;
	a->prep_C = NAN;
	a->html = a->csv = NULL;
	if (units_volume_mL(argv[1], unit, &a->mL, err))
		return -1;
	for (; i < argc; i++) {
		const char *w = argv[i], **slot;
		if (i + 1 >= argc || !weigh_word(w))
			return im_fail(err, weigh_word(w) ? "`%s` needs a %s" :
				       "unexpected '%.40s'; expected html FILE, csv FILE or prep C", w,
				       strcmp(w, "prep") == 0 ? "temperature in C" : "file name");
		const char *val = argv[++i];
		if (strcmp(w, "prep") == 0) {
			if (isfinite(a->prep_C))
				return im_fail(err, "`prep` given twice");
			if (units_number(val, &a->prep_C, err))
				return -1;
			if (a->prep_C < 0 || a->prep_C > 60)
				return im_fail(err, "preparation temperature %s C is outside 0 to 60", val);
			continue;
		}
		slot = strcmp(w, "html") == 0 ? &a->html : &a->csv;
		if (*slot)
			return im_fail(err, "`%s` given twice", w);
		*slot = val;
	}
	return 0;
}

/* The printable sheet and the CSV, both or neither (one fileio batch). */
static int weigh_files(const weigh_args *a, const bs_sheet *b, char *err)
{
	fio_batch fb;
	FILE *fp;
	if (!a->html && !a->csv)
		return 0;
	fio_batch_init(&fb);
	if (a->html) {
		if (fio_batch_open(&fb, a->html, &fp, err))
			goto fail;
		bs_write_html(fp, b, IONMIX_VERSION);
	}
	if (a->csv) {
		if (fio_batch_open(&fb, a->csv, &fp, err))
			goto fail;
		bs_write_csv(fp, b);
	}
	return fio_batch_commit(&fb, err);
fail:
	fio_batch_abort(&fb);
	return -1;
}

/* One line of the sheet: JSON fields only (the text is weigh_text's). */
static double weigh_row(render *r, const bs_line *l)
{
	int titrant = l->how == BS_TITRANT_STOCK || l->how == BS_TITRANT_SUGGEST;
	render_row(r);
	render_str(r, "compound", NULL, l->c->name);
	render_numj(r, "mM", NULL, "mM", l->mM, UNITS_SIG(10), 10);
	render_numj(r, "fw_g_mol", NULL, "g/mol", l->fw_g_mol, UNITS_SIG(8), 8);
	if (l->fw_g_mol != l->c->fw_g_mol) /* only then: the shipped sheet's keys stay */
		render_bool(r, "fw_from_bottle", NULL, 1);
	render_numj(r, "grams", NULL, "g", l->grams, UNITS_SIG(6), 6);
	render_str(r, "action", NULL, l->how == BS_WEIGH ? "weigh" : titrant ? "titrate" : "pipette");
	render_str(r, "amount", NULL, l->amount);
	render_int(r, "step", NULL, l->step + 1);
	if (titrant) {
		render_bool(r, "titrant", NULL, 1);
		render_numj(r, "mmol", NULL, "mmol", l->mmol, UNITS_SIG(6), 6);
	}
	if (l->how == BS_TITRANT_SUGGEST) {
		render_numj(r, "suggested_stock_mM", NULL, "mM", l->stock_mM, UNITS_SIG(8), 8);
		render_numj(r, "suggested_stock_mL", NULL, "mL", l->stock_mL, UNITS_SIG(6), 6);
	} else if (l->how != BS_WEIGH) {
		render_numj(r, "stock_mM", NULL, "mM", l->stock_mM, UNITS_SIG(8), 8);
		render_numj(r, "stock_mL", NULL, "mL", l->stock_mL, UNITS_SIG(6), 6);
	}
	return l->how == BS_WEIGH ? l->grams : 0;
}

/* The sheet as terminal text: the order of work with its lines. */
static void weigh_text(render *r, const bs_sheet *b, int utf8)
{
	char v[32], conc[32];
	weigh_fmt_volume(v, sizeof v, b->volume_mL, utf8);
	if (isfinite(b->t_prep_C))
		render_text(r, "bench sheet: %s, %s final volume, %.1f C (made at %.1f C)", b->name,
			    v, b->t_rec_C, b->t_prep_C);
	else
		render_text(r, "bench sheet: %s, %s final volume, %.1f C", b->name, v, b->t_rec_C);
	render_text(r, "  %-4s %-22s %12s %10s  %s", "step", "compound", "final", "FW g/mol",
		    "weigh or pipette");
	for (int s = 0; s < b->nsteps; s++) {
		render_text(r, "  %2d. %s", s + 1, b->steps[s]);
		for (int i = 0; i < b->n; i++) {
			const bs_line *l = &b->lines[i];
			if (l->step != s)
				continue;
			units_fmt_conc(conc, sizeof conc, l->mM, utf8);
			weigh_fmt_volume(v, sizeof v, l->stock_mL, utf8);
			switch (l->how) {
			case BS_WEIGH:
				render_text(r, "       %-22s %12s %10.2f  %s%s", l->c->name, conc,
					    l->fw_g_mol, l->amount, l->grams < WEIGH_MIN_GOOD_g ?
					    "  (under 10 mg: better from a stock)" : "");
				break;
			case BS_STOCK:
				render_text(r, "       %-22s %12s %10.2f  %s of %s stock", l->c->name,
					    conc, l->fw_g_mol, v, l->stock);
				break;
			case BS_TITRANT_STOCK:
				render_text(r, "       %-22s %12s %10.2f  %s of %s stock to start "
					    "(titrant: %.3g mmol; finish with the pH meter)", l->c->name,
					    conc, l->fw_g_mol, v, l->stock, l->mmol);
				break;
			case BS_TITRANT_SUGGEST:
				render_text(r, "       %-22s %12s %10.2f  %.3g mmol: %s of a %s stock, "
					    "suggested (titrant; finish with the pH meter)", l->c->name,
					    conc, l->fw_g_mol, l->mmol, v, l->stock);
				break;
			}
		}
	}
	render_text(r, "  checks:");
	for (int i = 0; i < b->nchecks; i++)
		render_text(r, "       %s", b->checks[i]);
}

int cmd_weigh(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *s;
	weigh_args a;
	bs_sheet b;
	sol_state st;
	char e2[IM_ERRLEN], date[16];
	double total = 0;
	if (ses_solution(ctx->ses, NULL, &s, err) || weigh_parse(argc, argv, &a, err))
		return -1;
	if (s->n == 0)
		return im_fail(err, "%s is empty: nothing to weigh", s->name);
	int have_st = sol_compute(s, ses_env(ctx->ses), &st, e2) == 0;
	bs_today(date, sizeof date);
	int rc = bs_build(s, have_st ? &st : NULL, ctx->ses->ref, a.mL, ctx->ses->temp_C, a.prep_C,
			  date, &b, err);
	if (have_st)
		sol_state_free(&st);
	if (rc || weigh_files(&a, &b, err)) {
		if (rc == 0)
			bs_free(&b);
		return -1;
	}
	render *r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_num(r, "volume_mL", NULL, "mL", a.mL, UNITS_SIG(10));
	render_num(r, "temperature_C", NULL, "C", ctx->ses->temp_C, UNITS_SIG(6));
	if (isfinite(a.prep_C))
		render_num(r, "preparation_temperature_C", NULL, "C", a.prep_C, UNITS_SIG(6));
	weigh_text(r, &b, ctx->out->utf8);
	render_table(r, "items", NULL);
	for (int k = 0; k < b.n; k++)
		total += weigh_row(r, &b.lines[k]);
	render_table_end(r);
	for (int k = 0; k < b.n; k++)
		if (b.lines[k].fw_g_mol != b.lines[k].c->fw_g_mol)
			render_note(r, "%s weighed with the bottle's formula weight %.2f g/mol (`fw`), "
				    "not the table's %.2f g/mol", b.lines[k].c->name,
				    b.lines[k].fw_g_mol, b.lines[k].c->fw_g_mol);
	render_numj(r, "total_grams", NULL, "g", total, UNITS_SIG(6), 6);
	render_list(r, "steps", NULL, (const char *const *)b.steps, b.nsteps);
	render_str(r, "html", NULL, a.html);
	render_str(r, "csv", NULL, a.csv);
	if (a.html)
		render_text(r, "printable sheet (A4 or Letter) written to %s", a.html);
	if (a.csv)
		render_text(r, "table written to %s", a.csv);
	bs_free(&b);
	return render_done(r);
}

int cmd_stock(im_ctx *ctx, int argc, char **argv, char *err)
{
	const rd_compound *c;
	solution *s;
	sol_item *it;
	double mM = 0;
	char buf[48];
	render *r;
	if (ses_solution(ctx->ses, NULL, &s, err) || ses_compound(ctx->ses, argv[1], &c, err))
		return -1;
	it = sol_find(s, c);
	if (!it)
		return im_fail(err, "%s is not in %s: add it first", c->name, s->name);
	if (!(strcmp(argv[2], "off") == 0 && argc == 3)) {
		if (units_amount_mM(argv[2], argc > 3 ? argv[3] : NULL, c->fw_g_mol, &mM, err))
			return -1;
		if (mM <= it->mM)
			return im_fail(err, "a stock of %s %s is not more concentrated than the %g "
					    "mM wanted", argv[2], argc > 3 ? argv[3] : "mM", it->mM);
	}
	it->stock_mM = mM;
	r = render_new(ctx->out);
	render_str(r, "solution", NULL, s->name);
	render_str(r, "compound", NULL, c->name);
	render_conc(r, "stock_mM", NULL, mM);
	units_fmt_conc(buf, sizeof buf, mM, ctx->out->utf8);
	if (mM > 0)
		render_text(r, "%s: %s from a %s stock", s->name, c->name, buf);
	else
		render_text(r, "%s: %s is weighed", s->name, c->name);
	return render_done(r);
}
