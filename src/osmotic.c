/*
 * osmotic.c - Pitzer osmotic coefficients, molarity to molality, and the
 * osmolality adjustment.  The model is stated in osmotic.h; the parameter
 * tables are read by eqdata.c.
 */
#include "osmotic.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "activity.h"
#include "common.h"
#include "eqdata.h"

#define PITZER_B       1.2    /* Pitzer's b, (kg/mol)^1/2 */
#define A_PHI_25C      0.3915 /* Bradley & Pitzer 1979, from memory */
#define ADJUST_MAX_mM  5000.0 /* largest amount osm_adjust will propose */
#define ADJUST_TOL     1e-11  /* relative tolerance on the osmolality */
#define ADJUST_MAXIT   300
#define MIN_WATER_FRAC 0.05 /* 1 - sum c V below this: out of the model */
#define EST_FRAC       0.5  /* an estimated term is uncertain by +-50 % */
#define GENERIC_B0     0.05 /* a typical 1-1 salt's beta0, beta1 (between */
#define GENERIC_B1     0.25 /* KCl and NaCl, Pitzer & Mayorga 1973): the range */

/* The tables are read and picked in eqdata.c. */
int osm_load(sqlite3 *db, osm_data **out, char *err)
{
	return eqd_load_osm(db, out, err);
}

void osm_data_free(osm_data *d)
{
	eqd_free_osm(d);
}

int osm_use_compilation(osm_data *d, const char *name, char *err)
{
	if (!d)
		return im_fail(err, "osmolality: no parameter data loaded");
	if (!name || !*name || im_strcaseeq(name, "default"))
		return eqd_use_compilation(NULL, d, name, err);
	const char *canon;
	if (!eqd_osm_has_compilation(d, name, &canon))
		return im_fail(err, "no Pitzer parameters from a compilation named '%s'",
			       name);
	return eqd_use_compilation(NULL, d, name, err);
}

double osm_a_phi(double t_C)
{
	return A_PHI_25C * act_dh_A(t_C) / act_dh_A(25.0);
}

static int check_input(const osm_species *sp, int n, double t_C, char *err)
{
	if (n < 0 || (n > 0 && !sp))
		return im_fail(err, "osmolality: no species given");
	if (!isfinite(t_C) || t_C < 0 || t_C > 100)
		return im_fail(err, "osmolality: temperature %g C outside 0-100 C", t_C);
	for (int i = 0; i < n; i++) {
		if (!isfinite(sp[i].conc) || sp[i].conc < 0)
			return im_fail(err,
				       "osmolality: concentration of %s is %g, must be a "
				       "finite number >= 0",
				       sp[i].symbol ? sp[i].symbol : "?", sp[i].conc);
		if (sp[i].z < -6 || sp[i].z > 6)
			return im_fail(err, "osmolality: charge %d of %s out of range",
				       sp[i].z, sp[i].symbol ? sp[i].symbol : "?");
	}
	return 0;
}

int osm_molal(const osm_data *d, const osm_species *sp, int n, double t_C, osm_result *r,
	      char *err)
{
	memset(r, 0, sizeof *r);
	if (!d)
		return im_fail(err, "osmolality: no parameter data loaded");
	if (check_input(sp, n, t_C, err))
		return -1;
	/* symbol indices, once */
	int idx_buf[64], *idx = n <= 64 ? idx_buf : im_xmalloc((size_t)n * sizeof *idx);
	double msum = 0, I = 0, Z = 0;
	for (int i = 0; i < n; i++) {
		double m = sp[i].conc / 1000.0;
		idx[i] = sp[i].z && sp[i].symbol ? eqd_osm_sym(d, sp[i].symbol) : -1;
		msum += m;
		I += 0.5 * m * sp[i].z * sp[i].z;
		Z += m * abs(sp[i].z);
	}
	double sqI = sqrt(I), s = 0, prod_all = 0, prod_fb = 0;
	double half_est = 0, up_none = 0; /* range, mol/kg (osmolality) */
	double m_est = 0;                 /* particles with estimated terms */
	for (int c = 0; c < n; c++) {
		if (sp[c].z <= 0 || sp[c].conc <= 0)
			continue;
		for (int a = 0; a < n; a++) {
			if (sp[a].z >= 0 || sp[a].conc <= 0)
				continue;
			double mm = sp[c].conc * sp[a].conc * 1e-6;
			int row = idx[c] >= 0 && idx[a] >= 0
					  ? d->pair[idx[c] * d->nsym + idx[a]]
					  : -1;
			prod_all += mm;
			if (row < 0) {
				prod_fb += mm;
				r->n_fallback_pairs++;
				up_none += 2.0 * mm * (GENERIC_B0 + GENERIC_B1 * exp(-2.0 * sqI));
				continue;
			}
			const pz_row *p = &d->pz[row];
			double B = p->b0 + p->b1 * exp(-p->a1 * sqI) +
				   p->b2 * exp(-p->a2 * sqI);
			double C = p->cphi / (2.0 * sqrt((double)abs(p->zc * p->za)));
			s += mm * (B + Z * C);
			if (p->cls == EQD_OSM_ESTIMATED)
				half_est += EST_FRAC * fabs(2.0 * mm * (B + Z * C));
			int g = p->zc == -p->za ? p->zc : 1; /* 1-1, 2-2: one of each */
			double nc = -p->za / g, na = p->zc / g;
			double Imax = 0.5 * p->m_max *
				      (nc * p->zc * p->zc + na * p->za * p->za);
			if (I > Imax)
				r->over_range = 1;
		}
	}
	/* neutral solutes' own terms; the shares of particles without
	 * published data (estimated salts, pairs without rows) */
	double neu = 0;
	for (int i = 0; i < n; i++) {
		double m = sp[i].conc / 1000.0;
		if (sp[i].z == 0 && sp[i].symbol && m > 0) {
			int k = eqd_osm_sym(d, sp[i].symbol);
			for (int j = 0; k >= 0 && j < d->nnz; j++)
				if (d->nz[j].sym == k) {
					double t = d->nz[j].lambda * m * m + d->nz[j].mu * m * m * m;
					neu += t;
					if (d->nz[j].cls == EQD_OSM_ESTIMATED) {
						half_est += EST_FRAC * fabs(t);
						m_est += m;
					}
					if (m > d->nz[j].m_max)
						r->over_range = 1;
				}
			continue;
		}
		if (sp[i].z == 0 || m <= 0)
			continue;
		/* an ion counts as estimated when a pair it forms with a
		 * counter-ion present is estimated or missing */
		int est = 0;
		for (int j = 0; j < n && !est; j++) {
			if (sp[j].z == 0 || (sp[j].z > 0) == (sp[i].z > 0) || !(sp[j].conc > 0))
				continue;
			int c = sp[i].z > 0 ? i : j, a = sp[i].z > 0 ? j : i;
			int row = idx[c] >= 0 && idx[a] >= 0 ? d->pair[idx[c] * d->nsym + idx[a]]
							     : -1;
			est = row < 0 || d->pz[row].cls == EQD_OSM_ESTIMATED;
		}
		if (est)
			m_est += m;
	}
	if (idx != idx_buf)
		free(idx);
	double f = -osm_a_phi(t_C) * I * sqI / (1.0 + PITZER_B * sqI);
	r->phi = msum > 0 ? 1.0 + (2.0 * (f + s) + neu) / msum : 1.0;
	r->osmolality_lo_mOsm_kg = (r->phi * msum - half_est) * 1000.0;
	r->osmolality_hi_mOsm_kg = (r->phi * msum + half_est + up_none) * 1000.0;
	r->estimated_frac = msum > 0 ? m_est / msum : 0.0;
	r->molality_sum_mmol_kg = msum * 1000.0;
	r->osmolality_mOsm_kg = r->phi * msum * 1000.0;
	r->ionic_strength_mmol_kg = I * 1000.0;
	r->fallback_frac = prod_all > 0 ? prod_fb / prod_all : 0.0;
	if (!isfinite(r->osmolality_mOsm_kg) || r->phi <= 0)
		return im_fail(err,
			       "osmolality: outside the range of the Pitzer model (ionic "
			       "strength %.3g mol/kg)",
			       I);
	return 0;
}

int osm_to_molal(const osm_data *d, const osm_species *sp, int n, double t_C,
		 double *m_mmol_kg, double *water_kg_L, char *err)
{
	if (!d)
		return im_fail(err, "osmolality: no parameter data loaded");
	if (check_input(sp, n, t_C, err))
		return -1;
	double cv = 0;
	for (int i = 0; i < n; i++) {
		int k = sp[i].symbol ? eqd_osm_sym(d, sp[i].symbol) : -1;
		double v = k >= 0 ? d->v0_L_mol[k] : NAN;
		if (isfinite(v))
			cv += sp[i].conc / 1000.0 * v;
	}
	if (1.0 - cv < MIN_WATER_FRAC)
		return im_fail(err,
			       "osmolality: solution too concentrated for the molality "
			       "conversion (solutes fill %.0f %% of the volume)",
			       100 * cv);
	double w = act_water_density_g_cm3(t_C) * (1.0 - cv);
	for (int i = 0; i < n; i++)
		m_mmol_kg[i] = sp[i].conc / w;
	if (water_kg_L)
		*water_kg_L = w;
	return 0;
}

int osm_molar(const osm_data *d, const osm_species *sp, int n, double t_C, osm_result *r,
	      char *err)
{
	memset(r, 0, sizeof *r);
	double w, ideal = 0;
	osm_species buf[64] = {{0}},
		    *m = n <= 64 ? buf : im_xmalloc((size_t)n * sizeof *m);
	double mb[64] = {0}, *mm = n <= 64 ? mb : im_xmalloc((size_t)n * sizeof *mm);
	int rc = osm_to_molal(d, sp, n, t_C, mm, &w, err);
	int nov = 0;
	if (rc == 0) {
		for (int i = 0; i < n; i++) {
			m[i] = sp[i];
			m[i].conc = mm[i];
			ideal += sp[i].conc;
			int k = sp[i].symbol ? eqd_osm_sym(d, sp[i].symbol) : -1;
			nov += !(k >= 0 && isfinite(d->v0_L_mol[k])) && sp[i].conc > 0;
		}
		rc = osm_molal(d, m, n, t_C, r, err);
	}
	if (m != buf)
		free(m);
	if (mm != mb)
		free(mm);
	if (rc)
		return -1;
	r->osmolarity_ideal_mOsm_L = ideal;
	r->water_kg_L = w;
	r->n_no_volume = nov;
	return 0;
}

/* ---- osm_adjust ---- */

typedef struct adj_ctx {
	const osm_data *d;
	const osm_species *sp;
	int n;
	const osm_species *add;
	int nadd;
	double t_C;
	osm_species *tmp; /* n + nadd */
	int dilute;
} adj_ctx;

/* Osmolality at parameter p: dilute: species scaled by p (0..1]; else
 * p mM of the compound added. */
static int adj_eval(adj_ctx *a, double p, double *osm, char *err)
{
	int k = 0;
	for (int i = 0; i < a->n; i++) {
		a->tmp[k] = a->sp[i];
		if (a->dilute)
			a->tmp[k].conc *= p;
		k++;
	}
	for (int i = 0; !a->dilute && i < a->nadd; i++) {
		a->tmp[k] = a->add[i];
		a->tmp[k].conc = a->add[i].conc * p;
		k++;
	}
	osm_result r;
	if (osm_molar(a->d, a->tmp, k, a->t_C, &r, err))
		return -1;
	*osm = r.osmolality_mOsm_kg;
	return 0;
}

/* Increasing function on [lo, hi] with f(lo) < target <= f(hi): Illinois
 * false position with bisection whenever it stalls. */
static int adj_root(adj_ctx *a, double lo, double flo, double hi, double fhi,
		    double target, double *x, char *err)
{
	double glo = flo - target, ghi = fhi - target;
	int side = 0;
	for (int it = 0; it < ADJUST_MAXIT; it++) {
		double m = (glo * hi - ghi * lo) / (glo - ghi);
		if (!(m > lo && m < hi) || it % 8 == 7)
			m = 0.5 * (lo + hi);
		double fm;
		if (adj_eval(a, m, &fm, err))
			return -1;
		double gm = fm - target;
		if (fabs(gm) <= ADJUST_TOL * target || hi - lo <= 1e-15 * hi) {
			*x = m;
			return 0;
		}
		if (gm < 0) {
			lo = m, glo = gm;
			if (side == -1)
				ghi *= 0.5;
			side = -1;
		} else {
			hi = m, ghi = gm;
			if (side == 1)
				glo *= 0.5;
			side = 1;
		}
	}
	return im_fail(err, "osmolality adjustment did not converge");
}

int osm_adjust(const osm_data *d, const osm_species *sp, int n, double t_C,
	       double target_mOsm_kg, const osm_species *add, int nadd,
	       osm_adjust_result *r, char *err)
{
	memset(r, 0, sizeof *r);
	if (!isfinite(target_mOsm_kg))
		return im_fail(err, "osmolality target is not a number");
	if (target_mOsm_kg < 0)
		return im_fail(err, "osmolality target %g mOsm/kg is negative",
			       target_mOsm_kg);
	if (target_mOsm_kg == 0)
		return im_fail(err, "osmolality target must be above 0 mOsm/kg");
	if (nadd < 0 || (nadd > 0 && !add))
		return im_fail(err, "osmolality adjustment: bad compound yields");
	if (nadd > 0 && check_input(add, nadd, t_C, err))
		return -1;
	osm_result r0;
	if (osm_molar(d, sp, n, t_C, &r0, err))
		return -1;
	r->before_mOsm_kg = r0.osmolality_mOsm_kg;
	adj_ctx a = {d, sp, n, add, nadd, t_C, NULL, 0};
	a.tmp = im_xmalloc((size_t)(n + nadd + 1) * sizeof *a.tmp);
	double before = r0.osmolality_mOsm_kg, x = 0, fx;
	int rc = 0;
	if (fabs(before - target_mOsm_kg) <= ADJUST_TOL * target_mOsm_kg) {
		r->after_mOsm_kg = before;
	} else if (before > target_mOsm_kg) {
		/* dilute: scale p = 1/f in (0, 1), osm(0) = 0 < target < osm(1) */
		a.dilute = 1;
		r->dilute = 1;
		rc = adj_root(&a, 0.0, 0.0, 1.0, before, target_mOsm_kg, &x, err);
		if (rc == 0) {
			r->water_mL_per_L = (1.0 / x - 1.0) * 1000.0;
			rc = adj_eval(&a, x, &fx, err);
			r->after_mOsm_kg = fx;
		}
	} else {
		double tot = 0;
		for (int i = 0; i < nadd; i++)
			tot += add[i].conc;
		if (nadd == 0 || !(tot > 0)) {
			rc = im_fail(err,
				     "osmolality %.1f mOsm/kg is below the target %.1f: "
				     "name a compound to add",
				     before, target_mOsm_kg);
		} else {
			double hi = fmax(1.0, (target_mOsm_kg - before) / tot), fhi = 0;
			while ((rc = adj_eval(&a, hi, &fhi, err)) == 0 &&
			       fhi < target_mOsm_kg && hi < ADJUST_MAX_mM)
				hi = fmin(2.0 * hi, ADJUST_MAX_mM);
			if (rc == 0 && fhi < target_mOsm_kg)
				rc = im_fail(err,
					     "target %.1f mOsm/kg needs more than %.0f "
					     "mM of the compound",
					     target_mOsm_kg, ADJUST_MAX_mM);
			else if (rc)
				rc = im_fail(err,
					     "target %.1f mOsm/kg is out of reach with "
					     "this compound (%s)",
					     target_mOsm_kg, "solution too concentrated");
			if (rc == 0)
				rc = adj_root(&a, 0.0, before, hi, fhi, target_mOsm_kg,
					      &x, err);
			if (rc == 0) {
				r->add_mM = x;
				rc = adj_eval(&a, x, &fx, err);
				r->after_mOsm_kg = fx;
			}
		}
	}
	free(a.tmp);
	return rc;
}

int osm_target_solve(osm_eval_fn eval, void *ctx, double target_mOsm_kg,
		     double f0_mOsm_kg, double guess_mM, double *add_mM,
		     double *after_mOsm_kg, char *err)
{
	double a0 = 0, f0 = f0_mOsm_kg - target_mOsm_kg, a1 = guess_mM, f1, after = NAN;
	if (!isfinite(target_mOsm_kg) || !isfinite(guess_mM) || guess_mM < 0)
		return im_fail(err, "osmolality target solve: bad start");
	for (int it = 0; it < 20; it++) {
		if (eval(ctx, a1, &after, err))
			return -1;
		f1 = after - target_mOsm_kg;
		if (fabs(f1) < 1e-6 || f1 == f0)
			break;
		double a2 = a1 - f1 * (a1 - a0) / (f1 - f0);
		a0 = a1;
		f0 = f1;
		a1 = a2 > 0 ? a2 : a1 / 2;
	}
	/* the caller's state holds the last point evaluated: make it a1 */
	if (a1 != a0 && !(fabs(after - target_mOsm_kg) < 1e-6) && eval(ctx, a1, &after, err))
		return -1;
	*add_mM = a1;
	*after_mOsm_kg = after;
	return 0;
}
