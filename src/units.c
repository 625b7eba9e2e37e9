/*
 * units.c - strict number and amount parsing, unit-aware formatting.
 */
#include "units.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "common.h"
#include "output.h"

/* Length of the leading part of s made of number characters. */
static size_t number_span(const char *s)
{
	size_t i = 0;
	if (s[i] == '+' || s[i] == '-')
		i++;
	while ((s[i] >= '0' && s[i] <= '9') || s[i] == '.')
		i++;
	if ((s[i] == 'e' || s[i] == 'E') && i > 0 &&
	    ((s[i + 1] >= '0' && s[i + 1] <= '9') ||
	     ((s[i + 1] == '+' || s[i + 1] == '-') && s[i + 2] >= '0' && s[i + 2] <= '9'))) {
		i += 2;
		while (s[i] >= '0' && s[i] <= '9')
			i++;
	}
	return i;
}

/* 1 when s (after an optional sign) spells a NaN or an infinity as
 * strtod would read it: such a word is a number, just not a usable one. */
static int nonfinite_word(const char *s)
{
	if (*s == '+' || *s == '-')
		s++;
	if ((*s >= '0' && *s <= '9') || *s == '.') /* each spelling starts with a letter */
		return 0;
	return im_strcaseeq(s, "nan") || im_strcaseeq(s, "inf") ||
	       im_strcaseeq(s, "infinity") || strncasecmp(s, "nan(", 4) == 0;
}

/* Powers of ten that a double holds exactly. */
static const double pow10_exact[] = {
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
};

/* The value of s[0..n) when it is a plain decimal of at most 15 digits
 * and 22 after the point ('140', '-0.05'): the digits as an integer
 * (exact below 2^53) divided by a power of ten (exact up to 1e22) is one
 * correctly rounded division, the value strtod gives (Clinger's fast
 * path).  0 for anything else, which strtod reads. */
static int plain_decimal(const char *s, size_t n, double *v)
{
	unsigned long long m = 0;
	int nd = 0, frac = -1, neg = 0;
	size_t i = 0;
#if !defined(FLT_EVAL_METHOD) || FLT_EVAL_METHOD != 0
	return 0; /* wider intermediates would round twice */
#endif
	if (s[0] == '+' || s[0] == '-')
		neg = s[i++] == '-';
	for (; i < n; i++) {
		if (s[i] == '.' && frac < 0) {
			frac = 0;
			continue;
		}
		if (s[i] < '0' || s[i] > '9' || ++nd > 15)
			return 0;
		m = m * 10 + (unsigned)(s[i] - '0');
		if (frac >= 0)
			frac++;
	}
	if (nd == 0 || frac > 22)
		return 0;
	*v = frac > 0 ? (double)m / pow10_exact[frac] : (double)m;
	if (neg)
		*v = -*v;
	return 1;
}

int units_number(const char *s, double *v, char *err)
{
	char w[48];
	char *end;
	size_t n = number_span(s), ndig = 0, mant;
	int nonzero = 0;
	double x;
	mant = strcspn(s, "eE");
	if (mant > n)
		mant = n;
	for (size_t i = 0; i < mant; i++)
		if (s[i] >= '0' && s[i] <= '9') {
			ndig++;
			nonzero |= s[i] != '0';
		}
	if (nonfinite_word(s))
		return im_fail(err, "'%s' is not a finite number: give a value",
			       out_clip(w, sizeof w, s));
	if (ndig > UNITS_DIGITS_MAX)
		return im_fail(err, "'%s' has too many digits (%zu; at most %d)",
			       out_clip(w, sizeof w, s), ndig, UNITS_DIGITS_MAX);
	if (n == 0 || ndig == 0 || s[n] != '\0')
		return im_fail(err, "'%s' is not a number", out_clip(w, sizeof w, s));
	if (!plain_decimal(s, n, &x)) {
		x = strtod(s, &end);
		if (end != s + n)
			return im_fail(err, "'%s' is not a number", out_clip(w, sizeof w, s));
	}
	if (!isfinite(x) || (x != 0 && fabs(x) < DBL_MIN) || (x == 0 && nonzero))
		return im_fail(err, "'%s' is out of range: a number's size must be 0 or "
			       "between %.1e and %.1e", out_clip(w, sizeof w, s), DBL_MIN, DBL_MAX);
	*v = x == 0 ? 0.0 : x; /* '-0' is 0: nothing prints "-0.0" */
	return 0;
}

int units_in_range(const char *text, double v, double lo, double hi,
		   const char *what, const char *unit, char *err)
{
	char w[48];
	if (v >= lo && v <= hi)
		return 0;
	out_clip(w, sizeof w, text);
	return im_fail(err, "%s %s%s%s is outside %g to %g%s%s", what, w, unit ? " " : "",
		       unit ? unit : "", lo, hi, unit ? " " : "", unit ? unit : "");
}

typedef struct unit_def {
	const char *name;
	double to_mM;   /* multiply by this (molar units) */
	int per_mass;   /* 1: value is g/L times to_mM, needs a formula weight */
} unit_def;

/* Add a row to accept another unit; names are case-sensitive (mM vs MM). */
static const unit_def units[] = {
	{"M", 1000.0, 0},     {"mM", 1.0, 0},      {"uM", 1e-3, 0},
	{"\xc2\xb5M", 1e-3, 0}, {"\xce\xbcM", 1e-3, 0}, {"nM", 1e-6, 0},
	{"g/L", 1.0, 1},      {"mg/mL", 1.0, 1},   {"mg/L", 1e-3, 1},
	{"%", 10.0, 1}, /* w/v: 1 g per 100 mL = 10 g/L (common practice) */
};

static const unit_def *find_unit(const char *s)
{
	for (size_t i = 0; i < IM_COUNT(units); i++)
		if (strcmp(units[i].name, s) == 0)
			return &units[i];
	return NULL;
}

int units_is_unit(const char *s)
{
	return find_unit(s) != NULL;
}

int units_amount_mM(const char *num, const char *unit, double fw_g_mol,
		    double *mM, char *err)
{
	char buf[64];
	double v;
	const unit_def *u;
	size_t n = number_span(num);
	if (!unit && n > 0 && num[n] != '\0' && strpbrk(num, "0123456789") &&
	    strpbrk(num, "0123456789") < num + n) { /* '140mM' */
		if (n >= sizeof buf)
			return units_number(num, &v, err) ? -1 :
			       im_fail(err, "'%.40s' is not an amount", num);
		memcpy(buf, num, n);
		buf[n] = '\0';
		unit = num + n;
		num = buf;
	}
	if (units_number(num, &v, err))
		return -1;
	u = find_unit(unit ? unit : "mM");
	if (!u)
		return im_fail(err, "unknown unit '%.20s' (use M, mM, uM, nM, g/L, mg/mL, mg/L or %% (w/v))",
			       unit);
	if (v <= 0)
		return im_fail(err, "amount %s %s: must be greater than zero", num,
			       unit ? unit : "mM");
	if (u->per_mass) {
		if (!(fw_g_mol > 0))
			return im_fail(err, "unit %s needs a formula weight", u->name);
		v = v * u->to_mM / fw_g_mol * 1000.0; /* g/L / (g/mol) = mol/L */
	} else {
		v *= u->to_mM;
	}
	if (v > UNITS_MAX_mM)
		return im_fail(err, "amount %s %s is beyond %g M, more than any solution holds",
			       num, unit ? unit : "mM", UNITS_MAX_mM / 1000.0);
	if (v < 1e-9)
		return im_fail(err, "amount %s %s is below 1 fM, too small to mean anything",
			       num, unit ? unit : "mM");
	*mM = v;
	return 0;
}

int units_volume_mL(const char *num, const char *unit, double *mL, char *err)
{
	double v, f = 1.0;
	if (units_number(num, &v, err))
		return -1;
	if (!unit || strcmp(unit, "mL") == 0 || strcmp(unit, "ml") == 0)
		f = 1.0;
	else if (strcmp(unit, "L") == 0 || strcmp(unit, "l") == 0)
		f = 1000.0;
	else if (strcmp(unit, "uL") == 0 || strcmp(unit, "\xc2\xb5L") == 0)
		f = 1e-3;
	else
		return im_fail(err, "unknown volume unit '%.20s' (use mL, L or uL)", unit);
	v *= f;
	if (v <= 0)
		return im_fail(err, "volume %s must be greater than zero", num);
	if (v > UNITS_VOLUME_MAX_mL)
		return im_fail(err, "volume %s %s is over 100 L", num, unit ? unit : "mL");
	if (v < UNITS_VOLUME_MIN_mL)
		return im_fail(err, "volume %s %s is under 1 uL, too small to weigh or pipette",
			       num, unit ? unit : "mL");
	*mL = v;
	return 0;
}

/* snprintf(buf, n, "%.*f", dec, v), the same bytes, without printf's
 * arbitrary-precision machinery when that is not needed: the exact value
 * |v| 10^dec lies within half an ulp of its double product x, so where
 * x's fraction is further than two ulps from one half, rounding x to the
 * nearest integer rounds the exact value the same way.  Anything else
 * (near a tie, too large, not finite, too many decimals) goes to snprintf,
 * which rounds the exact binary value, except an exact tie (the product
 * exact, fma says): printf rounds it to even.  Returns what snprintf
 * returns. */
static int fmt_fixed(char *buf, size_t n, double v, int dec)
{
	char dig[32];
	double a = fabs(v), x, fl, f;
	unsigned long long m;
	int nd = 0, len, neg = signbit(v) != 0;
	if (!isfinite(v) || dec < 0 || dec >= (int)IM_COUNT(pow10_exact) ||
	    !((x = a * pow10_exact[dec]) < 4503599627370496.0)) /* 2^52 */
		return snprintf(buf, n, "%.*f", dec, v);
	fl = floor(x);
	f = x - fl; /* exact: x < 2^52 */
	m = (unsigned long long)fl;
	if (fabs(f - 0.5) > x * 4.5e-16)
		m += f > 0.5;
	else if (f == 0.5 && fma(a, pow10_exact[dec], -x) == 0)
		m += m & 1; /* an exact tie (154.25 to 1 decimal): to even, as printf */
	else
		return snprintf(buf, n, "%.*f", dec, v);
	do {
		dig[nd++] = (char)('0' + m % 10);
		m /= 10;
	} while (m);
	while (nd <= dec) /* at least one digit before the point */
		dig[nd++] = '0';
	len = neg + nd + (dec > 0);
	if ((size_t)len >= n)
		return snprintf(buf, n, "%.*f", dec, v);
	char *p = buf;
	if (neg)
		*p++ = '-';
	for (int i = nd - 1; i >= dec; i--)
		*p++ = dig[i];
	if (dec > 0)
		*p++ = '.';
	for (int i = dec - 1; i >= 0; i--)
		*p++ = dig[i];
	*p = '\0';
	return len;
}

void units_fmt_fixed(char *buf, size_t n, double v, int dec, int plus)
{
	if (plus && n > 1 && !signbit(v)) { /* "+nan" and "+inf" too, as printf */
		buf[0] = '+';
		buf++;
		n--;
	}
	fmt_fixed(buf, n, v, dec);
}

/* floor(log10(a)) for 1e-4 <= a < 1e7, as that expression gives it: by
 * comparison with the powers of ten, and by log10 itself within a
 * millionth of one, where its rounding decides. */
static int decade(double a)
{
	static const double lo[] = {1e-4, 1e-3, 1e-2, 1e-1, 1e0, 1e1, 1e2, 1e3,
				    1e4, 1e5, 1e6, 1e7};
	int e = 0;
	while (e + 1 < (int)IM_COUNT(lo) && a >= lo[e + 1])
		e++;
	if (a < lo[e] * 1.000001 || (e + 1 < (int)IM_COUNT(lo) && a > lo[e + 1] * 0.999999))
		return (int)floor(log10(a));
	return e - 4;
}

void units_fmt_sig(char *buf, size_t n, double v, int sig)
{
	double a = fabs(v);
	int dec, len;
	if (v == 0 || !isfinite(v)) {
		snprintf(buf, n, isfinite(v) ? "0" : "-");
		return;
	}
	if (a >= 1e7 || a < 1e-4) {
		snprintf(buf, n, "%.*g", sig, v);
		return;
	}
	dec = sig - 1 - decade(a);
	if (dec < 0)
		dec = 0;
	len = fmt_fixed(buf, n, v, dec);
	if (dec > 0) { /* strip trailing zeros, and a bare point */
		char *p = buf + (len >= 0 && (size_t)len < n ? (size_t)len : strlen(buf)) - 1;
		while (*p == '0')
			*p-- = '\0';
		if (*p == '.')
			*p = '\0';
	}
}

void units_fmt_num(char *buf, size_t n, double v, int digits)
{
	int dec;
	if (digits > 0) {
		units_fmt_sig(buf, n, v, digits);
	} else if (!isfinite(v)) {
		snprintf(buf, n, "-");
	} else {
		dec = -1 - digits;
		fmt_fixed(buf, n, v, dec);
	}
	/* a negative value that rounds to zero prints as zero */
	if (buf[0] == '-' && buf[1] != '\0') {
		size_t z = strspn(buf + 1, "0."), rest = strlen(buf + 1);
		if (z == rest)
			memmove(buf, buf + 1, rest + 1);
	}
}

void units_fmt_conc(char *buf, size_t n, double mM, int utf8)
{
	char num[48];
	const char *u = "mM";
	double v = mM;
	if (fabs(mM) >= 1000) {
		v = mM / 1000;
		u = "M";
	} else if (fabs(mM) < 1e-7 && mM != 0) {
		v = mM * 1e9;
		u = "pM";
	} else if (fabs(mM) < 1e-4 && mM != 0) {
		v = mM * 1e6;
		u = "nM";
	} else if (fabs(mM) < 0.1 && mM != 0) {
		v = mM * 1e3;
		u = utf8 ? "\xc2\xb5M" : "uM";
	}
	units_fmt_sig(num, sizeof num, v, 4);
	snprintf(buf, n, "%s %s", num, u);
}
