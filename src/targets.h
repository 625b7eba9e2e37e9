/*
 * targets.h - the targets a solution holds (solution.h's sol_target): a pH
 * reached with a titrant, a free Ca2+/Mg2+ reached with a metal source, an
 * osmolality reached with a filler.  Each holds at its own temperature.
 * tg_solve gives every target's compound the amount that meets it, all
 * together (the titrant, the metal source and the filler interact: Ca2+
 * binding to a chelator frees protons, every addition moves the ionic
 * strength), by solving each in turn with the others held until no amount
 * moves.  Pure: no printing, nothing but the solution changes.
 *
 * Tolerances ("met"): pH within TG_TOL_PH; a free metal within TG_TOL_FREE
 * relative; an osmolality within TG_TOL_OSMO mOsm/kg.
 */
#ifndef IONMIX_TARGETS_H
#define IONMIX_TARGETS_H

#include <stddef.h>

#include "solution.h"

#define TG_TOL_PH 0.001
#define TG_TOL_FREE 0.001
#define TG_TOL_OSMO 0.1

/* The name of target t for messages and `targets drop`: "ph", "Ca2+",
 * "osmo" (static storage or the ion's symbol). */
const char *tg_name(const sol_target *t);
/* Its unit: "" (pH), "mM", "mOsm/kg". */
const char *tg_unit(const sol_target *t);
/* "pH 7.30 with KOH at 22.0 C" and the like, into buf (n bytes). */
void tg_describe(const sol_target *t, char *buf, size_t n);

/* Find the target named name (as tg_name gives, also "Ca" for "Ca2+",
 * "pH"); its index or -1. */
int tg_find(const solution *s, const char *name);

/* Put t on s, replacing a target of the same name, and solve all the
 * targets of s (tg_solve).  -1 with err (naming the target and the
 * reason) when they cannot all be met; s may then be partly changed (the
 * caller restores its copy). */
int tg_set(solution *s, const sol_target *t, const sol_env *env, char *err);

/* Drop target idx; the amount of its compound stays as it is. */
void tg_drop(solution *s, int idx);

/* Solve every target of s jointly under env (env->t_C is not used: each
 * target holds at its own at_C); the amounts of their compounds change.
 * 0 when all are met; -1 with err naming the first that cannot be met
 * and why.  Without targets: 0, nothing done. */
int tg_solve(solution *s, const sol_env *env, char *err);

/* The value target t has in s now (pH, free mM, mOsm/kg) at its own
 * temperature, into *now; *met = 1 when within the tolerance.  -1 with
 * err when the solution cannot be computed. */
int tg_check(const solution *s, const sol_target *t, const sol_env *env, double *now,
	     int *met, char *err);

/* The compound c is the one target of s adds; its index, or -1. */
int tg_of_compound(const solution *s, const rd_compound *c);

#endif
