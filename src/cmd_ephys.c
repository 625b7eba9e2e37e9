/*
 * cmd_ephys.c - the Nernst potentials of a pair of solutions.
 */
#include "cmd_ephys.h"

#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "nernst.h"
#include "render.h"

/* The ions that have an equilibrium potential between si and so: the
 * charged species of either side, except complexes and protonation
 * states (no channel of their own) and OH- (it moves with H+, which is
 * listed).  Returns the count; *out is owned by the caller. */
static int nernst_ions(const sol_state *si, const sol_state *so, const rd_ion ***out)
{
	const rd_ion **ions = im_xcalloc((size_t)(si->n + so->n) + 1, sizeof *ions);
	int n = 0;
	for (int side = 0; side < 2; side++) {
		const sol_state *st = side ? so : si;
		for (int j = 0; j < st->n; j++) {
			const rd_ion *ion = st->sp[j].ion;
			int k = 0;
			if (ion->z == 0 || ion->derived || strcmp(ion->symbol, "OH-") == 0)
				continue;
			while (k < n && ions[k] != ion)
				k++;
			if (k == n)
				ions[n++] = ion;
		}
	}
	*out = ions;
	return n;
}

static void nernst_row(render *r, const rd_ion *ion, const sol_state *si,
		       const sol_state *so, int act, double t_C)
{
	const sol_species *a = sol_state_find(si, ion), *b = sol_state_find(so, ion);
	double in = a ? (act ? a->act_mM : a->mM) : 0, out = b ? (act ? b->act_mM : b->mM) : 0;
	double E;
	char why[IM_ERRLEN];
	int ok = nernst_mV(ion->z, in, out, t_C, &E, why) == 0;
	render_row(r);
	render_str(r, "ion", "ion", ion->symbol);
	render_charge(r, "z", "z", ion->z);
	render_num(r, "inside_mM", act ? "inside a" : "inside", "mM", in, UNITS_SIG(4));
	render_num(r, "outside_mM", act ? "outside a" : "outside", "mM", out, UNITS_SIG(4));
	if (ok) {
		render_numj(r, "E_mV", "E", "mV", E, UNITS_DEC(1), 6);
	} else {
		render_null(r, "E_mV", "E");
		render_str(r, "note", "", why);
	}
}

int cmd_nernst(im_ctx *ctx, int argc, char **argv, char *err)
{
	solution *in, *outs;
	sol_state si, so;
	const rd_ion **ions;
	int act = argc == 4, n;
	render *r;
	if (act && strcmp(argv[3], "activities") != 0)
		return im_fail(err, "expected 'activities', got '%.40s'", argv[3]);
	if (ses_solution(ctx->ses, argv[1], &in, err) ||
	    ses_solution(ctx->ses, argv[2], &outs, err) ||
	    ses_compute(ctx->ses, in, &si, err))
		return -1;
	if (ses_compute(ctx->ses, outs, &so, err)) {
		sol_state_free(&si);
		return -1;
	}
	n = nernst_ions(&si, &so, &ions);
	r = render_new(ctx->out);
	render_str(r, "inside", NULL, in->name);
	render_str(r, "outside", NULL, outs->name);
	render_num(r, "temperature_C", NULL, "C", ctx->ses->temp_C, UNITS_DEC(1));
	render_str(r, "from", NULL, act ? "activities" : "concentrations");
	render_text(r, "Nernst potentials of %s (inside) against %s (outside), %.1f C, from %s",
		    in->name, outs->name, ctx->ses->temp_C, act ? "activities" : "concentrations");
	render_str(r, "sign", NULL, "E = (RT/zF) ln(out/in), inside relative to outside");
	render_text(r, "sign: E = (RT/zF) ln(out/in), inside relative to outside");
	render_table(r, "ions", NULL);
	for (int k = 0; k < n; k++)
		nernst_row(r, ions[k], &si, &so, act, ctx->ses->temp_C);
	render_table_empty(r, "  (no ions in either solution)");
	render_table_end(r);
	free(ions);
	sol_state_free(&si);
	sol_state_free(&so);
	return render_done(r);
}
