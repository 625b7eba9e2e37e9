/*
 * speciation.c - the equilibrium solver: constants at temperature and
 * ionic strength, the species of a problem, Newton's method with its
 * fallback, and the result.  The model is stated in speciation.h, the
 * formulation in spec_work.h; the tables come from eqdata.c, and the
 * searches built on the solver (titration, the free-metal inverse) live
 * in titrate.c.
 *
 * Newton's method on u = ln c with a backtracking line search on G
 * converges from any start; the fallback minimises G one component at a
 * time.
 */
#include "speciation.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "activity.h"
#include "common.h"
#include "eqdata.h"
#include "spec_work.h"

#define MMHG_PER_ATM 760.0

/* ------------------------------------------------------------------ */
/* loading and picks (the tables themselves are eqdata.c's)             */

int spec_load(sqlite3 *db, spec_data **out, char *err)
{
	return eqd_load_spec(db, out, err);
}

void spec_data_free(spec_data *d)
{
	eqd_free_spec(d);
}

int spec_use_compilation(spec_data *d, const char *name, char *err)
{
	if (!d)
		return im_fail(err, "speciation: no equilibrium data loaded");
	return eqd_use_compilation(d, NULL, name, err);
}

int spec_pick_compilation(spec_data *d, osm_data *o, const char *name, char *err)
{
	return eqd_use_compilation(d, o, name, err);
}

int spec_compilations(const spec_data *d, const osm_data *o, char (*names)[32], int max)
{
	_Static_assert(EQD_COMPLEN == 32, "compilation names are 32 bytes");
	return eqd_compilations(d, o, names, max);
}

int spec_constants(const spec_data *d, const char *name, spec_const *out, int max,
		   char *err)
{
	return eqd_constants(d, name, out, max, err);
}

/* ------------------------------------------------------------------ */
/* constants at temperature (I = 0)                                     */

/* ln K(T) - ln K(Tr) of a reaction with enthalpy dh_kJ_mol and heat
 * capacity dcp_J_mol_K (NAN: none) by van 't Hoff:
 *   -dH/R (1/T - 1/Tr) + dCp/R (ln(T/Tr) + Tr/T - 1) */
static double lnk_shift(double dh_kJ_mol, double dcp_J_mol_K, double T, double Tr)
{
	double s = -dh_kJ_mol * 1000.0 / IM_GAS_J_MOL_K * (1.0 / T - 1.0 / Tr);
	if (isfinite(dcp_J_mol_K))
		s += dcp_J_mol_K / IM_GAS_J_MOL_K * (log(T / Tr) + Tr / T - 1.0);
	return s;
}

/* thermodynamic pKa of a step at T, from its row */
static double pka_at(const spec_data *d, const pka_row *p, double t_C, int *no_t)
{
	double T = t_C + IM_ZERO_C_K, Tr = p->t_ref + IM_ZERO_C_K;
	if (isfinite(p->fa))
		return p->fa / T + p->fb + p->fc * T;
	const lig_def *L = &d->lig[p->lig];
	int za = L->zb + p->n_h - 1, zp = L->zb + p->n_h; /* H(n-1)L + H = HnL */
	double D = za * za + 1 - zp * zp;
	double pk0 = p->pka + act_dh_A(p->t_ref) * davies_F(p->i_ref) * D;
	if (isfinite(p->dh))
		return pk0 - lnk_shift(p->dh, p->dcp, T, Tr) / LN10;
	if (isfinite(p->dpdt))
		return pk0 + p->dpdt * (t_C - p->t_ref);
	if (no_t && fabs(t_C - p->t_ref) > 0.5)
		*no_t = 1;
	return pk0;
}

/* log10 of the cumulative protonation constant beta_h of ligand k */
static double lig_logbeta0(const spec_data *d, int k, int h, double t_C, int *no_t)
{
	double s = 0;
	for (int i = 1; i <= h; i++)
		s += pka_at(d, &d->pka[d->lig[k].step[i]], t_C, no_t);
	return s;
}

/* log10 K of a complex row as tabulated, at I = 0 and t_C */
static double cx_logk0(const spec_data *d, const cx_row *c, double t_C, int *no_t)
{
	int zM = d->met[c->metal].z, zL = d->lig[c->lig].zb, zML = zM + zL;
	double D;
	switch (c->kind) {
	case CX_MHL:
		D = zM * zM + (zL + 1) * (zL + 1) - c->z * c->z;
		break;
	case CX_M2L:
		D = zML * zML + zM * zM - c->z * c->z;
		break;
	case CX_ML2:
		D = zML * zML + zL * zL - c->z * c->z;
		break;
	default:
		D = zM * zM + zL * zL - c->z * c->z;
	}
	double lk = c->logk + act_dh_A(c->t_ref) * davies_F(c->i_ref) * D;
	double T = t_C + IM_ZERO_C_K, Tr = c->t_ref + IM_ZERO_C_K;
	if (isfinite(c->dh))
		lk += lnk_shift(c->dh, c->dcp, T, Tr) / LN10;
	else if (no_t && fabs(t_C - c->t_ref) > 0.5)
		*no_t = 1;
	return lk;
}

/* log10 beta of a complex over the basis (M, L, H) at I = 0 */
static double cx_logbeta0(const spec_data *d, const cx_row *c, double t_C, int *no_t)
{
	double lk = cx_logk0(d, c, t_C, no_t);
	if (c->kind == CX_MHL)
		lk += lig_logbeta0(d, c->lig, 1, t_C, no_t);
	if (c->ml_row >= 0)
		lk += cx_logk0(d, &d->cx[c->ml_row], t_C, no_t);
	return lk;
}

static double pkw_at(const spec_data *d, double t_C)
{
	double T = t_C + IM_ZERO_C_K;
	return d->pkw.a / T + d->pkw.b + d->pkw.c * T;
}

double spec_co2_mM_per_atm(const spec_data *d, double t_C)
{
	const co2_app *a = &d->co2;
	double dt = a->t_ref_sol - t_C;
	return (a->s0 + a->s1 * dt + a->s2 * dt * dt) * MMHG_PER_ATM;
}

double spec_co2_pk_app(const spec_data *d, double t_C, double pH, double I_mM)
{
	const co2_app *a = &d->co2;
	double p = pH < a->ph_min ? a->ph_min : pH > a->ph_max ? a->ph_max : pH;
	double dp = a->ph_ref - p, dt = a->t_ref - t_C;
	double pk = a->pk0 + a->pk_ph * dp + dt * (a->pk_t + a->pk_tph * dp);
	double A = act_dh_A(t_C);
	return pk + A * (davies_F(a->i_ref) - davies_F(I_mM / 1000.0));
}

/* thermodynamic pK of CO2(aq) = HCO3- + H+ that gives the apparent pK' of
 * the physiological relation at pH: pK' + A F(I_ref) (Davies, z = 1) */
static double carb_pk1_thermo(const spec_data *d, double t_C, double pH)
{
	return spec_co2_pk_app(d, t_C, pH, d->co2.i_ref * 1000.0) +
	       act_dh_A(t_C) * davies_F(d->co2.i_ref);
}

double spec_water_vapour_kPa(double t_C)
{
	/* Buck A.L. (1981) J Appl Meteorol 20:1527-1532, over water (from memory) */
	return 0.61121 * exp((18.678 - t_C / 234.5) * (t_C / (257.14 + t_C)));
}

double spec_pco2_atm(double frac, double p_total_atm, double t_C, int humid)
{
	double p = p_total_atm;
	if (humid)
		p -= spec_water_vapour_kPa(t_C) / 101.325;
	return frac * p;
}
static int lig_basis(work *w, int k)
{
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_LIGAND && w->bref[b] == k)
			return b;
	return -1;
}

int specw_metal_basis(work *w, int m)
{
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_METAL && w->bref[b] == m)
			return b;
	return -1;
}

static int add_basis(work *w, int type, int ref, char *err)
{
	int b = type == B_LIGAND ? lig_basis(w, ref) : specw_metal_basis(w, ref);
	if (b >= 0)
		return b;
	if (w->nb == NB_MAX)
		return im_fail(err,
			       "speciation: too many metals and ligands in one solution");
	int nlig = 0, nmet = 0;
	for (int i = 0; i < w->nb; i++)
		nlig += w->btype[i] == B_LIGAND, nmet += w->btype[i] == B_METAL;
	if ((type == B_LIGAND && nlig == SPEC_MAX_LIGANDS) ||
	    (type == B_METAL && nmet == SPEC_MAX_METALS))
		return im_fail(err, "speciation: too many %s in one solution",
			       type == B_LIGAND ? "ligands" : "metals");
	b = w->nb++;
	w->btype[b] = type;
	w->bref[b] = ref;
	w->bz[b] = type == B_LIGAND ? w->d->lig[ref].zb : w->d->met[ref].z;
	w->fixed[b] = 0;
	for (int k = 0; k < NDEST; k++)
		w->T[k][b] = 0;
	return b;
}

static void work_init(work *w, const spec_data *d, double t_C)
{
	memset(w, 0, sizeof *w);
	w->d = d;
	w->t_C = t_C;
	w->A = act_dh_A(t_C);
	w->nb = 1;
	w->hb = 0;
	w->btype[0] = B_H;
	w->bz[0] = 1;
	w->bref[0] = -1;
	w->co2b = -1;
	w->fixed_metal = -1;
	w->carb_s = -1;
	w->carb_pH = 7.4;
}

/* Map one input species into the problem (dest: base, titrant, source). */
static int add_input(work *w, const spec_in *in, int dest, char *err)
{
	const spec_data *d = w->d;
	const char *s = in->symbol;
	/* solution totals in mol/L; titrant and source as counts per unit */
	double c = dest == DEST_BASE ? in->mM / 1000.0 : in->mM;
	if (!s || !*s)
		return im_fail(err, "speciation: a species without a symbol");
	if (!isfinite(in->mM) || in->mM < 0)
		return im_fail(err,
			       "speciation: %s: amount %g is not a finite number >= 0", s,
			       in->mM);
	if (strcmp(s, "H+") == 0 || strcmp(s, "OH-") == 0) {
		int zz = s[0] == 'H' ? 1 : -1;
		if (in->z != zz)
			return im_fail(err, "speciation: %s given with charge %d", s,
				       in->z);
		w->T[dest][w->hb] += zz * c;
		return 0;
	}
	for (int k = 0; k < d->nlig; k++)
		for (int h = 0; h <= MAXH; h++)
			if (d->lig[k].has_state[h] && im_symeq(d->lig[k].state[h], s)) {
				if (in->z != d->lig[k].zb + h)
					return im_fail(err,
						       "speciation: %s given with charge "
						       "%d, the equilibria tables say %d",
						       s, in->z, d->lig[k].zb + h);
				int b = add_basis(w, B_LIGAND, k, err);
				if (b < 0)
					return -1;
				w->T[dest][b] += c;
				w->T[dest][w->hb] += h * c;
				return 0;
			}
	int m = -1;
	for (int i = 0; i < d->nmet; i++)
		if (im_symeq(d->met[i].sym, s))
			m = i;
	if (m >= 0) {
		if (in->z != d->met[m].z)
			return im_fail(err, "speciation: %s given with charge %d", s,
				       in->z);
		int b = add_basis(w, B_METAL, m, err);
		if (b < 0)
			return -1;
		w->T[dest][b] += c;
		return 0;
	}
	for (int r = 0; r < d->ncx; r++)
		if (strcmp(d->cx[r].sym, s) == 0) {
			const cx_row *x = &d->cx[r];
			if (in->z != x->z)
				return im_fail(err,
					       "speciation: %s given with charge %d, the "
					       "equilibria tables say %d",
					       s, in->z, x->z);
			int bm = add_basis(w, B_METAL, x->metal, err);
			int bl = bm < 0 ? -1 : add_basis(w, B_LIGAND, x->lig, err);
			if (bl < 0)
				return -1;
			w->T[dest][bm] += x->nm * c;
			w->T[dest][bl] += x->nl * c;
			w->T[dest][w->hb] += x->nh * c;
			return 0;
		}
	/* a strong ion or neutral solute */
	for (int i = 0; i < w->nst; i++)
		if (strcmp(w->st[i].sym, s) == 0) {
			if (w->st[i].z != in->z)
				return im_fail(err,
					       "speciation: %s given with two charges",
					       s);
			w->st[i].c[dest] += c;
			return 0;
		}
	if (w->nst == NSTRONG_MAX)
		return im_fail(err, "speciation: more than %d species", NSTRONG_MAX);
	if (in->z < -6 || in->z > 6)
		return im_fail(err, "speciation: %s: charge %d out of range", s, in->z);
	strong *t = &w->st[w->nst++];
	memset(t, 0, sizeof *t);
	t->sym = s;
	t->z = in->z;
	t->c[dest] = c;
	return 0;
}

static int add_species(work *w, int kind, int ref, int bm, int nm, int bl, int nl, int nh,
		       int z, double lb0, char *err)
{
	if (w->ns == NS_MAX)
		return im_fail(err, "speciation: too many species in one solution");
	int s = w->ns++;
	w->skind[s] = kind;
	w->sref[s] = ref;
	w->sm[s] = bm;
	w->sl[s] = bl;
	w->snm[s] = nm;
	w->snl[s] = nl;
	w->snh[s] = nh;
	w->sz[s] = z;
	w->lb0[s] = lb0 * LN10;
	w->ssub[s] = -1;
	int k = 0;
	double D = -(double)z * z;
	if (bm >= 0 && nm) {
		w->sb[s][k] = bm, w->sn[s][k++] = nm;
		D += nm * w->bz[bm] * w->bz[bm];
	}
	if (bl >= 0 && nl) {
		w->sb[s][k] = bl, w->sn[s][k++] = nl;
		D += nl * w->bz[bl] * w->bz[bl];
	}
	if (nh) {
		w->sb[s][k] = w->hb, w->sn[s][k++] = nh;
		D += nh; /* z(H+)^2 = 1 */
	}
	w->snz[s] = k;
	w->D[s] = D;
	return 0;
}

/* Build the species once the basis is known. */
static int build_species(work *w, char *err)
{
	const spec_data *d = w->d;
	double t = w->t_C;
	w->ns = 0;
	if (add_species(w, SPEC_K_PROTON, -1, -1, 0, -1, 0, 1, 1, 0.0, err) ||
	    add_species(w, SPEC_K_HYDROXIDE, -1, -1, 0, -1, 0, -1, -1, -pkw_at(d, t),
			err))
		return -1;
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_METAL &&
		    add_species(w, SPEC_K_METAL, w->bref[b], b, 1, -1, 0, 0, w->bz[b],
				0.0, err))
			return -1;
	for (int b = 0; b < w->nb; b++) {
		if (w->btype[b] != B_LIGAND)
			continue;
		int k = w->bref[b], no_t = 0, first = w->ns;
		const lig_def *L = &d->lig[k];
		for (int h = 0; h <= L->nsteps; h++)
			if (add_species(w, SPEC_K_LIGAND, h, -1, 0, b, 1, h, L->zb + h,
					lig_logbeta0(d, k, h, t, &no_t), err))
				return -1;
		if (L->carbonate && L->nsteps >= 2) {
			/* CO2(aq): the physiological apparent constant (spec_co2_pk_app) */
			w->carb_s = first + 2;
			w->lb0[first + 2] = (lig_logbeta0(d, k, 1, t, &no_t) +
					     carb_pk1_thermo(d, t, w->carb_pH)) * LN10;
		}
		if (b == w->co2b) {
			int s2 = first + 2; /* H2L = CO2(aq) */
			for (int s = first; s < w->ns; s++) {
				w->ssub[s] = s2;
				/* protons relative to CO2: h - 2 */
				for (int j = 0; j < w->snz[s]; j++)
					if (w->sb[s][j] == w->hb)
						w->sn[s][j] -= 2;
				if (w->snh[s] == 0) { /* add an H entry of -2 */
					w->sb[s][w->snz[s]] = w->hb;
					w->sn[s][w->snz[s]++] = -2;
				}
				/* drop zero entries */
				int k2 = 0;
				for (int j = 0; j < w->snz[s]; j++)
					if (w->sn[s][j] != 0) {
						w->sb[s][k2] = w->sb[s][j];
						w->sn[s][k2++] = w->sn[s][j];
					}
				w->snz[s] = k2;
			}
		}
		w->no_t_lig[k] |= no_t;
	}
	for (int r = 0; r < d->ncx; r++) {
		const cx_row *c = &d->cx[r];
		if (!c->active)
			continue;
		int bm = specw_metal_basis(w, c->metal), bl = lig_basis(w, c->lig), no_t = 0;
		if (bm < 0 || bl < 0)
			continue;
		if (add_species(w, SPEC_K_COMPLEX, r, bm, c->nm, bl, c->nl, c->nh, c->z,
				cx_logbeta0(d, c, t, &no_t), err))
			return -1;
		w->no_t_lig[c->lig] |= no_t;
	}
	return 0;
}

/* Conditional constants at ionic strength I (mol/L), and the fixed u. */
static void set_conditions(work *w, double I)
{
	double aF = LN10 * w->A * davies_F(I);
	w->I = I;
	for (int s = 0; s < w->ns; s++)
		w->lb[s] = w->lb0[s] - aF * w->D[s];
	for (int s = 0; s < w->ns; s++)
		if (w->ssub[s] >= 0)
			w->lb[s] -= w->lb0[w->ssub[s]] - aF * w->D[w->ssub[s]];
	if (w->mode == SPEC_PH_FIXED)
		w->u[w->hb] = -w->pH * LN10 + aF; /* ln [H] = ln a_H - ln gamma_H */
}

static void set_totals(work *w)
{
	for (int b = 0; b < w->nb; b++)
		w->Tcur[b] = w->T[DEST_BASE][b] + w->x_tit * w->T[DEST_TIT][b] +
			     w->x_src * w->T[DEST_SRC][b];
	if (w->co2b >= 0) /* proton balance relative to CO2(aq) */
		w->Tcur[w->hb] -= 2.0 * w->Tcur[w->co2b];
	for (int b = 0; b < w->nb; b++)
		w->active[b] = w->fixed[b] || b == w->hb || w->Tcur[b] > 0;
	for (int s = 0; s < w->ns; s++) {
		int a = 1;
		for (int j = 0; j < w->snz[s]; j++)
			a &= w->active[w->sb[s][j]];
		w->sact[s] = a;
	}
}

static inline double species_ln(const work *w, int s, const double *u)
{
	double x = w->lb[s];
	for (int j = 0; j < w->snz[s]; j++)
		x += w->sn[s][j] * u[w->sb[s][j]];
	return x;
}

static void concentrations(work *w, const double *u, double *c)
{
	for (int s = 0; s < w->ns; s++) {
		if (!w->sact[s]) {
			c[s] = 0;
			continue;
		}
		double x = species_ln(w, s, u);
		c[s] = exp(x > 700 ? 700 : x);
	}
}

/* scaled residuals of the balanced components; returns the worst |R|/S */
static double residuals(const work *w, const double *c, const int *fb, int nf, double *R,
			double *S)
{
	double worst = 0;
	for (int i = 0; i < nf; i++)
		R[i] = -w->Tcur[fb[i]], S[i] = fabs(w->Tcur[fb[i]]);
	for (int s = 0; s < w->ns; s++) {
		if (!w->sact[s])
			continue;
		for (int j = 0; j < w->snz[s]; j++) {
			int i = w->fpos[w->sb[s][j]];
			if (i >= 0) {
				R[i] += w->sn[s][j] * c[s];
				S[i] += fabs((double)w->sn[s][j]) * c[s];
			}
		}
	}
	for (int i = 0; i < nf; i++) {
		double e = S[i] > 0 ? fabs(R[i]) / S[i] : 0;
		if (!(e <= worst))
			worst = isfinite(e) ? e : INFINITY;
	}
	return worst;
}

static double potential(const work *w, const double *u, const int *fb, int nf)
{
	double g = 0;
	for (int s = 0; s < w->ns; s++)
		if (w->sact[s]) {
			double x = species_ln(w, s, u);
			g += exp(x > 700 ? 700 : x);
		}
	for (int i = 0; i < nf; i++)
		g -= w->Tcur[fb[i]] * u[fb[i]];
	return g;
}

static int free_components(work *w, int *fb)
{
	int nf = 0;
	for (int b = 0; b < w->nb; b++) {
		w->fpos[b] = -1;
		if (w->active[b] && !w->fixed[b]) {
			w->fpos[b] = nf;
			fb[nf++] = b;
		}
	}
	return nf;
}

/* Solve J d = -R for symmetric positive definite J (n x n, row-major),
 * after Jacobi scaling.  Returns -1 when J is not positive definite. */
static int spd_solve(double *J, const double *R, double *dx, int n)
{
	double sc[NB_MAX], y[NB_MAX];
	for (int i = 0; i < n; i++) {
		if (!(J[i * n + i] > 0))
			return -1;
		sc[i] = 1.0 / sqrt(J[i * n + i]);
	}
	for (int i = 0; i < n; i++)
		for (int j = 0; j < n; j++)
			J[i * n + j] *= sc[i] * sc[j];
	for (int i = 0; i < n; i++)
		J[i * n + i] *= 1.0 + 1e-13;
	for (int j = 0; j < n; j++) { /* Cholesky, lower */
		double s = J[j * n + j];
		for (int k = 0; k < j; k++)
			s -= J[j * n + k] * J[j * n + k];
		if (!(s > 0))
			return -1;
		double l = sqrt(s);
		J[j * n + j] = l;
		for (int i = j + 1; i < n; i++) {
			double t = J[i * n + j];
			for (int k = 0; k < j; k++)
				t -= J[i * n + k] * J[j * n + k];
			J[i * n + j] = t / l;
		}
	}
	for (int i = 0; i < n; i++) {
		double t = -R[i] * sc[i];
		for (int k = 0; k < i; k++)
			t -= J[i * n + k] * y[k];
		y[i] = t / J[i * n + i];
	}
	for (int i = n - 1; i >= 0; i--) {
		double t = y[i];
		for (int k = i + 1; k < n; k++)
			t -= J[k * n + i] * dx[k];
		dx[i] = t / J[i * n + i];
	}
	for (int i = 0; i < n; i++)
		dx[i] *= sc[i];
	return 0;
}

/* Damped Newton.  0: converged to SPEC_TOL; -1: gave up (use fallback). */
static int newton(work *w, double tol)
{
	int fb[NB_MAX] = {0}, nf = free_components(w, fb);
	double R[NB_MAX], S[NB_MAX], J[NB_MAX * NB_MAX], dx[NB_MAX], ut[NB_MAX];
	concentrations(w, w->u, w->c);
	w->rmax = residuals(w, w->c, fb, nf, R, S);
	if (nf == 0) {
		w->rmax = 0;
		return 0;
	}
	for (int it = 0; it < NEWTON_MAXIT; it++) {
		if (w->rmax <= tol)
			return 0;
		w->newton_it++;
		memset(J, 0, (size_t)nf * nf * sizeof *J);
		for (int s = 0; s < w->ns; s++) {
			if (!w->sact[s])
				continue;
			int ii[3], nn[3], k = 0;
			for (int j = 0; j < w->snz[s]; j++) {
				int i = w->fpos[w->sb[s][j]];
				if (i >= 0)
					ii[k] = i, nn[k++] = w->sn[s][j];
			}
			for (int a = 0; a < k; a++)
				for (int b = 0; b < k; b++)
					J[ii[a] * nf + ii[b]] +=
						(double)nn[a] * nn[b] * w->c[s];
		}
		if (spd_solve(J, R, dx, nf))
			return -1;
		double big = 0, slope = 0;
		for (int i = 0; i < nf; i++) {
			big = fmax(big, fabs(dx[i]));
			slope += R[i] * dx[i];
		}
		if (!isfinite(big))
			return -1;
		double lim = big > NEWTON_STEP_MAX ? NEWTON_STEP_MAX / big : 1.0;
		double g0 = potential(w, w->u, fb, nf), t = lim;
		int ok = 0;
		memcpy(ut, w->u, sizeof ut);
		for (int h = 0; h < LS_MAXHALF && !ok; h++, t *= 0.5) {
			for (int i = 0; i < nf; i++)
				ut[fb[i]] = w->u[fb[i]] + t * dx[i];
			double g1 = potential(w, ut, fb, nf);
			if (g1 <= g0 + 1e-4 * t * slope) {
				ok = 1;
			} else if (h == 0) {
				/* near the solution G cannot resolve the decrease: judge
				 * the full step by the balances instead */
				double Rt[NB_MAX], St[NB_MAX], ct[NS_MAX];
				concentrations(w, ut, ct);
				if (residuals(w, ct, fb, nf, Rt, St) < 0.5 * w->rmax)
					ok = 1;
			}
			if (ok)
				break;
		}
		if (!ok)
			return -1;
		memcpy(w->u, ut, sizeof ut);
		concentrations(w, w->u, w->c);
		w->rmax = residuals(w, w->c, fb, nf, R, S);
	}
	return w->rmax <= tol ? 0 : -1;
}

/* Fallback: minimise G along one component at a time (each balance is
 * increasing in its own ln c), sweeping until the closure reaches tol. */
static int coordinate(work *w, double tol)
{
	int fb[NB_MAX] = {0}, nf = free_components(w, fb);
	double R[NB_MAX], S[NB_MAX];
	w->used_fallback = 1;
	for (int sweep = 0; sweep < COORD_MAXSWEEP; sweep++) {
		for (int i = 0; i < nf; i++) {
			int b = fb[i];
			double Tb = w->Tcur[b];
			double lo = NAN, hi = NAN, v = w->u[b];
			for (int it = 0; it < 400; it++) {
				double f = -Tb, fp = 0, sc = fabs(Tb);
				for (int s = 0; s < w->ns; s++) {
					if (!w->sact[s])
						continue;
					for (int j = 0; j < w->snz[s]; j++)
						if (w->sb[s][j] == b) {
							double x = species_ln(w, s, w->u);
							double cs =
								exp(x > 700 ? 700 : x);
							f += w->sn[s][j] * cs;
							fp += (double)w->sn[s][j] *
							      w->sn[s][j] * cs;
							sc += fabs((double)w->sn[s][j]) *
							      cs;
						}
				}
				if (fabs(f) <= 1e-14 * sc)
					break;
				if (f < 0)
					lo = v;
				else
					hi = v;
				double nv = fp > 0 ? v - f / fp : NAN;
				if (f < 0 && !(nv > v))
					nv = v + 2.0;
				if (f > 0 && !(nv < v))
					nv = v - 2.0;
				if (nv - v > 20)
					nv = v + 20;
				if (nv - v < -20)
					nv = v - 20;
				if (isfinite(lo) && isfinite(hi) && !(nv > lo && nv < hi))
					nv = 0.5 * (lo + hi);
				v = w->u[b] = nv;
				if (isfinite(lo) && isfinite(hi) && hi - lo < 1e-15)
					break;
			}
		}
		concentrations(w, w->u, w->c);
		w->rmax = residuals(w, w->c, fb, nf, R, S);
		if (w->rmax <= tol)
			return 0;
	}
	return -1;
}

static int equilibrate(work *w)
{
	if (w->fallback_only)
		return coordinate(w, SPEC_TOL);
	if (newton(w, SPEC_TOL) == 0)
		return 0;
	if (coordinate(w, COORD_TOL) == 0 && newton(w, SPEC_TOL) == 0)
		return 0;
	/* Newton could not polish: finish with the fallback alone */
	if (coordinate(w, SPEC_TOL) == 0)
		return 0;
	return -1;
}

/* starting values of the balanced components */
static void initial_guess(work *w)
{
	if (!w->fixed[w->hb])
		w->u[w->hb] = -7.0 * LN10;
	for (int b = 0; b < w->nb; b++) {
		if (w->fixed[b] || b == w->hb)
			continue;
		double Tb = w->Tcur[b] > 0 ? w->Tcur[b] : 1e-12;
		if (w->btype[b] == B_METAL) {
			w->u[b] = log(Tb);
			continue;
		}
		double den = 0;
		for (int s = 0; s < w->ns; s++)
			if (w->skind[s] == SPEC_K_LIGAND && w->sl[s] == b)
				den += exp(fmin(700, w->lb[s] + w->snh[s] * w->u[w->hb]));
		w->u[b] = log(Tb) - log(den > 0 && isfinite(den) ? den : 1.0);
	}
}

static double ionic_strength(const work *w)
{
	double s = 0;
	for (int i = 0; i < w->ns; i++)
		if (w->sact[i])
			s += (double)w->sz[i] * w->sz[i] * w->c[i];
	for (int i = 0; i < w->nst; i++) {
		double c = w->st[i].c[DEST_BASE] + w->x_tit * w->st[i].c[DEST_TIT] +
			   w->x_src * w->st[i].c[DEST_SRC];
		s += (double)w->st[i].z * w->st[i].z * c;
	}
	return 0.5 * s;
}

/* protons bound (needed) minus protons given, mol/L (FIXED mode) */
double specw_proton_excess(const work *w)
{
	double need = 0;
	for (int s = 0; s < w->ns; s++)
		if (w->sact[s])
			for (int j = 0; j < w->snz[s]; j++)
				if (w->sb[s][j] == w->hb)
					need += w->sn[s][j] * w->c[s];
	return need - w->Tcur[w->hb];
}

/* mean protons bound per free ligand b (all states, metals ignored) */
double specw_mean_h(const work *w, int b)
{
	double num = 0, den = 0;
	for (int s = 0; s < w->ns; s++)
		if (w->skind[s] == SPEC_K_LIGAND && w->sl[s] == b) {
			double x = w->lb[s] + w->snh[s] * w->u[w->hb];
			double e = exp(x > 700 ? 700 : x);
			num += w->snh[s] * e;
			den += e;
		}
	return den > 0 ? num / den : 0;
}

/* The outer loop: ionic strength (and the titrant or source amount) to
 * self-consistency, the equilibria solved at each step. */
int specw_run(work *w, int what, char *err)
{
	double I = w->I;
	for (int it = 0; it < ILOOP_MAXIT; it++) {
		set_totals(w);
		set_conditions(w, I);
		if (!w->warm) {   /* later runs on the same work start from the last */
			initial_guess(w);
			w->warm = 1;
		}
		if (equilibrate(w))
			return im_fail(err, "speciation did not converge (closure %.2g)",
				       w->rmax);
		int x_done = 1;
		if (what == RUN_TITRATE) {
			double g = specw_proton_excess(w), q = -w->T[DEST_TIT][w->hb];
			for (int b = 0; b < w->nb; b++)
				if (w->btype[b] == B_LIGAND && w->T[DEST_TIT][b] > 0)
					q += w->T[DEST_TIT][b] * specw_mean_h(w, b);
			double scale = fabs(w->Tcur[w->hb]) + fabs(w->x_tit) + 1e-12;
			if (!(fabs(q) > 0))
				return im_fail(err,
					       "titrant neither takes up nor gives off "
					       "protons");
			double nx = w->x_tit - g / q;
			x_done = fabs(g) <= X_RTOL * scale;
			if (!x_done)
				w->x_tit = nx < 0 ? 0.5 * w->x_tit : nx;
			if (w->x_tit > 2 * MAX_TITRANT_M)
				return im_fail(err, "titrant amount runs past %g mol/L",
					       MAX_TITRANT_M);
		} else if (what == RUN_SOURCE) {
			int b = w->fixed_metal;
			double need = 0;
			for (int s = 0; s < w->ns; s++)
				if (w->sact[s] && w->sm[s] == b)
					need += w->snm[s] * w->c[s];
			double nx = (need - w->T[DEST_BASE][b]) / w->T[DEST_SRC][b];
			x_done = fabs(nx - w->x_src) <=
				 X_RTOL * (fabs(nx) + need / w->T[DEST_SRC][b]);
			w->x_src = nx;
			if (w->x_src > 2 * MAX_SOURCE_M)
				return im_fail(err,
					       "metal source amount runs past %g mol/L",
					       MAX_SOURCE_M);
		}
		if (w->carb_s >= 0) {
			/* the apparent pK' of CO2/HCO3- depends on the pH it gives */
			const co2_app *a = &w->d->co2;
			double ph = w->mode == SPEC_PH_FIXED
					    ? w->pH
					    : -w->u[w->hb] / LN10 + w->A * davies_F(w->I);
			ph = ph < a->ph_min ? a->ph_min : ph > a->ph_max ? a->ph_max : ph;
			if (fabs(ph - w->carb_pH) > 1e-11) {
				int k = w->bref[w->sl[w->carb_s]];
				w->carb_pH = ph;
				w->lb0[w->carb_s] = (lig_logbeta0(w->d, k, 1, w->t_C, NULL) +
						     carb_pk1_thermo(w->d, w->t_C, ph)) *
						    LN10;
				x_done = 0;
			}
		}
		double In = ionic_strength(w);
		int i_done = fabs(In - I) <= 1e-15 + I_RTOL * I;
		if (i_done && x_done)
			return 0;
		I = it < 40 ? In : 0.5 * (I + In);
	}
	return im_fail(err, "ionic strength iteration did not converge");
}
/* ------------------------------------------------------------------ */
/* results                                                              */

static void warnf(spec_result *r, const char *fmt, ...)
	__attribute__((format(printf, 2, 3)));
static void warnf(spec_result *r, const char *fmt, ...)
{
	char buf[SPEC_WARNLEN];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(buf, sizeof buf, fmt, ap);
	va_end(ap);
	for (int i = 0; i < r->nwarn; i++)
		if (strcmp(r->warnings[i], buf) == 0)
			return;
	if (r->nwarn < SPEC_MAX_WARN)
		snprintf(r->warnings[r->nwarn++], SPEC_WARNLEN, "%s", buf);
}

int specw_fill_result(work *w, spec_result *r, char *err)
{
	const spec_data *d = w->d;
	double aF = w->A * davies_F(w->I); /* -log10 gamma for z = 1 */
	int bsum[NB_MAX];
	memset(r, 0, sizeof *r);
	r->t_C = w->t_C;
	for (int b = 0; b < w->nb; b++) {
		bsum[b] = -1;
		if (w->btype[b] == B_METAL && w->active[b]) {
			bsum[b] = r->nmetals;
			snprintf(r->metals[r->nmetals++].symbol, SPEC_SYMLEN, "%s",
				 d->met[w->bref[b]].sym);
		} else if (w->btype[b] == B_LIGAND && w->active[b]) {
			bsum[b] = r->nligands;
			snprintf(r->ligands[r->nligands++].name, SPEC_SYMLEN, "%s",
				 d->lig[w->bref[b]].name);
		}
	}
	double hsum[NB_MAX] = {0};
	for (int s = 0; s < w->ns; s++) {
		if (!w->sact[s] || !(w->c[s] > 0))
			continue;
		if (r->n == SPEC_MAX_OUT)
			return im_fail(err, "speciation: more than %d species",
				       SPEC_MAX_OUT);
		spec_out *o = &r->sp[r->n++];
		double mM = w->c[s] * 1000.0;
		switch (w->skind[s]) {
		case SPEC_K_PROTON:
			snprintf(o->symbol, SPEC_SYMLEN, "H+");
			break;
		case SPEC_K_HYDROXIDE:
			snprintf(o->symbol, SPEC_SYMLEN, "OH-");
			break;
		case SPEC_K_METAL:
			snprintf(o->symbol, SPEC_SYMLEN, "%s",
				 d->met[w->bref[w->sm[s]]].sym);
			break;
		case SPEC_K_LIGAND:
			snprintf(o->symbol, SPEC_SYMLEN, "%s",
				 d->lig[w->bref[w->sl[s]]].state[w->sref[s]]);
			break;
		default:
			snprintf(o->symbol, SPEC_SYMLEN, "%s", d->cx[w->sref[s]].sym);
		}
		o->z = w->sz[s];
		o->mM = mM;
		o->gamma = pow(10.0, -aF * o->z * o->z);
		o->kind = (spec_kind)w->skind[s];
		o->metal = w->sm[s] >= 0 ? bsum[w->sm[s]] : -1;
		o->ligand = w->sl[s] >= 0 ? bsum[w->sl[s]] : -1;
		o->n_m = w->snm[s];
		o->n_l = w->snl[s];
		o->n_h = w->snh[s];
		if (o->metal >= 0) {
			spec_metal_sum *m = &r->metals[o->metal];
			m->total_mM += o->n_m * mM;
			if (o->kind == SPEC_K_METAL) {
				m->free_mM = mM;
				m->free_act_mM = mM * o->gamma;
			} else {
				m->bound_mM += o->n_m * mM;
			}
		}
		if (o->ligand >= 0) {
			spec_ligand_sum *l = &r->ligands[o->ligand];
			l->total_mM += o->n_l * mM;
			if (o->kind == SPEC_K_LIGAND)
				l->unbound_mM += mM;
			else
				l->bound_mM += o->n_l * mM;
			hsum[o->ligand] += o->n_h * mM;
		}
		if (o->kind == SPEC_K_PROTON)
			r->H_mM = mM;
		if (o->kind == SPEC_K_HYDROXIDE)
			r->OH_mM = mM;
		if (o->kind == SPEC_K_LIGAND && d->lig[w->bref[w->sl[s]]].carbonate &&
		    w->sref[s] == 2)
			r->co2_mM = mM;
	}
	for (int i = 0; i < r->nligands; i++)
		r->ligands[i].h_bound =
			r->ligands[i].total_mM > 0 ? hsum[i] / r->ligands[i].total_mM : 0;
	for (int i = 0; i < w->nst; i++) {
		double c = w->st[i].c[DEST_BASE] + w->x_tit * w->st[i].c[DEST_TIT] +
			   w->x_src * w->st[i].c[DEST_SRC];
		if (!(c > 0))
			continue;
		if (r->n == SPEC_MAX_OUT)
			return im_fail(err, "speciation: more than %d species",
				       SPEC_MAX_OUT);
		spec_out *o = &r->sp[r->n++];
		snprintf(o->symbol, SPEC_SYMLEN, "%s", w->st[i].sym);
		o->z = w->st[i].z;
		o->mM = c * 1000.0;
		o->gamma = pow(10.0, -aF * o->z * o->z);
		o->kind = SPEC_K_STRONG;
		o->metal = o->ligand = -1;
	}
	r->pH = -(log(r->H_mM / 1000.0) / LN10 - aF);
	if (w->mode == SPEC_PH_FIXED)
		r->pH = w->pH;
	r->ionic_strength_mM = w->I * 1000.0;
	for (int i = 0; i < r->n; i++)
		r->net_charge_mEq_L += r->sp[i].z * r->sp[i].mM;
	if (w->mode == SPEC_PH_FIXED)
		r->excess_H_mM = specw_proton_excess(w) * 1000.0;
	r->newton_iterations = w->newton_it;
	r->used_fallback = w->used_fallback;
	r->max_rel_residual = w->rmax;
	/* warnings, one line each: ligands without temperature data, and
	 * metal-binding ligands without a constant for a metal present */
	char list[SPEC_WARNLEN];
	size_t len = 0;
	list[0] = '\0';
	for (int b = 0; b < w->nb; b++)
		if (w->btype[b] == B_LIGAND && w->active[b] && w->no_t_lig[w->bref[b]] &&
		    len < sizeof list)
			len += snprintf(list + len, sizeof list - len, "%s%s",
					len ? ", " : "", d->lig[w->bref[b]].name);
	if (len)
		warnf(r,
		      "no temperature dependence entered for %s: constants used "
		      "unchanged at %.1f C",
		      list, w->t_C);
	len = 0;
	list[0] = '\0';
	for (int bl = 0; bl < w->nb; bl++) {
		if (w->btype[bl] != B_LIGAND || !w->active[bl] ||
		    !d->lig[w->bref[bl]].binds)
			continue;
		for (int bm = 0; bm < w->nb; bm++) {
			if (w->btype[bm] != B_METAL || !w->active[bm])
				continue;
			int any = 0;
			for (int c = 0; c < d->ncx; c++)
				any |= d->cx[c].active && d->cx[c].metal == w->bref[bm] &&
				       d->cx[c].lig == w->bref[bl];
			if (!any && len < sizeof list)
				len += snprintf(list + len, sizeof list - len, "%s%s-%s",
						len ? ", " : "", d->lig[w->bref[bl]].name,
						d->met[w->bref[bm]].sym);
		}
	}
	if (len)
		warnf(r,
		      "no stability constant entered for %s: taken as not binding, so "
		      "the free metal is an upper bound",
		      list);
	if (w->I > I_DAVIES_MAX_M)
		warnf(r,
		      "ionic strength %.0f mM: Davies activity coefficients are "
		      "unreliable above %.0f mM",
		      w->I * 1000.0, I_DAVIES_MAX_M * 1000.0);
	if (w->used_fallback)
		warnf(r, "the fallback solver was needed");
	return 0;
}
/* ------------------------------------------------------------------ */
/* public solvers                                                       */

int specw_check_cond(const spec_data *d, const spec_cond *c, int n, char *err)
{
	if (!d)
		return im_fail(err, "speciation: no equilibrium data loaded");
	if (!c)
		return im_fail(err, "speciation: no conditions given");
	if (n < 0 || n > SPEC_MAX_IN)
		return im_fail(err, "speciation: %d species (at most %d)", n,
			       SPEC_MAX_IN);
	if (!isfinite(c->t_C) || c->t_C < T_MIN_C || c->t_C > T_MAX_C)
		return im_fail(err, "temperature %g C outside %g-%g C", c->t_C, T_MIN_C,
			       T_MAX_C);
	if (c->mode == SPEC_PH_FIXED) {
		if (!isfinite(c->pH) || c->pH < 1 || c->pH > 13)
			return im_fail(err, "pH %g outside 1-13", c->pH);
	} else if (c->mode == SPEC_PH_CO2) {
		if (!isfinite(c->pco2_atm) || c->pco2_atm <= 0 || c->pco2_atm > 10)
			return im_fail(err,
				       "CO2 partial pressure %g atm must be above 0 and "
				       "at most 10",
				       c->pco2_atm);
		if (c->t_C < d->k0.tmin || c->t_C > d->k0.tmax)
			return im_fail(err, "CO2 constants known for %g-%g C only",
				       d->co2.tmin, d->co2.tmax);
	} else if (c->mode != SPEC_PH_CLOSED) {
		return im_fail(err, "speciation: unknown pH mode");
	}
	return 0;
}

/* Build the work for inputs (+ titrant, + source); mode from cond. */
int specw_setup(work *w, const spec_data *d, const spec_in *in, int n,
		 const spec_cond *c, const spec_in *tit, int nt, const spec_in *src,
		 int ns, char *err)
{
	work_init(w, d, c->t_C);
	w->mode = c->mode;
	w->pH = c->pH;
	w->fallback_only = c->fallback_only;
	if (c->mode == SPEC_PH_FIXED)
		w->fixed[w->hb] = 1;
	if (n > 0 && !in)
		return im_fail(err, "speciation: no species given");
	for (int i = 0; i < n; i++)
		if (add_input(w, &in[i], DEST_BASE, err))
			return -1;
	for (int i = 0; i < nt; i++)
		if (add_input(w, &tit[i], DEST_TIT, err))
			return -1;
	for (int i = 0; i < ns; i++)
		if (add_input(w, &src[i], DEST_SRC, err))
			return -1;
	if (c->mode == SPEC_PH_CO2) {
		int k = -1;
		for (int i = 0; i < d->nlig; i++)
			if (d->lig[i].carbonate)
				k = i;
		if (k < 0 || d->lig[k].nsteps < 2)
			return im_fail(err,
				       "speciation: no carbonate constants for the CO2 "
				       "mode");
		int b = add_basis(w, B_LIGAND, k, err);
		if (b < 0)
			return -1;
		w->co2b = b;
		w->fixed[b] = 1;
		w->co2_M = spec_co2_mM_per_atm(d, c->t_C) * c->pco2_atm / 1000.0;
		w->u[b] = log(w->co2_M);
	}
	if (build_species(w, err))
		return -1;
	/* starting ionic strength: the inputs as given */
	double s = 0;
	for (int i = 0; i < n; i++)
		s += (double)in[i].z * in[i].z * in[i].mM / 1000.0;
	w->I = 0.5 * s;
	return 0;
}

int spec_solve(const spec_data *d, const spec_in *in, int n, const spec_cond *cond,
	       spec_result *r, char *err)
{
	memset(r, 0, sizeof *r);
	if (specw_check_cond(d, cond, n, err))
		return -1;
	work *w = im_xmalloc(sizeof *w);
	int rc = specw_setup(w, d, in, n, cond, NULL, 0, NULL, 0, err);
	if (rc == 0)
		rc = specw_run(w, RUN_PLAIN, err);
	if (rc == 0)
		rc = specw_fill_result(w, r, err);
	free(w);
	return rc;
}
int spec_apparent_kd(const spec_data *d, const char *metal, const char *ligand, double pH,
		     double t_C, double I_mM, double *kd_mM, char *err)
{
	*kd_mM = NAN;
	if (!d)
		return im_fail(err, "speciation: no equilibrium data loaded");
	int m = metal ? eqd_find_metal(d, metal) : -1;
	int k = ligand ? eqd_find_lig_ci(d, ligand) : -1;
	if (m < 0)
		return im_fail(err, "'%s' is not a metal of the equilibria tables",
			       metal ? metal : "");
	if (k < 0)
		return im_fail(err, "'%s' is not a ligand of the equilibria tables",
			       ligand ? ligand : "");
	if (!isfinite(pH) || pH < 1 || pH > 13)
		return im_fail(err, "pH %g outside 1-13", pH);
	if (!isfinite(t_C) || t_C < T_MIN_C || t_C > T_MAX_C)
		return im_fail(err, "temperature %g C outside %g-%g C", t_C, T_MIN_C,
			       T_MAX_C);
	if (!isfinite(I_mM) || I_mM < 0 || I_mM > 3000)
		return im_fail(err, "ionic strength %g mM outside 0-3000 mM", I_mM);
	double I = I_mM / 1000.0, A = act_dh_A(t_C), F = davies_F(I);
	double lnH = -pH * LN10 + LN10 * A * F; /* ln [H+] */
	const lig_def *L = &d->lig[k];
	int zM = d->met[m].z;
	double den = 0, num = 0;
	for (int h = 0; h <= L->nsteps; h++) {
		int z = L->zb + h;
		double D = L->zb * L->zb + h - z * z;
		den += exp(LN10 * (lig_logbeta0(d, k, h, t_C, NULL) - A * F * D) +
			   h * lnH);
	}
	int any = 0;
	for (int r = 0; r < d->ncx; r++) {
		const cx_row *c = &d->cx[r];
		if (!c->active || c->metal != m || c->lig != k || c->nm != 1 ||
		    c->nl != 1)
			continue;
		double D = zM * zM + L->zb * L->zb + c->nh - c->z * c->z;
		num += exp(LN10 * (cx_logbeta0(d, c, t_C, NULL) - A * F * D) +
			   c->nh * lnH);
		any = 1;
	}
	if (!any)
		return im_fail(err, "no stability constant of %s with %s", d->met[m].sym,
			       L->name);
	*kd_mM = den / num * 1000.0;
	return 0;
}
