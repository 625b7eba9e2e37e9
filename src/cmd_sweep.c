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
	if (im_strcaseeq(q, "erev")) {
		int k = i + 3;
		if (n < 2 || strchr(argv[i + 1], '=') || strchr(argv[i + 2], '='))
			return im_fail(err, "a reversal potential needs a pair: show erev "
				       "INSIDE OUTSIDE ION=P [ION=P ...]");
		if (solution_arg(ctx, argv[i + 1], &sp->inside, err) ||
		    solution_arg(ctx, argv[i + 2], &sp->outside, err))
			return -1;
		for (; k < argc && strchr(argv[k], '='); k++) {
			const char *eq = strchr(argv[k], '=');
			char name[32];
			size_t len = (size_t)(eq - argv[k]);
			double P;
			if (len == 0 || len >= sizeof name)
				return im_fail(err, "expected ION=P, got '%.40s'", argv[k]);
			memcpy(name, argv[k], len);
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
					return im_fail(err, "%s is given twice",
						       sp->perm_ion[j]->symbol);
			/* relative or cm/s alike: E_rev depends on ratios only */
			size_t vl = strlen(eq + 1);
			char num[64];
			if (vl > 4 && strcmp(eq + 1 + vl - 4, "cm/s") == 0)
				vl -= 4;
			if (vl == 0 || vl >= sizeof num)
				return im_fail(err, "'%.40s': P is not a number", argv[k]);
			memcpy(num, eq + 1, vl);
			num[vl] = '\0';
			if (units_number(num, &P, err))
				return -1;
			if (P < 0)
				return im_fail(err, "permeability of %s is negative",
					       sp->perm_ion[sp->nperm]->symbol);
			sp->perm[sp->nperm++] = P;
		}
		if (sp->nperm == 0)
			return im_fail(err, "give the permeabilities: show erev INSIDE "
				       "OUTSIDE K=1 Na=0.04");
		sp->qty = SWQ_EREV;
		*next = k;
		return 0;
	}
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

/* CSV field (RFC 4180): quoted when it holds a comma, quote or line break. */
static void csv_field(FILE *fp, const char *s)
{
	if (!strpbrk(s, ",\"\r\n")) {
		fputs(s, fp);
		return;
	}
	fputc('"', fp);
	for (; *s; s++) {
		if (*s == '"')
			fputc('"', fp);
		fputc(*s, fp);
	}
	fputc('"', fp);
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
	csv_field(fp, h);
	unit_suffix(u, sizeof u, r->y_unit);
	snprintf(h, sizeof h, "%.60s%s", r->y_key, u);
	fputc(',', fp);
	csv_field(fp, h);
	fputs(",failure\r\n", fp);
	for (int i = 0; i < r->n; i++) {
		fprintf(fp, "%.10g,", r->x[i]);
		if (r->why[i]) {
			fputc(',', fp);
			csv_field(fp, r->why[i]);
		} else {
			fprintf(fp, "%.10g,", r->y[i]);
		}
		fputs("\r\n", fp);
	}
	if (ferror(fp))
		return im_fail(err, "write error");
	return 0;
}

int cmd_sweep(im_ctx *ctx, int argc, char **argv, char *err)
{
	sweep_spec sp;
	sweep_result r;
	sw_opts o;
	const char *in_name = NULL;
	const solution *in_sol = NULL;
	int i = 0, rc = -1;
	double *px = NULL, *py = NULL;
	memset(&sp, 0, sizeof sp);
	memset(&r, 0, sizeof r);
	memset(&o, 0, sizeof o);
	sp.npts = SWEEP_DEFAULT_PTS;
	if (argc < 7)
		return im_fail(err, "%s", USAGE);
	if (im_strcaseeq(argv[1], "temp") || im_strcaseeq(argv[1], "temperature")) {
		sp.var = SWEEP_TEMP;
	} else {
		sp.var = SWEEP_AMOUNT;
		if (ses_compound(ctx->ses, argv[1], &sp.compound, err))
			return -1;
	}
	if (parse_range(argc, argv, &sp, &i, err))
		return -1;
	/* `in` first: the quantity may need the solution */
	for (int k = i; k < argc; k++)
		if (strcmp(argv[k], "in") == 0) {
			if (k + 1 >= argc)
				return im_fail(err, "'in' needs a solution name");
			in_name = argv[k + 1];
		}
	if (solution_arg(ctx, in_name, &in_sol, err))
		return -1;
	sp.target = sp.var == SWEEP_AMOUNT ? in_sol : NULL;
	sp.sol = in_sol;
	while (i < argc) {
		const char *a = argv[i];
		if (strcmp(a, "in") == 0) {
			i += 2;
		} else if (strcmp(a, "show") == 0) {
			if (o.have_show)
				return im_fail(err, "one quantity per sweep ('show' twice)");
			if (i + 1 >= argc || is_keyword(argv[i + 1]))
				return im_fail(err, "'show' needs a quantity: %s", QUANTITIES);
			if (parse_quantity(ctx, argc, argv, i + 1, &sp, &i, err))
				return -1;
			o.have_show = 1;
		} else if (strcmp(a, "activities") == 0) {
			sp.activities = 1;
			i++;
		} else if (im_strcaseeq(a, "keep-pH")) {
			sp.keep_pH = 1;
			i++;
		} else if (strcmp(a, "plain") == 0) {
			o.plain = 1;
			i++;
		} else if (strcmp(a, "points") == 0) {
			double n;
			if (i + 1 >= argc)
				return im_fail(err, "'points' needs a number");
			if (units_number(argv[i + 1], &n, err))
				return -1;
			if (n != floor(n) || n < 2 || n > SWEEP_MAX_PTS)
				return im_fail(err, "points: '%.20s' is not a whole number "
					       "from 2 to %d", argv[i + 1], SWEEP_MAX_PTS);
			sp.npts = (int)n;
			i += 2;
		} else if (strcmp(a, "svg") == 0 || strcmp(a, "csv") == 0) {
			if (i + 1 >= argc)
				return im_fail(err, "'%s' needs a file name", a);
			if (a[0] == 's')
				o.svg = argv[i + 1];
			else
				o.csv = argv[i + 1];
			i += 2;
		} else {
			return im_fail(err, "unexpected '%.40s' (expected show, in, points, "
				       "svg, csv, plain, activities or keep-pH)", a);
		}
	}
	if (!o.have_show)
		return im_fail(err, "what should the sweep follow? add 'show "
			       "QUANTITY' (%s)", QUANTITIES);
	if (sp.activities && sp.qty != SWQ_NERNST && sp.qty != SWQ_LJP &&
	    sp.qty != SWQ_EREV)
		return im_fail(err, "'activities' applies to nernst, ljp and erev only");
	if (o.svg && o.csv && (strcmp(o.svg, o.csv) == 0 || fio_same_file(o.svg, o.csv)))
		return im_fail(err, "the SVG and the CSV cannot be the same file");
	if (sweep_run(&sp, ses_env(ctx->ses), &r, err))
		return -1;

	/* what the plot and the table show */
	int utf8 = ctx->out->utf8 && !o.plain;
	const char *yunit = r.y_unit, *yunit_svg = r.y_unit;
	double f = 1.0;
	if (strcmp(r.y_unit, "mM") == 0) {
		f = conc_scale(&r, utf8, &yunit);
		conc_scale(&r, 1, &yunit_svg);
	}
	int np = 0;
	px = im_xmalloc((size_t)r.n * sizeof *px);
	py = im_xmalloc((size_t)r.n * sizeof *py);
	for (int k = 0; k < r.n; k++)
		if (!r.why[k]) {
			px[np] = r.x[k];
			py[np++] = f * r.y[k];
		}
	char xlab[128], ylab[160], ylab_svg[160], title[224], cond[5][120];
	const char *notes[5];
	int nn = 0;
	snprintf(xlab, sizeof xlab, "%s (%s)", r.x_name,
		 sp.var == SWEEP_TEMP ? (utf8 ? "\u00b0C" : "C") : "mM");
	if (yunit[0]) {
		snprintf(ylab, sizeof ylab, "%s (%s)", r.y_name, yunit);
		snprintf(ylab_svg, sizeof ylab_svg, "%s (%s)", r.y_name, yunit_svg);
	} else {
		snprintf(ylab, sizeof ylab, "%s", r.y_name);
		snprintf(ylab_svg, sizeof ylab_svg, "%s", r.y_name);
	}
	snprintf(title, sizeof title, "sweep: %s over %s", r.y_name, r.x_name);
	if (sp.var == SWEEP_AMOUNT)
		snprintf(cond[nn++], sizeof cond[0], "at %.1f C", ctx->ses->temp_C);
	if (sp.qty == SWQ_EREV) {
		size_t len = 0;
		cond[nn][0] = '\0';
		for (int k = 0; k < sp.nperm && len < sizeof cond[0]; k++)
			len += snprintf(cond[nn] + len, sizeof cond[0] - len, "%sP(%s) %g",
					k ? ", " : "", sp.perm_ion[k]->symbol, sp.perm[k]);
		nn++;
	}
	if (sp.qty == SWQ_NERNST || sp.qty == SWQ_LJP || sp.qty == SWQ_EREV)
		snprintf(cond[nn++], sizeof cond[0], "from %s%s",
			 sp.activities ? "activities" : "concentrations",
			 sp.qty == SWQ_LJP ? ", Henderson" : "");
	if (sp.keep_pH)
		snprintf(cond[nn++], sizeof cond[0], "pH titrated again each point");
	else if (sp.var == SWEEP_AMOUNT)
		snprintf(cond[nn++], sizeof cond[0], "amounts and titrant as made");
	for (int k = 0; k < nn; k++)
		notes[k] = cond[k];
	plot_curve c = {r.y_short, px, py, np};
	plot_opts po;
	plot_opts_init(&po);
	po.y_free = 1;
	po.x_label = xlab;
	po.notes = notes;
	po.nnotes = nn;
	if (o.svg && np < 2) {
		im_fail(err, "only %d point could be computed: no plot to write "
			"(first failure: %.120s)", np, r.why[r.why[0] ? 0 : 1]);
		goto done;
	}

	/* the files: both, or neither */
	if (o.svg || o.csv) {
		fio_batch b;
		FILE *fp;
		fio_batch_init(&b);
		if (o.svg) {
			plot_opts ps = po;
			ps.utf8 = 1;
			ps.title = title;
			ps.y_label = ylab_svg;
			if (fio_batch_open(&b, o.svg, &fp, err) ||
			    plot_svg(fp, &c, 1, &ps, err)) {
				fio_batch_abort(&b);
				goto done;
			}
		}
		if (o.csv && (fio_batch_open(&b, o.csv, &fp, err) ||
			      write_csv(fp, &sp, &r, err))) {
			fio_batch_abort(&b);
			goto done;
		}
		if (fio_batch_commit(&b, err))
			goto done;
	}

	if (ctx->out->json) {
		jw w;
		jw_begin(&w, ctx->out);
		if (sp.var == SWEEP_TEMP)
			jw_str(&w, "sweep", "temperature");
		else {
			jw_str(&w, "sweep", "amount");
			jw_str(&w, "compound", sp.compound->name);
			jw_str(&w, "solution", sp.target->name);
			jw_num(&w, "temperature_C", ctx->ses->temp_C, 6);
		}
		jw_str(&w, "quantity", r.y_key);
		jw_str(&w, "x_unit", r.x_unit);
		jw_str(&w, "y_unit", r.y_unit);
		jw_str(&w, "x_name", r.x_name);
		jw_str(&w, "y_name", r.y_name);
		if (sp.qty == SWQ_NERNST || sp.qty == SWQ_LJP || sp.qty == SWQ_EREV) {
			jw_str(&w, "inside", sp.inside->name);
			jw_str(&w, "outside", sp.outside->name);
			jw_str(&w, "from", sp.activities ? "activities" : "concentrations");
		}
		if (sp.qty == SWQ_EREV) {
			jw_obj(&w, "permeabilities");
			for (int k = 0; k < sp.nperm; k++)
				jw_num(&w, sp.perm_ion[k]->symbol, sp.perm[k], 10);
			jw_close(&w);
		}
		jw_arr(&w, "points");
		for (int k = 0; k < r.n; k++) {
			jw_obj(&w, NULL);
			jw_num(&w, "x", r.x[k], 10);
			if (r.why[k]) {
				jw_str(&w, "y", NULL);
				jw_str(&w, "failure", r.why[k]);
			} else {
				jw_num(&w, "y", r.y[k], 10);
			}
			jw_close(&w);
		}
		jw_close(&w);
		jw_int(&w, "failed_points", r.nfail);
		jw_bool(&w, "keep_pH", sp.keep_pH);
		if (isfinite(r.pH_lo)) {
			jw_num(&w, "pH_min", r.pH_lo, 6);
			jw_num(&w, "pH_max", r.pH_hi, 6);
		}
		if (o.svg)
			jw_str(&w, "svg", o.svg);
		if (o.csv)
			jw_str(&w, "csv", o.csv);
		jw_end(&w);
	} else {
		char xb[96], yb[96];
		out_printf(ctx->out, "sweep: %s over %s, %g to %g %s, %d points\n",
			   r.y_name, r.x_name, sp.from, sp.to,
			   sp.var == SWEEP_TEMP ? "C" : "mM", r.n);
		for (int k = 0; k < nn; k++)
			out_printf(ctx->out, "  %s\n", cond[k]);
		snprintf(xb, sizeof xb, "%s %s", sp.var == SWEEP_TEMP ? "temp"
			 : sp.compound->name, sp.var == SWEEP_TEMP ? "C" : "mM");
		snprintf(yb, sizeof yb, "%s%s%s", r.y_key, yunit[0] ? " " : "", yunit);
		out_printf(ctx->out, "  %16s %18s\n", xb, yb);
		for (int k = 0; k < r.n; k++) {
			fmt_y(yb, sizeof yb, sp.qty, f * r.y[k]);
			if (r.why[k])
				out_printf(ctx->out, "  %16.6g %18s  (%s)\n", r.x[k], "-",
					   r.why[k]);
			else
				out_printf(ctx->out, "  %16.6g %18s\n", r.x[k], yb);
		}
		if (r.nfail)
			out_printf(ctx->out, "  %d of %d points could not be computed\n",
				   r.nfail, r.n);
		if (!sp.keep_pH && sp.var == SWEEP_AMOUNT && isfinite(sp.target->ph_target)
		    && isfinite(r.pH_lo) && r.pH_hi - r.pH_lo > 0.05)
			out_printf(ctx->out, "  note: the pH of %s moves from %.2f to %.2f over "
				   "the sweep (its titrant held as made); add keep-pH to "
				   "titrate it again to pH %.2f at each point\n",
				   sp.target->name, r.pH_lo, r.pH_hi, sp.target->ph_target);
		out_printf(ctx->out, "\n");
		if (np >= 2) {
			char *buf = NULL;
			size_t len = 0;
			FILE *mem = open_memstream(&buf, &len);
			int prc;
			if (!mem) {
				im_fail(err, "cannot draw the plot: %s", strerror(errno));
				goto done;
			}
			po.utf8 = utf8;
			po.y_label = ylab;
			po.notes = NULL;   /* printed above the table */
			po.nnotes = 0;
			prc = plot_term(mem, &c, 1, &po, err);
			fclose(mem);
			if (prc == 0)
				out_printf(ctx->out, "%s", buf);
			free(buf);
			if (prc)
				goto done;
		} else {
			out_printf(ctx->out, "  (one point only: no plot)\n");
		}
		if (o.svg)
			out_printf(ctx->out, "  wrote %s\n", o.svg);
		if (o.csv)
			out_printf(ctx->out, "  wrote %s\n", o.csv);
		if (sp.qty == SWQ_NERNST || sp.qty == SWQ_EREV)
			out_printf(ctx->out, "  sign: membrane potential inside relative to "
				   "outside\n");
		else if (sp.qty == SWQ_LJP)
			out_printf(ctx->out, "  sign: the bath relative to the pipette "
				   "solution; Vm = Vrecorded - LJP\n");
		else if (sp.qty == SWQ_PH || sp.qty == SWQ_OSMOLALITY)
			out_printf(ctx->out, "  estimates: confirm the %s with a calibrated "
				   "%s\n", sp.qty == SWQ_PH ? "pH" : "osmolality",
				   sp.qty == SWQ_PH ? "pH meter" : "osmometer");
	}
	rc = 0;
done:
	free(px);
	free(py);
	sweep_free(&r);
	return rc;
}
