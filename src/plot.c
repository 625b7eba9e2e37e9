/*
 * plot.c - terminal and SVG plots of curves.  See plot.h.
 *
 * Both plots share one layout step (ranges, nice ticks); the y range always
 * holds 0 and is rounded out to whole ticks, the x range is the data's.
 */
#include "plot.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"

void plot_opts_init(plot_opts *o)
{
	memset(o, 0, sizeof *o);
	o->width = PLOT_TERM_W;
	o->height = PLOT_TERM_H;
	o->svg_w = PLOT_SVG_W;
	o->svg_h = PLOT_SVG_H;
}

/* ---- layout shared by both plots ---- */

typedef struct layout {
	double xlo, xhi, ylo, yhi;
	double xstep, ystep;  /* tick spacing */
	int xdec, ydec;       /* decimals of tick labels */
} layout;

/* 1, 2 or 5 times a power of ten, near raw (> 0). */
static double nice_step(double raw)
{
	double e = floor(log10(raw)), p = pow(10.0, e), f = raw / p;
	return (f < 1.5 ? 1.0 : f < 3.0 ? 2.0 : f < 7.0 ? 5.0 : 10.0) * p;
}

static int decimals(double step)
{
	int d = (int)ceil(-log10(step) - 1e-9);
	return d < 0 ? 0 : d > 12 ? 12 : d;
}

static const char *cname(const plot_curve *c, int i, char *b, size_t nb)
{
	if (c->label && c->label[0])
		return c->label;
	snprintf(b, nb, "curve %d", i + 1);
	return b;
}

static int prepare(const plot_curve *c, int nc, const plot_opts *o, int yticks,
		   int xticks, layout *L, char *err)
{
	char b[32];
	if (!c || nc < 1)
		return im_fail(err, "nothing to plot");
	if (nc > PLOT_MAX_CURVES)
		return im_fail(err, "at most %d curves in one plot", PLOT_MAX_CURVES);
	double xlo = INFINITY, xhi = -INFINITY;
	double ylo = o->y_free ? INFINITY : 0.0, yhi = o->y_free ? -INFINITY : 0.0;
	for (int i = 0; i < nc; i++) {
		const char *s = cname(&c[i], i, b, sizeof b);
		if (!c[i].x || !c[i].y || c[i].n < 2)
			return im_fail(err, "%s: a curve needs at least two points", s);
		for (int k = 0; k < c[i].n; k++) {
			double x = c[i].x[k], y = c[i].y[k];
			if (!isfinite(x) || !isfinite(y))
				return im_fail(err, "%s: point %d is not a finite number",
					       s, k + 1);
			if (k > 0 && x < c[i].x[k - 1])
				return im_fail(err, "%s: x values must ascend", s);
			if (x < xlo)
				xlo = x;
			if (x > xhi)
				xhi = x;
			if (y < ylo)
				ylo = y;
			if (y > yhi)
				yhi = y;
		}
	}
	if (!(xhi - xlo > 1e-9 * fmax(fabs(xlo), fabs(xhi))))
		return im_fail(err, "the x values span no range (or too narrow a "
			       "one to plot)");
	if (o->has_mark && !isfinite(o->mark_x))
		return im_fail(err, "the mark is not a finite number");
	if (o->nnotes < 0 || o->nnotes > PLOT_MAX_NOTES || (o->nnotes && !o->notes))
		return im_fail(err, "at most %d notes under the legend", PLOT_MAX_NOTES);
	double mag = fmax(fabs(ylo), fabs(yhi));
	if (!(yhi - ylo > 1e-6 * mag)) {
		/* a constant, or changes below 1e-6 of the value (rounding,
		 * not a trend): a small range about the middle */
		double mid = 0.5 * (ylo + yhi), d = mag > 0 ? 0.05 * mag : 1.0;
		ylo = o->y_free ? mid - d : fmin(ylo, -d);
		yhi = o->y_free ? mid + d : fmax(yhi, d);
	}
	if (!isfinite(yhi - ylo))
		return im_fail(err, "the y values span too wide a range");
	L->ystep = nice_step((yhi - ylo) / yticks);
	L->ylo = floor(ylo / L->ystep * (1 + 1e-12)) * L->ystep;
	L->yhi = ceil(yhi / L->ystep * (1 - 1e-12)) * L->ystep;
	if (!(L->yhi > L->ylo))
		L->yhi = L->ylo + L->ystep;
	L->xlo = xlo;
	L->xhi = xhi;
	L->xstep = nice_step((xhi - xlo) / xticks);
	L->xdec = decimals(L->xstep);
	L->ydec = decimals(L->ystep);
	return 0;
}

/* Tick k of a range: values k*step within [lo, hi]. */
static int tick_first(double lo, double step)
{
	return (int)ceil(lo / step - 1e-9);
}

static int tick_last(double hi, double step)
{
	return (int)floor(hi / step + 1e-9);
}

static void fmt_num(char *b, size_t nb, double v, int dec, double step)
{
	if (fabs(v) < step * 1e-9)
		v = 0.0;   /* no "-0" */
	snprintf(b, nb, "%.*f", dec, v);
}

/* y of curve at x by linear interpolation; 0 when x is outside it. */
static int interp(const plot_curve *c, double x, double *y)
{
	int n = c->n;
	if (x < c->x[0] || x > c->x[n - 1])
		return 0;
	int lo = 0, hi = n - 1;
	while (hi - lo > 1) {
		int mid = (lo + hi) / 2;
		if (c->x[mid] <= x)
			lo = mid;
		else
			hi = mid;
	}
	double dx = c->x[hi] - c->x[lo];
	double t = dx > 0 ? (x - c->x[lo]) / dx : 0.0;
	*y = c->y[lo] + t * (c->y[hi] - c->y[lo]);
	return 1;
}

/* ---- terminal plot ---- */

enum { U_H = 0x2500, U_V = 0x2502, U_TL = 0x2514, U_TEE_L = 0x2524,
       U_CROSS = 0x253C, U_TEE_UP = 0x252C, U_DASH_V = 0x250A,
       U_BRAILLE = 0x2800 };

static const char MARKERS[] = "ox#@%&$=~^s";  /* none of the axes' + - | : */

static void put_cp(FILE *fp, unsigned cp)
{
	if (cp < 0x80) {
		fputc((int)cp, fp);
	} else if (cp < 0x800) {
		fputc(0xC0 | (cp >> 6), fp);
		fputc(0x80 | (cp & 0x3F), fp);
	} else {
		fputc(0xE0 | (cp >> 12), fp);
		fputc(0x80 | ((cp >> 6) & 0x3F), fp);
		fputc(0x80 | (cp & 0x3F), fp);
	}
}

/* Display width of UTF-8 text: one column per code point. */
static int text_cols(const char *s)
{
	int n = 0;
	for (; *s; s++)
		if (((unsigned char)*s & 0xC0) != 0x80)
			n++;
	return n;
}

static void spaces(FILE *fp, int n)
{
	while (n-- > 0)
		fputc(' ', fp);
}

/* Braille dot bit of sub-column sc (0, 1) and sub-row sr (0..3). */
static unsigned braille_bit(int sc, int sr)
{
	static const unsigned char bits[2][4] = {{0x01, 0x02, 0x04, 0x40},
						  {0x08, 0x10, 0x20, 0x80}};
	return bits[sc][sr];
}

static int clampi(int v, int lo, int hi)
{
	return v < lo ? lo : v > hi ? hi : v;
}

/* The vertical scale works in braille sub-rows (4 a row, 0 at the top):
 * y = 0 falls on the middle of row zrow (sub-row position 4 zrow + 2), and
 * spu sub-rows a y unit is the largest scale that fits both extremes. */
typedef struct canvas {
	int W, H;
	unsigned *cp;          /* W*H code points; 0 = blank */
	unsigned char *dots;   /* W*H braille bits of curve 0 */
	const layout *L;
	int zrow;              /* row of the zero line; -1: out of range */
	double spu;
	double base, ref;      /* y = ref falls on sub-row position base */
} canvas;

static void vscale(canvas *cv, int y_free)
{
	double best = -1;
	if (y_free) {   /* the range fills the rows; zero only if inside it */
		cv->ref = cv->L->ylo;
		cv->base = 4.0 * cv->H - 0.5;
		cv->spu = (4.0 * cv->H - 1) / (cv->L->yhi - cv->L->ylo);
		cv->zrow = -1;
		if (cv->L->ylo <= 0 && cv->L->yhi >= 0) {
			double s = cv->base + cv->ref * cv->spu;
			cv->zrow = clampi((int)floor(s), 0, 4 * cv->H - 1) / 4;
		}
		return;
	}
	cv->ref = 0.0;
	for (int z = 0; z < cv->H; z++) {
		double up = 4.0 * z + 2, down = 4.0 * cv->H - up;
		double s = INFINITY;
		if (cv->L->yhi > 0)
			s = up / cv->L->yhi;
		if (cv->L->ylo < 0 && down / -cv->L->ylo < s)
			s = down / -cv->L->ylo;
		if (s > best) {
			best = s;
			cv->zrow = z;
		}
	}
	cv->spu = best;
	cv->base = 4.0 * cv->zrow + 2;
}

/* Sub-row (0 .. 4H-1) of y. */
static int subrow_of(const canvas *cv, double y)
{
	double s = cv->base - (y - cv->ref) * cv->spu;
	return clampi((int)floor(s), 0, 4 * cv->H - 1);
}

static int row_of(const canvas *cv, double y)
{
	return subrow_of(cv, y) / 4;
}

static int col_of(const canvas *cv, double x, int sub)
{
	double f = (x - cv->L->xlo) / (cv->L->xhi - cv->L->xlo);
	return clampi((int)lround(f * (cv->W * sub - 1)), 0, cv->W * sub - 1);
}

static void draw_curve(canvas *cv, const plot_curve *c, unsigned glyph,
		       int braille, int fill)
{
	int sub = braille ? 2 : 1, vsub = braille ? 4 : 1;
	int ncol = cv->W * sub, prev = -1;
	for (int sc = 0; sc < ncol; sc++) {
		double x = cv->L->xlo + (cv->L->xhi - cv->L->xlo) * sc / (ncol - 1);
		double y;
		if (!interp(c, x, &y)) {
			prev = -1;
			continue;
		}
		int r = braille ? subrow_of(cv, y) : row_of(cv, y);
		int a = r, b = r;
		if (fill && prev >= 0) {   /* join to the previous column */
			a = prev < r ? prev + 1 : r;
			b = prev > r ? prev - 1 : r;
		}
		for (int rr = a; rr <= b; rr++) {
			int cell = (rr / vsub) * cv->W + sc / sub;
			if (braille)
				cv->dots[cell] |= braille_bit(sc % 2, rr % 4);
			else
				cv->cp[cell] = glyph;
		}
		prev = r;
	}
}

int plot_term(FILE *fp, const plot_curve *c, int nc, const plot_opts *o,
	      char *err)
{
	layout L;
	char b[64];
	if (!fp || !o)
		return im_fail(err, "no output file or no plot options");
	if (o->width < 20 || o->width > 300 || o->height < 5 || o->height > 100)
		return im_fail(err, "plot size %d x %d: width must be 20..300 and "
			       "height 5..100 characters", o->width, o->height);
	int yt = o->height * 2 / 5, xt = o->width / 10;
	if (prepare(c, nc, o, yt < 3 ? 3 : yt, xt < 3 ? 3 : xt, &L, err))
		return -1;
	int u = o->utf8;
	canvas cv = {o->width, o->height, NULL, NULL, &L, 0, 0, 0, 0};
	vscale(&cv, o->y_free);
	cv.cp = im_xcalloc((size_t)cv.W * cv.H, sizeof *cv.cp);
	cv.dots = im_xcalloc((size_t)cv.W * cv.H, 1);

	/* layers, later ones on top: zero line, mark, curves n-1..1, curve 0 */
	int zrow = cv.zrow;
	int mark_in = o->has_mark && o->mark_x >= L.xlo && o->mark_x <= L.xhi;
	int mcol = mark_in ? col_of(&cv, o->mark_x, 1) : -1;
	for (int k = 0; zrow >= 0 && k < cv.W; k++)
		cv.cp[zrow * cv.W + k] = u ? U_H : '-';
	if (mark_in)
		for (int r = 0; r < cv.H; r++)
			cv.cp[r * cv.W + mcol] = u ? U_DASH_V : ':';
	for (int i = nc - 1; i >= 1; i--)
		draw_curve(&cv, &c[i], (unsigned char)MARKERS[(i - 1) % 11], 0, 0);
	draw_curve(&cv, &c[0], '*', u, 1);

	/* left margin: widest y tick label */
	int t0 = tick_first(L.ylo, L.ystep), t1 = tick_last(L.yhi, L.ystep);
	int M = 1;
	for (int t = t0; t <= t1; t++) {
		fmt_num(b, sizeof b, t * L.ystep, L.ydec, L.ystep);
		if ((int)strlen(b) > M)
			M = (int)strlen(b);
	}
	M += 1;
	if (o->title) {
		spaces(fp, M + 1);
		fprintf(fp, "%s\n", o->title);
	}
	if (o->y_label) {
		spaces(fp, M > 2 ? M - 2 : 0);
		fprintf(fp, "%s\n", o->y_label);
	}
	if (mark_in && o->mark_label) {   /* the mark's label above its line */
		int w = text_cols(o->mark_label);
		int at = clampi(mcol - w / 2, 0, cv.W > w ? cv.W - w : 0);
		spaces(fp, M + 1 + at);
		fprintf(fp, "%s\n", o->mark_label);
	}
	/* rows of the plot; a tick label where a tick falls */
	char *lab = im_xcalloc((size_t)cv.H, 64);
	for (int t = t0; t <= t1; t++) {
		int r = row_of(&cv, t * L.ystep);
		fmt_num(lab + 64 * r, 64, t * L.ystep, L.ydec, L.ystep);
	}
	for (int r = 0; r < cv.H; r++) {
		const char *l = lab + 64 * r;
		fprintf(fp, "%*s ", M - 1, l);
		unsigned axis = r == zrow ? (u ? U_CROSS : '+')
			: l[0] ? (u ? U_TEE_L : '+') : (u ? U_V : '|');
		put_cp(fp, axis);
		int last = cv.W - 1;   /* no trailing blanks */
		while (last >= 0 && !cv.cp[r * cv.W + last] && !cv.dots[r * cv.W + last])
			last--;
		for (int k = 0; k <= last; k++) {
			int cell = r * cv.W + k;
			if (cv.dots[cell])
				put_cp(fp, U_BRAILLE + cv.dots[cell]);
			else
				put_cp(fp, cv.cp[cell] ? cv.cp[cell] : ' ');
		}
		fputc('\n', fp);
	}
	free(lab);
	/* x axis, ticks and their labels */
	int x0 = tick_first(L.xlo, L.xstep), x1 = tick_last(L.xhi, L.xstep);
	spaces(fp, M);
	put_cp(fp, u ? U_TL : '+');
	char *tk = im_xcalloc((size_t)cv.W, 1);
	for (int t = x0; t <= x1; t++)
		tk[col_of(&cv, t * L.xstep, 1)] = 1;
	for (int k = 0; k < cv.W; k++)
		put_cp(fp, tk[k] ? (u ? U_TEE_UP : '+') : (u ? U_H : '-'));
	fputc('\n', fp);
	free(tk);
	int linew = M + 1 + cv.W + 8;
	char *line = im_xmalloc((size_t)linew + 1);
	memset(line, ' ', (size_t)linew);
	int end = 0, hwm = -1;
	for (int t = x0; t <= x1; t++) {
		fmt_num(b, sizeof b, t * L.xstep, L.xdec, L.xstep);
		int w = (int)strlen(b), at = M + 1 + col_of(&cv, t * L.xstep, 1) - w / 2;
		if (at <= hwm + 1 || at + w > linew)
			continue;   /* would touch the previous label */
		memcpy(line + at, b, (size_t)w);
		hwm = at + w - 1;
		end = at + w;
	}
	line[end] = '\0';
	fprintf(fp, "%s\n", line);
	free(line);
	if (o->x_label) {
		int w = text_cols(o->x_label);
		spaces(fp, M + 1 + (cv.W > w ? (cv.W - w) / 2 : 0));
		fprintf(fp, "%s\n", o->x_label);
	}
	/* legend */
	spaces(fp, M + 1);
	for (int i = 0; i < nc; i++) {
		if (i > 0)
			fputs("   ", fp);
		if (i == 0 && u)
			fputs("\u2812\u2812", fp);   /* a braille dash */
		else
			fputc(i == 0 ? '*' : MARKERS[(i - 1) % 11], fp);
		fprintf(fp, " %s", cname(&c[i], i, b, sizeof b));
	}
	if (o->has_mark) {
		fputs("   ", fp);
		put_cp(fp, u ? U_DASH_V : ':');
		fprintf(fp, " %s%s", o->mark_label ? o->mark_label : "mark",
			mark_in ? "" : " (outside the plot)");
	}
	fputc('\n', fp);
	for (int i = 0; i < o->nnotes; i++) {
		spaces(fp, M + 1);
		fprintf(fp, "%s\n", o->notes[i] ? o->notes[i] : "");
	}
	free(cv.cp);
	free(cv.dots);
	if (ferror(fp))
		return im_fail(err, "write error while plotting");
	return 0;
}

/* ---- SVG ---- */

/* XML text: escape markup characters; drop control characters XML 1.0
 * forbids; replace bytes that are not UTF-8 with '?'. */
static void xml_text(FILE *fp, const char *s)
{
	const unsigned char *p = (const unsigned char *)(s ? s : "");
	while (*p) {
		unsigned c = *p;
		int len = c < 0x80 ? 1 : (c >> 5) == 6 ? 2 : (c >> 4) == 14 ? 3
			: (c >> 3) == 30 ? 4 : 0;
		int ok = len > 0;
		for (int k = 1; ok && k < len; k++)
			ok = (p[k] & 0xC0) == 0x80;
		if (!ok) {
			fputc('?', fp);
			p++;
			continue;
		}
		if (len > 1) {
			fwrite(p, 1, (size_t)len, fp);
			p += len;
			continue;
		}
		switch (c) {
		case '&': fputs("&amp;", fp); break;
		case '<': fputs("&lt;", fp); break;
		case '>': fputs("&gt;", fp); break;
		case '"': fputs("&quot;", fp); break;
		case '\'': fputs("&apos;", fp); break;
		default:
			if (c >= 0x20 || c == '\t')
				fputc((int)c, fp);
		}
		p++;
	}
}

/* Okabe & Ito (2008) colour-blind-safe palette; curve 0 in black. */
static const char *const COLORS[] = {"#000000", "#0072B2", "#D55E00",
	"#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#F0E442", "#7f7f7f",
	"#8c564b", "#17becf", "#bcbd22"};
static const char *const DASHES[] = {"", "", "", "", "", "", "8 3", "8 3",
	"2 3", "2 3", "8 3 2 3", "8 3 2 3"};
_Static_assert(IM_COUNT(COLORS) == PLOT_MAX_CURVES, "one colour per curve");
_Static_assert(IM_COUNT(DASHES) == PLOT_MAX_CURVES, "one dash per curve");

int plot_svg(FILE *fp, const plot_curve *c, int nc, const plot_opts *o,
	     char *err)
{
	layout L;
	char b[64];
	if (!fp || !o)
		return im_fail(err, "no output file or no plot options");
	if (o->svg_w < 300 || o->svg_w > 4000 || o->svg_h < 200 || o->svg_h > 4000)
		return im_fail(err, "SVG size %d x %d px: 300..4000 x 200..4000",
			       o->svg_w, o->svg_h);
	if (prepare(c, nc, o, 6, 8, &L, err))
		return -1;
	double W = o->svg_w, H = o->svg_h;
	double left = 80, right = o->nnotes ? 230 : 170, top = o->title ? 46 : 26, bottom = 62;
	double pw = W - left - right, ph = H - top - bottom;
#define PX(x) (left + ((x) - L.xlo) / (L.xhi - L.xlo) * pw)
#define PY(y) (top + (L.yhi - (y)) / (L.yhi - L.ylo) * ph)
	fprintf(fp, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
		"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" height=\"%d\" "
		"viewBox=\"0 0 %d %d\" font-family=\"DejaVu Sans, Helvetica, Arial, "
		"sans-serif\" font-size=\"13\">\n", o->svg_w, o->svg_h, o->svg_w,
		o->svg_h);
	fputs("<title>", fp);
	xml_text(fp, o->title ? o->title : "plot");
	fputs("</title>\n", fp);
	fprintf(fp, "<rect width=\"100%%\" height=\"100%%\" fill=\"#ffffff\"/>\n"
		"<defs><clipPath id=\"plot-area\"><rect x=\"%.2f\" y=\"%.2f\" "
		"width=\"%.2f\" height=\"%.2f\"/></clipPath></defs>\n",
		left, top, pw, ph);
	if (o->title) {
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"middle\" "
			"font-size=\"15\" font-weight=\"bold\">", left + pw / 2, 28.0);
		xml_text(fp, o->title);
		fputs("</text>\n", fp);
	}
	/* grid, ticks, tick labels */
	fputs("<g stroke=\"#e2e2e2\" stroke-width=\"1\">\n", fp);
	int y0 = tick_first(L.ylo, L.ystep), y1 = tick_last(L.yhi, L.ystep);
	int x0 = tick_first(L.xlo, L.xstep), x1 = tick_last(L.xhi, L.xstep);
	for (int t = y0; t <= y1; t++)
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\"/>\n",
			left, PY(t * L.ystep), left + pw, PY(t * L.ystep));
	for (int t = x0; t <= x1; t++)
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\"/>\n",
			PX(t * L.xstep), top, PX(t * L.xstep), top + ph);
	fputs("</g>\n", fp);
	fprintf(fp, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\" "
		"fill=\"none\" stroke=\"#808080\"/>\n", left, top, pw, ph);
	fputs("<g stroke=\"#808080\">\n", fp);
	for (int t = y0; t <= y1; t++)
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\"/>\n",
			left - 5, PY(t * L.ystep), left, PY(t * L.ystep));
	for (int t = x0; t <= x1; t++)
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\"/>\n",
			PX(t * L.xstep), top + ph, PX(t * L.xstep), top + ph + 5);
	fputs("</g>\n<g fill=\"#333333\">\n", fp);
	for (int t = y0; t <= y1; t++) {
		fmt_num(b, sizeof b, t * L.ystep, L.ydec, L.ystep);
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"end\">%s</text>\n",
			left - 8, PY(t * L.ystep) + 4.5, b);
	}
	for (int t = x0; t <= x1; t++) {
		fmt_num(b, sizeof b, t * L.xstep, L.xdec, L.xstep);
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"middle\">%s"
			"</text>\n", PX(t * L.xstep), top + ph + 20, b);
	}
	fputs("</g>\n", fp);
	/* axis labels */
	if (o->x_label) {
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"middle\">",
			left + pw / 2, top + ph + 44);
		xml_text(fp, o->x_label);
		fputs("</text>\n", fp);
	}
	if (o->y_label) {
		fprintf(fp, "<text transform=\"translate(%.2f %.2f) rotate(-90)\" "
			"text-anchor=\"middle\">", 20.0, top + ph / 2);
		xml_text(fp, o->y_label);
		fputs("</text>\n", fp);
	}
	/* zero line, where it falls in range */
	if (L.ylo <= 0 && L.yhi >= 0)
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
		"stroke=\"#333333\" stroke-width=\"1.2\"/>\n", left, PY(0.0),
		left + pw, PY(0.0));
	/* the mark */
	int mark_in = o->has_mark && o->mark_x >= L.xlo && o->mark_x <= L.xhi;
	if (mark_in) {
		double mx = PX(o->mark_x);
		int flip = mx > left + pw * 0.7;
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
			"stroke=\"#555555\" stroke-width=\"1.2\" "
			"stroke-dasharray=\"6 4\"/>\n", mx, top, mx, top + ph);
		if (o->mark_label) {
			fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\" text-anchor=\"%s\" "
				"fill=\"#333333\">", flip ? mx - 5 : mx + 5, top + 16,
				flip ? "end" : "start");
			xml_text(fp, o->mark_label);
			fputs("</text>\n", fp);
		}
	}
	/* curves, the first on top */
	for (int i = nc - 1; i >= 0; i--) {
		fprintf(fp, "<polyline fill=\"none\" stroke=\"%s\" stroke-width=\"%s\" "
			"stroke-linejoin=\"round\"%s%s%s clip-path=\"url(#plot-area)\" "
			"points=\"", COLORS[i], i == 0 ? "2.6" : "1.8",
			DASHES[i][0] ? " stroke-dasharray=\"" : "", DASHES[i],
			DASHES[i][0] ? "\"" : "");
		for (int k = 0; k < c[i].n; k++)
			fprintf(fp, "%s%.2f,%.2f", k ? " " : "", PX(c[i].x[k]),
				PY(c[i].y[k]));
		fputs("\"/>\n", fp);
	}
	/* legend */
	double lx = left + pw + 18, ly = top + 12;
	for (int i = 0; i < nc; i++, ly += 22) {
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
			"stroke=\"%s\" stroke-width=\"%s\"%s%s%s/>\n", lx, ly, lx + 26,
			ly, COLORS[i], i == 0 ? "2.6" : "1.8",
			DASHES[i][0] ? " stroke-dasharray=\"" : "", DASHES[i],
			DASHES[i][0] ? "\"" : "");
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\">", lx + 34, ly + 4.5);
		xml_text(fp, cname(&c[i], i, b, sizeof b));
		fputs("</text>\n", fp);
	}
	if (o->has_mark) {
		fprintf(fp, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
			"stroke=\"#555555\" stroke-width=\"1.2\" "
			"stroke-dasharray=\"6 4\"/>\n", lx + 13, ly - 8, lx + 13, ly + 8);
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\">", lx + 34, ly + 4.5);
		xml_text(fp, o->mark_label ? o->mark_label : "mark");
		if (!mark_in)
			fputs(" (outside the plot)", fp);
		fputs("</text>\n", fp);
		ly += 22;
	}
	/* the conditions, smaller, under the legend */
	ly += 4;
	for (int i = 0; i < o->nnotes; i++, ly += 16) {
		fprintf(fp, "<text x=\"%.2f\" y=\"%.2f\" font-size=\"11\" "
			"fill=\"#333333\">", lx, ly);
		xml_text(fp, o->notes[i]);
		fputs("</text>\n", fp);
	}
	fputs("</svg>\n", fp);
#undef PX
#undef PY
	if (ferror(fp))
		return im_fail(err, "write error while writing the SVG");
	return 0;
}
