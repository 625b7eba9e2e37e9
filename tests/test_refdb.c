/* test_refdb.c - the embedded reference data loads and lookups work. */
#include "testutil.h"

#include <string.h>

#include "common.h"
#include "eqdata.h"
#include "refdb.h"

#include "testref.h"

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

static int same_num(double a, double b)
{
	return a == b || (isnan(a) && isnan(b));
}

static int same_str(const char *a, const char *b)
{
	return a == b || (a && b && strcmp(a, b) == 0);
}

/* the same source, by id (NULL matches NULL) */
static int same_src(const rd_source *a, const rd_source *b)
{
	return a == b || (a && b && strcmp(a->id, b->id) == 0);
}

/* The C tables generated at build time (refdb_open) hold, field by
 * field, what the loaders read from the embedded SQL text of data/; the
 * name look-up (binary search on the tables) finds what a linear search
 * of the text's arrays finds, for every name and alias in any case. */
static void tables_match_sql(void **state)
{
	refdb *t;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(refdb_open_sql(&t, refdb_sql_text(), err), 0);
	assert_int_equal(refdb_nsources(t), refdb_nsources(db));
	for (int i = 0; i < refdb_nsources(db); i++) {
		const rd_source *a = refdb_source_at(db, i), *b = refdb_source_at(t, i);
		assert_string_equal(a->id, b->id);
		assert_string_equal(a->citation, b->citation);
		assert_int_equal(a->common_practice, b->common_practice);
		assert_int_equal(a->from_memory, b->from_memory);
		assert_ptr_equal(refdb_source(db, a->id), a);
	}
	assert_int_equal(refdb_nions(t), refdb_nions(db));
	for (int i = 0; i < refdb_nions(db); i++) {
		const rd_ion *a = refdb_ion_at(db, i), *b = refdb_ion_at(t, i);
		assert_string_equal(a->symbol, b->symbol);
		assert_true(same_str(a->name, b->name));
		assert_int_equal(a->z, b->z);
		assert_true(same_num(a->lambda_S_cm2_eq, b->lambda_S_cm2_eq));
		assert_true(same_num(a->D_1e9_m2_s, b->D_1e9_m2_s));
		assert_true(same_src(a->mobility_source, b->mobility_source));
		assert_true(same_num(a->kielland_a_pm, b->kielland_a_pm));
		assert_true(same_src(a->size_source, b->size_source));
		assert_int_equal(a->derived, b->derived);
		assert_true(same_str(a->formula, b->formula));
		assert_true(same_num(a->mass_g_mol, b->mass_g_mol));
		assert_int_equal(a->mobility_class, b->mobility_class);
		assert_true(same_num(a->mobility_rel_unc, b->mobility_rel_unc));
		assert_ptr_equal(refdb_ion_exact(db, a->symbol), a);
	}
	assert_int_equal(refdb_ncompounds(t), refdb_ncompounds(db));
	for (int i = 0; i < refdb_ncompounds(db); i++) {
		const rd_compound *a = refdb_compound_at(db, i), *b = refdb_compound_at(t, i);
		char up[128];
		assert_string_equal(a->name, b->name);
		assert_true(same_str(a->formula, b->formula));
		assert_true(same_num(a->fw_g_mol, b->fw_g_mol));
		assert_true(same_src(a->fw_source, b->fw_source));
		assert_true(same_str(a->hydrate_of, b->hydrate_of));
		assert_true(same_str(a->kind, b->kind));
		assert_true(same_str(a->hazard, b->hazard));
		assert_true(same_str(a->description, b->description));
		assert_int_equal(a->nyields, b->nyields);
		for (int k = 0; k < a->nyields; k++) {
			assert_string_equal(a->yields[k].ion->symbol, b->yields[k].ion->symbol);
			assert_true(a->yields[k].count == b->yields[k].count);
		}
		/* found by its name in upper case, as in the text's arrays */
		snprintf(up, sizeof up, "%s", a->name);
		for (char *p = up; *p; p++)
			if (*p >= 'a' && *p <= 'z')
				*p -= 32;
		assert_ptr_equal(refdb_compound(db, up), a);
		assert_string_equal(refdb_compound(t, up)->name, a->name);
	}
	assert_int_equal(refdb_naliases(t), refdb_naliases(db));
	for (int i = 0; i < refdb_naliases(db); i++) {
		assert_string_equal(refdb_alias_at(db, i), refdb_alias_at(t, i));
		assert_string_equal(refdb_alias_compound(db, i)->name,
				    refdb_alias_compound(t, i)->name);
		assert_string_equal(refdb_compound(db, refdb_alias_at(db, i))->name,
				    refdb_compound(t, refdb_alias_at(t, i))->name);
	}
	assert_null(refdb_compound(db, "no such compound"));
	assert_null(refdb_compound(db, ""));
	refdb_close(t);
}

/* The speciation and Pitzer tables built into the program equal, byte for
 * byte, what the loaders read from SQL (the SQLite image), after the
 * default selection. */
static void chemistry_tables_match_sql(void **state)
{
	spec_data *a, *b;
	osm_data *x, *y;
	char err[IM_ERRLEN];
	(void)state;
	assert_int_equal(eqd_load_spec(NULL, &a, err), 0);
	assert_int_equal(eqd_load_spec(refdb_sqlite(db), &b, err), 0);
	assert_int_equal(a->nlig, b->nlig);
	assert_int_equal(a->npka, b->npka);
	assert_int_equal(a->ncx, b->ncx);
	assert_int_equal(a->nmet, b->nmet);
	assert_true(a->nlig > 0 && a->npka > 0 && a->ncx > 0);
	assert_memory_equal(a->lig, b->lig, (size_t)a->nlig * sizeof *a->lig);
	assert_memory_equal(a->pka, b->pka, (size_t)a->npka * sizeof *a->pka);
	assert_memory_equal(a->cx, b->cx, (size_t)a->ncx * sizeof *a->cx);
	assert_memory_equal(a->met, b->met, sizeof a->met);
	assert_memory_equal(&a->pkw, &b->pkw, sizeof a->pkw);
	assert_memory_equal(&a->k0, &b->k0, sizeof a->k0);
	assert_memory_equal(&a->co2, &b->co2, sizeof a->co2);
	assert_int_equal(eqd_load_osm(NULL, &x, err), 0);
	assert_int_equal(eqd_load_osm(refdb_sqlite(db), &y, err), 0);
	assert_int_equal(x->nsym, y->nsym);
	assert_int_equal(x->npz, y->npz);
	assert_int_equal(x->nnz, y->nnz);
	assert_true(x->nsym > 0 && x->npz > 0);
	assert_memory_equal(x->sym, y->sym, (size_t)x->nsym * sizeof *x->sym);
	assert_memory_equal(x->v0_L_mol, y->v0_L_mol, (size_t)x->nsym * sizeof *x->v0_L_mol);
	assert_memory_equal(x->pz, y->pz, (size_t)x->npz * sizeof *x->pz);
	assert_memory_equal(x->nz, y->nz, (size_t)x->nnz * sizeof *x->nz);
	assert_memory_equal(x->pair, y->pair, (size_t)x->nsym * (size_t)x->nsym * sizeof *x->pair);
	eqd_free_spec(a);
	eqd_free_spec(b);
	eqd_free_osm(x);
	eqd_free_osm(y);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(required_compounds), cmocka_unit_test(tables_match_sql),
		cmocka_unit_test(chemistry_tables_match_sql), cmocka_unit_test(names_and_aliases),
		cmocka_unit_test(ions), cmocka_unit_test(yields_neutral),
		cmocka_unit_test(suggestions), cmocka_unit_test(hazards),
		cmocka_unit_test(image_matches_text),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
