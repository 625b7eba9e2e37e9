/* test_sweep.c - sweeps (sweep.c and the `sweep` command): free Ca2+ over
 * total Ca with EGTA, point by point against the single forward
 * computation `show` makes; the LJP over temperature against absolute
 * temperature; Nernst and ionic strength against their closed forms;
 * the user's solution and temperature untouched; bad input refused with
 * one line and no file written. */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "command.h"
#include "common.h"
#include "sweep.h"

#include "testctx.h"

/* A Cs/K pipette with 10 mM EGTA, titrated to pH 7.2 (demo recipe). */
static void egta_pipette(void)
{
	ok("temp 22; solution egta; add K-gluconate 110; add HEPES 10; "
	   "add EGTA 10; ph 7.2 with KOH");
}

/* The forward state of workspace solution `name`, as `show NAME` computes
 * it; the free Ca2+ there (0 when there is no Ca at all). */
static double shown_free_ca(const char *name)
{
	char err[IM_ERRLEN];
	sol_state st;
	double v = 0;
	if (sol_compute(ws_find(&ctx.ses->ws, name), ses_env(ctx.ses), &st, err))
		fail_msg("compute: %s", err);
	for (int i = 0; i < st.chem->nmetals; i++)
		if (strcmp(st.chem->metals[i].symbol, "Ca2+") == 0)
			v = st.chem->metals[i].free_mM;
	sol_state_free(&st);
	return v;
}

/* Free Ca2+ over total Ca 0 to 9 mM with 10 mM EGTA: every point is the
 * value `show` gives after the same change made by hand (`set CaCl2 X`,
 * and with keep-pH `ph 7.2 with KOH` after it), and the curve rises
 * monotonically.  The user's solution is not touched. */
static void free_ca_egta(void **state)
{
	char err[IM_ERRLEN], line[160];
	sweep_spec sp;
	sweep_result r;
	(void)state;
	egta_pipette();
	solution *s = ws_find(&ctx.ses->ws, "egta");
	solution before;
	sol_copy(&before, s, "egta");
	for (int keep = 0; keep <= 1; keep++) {
		memset(&sp, 0, sizeof sp);
		sp.var = SWEEP_AMOUNT;
		sp.compound = refdb_compound(db, "CaCl2");
		sp.target = s;
		sp.sol = s;
		sp.from = 0;
		sp.to = 9;
		sp.npts = 10;
		sp.qty = SWQ_FREE;
		sp.ion = refdb_ion(db, "Ca2+");
		sp.keep_pH = keep;
		if (sweep_run(&sp, ses_env(ctx.ses), &r, err))
			fail_msg("sweep: %s", err);
		assert_int_equal(r.n, 10);
		assert_int_equal(r.nfail, 0);
		assert_close(r.x[0], 0, 0, 0);
		assert_close(r.x[9], 9, 0, 0);
		for (int i = 0; i < r.n; i++) {
			ok("solution one from egta");
			if (!keep) /* the titrant held as made, not as a target */
				ok("targets drop ph");
			if (r.x[i] > 0) {
				snprintf(line, sizeof line, "set CaCl2 %.17g", r.x[i]);
				ok(line);
			}
			if (keep)
				ok("ph 7.2 with KOH");
			assert_close(r.y[i], shown_free_ca("one"), 1e-9, 1e-15);
			if (i > 0)
				assert_true(r.y[i] > r.y[i - 1]);
			assert_true(r.y[i] < r.x[i] || r.x[i] == 0);
		}
		assert_close(r.y[0], 0, 0, 1e-9);
		if (keep) {
			/* 9 of 10 mM EGTA loaded at pH 7.2: free Ca2+ about 9 x
			 * the apparent Kd of EGTA there, 0.1 to 0.4 uM (from
			 * memory), so 0.5 to 5 uM */
			assert_true(r.y[9] > 0.5e-3 && r.y[9] < 5e-3);
			assert_close(r.pH_lo, 7.2, 0, 1e-6);
			assert_close(r.pH_hi, 7.2, 0, 1e-6);
		} else {
			/* as made, the Ca2+ frees EGTA's protons: the pH falls */
			assert_true(r.pH_lo < 6.0);
		}
		sweep_free(&r);
	}
	assert_true(sol_equal(&before, s));
	sol_free(&before);
}

/* The Henderson LJP is (RT/F) times a function of concentrations and
 * mobility ratios only (Henderson 1907; the mobilities' common
 * temperature factor cancels), so with strong electrolytes alone, whose
 * composition does not change with temperature, LJP / T is constant:
 * LJP(37 C) / LJP(10 C) = 310.15 / 283.15 (0 C = 273.15 K, CODATA).
 * The water's own H+ and OH- (about 1e-4 mM, with Kw changing with
 * temperature) move it by about 1e-6 relative: tolerance 1e-5, against a
 * 10 % change over the range. */
static void ljp_scales_with_T(void **state)
{
	char err[IM_ERRLEN];
	sweep_spec sp;
	sweep_result r;
	(void)state;
	ok("solution pip; add KCl 130; add NaCl 10; add MgCl2 2; add K-gluconate 10");
	ok("solution bath; add NaCl 140; add KCl 5; add CaCl2 2; add MgCl2 1; "
	   "add glucose 10");
	memset(&sp, 0, sizeof sp);
	sp.var = SWEEP_TEMP;
	sp.from = 10;
	sp.to = 37;
	sp.npts = 28;
	sp.qty = SWQ_LJP;
	sp.inside = ws_find(&ctx.ses->ws, "pip");
	sp.outside = ws_find(&ctx.ses->ws, "bath");
	if (sweep_run(&sp, ses_env(ctx.ses), &r, err))
		fail_msg("sweep: %s", err);
	assert_int_equal(r.nfail, 0);
	double k0 = r.y[0] / (r.x[0] + 273.15);
	assert_true(fabs(r.y[0]) > 0.5);
	for (int i = 1; i < r.n; i++)
		assert_close(r.y[i] / (r.x[i] + 273.15), k0, 1e-5, 0);
	assert_close(r.y[r.n - 1] / r.y[0], 310.15 / 283.15, 1e-5, 0);
	/* the context's temperature is not touched */
	assert_close(ctx.ses->temp_C, 25, 0, 0);
	sweep_free(&r);
}

/* E_K over KCl in the bath: E = (RT/F) ln([K]out/[K]in) (Nernst 1889;
 * R, F CODATA 2018); bath K+ is the KCl alone. */
static void nernst_closed_form(void **state)
{
	char err[IM_ERRLEN];
	sweep_spec sp;
	sweep_result r;
	(void)state;
	ok("temp 30; solution pip; add KCl 140");
	ok("solution bath; add NaCl 140; add KCl 5");
	memset(&sp, 0, sizeof sp);
	sp.var = SWEEP_AMOUNT;
	sp.compound = refdb_compound(db, "KCl");
	sp.target = ws_find(&ctx.ses->ws, "bath");
	sp.from = 1;
	sp.to = 50;
	sp.npts = 8;
	sp.qty = SWQ_NERNST;
	sp.ion = refdb_ion(db, "K+");
	sp.inside = ws_find(&ctx.ses->ws, "pip");
	sp.outside = sp.target;
	if (sweep_run(&sp, ses_env(ctx.ses), &r, err))
		fail_msg("sweep: %s", err);
	double rtf = 8.314462618 * 303.15 / 96485.33212 * 1e3;
	for (int i = 0; i < r.n; i++)
		assert_close(r.y[i], rtf * log(r.x[i] / 140.0), 0, 1e-9);
	sweep_free(&r);
}

/* Ionic strength of NaCl alone: I = 1/2 sum c z^2 = c (Lewis & Randall
 * 1921), plus the water's own H+ and OH- (about 1e-4 mM at pH 7). */
static void ionic_strength_closed_form(void **state)
{
	char err[IM_ERRLEN];
	sweep_spec sp;
	sweep_result r;
	(void)state;
	ok("solution salt; add glucose 5");
	memset(&sp, 0, sizeof sp);
	sp.var = SWEEP_AMOUNT;
	sp.compound = refdb_compound(db, "NaCl");
	sp.target = ws_find(&ctx.ses->ws, "salt");
	sp.sol = sp.target;
	sp.from = 0;
	sp.to = 200;
	sp.npts = 5;
	sp.qty = SWQ_IONIC_STRENGTH;
	if (sweep_run(&sp, ses_env(ctx.ses), &r, err))
		fail_msg("sweep: %s", err);
	for (int i = 0; i < r.n; i++)
		assert_close(r.y[i], r.x[i], 0, 2e-4);
	sweep_free(&r);
}

/* Bad specs: one line each, nothing run. */
static void bad_specs(void **state)
{
	char err[IM_ERRLEN];
	sweep_spec sp;
	sweep_result r;
	(void)state;
	ok("solution a; add NaCl 140");
	ok("solution b; add KCl 140");
	memset(&sp, 0, sizeof sp);
	sp.var = SWEEP_AMOUNT;
	sp.compound = refdb_compound(db, "NaCl");
	sp.target = ws_find(&ctx.ses->ws, "a");
	sp.sol = sp.target;
	sp.qty = SWQ_PH;
	sp.npts = 5;
	sp.from = 3;
	sp.to = 3;
	assert_int_equal(sweep_run(&sp, ses_env(ctx.ses), &r, err), -1);
	assert_non_null(strstr(err, "covers nothing"));
	assert_null(r.x);
	sp.to = 1;
	assert_int_equal(sweep_check(&sp, err), -1);
	assert_non_null(strstr(err, "covers nothing"));
	sp.from = 1;
	sp.to = 1 + 1e-9;   /* too narrow to tabulate or plot */
	assert_int_equal(sweep_check(&sp, err), -1);
	assert_non_null(strstr(err, "too narrow"));
	sp.from = 3;
	sp.to = 10;
	sp.qty = SWQ_LJP;   /* a pair quantity without its pair */
	assert_int_equal(sweep_check(&sp, err), -1);
	assert_non_null(strstr(err, "needs a pair"));
	sp.inside = ws_find(&ctx.ses->ws, "b");
	sp.outside = sp.inside;   /* the pair does not hold the varied solution */
	assert_int_equal(sweep_check(&sp, err), -1);
	assert_non_null(strstr(err, "changes nothing"));
	sp.var = SWEEP_TEMP;
	sp.from = -5;
	assert_int_equal(sweep_check(&sp, err), -1);
	assert_null(strchr(err, '\n'));
}

/* The command: bad input is one line, no file is written, the workspace
 * and temperature stand; a good sweep writes the SVG and CSV. */
static void command_files(void **state)
{
	char err[IM_ERRLEN], dir[] = "/tmp/ionmix-sweep-XXXXXX", line[1024];
	char svg[300], csv[300];
	struct stat sb;
	(void)state;
	assert_non_null(mkdtemp(dir));
	snprintf(svg, sizeof svg, "%s/f.svg", dir);
	snprintf(csv, sizeof csv, "%s/f.csv", dir);
	egta_pipette();
	static const char *const bad[] = {
		"sweep CaCl2 0 to 0 show free Ca svg %s csv %s",
		"sweep CaCl2 5 to 1 show free Ca svg %s csv %s",
		"sweep CaCl2 0 to 5 show ljp svg %s csv %s",
		"sweep CaCl2 0 to 5 show ljp egta svg %s csv %s",
		"sweep CaCl2 0 to 5 show erev egta svg %s csv %s",
		"sweep CaCl2 0 to 5 show nernst K egta svg %s csv %s",
		"sweep CaCl2 0 to 5 show weight svg %s csv %s",
		"sweep temp 20 to 80 show pH svg %s csv %s",
	};
	for (size_t k = 0; k < IM_COUNT(bad); k++) {
		snprintf(line, sizeof line, bad[k], svg, csv);
		assert_int_equal(cmd_exec(&ctx, line, err), -1);
		assert_null(strchr(err, '\n'));
		assert_int_not_equal(stat(svg, &sb), 0);
		assert_int_not_equal(stat(csv, &sb), 0);
	}
	/* keep-pH on a solution never titrated */
	ok("solution plain; add NaCl 100; solution egta");
	assert_int_equal(cmd_exec(&ctx, "sweep KCl 1 to 5 in plain show pH keep-pH",
				  err), -1);
	assert_non_null(strstr(err, "not titrated"));
	/* an SVG that cannot be written: no CSV either */
	snprintf(line, sizeof line, "sweep CaCl2 0 to 5 show free Ca svg %s/no/f.svg "
		 "csv %s", dir, csv);
	assert_int_equal(cmd_exec(&ctx, line, err), -1);
	assert_int_not_equal(stat(csv, &sb), 0);
	solution before;
	sol_copy(&before, ws_find(&ctx.ses->ws, "egta"), "egta");
	snprintf(line, sizeof line, "sweep CaCl2 0 to 9 mM show free Ca points 10 "
		 "svg %s csv %s", svg, csv);
	ok(line);
	assert_true(sol_equal(&before, ws_find(&ctx.ses->ws, "egta")));
	assert_close(ctx.ses->temp_C, 22, 0, 0);
	assert_int_equal(stat(svg, &sb), 0);
	assert_true(sb.st_size > 500);
	FILE *fp = fopen(csv, "r");
	assert_non_null(fp);
	char row[256];
	assert_non_null(fgets(row, sizeof row, fp));
	assert_string_equal(row, "CaCl2_mM,free_Ca2+_mM,failure\r\n");
	int rows = 0;
	while (fgets(row, sizeof row, fp))
		rows++;
	assert_int_equal(rows, 10);
	fclose(fp);
	sol_free(&before);
	unlink(svg);
	unlink(csv);
	rmdir(dir);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(free_ca_egta, fresh, done),
		cmocka_unit_test_setup_teardown(ljp_scales_with_T, fresh, done),
		cmocka_unit_test_setup_teardown(nernst_closed_form, fresh, done),
		cmocka_unit_test_setup_teardown(ionic_strength_closed_form, fresh, done),
		cmocka_unit_test_setup_teardown(bad_specs, fresh, done),
		cmocka_unit_test_setup_teardown(command_files, fresh, done),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
