/*
 * benchsheet.c - the bench sheet: built once, rendered as HTML or CSV
 * (the terminal text is cmd_weigh's).  See benchsheet.h.
 */
#include "benchsheet.h"

#include "common.h"
#include "output.h"
#include "units.h"
#include "weigh.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

void bs_today(char *buf, size_t n)
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
	strftime(buf, n, "%Y-%m-%d", &tm);
}

/* A heap string from a format. */
static char *xfmt(const char *fmt, ...) __attribute__((format(printf, 1, 2)));
static char *xfmt(const char *fmt, ...)
{
	va_list ap;
	va_start(ap, fmt);
	int n = vsnprintf(NULL, 0, fmt, ap);
	va_end(ap);
	char *b = im_xmalloc((size_t)n + 1);
	va_start(ap, fmt);
	vsnprintf(b, (size_t)n + 1, fmt, ap);
	va_end(ap);
	return b;
}

static int add_step(bs_sheet *b, char *text)
{
	b->steps = im_xrealloc(b->steps, (size_t)(b->nsteps + 1) * sizeof *b->steps);
	b->steps[b->nsteps] = text;
	return b->nsteps++;
}

static void add_check(bs_sheet *b, char *text)
{
	b->checks = im_xrealloc(b->checks, (size_t)(b->nchecks + 1) * sizeof *b->checks);
	b->checks[b->nchecks++] = text;
}

static int yields(const rd_compound *c, const char *sym)
{
	for (int i = 0; i < c->nyields; i++)
		if (c->yields[i].ion && strcmp(c->yields[i].ion->symbol, sym) == 0)
			return 1;
	return 0;
}

/* Split "7.456 g" into its number and unit. */
static void split_amount(bs_line *l)
{
	const char *sp = strchr(l->amount, ' ');
	size_t k = sp ? (size_t)(sp - l->amount) : strlen(l->amount);
	snprintf(l->amount_num, sizeof l->amount_num, "%.*s", (int)k, l->amount);
	snprintf(l->amount_unit, sizeof l->amount_unit, "%s", sp ? sp + 1 : "");
}

static void stock_text(char *buf, size_t n, double mM)
{
	units_fmt_conc(buf, n, mM, 0);
}

/* The kinds of lines, in the order of work. */
enum { G_SOLID, G_STOCK, G_CALCIUM, G_NUCLEOTIDE, G_TITRANT, G_N };

int bs_build(const solution *s, const sol_state *st, const refdb *ref, double volume_mL,
	     double t_rec_C, double t_prep_C, const char *date, bs_sheet *b, char *err)
{
	(void)ref;
	memset(b, 0, sizeof *b);
	if (s->n == 0)
		return im_fail(err, "%s is empty: nothing to weigh", s->name);
	if (!(volume_mL > 0) || !isfinite(volume_mL))
		return im_fail(err, "the volume must be above 0");
	snprintf(b->name, sizeof b->name, "%s", s->name);
	snprintf(b->date, sizeof b->date, "%s", date);
	b->volume_mL = volume_mL;
	b->t_rec_C = t_rec_C;
	b->t_prep_C = t_prep_C;
	b->ph_target = s->ph_target;
	b->pH = st ? st->pH : NAN;
	b->osm_mOsm_kg = st ? st->osmolality_mOsm_kg : NAN;
	b->free_ca_mM = NAN;
	b->co2_frac = s->co2_frac;
	b->bicarbonate = s->co2_frac > 0;
	for (int i = 0; i < s->n; i++) {
		if (yields(s->items[i].c, "HCO3-"))
			b->bicarbonate = 1;
		if (strcmp(s->items[i].c->kind, "nucleotide") == 0)
			b->nucleotides = 1;
	}
	if (st && st->chem)
		for (int m = 0; m < st->chem->nmetals; m++)
			if (strcmp(st->chem->metals[m].symbol, "Ca2+") == 0 &&
			    st->chem->metals[m].total_mM > 0) {
				b->free_ca_mM = st->chem->metals[m].free_mM;
				b->total_ca_mM = st->chem->metals[m].total_mM;
			}

	/* the lines, grouped by the step they belong to */
	b->lines = im_xcalloc((size_t)s->n, sizeof *b->lines);
	int *grp = im_xcalloc((size_t)s->n, sizeof *grp);
	for (int i = 0; i < s->n; i++) {
		const sol_item *it = &s->items[i];
		bs_line *l = &b->lines[i];
		l->c = it->c;
		l->mM = it->mM;
		l->fw_g_mol = it->fw_g_mol > 0 ? it->fw_g_mol : it->c->fw_g_mol;
		l->grams = weigh_grams(it->mM, l->fw_g_mol, volume_mL);
		l->mmol = it->mM * volume_mL * 1e-3;
		if (it->titrant) {
			l->how = it->stock_mM > 0 ? BS_TITRANT_STOCK : BS_TITRANT_SUGGEST;
			l->stock_mM = it->stock_mM > 0 ? it->stock_mM : BS_TITRANT_STOCK_mM;
		} else {
			l->how = it->stock_mM > 0 ? BS_STOCK : BS_WEIGH;
			l->stock_mM = it->stock_mM;
		}
		if (l->how == BS_WEIGH) {
			weigh_fmt_mass(l->amount, sizeof l->amount, l->grams);
		} else {
			l->stock_mL = weigh_stock_mL(it->mM, l->stock_mM, volume_mL);
			weigh_fmt_volume(l->amount, sizeof l->amount, l->stock_mL, 0);
			stock_text(l->stock, sizeof l->stock, l->stock_mM);
		}
		split_amount(l);
		if (it->titrant)
			grp[i] = G_TITRANT;
		else if (b->bicarbonate && yields(it->c, "Ca2+"))
			grp[i] = G_CALCIUM;
		else if (strcmp(it->c->kind, "nucleotide") == 0)
			grp[i] = G_NUCLEOTIDE;
		else
			grp[i] = l->how == BS_STOCK ? G_STOCK : G_SOLID;
	}

	/* the order of work */
	char vol[32];
	weigh_fmt_volume(vol, sizeof vol, volume_mL, 1);
	add_step(b, xfmt("Put about 80 %% of the final volume of ultrapure water in a beaker"
			 " with a stir bar."));
	int stepof[G_N];
	for (int g = 0; g < G_N; g++)
		stepof[g] = -1;
	int has[G_N] = { 0 };
	for (int i = 0; i < s->n; i++)
		has[grp[i]] = 1;
	if (has[G_SOLID])
		stepof[G_SOLID] = add_step(b, xfmt("Weigh and dissolve the solids, one at a time"
						   " (amounts under 1 g on a 0.1 mg balance)."));
	if (has[G_STOCK])
		stepof[G_STOCK] = add_step(b, xfmt("Pipette the stock solutions."));
	if (b->bicarbonate) {
		if (b->co2_frac > 0)
			add_step(b, xfmt("Gas with %.3g %% CO2 (the balance O2) until saturated, commonly"
					 " 15 to 30 min, and keep gassing from here on.",
					 100 * b->co2_frac));
		else
			add_step(b, xfmt("Gas with the CO2 mixture this saline is made for until"
					 " saturated, commonly 15 to 30 min, and keep gassing from"
					 " here on."));
		if (has[G_CALCIUM])
			stepof[G_CALCIUM] = add_step(b, xfmt("Only now, while gassing, add the calcium"
							     " (calcium carbonate precipitates in an"
							     " ungassed bicarbonate saline)."));
	}
	if (has[G_NUCLEOTIDE])
		stepof[G_NUCLEOTIDE] = add_step(b, xfmt("On ice from here: add the ATP and GTP fresh,"
							" weighed or thawed just before use."));
	if (has[G_TITRANT] || isfinite(b->ph_target)) {
		char tp[48] = "";
		if (isfinite(b->ph_target))
			snprintf(tp, sizeof tp, " to pH %.2f at %.1f C", b->ph_target,
				 t_rec_C);
		stepof[G_TITRANT] = add_step(b, xfmt("Titrate%s with a calibrated pH meter, before"
						     " making up to volume; the amount below is a"
						     " start, add it in portions.", tp));
	} else if (b->bicarbonate) {
		add_step(b, xfmt("Check the pH while gassing (it is set by the CO2 and the"
				 " bicarbonate; do not titrate a gassed saline with strong acid or"
				 " base)."));
	}
	add_step(b, xfmt("Make up to %s with water (volumetric flask or cylinder) and mix.", vol));
	if (b->nucleotides)
		add_step(b, xfmt("Filter (0.2 micron), aliquot, keep on ice or frozen."));
	for (int i = 0; i < s->n; i++)
		b->lines[i].step = stepof[grp[i]];
	/* stable order of work: by step, then as added */
	bs_line *sorted = im_xcalloc((size_t)s->n, sizeof *sorted);
	int k = 0;
	for (int st_i = 0; st_i < b->nsteps; st_i++)
		for (int i = 0; i < s->n; i++)
			if (b->lines[i].step == st_i)
				sorted[k++] = b->lines[i];
	free(b->lines);
	b->lines = sorted;
	b->n = k;
	free(grp);

	/* the final checks */
	if (isfinite(b->ph_target))
		add_check(b, xfmt("pH meter, calibrated with two buffers around the target, at"
				  " %.1f C: expected pH %.2f.", t_rec_C, b->ph_target));
	else if (isfinite(b->pH))
		add_check(b, xfmt("pH meter, calibrated, at %.1f C: computed pH %.2f (no target"
				  " set).", t_rec_C, b->pH));
	if (isfinite(b->osm_mOsm_kg))
		add_check(b, xfmt("Osmometer: expected about %.0f mOsm/kg (an estimate; adjust"
				  " with water or the main salt).", b->osm_mOsm_kg));
	else
		add_check(b, xfmt("Osmometer: measure and note the osmolality."));
	return 0;
}

void bs_free(bs_sheet *b)
{
	for (int i = 0; i < b->nsteps; i++)
		free(b->steps[i]);
	for (int i = 0; i < b->nchecks; i++)
		free(b->checks[i]);
	free(b->steps);
	free(b->checks);
	free(b->lines);
	memset(b, 0, sizeof *b);
}

/* ---- HTML ---- */

static void esc(FILE *fp, const char *s)
{
	for (; *s; s++) {
		switch (*s) {
		case '&': fputs("&amp;", fp); break;
		case '<': fputs("&lt;", fp); break;
		case '>': fputs("&gt;", fp); break;
		case '"': fputs("&quot;", fp); break;
		default: fputc(*s, fp);
		}
	}
}

/* "uL" as "µL" for the page. */
static void esc_amount(FILE *fp, const char *s)
{
	const char *u = strstr(s, "uL");
	if (u) {
		fprintf(fp, "%.*s\xc2\xb5L", (int)(u - s), s);
		esc(fp, u + 2);
	} else {
		esc(fp, s);
	}
}

static const char *css =
	"@page { margin: 12mm; }\n"
	"* { box-sizing: border-box; }\n"
	"body { font-family: \"DejaVu Sans\", \"Liberation Sans\", Arial, sans-serif;"
	" font-size: 9.5pt; line-height: 1.3; color: #000; background: #fff;"
	" max-width: 186mm; margin: 8mm auto; }\n"
	"h1 { font-size: 15pt; margin: 0 0 1mm; }\n"
	"h2 { font-size: 11pt; margin: 4mm 0 1.5mm; border-bottom: 1pt solid #000; }\n"
	"table { border-collapse: collapse; width: 100%; }\n"
	"th, td { padding: 0.9mm 1.5mm; text-align: left; vertical-align: top; }\n"
	"table.work th { border-bottom: 1pt solid #000; font-size: 8.5pt; }\n"
	"table.work td { border-bottom: 0.4pt solid #999; }\n"
	"td.num, th.num { text-align: right; white-space: nowrap;"
	" font-variant-numeric: tabular-nums; }\n"
	"td.name, td.v { white-space: nowrap; }\n"
	"td.amt { font-weight: bold; font-size: 10.5pt; }\n"
	"tr.step td { background: #e8e8e8; font-weight: bold; border-bottom: 0.4pt solid #666; }\n"
	"td.tick { width: 6mm; }\n"
	".box { display: inline-block; width: 3.6mm; height: 3.6mm; border: 0.9pt solid #000;"
	" vertical-align: middle; }\n"
	"table.meta td { padding: 0.4mm 4mm 0.4mm 0; }\n"
	"table.meta td.k { color: #333; white-space: nowrap; }\n"
	".fill { display: inline-block; min-width: 24mm; border-bottom: 0.6pt solid #000; }\n"
	".cols { display: flex; gap: 6mm; }\n"
	".cols > div { flex: 1; }\n"
	"ul.checks { list-style: none; padding: 0; margin: 0; }\n"
	"ul.checks li { margin: 0 0 1.2mm; }\n"
	".caution { border: 1.2pt solid #000; padding: 1.5mm 2.5mm; margin-top: 3mm; }\n"
	".caution p { margin: 0.6mm 0; }\n"
	".foot { font-size: 7.5pt; color: #333; margin-top: 3mm; }\n"
	"@media print { body { margin: 0 auto; } tr { break-inside: avoid; } }\n";

static void meta_row(FILE *fp, const char *k, const char *v, int fill)
{
	fputs("<tr><td class=\"k\">", fp);
	esc(fp, k);
	fputs("</td><td>", fp);
	if (v)
		esc(fp, v);
	if (fill)
		fputs("<span class=\"fill\">&#160;</span>", fp);
	fputs("</td></tr>\n", fp);
}

static const char *how_note(const bs_line *l, char *buf, size_t n)
{
	switch (l->how) {
	case BS_STOCK:
		snprintf(buf, n, "of the %s stock", l->stock);
		break;
	case BS_TITRANT_STOCK:
		snprintf(buf, n, "of the %s stock to start (%.3g mmol); finish with the pH meter",
			 l->stock, l->mmol);
		break;
	case BS_TITRANT_SUGGEST:
		snprintf(buf, n, "of a %s stock (suggested; %.3g mmol); finish with the pH meter",
			 l->stock, l->mmol);
		break;
	default:
		if (l->grams < WEIGH_MIN_GOOD_g)
			snprintf(buf, n, "under 10 mg: better from a stock");
		else
			buf[0] = '\0';
	}
	return buf;
}

void bs_write_html(FILE *fp, const bs_sheet *b, const char *version)
{
	char v[64], t[64];
	fputs("<!DOCTYPE html>\n<html lang=\"en\" xmlns=\"http://www.w3.org/1999/xhtml\">\n"
	      "<head>\n<meta charset=\"utf-8\" />\n<title>Bench sheet: ", fp);
	esc(fp, b->name);
	fputs("</title>\n<style>\n", fp);
	fputs(css, fp);
	fputs("</style>\n</head>\n<body>\n<h1>Bench sheet: ", fp);
	esc(fp, b->name);
	fputs("</h1>\n<div class=\"cols\">\n<div>\n<table class=\"meta\">\n", fp);
	meta_row(fp, "Date", b->date, 0);
	weigh_fmt_volume(v, sizeof v, b->volume_mL, 1);
	meta_row(fp, "Final volume", v, 0);
	snprintf(t, sizeof t, "%.1f \xc2\xb0""C", b->t_rec_C);
	meta_row(fp, "Recording temperature", t, 0);
	if (isfinite(b->t_prep_C)) {
		snprintf(t, sizeof t, "%.1f \xc2\xb0""C", b->t_prep_C);
		meta_row(fp, "Preparation temperature", t, 0);
	} else {
		meta_row(fp, "Preparation temperature", NULL, 1);
	}
	meta_row(fp, "Made by", NULL, 1);
	fputs("</table>\n</div>\n<div>\n<table class=\"meta\">\n"
	      "<tr><td class=\"k\">Target</td><td>computed</td><td>measured</td></tr>\n", fp);
	if (isfinite(b->ph_target) || isfinite(b->pH)) {
		fprintf(fp, "<tr><td class=\"k\">pH at %.1f \xc2\xb0""C</td><td>%.2f%s</td>"
			"<td><span class=\"fill\">&#160;</span></td></tr>\n", b->t_rec_C,
			isfinite(b->ph_target) ? b->ph_target : b->pH,
			isfinite(b->ph_target) ? " (target)" : "");
	}
	if (isfinite(b->free_ca_mM)) {
		units_fmt_conc(t, sizeof t, b->free_ca_mM, 1);
		fputs("<tr><td class=\"k\">free Ca<sup>2+</sup></td><td>", fp);
		esc(fp, t);
		units_fmt_conc(t, sizeof t, b->total_ca_mM, 1);
		fputs(" (of ", fp);
		esc(fp, t);
		fputs(")</td><td>-</td></tr>\n", fp);
	}
	if (isfinite(b->osm_mOsm_kg))
		fprintf(fp, "<tr><td class=\"k\">Osmolality</td><td class=\"v\">about %.0f mOsm/kg</td>"
			"<td><span class=\"fill\">&#160;</span></td></tr>\n", b->osm_mOsm_kg);
	fputs("</table>\n</div>\n</div>\n", fp);

	fputs("<h2>Order of work</h2>\n<table class=\"work\">\n<thead><tr><th></th>"
	      "<th>Compound</th><th class=\"num\">Final</th><th class=\"num\">FW g/mol</th>"
	      "<th class=\"num\">Weigh or pipette</th><th>Note</th></tr></thead>\n<tbody>\n", fp);
	for (int s = 0; s < b->nsteps; s++) {
		fprintf(fp, "<tr class=\"step\"><td class=\"tick\"><span class=\"box\"></span></td>"
			"<td colspan=\"5\">%d. ", s + 1);
		esc(fp, b->steps[s]);
		fputs("</td></tr>\n", fp);
		for (int i = 0; i < b->n; i++) {
			const bs_line *l = &b->lines[i];
			char conc[32], note[160];
			if (l->step != s)
				continue;
			units_fmt_conc(conc, sizeof conc, l->mM, 1);
			fputs("<tr><td class=\"tick\"><span class=\"box\"></span></td><td class=\"name\">", fp);
			esc(fp, l->c->name);
			fputs("</td><td class=\"num\">", fp);
			esc(fp, conc);
			fprintf(fp, "</td><td class=\"num\">%.2f</td><td class=\"num amt\">",
				l->fw_g_mol);
			esc_amount(fp, l->amount);
			fputs("</td><td>", fp);
			esc(fp, how_note(l, note, sizeof note));
			fputs("</td></tr>\n", fp);
		}
	}
	fputs("</tbody>\n</table>\n", fp);

	fputs("<h2>Final checks</h2>\n<ul class=\"checks\">\n", fp);
	for (int i = 0; i < b->nchecks; i++) {
		fputs("<li><span class=\"box\"></span> ", fp);
		esc(fp, b->checks[i]);
		fputs("</li>\n", fp);
	}
	fputs("</ul>\n", fp);

	fputs("<div class=\"caution\">\n<p><strong>Cautions.</strong> Wear eye protection and"
	      " gloves; read the safety data sheet of each compound and follow your local"
	      " chemical-safety rules.</p>\n", fp);
	for (int i = 0; i < b->n; i++) {
		const rd_compound *c = b->lines[i].c;
		int seen = 0;
		for (int j = 0; j < i; j++)
			seen |= b->lines[j].c == c;
		if (!c->hazard || seen)
			continue;
		fputs("<p>", fp);
		esc(fp, c->name);
		fputs(": ", fp);
		esc(fp, c->hazard);
		fputs("</p>\n", fp);
	}
	fputs("</div>\n<p class=\"foot\">ionmix ", fp);
	esc(fp, version);
	fprintf(fp, "; amounts for the final volume, computed at %.1f \xc2\xb0""C. The pH,"
		" free Ca<sup>2+</sup> and osmolality are estimates: confirm the pH with a"
		" calibrated meter and the osmolality with an osmometer.</p>\n</body>\n</html>\n",
		b->t_rec_C);
}

/* ---- CSV (RFC 4180) ---- */

static void csv_field(FILE *fp, const char *s, int last)
{
	out_csv_field(fp, s);
	fputs(last ? "\r\n" : ",", fp);
}

void bs_write_csv(FILE *fp, const bs_sheet *b)
{
	static const char *const head[] = {
		"solution", "date", "volume_mL", "step", "compound", "final_mM", "fw_g_mol",
		"action", "amount", "amount_unit", "stock_mM", "mmol", "note"
	};
	for (size_t i = 0; i < IM_COUNT(head); i++)
		csv_field(fp, head[i], i + 1 == IM_COUNT(head));
	for (int i = 0; i < b->n; i++) {
		const bs_line *l = &b->lines[i];
		char vol[32], step[16], mM[32], fw[32], st[32], mmol[32], note[160];
		snprintf(vol, sizeof vol, "%.10g", b->volume_mL);
		snprintf(step, sizeof step, "%d", l->step + 1);
		/* a titrant's amount is an estimate: four figures */
		snprintf(mM, sizeof mM, l->how >= BS_TITRANT_STOCK ? "%.4g" : "%.10g", l->mM);
		snprintf(fw, sizeof fw, "%.2f", l->fw_g_mol);
		snprintf(st, sizeof st, "%.10g", l->stock_mM);
		snprintf(mmol, sizeof mmol, "%.4g", l->mmol);
		csv_field(fp, b->name, 0);
		csv_field(fp, b->date, 0);
		csv_field(fp, vol, 0);
		csv_field(fp, step, 0);
		csv_field(fp, l->c->name, 0);
		csv_field(fp, mM, 0);
		csv_field(fp, fw, 0);
		csv_field(fp, l->how == BS_WEIGH ? "weigh" : l->how == BS_STOCK ? "pipette" :
			  "titrate", 0);
		csv_field(fp, l->amount_num, 0);
		csv_field(fp, l->amount_unit, 0);
		csv_field(fp, l->how == BS_WEIGH ? "" : st, 0);
		csv_field(fp, mmol, 0);
		csv_field(fp, how_note(l, note, sizeof note), 1);
	}
}
