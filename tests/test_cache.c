/*
 * test_cache.c - the session's cache of computed solution states
 * (ses_compute): every answer it gives is the one sol_compute gives for
 * the same solution and settings at that moment, whatever changed in
 * between (the solution, the temperature, the activity model, a
 * compilation pick, an undone command).  The reference is sol_compute
 * itself, run fresh each time; the states are compared field by field
 * and exactly, since both come from the same arithmetic.
 */
#include "testutil.h"

#include <stdio.h>
#include <string.h>

#include "common.h"
#include "session.h"
#include "speciation.h"

#include "testref.h"

static int same(double a, double b)
{
	return a == b || (isnan(a) && isnan(b));
}

/* a and b agree in every reported number (species, activities, ionic
 * strength, pH, osmolality, the speciation result's free metals). */
static void assert_states_equal(const sol_state *a, const sol_state *b)
{
	assert_int_equal(a->n, b->n);
	for (int j = 0; j < a->n; j++) {
		assert_ptr_equal(a->sp[j].ion, b->sp[j].ion);
		assert_true(same(a->sp[j].mM, b->sp[j].mM));
		assert_true(same(a->sp[j].gamma, b->sp[j].gamma));
		assert_true(same(a->sp[j].act_mM, b->sp[j].act_mM));
	}
	assert_true(same(a->t_C, b->t_C));
	assert_int_equal(a->model, b->model);
	assert_true(same(a->ionic_strength_mM, b->ionic_strength_mM));
	assert_true(same(a->osmolarity_mOsm_L, b->osmolarity_mOsm_L));
	assert_true(same(a->pH, b->pH));
	assert_true(same(a->osmolality_mOsm_kg, b->osmolality_mOsm_kg));
	assert_true(same(a->osmolality_lo_mOsm_kg, b->osmolality_lo_mOsm_kg));
	assert_true(same(a->osmolality_hi_mOsm_kg, b->osmolality_hi_mOsm_kg));
	assert_int_equal(a->chem != NULL, b->chem != NULL);
	if (!a->chem)
		return;
	assert_int_equal(a->chem->n, b->chem->n);
	for (int i = 0; i < a->chem->n; i++) {
		assert_string_equal(a->chem->sp[i].symbol, b->chem->sp[i].symbol);
		assert_true(same(a->chem->sp[i].mM, b->chem->sp[i].mM));
	}
	assert_int_equal(a->chem->nmetals, b->chem->nmetals);
	for (int m = 0; m < a->chem->nmetals; m++)
		assert_true(same(a->chem->metals[m].free_mM, b->chem->metals[m].free_mM));
	assert_int_equal(a->chem->nligands, b->chem->nligands);
	assert_int_equal(a->chem->nwarn, b->chem->nwarn);
	for (int w = 0; w < a->chem->nwarn; w++)
		assert_string_equal(a->chem->warnings[w], b->chem->warnings[w]);
}

/* ses_compute of sol equals a fresh sol_compute now; the cached copy is
 * returned in *out (caller frees). */
static void check_now(session *s, const solution *sol, sol_state *out)
{
	sol_state fresh;
	char err[IM_ERRLEN];
	assert_int_equal(ses_compute(s, sol, out, err), 0);
	assert_int_equal(sol_compute(sol, ses_env(s), &fresh, err), 0);
	assert_states_equal(out, &fresh);
	sol_state_free(&fresh);
}

static double free_ca(const sol_state *st)
{
	return sol_state_free_mM(st, "Ca2+");
}

static void cache_follows_every_change(void **state)
{
	session s;
	solution *pip;
	sol_state a, b;
	char err[IM_ERRLEN], names[32][32];
	(void)state;
	ses_init(&s, db);
	assert_int_equal(ses_load_chemistry(&s, err), 0);
	pip = ws_open(&s.ws, "pip");
	sol_add(pip, C("KCl"), 140);
	sol_add(pip, C("HEPES"), 10);
	sol_add(pip, C("EGTA"), 10);
	sol_add(pip, C("CaCl2"), 4);
	sol_add(pip, C("KOH"), 30);

	check_now(&s, pip, &a);
	check_now(&s, pip, &b); /* a hit: the same numbers again */
	assert_states_equal(&a, &b);
	assert_true(free_ca(&a) > 0);
	sol_state_free(&b);

	/* the solution changes: more Ca2+, more free Ca2+ */
	sol_add(pip, C("CaCl2"), 2);
	check_now(&s, pip, &b);
	assert_true(free_ca(&b) > free_ca(&a));
	sol_state_free(&b);

	/* the temperature changes */
	assert_int_equal(ses_set_temp(&s, 35, "35", err), 0);
	check_now(&s, pip, &b);
	assert_true(b.t_C == 35);
	sol_state_free(&b);

	/* the activity model changes */
	assert_int_equal(ses_set_model(&s, "dh", err), 0);
	check_now(&s, pip, &b);
	assert_int_equal(b.model, ACT_DEBYE_HUCKEL);
	sol_state_free(&b);

	/* every compilation pick in turn, then back to the defaults: each
	 * answer is the fresh one (a stale state would differ from it for
	 * the picks that change an EGTA, HEPES or Ca2+ constant) */
	int nc = spec_compilations(s.chem, s.osm, names, 32);
	assert_true(nc > 0);
	for (int k = 0; k < nc; k++) {
		if (spec_pick_compilation(s.chem, s.osm, names[k], err))
			continue;
		check_now(&s, pip, &b);
		sol_state_free(&b);
	}
	assert_int_equal(spec_pick_compilation(s.chem, s.osm, "default", err), 0);
	check_now(&s, pip, &b);
	sol_state_free(&b);

	/* a failed command's undo puts the solution back: the state follows */
	ses_mark mark;
	ses_mark_take(&s, &mark);
	pip = ws_find(&s.ws, "pip");
	sol_remove(pip, C("EGTA"));
	check_now(&s, pip, &b);
	sol_state_free(&b);
	ses_mark_restore(&s, &mark);
	pip = ws_find(&s.ws, "pip");
	check_now(&s, pip, &b);
	assert_true(b.chem != NULL);
	sol_state_free(&b);

	/* more solutions than the cache holds: each still right */
	for (int k = 0; k < 20; k++) {
		char name[16];
		snprintf(name, sizeof name, "s%d", k);
		solution *x = ws_open(&s.ws, name);
		sol_add(x, C("NaCl"), 100 + k);
		check_now(&s, x, &b);
		sol_state_free(&b);
	}
	check_now(&s, ws_find(&s.ws, "pip"), &b);
	sol_state_free(&b);
	sol_state_free(&a);
	ses_free(&s);
}

/* a pick that changes the constants in use must change the answer: the
 * cache may not hand back the state computed before it */
static void pick_invalidates(void **state)
{
	session s;
	solution *pip;
	sol_state before, after;
	char err[IM_ERRLEN], names[32][32];
	int changed = 0;
	(void)state;
	ses_init(&s, db);
	assert_int_equal(ses_load_chemistry(&s, err), 0);
	pip = ws_open(&s.ws, "pip");
	sol_add(pip, C("KCl"), 140);
	sol_add(pip, C("HEPES"), 10);
	sol_add(pip, C("EGTA"), 10);
	sol_add(pip, C("CaCl2"), 4);
	sol_add(pip, C("KOH"), 30);
	check_now(&s, pip, &before);
	int nc = spec_compilations(s.chem, s.osm, names, 32);
	for (int k = 0; k < nc && !changed; k++) {
		if (spec_pick_compilation(s.chem, s.osm, names[k], err))
			continue;
		check_now(&s, pip, &after);
		changed = !same(free_ca(&after), free_ca(&before)) || !same(after.pH, before.pH);
		sol_state_free(&after);
		assert_int_equal(spec_pick_compilation(s.chem, s.osm, "default", err), 0);
	}
	assert_true(changed); /* some compilation moves free Ca2+ or the pH */
	sol_state_free(&before);
	ses_free(&s);
}

/* States held by ses_compute_hold stay as computed while more solutions
 * than the cache holds pass through it (none replaces a held one), even
 * when every entry is held; released, they make room again. */
static void held_states_stay(void **state)
{
	session s;
	const sol_state *held[12];
	sol_state fresh, copy;
	solution *x[12];
	char err[IM_ERRLEN];
	(void)state;
	ses_init(&s, db);
	assert_int_equal(ses_load_chemistry(&s, err), 0);
	for (int k = 0; k < 12; k++) { /* 12 held: more than the 8 entries */
		char name[16];
		snprintf(name, sizeof name, "h%d", k);
		x[k] = ws_open(&s.ws, name);
		sol_add(x[k], C("KCl"), 100 + k);
		sol_add(x[k], C("HEPES"), 10);
		assert_int_equal(ses_compute_hold(&s, x[k], &held[k], err), 0);
	}
	for (int k = 0; k < 20; k++) { /* others come and go, copied */
		char name[16];
		snprintf(name, sizeof name, "o%d", k);
		solution *o = ws_open(&s.ws, name);
		sol_add(o, C("NaCl"), 50 + k);
		check_now(&s, o, &copy);
		sol_state_free(&copy);
	}
	for (int k = 0; k < 12; k++) {
		const sol_state *again;
		assert_int_equal(sol_compute(x[k], ses_env(&s), &fresh, err), 0);
		assert_states_equal(held[k], &fresh);
		assert_int_equal(ses_compute_hold(&s, x[k], &again, err), 0);
		assert_states_equal(again, &fresh);
		ses_state_release(&s, again);
		sol_state_free(&fresh);
	}
	for (int k = 0; k < 12; k++)
		ses_state_release(&s, held[k]);
	for (int k = 0; k < 12; k++) { /* released: the cache works on */
		check_now(&s, x[k], &copy);
		sol_state_free(&copy);
	}
	ses_free(&s);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(cache_follows_every_change),
		cmocka_unit_test(pick_invalidates),
		cmocka_unit_test(held_states_stay),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
