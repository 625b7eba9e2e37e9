/*
 * units.h - numbers and amounts as typed and printed.
 *
 * The program never sets LC_NUMERIC, so strtod and printf use a dot
 * whatever the user's locale; these functions add strict validation.
 */
#ifndef IONMIX_UNITS_H
#define IONMIX_UNITS_H

#include <stddef.h>

/* Largest amount ionmix accepts, mM (5 M: beyond it no model here holds). */
#define UNITS_MAX_mM 5000.0

/* Digits a typed number may have (before its exponent). */
#define UNITS_DIGITS_MAX 32
/* Volumes units_volume_mL takes, mL: 1 uL to 100 L. */
#define UNITS_VOLUME_MIN_mL 1e-3
#define UNITS_VOLUME_MAX_mL 100000.0

/* Parse a plain decimal number ('140', '-70.5', '1e-3').  Rejects empty
 * strings, trailing characters and hex ("not a number"), NaN and infinity
 * in any spelling, '-nan' too ("not a finite number"), more than
 * UNITS_DIGITS_MAX digits ("too many digits"), and values whose size is
 * beyond DBL_MAX, subnormal, or a nonzero that rounds to 0 ("out of
 * range").  '-0' gives 0.  Messages quote the word cut at a character
 * boundary.  0 or -1 + err. */
int units_number(const char *s, double *v, char *err);

/* Bounds check of a parsed number: 0 when lo <= v <= hi, else -1 with
 * "WHAT TEXT UNIT is outside LO to HI UNIT" (text is the word as typed,
 * unit may be NULL).  For handlers: one line after units_number. */
int units_in_range(const char *text, double v, double lo, double hi,
		   const char *what, const char *unit, char *err);

/* Parse an amount: num is the number, unit may be NULL (then mM), or the
 * number may carry its unit ('140mM', '100nM').  Units: M, mM, uM, µM, nM,
 * g/L, mg/mL, mg/L, % (w/v: g per 100 mL) (the last four need fw_g_mol > 0).  The result must be > 0 and
 * at most UNITS_MAX_mM.  what names the thing for messages. */
int units_amount_mM(const char *num, const char *unit, double fw_g_mol,
		    double *mM, char *err);

/* Is s a concentration unit word that units_amount_mM takes? */
int units_is_unit(const char *s);

/* Volume: num with optional unit mL (default), L, uL, µL, from
 * UNITS_VOLUME_MIN_mL (1 uL) to UNITS_VOLUME_MAX_mL (100 L). */
int units_volume_mL(const char *num, const char *unit, double *mL, char *err);

/* Format a concentration given in mM with a fitting unit (M, mM, uM, nM
 * or pM; µM when utf8), 4 significant digits: "140 mM", "98.2 nM".  The
 * unit switches at the same places for every quantity: >= 1 M, >= 0.1 mM,
 * >= 0.1 uM, >= 0.1 nM, else pM. */
void units_fmt_conc(char *buf, size_t n, double mM, int utf8);

/* Digits a number deserves, for units_fmt_num: UNITS_SIG(n) significant
 * digits (a concentration, a mass), UNITS_DEC(n) decimals after the point
 * (a potential to 0.1 mV, a pH to 0.01). */
#define UNITS_SIG(n) (n)
#define UNITS_DEC(n) (-1 - (n))

/* The one number formatter: v with `digits` (UNITS_SIG or UNITS_DEC), a
 * dot whatever the locale, no exponent for ordinary magnitudes, never
 * "-0" or "-0.00" (a value that rounds to zero prints unsigned), "-" for
 * a value that is not finite. */
void units_fmt_num(char *buf, size_t n, double v, int digits);

/* printf's "%.*f" of v with dec decimals ("%+.*f" when plus), the same
 * bytes, "-0.00" included, for prose that prints a number as printf
 * would; quicker than printf for ordinary values. */
void units_fmt_fixed(char *buf, size_t n, double v, int dec, int plus);

/* Format v with `sig` significant digits, no exponent for ordinary
 * magnitudes (1e-4 to 1e7), trailing zeros after the point dropped. */
void units_fmt_sig(char *buf, size_t n, double v, int sig);

#endif
