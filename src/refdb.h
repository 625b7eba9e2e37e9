/*
 * refdb.h - the reference database: ions, compounds, sources.
 *
 * The SQL text of the data/ files is embedded in the binary
 * (build/gen/refdata.c), with the database it builds serialized at build
 * time; at start that image is loaded into an in-memory SQLite database
 * (a copy, where parsing the text would take milliseconds), and the rows
 * of the ions and compounds tables are copied into the arrays below, which
 * live as long as the refdb.  Other modules with tables of their own
 * (equilibria, Pitzer parameters) query refdb_sqlite() at their own load.
 */
#ifndef IONMIX_REFDB_H
#define IONMIX_REFDB_H

#include <sqlite3.h>

typedef struct rd_source {
	const char *id;
	const char *citation;
	int common_practice; /* 1: a fact of the trade, no single source */
	int from_memory;     /* 1: a published value recalled, not looked up */
} rd_source;

/* Uncertainty class of an ion's mobility (column mobility_class). */
enum { RD_MOB_NONE = 0, RD_MOB_MEASURED, RD_MOB_MEMORY, RD_MOB_ESTIMATED };

typedef struct rd_ion {
	const char *symbol;  /* 'K+', 'Ca2+', 'SO4^2-', 'glucose' */
	const char *name;
	int z;               /* charge number; 0 for neutral solutes */
	double lambda_S_cm2_eq; /* limiting equivalent conductivity, 25 C; NAN if unknown */
	double D_1e9_m2_s;   /* measured tracer diffusion coefficient, 25 C; NAN if none */
	const rd_source *mobility_source; /* NULL when neither is known */
	double kielland_a_pm;  /* Kielland ion size, pm; NAN if not tabulated */
	const rd_source *size_source;
	int derived;         /* 1: a product of speciation (complex, protonation
			      * state) not in the ions table */
	const char *formula; /* the species' formula, charge left off; NULL if not given */
	double mass_g_mol;   /* molar mass, g/mol (for a derived species the sum of
			      * its parts, data/mobility.sql); NAN if unknown */
	int mobility_class;  /* RD_MOB_*; RD_MOB_NONE when no mobility is stored
			      * (ljp.c then estimates one from the mass) */
	double mobility_rel_unc; /* relative uncertainty of the stored mobility; NAN if none */
} rd_ion;

typedef struct rd_yield {
	const rd_ion *ion;
	double count;        /* per formula unit */
} rd_yield;

typedef struct rd_compound {
	const char *name;    /* canonical, e.g. 'MgCl2.6H2O' */
	const char *formula; /* machine-readable, e.g. 'MgCl2(H2O)6' */
	double fw_g_mol;     /* including water of hydration */
	const rd_source *fw_source;
	const char *hydrate_of; /* anhydrous form's name, or NULL */
	const char *kind;
	const char *hazard;  /* one-line caution, or NULL */
	const char *description;
	const rd_yield *yields;
	int nyields;
} rd_compound;

typedef struct refdb refdb;

/* The reference data built into the program (C tables generated at build
 * time from data/ SQL files: no SQL runs).  Returns 0 (err is kept for the
 * interface).  The caller owns the refdb (refdb_close). */
int refdb_open(refdb **out, char *err);
void refdb_close(refdb *db);
/* The same from SQL text instead of the embedded image (sql NULL: the
 * image); used by the test that the image and the text agree. */
int refdb_open_sql(refdb **out, const char *sql, char *err);
/* The embedded SQL text of data/, NUL-terminated. */
const char *refdb_sql_text(void);

/* The in-memory SQLite handle, owned by the refdb: for a refdb_open one
 * the embedded image, opened on the first call (NULL if it cannot be). */
sqlite3 *refdb_sqlite(const refdb *db);

/* Look up a compound by canonical name or alias, ASCII case-insensitive;
 * '·' (U+00B7) is read as '.'.  NULL when unknown. */
const rd_compound *refdb_compound(const refdb *db, const char *name);

/* Look up an ion by symbol, case-insensitive; the sign may be left off
 * ('K', 'Ca', 'Cl', 'HEPES') when that names exactly one charged ion.
 * NULL when unknown or ambiguous. */
const rd_ion *refdb_ion(const refdb *db, const char *symbol);

/* The ion whose symbol is exactly sym (case-sensitive), or NULL. */
const rd_ion *refdb_ion_exact(const refdb *db, const char *sym);

/* Up to max compound names closest to `name` (edit distance), best
 * first; returns how many were written.  Strings owned by the refdb. */
int refdb_suggest(const refdb *db, const char *name, const char **out, int max);

const rd_source *refdb_source(const refdb *db, const char *id);

int refdb_ncompounds(const refdb *db);
const rd_compound *refdb_compound_at(const refdb *db, int i);
int refdb_nions(const refdb *db);
const rd_ion *refdb_ion_at(const refdb *db, int i);
/* Aliases, for completion: count and the i-th alias string. */
int refdb_naliases(const refdb *db);
const char *refdb_alias_at(const refdb *db, int i);
/* The compound the i-th alias names. */
const rd_compound *refdb_alias_compound(const refdb *db, int i);
/* Sources: count and the i-th (sorted by id). */
int refdb_nsources(const refdb *db);
const rd_source *refdb_source_at(const refdb *db, int i);

#endif
