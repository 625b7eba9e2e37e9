/*
 * usercomp.c - user-defined compounds and ions as reference-data records.
 */
#include "usercomp.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "formula.h"

struct usercomp {
	rd_compound **c;
	int nc, capc;
	rd_ion **ion;
	int ni, capi;
	rd_source fw_source; /* the atomic-weight table of formula.c */
};

usercomp *uc_new(void)
{
	usercomp *u = im_xcalloc(1, sizeof *u);
	u->fw_source = (rd_source){"formula-weights", formula_weights_source(), 0, 0};
	return u;
}

static void free_ion(rd_ion *ion)
{
	free((char *)ion->symbol);
	free((char *)ion->name);
	free((char *)ion->formula);
	if (ion->mobility_source) {
		free((char *)ion->mobility_source->citation);
		free((rd_source *)ion->mobility_source);
	}
	free(ion);
}

static void free_compound(rd_compound *c)
{
	free((char *)c->name);
	free((char *)c->formula);
	free((char *)c->hazard);
	free((char *)c->description);
	free((rd_yield *)c->yields);
	free(c);
}

void uc_truncate(usercomp *u, int nc, int ni)
{
	while (u->nc > nc)
		free_compound(u->c[--u->nc]);
	while (u->ni > ni)
		free_ion(u->ion[--u->ni]);
}

void uc_free(usercomp *u)
{
	if (!u)
		return;
	for (int i = 0; i < u->nc; i++)
		free_compound(u->c[i]);
	for (int i = 0; i < u->ni; i++)
		free_ion(u->ion[i]);
	free(u->c);
	free(u->ion);
	free(u);
}

const rd_compound *uc_compound(const usercomp *u, const char *name)
{
	for (int i = 0; u && i < u->nc; i++)
		if (im_strcaseeq(u->c[i]->name, name))
			return u->c[i];
	return NULL;
}

const rd_ion *uc_ion(const usercomp *u, const char *symbol)
{
	char buf[80];
	for (int i = 0; u && i < u->ni; i++)
		if (strcmp(u->ion[i]->symbol, symbol) == 0)
			return u->ion[i];
	/* 'QX' for 'QX+': the one charged ion of that stem */
	for (int i = 0; u && i < u->ni; i++) {
		size_t n = strlen(symbol);
		const char *s = u->ion[i]->symbol;
		if (u->ion[i]->z == 0 || strncmp(s, symbol, n) != 0)
			continue;
		snprintf(buf, sizeof buf, "%s", s + n);
		if (strspn(buf, "0123456789^+-") == strlen(buf))
			return u->ion[i];
	}
	return NULL;
}

int uc_ncompounds(const usercomp *u)
{
	return u ? u->nc : 0;
}

const rd_compound *uc_compound_at(const usercomp *u, int i)
{
	return u->c[i];
}

int uc_nions(const usercomp *u)
{
	return u ? u->ni : 0;
}

const rd_ion *uc_ion_at(const usercomp *u, int i)
{
	return u->ion[i];
}

int uc_owns_compound(const usercomp *u, const rd_compound *c)
{
	for (int i = 0; u && i < u->nc; i++)
		if (u->c[i] == c)
			return 1;
	return 0;
}

int uc_owns_ion(const usercomp *u, const rd_ion *ion)
{
	for (int i = 0; u && i < u->ni; i++)
		if (u->ion[i] == ion)
			return 1;
	return 0;
}

void uc_yields_text(const rd_compound *c, char *buf, size_t n)
{
	size_t len = 0;
	buf[0] = '\0';
	for (int k = 0; k < c->nyields && len < n; k++)
		len += snprintf(buf + len, n - len, "%s%s %.10g", k ? " " : "",
				c->yields[k].ion->symbol, c->yields[k].count);
}

/* A symbol or name fit to store and type: printable, no spaces or quotes,
 * 1 to 40 bytes. */
static int plain_word(const char *s, const char *what, char *err)
{
	size_t n = strlen(s);
	if (n == 0 || n > 40)
		return im_fail(err, "%s '%.40s' must be 1 to 40 characters", what, s);
	for (const unsigned char *p = (const unsigned char *)s; *p; p++)
		if (*p <= ' ' || *p == '"' || *p == '\'' || *p == ';' || *p == '#' || *p == 0x7f)
			return im_fail(err, "%s '%.40s': no spaces, quotes, ';' or '#'", what, s);
	return 0;
}

static rd_ion *push_ion(usercomp *u)
{
	if (u->ni == u->capi) {
		u->capi = u->capi ? 2 * u->capi : 8;
		u->ion = im_xrealloc(u->ion, (size_t)u->capi * sizeof *u->ion);
	}
	u->ion[u->ni] = im_xcalloc(1, sizeof **u->ion);
	return u->ion[u->ni++];
}

int uc_add_ion(usercomp *u, const refdb *ref, const uc_ion_def *d, const rd_ion **out,
	       char *err)
{
	rd_ion *ion;
	if (plain_word(d->symbol, "ion symbol", err))
		return -1;
	if (refdb_ion_exact(ref, d->symbol) || refdb_compound(ref, d->symbol))
		return im_fail(err, "'%s' is already a shipped ion or compound (`info %s`); choose "
				    "another symbol", d->symbol, d->symbol);
	if (uc_ion(u, d->symbol) && strcmp(uc_ion(u, d->symbol)->symbol, d->symbol) == 0)
		return im_fail(err, "ion '%s' is already defined", d->symbol);
	if (d->z < -4 || d->z > 4)
		return im_fail(err, "ion '%s': charge %d is outside -4 to +4", d->symbol, d->z);
	if (isfinite(d->D_1e9_m2_s) && !(d->D_1e9_m2_s >= 0.01 && d->D_1e9_m2_s <= 10))
		return im_fail(err, "ion '%s': mobility %g (1e-9 m2/s) is outside 0.01 to 10, where "
				    "ions in water lie", d->symbol, d->D_1e9_m2_s);
	ion = push_ion(u);
	ion->symbol = im_xstrdup(d->symbol);
	ion->name = im_xstrdup(d->symbol);
	ion->z = d->z;
	ion->lambda_S_cm2_eq = NAN;
	ion->D_1e9_m2_s = isfinite(d->D_1e9_m2_s) ? d->D_1e9_m2_s : NAN;
	ion->kielland_a_pm = NAN;
	ion->mass_g_mol = d->mass_g_mol;
	ion->mobility_rel_unc = NAN;
	ion->mobility_class = isfinite(d->D_1e9_m2_s) ? RD_MOB_MEASURED : RD_MOB_NONE;
	if (isfinite(d->D_1e9_m2_s)) {
		rd_source *src = im_xcalloc(1, sizeof *src);
		src->id = "user";
		src->citation = im_xstrdup(d->source ? d->source : "given by the user");
		ion->mobility_source = src;
	}
	if (out)
		*out = ion;
	return 0;
}

/* A shipped ion, or a user-defined one. */
static const rd_ion *any_ion(const usercomp *u, const refdb *ref, const char *sym)
{
	const rd_ion *ion = refdb_ion(ref, sym);
	return ion ? ion : uc_ion(u, sym);
}

int uc_add_compound(usercomp *u, const refdb *ref, const uc_compound_def *d,
		    const rd_compound **out, char *err)
{
	formula_info fi;
	rd_compound *c;
	rd_yield *y = NULL;
	const rd_ion *ions[UC_MAX_YIELDS];
	double charge = 0;
	if (plain_word(d->name, "compound name", err))
		return -1;
	if (refdb_compound(ref, d->name))
		return im_fail(err, "'%s' is a shipped compound (`info %s`); a compound of your own "
				    "needs another name", d->name, refdb_compound(ref, d->name)->name);
	if (uc_compound(u, d->name))
		return im_fail(err, "compound '%s' is already defined (`info %s`)", d->name, d->name);
	if (formula_parse(d->formula, &fi, err))
		return -1;
	if (d->nyields > UC_MAX_YIELDS)
		return im_fail(err, "at most %d yields", UC_MAX_YIELDS);
	for (int k = 0; k < d->nyields; k++) {
		if (!(ions[k] = any_ion(u, ref, d->yield_sym[k])))
			return im_fail(err, "unknown ion '%.40s' in the yields (`define ION %s charge "
					    "Z` first)", d->yield_sym[k], d->yield_sym[k]);
		if (!(d->yield_n[k] > 0 && d->yield_n[k] <= 20))
			return im_fail(err, "yield of %s: %g per formula unit is outside 0 to 20",
				       ions[k]->symbol, d->yield_n[k]);
		charge += ions[k]->z * d->yield_n[k];
	}
	if (d->nyields && fabs(charge - fi.charge) > 1e-9)
		return im_fail(err, "the yields carry a charge of %+g per formula unit, but %s has "
				    "%+d: they do not balance", charge, d->formula, fi.charge);
	if (!d->nyields && fi.charge != 0)
		return im_fail(err, "%s has a charge of %+d: name the ions it yields (`yields ION N "
				    "...`)", d->formula, fi.charge);
	if (!d->nyields) { /* a neutral solute: one particle of itself */
		uc_ion_def nd = {d->name, 0, NAN, NULL, fi.fw_g_mol};
		const rd_ion *self = uc_ion(u, d->name);
		if (!self && uc_add_ion(u, ref, &nd, &self, err))
			return -1;
		ions[0] = self;
	}
	y = im_xcalloc(d->nyields ? (size_t)d->nyields : 1, sizeof *y);
	for (int k = 0; k < (d->nyields ? d->nyields : 1); k++)
		y[k] = (rd_yield){ions[k], d->nyields ? d->yield_n[k] : 1.0};
	if (u->nc == u->capc) {
		u->capc = u->capc ? 2 * u->capc : 8;
		u->c = im_xrealloc(u->c, (size_t)u->capc * sizeof *u->c);
	}
	c = im_xcalloc(1, sizeof *c);
	c->name = im_xstrdup(d->name);
	c->formula = im_xstrdup(d->formula);
	c->fw_g_mol = fi.fw_g_mol;
	c->fw_source = &u->fw_source;
	c->kind = "user-defined";
	c->hazard = d->hazard ? im_xstrdup(d->hazard) : NULL;
	{
		char desc[512];
		snprintf(desc, sizeof desc, "defined by the user; source: %s",
			 d->source ? d->source : "none given");
		c->description = im_xstrdup(desc);
	}
	c->yields = y;
	c->nyields = d->nyields ? d->nyields : 1;
	u->c[u->nc++] = c;
	if (out)
		*out = c;
	return 0;
}
