/*
 * reftab.h - the reference data as C tables, generated at build time
 * (build/gen/reftables.c, written by src/tools/refdump.c from the same
 * data/ SQL files the embedded SQLite image is built from).  Internal to
 * refdb.c and eqdata.c: refdb_open points its arrays at these tables and
 * eqd_load_spec/eqd_load_osm (with no database) copy theirs, so a start
 * runs no SQL.  The tables were loaded, and checked, by the very loaders
 * that read the SQLite image; tests/test_refdb.c checks that the two
 * agree field by field.
 */
#ifndef IONMIX_REFTAB_H
#define IONMIX_REFTAB_H

#include "eqdata.h"
#include "refdb.h"

/* an alias of a compound ('potassium chloride' -> KCl) */
typedef struct rd_alias {
	char *alias;
	const rd_compound *c;
} rd_alias;

/* a name or alias for look-ups, sorted by strcasecmp of name */
typedef struct rd_name {
	const char *name;
	const rd_compound *c;
	int canonical; /* 1: c's own name, 0: an alias */
} rd_name;

extern rd_source im_tab_src[];
extern const int im_tab_nsrc;
extern rd_ion im_tab_ion[];
extern const int im_tab_nion, im_tab_nion_sorted;
extern rd_compound im_tab_cmp[];
extern const int im_tab_ncmp;
extern rd_alias im_tab_al[];
extern const int im_tab_nal;
extern const rd_name im_tab_names[];
extern const int im_tab_nnames;

/* the speciation and Pitzer data after loading, checking and the default
 * selection: the bytes of their structs and arrays, written by the
 * loaders' own build (the generated file asserts the struct sizes) */
extern const spec_data *const im_tab_spec; /* counts, metals, fits; no arrays */
extern const lig_def *const im_tab_lig;
extern const pka_row *const im_tab_pka;
extern const cx_row *const im_tab_cx;
extern const osm_data *const im_tab_osm;   /* counts; no arrays */
extern const char (*const im_tab_osm_sym)[EQD_SYMLEN];
extern const double *const im_tab_osm_v0;
extern const pz_row *const im_tab_pz;
extern const nz_row *const im_tab_nz;
extern const int *const im_tab_osm_pair;

#endif
