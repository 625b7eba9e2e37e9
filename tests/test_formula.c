/* test_formula.c - formulas typed for user-defined compounds: grammar,
 * charges, hydrates, errors.  With arguments it prints "FORMULA<TAB>fw"
 * for each, for tests/ref/check_formula_user.py, which compares them with
 * python3-periodictable. */
#include "testutil.h"

#include <string.h>

#include "common.h"
#include "formula.h"

static double fw(const char *f)
{
	formula_info fi;
	char err[IM_ERRLEN];
	if (formula_parse(f, &fi, err) != 0)
		fail_msg("%s: %s", f, err);
	return fi.fw_g_mol;
}

static void known_weights(void **state)
{
	(void)state;
	/* NaCl 58.443 and KCl 74.551 g/mol: CRC Handbook (from memory), which
	 * uses the same atomic weights to 0.001 */
	assert_close(fw("NaCl"), 58.443, 0, 0.002);
	assert_close(fw("KCl"), 74.551, 0, 0.002);
	/* the hydrate written three ways gives one weight */
	double a = fw("MgCl2.6H2O"), b = fw("MgCl2(H2O)6"), c = fw("MgCl2\xc2\xb7" "6H2O");
	assert_close(a, 203.30, 0, 0.01); /* MgCl2.6H2O 203.30 g/mol, CRC (from memory) */
	assert_close(b, a, 1e-12, 0);
	assert_close(c, a, 1e-12, 0);
	assert_close(fw("MgCl2*6H2O"), a, 1e-12, 0);
	/* a half hydrate and nested brackets */
	assert_close(fw("CaSO4.0.5H2O"), fw("CaSO4") + 0.5 * fw("H2O"), 1e-12, 0);
	assert_close(fw("[Co(NH3)6]Cl3"), fw("CoN6H18Cl3"), 1e-12, 0);
	assert_close(fw("Ca(NO3)2.4H2O"), fw("CaN2O10H8"), 1e-12, 0);
}

static void charges(void **state)
{
	formula_info fi;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(formula_parse("HPO4^2-", &fi, err), 0);
	assert_int_equal(fi.charge, -2);
	assert_int_equal(formula_parse("C6H11O7-", &fi, err), 0);
	assert_int_equal(fi.charge, -1);
	assert_int_equal(formula_parse("Ca++", &fi, err), 0);
	assert_int_equal(fi.charge, 2);
	assert_int_equal(formula_parse("NH4^+", &fi, err), 0);
	assert_int_equal(fi.charge, 1);
	assert_int_equal(formula_parse("KCl", &fi, err), 0);
	assert_int_equal(fi.charge, 0);
	assert_int_equal(fi.elements, 2);
}

static void errors(void **state)
{
	formula_info fi;
	char err[IM_ERRLEN];
	(void)state;
	struct {
		const char *f, *says;
	} bad[] = {
		{"", "empty"},          {"Xx2", "unknown element 'Xx'"},
		{"Ca(NO3", "unclosed"}, {"CaNO3)2", "unexpected character"},
		{"K0Cl", "above 0"},    {"()", "empty group"},
		{"KCl.", "element expected"}, {"SO4^2", "'+' or '-'"},
		{"kcl", "element expected"},  {"K Cl", "unexpected character"},
		{"Na2SO4^12-", "1 to 9"},
	};
	for (size_t i = 0; i < IM_COUNT(bad); i++) {
		err[0] = '\0';
		if (formula_parse(bad[i].f, &fi, err) != -1)
			fail_msg("'%s' was accepted", bad[i].f);
		if (strstr(err, bad[i].says) == NULL)
			fail_msg("'%s': message '%s' lacks '%s'", bad[i].f, err, bad[i].says);
		assert_null(strchr(err, '\n'));
	}
	assert_true(isnan(formula_atomic_weight("Q")));
	assert_close(formula_atomic_weight("Cl"), 35.453, 0, 0.001);
}

int main(int argc, char **argv)
{
	if (argc > 1) {
		for (int i = 1; i < argc; i++) {
			formula_info fi;
			char err[IM_ERRLEN];
			if (formula_parse(argv[i], &fi, err) != 0) {
				printf("%s\terror\t%s\n", argv[i], err);
				continue;
			}
			printf("%s\t%.6f\t%d\n", argv[i], fi.fw_g_mol, fi.charge);
		}
		return 0;
	}
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(known_weights),
		cmocka_unit_test(charges),
		cmocka_unit_test(errors),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
