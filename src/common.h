/*
 * common.h - constants, error-buffer convention and the one allocation
 * helper shared by every ionmix module.
 *
 * Conventions (see DEVELOPERS.md):
 *  - Functions that can fail return int: 0 on success, -1 on failure, and
 *    write a one-line message (no trailing newline) into a caller-owned
 *    buffer `char *err` of size IM_ERRLEN.  Only main() exits.
 *  - Units are in names or comments: _mM (mmol/L == mol/m3), _mV, _C
 *    (degrees Celsius), _K (kelvin), _m2_s (m^2/s), _g_mol, _mL, _g.
 */
#ifndef IONMIX_COMMON_H
#define IONMIX_COMMON_H

#include <stddef.h>
#include <string.h>

/* CODATA 2018 exact values. */
#define IM_FARADAY_C_MOL 96485.33212     /* F, C/mol */
#define IM_GAS_J_MOL_K 8.314462618       /* R, J/(mol K) */
#define IM_ZERO_C_K 273.15               /* 0 degrees C in kelvin */
#define IM_BOLTZMANN_J_K 1.380649e-23    /* k_B, J/K */
#define IM_AVOGADRO_MOL 6.02214076e23    /* N_A, 1/mol */
#define IM_CHARGE_C 1.602176634e-19      /* e, C */

/* Room for any one-line message, synopses of the longest commands included. */
#define IM_ERRLEN 1024

/* RT/F in mV at temperature t_C (25.6926 mV at 25 C). */
double im_rt_f_mV(double t_C);

/* printf-style write into a caller-owned error buffer; always returns -1
 * so that `return im_fail(err, "...")` reads naturally. err may be NULL. */
int im_fail(char *err, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

/* Allocation that never returns NULL: on out-of-memory it prints one line
 * to stderr and exits with status 3 (the only exit outside main, because
 * there is no sensible recovery).  Caller owns and frees the memory. */
void *im_xmalloc(size_t n);
void *im_xcalloc(size_t count, size_t size);
void *im_xrealloc(void *p, size_t n);
char *im_xstrdup(const char *s);

/* Case-insensitive ASCII string compare, locale-independent. */
int im_strcaseeq(const char *a, const char *b);
/* a and b equal, for the scans of a table by symbol: the first byte
 * settles most comparisons, so few reach strcmp (in the fuzz build each
 * strcmp call is also traced by libFuzzer, and the scans of speciation
 * and of the Pitzer tables took 6 % of a run of scripts). */
static inline int im_symeq(const char *a, const char *b)
{
	return a[0] == b[0] && strcmp(a, b) == 0;
}

#define IM_COUNT(a) (sizeof(a) / sizeof((a)[0]))

#endif
