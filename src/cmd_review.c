/*
 * cmd_review.c - `review PIPETTE BATH`: review.c's report, rendered.
 */
#include "cmd_review.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "common.h"
#include "render.h"
#include "review.h"

/* The digits a review value deserves, by its unit. */
static int digits_of(const char *unit)
{
	if (strcmp(unit, "mOsm/kg") == 0)
		return UNITS_DEC(0);
	if (strcmp(unit, "mV") == 0)
		return UNITS_DEC(1);
	if (strcmp(unit, "") == 0 || strcmp(unit, "mEq/L") == 0) /* pH, charge */
		return UNITS_DEC(2);
	return UNITS_SIG(3);
}

static void review_row(render *r, const review_item *x, int utf8)
{
	char v[64] = "";
	if (isfinite(x->value) && (strcmp(x->unit, "nM") == 0 || strcmp(x->unit, "mM") == 0)) {
		/* a concentration: the unit switches as everywhere else */
		units_fmt_conc(v, sizeof v, x->unit[0] == 'n' ? x->value * 1e-6 : x->value, utf8);
	} else if (isfinite(x->value)) {
		units_fmt_num(v, sizeof v, x->value, digits_of(x->unit));
		if (x->unit[0]) {
			strcat(v, " ");
			strncat(v, x->unit, sizeof v - strlen(v) - 1);
		}
	}
	render_row(r);
	render_str(r, "verdict", "", review_verdict_name(x->verdict));
	render_str(r, "check", "", x->check);
	render_numj(r, "value", NULL, NULL, x->value, digits_of(x->unit), 6);
	render_str(r, "unit", NULL, x->unit);
	render_str(r, NULL, "", v);
	render_str(r, "note", "", x->note);
}

int cmd_review(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *sp, *sb;
	review_report rep;
	render *r;
	(void)argc;
	if (ses_solution(ctx->ses, argv[1], &sp, err) || ses_solution(ctx->ses, argv[2], &sb, err) ||
	    review_pair(ctx->ses, sp, sb, &rep, err))
		return -1;
	r = render_new(ctx->out);
	render_str(r, "pipette", NULL, sp->name);
	render_str(r, "bath", NULL, sb->name);
	render_num(r, "temperature_C", NULL, "C", rep.temp_C, UNITS_DEC(1));
	render_text(r, "review: pipette %s, bath %s, %.1f C", sp->name, sb->name, rep.temp_C);
	render_table(r, "items", NULL);
	for (int i = 0; i < rep.n; i++)
		review_row(r, &rep.it[i], ctx->out->utf8);
	render_table_end(r);
	render_int(r, "fine", NULL, rep.count[REVIEW_FINE]);
	render_int(r, "to_check", NULL, rep.count[REVIEW_CHECK]);
	render_int(r, "problems", NULL, rep.count[REVIEW_PROBLEM]);
	render_text(r, "%d fine, %d to check, %d problems; estimates: confirm pH with a calibrated "
		       "meter and osmolality with an osmometer", rep.count[REVIEW_FINE],
		    rep.count[REVIEW_CHECK], rep.count[REVIEW_PROBLEM]);
	review_free(&rep);
	return render_done(r);
}
