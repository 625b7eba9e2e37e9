/*
 * refdb.c - the reference data: at start the C tables generated at build
 * time (reftab.h), with no SQL; the embedded SQLite image opened only
 * when a caller asks for it (refdb_sqlite); and, for the build's table
 * generator and the tests, the same arrays read from SQL.
 */
#include "refdb.h"

#include <math.h>
#include <stdio.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "common.h"
#include "reftab.h"

/* build/gen/refdata.c (src/tools/embed.c): the SQL text of data/ and the
 * database it builds, serialized */
extern const unsigned char im_refdata_sql_text[];
extern const size_t im_refdata_sql_text_len;
extern const unsigned char im_refdata_image[];
extern const size_t im_refdata_image_len;

typedef rd_alias alias;

struct refdb {
	sqlite3 *db;
	rd_source *src;
	int nsrc;
	rd_ion *ion;
	int nion;
	int nion_sorted; /* the first ones, from the ions table, sorted by symbol */
	rd_compound *cmp;
	int ncmp;
	alias *al;
	int nal;
	const rd_name *names; /* compounds and aliases by strcasecmp of name */
	int nnames;
	rd_name *own_names;   /* names, when built here (SQL path); owned */
	int builtin;          /* 1: the arrays are the generated tables */
	char **strings; /* every string the arrays point to */
	int nstr, capstr;
	unsigned char (*counts)[32]; /* letter_counts of each compound name, then
				      * of each alias: made by the first
				      * refdb_suggest; owned */
};

static const char *keep(refdb *r, const unsigned char *s)
{
	if (!s)
		return NULL;
	if (r->nstr == r->capstr) {
		r->capstr = r->capstr ? 2 * r->capstr : 256;
		r->strings = im_xrealloc(r->strings, r->capstr * sizeof *r->strings);
	}
	return r->strings[r->nstr++] = im_xstrdup((const char *)s);
}

static double col_num(sqlite3_stmt *st, int i)
{
	return sqlite3_column_type(st, i) == SQLITE_NULL ? NAN
							 : sqlite3_column_double(st, i);
}

static const rd_source *src_by_id(const refdb *r, const unsigned char *id)
{
	if (!id)
		return NULL;
	for (int i = 0; i < r->nsrc; i++)
		if (strcmp(r->src[i].id, (const char *)id) == 0)
			return &r->src[i];
	return NULL;
}

static int count_rows(sqlite3 *db, const char *table)
{
	char sql[128];
	sqlite3_stmt *st;
	int n = -1;
	snprintf(sql, sizeof sql, "SELECT count(*) FROM %s", table);
	if (sqlite3_prepare_v2(db, sql, -1, &st, NULL) == SQLITE_OK &&
	    sqlite3_step(st) == SQLITE_ROW)
		n = sqlite3_column_int(st, 0);
	sqlite3_finalize(st);
	return n;
}

static int prep(refdb *r, const char *sql, sqlite3_stmt **st, char *err)
{
	if (sqlite3_prepare_v2(r->db, sql, -1, st, NULL) != SQLITE_OK)
		return im_fail(err, "reference data: %s", sqlite3_errmsg(r->db));
	return 0;
}

static int load_sources(refdb *r, char *err)
{
	sqlite3_stmt *st;
	r->nsrc = count_rows(r->db, "sources");
	r->src = im_xcalloc(r->nsrc, sizeof *r->src);
	if (prep(r, "SELECT id, citation, common_practice, from_memory FROM sources"
		    " ORDER BY id", &st, err))
		return -1;
	for (int i = 0; i < r->nsrc && sqlite3_step(st) == SQLITE_ROW; i++) {
		r->src[i].id = keep(r, sqlite3_column_text(st, 0));
		r->src[i].citation = keep(r, sqlite3_column_text(st, 1));
		r->src[i].common_practice = sqlite3_column_int(st, 2);
		r->src[i].from_memory = sqlite3_column_int(st, 3);
	}
	sqlite3_finalize(st);
	return 0;
}

static void load_derived(refdb *r);

/* The mobility_class column as RD_MOB_*. */
static int mob_class(const unsigned char *s)
{
	if (!s)
		return RD_MOB_NONE;
	if (strcmp((const char *)s, "measured") == 0)
		return RD_MOB_MEASURED;
	if (strcmp((const char *)s, "from-memory") == 0)
		return RD_MOB_MEMORY;
	return RD_MOB_ESTIMATED;
}

static int load_ions(refdb *r, char *err)
{
	sqlite3_stmt *st;
	r->nion = count_rows(r->db, "ions");
	r->ion = im_xcalloc(r->nion, sizeof *r->ion);
	if (prep(r, "SELECT symbol, name, charge, lambda_S_cm2_eq, diffusion_1e9_m2_s,"
		    " mobility_source, kielland_a_pm, size_source, formula, mass_g_mol,"
		    " mobility_class, mobility_rel_unc FROM ions"
		    " ORDER BY symbol", &st, err))
		return -1;
	for (int i = 0; i < r->nion && sqlite3_step(st) == SQLITE_ROW; i++) {
		rd_ion *x = &r->ion[i];
		x->symbol = keep(r, sqlite3_column_text(st, 0));
		x->name = keep(r, sqlite3_column_text(st, 1));
		x->z = sqlite3_column_int(st, 2);
		x->lambda_S_cm2_eq = col_num(st, 3);
		x->D_1e9_m2_s = col_num(st, 4);
		x->mobility_source = src_by_id(r, sqlite3_column_text(st, 5));
		x->kielland_a_pm = col_num(st, 6);
		x->size_source = src_by_id(r, sqlite3_column_text(st, 7));
		x->formula = keep(r, sqlite3_column_text(st, 8));
		x->mass_g_mol = col_num(st, 9);
		x->mobility_class = mob_class(sqlite3_column_text(st, 10));
		x->mobility_rel_unc = col_num(st, 11);
	}
	sqlite3_finalize(st);
	r->nion_sorted = r->nion;
	load_derived(r);
	return 0;
}

/* Species the equilibria tables can produce (protonation states, metal
 * complexes) that the ions table does not list: they join the ion array
 * with their charge, no mobility or size, and the molar mass of their
 * parts (species_parts; NAN when a part is missing), so that every species
 * a solution holds after speciation is an rd_ion and ljp.c can estimate
 * its mobility.  Nothing happens when the
 * equilibria tables are absent. */
static const char derived_sql[] =
	"SELECT s.symbol, s.charge, l.mass_g_mol + s.n_h * h.mass_g_mol"
	" FROM eq_ligand_states s"
	" LEFT JOIN species_parts l ON l.part = s.ligand"
	" LEFT JOIN species_parts h ON h.part = 'H'"
	" WHERE s.symbol NOT IN (SELECT symbol FROM ions)"
	" UNION "
	"SELECT c.symbol, m.charge * (CASE c.kind WHEN 'M2L' THEN 2 ELSE 1 END)"
	" + l.base_charge * (CASE c.kind WHEN 'ML2' THEN 2 ELSE 1 END)"
	" + (CASE c.kind WHEN 'MHL' THEN 1 ELSE 0 END),"
	" pm.mass_g_mol * (CASE c.kind WHEN 'M2L' THEN 2 ELSE 1 END)"
	" + pl.mass_g_mol * (CASE c.kind WHEN 'ML2' THEN 2 ELSE 1 END)"
	" + (CASE c.kind WHEN 'MHL' THEN h.mass_g_mol ELSE 0 END)"
	" FROM eq_complexes c JOIN eq_metals m ON m.symbol = c.metal"
	" JOIN eq_ligands l ON l.name = c.ligand"
	" LEFT JOIN species_parts pm ON pm.part = c.metal"
	" LEFT JOIN species_parts pl ON pl.part = c.ligand"
	" LEFT JOIN species_parts h ON h.part = 'H'"
	" WHERE c.symbol NOT IN (SELECT symbol FROM ions)"
	" ORDER BY 1";

static void load_derived(refdb *r)
{
	sqlite3_stmt *st;
	if (sqlite3_prepare_v2(r->db, derived_sql, -1, &st, NULL) != SQLITE_OK) {
		sqlite3_finalize(st);
		return;
	}
	while (sqlite3_step(st) == SQLITE_ROW) {
		rd_ion *x;
		r->ion = im_xrealloc(r->ion, (r->nion + 1) * sizeof *r->ion);
		x = &r->ion[r->nion++];
		memset(x, 0, sizeof *x);
		x->symbol = keep(r, sqlite3_column_text(st, 0));
		x->name = "product of speciation (mobility estimated from its molar mass)";
		x->z = sqlite3_column_int(st, 1);
		x->lambda_S_cm2_eq = x->D_1e9_m2_s = x->kielland_a_pm = NAN;
		x->mass_g_mol = col_num(st, 2);
		x->mobility_rel_unc = NAN;
		x->derived = 1;
	}
	sqlite3_finalize(st);
}

const rd_ion *refdb_ion_exact(const refdb *r, const char *sym)
{
	int lo = 0, hi = r->nion_sorted - 1;
	while (lo <= hi) { /* the table's own ions are sorted by symbol */
		int mid = (lo + hi) / 2, c = strcmp(r->ion[mid].symbol, sym);
		if (c == 0)
			return &r->ion[mid];
		if (c < 0)
			lo = mid + 1;
		else
			hi = mid - 1;
	}
	for (int i = r->nion_sorted; i < r->nion; i++)
		if (strcmp(r->ion[i].symbol, sym) == 0)
			return &r->ion[i];
	return NULL;
}

static const rd_ion *ion_exact(const refdb *r, const char *sym)
{
	for (int i = 0; i < r->nion; i++)
		if (strcmp(r->ion[i].symbol, sym) == 0)
			return &r->ion[i];
	return NULL;
}

static const rd_compound *cmp_exact(const refdb *r, const char *name)
{
	for (int i = 0; i < r->ncmp; i++)
		if (strcmp(r->cmp[i].name, name) == 0)
			return &r->cmp[i];
	return NULL;
}

static int load_compounds(refdb *r, char *err)
{
	sqlite3_stmt *st;
	r->ncmp = count_rows(r->db, "compounds");
	r->cmp = im_xcalloc(r->ncmp, sizeof *r->cmp);
	if (prep(r, "SELECT name, formula, fw_g_mol, fw_source, hydrate_of, kind,"
		    " hazard, description FROM compounds ORDER BY name", &st, err))
		return -1;
	for (int i = 0; i < r->ncmp && sqlite3_step(st) == SQLITE_ROW; i++) {
		rd_compound *c = &r->cmp[i];
		c->name = keep(r, sqlite3_column_text(st, 0));
		c->formula = keep(r, sqlite3_column_text(st, 1));
		c->fw_g_mol = sqlite3_column_double(st, 2);
		c->fw_source = src_by_id(r, sqlite3_column_text(st, 3));
		c->hydrate_of = keep(r, sqlite3_column_text(st, 4));
		c->kind = keep(r, sqlite3_column_text(st, 5));
		c->hazard = keep(r, sqlite3_column_text(st, 6));
		c->description = keep(r, sqlite3_column_text(st, 7));
	}
	sqlite3_finalize(st);

	if (prep(r, "SELECT compound, species, count FROM compound_yields"
		    " ORDER BY compound, species", &st, err))
		return -1;
	while (sqlite3_step(st) == SQLITE_ROW) {
		rd_compound *c = (rd_compound *)cmp_exact(
			r, (const char *)sqlite3_column_text(st, 0));
		const rd_ion *ion = ion_exact(r, (const char *)sqlite3_column_text(st, 1));
		if (!c || !ion)
			continue; /* foreign keys make this unreachable */
		rd_yield *y = im_xrealloc((void *)c->yields, (c->nyields + 1) * sizeof *y);
		y[c->nyields].ion = ion;
		y[c->nyields].count = sqlite3_column_double(st, 2);
		c->yields = y;
		c->nyields++;
	}
	sqlite3_finalize(st);

	r->nal = count_rows(r->db, "compound_aliases");
	r->al = im_xcalloc(r->nal, sizeof *r->al);
	if (prep(r, "SELECT alias, compound FROM compound_aliases ORDER BY alias",
		 &st, err))
		return -1;
	for (int i = 0; i < r->nal && sqlite3_step(st) == SQLITE_ROW; i++) {
		r->al[i].alias = (char *)keep(r, sqlite3_column_text(st, 0));
		r->al[i].c = cmp_exact(r, (const char *)sqlite3_column_text(st, 1));
	}
	sqlite3_finalize(st);
	return 0;
}

const char *refdb_sql_text(void)
{
	return (const char *)im_refdata_sql_text;
}

/* Fill r->db from the embedded image (sql == NULL) or from SQL text. */
static int load_db(refdb *r, const char *sql, char *err)
{
	char *msg = NULL;
	if (sqlite3_open_v2(":memory:", &r->db, SQLITE_OPEN_READWRITE, NULL) != SQLITE_OK)
		return im_fail(err, "cannot open the in-memory reference database");
	if (!sql) {
		/* read-only: SQLite reads the image where it lies in the binary,
		 * with no copy (the reference data are never written) */
		if (sqlite3_deserialize(r->db, "main", (unsigned char *)im_refdata_image,
					im_refdata_image_len, im_refdata_image_len,
					SQLITE_DESERIALIZE_READONLY) != SQLITE_OK)
			return im_fail(err, "the embedded reference database does not load: %s",
				       sqlite3_errmsg(r->db));
		return 0;
	}
	if (sqlite3_exec(r->db, sql, NULL, NULL, &msg) != SQLITE_OK) {
		im_fail(err, "reference data does not load: %s", msg ? msg : "?");
		sqlite3_free(msg);
		return -1;
	}
	return 0;
}

static int name_cmp(const void *a, const void *b)
{
	const rd_name *x = a, *y = b;
	int c = strcasecmp(x->name, y->name);
	if (c)
		return c;
	if (x->canonical != y->canonical)
		return y->canonical - x->canonical; /* the canonical name first */
	return strcmp(x->name, y->name);
}

/* The sorted name index of the SQL path (the tables bring their own). */
static void build_names(refdb *r)
{
	r->own_names = im_xcalloc((size_t)(r->ncmp + r->nal + 1), sizeof *r->own_names);
	for (int i = 0; i < r->ncmp; i++)
		r->own_names[r->nnames++] = (rd_name){r->cmp[i].name, &r->cmp[i], 1};
	for (int i = 0; i < r->nal; i++)
		if (r->al[i].c)
			r->own_names[r->nnames++] = (rd_name){r->al[i].alias, r->al[i].c, 0};
	qsort(r->own_names, r->nnames, sizeof *r->own_names, name_cmp);
	r->names = r->own_names;
}

#ifdef IM_NO_TABLES
/* the build's table generator (src/tools/refdump.c): from the image */
int refdb_open(refdb **out, char *err)
{
	return refdb_open_sql(out, NULL, err);
}
#else
int refdb_open(refdb **out, char *err)
{
	refdb *r = im_xcalloc(1, sizeof *r);
	(void)err;
	r->builtin = 1;
	r->src = im_tab_src;
	r->nsrc = im_tab_nsrc;
	r->ion = im_tab_ion;
	r->nion = im_tab_nion;
	r->nion_sorted = im_tab_nion_sorted;
	r->cmp = im_tab_cmp;
	r->ncmp = im_tab_ncmp;
	r->al = im_tab_al;
	r->nal = im_tab_nal;
	r->names = im_tab_names;
	r->nnames = im_tab_nnames;
	*out = r;
	return 0;
}
#endif

int refdb_open_sql(refdb **out, const char *sql, char *err)
{
	refdb *r = im_xcalloc(1, sizeof *r);
	*out = NULL;
	if (load_db(r, sql, err)) {
		refdb_close(r);
		return -1;
	}
	if (load_sources(r, err) || load_ions(r, err) || load_compounds(r, err)) {
		refdb_close(r);
		return -1;
	}
	build_names(r);
	*out = r;
	return 0;
}

void refdb_close(refdb *r)
{
	if (!r)
		return;
	sqlite3_close(r->db);
	free(r->counts);
	if (r->builtin) {
		free(r);
		return;
	}
	free(r->own_names);
	for (int i = 0; i < r->ncmp; i++)
		free((void *)r->cmp[i].yields);
	for (int i = 0; i < r->nstr; i++)
		free(r->strings[i]);
	free(r->strings);
	free(r->src);
	free(r->ion);
	free(r->cmp);
	free(r->al);
	free(r);
}

sqlite3 *refdb_sqlite(const refdb *r)
{
	char err[IM_ERRLEN];
	if (!r->db && r->builtin) {
		/* the image, opened on first use; r was allocated writable */
		refdb *w = (refdb *)r;
		if (load_db(w, NULL, err)) {
			sqlite3_close(w->db);
			w->db = NULL;
		}
	}
	return r->db;
}

/* Copy name into buf with U+00B7 MIDDLE DOT read as '.'; 0 if too long. */
static int normalise(const char *name, char *buf, size_t n)
{
	size_t j = 0;
	for (const char *p = name; *p; p++) {
		if (j + 1 >= n)
			return 0;
		if ((unsigned char)p[0] == 0xc2 && (unsigned char)p[1] == 0xb7) {
			buf[j++] = '.';
			p++;
		} else {
			buf[j++] = *p;
		}
	}
	buf[j] = '\0';
	return 1;
}

const rd_compound *refdb_compound(const refdb *r, const char *name)
{
	char buf[128];
	const rd_compound *alias_hit = NULL;
	int lo = 0, hi = r->nnames - 1, first = -1;
	if (!normalise(name, buf, sizeof buf))
		return NULL;
	while (lo <= hi) { /* the first entry equal to buf, ignoring case */
		int mid = lo + (hi - lo) / 2, c = strcasecmp(r->names[mid].name, buf);
		if (c >= 0) {
			if (c == 0)
				first = mid;
			hi = mid - 1;
		} else {
			lo = mid + 1;
		}
	}
	/* a canonical name wins over an alias that spells the same */
	for (int i = first; i >= 0 && i < r->nnames && strcasecmp(r->names[i].name, buf) == 0;
	     i++) {
		if (r->names[i].canonical)
			return r->names[i].c;
		if (!alias_hit)
			alias_hit = r->names[i].c;
	}
	return alias_hit;
}

/* Length of sym without its charge suffix ('Ca2+' -> 2, 'SO4^2-' -> 3). */
static size_t base_len(const char *sym)
{
	size_t n = strlen(sym);
	if (n == 0 || (sym[n - 1] != '+' && sym[n - 1] != '-'))
		return n;
	n--;
	while (n > 0 && sym[n - 1] >= '0' && sym[n - 1] <= '9')
		n--;
	if (n > 0 && sym[n - 1] == '^')
		n--;
	return n;
}

/* ASCII upper case to lower (what im_strcaseeq folds). */
static int fold(int c)
{
	return c >= 'A' && c <= 'Z' ? c + ('a' - 'A') : c;
}

const rd_ion *refdb_ion(const refdb *r, const char *sym)
{
	const rd_ion *hit = NULL;
	size_t n = strlen(sym);
	int c0 = fold((unsigned char)sym[0]);
	for (int i = 0; i < r->nion; i++) /* the first letter sorts most out */
		if (fold((unsigned char)r->ion[i].symbol[0]) == c0 &&
		    im_strcaseeq(r->ion[i].symbol, sym))
			return &r->ion[i];
	for (int i = 0; i < r->nion; i++) {
		const rd_ion *x = &r->ion[i];
		size_t b = base_len(x->symbol);
		char tmp[64];
		if (x->z == 0 || b != n || b >= sizeof tmp)
			continue;
		memcpy(tmp, x->symbol, b);
		tmp[b] = '\0';
		if (im_strcaseeq(tmp, sym)) {
			if (hit)
				return NULL; /* ambiguous */
			hit = x;
		}
	}
	return hit;
}

static int lower(int c)
{
	return (c >= 'A' && c <= 'Z') ? c + 32 : c;
}

/* A typed name prepared for edit distances (case-insensitive, its first
 * 63 bytes): for each byte, the positions where the lower-cased name has
 * it, as bits. */
typedef struct pattern {
	uint64_t at[256];
	int m; /* bytes, <= 63 */
} pattern;

static void pattern_make(pattern *p, const char *name)
{
	memset(p->at, 0, sizeof p->at);
	for (p->m = 0; p->m < 63 && name[p->m]; p->m++)
		p->at[lower((unsigned char)name[p->m])] |= (uint64_t)1 << p->m;
}

/* The edit distance between the pattern and the first 63 bytes of b,
 * case-insensitive: the bit-parallel form of the usual table (Myers 1999,
 * in Hyyro's formulation for the whole-string distance), one machine word
 * holding a column of vertical differences, so a character of b costs a
 * dozen word operations instead of a row of the table. */
static int pattern_distance(const pattern *p, const char *b)
{
	uint64_t pv = ~(uint64_t)0, mv = 0, top;
	int score = p->m, j;
	if (p->m == 0) {
		for (j = 0; j < 63 && b[j]; j++)
			;
		return j;
	}
	top = (uint64_t)1 << (p->m - 1);
	for (j = 0; j < 63 && b[j]; j++) {
		uint64_t eq = p->at[lower((unsigned char)b[j])];
		uint64_t xv = eq | mv, xh = (((eq & pv) + pv) ^ pv) | eq;
		uint64_t ph = mv | ~(xh | pv), mh = pv & xh;
		if (ph & top)
			score++;
		else if (mh & top)
			score--;
		ph = ph << 1 | 1; /* the first row: distance j from the empty prefix */
		mh <<= 1;
		pv = mh | ~(xv | ph);
		mv = ph & xv;
	}
	return score;
}

/* The letters of the first 63 bytes of s counted in 32 classes (case
 * folded, by the low 5 bits).  An insertion or a deletion changes one
 * count by 1, a substitution at most two, so the edit distance of two
 * strings is at least half the summed differences of their counts: a
 * cheap test that spares most names the table of distance_within. */
static void letter_counts(const char *s, unsigned char *h)
{
	memset(h, 0, 32);
	for (int i = 0; i < 63 && s[i]; i++)
		h[lower((unsigned char)s[i]) & 31]++;
}

typedef struct cand {
	int d;
	const char *canon;
} cand;

static int cand_cmp(const void *a, const void *b)
{
	const cand *x = a, *y = b;
	return x->d != y->d ? x->d - y->d : strcmp(x->canon, y->canon);
}

int refdb_suggest(const refdb *r, const char *name, const char **out, int max)
{
	int total = r->ncmp + r->nal, k = 0, nc = 0;
	size_t len = strlen(name);
	int reach = 2 + (int)len / 4; /* the farthest a suggestion may be */
	unsigned char mine[32];
	pattern pat;
	cand *c = im_xcalloc(total, sizeof *c);
	if (!r->counts) {
		/* made once; r was allocated writable (as in refdb_sqlite) */
		refdb *w = (refdb *)r;
		w->counts = im_xmalloc((size_t)(total ? total : 1) * sizeof *w->counts);
		for (int i = 0; i < total; i++)
			letter_counts(i < r->ncmp ? r->cmp[i].name : r->al[i - r->ncmp].alias,
				      w->counts[i]);
	}
	pattern_make(&pat, name);
	letter_counts(name, mine);
	for (int i = 0; i < total; i++) {
		const char *s = i < r->ncmp ? r->cmp[i].name : r->al[i - r->ncmp].alias;
		int d, diff = 0;
		for (int q = 0; q < 32; q++)
			diff += abs(mine[q] - r->counts[i][q]);
		if (len >= 2 && strncasecmp(s, name, len) == 0)
			d = 1; /* a prefix counts as close */
		else if ((diff + 1) / 2 > reach)
			d = reach + 1; /* farther than a suggestion may be */
		else
			d = pattern_distance(&pat, s);
		if (d <= reach) {
			c[nc].d = d;
			c[nc++].canon = i < r->ncmp ? s : r->al[i - r->ncmp].c->name;
		}
	}
	qsort(c, nc, sizeof *c, cand_cmp);
	for (int i = 0; i < nc && k < max; i++) {
		int dup = 0;
		for (int j = 0; j < k; j++)
			dup |= strcmp(out[j], c[i].canon) == 0;
		if (!dup)
			out[k++] = c[i].canon;
	}
	free(c);
	return k;
}

const rd_source *refdb_source(const refdb *r, const char *id)
{
	return src_by_id(r, (const unsigned char *)id);
}

int refdb_ncompounds(const refdb *r) { return r->ncmp; }
const rd_compound *refdb_compound_at(const refdb *r, int i) { return &r->cmp[i]; }
int refdb_nions(const refdb *r) { return r->nion; }
const rd_ion *refdb_ion_at(const refdb *r, int i) { return &r->ion[i]; }
int refdb_naliases(const refdb *r) { return r->nal; }
int refdb_nsources(const refdb *r) { return r->nsrc; }
const rd_source *refdb_source_at(const refdb *r, int i) { return &r->src[i]; }
const rd_compound *refdb_alias_compound(const refdb *r, int i) { return r->al[i].c; }
const char *refdb_alias_at(const refdb *r, int i) { return r->al[i].alias; }
