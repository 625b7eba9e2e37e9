/*
 * cmd_sweep.c - the `sweep` command: parse the words, run sweep.c, and
 * show the result as a table with a terminal plot, one JSON object, an
 * SVG plot and a CSV table (the files through one fio_batch: both or
 * neither).  The plots are plot.c's, as for `iv`.
 *
 *   sweep COMPOUND FROM to TO [UNIT] [in SOLUTION] show QUANTITY [activities]
 *         [keep-pH] [points N] [svg FILE] [csv FILE] [plain]
 *   sweep temp FROM to TO [C] [in SOLUTION] show QUANTITY ...
 *
 * QUANTITY: pH | free METAL | osmolality | ionic-strength
 *         | nernst ION INSIDE OUTSIDE | ljp PIPETTE BATH
 *         | erev INSIDE OUTSIDE ION=P [ION=P ...]
 * The compound is varied in SOLUTION (default: the current solution), on a
 * copy; one-solution quantities read that solution.  Other amounts stay as
 * made, the titrant too, unless keep-pH titrates the varied solution again
 * to its target pH at each point.
 */
#include "cmd_sweep.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "session.h"
#include "common.h"
#include "fileio.h"
#include "plot.h"
#include "render.h"
#include "sweep.h"
#include "units.h"

static const char USAGE[] =
	"usage: sweep COMPOUND|temp FROM to TO [UNIT] [in SOLUTION] show QUANTITY "
	"[points N] [svg FILE] [csv FILE] [plain]";

static const char QUANTITIES[] =
	"pH, free METAL, osmolality, ionic-strength, nernst ION INSIDE OUTSIDE, "
	"ljp PIPETTE BATH, erev INSIDE OUTSIDE ION=P ...";

typedef struct sw_opts {
	const char *svg, *csv;
	int plain;
	int have_show;
} sw_opts;

/* Words that end a quantity's arguments. */
static int is_keyword(const char *w)
{
	static const char *const kw[] = {"points", "svg", "csv", "plain", "in",
					 "activities", "show", "keep-pH"};
	for (size_t i = 0; i < IM_COUNT(kw); i++)
		if (strcmp(w, kw[i]) == 0)
			return 1;
	return 0;
}

static int solution_arg(im_ctx *ctx, const char *name, const solution **s,
			char *err)
{
	solution *x;
	if (ses_solution(ctx->ses, name, &x, err))
		return -1;
	*s = x;
	return 0;
}

static int ion_arg(im_ctx *ctx, const char *name, const rd_ion **ion, char *err)
{
	*ion = refdb_ion(ctx->ses->ref, name);
	if (!*ion)
		return im_fail(err, "unknown ion '%.40s' (a symbol like K, Na, Cl, Ca)",
			       name);
	return 0;
}

/* How many words after i (up to a keyword) belong to the quantity. */
static int args_after(int argc, char **argv, int i)
{
	int n = 0;
	while (i + 1 + n < argc && !is_keyword(argv[i + 1 + n]))
		n++;
	return n;
}

/* One ION=P of `show erev` (relative or cm/s alike: E_rev depends on
 * ratios only), appended to sp. */
static int erev_perm(im_ctx *ctx, const char *arg, sweep_spec *sp, char *err)
{
	const char *eq = strchr(arg, '=');
	char name[32], num[64];
	size_t len = (size_t)(eq - arg), vl = strlen(eq + 1);
	double P;
	if (len == 0 || len >= sizeof name)
		return im_fail(err, "expected ION=P, got '%.40s'", arg);
	memcpy(name, arg, len);
	name[len] = '\0';
	if (sp->nperm == SWEEP_MAX_PERM)
		return im_fail(err, "at most %d permeabilities", SWEEP_MAX_PERM);
	if (ion_arg(ctx, name, &sp->perm_ion[sp->nperm], err))
		return -1;
	if (sp->perm_ion[sp->nperm]->z == 0)
		return im_fail(err, "%s is neutral: it carries no current",
			       sp->perm_ion[sp->nperm]->symbol);
	for (int j = 0; j < sp->nperm; j++)
		if (sp->perm_ion[j] == sp->perm_ion[sp->nperm])
			return im_fail(err, "%s is given twice", sp->perm_ion[j]->symbol);
	if (vl > 4 && strcmp(eq + 1 + vl - 4, "cm/s") == 0)
		vl -= 4;
	if (vl == 0 || vl >= sizeof num)
		return im_fail(err, "'%.40s': P is not a number", arg);
	memcpy(num, eq + 1, vl);
	num[vl] = '\0';
	if (units_number(num, &P, err))
		return -1;
	if (P < 0)
		return im_fail(err, "permeability of %s is negative",
			       sp->perm_ion[sp->nperm]->symbol);
	sp->perm[sp->nperm++] = P;
	return 0;
}

/* `show erev INSIDE OUTSIDE ION=P [ION=P ...]` from argv[i] ("erev"). */
static int erev_quantity(im_ctx *ctx, int argc, char **argv, int i, sweep_spec *sp,
			 int *next, char *err)
{
	int k = i + 3;
	if (args_after(argc, argv, i) < 2 || strchr(argv[i + 1], '=') ||
	    strchr(argv[i + 2], '='))
		return im_fail(err, "a reversal potential needs a pair: show erev "
			       "INSIDE OUTSIDE ION=P [ION=P ...]");
	if (solution_arg(ctx, argv[i + 1], &sp->inside, err) ||
	    solution_arg(ctx, argv[i + 2], &sp->outside, err))
		return -1;
	for (; k < argc && strchr(argv[k], '='); k++)
		if (erev_perm(ctx, argv[k], sp, err))
			return -1;
	if (sp->nperm == 0)
		return im_fail(err, "give the permeabilities: show erev INSIDE "
			       "OUTSIDE K=1 Na=0.04");
	sp->qty = SWQ_EREV;
	*next = k;
	return 0;
}

/* `show QUANTITY ...` from argv[i] (the quantity's name); *next is the
 * first word after it. */
static int parse_quantity(im_ctx *ctx, int argc, char **argv, int i,
			  sweep_spec *sp, int *next, char *err)
{
	const char *q = argv[i];
	int n = args_after(argc, argv, i);
	if (im_strcaseeq(q, "pH") || im_strcaseeq(q, "osmolality") ||
	    im_strcaseeq(q, "ionic-strength")) {
		sp->qty = im_strcaseeq(q, "pH") ? SWQ_PH
			: im_strcaseeq(q, "osmolality") ? SWQ_OSMOLALITY
			: SWQ_IONIC_STRENGTH;
		*next = i + 1;
		return 0;
	}
	if (im_strcaseeq(q, "free")) {
		if (n < 1)
			return im_fail(err, "free needs a metal: show free Ca (or Mg, "
				       "Ba, Sr, Zn)");
		if (ion_arg(ctx, argv[i + 1], &sp->ion, err))
			return -1;
		sp->qty = SWQ_FREE;
		*next = i + 2;
		return 0;
	}
	if (im_strcaseeq(q, "nernst")) {
		if (n < 3)
			return im_fail(err, "an equilibrium potential needs an ion and a "
				       "pair: show nernst ION INSIDE OUTSIDE");
		if (ion_arg(ctx, argv[i + 1], &sp->ion, err) ||
		    solution_arg(ctx, argv[i + 2], &sp->inside, err) ||
		    solution_arg(ctx, argv[i + 3], &sp->outside, err))
			return -1;
		sp->qty = SWQ_NERNST;
		*next = i + 4;
		return 0;
	}
	if (im_strcaseeq(q, "ljp")) {
		if (n < 2)
			return im_fail(err, "the LJP needs a pair: show ljp PIPETTE BATH");
		if (solution_arg(ctx, argv[i + 1], &sp->inside, err) ||
		    solution_arg(ctx, argv[i + 2], &sp->outside, err))
			return -1;
		sp->qty = SWQ_LJP;
		*next = i + 3;
		return 0;
	}
	if (im_strcaseeq(q, "erev"))
		return erev_quantity(ctx, argc, argv, i, sp, next, err);
	return im_fail(err, "unknown quantity '%.40s' (one of: %s)", q, QUANTITIES);
}

/* The range: FROM to TO [UNIT], from argv[2]; *next is the word after. */
static int parse_range(int argc, char **argv, sweep_spec *sp, int *next,
		       char *err)
{
	double a, b, per = 1.0;
	if (argc < 5 || strcmp(argv[3], "to") != 0)
		return im_fail(err, "%s", USAGE);
	if (units_number(argv[2], &a, err) || units_number(argv[4], &b, err))
		return -1;
	*next = 5;
	if (sp->var == SWEEP_TEMP) {
		if (argc > 5 && (strcmp(argv[5], "C") == 0 || strcmp(argv[5], "\u00b0C") == 0))
			*next = 6;
	} else if (argc > 5 && units_is_unit(argv[5])) {
		/* the unit as a factor: what 1 UNIT is in mM */
		if (units_amount_mM("1", argv[5], sp->compound->fw_g_mol, &per, err))
			return -1;
		*next = 6;
	}
	sp->from = a * per;
	sp->to = b * per;
	return 0;
}

/* A display scale for mM quantities: mM, uM or nM by the largest value. */
static double conc_scale(const sweep_result *r, int utf8, const char **unit)
{
	double m = 0;
	for (int i = 0; i < r->n; i++)
		if (isfinite(r->y[i]) && fabs(r->y[i]) > m)
			m = fabs(r->y[i]);
	if (m >= 1.0 || m == 0) {
		*unit = "mM";
		return 1.0;
	}
	if (m >= 1e-3) {
		*unit = utf8 ? "\u00b5M" : "uM";
		return 1e3;
	}
	*unit = "nM";
	return 1e6;
}

/* Digits a value of this quantity deserves in the table, as the single
 * commands print it: pH to 0.01 and osmolality to 1 mOsm/kg (show), the
 * LJP to 0.1 mV (junction), potentials to 0.01 mV (nernst, erev); the
 * CSV and JSON keep every digit for other programs. */
static void fmt_y(char *b, size_t n, sweep_qty q, double v)
{
	switch (q) {
	case SWQ_PH:
		snprintf(b, n, "%.2f", v);
		break;
	case SWQ_OSMOLALITY:
		snprintf(b, n, "%.0f", v);
		break;
	case SWQ_LJP:
		snprintf(b, n, "%+.1f", v);
		break;
	case SWQ_NERNST: case SWQ_EREV:
		snprintf(b, n, "%+.2f", v);
		break;
	default:
		units_fmt_sig(b, n, v, 4);
	}
}

/* Unit as a column-name suffix: "mOsm/kg" -> "_mOsm_kg", "" -> "". */
static void unit_suffix(char *b, size_t n, const char *unit)
{
	size_t k = 0;
	if (!unit[0]) {
		b[0] = '\0';
		return;
	}
	b[k++] = '_';
	for (; *unit && k + 1 < n; unit++)
		b[k++] = *unit == '/' ? '_' : *unit;
	b[k] = '\0';
}

static int write_csv(FILE *fp, const sweep_spec *sp, const sweep_result *r,
		     char *err)
{
	char h[160], u[32];
	if (sp->var == SWEEP_TEMP)
		snprintf(h, sizeof h, "temperature_C");
	else
		snprintf(h, sizeof h, "%.60s_mM", sp->compound->name);
	out_csv_field(fp, h);
	unit_suffix(u, sizeof u, r->y_unit);
	snprintf(h, sizeof h, "%.60s%s", r->y_key, u);
	fputc(',', fp);
	out_csv_field(fp, h);
	fputs(",failure\r\n", fp);
	for (int i = 0; i < r->n; i++) {
		fprintf(fp, "%.10g,", r->x[i]);
		if (r->why[i]) {
			fputc(',', fp);
			out_csv_field(fp, r->why[i]);
		} else {
			fprintf(fp, "%.10g,", r->y[i]);
		}
		fputs("\r\n", fp);
	}
	if (ferror(fp))
		return im_fail(err, "write error");
	return 0;
}

/* What a sweep works with: the spec, the result, and what the plot and
 * the table show. */
typedef struct sw_work {
	sweep_spec sp;
	sweep_result r;
	sw_opts o;
	double *px, *py, f;    /* f: the table's and plot's scale of y */
	int np, nn, utf8;
	const char *yunit, *yunit_svg;
	char xlab[128], ylab[160], ylab_svg[160], title[224], cond[5][120];
	const char *notes[5];
	plot_curve c;
	plot_opts po;
} sw_work;

/* What is varied (COMPOUND or temp), its range, and the solution `in`
 * names (read first: the quantity may need it); *i is the next word. */
static int sw_target(im_ctx *ctx, int argc, char **argv, sw_work *w, int *i, char *err)
{
	const char *in_name = NULL;
	const solution *in_sol = NULL;
	if (argc < 7)
		return im_fail(err, "%s", USAGE);
	if (im_strcaseeq(argv[1], "temp") || im_strcaseeq(argv[1], "temperature")) {
		w->sp.var = SWEEP_TEMP;
	} else {
		w->sp.var = SWEEP_AMOUNT;
		if (ses_compound(ctx->ses, argv[1], &w->sp.compound, err))
			return -1;
	}
	if (parse_range(argc, argv, &w->sp, i, err))
		return -1;
	for (int k = *i; k < argc; k++)
		if (strcmp(argv[k], "in") == 0) {
			if (k + 1 >= argc)
				return im_fail(err, "'in' needs a solution name");
			in_name = argv[k + 1];
		}
	if (solution_arg(ctx, in_name, &in_sol, err))
		return -1;
	w->sp.target = w->sp.var == SWEEP_AMOUNT ? in_sol : NULL;
	w->sp.sol = in_sol;
	return 0;
}

/* `points N`. */
static int sw_points(int argc, char **argv, int i, sweep_spec *sp, char *err)
{
	double n;
	if (i + 1 >= argc)
		return im_fail(err, "'points' needs a number");
	if (units_number(argv[i + 1], &n, err))
		return -1;
	if (n != floor(n) || n < 2 || n > SWEEP_MAX_PTS)
		return im_fail(err, "points: '%.20s' is not a whole number from 2 to %d",
			       argv[i + 1], SWEEP_MAX_PTS);
	sp->npts = (int)n;
	return 0;
}

/* One option word at argv[*i]; *i moves past it and its arguments. */
static int sw_option(im_ctx *ctx, int argc, char **argv, sw_work *w, int *i, char *err)
{
	const char *a = argv[*i];
	int step = 1;
	if (strcmp(a, "in") == 0) {
		step = 2;
	} else if (strcmp(a, "show") == 0) {
		if (w->o.have_show)
			return im_fail(err, "one quantity per sweep ('show' twice)");
		if (*i + 1 >= argc || is_keyword(argv[*i + 1]))
			return im_fail(err, "'show' needs a quantity: %s", QUANTITIES);
		w->o.have_show = 1;
		return parse_quantity(ctx, argc, argv, *i + 1, &w->sp, i, err);
	} else if (strcmp(a, "activities") == 0) {
		w->sp.activities = 1;
	} else if (im_strcaseeq(a, "keep-pH")) {
		w->sp.keep_pH = 1;
	} else if (strcmp(a, "plain") == 0) {
		w->o.plain = 1;
	} else if (strcmp(a, "points") == 0) {
		if (sw_points(argc, argv, *i, &w->sp, err))
			return -1;
		step = 2;
	} else if (strcmp(a, "svg") == 0 || strcmp(a, "csv") == 0) {
		if (*i + 1 >= argc)
			return im_fail(err, "'%s' needs a file name", a);
		*(a[0] == 's' ? &w->o.svg : &w->o.csv) = argv[*i + 1];
		step = 2;
	} else {
		return im_fail(err, "unexpected '%.40s' (expected show, in, points, svg, csv,"
			       " plain, activities or keep-pH)", a);
	}
	*i += step;
	return 0;
}

static int sw_words(im_ctx *ctx, int argc, char **argv, sw_work *w, char *err)
{
	int i = 0;
	w->sp.npts = SWEEP_DEFAULT_PTS;
	if (sw_target(ctx, argc, argv, w, &i, err))
		return -1;
	while (i < argc)
		if (sw_option(ctx, argc, argv, w, &i, err))
			return -1;
	if (!w->o.have_show)
		return im_fail(err, "what should the sweep follow? add 'show QUANTITY' (%s)",
			       QUANTITIES);
	if (w->sp.activities && w->sp.qty != SWQ_NERNST && w->sp.qty != SWQ_LJP &&
	    w->sp.qty != SWQ_EREV)
		return im_fail(err, "'activities' applies to nernst, ljp and erev only");
	if (w->o.svg && w->o.csv &&
	    (strcmp(w->o.svg, w->o.csv) == 0 || fio_same_file(w->o.svg, w->o.csv)))
		return im_fail(err, "the SVG and the CSV cannot be the same file");
	return 0;
}

/* The conditions printed above the table and in the plot's legend. */
static void sw_conditions(sw_work *w, double t_C)
{
	const sweep_spec *sp = &w->sp;
	char (*cond)[120] = w->cond;
	int nn = 0;
	if (sp->var == SWEEP_AMOUNT)
		snprintf(cond[nn++], sizeof cond[0], "at %.1f C", t_C);
	if (sp->qty == SWQ_EREV) {
		size_t len = 0;
		cond[nn][0] = '\0';
		for (int k = 0; k < sp->nperm && len < sizeof cond[0]; k++)
			len += snprintf(cond[nn] + len, sizeof cond[0] - len, "%sP(%s) %g",
					k ? ", " : "", sp->perm_ion[k]->symbol, sp->perm[k]);
		nn++;
	}
	if (sp->qty == SWQ_NERNST || sp->qty == SWQ_LJP || sp->qty == SWQ_EREV)
		snprintf(cond[nn++], sizeof cond[0], "from %s%s",
			 sp->activities ? "activities" : "concentrations",
			 sp->qty == SWQ_LJP ? ", Henderson" : "");
	if (sp->keep_pH)
		snprintf(cond[nn++], sizeof cond[0], "pH titrated again each point");
	else if (sp->var == SWEEP_AMOUNT)
		snprintf(cond[nn++], sizeof cond[0], "amounts and titrant as made");
	for (int k = 0; k < nn; k++)
		w->notes[k] = cond[k];
	w->nn = nn;
}

/* What the plot and the table show: the scale, the points computed, the
 * labels and the plot options. */
static void sw_display(sw_work *w, int utf8_out, double t_C)
{
	const sweep_result *r = &w->r;
	w->utf8 = utf8_out && !w->o.plain;
	w->yunit = w->yunit_svg = r->y_unit;
	w->f = 1.0;
	if (strcmp(r->y_unit, "mM") == 0) {
		w->f = conc_scale(r, w->utf8, &w->yunit);
		conc_scale(r, 1, &w->yunit_svg);
	}
	w->px = im_xmalloc((size_t)r->n * sizeof *w->px);
	w->py = im_xmalloc((size_t)r->n * sizeof *w->py);
	for (int k = 0; k < r->n; k++)
		if (!r->why[k]) {
			w->px[w->np] = r->x[k];
			w->py[w->np++] = w->f * r->y[k];
		}
	snprintf(w->xlab, sizeof w->xlab, "%s (%s)", r->x_name,
		 w->sp.var == SWEEP_TEMP ? (w->utf8 ? "\u00b0C" : "C") : "mM");
	snprintf(w->ylab, sizeof w->ylab, "%s%s%s%s", r->y_name, w->yunit[0] ? " (" : "",
		 w->yunit, w->yunit[0] ? ")" : "");
	snprintf(w->ylab_svg, sizeof w->ylab_svg, "%s%s%s%s", r->y_name,
		 w->yunit[0] ? " (" : "", w->yunit[0] ? w->yunit_svg : "", w->yunit[0] ? ")" : "");
	snprintf(w->title, sizeof w->title, "sweep: %s over %s", r->y_name, r->x_name);
	sw_conditions(w, t_C);
	w->c = (plot_curve){r->y_short, w->px, w->py, w->np};
	plot_opts_init(&w->po);
	w->po.y_free = 1;
	w->po.x_label = w->xlab;
	w->po.notes = w->notes;
	w->po.nnotes = w->nn;
}

/* The SVG and CSV files: both, or neither. */
static int sw_files(const sw_work *w, char *err)
{
	fio_batch b;
	FILE *fp;
	if (w->o.svg && w->np < 2)
		return im_fail(err, "only %d point could be computed: no plot to write (first"
			       " failure: %.120s)", w->np, w->r.why[w->r.why[0] ? 0 : 1]);
	if (!w->o.svg && !w->o.csv)
		return 0;
	fio_batch_init(&b);
	if (w->o.svg) {
		plot_opts ps = w->po;
		ps.utf8 = 1;
		ps.title = w->title;
		ps.y_label = w->ylab_svg;
		if (fio_batch_open(&b, w->o.svg, &fp, err) || plot_svg(fp, &w->c, 1, &ps, err))
			goto fail;
	}
	if (w->o.csv && (fio_batch_open(&b, w->o.csv, &fp, err) ||
			 write_csv(fp, &w->sp, &w->r, err)))
		goto fail;
	return fio_batch_commit(&b, err);
fail:
	fio_batch_abort(&b);
	return -1;
}

static void sw_json(render *rd, double t_C, const sw_work *w)
{
	const sweep_spec *sp = &w->sp;
	const sweep_result *r = &w->r;
	int pair = sp->qty == SWQ_NERNST || sp->qty == SWQ_LJP || sp->qty == SWQ_EREV;
	render_str(rd, "sweep", NULL, sp->var == SWEEP_TEMP ? "temperature" : "amount");
	if (sp->var != SWEEP_TEMP) {
		render_str(rd, "compound", NULL, sp->compound->name);
		render_str(rd, "solution", NULL, sp->target->name);
		render_numj(rd, "temperature_C", NULL, NULL, t_C, 0, 6);
	}
	render_str(rd, "quantity", NULL, r->y_key);
	render_str(rd, "x_unit", NULL, r->x_unit);
	render_str(rd, "y_unit", NULL, r->y_unit);
	render_str(rd, "x_name", NULL, r->x_name);
	render_str(rd, "y_name", NULL, r->y_name);
	if (pair) {
		render_str(rd, "inside", NULL, sp->inside->name);
		render_str(rd, "outside", NULL, sp->outside->name);
		render_str(rd, "from", NULL, sp->activities ? "activities" : "concentrations");
	}
	if (sp->qty == SWQ_EREV) {
		render_object(rd, "permeabilities");
		for (int k = 0; k < sp->nperm; k++)
			render_numj(rd, sp->perm_ion[k]->symbol, NULL, NULL, sp->perm[k], 0, 10);
		render_object_end(rd);
	}
	render_table(rd, "points", NULL);
	for (int k = 0; k < r->n; k++) {
		render_row(rd);
		render_numj(rd, "x", NULL, NULL, r->x[k], 0, 10);
		if (r->why[k]) {
			render_null(rd, "y", NULL);
			render_str(rd, "failure", NULL, r->why[k]);
		} else {
			render_numj(rd, "y", NULL, NULL, r->y[k], 0, 10);
		}
	}
	render_table_end(rd);
	render_int(rd, "failed_points", NULL, r->nfail);
	render_bool(rd, "keep_pH", NULL, sp->keep_pH);
	if (isfinite(r->pH_lo)) {
		render_numj(rd, "pH_min", NULL, NULL, r->pH_lo, 0, 6);
		render_numj(rd, "pH_max", NULL, NULL, r->pH_hi, 0, 6);
	}
	if (w->o.svg)
		render_str(rd, "svg", NULL, w->o.svg);
	if (w->o.csv)
		render_str(rd, "csv", NULL, w->o.csv);
}

/* The text: conditions, the table, and the pH note. */
static void sw_text_table(render *rd, const sw_work *w)
{
	const sweep_spec *sp = &w->sp;
	const sweep_result *r = &w->r;
	char xb[96], yb[96];
	render_text(rd, "sweep: %s over %s, %g to %g %s, %d points", r->y_name, r->x_name,
		    sp->from, sp->to, sp->var == SWEEP_TEMP ? "C" : "mM", r->n);
	for (int k = 0; k < w->nn; k++)
		render_text(rd, "  %s", w->cond[k]);
	snprintf(xb, sizeof xb, "%s %s", sp->var == SWEEP_TEMP ? "temp" : sp->compound->name,
		 sp->var == SWEEP_TEMP ? "C" : "mM");
	snprintf(yb, sizeof yb, "%s%s%s", r->y_key, w->yunit[0] ? " " : "", w->yunit);
	render_text(rd, "  %16s %18s", xb, yb);
	for (int k = 0; k < r->n; k++) {
		fmt_y(yb, sizeof yb, sp->qty, w->f * r->y[k]);
		if (r->why[k])
			render_text(rd, "  %16.6g %18s  (%s)", r->x[k], "-", r->why[k]);
		else
			render_text(rd, "  %16.6g %18s", r->x[k], yb);
	}
	if (r->nfail)
		render_text(rd, "  %d of %d points could not be computed", r->nfail, r->n);
	if (!sp->keep_pH && sp->var == SWEEP_AMOUNT && isfinite(sp->target->ph_target) &&
	    isfinite(r->pH_lo) && r->pH_hi - r->pH_lo > 0.05)
		render_text(rd, "  note: the pH of %s moves from %.2f to %.2f over the sweep (its"
			    " titrant held as made); add keep-pH to titrate it again to pH %.2f at"
			    " each point", sp->target->name, r->pH_lo, r->pH_hi,
			    sp->target->ph_target);
	render_text(rd, "%s", "");
}

/* The terminal plot (the conditions are printed above the table). */
static int sw_text_plot(render *rd, sw_work *w, char *err)
{
	char *buf = NULL;
	size_t len = 0;
	if (w->np < 2) {
		render_text(rd, "  (one point only: no plot)");
		return 0;
	}
	FILE *mem = open_memstream(&buf, &len);
	if (!mem)
		return im_fail(err, "cannot draw the plot: %s", strerror(errno));
	plot_opts po = w->po;
	po.utf8 = w->utf8;
	po.y_label = w->ylab;
	po.notes = NULL;
	po.nnotes = 0;
	int prc = plot_term(mem, &w->c, 1, &po, err);
	fclose(mem);
	if (prc == 0) {
		if (len && buf[len - 1] == '\n')
			buf[len - 1] = '\0';
		render_text(rd, "%s", buf);
	}
	free(buf);
	return prc;
}

/* The closing lines of the text: files written, sign or caution. */
static void sw_text_tail(render *rd, const sw_work *w)
{
	sweep_qty q = w->sp.qty;
	if (w->o.svg)
		render_text(rd, "  wrote %s", w->o.svg);
	if (w->o.csv)
		render_text(rd, "  wrote %s", w->o.csv);
	if (q == SWQ_NERNST || q == SWQ_EREV)
		render_text(rd, "  sign: membrane potential inside relative to outside");
	else if (q == SWQ_LJP)
		render_text(rd, "  sign: the bath relative to the pipette solution; Vm ="
			    " Vrecorded - LJP");
	else if (q == SWQ_PH || q == SWQ_OSMOLALITY)
		render_text(rd, "  estimates: confirm the %s with a calibrated %s",
			    q == SWQ_PH ? "pH" : "osmolality",
			    q == SWQ_PH ? "pH meter" : "osmometer");
}

int cmd_sweep(im_ctx *ctx, int argc, char **argv, char *err)
{
	sw_work *w = im_xcalloc(1, sizeof *w);
	double t_C = ctx->ses->temp_C;
	int rc = -1;
	if (sw_words(ctx, argc, argv, w, err) || sweep_run(&w->sp, ses_env(ctx->ses), &w->r, err))
		goto done;
	sw_display(w, ctx->out->utf8, t_C);
	if (sw_files(w, err))
		goto done;
	render *rd = render_new(ctx->out);
	sw_text_table(rd, w);
	sw_json(rd, t_C, w);
	if (!ctx->out->json && sw_text_plot(rd, w, err)) {
		render_drop(rd);
		goto done;
	}
	sw_text_tail(rd, w);
	render_done(rd);
	rc = 0;
done:
	free(w->px);
	free(w->py);
	sweep_free(&w->r);
	free(w);
	return rc;
}
