/* test_chemcmd.c - the chemistry commands end to end: `ph`, `free`,
 * `osmo`, `gas`, forward checks through sol_compute (what `show` prints),
 * refusals that leave the workspace unchanged, and recipes that replay a
 * titration. */
#include "testutil.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "command.h"
#include "common.h"
#include "speciation.h"

#include "testctx.h"

/* The current solution computed forward, as `show` computes it. */
static void forward(sol_state *st)
{
	char err[IM_ERRLEN];
	if (sol_compute(ws_current(&ctx.ses->ws), ses_env(ctx.ses), st, err))
		fail_msg("compute: %s", err);
}

static double free_metal(const sol_state *st, const char *m)
{
	for (int i = 0; i < st->chem->nmetals; i++)
		if (strcmp(st->chem->metals[i].symbol, m) == 0)
			return st->chem->metals[i].free_mM;
	fail_msg("no metal %s", m);
	return NAN;
}

static double amount(const char *compound)
{
	sol_item *it = sol_find(ws_current(&ctx.ses->ws), refdb_compound(db, compound));
	return it ? it->mM : 0;
}

static void hepes_titration(void **state)
{
	sol_state st;
	(void)state;
	ok("temp 25; solution h; add HEPES 10; ph 7.3 with KOH");
	/* Good et al. 1966 / Goldberg et al. 2002 pKa 7.564 at 25 C, I = 0
	 * (from memory): the KOH for 10 mM HEPES to pH 7.3 is 3.68 mM; the
	 * hand derivation with the ionic-strength correction is in
	 * tests/test_speciation.c (hepes_titration). */
	assert_close(amount("KOH"), 3.6775, 0, 0.002);
	forward(&st);
	assert_close(st.pH, 7.3, 0, 1e-6);
	/* the K+ of the titrant reaches every result */
	assert_close(sol_state_find(&st, refdb_ion(db, "K+"))->mM, amount("KOH"), 1e-12, 0);
	sol_state_free(&st);
	/* a second `ph` replaces the titration instead of adding to it */
	ok("ph 7.3 with KOH");
	assert_close(amount("KOH"), 3.6775, 0, 0.002);
	ok("ph 7.0 with KOH");
	forward(&st);
	assert_close(st.pH, 7.0, 0, 1e-6);
	sol_state_free(&st);
}

static void free_calcium_inverse(void **state)
{
	sol_state st;
	(void)state;
	/* forward and inverse agree to 1e-6 relative (the chemistry issue's
	 * check), with a titrant recomputed in between and without one */
	ok("temp 22; solution p; add K-gluconate 120; add KCl 10; add HEPES 10; add EGTA 10;"
	   "add MgCl2 2; add Na2ATP 4; ph 7.2 with KOH; free Ca 100 nM");
	forward(&st);
	assert_close(free_metal(&st, "Ca2+"), 1e-4, 1e-6, 0);
	assert_close(st.pH, 7.2, 0, 1e-6);
	sol_state_free(&st);
	ok("solution q; add KCl 150; add EGTA 1; add NaOH 2; free Ca 250 nM");
	forward(&st);
	assert_close(free_metal(&st, "Ca2+"), 2.5e-4, 1e-6, 0);
	sol_state_free(&st);
	/* the total is found again, not added to: asking twice changes nothing */
	{
		double first = amount("CaCl2");
		ok("free Ca 250 nM");
		assert_close(amount("CaCl2"), first, 1e-9, 0);
	}
	ok("free Mg 0.5 mM with MgCl2.6H2O");
	forward(&st);
	assert_close(free_metal(&st, "Mg2+"), 0.5, 1e-6, 0);
	sol_state_free(&st);
}

static void egta_calcium_range(void **state)
{
	sol_state st;
	(void)state;
	/* free Ca2+ in 10 mM EGTA plus 1 mM CaCl2 at pH 7.2 lies between about
	 * 5 and 50 nM (common practice, as in the chemistry issue) */
	ok("temp 22; solution e; add KCl 140; add HEPES 10; add EGTA 10; add CaCl2 1;"
	   "ph 7.2 with KOH");
	forward(&st);
	assert_true(free_metal(&st, "Ca2+") > 5e-6 && free_metal(&st, "Ca2+") < 50e-6);
	sol_state_free(&st);
}

static void osmolality_target(void **state)
{
	sol_state st;
	(void)state;
	ok("temp 22; solution s; add NaCl 130; add KCl 5; osmo 300 with sucrose");
	forward(&st);
	assert_close(st.osmolality_mOsm_kg, 300, 0, 0.01);
	sol_state_free(&st);
	ok("osmo 320 with NaCl");
	forward(&st);
	assert_close(st.osmolality_mOsm_kg, 320, 0, 0.01);
	sol_state_free(&st);
	/* 0.9 % (w/v) saline: about 286 mOsm/kg measured (common practice from
	 * clinical chemistry), within 2 %; its ideal osmolarity is 308 mOsm/L */
	ok("solution saline; add NaCl 9 g/L; temp 25");
	forward(&st);
	assert_close(st.osmolality_mOsm_kg, 286, 0.02, 0);
	assert_close(st.osmolarity_mOsm_L, 308, 0.003, 0);
	sol_state_free(&st);
}

static void bicarbonate_bath(void **state)
{
	sol_state st;
	(void)state;
	/* 26 mM NaHCO3 under 5 % CO2 at 37 C is near pH 7.4 (common
	 * practice; the physiological constants, see test_speciation.c) */
	ok("temp 37; solution acsf; add NaCl 125; add KCl 2.5; add NaHCO3 26;"
	   "add NaH2PO4 1.25; add glucose 25; add CaCl2 2; add MgCl2 1; gas co2 5%");
	forward(&st);
	assert_true(st.pH > 7.3 && st.pH < 7.6);
	sol_state_free(&st);
	ok("gas off");
	assert_close(ws_current(&ctx.ses->ws)->co2_frac, 0, 0, 0);
}

/* Water alone under 5 % CO2 (an empty solution, found by fuzz_command:
 * its pH was NaN): carbonic acid alone sets the pH.  The closed form for a
 * weak acid much stronger than water, [H+] = sqrt(K1 CO2), with the
 * program's own dissolved CO2 and apparent pK', must agree to 0.01; and
 * the pH must lie near 4.6, the textbook value for water under 5 % CO2
 * (common practice: rain under 0.04 % CO2 is about pH 5.6, and each
 * tenfold more CO2 lowers it by half a unit). */
static void water_under_co2(void **state)
{
	sol_state st;
	double pk, ph_closed;
	(void)state;
	ok("solution wet; gas co2 5%");
	forward(&st);
	assert_non_null(st.chem);
	assert_true(isfinite(st.pH));
	pk = spec_co2_pk_app(ctx.ses->chem, st.t_C, st.pH, st.ionic_strength_mM);
	ph_closed = -0.5 * log10(pow(10, -pk) * st.chem->co2_mM * 1e-3);
	assert_close(st.pH, ph_closed, 0, 0.01);
	assert_true(st.pH > 4.4 && st.pH < 4.8);
	sol_state_free(&st);
}

/* issue 10: `free Ca 100 nM` with 0.3 mM GTP present (almost every
 * internal) succeeds, at 22 and at 35 C, and the forward computation
 * returns 100 nM to 1e-6 relative; GTP takes Mg2+ (the free Mg2+ of 4 mM
 * Na2ATP + 4 mM MgCl2 falls when 0.3 mM GTP is added) */
static void gtp_internal(void **state)
{
	sol_state st;
	(void)state;
	ok("temp 22; solution g; add K-gluconate 130; add KCl 10; add HEPES 10; add EGTA 0.5;"
	   "add Na2ATP 4; add MgCl2 4; ph 7.3 with KOH");
	forward(&st);
	double mg0 = free_metal(&st, "Mg2+");
	sol_state_free(&st);
	ok("add Na2GTP 0.3; ph 7.3 with KOH");
	forward(&st);
	double mg1 = free_metal(&st, "Mg2+");
	sol_state_free(&st);
	assert_true(mg1 < mg0 - 0.05);
	ok("free Ca 100 nM");
	forward(&st);
	assert_close(free_metal(&st, "Ca2+"), 1e-4, 1e-6, 0);
	double ca22 = amount("CaCl2");
	/* every shipped ligand has its temperature dependence: no such note */
	for (int i = 0; i < st.chem->nwarn; i++)
		assert_null(strstr(st.chem->warnings[i], "temperature"));
	sol_state_free(&st);
	ok("temp 35; ph 7.3 with KOH; free Ca 100 nM");
	forward(&st);
	assert_close(free_metal(&st, "Ca2+"), 1e-4, 1e-6, 0);
	for (int i = 0; i < st.chem->nwarn; i++)
		assert_null(strstr(st.chem->warnings[i], "temperature"));
	sol_state_free(&st);
	/* EGTA binds more strongly at 35 C: the same free Ca2+ takes more
	 * CaCl2 (Harrison & Bers 1987, from memory) */
	assert_true(amount("CaCl2") > ca22);
	/* a ligand with no constant for the metal: a note, not a refusal */
	ok("solution z; add KCl 140; add BAPTA 10; add HEPES 10; ph 7.2 with KOH; "
	   "free Zn 1 uM with ZnCl2");
	forward(&st);
	assert_close(free_metal(&st, "Zn2+"), 1e-3, 1e-6, 0);
	sol_state_free(&st);
}

/* issue 10: the osmolality range (`show`, JSON osmolality_range_mOsm_kg)
 * of a K-gluconate internal, and `osmo` aiming at the central value */
static void osmolality_range(void **state)
{
	sol_state st;
	(void)state;
	ok("temp 22; solution k; add K-gluconate 130; add KCl 10; add HEPES 10; "
	   "ph 7.3 with KOH");
	forward(&st);
	assert_true(st.osmolality_lo_mOsm_kg < st.osmolality_mOsm_kg - 2);
	assert_true(st.osmolality_hi_mOsm_kg > st.osmolality_mOsm_kg + 2);
	/* bench practice: 0.90-0.95 of the ideal for such internals (common
	 * practice) */
	double ratio = st.osmolality_mOsm_kg / st.osmolarity_mOsm_L;
	assert_true(ratio > 0.88 && ratio < 0.96);
	sol_state_free(&st);
	ok("osmo 300 with sucrose");
	forward(&st);
	assert_close(st.osmolality_mOsm_kg, 300, 0, 0.01);
	sol_state_free(&st);
	o.json = 1;
	fflush(o.fp);
	size_t at = len;
	ok("show");
	fflush(o.fp);
	o.json = 0;
	assert_non_null(strstr(buf + at, "\"osmolality_range_mOsm_kg\":["));
}

/* issue 10: `ratio ... shift` with the test ion absent from the first
 * bath (Na -> K replacement, Na inside) recovers the ratio that made the
 * shift: (RT/F) ln(0.5) at 25 C = -17.809 mV (monovalent bi-ionic closed
 * form, Goldman 1943; Hodgkin & Katz 1949) */
static void substitution_ratio(void **state)
{
	(void)state;
	ok("temp 25; solution nin; add NaCl 140; solution nab; add NaCl 140; "
	   "solution kb; add KCl 140");
	double shift = 8.314462618 * 298.15 / 96485.33212 * 1000.0 * log(0.5);
	char line[160];
	snprintf(line, sizeof line, "ratio nin nab K Na shift nab kb by %.9f", shift);
	o.json = 1;
	fflush(o.fp);
	size_t at = len;
	ok(line);
	fflush(o.fp);
	o.json = 0;
	const char *p = strstr(buf + at, "\"ratio\":");
	assert_non_null(p);
	assert_close(strtod(p + 8, NULL), 0.5, 1e-6, 0);
	/* all permeant ions on one side in a state: refused, one line */
	char err[IM_ERRLEN];
	ok("solution empty; add sucrose 280");
	assert_int_equal(cmd_exec(&ctx, "ratio empty nab K Na shift nab kb by 5", err), -1);
	assert_non_null(strstr(err, "no reversal potential"));
}

static void refusals_change_nothing(void **state)
{
	static const char *bad[] = {
		"ph 7.3 with HCl",        /* an acid cannot raise the pH of HEPES */
		"ph 3 with KOH",          /* a base cannot lower it */
		"ph 7.3 with NaCl",       /* not an acid or base */
		"ph 7.3 with KCl",        /* already an ingredient */
		"ph 13.5 with KOH",       /* outside 2 to 12 */
		"ph 7.3 with",            /* missing titrant */
		"ph seven with KOH",
		"free Ca 10 M",           /* beyond 5 M */
		"free Na 1 mM",           /* not a binding metal */
		"free Ca -1 nM",
		"osmo -5",
		"osmo 0",
		"osmo 300 with nothing",
		"gas co2 0%",
		"gas co2 150%",
		"gas n2 5%",
		"constants nonsense",
	};
	char err[IM_ERRLEN];
	workspace before;
	(void)state;
	ok("solution h; add HEPES 10; add KCl 140");
	for (size_t i = 0; i < IM_COUNT(bad); i++) {
		ws_copy(&before, &ctx.ses->ws);
		if (cmd_exec(&ctx, bad[i], err) == 0)
			fail_msg("'%s' succeeded", bad[i]);
		assert_null(strchr(err, '\n'));
		for (int k = 0; k < before.n; k++)
			if (!sol_equal(before.sol[k], ctx.ses->ws.sol[k]))
				fail_msg("'%s' changed the workspace", bad[i]);
		ws_free(&before);
	}
}

static void recipe_replays_titration(void **state)
{
	char path[] = "/tmp/ionmix-chem-XXXXXX", line[128];
	int fd = mkstemp(path);
	workspace before;
	(void)state;
	close(fd);
	ok("solution k; add K-gluconate 130; add HEPES 10; add EGTA 1; ph 7.25 with KOH;"
	   "free Ca 50 nM");
	snprintf(line, sizeof line, "export k %s", path);
	ok(line);
	ws_copy(&before, &ctx.ses->ws);
	ok("add NaCl 20; solution other");
	snprintf(line, sizeof line, "run %s", path);
	ok(line);
	{
		solution *a = ws_find(&before, "k"), *b = ws_find(&ctx.ses->ws, "k");
		assert_int_equal(a->n, b->n);
		for (int i = 0; i < a->n; i++) {
			assert_ptr_equal(a->items[i].c, b->items[i].c);
			assert_close(b->items[i].mM, a->items[i].mM, 1e-8, 0);
			assert_int_equal(a->items[i].titrant, b->items[i].titrant);
		}
	}
	ws_free(&before);
	unlink(path);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(hepes_titration, fresh, done),
		cmocka_unit_test_setup_teardown(free_calcium_inverse, fresh, done),
		cmocka_unit_test_setup_teardown(egta_calcium_range, fresh, done),
		cmocka_unit_test_setup_teardown(osmolality_target, fresh, done),
		cmocka_unit_test_setup_teardown(bicarbonate_bath, fresh, done),
		cmocka_unit_test_setup_teardown(gtp_internal, fresh, done),
		cmocka_unit_test_setup_teardown(osmolality_range, fresh, done),
		cmocka_unit_test_setup_teardown(substitution_ratio, fresh, done),
		cmocka_unit_test_setup_teardown(refusals_change_nothing, fresh, done),
		cmocka_unit_test_setup_teardown(recipe_replays_titration, fresh, done),
		cmocka_unit_test_setup_teardown(water_under_co2, fresh, done),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
