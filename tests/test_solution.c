/* test_solution.c - solutions, species totals, ionic strength, workspace. */
#include "testutil.h"

#include <string.h>

#include "activity.h"
#include "common.h"
#include "solution.h"

#include "testref.h"

static void species_and_strength(void **state)
{
	solution s;
	sol_state st;
	char err[IM_ERRLEN];
	(void)state;
	sol_init(&s, "bath");
	sol_add(&s, C("NaCl"), 140);
	sol_add(&s, C("KCl"), 5);
	sol_add(&s, C("CaCl2.2H2O"), 2);
	sol_add(&s, C("MgCl2"), 1);
	sol_add(&s, C("glucose"), 10);
	assert_int_equal(sol_compute(&s, &(sol_env){db, NULL, NULL, 25, ACT_DAVIES}, &st, err), 0);
	/* Cl- = 140 + 5 + 2*2 + 2*1 = 151 mM; I = (140 + 5 + 4*2 + 4*1 + 151)/2
	 * = 154 mM; particles 140+5+2+1+151+10 = 309 mOsm/L (by hand) */
	assert_close(sol_state_find(&st, refdb_ion(db, "Cl-"))->mM, 151, 1e-12, 0);
	assert_close(st.ionic_strength_mM, 154, 1e-12, 0);
	assert_close(st.osmolarity_mOsm_L, 309, 1e-12, 0);
	assert_close(st.net_charge_mEq_L, 0, 0, 1e-12);
	/* gamma from Davies at I = 154 mM */
	assert_close(sol_state_find(&st, refdb_ion(db, "Na+"))->gamma,
		     act_davies(1, 154, 25), 1e-14, 0);
	assert_close(sol_state_find(&st, refdb_ion(db, "Ca2+"))->act_mM,
		     2 * act_davies(2, 154, 25), 1e-14, 0);
	/* cations first, higher charge first; neutrals last */
	assert_int_equal(st.sp[0].ion->z, 2);
	assert_int_equal(st.sp[st.n - 1].ion->z, 0);
	sol_state_free(&st);
	assert_int_equal(sol_compute(&s, &(sol_env){db, NULL, NULL, 25, ACT_DEBYE_HUCKEL}, &st, err), 0);
	assert_close(sol_state_find(&st, refdb_ion(db, "K+"))->gamma,
		     act_extended_dh(1, refdb_ion(db, "K+")->kielland_a_pm, 154, 25), 1e-14, 0);
	sol_state_free(&st);
	assert_int_equal(sol_compute(&s, &(sol_env){db, NULL, NULL, 150, ACT_DAVIES}, &st, err), -1);
	sol_free(&s);
}

static void add_set_remove(void **state)
{
	solution s, t;
	(void)state;
	sol_init(&s, "x");
	sol_add(&s, C("KCl"), 5);
	sol_add(&s, C("KCl"), 5);
	assert_close(sol_find(&s, C("KCl"))->mM, 10, 0, 0);
	sol_set(&s, C("KCl"), 3);
	assert_close(sol_find(&s, C("KCl"))->mM, 3, 0, 0);
	sol_set(&s, C("NaCl"), 100);
	assert_int_equal(s.n, 2);
	sol_copy(&t, &s, "x");
	assert_true(sol_equal(&s, &t));
	assert_int_equal(sol_remove(&s, C("KCl")), 0);
	assert_int_equal(sol_remove(&s, C("KCl")), -1);
	assert_false(sol_equal(&s, &t));
	assert_ptr_equal(s.items[0].c, C("NaCl"));
	sol_free(&s);
	sol_free(&t);
}

static void workspace_ops(void **state)
{
	workspace w, copy;
	(void)state;
	ws_init(&w);
	assert_null(ws_current(&w));
	sol_add(ws_open(&w, "a"), C("NaCl"), 1);
	sol_add(ws_open(&w, "b"), C("KCl"), 2);
	assert_string_equal(ws_current(&w)->name, "b");
	ws_copy(&copy, &w);
	assert_int_equal(ws_delete(&w, "b"), 0);
	assert_null(ws_current(&w));
	assert_int_equal(ws_delete(&w, "b"), -1);
	assert_non_null(ws_find(&copy, "b"));
	assert_true(sol_equal(ws_find(&copy, "a"), ws_find(&w, "a")));
	ws_free(&w);
	ws_free(&copy);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(species_and_strength), cmocka_unit_test(add_set_remove),
		cmocka_unit_test(workspace_ops),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
