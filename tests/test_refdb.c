/* test_refdb.c - the embedded reference data loads and lookups work. */
#include "testutil.h"

#include <string.h>

#include "common.h"
#include "refdb.h"

static refdb *db;

static int setup(void **state)
{
	char err[IM_ERRLEN];
	(void)state;
	return refdb_open(&db, err);
}

static int teardown(void **state)
{
	(void)state;
	refdb_close(db);
	return 0;
}

static void required_compounds(void **state)
{
	/* the compounds the core issue names, each must be found */
	static const char *names[] = {
		"NaCl", "KCl", "CsCl", "LiCl", "CaCl2", "CaCl2.2H2O", "MgCl2", "MgCl2.6H2O",
		"BaCl2", "CdCl2", "NaHCO3", "NaH2PO4", "NaH2PO4.H2O", "Na2HPO4", "KH2PO4",
		"MgSO4", "MgSO4.7H2O", "Na2SO4", "KF", "CsF", "NaOH", "KOH", "CsOH", "HCl",
		"NMDG", "TEA-Cl", "choline chloride", "Tris", "K-gluconate", "Na-gluconate",
		"K-methanesulfonate", "Cs-methanesulfonate", "K-aspartate", "Na-pyruvate",
		"glucose", "sucrose", "mannitol", "HEPES", "EGTA", "BAPTA", "EDTA", "Na2ATP",
		"MgATP", "Na2GTP", "Na2-phosphocreatine", "QX-314 chloride", "4-aminopyridine"};
	(void)state;
	for (size_t i = 0; i < IM_COUNT(names); i++) {
		const rd_compound *c = refdb_compound(db, names[i]);
		if (!c)
			fail_msg("compound %s missing", names[i]);
		assert_true(c->fw_g_mol > 0);
		assert_true(c->nyields > 0);
		assert_non_null(c->fw_source);
	}
}

static void names_and_aliases(void **state)
{
	(void)state;
	/* case-insensitive, middle dot, aliases */
	assert_ptr_equal(refdb_compound(db, "nacl"), refdb_compound(db, "NaCl"));
	assert_ptr_equal(refdb_compound(db, "MgCl2\xc2\xb7" "6H2O"),
			 refdb_compound(db, "MgCl2.6H2O"));
	assert_ptr_equal(refdb_compound(db, "potassium chloride"), refdb_compound(db, "KCl"));
	assert_null(refdb_compound(db, "unobtainium"));
	/* MgCl2.6H2O = 203.30 g/mol (IUPAC atomic weights; also checked for every
	 * compound by tests/ref/check_formula_weights.py with periodictable) */
	assert_close(refdb_compound(db, "MgCl2.6H2O")->fw_g_mol, 203.30, 0, 0.01);
	assert_string_equal(refdb_compound(db, "MgCl2.6H2O")->hydrate_of, "MgCl2");
}

static void ions(void **state)
{
	const rd_ion *k = refdb_ion(db, "K+"), *ca = refdb_ion(db, "Ca");
	(void)state;
	assert_non_null(k);
	assert_ptr_equal(refdb_ion(db, "K"), k);
	assert_ptr_equal(refdb_ion(db, "k+"), k);
	assert_int_equal(k->z, 1);
	/* K+ 73.48 S cm2/eq at 25 C (CRC Handbook, from memory) */
	assert_close(k->lambda_S_cm2_eq, 73.48, 0, 0.01);
	assert_non_null(ca);
	assert_int_equal(ca->z, 2);
	assert_string_equal(ca->symbol, "Ca2+");
	assert_string_equal(refdb_ion(db, "SO4")->symbol, "SO4^2-");
	assert_null(refdb_ion(db, "Xx"));
}

static void yields_neutral(void **state)
{
	/* every compound's formula unit is electroneutral */
	(void)state;
	for (int i = 0; i < refdb_ncompounds(db); i++) {
		const rd_compound *c = refdb_compound_at(db, i);
		double q = 0;
		for (int k = 0; k < c->nyields; k++)
			q += c->yields[k].count * c->yields[k].ion->z;
		if (fabs(q) > 1e-12)
			fail_msg("%s yields net charge %g", c->name, q);
	}
}

static void suggestions(void **state)
{
	const char *s[3];
	int n = refdb_suggest(db, "NaCll", s, 3);
	(void)state;
	assert_true(n >= 1);
	assert_string_equal(s[0], "NaCl");
	n = refdb_suggest(db, "gluconat", s, 3);
	assert_true(n >= 1);
	assert_non_null(strstr(s[0], "gluconate"));
	assert_int_equal(refdb_suggest(db, "zzzzzzzzzzzzzz", s, 3), 0);
}

static void hazards(void **state)
{
	static const char *toxic[] = {"CsF", "BaCl2", "CdCl2", "4-aminopyridine",
				      "QX-314 chloride", "TEA-Cl", "NaOH", "KOH", "HCl"};
	(void)state;
	for (size_t i = 0; i < IM_COUNT(toxic); i++) {
		const rd_compound *c = refdb_compound(db, toxic[i]);
		assert_non_null(c->hazard);
		assert_non_null(strstr(c->hazard, "safety data sheet"));
	}
	assert_null(refdb_compound(db, "NaCl")->hazard);
}

/* The embedded image and the embedded SQL text build the same data. */
static void image_matches_text(void **state)
{
	refdb *t;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(refdb_open_sql(&t, refdb_sql_text(), err), 0);
	assert_int_equal(refdb_ncompounds(t), refdb_ncompounds(db));
	assert_int_equal(refdb_nions(t), refdb_nions(db));
	assert_int_equal(refdb_naliases(t), refdb_naliases(db));
	for (int i = 0; i < refdb_ncompounds(db); i++) {
		const rd_compound *a = refdb_compound_at(db, i), *b = refdb_compound_at(t, i);
		assert_string_equal(a->name, b->name);
		assert_true(a->fw_g_mol == b->fw_g_mol);
		assert_int_equal(a->nyields, b->nyields);
	}
	for (int i = 0; i < refdb_nions(db); i++) {
		const rd_ion *a = refdb_ion_at(db, i), *b = refdb_ion_at(t, i);
		assert_string_equal(a->symbol, b->symbol);
		assert_int_equal(a->z, b->z);
		assert_true(a->lambda_S_cm2_eq == b->lambda_S_cm2_eq ||
			    (isnan(a->lambda_S_cm2_eq) && isnan(b->lambda_S_cm2_eq)));
	}
	refdb_close(t);
	assert_int_equal(refdb_open_sql(&t, "CREATE TABLE broken(", err), -1);
	assert_null(t);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(required_compounds), cmocka_unit_test(names_and_aliases),
		cmocka_unit_test(ions), cmocka_unit_test(yields_neutral),
		cmocka_unit_test(suggestions), cmocka_unit_test(hazards),
		cmocka_unit_test(image_matches_text),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
