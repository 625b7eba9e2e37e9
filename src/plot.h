/*
 * plot.h - plots of curves y(x): a terminal plot and a standalone SVG file.
 *
 * Written for current-voltage curves (x = membrane potential in mV,
 * y = current, outward positive) and sweeps (x = an amount or a
 * temperature, y = what follows it) but knows nothing of physics: the y
 * axis points up, so negative (inward) values are drawn below the zero
 * line, which is in range and drawn unless o->y_free lets the range fit
 * the data alone.  Output goes to a FILE* the
 * caller owns and opened; no global state.  Labels are UTF-8 text; the SVG
 * escapes them.  Functions return 0, or -1 with a one-line message in the
 * caller's err[IM_ERRLEN] (bad input, or a write error on fp).
 */
#ifndef IONMIX_PLOT_H
#define IONMIX_PLOT_H

#include <stdio.h>

/* One curve: n points (x ascending), arrays owned by the caller. */
typedef struct plot_curve {
	const char *label;  /* legend text, e.g. "total" or "K+" */
	const double *x;
	const double *y;
	int n;
} plot_curve;

#define PLOT_MAX_CURVES 12
#define PLOT_TERM_W 64  /* default plot area, character cells */
#define PLOT_TERM_H 20
#define PLOT_SVG_W 760  /* default SVG size, px */
#define PLOT_SVG_H 460

typedef struct plot_opts {
	int width, height;   /* terminal plot area in cells, 20..300 x 5..100 */
	int svg_w, svg_h;    /* SVG size in px, 300..4000 */
	int utf8;            /* 1: box-drawing axes and braille for curve 0 */
	const char *title;   /* NULL: none */
	const char *x_label; /* with its unit, e.g. "membrane potential (mV)" */
	const char *y_label; /* e.g. "current (uA/cm2)" */
	int has_mark;        /* 1: a dashed vertical line at x = mark_x ... */
	double mark_x;
	const char *mark_label; /* ... labelled, e.g. "E_rev -58.2 mV" */
	int y_free;          /* 1: the y range fits the data and need not hold 0
			      * (pH, osmolality); the zero line is drawn only
			      * where it falls in range.  0: 0 always in range */
	const char *const *notes; /* nnotes lines under the legend (the
			      * conditions: solutions, temperature,
			      * permeabilities); borrowed, may be NULL */
	int nnotes;
} plot_opts;

#define PLOT_MAX_NOTES 24

/* Defaults: 64 x 20 cells, 760 x 460 px, ASCII, no title, mark or notes,
 * zero always in the y range. */
void plot_opts_init(plot_opts *o);

/* Terminal plot of nc curves.  Curve 0 is drawn with braille dots when
 * o->utf8 (else '*'), the others with the letters o x # @ % & $ = ~ ^ s.
 * Axes carry tick numbers and the labels; a legend follows. */
int plot_term(FILE *fp, const plot_curve *c, int nc, const plot_opts *o,
	      char *err);

/* A standalone SVG document (XML 1.0, UTF-8) with axes, ticks, labels,
 * legend, the zero line and the mark as a dashed line. */
int plot_svg(FILE *fp, const plot_curve *c, int nc, const plot_opts *o,
	     char *err);

#endif
