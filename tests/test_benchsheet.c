/* test_benchsheet.c - the bench sheet: amounts, units per row, titrants,
 * the order of work, HTML and CSV output. */
#include "testutil.h"

#include <stdlib.h>
#include <string.h>

#include "benchsheet.h"
#include "common.h"
#include "solution.h"
#include "weigh.h"

#include "testref.h"

static const bs_line *line_of(const bs_sheet *b, const char *name)
{
	for (int i = 0; i < b->n; i++)
		if (strcmp(b->lines[i].c->name, name) == 0)
			return &b->lines[i];
	fail_msg("no line for %s", name);
	return NULL;
}

/* The index of the first step containing text, or -1. */
static int step_with(const bs_sheet *b, const char *text)
{
	for (int i = 0; i < b->nsteps; i++)
		if (strstr(b->steps[i], text))
			return i;
	return -1;
}

static void masses_by_hand(void **state)
{
	char buf[48];
	(void)state;
	/* grams = mM * 1e-3 * mL * 1e-3 * FW (by hand): 140 mM NaCl (58.44) in
	 * 500 mL = 0.07 mol * 58.44 = 4.0908 g */
	weigh_fmt_mass(buf, sizeof buf, weigh_grams(140, 58.44, 500));
	assert_string_equal(buf, "4.091 g");
	/* 5 mM KCl (74.55) in 500 mL = 0.18638 g: below 1 g, in mg to 0.1 mg */
	weigh_fmt_mass(buf, sizeof buf, weigh_grams(5, 74.55, 500));
	assert_string_equal(buf, "186.4 mg");
	/* 0.5 mM EGTA (380.35) in 50 mL = 9.51 mg: never "0.0095 g" */
	weigh_fmt_mass(buf, sizeof buf, weigh_grams(0.5, 380.35, 50));
	assert_string_equal(buf, "9.5 mg");
	weigh_fmt_volume(buf, sizeof buf, 1000, 0);
	assert_string_equal(buf, "1.000 L");
	weigh_fmt_volume(buf, sizeof buf, 0.1302, 0);
	assert_string_equal(buf, "130.2 uL");
}

static void titrant_without_stock(void **state)
{
	solution s;
	bs_sheet b;
	char err[IM_ERRLEN];
	(void)state;
	sol_init(&s, "hbs");
	sol_add(&s, C("NaCl"), 140);
	sol_add(&s, C("HEPES"), 10);
	sol_add(&s, C("NaOH"), 4.5);
	s.items[2].titrant = 1;
	s.ph_target = 7.4;
	assert_int_equal(bs_build(&s, NULL, db, 100, 25, NAN, "2026-01-01", &b, err), 0);
	const bs_line *l = line_of(&b, "NaOH");
	assert_int_equal(l->how, BS_TITRANT_SUGGEST);
	/* 4.5 mM in 100 mL = 0.45 mmol = 450 uL of 1 M (by hand) */
	assert_close(l->mmol, 0.45, 1e-12, 0);
	assert_close(l->stock_mM, BS_TITRANT_STOCK_mM, 0, 0);
	assert_string_equal(l->amount, "450.0 uL");
	assert_true(strcmp(l->amount_unit, "g") != 0 && strcmp(l->amount_unit, "mg") != 0);
	/* titration before making up to volume (common practice) */
	int t = step_with(&b, "Titrate to pH 7.40"), v = step_with(&b, "Make up to");
	assert_true(t >= 0 && v > t);
	assert_int_equal(l->step, t);
	bs_free(&b);
	sol_free(&s);
}

static void bicarbonate_gas_before_calcium(void **state)
{
	solution s;
	bs_sheet b;
	char err[IM_ERRLEN];
	(void)state;
	sol_init(&s, "acsf");
	sol_add(&s, C("CaCl2.2H2O"), 2); /* added first on purpose */
	sol_add(&s, C("NaCl"), 125);
	sol_add(&s, C("NaHCO3"), 26);
	s.co2_frac = 0.05;
	assert_int_equal(bs_build(&s, NULL, db, 1000, 32, 21, "2026-01-01", &b, err), 0);
	int gas = step_with(&b, "Gas with 5 % CO2");
	assert_true(gas >= 0);
	/* calcium carbonate precipitates in an ungassed bicarbonate saline
	 * (common practice): Ca2+ after the gassing step, bicarbonate before */
	assert_true(line_of(&b, "CaCl2.2H2O")->step > gas);
	assert_true(line_of(&b, "NaHCO3")->step < gas);
	assert_string_equal(b.lines[b.n - 1].c->name, "CaCl2.2H2O");
	bs_free(&b);
	sol_free(&s);
}

static void nucleotides_fresh_on_ice_and_output(void **state)
{
	solution s;
	bs_sheet b;
	char err[IM_ERRLEN];
	(void)state;
	sol_init(&s, "pip");
	sol_add(&s, C("Na2ATP"), 4);
	sol_add(&s, C("KCl"), 140);
	assert_int_equal(bs_build(&s, NULL, db, 10, 22, NAN, "2026-01-01", &b, err), 0);
	int ice = step_with(&b, "On ice");
	assert_true(ice >= 0 && strstr(b.steps[ice], "fresh"));
	assert_int_equal(line_of(&b, "Na2ATP")->step, ice);
	assert_true(line_of(&b, "KCl")->step < ice);

	char *text = NULL;
	size_t n = 0;
	FILE *fp = open_memstream(&text, &n);
	bs_write_csv(fp, &b);
	fclose(fp);
	/* RFC 4180: CRLF line ends; a header and one row per compound */
	assert_non_null(strstr(text, "solution,date,volume_mL,step,compound,"));
	assert_non_null(strstr(text, "\r\npip,2026-01-01,10,2,KCl,140,74.55,weigh,104.4,mg,"));
	free(text);
	fp = open_memstream(&text, &n);
	bs_write_html(fp, &b, "test");
	fclose(fp);
	assert_non_null(strstr(text, "@page"));
	assert_non_null(strstr(text, "Na2ATP"));
	assert_non_null(strstr(text, "safety data sheet"));
	free(text);
	bs_free(&b);

	solution e;
	sol_init(&e, "empty");
	assert_int_equal(bs_build(&e, NULL, db, 10, 22, NAN, "2026-01-01", &b, err), -1);
	assert_non_null(strstr(err, "empty"));
	sol_free(&e);
	sol_free(&s);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(masses_by_hand),
		cmocka_unit_test(titrant_without_stock),
		cmocka_unit_test(bicarbonate_gas_before_calcium),
		cmocka_unit_test(nucleotides_fresh_on_ice_and_output),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
