/*
 * usercomp.h - compounds and ions the user defines (`define`), held as
 * reference-data records (rd_compound, rd_ion) so that every calculator
 * takes them as it takes the shipped ones.  The set owns every record and
 * string; pointers stay valid until uc_free (records are never moved).
 * Stored in the user database by userdb.c; looked up by session.c after
 * the shipped data (a user name may not repeat a shipped one).
 */
#ifndef IONMIX_USERCOMP_H
#define IONMIX_USERCOMP_H

#include <stddef.h>

#include "refdb.h"

#define UC_MAX_YIELDS 8

typedef struct usercomp usercomp;

/* What `define ION` gives. */
typedef struct uc_ion_def {
	const char *symbol;    /* 'QX+', 'Foo2-' */
	int z;
	double D_1e9_m2_s;     /* measured diffusion coefficient at 25 C; NAN: none */
	const char *source;    /* where D comes from; NULL when no D */
	double mass_g_mol;     /* for the mobility estimate; NAN: unknown */
} uc_ion_def;

/* What `define COMPOUND` gives. */
typedef struct uc_compound_def {
	const char *name;
	const char *formula;   /* as typed (formula.h grammar) */
	const char *yield_sym[UC_MAX_YIELDS];
	double yield_n[UC_MAX_YIELDS];
	int nyields;           /* 0: one neutral particle of itself */
	const char *hazard;    /* NULL: none given */
	const char *source;    /* NULL: none given */
} uc_compound_def;

usercomp *uc_new(void);
void uc_free(usercomp *u);

/* Add an ion (not a symbol the shipped data or the set already have:
 * -1 with err).  ref gives the shipped names. */
int uc_add_ion(usercomp *u, const refdb *ref, const uc_ion_def *d, const rd_ion **out,
	       char *err);
/* Add a compound: the formula weight from formula.c; every yielded ion
 * known (shipped or user-defined); the charges of the yields must add up
 * to the formula's net charge; the name new.  -1 with a one-line err. */
int uc_add_compound(usercomp *u, const refdb *ref, const uc_compound_def *d,
		    const rd_compound **out, char *err);

/* Forget the records added after the set held nc compounds and ni ions
 * (a definition that could not be stored). */
void uc_truncate(usercomp *u, int nc, int ni);

/* Lookups: compounds by name case-insensitively, ions by symbol exactly
 * (with a sign added when the symbol has none: 'QX' finds 'QX+').  NULL
 * when absent. */
const rd_compound *uc_compound(const usercomp *u, const char *name);
const rd_ion *uc_ion(const usercomp *u, const char *symbol);
int uc_ncompounds(const usercomp *u);
const rd_compound *uc_compound_at(const usercomp *u, int i);
int uc_nions(const usercomp *u);
const rd_ion *uc_ion_at(const usercomp *u, int i);
/* The definition text of a compound's yields ("QX+ 1 Cl- 1"), for
 * storing; buf of n bytes. */
void uc_yields_text(const rd_compound *c, char *buf, size_t n);
/* 1 when the record belongs to the set (a user-defined one). */
int uc_owns_compound(const usercomp *u, const rd_compound *c);
int uc_owns_ion(const usercomp *u, const rd_ion *ion);

#endif
