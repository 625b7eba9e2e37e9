/*
 * ljp.h - two solutions to a junction: the species of a pipette | bath
 * pair, a mobility for every one of them (from the data, or estimated from
 * its molar mass) with its uncertainty class, every junction model asked
 * for, the interval the mobility uncertainties imply, the spread over the
 * models that produced a value, the ranked breakdown by ion, the
 * corrections per recording mode and the cautions, all in one plain
 * result struct for a renderer.  Nothing here prints.
 *
 * Sign: every value is the potential of the bath relative to the pipette
 * solution, mV (see junction.h); after zeroing in the bath, whole-cell
 * Vm = Vpipette - LJP.
 *
 * The interval: each mobility lies within +-(its relative uncertainty) of
 * its value (a bound, not a standard deviation).  The bounds of the
 * Henderson LJP are found by interval arithmetic with the vertex method:
 * every mobility moved one at a time to each end gives each ion's effect;
 * the upper bound is the larger of (the central value plus all raising
 * effects) and (the value with every mobility at the end that raised it),
 * the lower bound likewise.  Deterministic, 2n + 3 Henderson evaluations.
 * Another model's interval is its value shifted by the same offsets.
 *
 * Ownership: ljp_compute fills a caller-owned ljp_result, which owns its
 * arrays and strings until ljp_free.  The rd_ion and rd_source pointers
 * belong to the refdb.
 */
#ifndef IONMIX_LJP_H
#define IONMIX_LJP_H

#include "common.h"
#include "diffusion.h"
#include "junction.h"
#include "refdb.h"
#include "solution.h"

enum { LJP_HENDERSON = 0, LJP_PLANCK = 1, LJP_DIFFUSION = 2, LJP_NMODELS = 3 };
/* Bits of the models to run (ljp_compute's `models`). */
#define LJP_BIT(m) (1 << (m))
#define LJP_ALL (LJP_BIT(LJP_HENDERSON) | LJP_BIT(LJP_PLANCK) | LJP_BIT(LJP_DIFFUSION))

/* The estimation method for a species without a published mobility
 * (source 'est-stokes-mass'): Stokes-Einstein in water at 25 C with the
 * radius of a sphere of volume M / (rho N_A). */
#define LJP_EST_RHO_G_CM3 1.82
#define LJP_EST_REL_UNC_1 0.25     /* |z| = 1 */
#define LJP_EST_REL_UNC_MULTI 0.35 /* |z| >= 2 */
/* A species with no mobility and no molar mass (a part missing from
 * data/mobility.sql): D between about 0.05e-9 m2/s and that of Na+,
 * 0.26e-9 +- 80 % (common practice: larger than hydrated Na+, so slower). */
#define LJP_NOSIZE_D25_m2_s 0.26e-9
#define LJP_NOSIZE_REL_UNC 0.8

/* How a mobility was obtained. */
typedef enum ljp_how {
	LJP_FROM_DATA = 0,   /* a row of data/ions.sql (class in the row) */
	LJP_FROM_MASS,       /* estimated from the molar mass (derived species) */
	LJP_NO_SIZE          /* no mass either: the wide bound above */
} ljp_how;

typedef struct ljp_mobility {
	double D25_m2_s;        /* diffusion coefficient at 25 C */
	int cls;                /* RD_MOB_MEASURED, RD_MOB_MEMORY or RD_MOB_ESTIMATED */
	double rel_unc;         /* relative uncertainty (bound) */
	ljp_how how;
	const rd_source *source;/* the row's source or 'est-stokes-mass'; NULL for LJP_NO_SIZE */
} ljp_mobility;

/* The Stokes-Einstein estimate of D at 25 C, m2/s, for molar mass M
 * (g/mol); NAN unless M > 0 and finite. */
double ljp_estimate_D25_m2_s(double M_g_mol);

/* The mobility of a charged ion: the data's when it has one, else
 * estimated from its molar mass, else the wide bound.  ref may be NULL
 * (then no source pointer for estimates).  Always fills *m for z != 0;
 * returns -1 (with m->D25_m2_s NAN) only for a neutral species. */
int ljp_mobility_of(const refdb *ref, const rd_ion *ion, ljp_mobility *m);

typedef struct ljp_species {
	const rd_ion *ion;      /* the refdb's */
	jn_ion x;               /* symbol, z, D at t_C, pip_mM, bath_mM (conc. or activity) */
	ljp_mobility mob;
	double share_mV;        /* its share of the Henderson LJP (they add up to it) */
	double eff_lo_mV;       /* its effect on the Henderson LJP at the low and */
	double eff_hi_mV;       /* high ends of its mobility (signed, mV) */
	double width_share;     /* its fraction of the summed interval width, 0..1 */
} ljp_species;

typedef struct ljp_model_run {
	int asked, ok;
	double ljp_mV;          /* when ok */
	double lo_mV, hi_mV;    /* its interval, when ok */
	char why[IM_ERRLEN];    /* one line, when asked and not ok */
} ljp_model_run;

typedef struct ljp_result {
	double t_C;
	int activities;         /* 1: from activities, 0: concentrations */
	ljp_species *sp;        /* charged species present on either side; owned */
	int n;
	int identical;          /* every species the same on both sides: LJP 0 */
	double henderson_mV, henderson_lo_mV, henderson_hi_mV;
	ljp_model_run model[LJP_NMODELS];
	int main_model;         /* the model whose value is "the" LJP */
	double ljp_mV, lo_mV, hi_mV; /* that value and its interval */
	int models_asked, models_ok;
	double spread_mV;       /* largest - smallest over the models that gave a
				 * value; NAN when fewer than two did */
	df_report diffusion;    /* when the diffusion model ran and gave a value */
	int count[4];           /* species by class, index RD_MOB_* (0 unused) */
	int driver;             /* index into sp of the largest contributor to the
				 * interval's width, -1 when the width is 0 */
	double driver_share;    /* its fraction of the width, 0..1 */
	double wc_example_cmd_mV, wc_example_true_mV; /* whole-cell: -70 -> true Vm */
	double io_example_cmd_mV, io_example_true_mV; /* inside-out: +70 -> true Vm */
	char **caution;         /* whole one-line cautions; owned */
	int ncaution;
} ljp_result;

/* The junction of pip | bath (computed states; activities when act) at
 * t_C with the models in `models` (LJP_BIT set, not 0); main_model is
 * Henderson unless exactly one other model is asked.  pip_name and
 * bath_name are for the cautions.  A model that fails is recorded with
 * its reason; only these are errors (-1 with err, r then empty): a side
 * without charged ions, more than JN_MAX_IONS species, input the
 * Henderson equation rejects, or the one model asked failing. */
int ljp_compute(const refdb *ref, const sol_state *pip, const sol_state *bath, int act,
		double t_C, int models, const char *pip_name, const char *bath_name,
		ljp_result *r, char *err);
void ljp_free(ljp_result *r);

/* The Henderson LJP of a pair with its range from the mobility
 * uncertainties (ljp_compute with the Henderson model alone), mV, bath
 * relative to pipette; lo_mV / hi_mV may be NULL.  The one way solutions
 * become a junction for `correct for`, `erev corrected`, `review`, sweeps
 * and NWB records.  -1 with err as ljp_compute. */
int ljp_pair_mV(const sol_state *pip, const sol_state *bath, int act, double t_C,
		double *ljp_mV, double *lo_mV, double *hi_mV, char *err);

/* The ranked breakdown as text: the ions whose |share| is at least
 * LJP_RANK_MIN_FRAC of the largest (at most LJP_RANK_MAX lines), largest
 * first, each with a bar scaled to its share (right of the axis for
 * positive, left for negative), then the rest summed in one line.  Every
 * line starts with `indent`.  Returns a malloc'd string (caller frees). */
#define LJP_RANK_MAX 8
#define LJP_RANK_MIN_FRAC 0.02
#define LJP_BAR_WIDTH 20
char *ljp_breakdown_text(const ljp_result *r, const char *indent);

/* "measured", "from memory", "estimated" (or "none"). */
const char *ljp_class_name(int cls);

#endif
