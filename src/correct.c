/*
 * correct.c - streaming LJP correction of voltage columns in CSV/TSV files.
 *
 * One pass over a fixed read buffer: unchanged bytes are written as spans
 * straight from it (memcpy into a fixed write buffer), corrected numbers are
 * formatted by hand from integer arithmetic.  A field that runs past the end
 * of the buffer is rescanned after the buffer is refilled with that field at
 * its start; CORR_FIELD_MAX bounds how much is kept.  The rules are in
 * correct.h.
 *
 * Two loops share that state.  fast_run takes plain records (no quoted
 * field, no NUL, inside the buffer) as many as come in a row: fields are
 * found from a bitmask of the separators, 64 bytes at a time (seps), and
 * the common cell is corrected in decimal on its digit bytes (quick_parse,
 * quick_emit), else with plain_fast and fix_plain; at anything else it
 * stops at the start of a field and the general per-field loop in run()
 * (scan, do_cell) takes over, and hands back at the next record.  Both
 * write the same bytes (test_fast_path_same).  With one corrected
 * column fast_run first tries one_run, leaner still for the commonest
 * records (a short plain number, lean_cell), each looked at whole before
 * a byte of it is written (test_one_column_same).  Past
 * one write buffer of output a writer thread writes full buffers while
 * the next one fills, and a full read buffer is cut in two for a helper
 * thread that does the second half (par_start; test_parallel_same).
 */
#include "correct.h"

#ifdef __SSE2__
#include <emmintrin.h>
#endif
#if defined(__x86_64__) && defined(__linux__) && (defined(__GNUC__) || defined(__clang__))
#include <immintrin.h>
#endif

#include <errno.h>
#include <sched.h>
#include <pthread.h>
#include <signal.h>
#include <stdarg.h>
#include <stddef.h>
#include <time.h>
#include <limits.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "common.h"
#include "fileio.h"
#include "signals.h"
#include "version.h"

#define RD_CHUNK (512 * 1024)                  /* at least this much per read */
#define RD_CAP (RD_CHUNK + CORR_FIELD_MAX + 64) /* read buffer (+1 sentinel) */
#define RD_SLACK 96                             /* readable bytes past the sentinel */
#define RD_GAP (CORR_FIELD_MAX + 64)            /* room before read-ahead data for what is kept */
#define RD_ALLOC (RD_GAP + RD_CAP + 1 + RD_SLACK) /* a read buffer's allocation */
#define WR_CAP (2 * RD_CHUNK)                  /* write buffer: a thread's share of a read buffer fits */
#define NUM_OUT_MAX (CORR_DIGITS_MAX + 24)      /* one formatted number */
#define COL_NUMBER_MAX 1000000                  /* largest column number taken */
/* the one message for a number fix_num refuses (corr_cell and the stream) */
#define TOO_MANY_DIGITS                                                                  \
	"number with more than %d digits once aligned or corrected; cannot correct it exactly"

_Static_assert(RD_CAP > CORR_FIRST_MAX + 64, "first record must fit the buffer");
_Static_assert(CORR_DIGITS_MAX >= 19, "fast path needs 18 digits");

static const uint64_t pow10_u64[19] = {
	1ULL, 10ULL, 100ULL, 1000ULL, 10000ULL, 100000ULL, 1000000ULL,
	10000000ULL, 100000000ULL, 1000000000ULL, 10000000000ULL,
	100000000000ULL, 1000000000000ULL, 10000000000000ULL,
	100000000000000ULL, 1000000000000000ULL, 10000000000000000ULL,
	100000000000000000ULL, 1000000000000000000ULL,
};

/* ---- numbers ---------------------------------------------------------- */

/* A number as written in a cell. */
typedef struct num {
	const char *ns, *ne;  /* the number, blanks excluded */
	const char *ip;       /* integer digits, ni of them */
	const char *fp;       /* fraction digits, nf of them */
	const char *ep, *epe; /* exponent text ("e-3"), kept verbatim; empty if none */
	uint64_t val;         /* the ni + nf digits as an integer, when <= 18 */
	int ni, nf, exp;
	int neg, plus, dot;
} num;

/* The LJP prepared for one column: magnitude, sign, digit count, and the
 * decimals it has in the column's unit (k0 = decimals - unit_exp). */
typedef struct ljp_prep {
	uint64_t mag;
	int neg, ndig, k0;
	int flip;   /* 1: the result is negated (inside-out, cell-attached) */
	uint64_t bn[19]; /* for a plain cell with nf decimals: mag aligned to
			  * them, mag * 10^(nf - k0); UINT64_MAX when nf < k0
			  * or that has more than 18 digits (see fix_plain) */
	uint64_t lanes[8]; /* bn[nf] one decimal digit a byte, the last
			    * lowest (see quick_emit); UINT64_MAX when it
			    * has more than 7 digits or nf < k0 */
	uint64_t dlanes[8]; /* lanes[nf] with a lane of 0 for the dot above
			     * the nf decimals (see lean_cell); UINT64_MAX
			     * when that takes more than 7 lanes */
} ljp_prep;

static int is_digit(int c)
{
	return c >= '0' && c <= '9';
}

/* Parse s[0..e) as [blanks] [+-] digits [. digits] [e [+-] digits] [blanks].
 * Blanks: space, CR, and tab when tab_blank.  Returns 0 for a number, 1 for
 * an empty or blank cell, -1 for anything else. */
static int parse_num(const char *s, const char *e, int tab_blank, num *m)
{
	const char *p = s, *q = e;
	while (p < q && (*p == ' ' || (*p == '\t' && tab_blank)))
		p++;
	while (q > p && (q[-1] == ' ' || q[-1] == '\r' || (q[-1] == '\t' && tab_blank)))
		q--;
	if (p == q)
		return 1;
	m->ns = p;
	m->ne = q;
	m->neg = m->plus = m->dot = 0;
	if (*p == '-') {
		m->neg = 1;
		p++;
	} else if (*p == '+') {
		m->plus = 1;
		p++;
	}
	uint64_t v = 0;
	m->ip = p;
	while (p < q && is_digit((unsigned char)*p))
		v = v * 10 + (uint64_t)(*p++ - '0');
	m->ni = (int)(p - m->ip);
	m->fp = p;
	m->nf = 0;
	if (p < q && *p == '.') {
		m->dot = 1;
		m->fp = ++p;
		while (p < q && is_digit((unsigned char)*p))
			v = v * 10 + (uint64_t)(*p++ - '0');
		m->nf = (int)(p - m->fp);
	}
	m->val = v;   /* wraps past 19 digits; used only up to 18 */
	if (m->ni + m->nf == 0)
		return -1;
	m->ep = m->epe = p;
	m->exp = 0;
	if (p < q && (*p == 'e' || *p == 'E')) {
		int sign = 1, ev = 0;
		const char *d;
		p++;
		if (p < q && (*p == '+' || *p == '-'))
			sign = *p++ == '-' ? -1 : 1;
		d = p;
		while (p < q && is_digit((unsigned char)*p)) {
			if (p - d >= 5)
				return -1;
			ev = ev * 10 + (*p++ - '0');
		}
		if (p == d)
			return -1;
		m->exp = sign * ev;
		m->epe = p;
	}
	return p == q ? 0 : -1;
}

static int ndigits_u64(uint64_t u)
{
	int n = 1;
	while (u >= 10) {
		u /= 10;
		n++;
	}
	return n;
}

/* Print a result: sign, digits dg[0..nd) (no leading zeros; nd 0 for zero)
 * with D decimals, in the style of the input m, then its exponent text. */
static int emit(char *out, const char *dg, int nd, int D, int neg, const num *m)
{
	char *o = out;
	if (neg)
		*o++ = '-';
	else if (m->plus)
		*o++ = '+';
	if (nd > D) {
		memcpy(o, dg, (size_t)(nd - D));
		o += nd - D;
	} else if (m->ni > 0 || D == 0) {
		*o++ = '0';
	}
	if (D > 0) {
		*o++ = '.';
		if (nd < D) {
			memset(o, '0', (size_t)(D - nd));
			o += D - nd;
			memcpy(o, dg, (size_t)nd);
			o += nd;
		} else {
			memcpy(o, dg + nd - D, (size_t)D);
			o += D;
		}
	} else if (m->dot) {
		*o++ = '.';
	}
	memcpy(o, m->ep, (size_t)(m->epe - m->ep));
	o += m->epe - m->ep;
	return (int)(o - out);
}

/* Little-endian decimal digits, for numbers past 18 digits. */
typedef struct big {
	unsigned char d[CORR_DIGITS_MAX + 2];
	int n;
} big;

static int big_cmp(const big *a, const big *b)
{
	if (a->n != b->n)
		return a->n < b->n ? -1 : 1;
	for (int i = a->n - 1; i >= 0; i--)
		if (a->d[i] != b->d[i])
			return a->d[i] < b->d[i] ? -1 : 1;
	return 0;
}

static void big_trim(big *a)
{
	while (a->n > 0 && a->d[a->n - 1] == 0)
		a->n--;
}

/* r = a + b (magnitudes); r may be a. */
static void big_add(big *r, const big *a, const big *b)
{
	int n = a->n > b->n ? a->n : b->n, carry = 0;
	for (int i = 0; i < n; i++) {
		int s = (i < a->n ? a->d[i] : 0) + (i < b->n ? b->d[i] : 0) + carry;
		r->d[i] = (unsigned char)(s % 10);
		carry = s / 10;
	}
	if (carry)
		r->d[n++] = (unsigned char)carry;
	r->n = n;
	big_trim(r);
}

/* r = a - b, a >= b (magnitudes); r may be a. */
static void big_sub(big *r, const big *a, const big *b)
{
	int borrow = 0;
	for (int i = 0; i < a->n; i++) {
		int s = a->d[i] - (i < b->n ? b->d[i] : 0) - borrow;
		borrow = s < 0;
		r->d[i] = (unsigned char)(s + (borrow ? 10 : 0));
	}
	r->n = a->n;
	big_trim(r);
}

/* Fill a from the digit string s[0..n) followed by z zeros. */
static void big_set(big *a, const char *s, int n, int z)
{
	int k = 0;
	for (int i = 0; i < z; i++)
		a->d[k++] = 0;
	for (int i = n - 1; i >= 0; i--)
		a->d[k++] = (unsigned char)(s[i] - '0');
	a->n = k;
	big_trim(a);
}

static void ljp_prepare(const corr_ljp *l, int unit_exp, ljp_prep *lp)
{
	lp->flip = 0;
	lp->neg = l->scaled < 0;
	lp->mag = (uint64_t)(lp->neg ? -l->scaled : l->scaled);
	lp->ndig = ndigits_u64(lp->mag);
	lp->k0 = l->decimals - unit_exp;
	for (int nf = 0; nf < 19; nf++) {
		int z = nf - lp->k0;
		lp->bn[nf] = z < 0 || lp->ndig + z > 18 ? UINT64_MAX : lp->mag * pow10_u64[z];
		if (nf < 8) {
			lp->lanes[nf] = UINT64_MAX;
			if (z >= 0 && lp->ndig + z <= 7) {
				uint64_t v = lp->bn[nf], l = 0;
				for (int i = 0; v; i++, v /= 10)
					l |= (v % 10) << (8 * i);
				lp->lanes[nf] = l;
			}
			lp->dlanes[nf] = UINT64_MAX;
			if (nf > 0 && z >= 0 && lp->ndig + z <= 6) {
				uint64_t l = lp->lanes[nf], low = (1ULL << (8 * nf)) - 1;
				lp->dlanes[nf] = (l & low) | ((l & ~low) << 8);
			}
		}
	}
}

/* "00" .. "99", for writing two digits at a time. */
static const char dig2[201] =
	"00010203040506070809101112131415161718192021222324252627282930313233343536373839"
	"40414243444546474849505152535455565758596061626364656667686970717273747576777879"
	"8081828384858687888990919293949596979899";

/* Digits of u (u > 0). */
static inline int ndig_fast(uint64_t u)
{
	int bits = 64 - __builtin_clzll(u);
	int n = (bits * 1233) >> 12;   /* floor(bits * log10(2)), at most one short */
	return n + (u >= pow10_u64[n]);
}

/* Print R (magnitude) with D decimals in the style of m, then m's exponent
 * text: the layout of emit, written in place from the right two digits at
 * a time. */
static inline __attribute__((always_inline)) int emit_u64(char *out, uint64_t R, int D,
							   int neg, const num *m)
{
	size_t el = (size_t)(m->epe - m->ep);
	int nd = R ? ndig_fast(R) : 0;
	int nint = nd > D ? nd - D : (m->ni > 0 || D == 0);
	int sign = (neg && R) || m->plus;
	int len = sign + nint + (D > 0 ? D + 1 : m->dot);
	char *t = out + len;
	int i = 0;
	if (D > 0) {
		if (R <= UINT32_MAX) {
			uint32_t r32 = (uint32_t)R;
			for (; i + 2 <= D; i += 2) {
				unsigned r = r32 % 100;
				r32 /= 100;
				t -= 2;
				memcpy(t, dig2 + 2 * r, 2);
			}
			R = r32;
		}
		for (; i + 2 <= D; i += 2) {
			unsigned r = (unsigned)(R % 100);
			R /= 100;
			t -= 2;
			memcpy(t, dig2 + 2 * r, 2);
		}
		if (i < D) {
			*--t = (char)('0' + R % 10);
			R /= 10;
		}
		*--t = '.';
	} else if (m->dot) {
		*--t = '.';
	}
	if (R) {
		while (R > UINT32_MAX) {
			unsigned r = (unsigned)(R % 100);
			R /= 100;
			t -= 2;
			memcpy(t, dig2 + 2 * r, 2);
		}
		uint32_t r32 = (uint32_t)R;   /* the rest in 32-bit arithmetic */
		while (r32 >= 100) {
			unsigned r = r32 % 100;
			r32 /= 100;
			t -= 2;
			memcpy(t, dig2 + 2 * r, 2);
		}
		if (r32 >= 10) {
			t -= 2;
			memcpy(t, dig2 + 2 * r32, 2);
		} else {
			*--t = (char)('0' + r32);
		}
	} else if (nint) {
		*--t = '0';
	}
	if (sign)
		*--t = neg && nd ? '-' : '+';
	if (el)
		memcpy(out + len, m->ep, el);
	return len + (int)el;
}

/* A plain number at the start of s[0..e): [+-]digits[.digits], 1 to 18
 * digits.  Returns the byte after it (the caller checks what follows) with
 * m filled as parse_num would for a cell holding exactly it, or NULL. */
static inline const char *plain_prefix(const char *s, const char *e, num *m)
{
	const char *p = s;
	uint64_t v = 0;
	m->neg = m->plus = m->dot = 0;
	if (p < e && (*p == '-' || *p == '+')) {
		m->neg = *p == '-';
		m->plus = *p == '+';
		p++;
	}
	m->ip = p;
	while (p < e && (unsigned)(*p - '0') < 10)
		v = v * 10 + (uint64_t)(*p++ - '0');
	m->ni = (int)(p - m->ip);
	m->fp = p;
	m->nf = 0;
	if (p < e && *p == '.') {
		m->dot = 1;
		m->fp = ++p;
		while (p < e && (unsigned)(*p - '0') < 10)
			v = v * 10 + (uint64_t)(*p++ - '0');
		m->nf = (int)(p - m->fp);
	}
	if (m->ni + m->nf == 0 || m->ni + m->nf > 18)
		return NULL;
	m->val = v;
	m->ns = s;
	m->ne = p;
	m->ep = m->epe = p;
	m->exp = 0;
	return p;
}

/* The common cell, fast: exactly [+-]digits[.digits] over s[0..e) with at
 * least one and at most 18 digits, nothing else (no blanks, exponent or
 * CR).  Returns 0 with m filled as parse_num would, or -1 to let
 * parse_num decide. */
static inline int parse_plain(const char *s, const char *e, num *m)
{
	return plain_prefix(s, e, m) == e ? 0 : -1;
}

/* The corrected number for m (without blanks) at out, room NUM_OUT_MAX.
 * Returns its length, or -1 when the aligned numbers need more than
 * CORR_DIGITS_MAX digits. */
static int fix_big(const num *m, const ljp_prep *lp, char *out, int D, int za, int zb,
		   int na, int nb) __attribute__((noinline));

static inline __attribute__((always_inline)) int fix_num(const num *m, const ljp_prep *lp,
							  char *out)
{
	/* value = (digits / 10^nf) 10^exp; the LJP in the cell's unit and in
	 * units of 10^exp is mag / 10^k */
	int k = lp->k0 + m->exp;
	int D = m->nf > k ? m->nf : k;
	int za = D - m->nf, zb = D - k;
	int na = m->ni + m->nf + za, nb = lp->ndig + zb;

	if (na <= 18 && nb <= 18) {
		uint64_t A = m->val * pow10_u64[za], B = lp->mag * pow10_u64[zb];
		/* r = a - b with a = +-A, b = +-B */
		int sa = m->neg ^ lp->flip;
		if (m->neg == !lp->neg)         /* a and -b have one sign: add */
			return emit_u64(out, A + B, D, sa, m);
		if (A >= B)
			return emit_u64(out, A - B, D, sa, m);
		return emit_u64(out, B - A, D, !sa, m);
	}
	return fix_big(m, lp, out, D, za, zb, na, nb);
}

/* fix_num past 18 digits: decimal digit arithmetic. */
static int fix_big(const num *m, const ljp_prep *lp, char *out, int D, int za, int zb,
		   int na, int nb)
{
	if (na > CORR_DIGITS_MAX || nb > CORR_DIGITS_MAX)
		return -1;

	big a, b;
	char ls[24], tmp[CORR_DIGITS_MAX + 4];
	int nl = snprintf(ls, sizeof ls, "%llu", (unsigned long long)lp->mag);
	int neg;
	char digs[CORR_DIGITS_MAX + 2];
	memcpy(digs, m->ip, (size_t)m->ni);
	memcpy(digs + m->ni, m->fp, (size_t)m->nf);
	big_set(&a, digs, m->ni + m->nf, za);
	big_set(&b, ls, nl, zb);
	if (m->neg == !lp->neg) {
		big_add(&a, &a, &b);
		neg = m->neg;
	} else if (big_cmp(&a, &b) >= 0) {
		big_sub(&a, &a, &b);
		neg = m->neg;
	} else {
		big_sub(&a, &b, &a);
		neg = !m->neg;
	}
	neg ^= lp->flip;
	/* a carry into a new leading digit (9.99... + 1) may take a cell of
	 * CORR_DIGITS_MAX digits past the limit: refused like a longer cell,
	 * so that every number written can be read back (and corrected back) */
	if (a.n > CORR_DIGITS_MAX)
		return -1;
	for (int i = 0; i < a.n; i++)
		tmp[i] = (char)('0' + a.d[a.n - 1 - i]);
	return emit(out, tmp, a.n, D, neg && a.n > 0, m);
}

/* ---- the LJP and single values ---------------------------------------- */

int corr_ljp_parse(const char *s, corr_ljp *l, char *err)
{
	num m;
	size_t n = strlen(s);
	if (n == 0)
		return im_fail(err, "the LJP is empty; give it in mV, e.g. 14.2");
	if (parse_num(s, s + n, 0, &m) != 0 || m.ns != s || m.ne != s + n)
		return im_fail(err, "LJP '%.40s' is not a number (mV, e.g. 14.2)", s);
	int dec = m.nf - m.exp, scale = 0;
	if (dec < 0) {
		scale = -dec;
		dec = 0;
	}
	if (dec > CORR_LJP_DECIMALS_MAX)
		return im_fail(err, "LJP '%.40s' has more than %d decimals", s,
			       CORR_LJP_DECIMALS_MAX);
	/* digits, then 10^scale, bounded by CORR_LJP_MAX_mV * 10^dec */
	double limit = CORR_LJP_MAX_mV * (double)pow10_u64[dec];
	uint64_t v = 0;
	const char *digits[2] = {m.ip, m.fp};
	int counts[2] = {m.ni, m.nf};
	for (int part = 0; part < 2; part++)
		for (int i = 0; i < counts[part]; i++) {
			v = v * 10 + (uint64_t)(digits[part][i] - '0');
			if ((double)v > limit)
				goto range;
		}
	for (int i = 0; i < scale; i++) {
		v *= 10;
		if ((double)v > limit)
			goto range;
	}
	l->scaled = m.neg ? -(long long)v : (long long)v;
	l->decimals = dec;
	return 0;
range:
	return im_fail(err, "LJP %.40s mV is out of range (|LJP| <= %g mV)", s,
		       CORR_LJP_MAX_mV);
}

int corr_ljp_from_mV(double ljp_mV, int decimals, corr_ljp *l, char *err)
{
	if (!isfinite(ljp_mV))
		return im_fail(err, "the LJP is not a finite number");
	if (decimals < 0 || decimals > CORR_LJP_DECIMALS_MAX)
		return im_fail(err, "LJP decimals must be 0 to %d", CORR_LJP_DECIMALS_MAX);
	if (fabs(ljp_mV) > CORR_LJP_MAX_mV)
		return im_fail(err, "LJP %.6g mV is out of range (|LJP| <= %g mV)",
			       ljp_mV, CORR_LJP_MAX_mV);
	l->scaled = llround(ljp_mV * (double)pow10_u64[decimals]);
	l->decimals = decimals;
	return 0;
}

double corr_ljp_mV(const corr_ljp *l)
{
	return (double)l->scaled / (double)pow10_u64[l->decimals];
}

void corr_ljp_format(const corr_ljp *l, char *buf, size_t n)
{
	unsigned long long u = (unsigned long long)(l->scaled < 0 ? -l->scaled : l->scaled);
	unsigned long long p = pow10_u64[l->decimals];
	if (l->decimals == 0)
		snprintf(buf, n, "%s%llu", l->scaled < 0 ? "-" : "", u);
	else
		snprintf(buf, n, "%s%llu.%0*llu", l->scaled < 0 ? "-" : "", u / p,
			 l->decimals, u % p);
}

int corr_value(double mv, double ljp_mV, double *out_mV, char *err)
{
	if (!isfinite(mv) || !isfinite(ljp_mV))
		return im_fail(err, "non-finite input");
	*out_mV = mv - ljp_mV;
	return 0;
}

/* A printable preview of a cell for messages. */
static void preview(char *dst, size_t n, const char *s, size_t len)
{
	size_t k = 0;
	for (size_t i = 0; i < len && k + 4 < n; i++)
		dst[k++] = ((unsigned char)s[i] < 0x20 || s[i] == 0x7f) ? '?' : s[i];
	if (len > 0 && k + 4 >= n && k < len) {
		dst[k++] = '.';
		dst[k++] = '.';
		dst[k++] = '.';
	}
	dst[k] = '\0';
}

/* Why the cell is not a number, for messages. */
static void bad_cause(char *dst, size_t n, const char *s, size_t len)
{
	char pv[44];
	int comma = 0, digit = 0;
	for (size_t i = 0; i < len; i++) {
		comma |= s[i] == ',';
		digit |= is_digit((unsigned char)s[i]);
	}
	preview(pv, sizeof pv, s, len);
	snprintf(dst, n, "'%s' is not a number%s", pv,
		 comma && digit ? " (decimal comma? numbers are read with a dot)" : "");
}

int corr_cell(const char *s, size_t n, const corr_ljp *l, int unit_exp,
	      char *buf, size_t bufsz, size_t *len, char *err)
{
	num m;
	char nb[NUM_OUT_MAX];
	int rc = parse_num(s, s + n, 1, &m), k;
	if (rc == 1) {
		if (n + 1 > bufsz)
			return im_fail(err, "output buffer too small");
		memcpy(buf, s, n);
		buf[n] = '\0';
		*len = n;
		return 1;
	}
	if (rc < 0) {
		if (err)
			bad_cause(err, IM_ERRLEN, s, n);
		return -1;
	}
	ljp_prep lp;
	ljp_prepare(l, unit_exp, &lp);
	k = fix_num(&m, &lp, nb);
	if (k < 0)
		return im_fail(err, TOO_MANY_DIGITS, CORR_DIGITS_MAX);
	size_t pre = (size_t)(m.ns - s), post = (size_t)(s + n - m.ne);
	if (pre + (size_t)k + post + 1 > bufsz)
		return im_fail(err, "output buffer too small");
	memcpy(buf, s, pre);
	memcpy(buf + pre, nb, (size_t)k);
	memcpy(buf + pre + k, m.ne, post);
	*len = pre + (size_t)k + post;
	buf[*len] = '\0';
	return 0;
}

/* ---- voltage headers -------------------------------------------------- */

/* Voltage unit tokens: add a row to accept another spelling. */
static const struct {
	const char *tok;
	int unit_exp;   /* value in this unit = mV * 10^unit_exp */
} vunits[] = {
	{"mV", 0}, {"mv", 0}, {"V", -3}, {"v", -3}, {"uV", 3}, {"uv", 3},
	{"\xc2\xb5V", 3}, {"\xce\xbcV", 3},
};

/* Names (lower-case, alphanumerics only) that mean a voltage without a unit. */
static const char *const vnames[] = {
	"v", "vm", "vmem", "vmembrane", "voltage", "potential",
	"membranepotential", "e", "em", "vcmd", "vcommand", "vhold", "vholding",
	"vp", "vpip", "vpipette",
};

static int is_blank(int c)
{
	return c == ' ' || c == '\t' || c == '\r' || c == '\n';
}

static void trim(const char **s, const char **e)
{
	while (*s < *e && is_blank((unsigned char)**s))
		(*s)++;
	while (*e > *s && is_blank((unsigned char)(*e)[-1]))
		(*e)--;
}

/* 1 and the exponent when u[0..n) is a voltage unit token. */
static int vunit(const char *u, size_t n, int *unit_exp)
{
	for (size_t i = 0; i < IM_COUNT(vunits); i++)
		if (strlen(vunits[i].tok) == n && memcmp(vunits[i].tok, u, n) == 0) {
			*unit_exp = vunits[i].unit_exp;
			return 1;
		}
	return 0;
}

int corr_voltage_header(const char *h, size_t n, int *unit_exp, int *assumed)
{
	const char *s = h, *e = h + n, *us = NULL, *ue = NULL, *ne = e;
	int ux = 0, dummy_x, dummy_a;
	if (!unit_exp)
		unit_exp = &dummy_x;
	if (!assumed)
		assumed = &dummy_a;
	*unit_exp = 0;
	*assumed = 1;
	trim(&s, &e);
	if (s == e)
		return 0;
	ne = e;
	if (e[-1] == ')' || e[-1] == ']') {
		char open = e[-1] == ')' ? '(' : '[';
		const char *o = e - 1;
		while (o > s && o[-1] != open)
			o--;
		if (o > s) {
			us = o;
			ue = e - 1;
			ne = o - 1;
		}
	} else {
		const char *sl = NULL, *sp = NULL;
		for (const char *p = s; p < e; p++) {
			if (*p == '/')
				sl = p;
			if (*p == '_' || *p == ' ')
				sp = p;
		}
		if (sl) {
			us = sl + 1;
			ue = e;
			ne = sl;
		} else if (sp && vunit(sp + 1, (size_t)(e - sp - 1), &ux)) {
			us = sp + 1;
			ue = e;
			ne = sp;
		} else if (vunit(s, (size_t)(e - s), &ux) && ux != -3) {
			us = s;
			ue = e;
			ne = s;
		}
	}
	if (us) {
		trim(&us, &ue);
		if (!vunit(us, (size_t)(ue - us), &ux))
			return 0;
		*unit_exp = ux;
		*assumed = 0;
		return 1;
	}
	char low[CORR_NAME_MAX];
	size_t k = 0;
	for (const char *p = s; p < ne && k + 1 < sizeof low; p++) {
		int c = (unsigned char)*p;
		if (c >= 'A' && c <= 'Z')
			low[k++] = (char)(c + 'a' - 'A');
		else if ((c >= 'a' && c <= 'z') || is_digit(c))
			low[k++] = (char)c;
	}
	low[k] = '\0';
	for (size_t i = 0; i < IM_COUNT(vnames); i++)
		if (strcmp(low, vnames[i]) == 0)
			return 1;
	return strstr(low, "voltage") != NULL || strstr(low, "potential") != NULL;
}

const char *corr_delim_name(char delim)
{
	switch (delim) {
	case '\t': return "tab";
	case ';': return "semicolon";
	default: return "comma";
	}
}

/* ---- the streaming engine --------------------------------------------- */

typedef struct writer {
	pthread_t th;
	pthread_mutex_t mu;
	pthread_cond_t cv;
	int started, failed;
	int busy, quit;     /* under mu */
	const char *buf;    /* the buffer in flight, n bytes; under mu */
	size_t n;
	int werr;           /* errno of a failed write; under mu */
	FILE *out;
} writer;

typedef struct eng {
	FILE *in, *out;
	const char *name;
	const corr_opts *o;
	corr_result *r;
	char *err;
	char *buf;          /* RD_CAP + 1 (+ RD_SLACK) bytes; buf[len] is a NUL sentinel */
	size_t len;
	int eof;
	char *rd_home;      /* the read buffer from bufs_get */
	char *rd_alloc;     /* the allocation buf lies in (RD_ALLOC bytes) */
	char *ah_alloc;     /* the other read buffer (the helper's read-ahead) */
	const char *ah_data; /* read-ahead bytes not yet taken, ah_len of them */
	size_t ah_len;
	int ah_have;        /* 1: ah_data..ah_len (then ah_eof, ah_err) hold */
	int ah_eof, ah_err;
	int in_reg;         /* 1: reads never wait (a file, memory): read-ahead allowed */
	const char *span;   /* first byte of buf not yet written */
	char *wb;           /* WR_CAP bytes: the buffer being filled */
	char *wb2;          /* the other one (in flight, or free) */
	char *home_wb, *home_wb2; /* the two from bufs_get (see bufs_home) */
	char *pend;         /* written before wb (par_finish), or NULL */
	size_t pendl;
	char *spare;        /* a free write buffer for the helper, or NULL */
	int par_frac;       /* where a buffer is cut, in 64ths: this thread's share */
	writer w;
	struct helper *hp;  /* the second reader of large buffers; NULL: none yet */
	int hp_failed;      /* 1: no helper could be started */
	int par_miss;       /* cuts not taken since the last refill */
	int worker;         /* 1: this is the helper's copy (see fast_run) */
	int last;           /* 1: the run's last flush comes */
	size_t wl;
	int werr;           /* errno of a failed write, 0 if none */
	long line;          /* line of the current position */
	char delim;
	int tab_blank;
	unsigned char stop_u[256]; /* unquoted field: delimiter, LF, NUL */
	unsigned char stop_q[256]; /* quoted field: quote, NUL */
	unsigned char *corr;       /* corr[c] = 1 + index in r->cols; c < maxcol */
	int maxcol;                /* largest corrected column number */
	ljp_prep prep[CORR_MAXCOLS]; /* the LJP for each of r->cols */
} eng;

/* ---- the writer thread ----
 * Once the output passes one write buffer, full buffers are handed to a
 * second thread that writes them while this one fills the other buffer,
 * so that the copy into the kernel overlaps the arithmetic.  Order is
 * kept: one buffer in flight at a time.  Small outputs never start it;
 * when it cannot be started the writes stay in this thread. */

static void *writer_main(void *arg)
{
	writer *w = arg;
	pthread_mutex_lock(&w->mu);
	for (;;) {
		while (!w->busy && !w->quit)
			pthread_cond_wait(&w->cv, &w->mu);
		if (!w->busy)
			break;
		const char *b = w->buf;
		size_t n = w->n;
		pthread_mutex_unlock(&w->mu);
		errno = 0;
		int bad = fwrite(b, 1, n, w->out) != n;
		int err = errno ? errno : EIO;
		pthread_mutex_lock(&w->mu);
		if (bad && !w->werr)
			w->werr = err;
		w->busy = 0;
		pthread_cond_broadcast(&w->cv);
	}
	pthread_mutex_unlock(&w->mu);
	return NULL;
}

static int writer_start(eng *e)
{
	writer *w = &e->w;
	sigset_t all, old;
	if (pthread_mutex_init(&w->mu, NULL) != 0)
		return -1;
	if (pthread_cond_init(&w->cv, NULL) != 0) {
		pthread_mutex_destroy(&w->mu);
		return -1;
	}
	w->out = e->out;
	w->busy = w->quit = w->werr = 0;
	/* signals are for the main thread (signals.c) */
	sigfillset(&all);
	pthread_sigmask(SIG_BLOCK, &all, &old);
	int rc = pthread_create(&w->th, NULL, writer_main, w);
	pthread_sigmask(SIG_SETMASK, &old, NULL);
	if (rc != 0) {
		pthread_cond_destroy(&w->cv);
		pthread_mutex_destroy(&w->mu);
		return -1;
	}
	w->started = 1;
	return 0;
}

/* Wait until no buffer is in flight; its error becomes ours. */
static void writer_wait(eng *e)
{
	writer *w = &e->w;
	if (!w->started)
		return;
	pthread_mutex_lock(&w->mu);
	while (w->busy)
		pthread_cond_wait(&w->cv, &w->mu);
	if (w->werr && !e->werr)
		e->werr = w->werr;
	pthread_mutex_unlock(&w->mu);
}

/* Wait for the last buffer and end the thread. */
static void writer_stop(eng *e)
{
	writer *w = &e->w;
	if (!w->started)
		return;
	writer_wait(e);
	pthread_mutex_lock(&w->mu);
	w->quit = 1;
	pthread_cond_broadcast(&w->cv);
	pthread_mutex_unlock(&w->mu);
	pthread_join(w->th, NULL);
	pthread_cond_destroy(&w->cv);
	pthread_mutex_destroy(&w->mu);
	w->started = 0;
}

/* Write n bytes at b here, in this thread, after what is in flight. */
static void w_sync(eng *e, const char *b, size_t n)
{
	writer_wait(e);
	errno = 0;
	if (n && !e->werr && fwrite(b, 1, n, e->out) != n)
		e->werr = errno ? errno : EIO;
}

/* The pending buffer (par_finish) out, and back as the spare. */
static void w_pend(eng *e)
{
	if (!e->pend)
		return;
	w_sync(e, e->pend, e->pendl);
	e->spare = e->pend;
	e->pend = NULL;
	e->pendl = 0;
}

static void w_flush(eng *e)
{
	w_pend(e);
	if (e->wl && !e->werr) {
		/* a thread only for an output that fills buffers, not for the
		 * last (or only) flush of a run */
		if (!e->w.started && !e->w.failed && !e->last && e->wb2 &&
		    writer_start(e) != 0)
			e->w.failed = 1;
		if (e->w.started) {
			writer *w = &e->w;
			writer_wait(e);
			pthread_mutex_lock(&w->mu);
			w->buf = e->wb;
			w->n = e->wl;
			w->busy = 1;
			pthread_cond_broadcast(&w->cv);
			pthread_mutex_unlock(&w->mu);
			char *t = e->wb;
			e->wb = e->wb2;
			e->wb2 = t;
		} else if (fwrite(e->wb, 1, e->wl, e->out) != e->wl) {
			e->werr = errno ? errno : EIO;
		}
	}
	e->wl = 0;
}

static void w_put(eng *e, const char *p, size_t n)
{
	if (n > WR_CAP - e->wl) {
		w_flush(e);
		if (n >= WR_CAP) {
			writer_wait(e);
			if (!e->werr && fwrite(p, 1, n, e->out) != n)
				e->werr = errno ? errno : EIO;
			return;
		}
	}
	memcpy(e->wb + e->wl, p, n);
	e->wl += n;
}

/* The hot loops' copy of the unchanged bytes before a corrected cell
 * (span, n bytes) into the write buffer *wb at *wl, leaving room for the
 * cell: a short span as one fixed-size copy (the buffers have room past
 * their ends), a full buffer through w_put/w_flush (which may swap *wb).
 * -1 when the helper thread's buffer is full (it stops there), else 0. */
static inline __attribute__((always_inline)) int put_span(eng *e, char **wb, size_t *wl,
							  const char *span, size_t n)
{
	if (WR_CAP - *wl < n + 16 + NUM_OUT_MAX) {
		if (e->worker)
			return -1;
		e->wl = *wl;
		w_put(e, span, n);
		if (WR_CAP - e->wl < NUM_OUT_MAX)
			w_flush(e);
		*wl = e->wl;
		*wb = e->wb;   /* a flush swaps the buffers */
	} else if (n <= 16) {
		memcpy(*wb + *wl, span, 16);
		*wl += n;
	} else {
		memcpy(*wb + *wl, span, n);
		*wl += n;
	}
	return 0;
}

static int write_failed(eng *e)
{
	return im_fail(e->err, "cannot write the output: %s", strerror(e->werr));
}

/* Keep buf[keep..len) (moved to the start), write what came before it, and
 * read more.  Returns 1 when bytes were added, 0 at end of file, -1 on a
 * read error. */
static int refill_ahead(eng *e, size_t keep, size_t n);

static int refill(eng *e, size_t keep)
{
	size_t n = e->len - keep, got;
	w_put(e, e->span, (size_t)(e->buf + keep - e->span));
	e->par_miss = 0;
	if (e->ah_have && !e->eof && !sig_cancelled())
		return refill_ahead(e, keep, n);
	memmove(e->rd_alloc, e->buf + keep, n);
	e->buf = e->rd_alloc;
	e->len = n;
	e->span = e->buf;
	if (e->eof) {
		e->buf[e->len] = '\0';
		return 0;
	}
	if (sig_cancelled())
		return im_fail(e->err, "%s: %s", e->name, SIG_CANCELLED_MSG);
	errno = 0;
	got = fread(e->buf + n, 1, RD_CAP - n, e->in);
	e->len += got;
	e->buf[e->len] = '\0';
	if (got < RD_CAP - n) {
		if (ferror(e->in))
			return im_fail(e->err, "%s: read error: %s", e->name,
				       strerror(errno ? errno : EIO));
		e->eof = 1;
	}
	return got > 0;
}

/* refill from what the helper read ahead (par_start): when what is kept
 * fits the room before it, the two read buffers change places (no copy
 * of the new bytes); else the bytes are copied after what is kept, as
 * many as fit, the rest left for the next refill. */
static int refill_ahead(eng *e, size_t keep, size_t n)
{
	size_t got;
	if (n <= RD_GAP && e->ah_data == e->ah_alloc + RD_GAP) {
		char *nb = e->ah_alloc + RD_GAP - n;
		memcpy(nb, e->buf + keep, n);
		char *t = e->rd_alloc;
		e->rd_alloc = e->ah_alloc;
		e->ah_alloc = t;
		e->buf = nb;
		got = e->ah_len;
	} else {
		memmove(e->rd_alloc, e->buf + keep, n);
		e->buf = e->rd_alloc;
		got = e->ah_len < RD_CAP - n ? e->ah_len : RD_CAP - n;
		memcpy(e->buf + n, e->ah_data, got);
		e->ah_data += got;
	}
	e->ah_len -= got;
	e->len = n + got;
	e->buf[e->len] = '\0';
	e->span = e->buf;
	if (e->ah_len == 0) {
		e->ah_have = 0;
		if (e->ah_err)
			return im_fail(e->err, "%s: read error: %s", e->name, strerror(e->ah_err));
		e->eof = e->ah_eof;
	}
	return got > 0;
}

/* A scanned field. */
typedef struct field {
	const char *cs, *ce; /* content (inside the quotes when quoted) */
	const char *q;       /* terminator: delimiter, LF, or end of data at EOF */
	int quoted;
	int nl;              /* newlines inside */
} field;

enum { SCAN_OK = 0, SCAN_MORE = 1, SCAN_ERR = -1 };

static int field_error(eng *e, long line, int col, const char *what)
{
	return im_fail(e->err, "%s:%ld:%d: %s", e->name, line, col, what);
}

/* Scan the field starting at p (line `line`, 1-based column col). */
static int scan(eng *e, const char *p, long line, int col, field *f)
{
	const char *end = e->buf + e->len, *q;
	if (*p == '"') {
		q = p + 1;
		for (;;) {
			while (!e->stop_q[(unsigned char)*q])
				q++;
			if (*q == '\0') {
				if (q < end)
					goto binary;
				if (!e->eof)
					goto more;
				return field_error(e, line, col, "quoted field never closed"
						   " (a missing closing quote?)");
			}
			if (q + 1 == end && !e->eof)
				goto more;
			if (q[1] != '"')
				break;
			q += 2;
		}
		f->cs = p + 1;
		f->ce = q;
		f->quoted = 1;
		f->nl = 0;
		for (const char *s = f->cs; (s = memchr(s, '\n', (size_t)(f->ce - s))); s++)
			f->nl++;
		q++;
	} else {
		q = p;
		f->cs = p;
		f->quoted = 0;
		f->nl = 0;
	}
	while (!e->stop_u[(unsigned char)*q])
		q++;
	if (*q == '\0') {
		if (q < end)
			goto binary;
		if (!e->eof)
			goto more;
	}
	if (!f->quoted)
		f->ce = q;
	f->q = q;
	if (q - p > CORR_FIELD_MAX)
		goto toolong;
	return SCAN_OK;
more:
	if (end - p > CORR_FIELD_MAX)
		goto toolong;
	return SCAN_MORE;
toolong:
	field_error(e, line, col, "field longer than 64 KiB (a missing closing quote?)");
	return SCAN_ERR;
binary:
	return im_fail(e->err, "%s:%ld: binary file (NUL byte); expected CSV or TSV text",
		       e->name, line);
}

/* Correct one cell in place in the output stream. */
static int do_cell(eng *e, const field *f, long line, int col)
{
	num m;
	const char *ce = f->ce;
	int rc = f->quoted ? -1 : parse_plain(f->cs, ce, &m);
	if (rc < 0)
		rc = parse_num(f->cs, ce, e->tab_blank, &m);
	if (f->quoted && rc >= 0) {
		/* only blanks may follow the closing quote */
		for (const char *s = ce + 1; s < f->q; s++)
			if (*s != ' ' && *s != '\r' && !(*s == '\t' && e->tab_blank)) {
				rc = -1;
				ce = f->q;
				break;
			}
	}
	if (rc == 0) {
		w_put(e, e->span, (size_t)(m.ns - e->span));
		e->span = m.ns;
		if (WR_CAP - e->wl < NUM_OUT_MAX)
			w_flush(e);
		int k = fix_num(&m, &e->prep[e->corr[col - 1] - 1], e->wb + e->wl);
		if (k >= 0) {
			e->wl += (size_t)k;
			e->span = m.ne;
			e->r->corrected++;
			return 0;
		}
		if (!e->o->skip_bad) {
			char msg[IM_ERRLEN];
			snprintf(msg, sizeof msg, TOO_MANY_DIGITS, CORR_DIGITS_MAX);
			return field_error(e, line, col, msg);
		}
		e->r->bad++;
		e->r->skipped++;
		return 0;
	}
	if (rc == 1) {
		e->r->skipped++;
		return 0;
	}
	if (!e->o->skip_bad) {
		char cause[160], msg[IM_ERRLEN];
		bad_cause(cause, sizeof cause, f->cs, (size_t)(ce - f->cs));
		snprintf(msg, sizeof msg, "%s (skip-bad copies such cells)", cause);
		return field_error(e, line, col, msg);
	}
	e->r->bad++;
	e->r->skipped++;
	return 0;
}

/* The end of a record that has `col` fields: count it, and deal with the
 * corrected columns it lacks.  0 or -1. */
static int row_done(eng *e, int col, long rec_line)
{
	e->r->rows++;
	if (col >= e->maxcol)
		return 0;
	int missing = 0, first = 0;
	for (int i = e->r->ncols - 1; i >= 0; i--)
		if (e->r->cols[i].index > col) {
			missing++;
			first = e->r->cols[i].index;
		}
	if (!e->o->skip_bad)
		return im_fail(e->err, "%s:%ld: row has %d field%s; column %d is missing"
			       " (skip-bad copies such rows)", e->name, rec_line, col,
			       col == 1 ? "" : "s", first);
	e->r->ragged++;
	e->r->bad += missing;
	e->r->skipped += missing;
	return 0;
}

/* "000\0" .. "999\0": three digits in one copy; filled on first use. */
static char dig3[1000 * 4];

static void dig3_init(void)
{
	if (dig3[3 * 4 + 2])
		return;
	for (int i = 0; i < 1000; i++) {
		dig3[4 * i] = (char)('0' + i / 100);
		dig3[4 * i + 1] = (char)('0' + i / 10 % 10);
		dig3[4 * i + 2] = (char)('0' + i % 10);
	}
}

/* Digits of u (u > 0). */
static inline int ndig32(uint32_t u)
{
	return u < 10 ? 1 : u < 100 ? 2 : u < 1000 ? 3 : u < 10000 ? 4 : u < 100000 ? 5 :
	       u < 1000000 ? 6 : u < 10000000 ? 7 : u < 100000000 ? 8 : u < 1000000000 ? 9 : 10;
}

/* Write u as exactly n digits (zero-padded) ending at t, two at a time. */
static inline void put_digits(char *t, uint32_t u, int n)
{
	for (; n >= 2; n -= 2) {
		unsigned r = u % 100;
		u /= 100;
		t -= 2;
		memcpy(t, dig2 + 2 * r, 2);
	}
	if (n)
		t[-1] = (char)('0' + u % 10);
}

/* fix_num for a cell from plain_prefix (no exponent), fast where the LJP
 * has no more decimals than the cell (the result keeps the cell's nf
 * decimals) and the result is below 2^32: the integer and fraction parts
 * are split by a constant divisor and written two digits at a time.  The
 * same text as fix_num in every case. */
static inline int fix_plain(const num *m, const ljp_prep *lp, char *out)
{
	uint64_t B = lp->bn[m->nf], A = m->val, R;
	int neg, D = m->nf;
	if (B == UINT64_MAX)
		return fix_num(m, lp, out);
	/* r = a - b with a = +-A, b = +-B, without branches on the data:
	 * the magnitudes add when the signs differ, else subtract */
	int add = m->neg != lp->neg, ge = A >= B;
	uint64_t sub = ge ? A - B : B - A;
	R = add ? A + B : sub;
	neg = m->neg ^ (!add & !ge) ^ lp->flip;
	if (R > UINT32_MAX || D > 9)
		return emit_u64(out, R, D, neg, m);
	uint32_t r = (uint32_t)R, ip, fp;
	switch (D) {
	case 0: ip = r; fp = 0; break;
	case 1: ip = r / 10; fp = r % 10; break;
	case 2: ip = r / 100; fp = r % 100; break;
	case 3: ip = r / 1000; fp = r % 1000; break;
	case 4: ip = r / 10000; fp = r % 10000; break;
	case 5: ip = r / 100000; fp = r % 100000; break;
	case 6: ip = r / 1000000; fp = r % 1000000; break;
	case 7: ip = r / 10000000; fp = r % 10000000; break;
	case 8: ip = r / 100000000; fp = r % 100000000; break;
	default: ip = r / 1000000000; fp = r % 1000000000; break;
	}
	char *o = out;
	int minus = neg && r;
	*o = minus ? '-' : '+';
	o += minus | m->plus;
	if (ip && ip < 1000) {
		/* one copy of three digits, the leading zeros skipped (the
		 * bytes after the number are written over next) */
		int n = 1 + (ip >= 10) + (ip >= 100);
		memcpy(o, dig3 + 4 * ip + 3 - n, 4);
		o += n;
	} else if (ip) {
		int n = ndig32(ip);
		put_digits(o + n, ip, n);
		o += n;
	} else if (m->ni > 0 || D == 0) {
		*o++ = '0';
	}
	if (D) {
		*o++ = '.';
		int k = D;
		for (; k >= 3; k -= 3) {
			memcpy(o + k - 3, dig3 + 4 * (fp % 1000), 3);
			fp /= 1000;
		}
		if (k == 2)
			memcpy(o, dig2 + 2 * fp, 2);
		else if (k == 1)
			*o = (char)('0' + fp);
		o += D;
	} else if (m->dot) {
		*o++ = '.';
	}
	return (int)(o - out);
}

#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
/* The decimal digits at the start of p[0..8) (8 bytes are readable):
 * their count (0 to 8) and, in *val, their value, found eight bytes at a
 * time without a branch on the data (a byte is a digit when its high
 * nibble is 3 and stays 3 after adding 6; the value by three multiplies,
 * the digits moved to the high bytes so that the low ones read as leading
 * zeros). */
static inline int swar_digits(const char *p, uint64_t *val)
{
	const uint64_t hi = 0xF0F0F0F0F0F0F0F0ULL, threes = 0x3030303030303030ULL;
	uint64_t x;
	memcpy(&x, p, 8);
	uint64_t t = ((x & hi) ^ threes) | (((x + 0x0606060606060606ULL) & hi) ^ threes);
	int k = t ? __builtin_ctzll(t) >> 3 : 8;
	if (k == 0) {
		*val = 0;
		return 0;
	}
	uint64_t d = (x ^ threes) << (8 * (8 - k));
	d = d * 10 + (d >> 8);
	d = (((d & 0x000000FF000000FFULL) * (100 + (1000000ULL << 32))) +
	     (((d >> 16) & 0x000000FF000000FFULL) * (1 + (10000ULL << 32)))) >> 32;
	*val = d;
	return k;
}
#endif

/* plain_prefix for s[0..) in the read buffer (a NUL sentinel after the
 * data, and room to read 8 bytes past it): integer and fraction parts of
 * up to 7 digits each eight bytes at a time; anything longer goes to
 * plain_prefix. */
static inline const char *plain_fast(const char *s, const char *e, num *m)
{
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
	const char *p = s;
	uint64_t iv, fv = 0;
	m->neg = *p == '-';
	m->plus = *p == '+';
	p += m->neg | m->plus;
	m->ip = p;
	m->ni = swar_digits(p, &iv);
	if (m->ni == 8)
		return plain_prefix(s, e, m);
	p += m->ni;
	m->fp = p;
	m->nf = 0;
	m->dot = *p == '.';
	if (m->dot) {
		m->fp = ++p;
		m->nf = swar_digits(p, &fv);
		if (m->nf == 8)
			return plain_prefix(s, e, m);
		p += m->nf;
	}
	if (m->ni + m->nf == 0)
		return NULL;
	m->val = iv * pow10_u64[m->nf] + fv;
	m->ns = s;
	m->ne = p;
	m->ep = m->epe = p;
	m->exp = 0;
	return p;
#else
	return plain_prefix(s, e, m);
#endif
}

#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__ && \
	defined(__SIZEOF_INT128__)
#define HAVE_QUICK 1
/* The commonest cell, in one pass: [+-]digits[.digits] with at most 7
 * digits in all, corrected in decimal on the digits themselves: one digit
 * to a byte of a word, the last digit lowest ("lanes"), added or
 * subtracted with the carries between lanes done by the adder (a lane
 * holds digit + 246, so that it carries at 10), the result written back
 * as one word.  No conversion to binary and back.  quick_parse reads the
 * cell, quick_emit writes the corrected number as fix_num would (the same
 * bytes: test_fast_path_same). */
typedef struct quick {
	uint64_t lanes; /* the ni + nf digits, the last in the lowest byte */
	int ni, nf;     /* integer and fraction digits, 1 <= ni + nf <= 7 */
	int neg, plus, dot;
} quick;

#define LANES_ONE 0x0101010101010101ULL

/* 0 in each byte of x that is '0'..'9' up to the first that is not (see
 * swar_digits; lanes after a non-digit may be wrong, only the first one
 * is used). */
static inline uint64_t nondigits(uint64_t x)
{
	const uint64_t hi = 0xF0F0F0F0F0F0F0F0ULL, threes = 0x3030303030303030ULL;
	return ((x & hi) ^ threes) | (((x + 0x0606060606060606ULL) & hi) ^ threes);
}

/* The plain number at s (in the read buffer: 17 bytes readable past the
 * data), or NULL when it is not one quick_emit can take (more than 7
 * digits, none, or no number): the byte after it; the caller checks what
 * follows. */
static inline const char *quick_parse(const char *s, quick *q)
{
	const uint64_t threes = 0x3030303030303030ULL;
	const char *p = s;
	uint64_t x, y, t, u;
	q->neg = *p == '-';
	q->plus = *p == '+';
	q->ni = q->nf = 0;
	p += q->neg | q->plus;
	memcpy(&x, p, 8);
	t = nondigits(x);
	if (!t)
		return NULL;
	int ni = __builtin_ctzll(t) >> 3, nf = 0;
	p += ni;
	q->dot = *p == '.';
	uint64_t dx = x ^ threes, df = 0;
	if (q->dot) {
		memcpy(&y, ++p, 8);
		u = nondigits(y);
		if (!u)
			return NULL;
		nf = __builtin_ctzll(u) >> 3;
		df = y ^ threes;
		p += nf;
	}
	if (ni + nf == 0 || ni + nf > 7)
		return NULL;
	/* the digits side by side at the top of a word in reading order
	 * (shifts of 64 split in two: ni or nf may be 0), then reversed */
	uint64_t d = ((dx << (8 * (7 - ni))) << 8) >> (8 * nf);
	d |= (df << (8 * (7 - nf))) << 8;
	q->lanes = __builtin_bswap64(d);
	q->ni = ni;
	q->nf = nf;
	return p;
}

/* Lanes a + b (each at most 7 digits).  A lane of a + 246 carries into
 * the next exactly when the digit sum (and carry in) reaches 10; the
 * lanes that did not carry get their 246 back. */
static inline uint64_t lanes_add(uint64_t a, uint64_t b)
{
	uint64_t x = a + 0xF6 * LANES_ONE, s = x + b;
	uint64_t carried = ((x ^ b ^ s) >> 8) & LANES_ONE;
	return s - (carried ^ LANES_ONE) * 0xF6;
}

/* Lanes a - b for a >= b: a lane that borrowed holds digit + 256 - 10
 * after the subtraction and gets 246 taken off. */
static inline uint64_t lanes_sub(uint64_t a, uint64_t b)
{
	uint64_t s = a - b;
	return s - (((a ^ b ^ s) >> 8) & LANES_ONE) * 0xF6;
}

/* The corrected number for q at out (18 bytes writable), as fix_num would
 * write it, when the LJP has no more decimals than the cell and at most 7
 * digits in the cell's unit; its length, or -1 (then fix_plain). */
static inline int quick_emit(const quick *q, const ljp_prep *lp, char *out)
{
	uint64_t A = q->lanes, B = lp->lanes[q->nf];
	if (B == UINT64_MAX)
		return -1;
	/* r = a - b with a = +-A, b = +-B, without branches on the data (the
	 * signs of a column's cells come in no order): the magnitudes add
	 * when the signs differ, else the smaller is taken from the larger;
	 * lanes compare as the numbers do */
	int D = q->nf, add = q->neg != lp->neg, lt = A < B;
	uint64_t big = lt ? B : A, small = lt ? A : B;
	uint64_t sum = lanes_add(A, B), dif = lanes_sub(big, small);
	uint64_t R = add ? sum : dif;
	int neg = q->neg ^ (lt & !add) ^ lp->flip;
	int nd = R ? 8 - (__builtin_clzll(R) >> 3) : 0;
	int nint = nd > D ? nd - D : (q->ni > 0 || D == 0);
	/* reading order again, as text */
	uint64_t w = __builtin_bswap64(R) | 0x3030303030303030ULL;
	/* the integer digits, a dot, the D decimals, as three stores (what
	 * lies past the number is written over next) */
	int minus = neg && R;
	out[0] = minus ? '-' : '+';
	char *o = out + (minus | q->plus);
	uint64_t ip = w >> (8 * (8 - D - nint)), fp = (w >> (8 * (7 - D))) >> 8;
	memcpy(o, &ip, 8);
	o[nint] = '.';
	memcpy(o + nint + 1, &fp, 8);
	return (int)(o - out) + nint + (D ? D + 1 : q->dot);
}
#endif

/* The separators of an unquoted field (the delimiter, LF, and NUL: the
 * buffer's sentinel or a binary byte) as bits, one per byte, 64 bytes at
 * a time, handed out in order.  Rows are found from these bits, so that
 * where one row starts does not wait for the reading of the one before
 * (a chain of loads per row otherwise), and the cells of successive rows
 * are worked on side by side. */
typedef struct seps {
	const char *base;   /* bit i of bits: base[i] */
	uint64_t bits;      /* separators not handed out yet */
#ifdef __SSE2__
	__m128i vd, lf;
#else
	const unsigned char *stop;
#endif
} seps;

/* The separator bits of the 64 bytes at p (readable: the buffer has
 * RD_SLACK bytes past its sentinel). */
static inline uint64_t seps64(const seps *it, const char *p)
{
#ifdef __SSE2__
	const __m128i zero = _mm_setzero_si128();
	uint64_t m = 0;
	for (int i = 0; i < 4; i++) {
		__m128i x = _mm_loadu_si128((const __m128i *)(const void *)(p + 16 * i));
		__m128i hit = _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(x, it->vd),
							 _mm_cmpeq_epi8(x, it->lf)),
					   _mm_cmpeq_epi8(x, zero));
		m |= (uint64_t)(unsigned)_mm_movemask_epi8(hit) << (16 * i);
	}
	return m;
#else
	uint64_t m = 0;
	for (int i = 0; i < 64; i++)
		m |= (uint64_t)it->stop[(unsigned char)p[i]] << i;
	return m;
#endif
}

/* Start handing out the separators at or after p. */
static inline void seps_at(seps *it, const char *p)
{
	it->base = p;
	it->bits = seps64(it, p);
}

static void seps_init(seps *it, const char *p, char delim, const unsigned char *stop)
{
#ifdef __SSE2__
	it->vd = _mm_set1_epi8(delim);
	it->lf = _mm_set1_epi8('\n');
	(void)stop;
#else
	(void)delim;
	it->stop = stop;
#endif
	seps_at(it, p);
}

/* The next separator (the sentinel NUL at the latest). */
static inline const char *seps_next(seps *it)
{
	while (!it->bits) {
		it->base += 64;
		it->bits = seps64(it, it->base);
	}
	const char *q = it->base + __builtin_ctzll(it->bits);
	it->bits &= it->bits - 1;
	return q;
}

#if defined(HAVE_QUICK) && defined(__SSE2__)
#define HAVE_ONE_RUN 1
/* The first delimiter (vd), LF or NUL in p[0..48) (readable: the buffer
 * has RD_SLACK bytes past its sentinel), or NULL when there is none. */
static inline const char *field_end48(const char *p, __m128i vd)
{
	const __m128i lf = _mm_set1_epi8('\n'), zero = _mm_setzero_si128();
	for (int i = 0; i < 3; i++) {
		__m128i x = _mm_loadu_si128((const __m128i *)(const void *)(p + 16 * i));
		__m128i hit = _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(x, vd),
							 _mm_cmpeq_epi8(x, lf)),
					   _mm_cmpeq_epi8(x, zero));
		unsigned m = (unsigned)_mm_movemask_epi8(hit);
		if (m)
			return p + 16 * i + __builtin_ctz(m);
	}
	return NULL;
}

/* The commonest cell, leanest: [+-]digits.digits, at least one digit
 * each side, at most 7 bytes after the sign, and an LJP that has at most
 * the cell's decimals and fits 7 lanes with the dot.  The text after the
 * sign is taken as lanes as it stands (the last byte lowest), the dot
 * kept as a lane of its own: 9 in the cell when adding and 0 when
 * subtracting, 0 in the LJP (dlanes), so that a carry or borrow passes
 * through it as through a digit; it is put back as '.' after.  The
 * corrected number, as quick_emit would write it, is *sg (its sign, '-'
 * or '+', or 0 for none) followed by the low bytes of *text (in memory
 * order), *k bytes in all; returns the byte after the cell's number, or
 * NULL when the cell is not of this form. */
static inline const char *lean_cell(const char *fs, const ljp_prep *lp, uint64_t *text,
				    int *sg, int *k)
{
	const uint64_t threes = 0x3030303030303030ULL;
	int neg = *fs == '-', plus = *fs == '+';
	const char *s = fs + (neg | plus);
	uint64_t x;
	memcpy(&x, s, 8);
	uint64_t t = nondigits(x);
	if (!t)
		return NULL;
	int ni = __builtin_ctzll(t) >> 3;
	if (ni == 0 || ni > 5 || (unsigned char)(x >> (8 * ni)) != '.')
		return NULL;
	/* the first non-digit after the dot (the lanes up to it are right:
	 * no digit or dot carries into the next when 6 is added) */
	uint64_t t2 = t & (~0ULL << (8 * (ni + 1)));
	if (!t2)
		return NULL;
	int len = __builtin_ctzll(t2) >> 3, nf = len - ni - 1;
	if (len > 7 || nf == 0)
		return NULL;
	uint64_t B = lp->dlanes[nf];
	if (B == UINT64_MAX)
		return NULL;
	const uint64_t dot = 0xFFULL << (8 * nf);
	/* reading order to lanes: the text at the top of the word, reversed */
	uint64_t A = __builtin_bswap64(((x ^ threes) << (8 * (8 - len)))) & ~dot;
	int add = neg != lp->neg, lt = A < B;
	uint64_t big = lt ? B : A, small = lt ? A : B;
	uint64_t sum = lanes_add(A | (9ULL << (8 * nf)), B), dif = lanes_sub(big, small);
	/* chosen by a mask, not a branch: the signs of a column's cells
	 * come in no order (a branch here costs more than both results) */
	uint64_t sel = -(uint64_t)add;
	uint64_t R = ((sum & sel) | (dif & ~sel)) & ~dot;
	int rneg = neg ^ (lt & !add) ^ lp->flip;
	int nd = R ? 8 - (__builtin_clzll(R) >> 3) : 0;
	int L = (nd > nf + 1 ? nd - nf - 1 : 1) + 1 + nf;
	uint64_t w = ((R | threes) & ~dot) | ((uint64_t)'.' << (8 * nf));
	w = __builtin_bswap64(w) >> (8 * (8 - L));
	int minus = rneg & (R != 0);
	*sg = (minus * '-') | ((plus & !minus) * '+');
	*text = w;
	*k = (minus | plus) + L;
	return s + len;
}

/* quick_parse and quick_emit at once, for one_run where lean_cell
 * declines: the byte after the number at fs with the corrected text at
 * out and its length in *k, or NULL.  Kept out of one_run's loop (its
 * registers are for the common case). */
static __attribute__((noinline)) const char *quick_cell(const char *fs, const ljp_prep *lp,
							  char *out, int *k)
{
	quick q;
	const char *ne = quick_parse(fs, &q);
	if (!ne || (*k = quick_emit(&q, lp, out)) < 0)
		return NULL;
	return ne;
}

/* The commonest records, leanest: one corrected column (number `one`,
 * LJP lp), its cell a number quick_parse and quick_emit take, ending at
 * its delimiter or the line end (a CR allowed before the LF), every
 * other field unquoted and shorter than 48 bytes.  A record is looked at
 * whole before anything is written, so where this stops (the returned
 * record start, before lim) nothing of it is done and fast_run goes on
 * there.  The read buffer is never written to (the helper's half may
 * be dropped and done again).  The helper's copy (e->worker) stops when
 * its write buffer is full.  *rowsp: the records done.  (Writing a
 * corrected number of the cell's length over the cell in the read buffer
 * and the rest out in long spans was measured: fewer instructions, more
 * time - a branch on the length that the data decide, and stores the
 * span copies wait for.) */
static __attribute__((noinline)) const char *one_run(eng *e, const char *p, const char *lim, int one,
				  const ljp_prep *lp, char **wbp, size_t *wlp,
				  const char **spanp, long *rowsp)
{
	const __m128i vd = _mm_set1_epi8(e->delim);
	const char delim = e->delim;
	char *wb = *wbp;
	size_t wl = *wlp;
	const char *span = *spanp;
	long rows = 0;
	char tmp[32] = {0};   /* 24 bytes of it are copied at a time */

	while (p < lim) {
		const char *fs = p, *ne, *eol;
		for (int c = 1; c < one; c++) {
			const char *fe = field_end48(fs, vd);
			if (*fs == '"' || !fe || *fe != delim)
				goto stop;
			fs = fe + 1;
		}
		uint64_t w = 0;
		int k, sg = 0;
		ne = lean_cell(fs, lp, &w, &sg, &k);
		int lean = ne != NULL;
		if (!lean && !(ne = quick_cell(fs, lp, tmp, &k)))
			goto stop;
		if (*ne == '\n') {
			eol = ne;
		} else if (*ne == '\r' && ne[1] == '\n') {
			eol = ne + 1;
		} else if (*ne == delim) {
			/* the fields after the cell, to the line end */
			const char *s = ne + 1;
			for (;;) {
				const char *fe = field_end48(s, vd);
				if (*s == '"' || !fe || *fe == '\0')
					goto stop;
				if (*fe == '\n') {
					eol = fe;
					break;
				}
				s = fe + 1;
			}
		} else {
			goto stop;
		}
		if (put_span(e, &wb, &wl, span, (size_t)(fs - span)))
			goto stop;   /* the helper's buffer is full */
		if (lean) {
			wb[wl] = (char)sg;
			memcpy(wb + wl + (sg != 0), &w, 8);
		} else {
			memcpy(wb + wl, tmp, 24);
		}
		wl += (size_t)k;
		span = ne;
		rows++;
		p = eol + 1;
	}
stop:
	*wbp = wb;
	*wlp = wl;
	*spanp = span;
	*rowsp = rows;
	return p;
}

/* The one corrected cell of the row at p, from the separator bits of its
 * 32 bytes (delimiter, LF, NUL): the LF that ends it (the cell is *fsp up
 * to there), or NULL when the row is not one - the first one - 1 fields
 * ended by the delimiter and unquoted, then the cell ended by an LF. */
static inline __attribute__((always_inline)) const char *
row_cell(const char *p, uint32_t bits, char delim, int one, const char **fsp)
{
	const char *fs = p;
	for (int c = 1; c < one; c++) {
		const char *fe = p + __builtin_ctz(bits | (1U << 31));
		bits &= bits - 1;
		if (*fe != delim || fe[1] == '"')
			return NULL;
		fs = fe + 1;
	}
	const char *ce = p + __builtin_ctz(bits | (1U << 31));
	*fsp = fs;
	return *ce == '\n' ? ce : NULL;
}

/* The commonest records at their leanest: rows of at most 32 bytes whose
 * last field is the one corrected cell, of lean_cell's form, ending at an
 * LF.  The separators of the whole row (delimiter, LF, NUL) come from two
 * 16-byte loads at once, so that where the next row starts depends on one
 * mask and not on the reading of this row's cell; the row is copied out
 * as it stands (32 bytes: the buffers have room) and the corrected cell
 * written over its old text, the LF after it.  The arithmetic is
 * lean_cell's, for cells with F decimals (a constant: lean_rows is made
 * once for each F from 1 to 5, so that the dot's lane, the LJP's lanes
 * and the shifts that depend on them are fixed), on a cell whose length
 * the separators already gave.  Stops at a row of another shape or of
 * other decimals (nothing of it done), at lim, or when the write buffer
 * lacks room for a row (*full).  Rows begun: *rowsp. */
static inline __attribute__((always_inline)) const char *
lean_rows(const char *p, const char *lim, char delim, int one, const ljp_prep *lp, char *wb,
	  size_t *wlp, long *rowsp, int *full, const int F)
{
	const __m128i vd = _mm_set1_epi8(delim), lf = _mm_set1_epi8('\n');
	const __m128i zero = _mm_setzero_si128();
	const uint64_t threes = 0x3030303030303030ULL, ones = LANES_ONE;
	const uint64_t dot = 0xFFULL << (8 * F), nine = 9ULL << (8 * F);
	const uint64_t dotx = (uint64_t)('0' ^ '.') << (8 * F);
	const uint64_t B = lp->dlanes[F];
	const int lneg = lp->neg, flip = lp->flip;
	size_t wl = *wlp;
	long rows = 0;
	while (p < lim) {
		if (WR_CAP - wl < 64) {
			*full = 1;
			break;
		}
		__m128i v0 = _mm_loadu_si128((const __m128i *)(const void *)p);
		__m128i v1 = _mm_loadu_si128((const __m128i *)(const void *)(p + 16));
		__m128i s0 = _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(v0, vd), _mm_cmpeq_epi8(v0, lf)),
					  _mm_cmpeq_epi8(v0, zero));
		__m128i s1 = _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(v1, vd), _mm_cmpeq_epi8(v1, lf)),
					  _mm_cmpeq_epi8(v1, zero));
		uint32_t bits = (uint32_t)_mm_movemask_epi8(s0) |
				((uint32_t)_mm_movemask_epi8(s1) << 16);
		const char *fs;
		if (*p == '"')
			break;
		const char *ce = row_cell(p, bits, delim, one, &fs);
		if (!ce)
			goto out;
		/* the cell fs[0..ce): [+-]digits.digits, F decimals, 1 to
		 * 5 - F integer digits (m bytes after the sign) */
		int c0 = (unsigned char)*fs, neg = c0 == '-', plus = c0 == '+';
		const char *t = fs + (neg | plus);
		long m = ce - t;
		if ((unsigned long)(m - (F + 2)) > (unsigned long)(5 - F))
			goto out;
		uint64_t x;
		memcpy(&x, t, 8);
		/* lanes, the last byte lowest; the dot in lane F */
		uint64_t A = __builtin_bswap64((x ^ threes) << (8 * (8 - m)));
		if (((A >> (8 * F)) & 0xFF) != (uint64_t)('.' ^ '0'))
			goto out;
		A &= ~dot;
		if (((A + 0x76 * ones) | A) & (0x80 * ones))
			goto out;   /* a lane that is not a digit */
		int add = neg != lneg, lt = A < B;
		uint64_t big = lt ? B : A, small = lt ? A : B;
		uint64_t sum = lanes_add(A | nine, B), dif = lanes_sub(big, small);
		uint64_t sel = -(uint64_t)add;
		uint64_t R = ((sum & sel) | (dif & ~sel)) & ~dot;
		int rneg = neg ^ (lt & !add) ^ flip;
		int nd = 8 - (__builtin_clzll(R | 1) >> 3);
		int L = nd > F + 2 ? nd : F + 2;
		uint64_t w = __builtin_bswap64((R | threes) ^ dotx) >> (8 * (8 - L));
		int minus = rneg & (R != 0), sg = minus | plus;
		/* the row as it stands, then the cell over it, then the LF */
		_mm_storeu_si128((__m128i *)(void *)(wb + wl), v0);
		_mm_storeu_si128((__m128i *)(void *)(wb + wl + 16), v1);
		size_t o = wl + (size_t)(fs - p);
		wb[o] = minus ? '-' : '+';
		memcpy(wb + o + sg, &w, 8);
		o += (size_t)(sg + L);
		wb[o] = '\n';
		wl = o + 1;
		rows++;
		p = ce + 1;
	}
out:
	*wlp = wl;
	*rowsp += rows;
	return p;
}

/* The loop of short_rows (KERNEL lean_rows) and short_rows_quad (quad_rows):
 * the kernel made for the decimals of the row at p, until a row it does
 * not take (of no lean shape, or an LJP with more decimals than the cell
 * or too many digits), lim, or a full buffer; one is made a constant where
 * it is 2 (time, then the voltage).  Uses p, lim, one, lp, wb, rowsp and
 * full of the function it is in. */
#define BY_DECIMALS(KERNEL, DELIM, WLP)                                                   \
	while (p < lim && !*full) {                                                        \
		const char *q = p;                                                          \
		int f = lean_decimals(p, DELIM, one);                                        \
		if (lp->dlanes[f] == UINT64_MAX)                                             \
			f = 0;                                                              \
		switch (f ? (one == 2 ? f : 8 + f) : 0) {                                    \
		case 1: q = KERNEL(p, lim, DELIM, 2, lp, wb, WLP, rowsp, full, 1); break;     \
		case 2: q = KERNEL(p, lim, DELIM, 2, lp, wb, WLP, rowsp, full, 2); break;     \
		case 3: q = KERNEL(p, lim, DELIM, 2, lp, wb, WLP, rowsp, full, 3); break;     \
		case 4: q = KERNEL(p, lim, DELIM, 2, lp, wb, WLP, rowsp, full, 4); break;     \
		case 5: q = KERNEL(p, lim, DELIM, 2, lp, wb, WLP, rowsp, full, 5); break;     \
		case 9: q = KERNEL(p, lim, DELIM, one, lp, wb, WLP, rowsp, full, 1); break;   \
		case 10: q = KERNEL(p, lim, DELIM, one, lp, wb, WLP, rowsp, full, 2); break;  \
		case 11: q = KERNEL(p, lim, DELIM, one, lp, wb, WLP, rowsp, full, 3); break;  \
		case 12: q = KERNEL(p, lim, DELIM, one, lp, wb, WLP, rowsp, full, 4); break;  \
		case 13: q = KERNEL(p, lim, DELIM, one, lp, wb, WLP, rowsp, full, 5); break;  \
		default: break;                                                             \
		}                                                                           \
		if (q == p)                                                                 \
			break;                                                              \
		p = q;                                                                      \
	}

/* The decimals of the cell that ends the row at p, when the row is of
 * lean_rows's shape as far as a quick look tells (0 otherwise). */
static inline int lean_decimals(const char *p, char delim, int one)
{
	const char *fs = p;
	int c = 1;
	for (const char *s = p; s < p + 32; s++) {
		if (*s == '\n') {
			if (c != one)
				return 0;
			for (int f = 1; f <= 5 && s - 1 - f >= fs; f++)
				if (s[-1 - f] == '.')
					return f;
			return 0;
		}
		if (*s == '\0')
			return 0;
		if (*s == delim) {
			c++;
			fs = s + 1;
		}
	}
	return 0;
}

#if defined(__x86_64__) && defined(__linux__) && (defined(__GNUC__) || defined(__clang__))
#define HAVE_QUAD 1
#define QUAD_TARGET __attribute__((target("avx2,bmi,bmi2,lzcnt,popcnt")))
#define QUAD_UNROLL _Pragma("GCC unroll 4")

/* lanes_add and lanes_sub on four words at once (see there); the lanes
 * that carried (or borrowed) get 246 back a byte at a time. */
static inline __attribute__((always_inline)) QUAD_TARGET __m256i
quad_add(__m256i a, __m256i b)
{
	const __m256i ones = _mm256_set1_epi8(1), f6 = _mm256_set1_epi8((char)0xF6);
	__m256i x = _mm256_add_epi64(a, f6), s = _mm256_add_epi64(x, b);
	__m256i c = _mm256_and_si256(_mm256_srli_epi64(_mm256_xor_si256(_mm256_xor_si256(x, b), s), 8),
				     ones);
	/* lanes that did not carry: 246 off */
	__m256i nc = _mm256_cmpeq_epi8(c, _mm256_setzero_si256());
	return _mm256_sub_epi8(s, _mm256_and_si256(nc, f6));
}

static inline __attribute__((always_inline)) QUAD_TARGET __m256i
quad_sub(__m256i a, __m256i b)
{
	const __m256i ones = _mm256_set1_epi8(1), f6 = _mm256_set1_epi8((char)0xF6);
	__m256i s = _mm256_sub_epi64(a, b);
	__m256i c = _mm256_and_si256(_mm256_srli_epi64(_mm256_xor_si256(_mm256_xor_si256(a, b), s), 8),
				     ones);
	return _mm256_sub_epi8(s, _mm256_and_si256(_mm256_cmpeq_epi8(c, ones), f6));
}

/* lean_rows four rows at a time: the rows are found and their cells read
 * one by one as there, the arithmetic is done for the four cells at once
 * in 256-bit registers (one word of lanes each), and the rows written one
 * by one.  A batch with anything lean_rows would stop at (or fewer than
 * four rows before lim, or too little room) is left to lean_rows, from
 * the batch's first row; so the bytes are lean_rows's. */
static inline __attribute__((always_inline)) QUAD_TARGET const char *
quad_rows(const char *p, const char *lim, char delim, int one, const ljp_prep *lp, char *wb,
	  size_t *wlp, long *rowsp, int *full, const int F)
{
	const __m256i vd = _mm256_set1_epi8(delim), lf = _mm256_set1_epi8('\n');
	const __m256i zero = _mm256_setzero_si256();
	const uint64_t threes = 0x3030303030303030ULL;
	const __m256i vthrees = _mm256_set1_epi64x((long long)threes);
	const __m256i vdot = _mm256_set1_epi64x((long long)(0xFFULL << (8 * F)));
	const __m256i vdotch = _mm256_set1_epi64x((long long)((uint64_t)('.' ^ '0') << (8 * F)));
	const __m256i vnine = _mm256_set1_epi64x((long long)(9ULL << (8 * F)));
	const __m256i vB = _mm256_set1_epi64x((long long)lp->dlanes[F]);
	const __m256i v9 = _mm256_set1_epi8(9);
	const __m256i rev = _mm256_setr_epi8(7, 6, 5, 4, 3, 2, 1, 0, 15, 14, 13, 12, 11, 10, 9, 8,
					     7, 6, 5, 4, 3, 2, 1, 0, 15, 14, 13, 12, 11, 10, 9, 8);
	const __m256i vlneg = _mm256_set1_epi64x(-(long long)lp->neg);
	const __m256i vflip = _mm256_set1_epi64x(-(long long)lp->flip);
	const __m256i vminus = _mm256_set1_epi64x('-'), vplus = _mm256_set1_epi64x('+');
	size_t wl = *wlp;
	long rows = 0;
	for (;;) {
		const char *p0 = p;
		__m256i v[4];
		uint64_t xs[4];
		long long ms[4], cs[4];
		int fo[4];
		if (WR_CAP - wl < 4 * 64)
			break;
		QUAD_UNROLL
		for (int r = 0; r < 4; r++) {
			if (p >= lim || *p == '"')
				goto tail;
			v[r] = _mm256_loadu_si256((const __m256i *)(const void *)p);
			uint32_t bits = (uint32_t)_mm256_movemask_epi8(_mm256_or_si256(
				_mm256_or_si256(_mm256_cmpeq_epi8(v[r], vd), _mm256_cmpeq_epi8(v[r], lf)),
				_mm256_cmpeq_epi8(v[r], zero)));
			const char *fs;
			const char *ce = row_cell(p, bits, delim, one, &fs);
			if (!ce)
				goto tail;
			int c0 = (unsigned char)*fs;
			const char *t = fs + !((c0 - '+') & ~2);   /* '+' or '-' */
			long m = ce - t;
			if ((unsigned long)(m - (F + 2)) > (unsigned long)(5 - F))
				goto tail;
			memcpy(&xs[r], t, 8);
			ms[r] = m;
			cs[r] = c0;
			fo[r] = (int)(fs - p);
			p = ce + 1;
		}
		{
			__m256i X = _mm256_set_epi64x((long long)xs[3], (long long)xs[2],
						      (long long)xs[1], (long long)xs[0]);
			__m256i S = _mm256_slli_epi64(_mm256_sub_epi64(_mm256_set1_epi64x(8),
				_mm256_set_epi64x(ms[3], ms[2], ms[1], ms[0])), 3);
			__m256i C = _mm256_set_epi64x(cs[3], cs[2], cs[1], cs[0]);
			__m256i NEG = _mm256_cmpeq_epi64(C, vminus), PLUS = _mm256_cmpeq_epi64(C, vplus);
			__m256i ADD = _mm256_xor_si256(NEG, vlneg);
			/* lanes, the last byte lowest, the dot in lane F */
			__m256i A = _mm256_shuffle_epi8(_mm256_sllv_epi64(_mm256_xor_si256(X, vthrees), S),
							rev);
			__m256i dotok = _mm256_cmpeq_epi64(_mm256_and_si256(A, vdot), vdotch);
			A = _mm256_andnot_si256(vdot, A);
			__m256i digok = _mm256_cmpeq_epi8(_mm256_max_epu8(A, v9), v9);
			if (_mm256_movemask_epi8(_mm256_and_si256(digok, dotok)) != -1)
				goto tail;
			__m256i lt = _mm256_cmpgt_epi64(vB, A);
			__m256i big = _mm256_blendv_epi8(A, vB, lt), small = _mm256_blendv_epi8(vB, A, lt);
			__m256i sum = quad_add(_mm256_or_si256(A, vnine), vB), dif = quad_sub(big, small);
			__m256i R = _mm256_andnot_si256(vdot, _mm256_blendv_epi8(dif, sum, ADD));
			/* the sign: minus when the result is below 0 and not 0 */
			__m256i RNEG = _mm256_xor_si256(_mm256_xor_si256(NEG, _mm256_andnot_si256(ADD, lt)),
							vflip);
			__m256i MINUS = _mm256_andnot_si256(_mm256_cmpeq_epi64(R, _mm256_setzero_si256()),
							    RNEG);
			int mb = _mm256_movemask_pd(_mm256_castsi256_pd(MINUS));
			int sb = _mm256_movemask_pd(_mm256_castsi256_pd(_mm256_or_si256(MINUS, PLUS)));
			/* the length: F + 2 (a digit, the dot, the decimals), and
			 * one more for each further lane that is not 0 */
			__m256i LEN = _mm256_set1_epi64x(F + 2);
			for (int k = F + 2; k < 8; k++)
				LEN = _mm256_sub_epi64(LEN, _mm256_cmpgt_epi64(
					R, _mm256_set1_epi64x((long long)((1ULL << (8 * k)) - 1))));
			__m256i W = _mm256_shuffle_epi8(_mm256_xor_si256(_mm256_or_si256(R, vthrees), vdotch),
							rev);
			W = _mm256_srlv_epi64(W, _mm256_slli_epi64(
				_mm256_sub_epi64(_mm256_set1_epi64x(8), LEN), 3));
			uint64_t ws[4], ls[4];
			_mm256_storeu_si256((__m256i *)(void *)ws, W);
			_mm256_storeu_si256((__m256i *)(void *)ls, LEN);
			QUAD_UNROLL
			for (int r = 0; r < 4; r++) {
				int L = (int)ls[r];
				uint64_t w = ws[r];
				int minus = (mb >> r) & 1, sg = (sb >> r) & 1;
				_mm256_storeu_si256((__m256i *)(void *)(wb + wl), v[r]);
				size_t o = wl + (size_t)fo[r];
				wb[o] = (char)('+' + 2 * minus);   /* '+' or '-' */
				memcpy(wb + o + sg, &w, 8);
				o += (size_t)(sg + L);
				wb[o] = '\n';
				wl = o + 1;
			}
			rows += 4;
		}
		continue;
tail:
		p = p0;
		break;
	}
	*rowsp += rows;
	*wlp = wl;
	/* the rest (and any row of another shape) as lean_rows does it */
	return lean_rows(p, lim, delim, one, lp, wb, wlp, rowsp, full, F);
}

/* short_rows's loop with quad_rows, for processors with AVX2. */
static QUAD_TARGET __attribute__((noinline)) const char *
short_rows_quad(const char *p, const char *lim, char delim, int one, const ljp_prep *lp,
		char *wb, size_t *wlp, long *rowsp, int *full)
{
	BY_DECIMALS(quad_rows, delim, wlp);
	return p;
}

static int quad_ok = -1;   /* 1: the processor has AVX2 (asked once) */
#endif
static int quad_off;       /* corr_set_wide(0) */

void corr_set_wide(int on)
{
	quad_off = !on;
}

/* lean_rows for the decimals each row has, from p on; the pending span is
 * written first, and on return it is the row start (the rows before it
 * done).  *full: stopped for want of room in the write buffer. */
static __attribute__((noinline)) const char *
short_rows(eng *e, const char *p, const char *lim, int one, const ljp_prep *lp, char **wbp,
	   size_t *wlp, const char **spanp, long *rowsp, int *full)
{
	char *wb = *wbp;
	size_t wl = *wlp;
	*full = 0;
	*rowsp = 0;
	if (put_span(e, &wb, &wl, *spanp, (size_t)(p - *spanp))) {
		*full = 1;   /* the helper's buffer is full */
		goto out;
	}
	*spanp = p;
#ifdef HAVE_QUAD
	if (quad_ok < 0) {
		__builtin_cpu_init();
		quad_ok = __builtin_cpu_supports("avx2") && __builtin_cpu_supports("bmi2");
	}
	if (quad_ok && !quad_off) {
		p = short_rows_quad(p, lim, e->delim, one, lp, wb, &wl, rowsp, full);
		goto done;
	}
#endif
	BY_DECIMALS(lean_rows, e->delim, &wl);
#ifdef HAVE_QUAD
done:
#endif
	*spanp = p;
out:
	*wbp = wb;
	*wlp = wl;
	return p;
}
#endif

/* The common records, fast, as many as come in a row.  Fields end at the
 * separators (seps); a corrected cell that is a plain number ending at
 * its delimiter or the line end (a CR allowed before it) is rewritten
 * here (quick_emit, else fix_plain), any other cell goes through do_cell.
 * Anything else - a quoted field, a NUL byte, the end of the buffer, a
 * field too long - stops the loop at the start of that field: *pp and
 * *colp say where the general loop goes on (a new record when *colp is 1).
 * The output position and counts are kept in locals and stored back.
 * Records are begun only before lim (a record start, or the end).  In the
 * helper's copy (e->worker) anything that would write to the stream
 * itself - a cell for do_cell, a short row, a full buffer - stops the
 * loop too.  Returns 0, or -1 on error. */
static __attribute__((noinline)) int fast_run(eng *e, const char **pp, int *colp,
						const char *lim)
{
	const char *p = *pp, *const end = e->buf + e->len;
	const int maxcol = e->maxcol;
	char *wb = e->wb;
	size_t wl = e->wl;
	const char *span = e->span;
	long rows = 0, corrected = 0, line = e->line;
	int rc = 0, col = 1;
	const char *fs = p;
	/* one corrected column, the common case: its number and LJP in
	 * locals, which stores into the output buffer cannot alias */
	const int one = e->r->ncols == 1 ? e->r->cols[0].index : 0;
	ljp_prep lp1;
	if (one)
		lp1 = e->prep[0];
	seps it;
	seps_init(&it, p, e->delim, e->stop_u);

#ifdef HAVE_ONE_RUN
	int cool = 0;   /* records before one_run is tried again */
#endif
	while (p < lim) {
#ifdef HAVE_ONE_RUN
		if (one && !cool) {
			long n = 0, m;
			const char *q = p;
			for (;;) {
				int full;
				q = short_rows(e, q, lim, one, &lp1, &wb, &wl, &span, &m, &full);
				n += m;
				if (q >= lim)
					break;
				/* the row short_rows left (a row to flush the
				 * buffer, or one of another shape), or a stretch
				 * when it took none */
				const char *lim1 = full || m ? q + 1 : lim - q > 4096 ? q + 4096 : lim;
				q = one_run(e, q, lim1, one, &lp1, &wb, &wl, &span, &m);
				n += m;
				if (!m)
					break;
			}
			if (n) {
				rows += n;
				corrected += n;
				line += n;
				p = fs = q;
				if (p >= lim)
					break;
				seps_at(&it, p);
			} else {
				cool = 32;   /* not that shape: a while in the loop below */
			}
		} else if (cool) {
			cool--;
		}
#endif
		if (*p == '\n' || (*p == '\r' && p[1] == '\n')) {
			e->r->blank++;
			line++;
			p += *p == '\n' ? 1 : 2;
			fs = p;
			seps_next(&it);   /* that LF */
			continue;
		}
		fs = p;
		for (col = 1;; col++) {
			if (*fs == '"')
				goto out;
			const char *fe = seps_next(&it);
			if (*fe == '\0' || fe - fs > CORR_FIELD_MAX)
				goto out;
			if (e->worker && *fe == '\n' && col < maxcol)
				goto out;   /* a short row: for the general loop */
			if (one ? col == one : col <= maxcol && e->corr[col - 1]) {
				num m;
#ifdef HAVE_QUICK
				quick q;
				const char *ne = quick_parse(fs, &q);
				int viaq = ne != NULL;
				if (!viaq)
					ne = plain_fast(fs, end, &m);
#else
				const char *ne = plain_fast(fs, end, &m);
#endif
				if (ne == fe || (ne && ne + 1 == fe && *ne == '\r' && *fe == '\n')) {
					const ljp_prep *lp = one ? &lp1 : &e->prep[e->corr[col - 1] - 1];
					if (put_span(e, &wb, &wl, span, (size_t)(fs - span)))
						goto out;   /* the helper's buffer is full */
#ifdef HAVE_QUICK
					int k = viaq ? quick_emit(&q, lp, wb + wl) : -1;
					if (k < 0) {
						if (viaq)
							plain_fast(fs, end, &m);
						k = fix_plain(&m, lp, wb + wl);
					}
					wl += (size_t)k;
#else
					wl += (size_t)fix_plain(&m, lp, wb + wl);
#endif
					span = ne;
					corrected++;
				} else {
					if (e->worker)
						goto out;
					field f = {fs, fe, fe, 0, 0};
					e->wl = wl;
					e->span = span;
					rc = do_cell(e, &f, line, col);
					wl = e->wl;
					wb = e->wb;
					span = e->span;
					if (rc < 0)
						goto out;
				}
			}
			if (*fe == '\n') {
				if (col < maxcol) {
					e->wl = wl;
					e->span = span;
					e->r->rows += rows;
					rows = 0;
					rc = row_done(e, col, line);
					if (rc < 0)
						goto out;
				} else {
					rows++;
				}
				p = fe + 1;
				break;
			}
			fs = fe + 1;
		}
		line++;
		col = 1;
		fs = p;
	}
out:
	e->wl = wl;
	e->span = span;
	e->r->rows += rows;
	e->r->corrected += corrected;
	e->line = line;
	*pp = fs;
	*colp = col;
	return rc;
}

/* ---- the helper thread ----
 * A full read buffer is cut in two at a line end; a second thread runs
 * fast_run over the second half on a copy of the engine (e->worker) into
 * a buffer of its own, while this one writes the output so far (par_start:
 * two threads busy, no third for the writes) and then does the first half.
 * Where the cut falls (par_frac) moves with who waited for whom at the
 * last one, so that the writing is made up for.  When this one reaches
 * the cut at a record start with nothing unusual before it (so that the
 * cut is a record start), the helper's output and counts are taken as if
 * this thread had made them - its buffer becomes this thread's, no copy
 * (par_finish; this thread's own goes out first, bufs_home sorts the
 * buffers at the end) - and the rest goes on from where the helper
 * stopped; otherwise its work is dropped and the second half is done
 * here, as without it.  Either way the bytes are those of the one-thread
 * run (test_fast_path_same, test_parallel_same, test_one_column_same);
 * errors and their lines come from this thread.  The writer thread is
 * left for runs (or stretches) without a helper. */

#define PAR_MIN (128 * 1024)   /* bytes left in the buffer worth a cut */
#define PAR_SWAP_MIN (64 * 1024) /* the helper's output taken without a copy */

static int par_on = 1;   /* corr_set_parallel; -1: only one processor */

void corr_set_parallel(int on)
{
	par_on = on != 0;
}

typedef struct helper {
	pthread_t th;
	pthread_mutex_t mu;
	pthread_cond_t cv;
	int busy, quit;     /* under mu */
	int running;        /* under mu: 1 once the helper has begun the job */
	int spin_miss;      /* watches that ran out of time (spin_until) */
	FILE *ah_in;        /* in: read ahead from here after the job, or NULL */
	char *ah_dst;       /*     RD_CHUNK bytes into here */
	size_t ah_got;      /* out: bytes read; ah_eof, ah_err as refill's */
	int ah_eof, ah_err;
	const char *p;      /* in: the cut; out: where the helper stopped */
	int col;            /* out: the field it stopped at (1: a record start) */
	eng sh;             /* the engine's copy; sh.wb is the helper's buffer */
	corr_result res;    /* sh.r: its counts */
} helper;

/* busy, running and quit are written under mu and read without it too,
 * atomically: a thread that is about to be needed again within a fraction
 * of a millisecond watches the other for a while (PAR_SPIN_NS) rather
 * than sleeping, as waking a sleeping thread can take longer than the
 * work (measured on a virtual machine: with no watching most cuts found
 * the helper not yet started, and waking it took more than 300 us).  On a
 * busy machine the watching costs the processor the other thread needs:
 * a watch that runs out of time counts against it, and after PAR_SPIN_MISS
 * of them the two threads only sleep and wake, for the rest of the run. */
#define PAR_SPIN_NS 1000000L
#define PAR_SPIN_MISS 4
#define LOAD(x) __atomic_load_n(&(x), __ATOMIC_ACQUIRE)
#define STORE(x, v) __atomic_store_n(&(x), (v), __ATOMIC_RELEASE)

static long now_ns(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return ts.tv_sec * 1000000000L + ts.tv_nsec;
}

static inline void cpu_relax(void)
{
#ifdef __SSE2__
	_mm_pause();
#endif
}

/* Watch *flag for up to PAR_SPIN_NS: 1 when it became `want` or *or
 * became `or_want`; *miss counts the watches that ran out (none once it
 * reaches PAR_SPIN_MISS). */
static int spin_until(const int *flag, int want, const int *or, int or_want, int *miss)
{
	long t0 = 0;
	if (__atomic_load_n(miss, __ATOMIC_RELAXED) >= PAR_SPIN_MISS)
		return 0;
	for (int i = 0;; i++) {
		if (__atomic_load_n(flag, __ATOMIC_ACQUIRE) == want ||
		    __atomic_load_n(or, __ATOMIC_ACQUIRE) == or_want)
			return 1;
		if ((i & 63) == 63) {
			long t = now_ns();
			if (!t0) {
				t0 = t;
			} else if (t - t0 > PAR_SPIN_NS) {
				__atomic_fetch_add(miss, 1, __ATOMIC_RELAXED);
				return 0;
			}
			/* a thread waiting for this processor (another
			 * program's, or the other of these two) gets it */
			sched_yield();
		}
		cpu_relax();
	}
}

static void *helper_main(void *arg)
{
	helper *h = arg;
	for (;;) {
		spin_until(&h->busy, 1, &h->quit, 1, &h->spin_miss);
		pthread_mutex_lock(&h->mu);
		while (!LOAD(h->busy) && !LOAD(h->quit))
			pthread_cond_wait(&h->cv, &h->mu);
		if (!LOAD(h->busy))
			break;
		const char *p = h->p;
		int col = 1;
		STORE(h->running, 1);
		pthread_mutex_unlock(&h->mu);
		fast_run(&h->sh, &p, &col, h->sh.buf + h->sh.len);
		if (h->ah_in) {
			/* the next read buffer, while the main thread writes
			 * and works (it reads nothing until this job is done) */
			errno = 0;
			h->ah_got = fread(h->ah_dst, 1, RD_CHUNK, h->ah_in);
			h->ah_eof = h->ah_err = 0;
			if (h->ah_got < RD_CHUNK) {
				if (ferror(h->ah_in))
					h->ah_err = errno ? errno : EIO;
				else
					h->ah_eof = 1;
			}
		}
		pthread_mutex_lock(&h->mu);
		h->p = p;
		h->col = col;
		STORE(h->running, 0);
		STORE(h->busy, 0);
		pthread_cond_broadcast(&h->cv);
		pthread_mutex_unlock(&h->mu);
	}
	pthread_mutex_unlock(&h->mu);
	return NULL;
}

/* Start the helper; e->hp, or NULL when it cannot be had (then never
 * asked again: e->hp_failed). */
static helper *helper_start(eng *e)
{
	helper *h = im_xcalloc(1, sizeof *h);
	sigset_t all, old;
	h->sh.wb = im_xmalloc(WR_CAP);
	if (pthread_mutex_init(&h->mu, NULL) != 0)
		goto fail_mu;
	if (pthread_cond_init(&h->cv, NULL) != 0)
		goto fail_cv;
	sigfillset(&all);
	pthread_sigmask(SIG_BLOCK, &all, &old);
	int rc = pthread_create(&h->th, NULL, helper_main, h);
	pthread_sigmask(SIG_SETMASK, &old, NULL);
	if (rc != 0)
		goto fail_th;
	return h;
fail_th:
	pthread_cond_destroy(&h->cv);
fail_cv:
	pthread_mutex_destroy(&h->mu);
fail_mu:
	free(h->sh.wb);
	free(h);
	e->hp_failed = 1;
	return NULL;
}

/* Stop the helper (waiting for its job); its write buffer, for bufs_home. */
static char *helper_stop(eng *e)
{
	helper *h = e->hp;
	if (!h)
		return NULL;
	pthread_mutex_lock(&h->mu);
	while (LOAD(h->busy))
		pthread_cond_wait(&h->cv, &h->mu);
	STORE(h->quit, 1);
	pthread_cond_broadcast(&h->cv);
	pthread_mutex_unlock(&h->mu);
	pthread_join(h->th, NULL);
	pthread_cond_destroy(&h->cv);
	pthread_mutex_destroy(&h->mu);
	char *wb = h->sh.wb;
	free(h);
	e->hp = NULL;
	return wb;
}

/* After the run: par_finish turns the write buffers round, so that bufs_get's
 * two may be anywhere among the engine's, the helper's, the pending one and
 * the spare.  Put them back in e->wb and e->wb2 and free the others. */
static void bufs_home(eng *e, char *helper_wb)
{
	char *all[5] = {e->wb, e->wb2, e->pend, e->spare, helper_wb};
	for (int i = 0; i < 5; i++)
		if (all[i] && all[i] != e->home_wb && all[i] != e->home_wb2)
			free(all[i]);
	e->wb = e->home_wb;
	e->wb2 = e->home_wb2;
	e->pend = e->spare = NULL;
}

/* Cut the buffer from p (a record start) and hand the second half to the
 * helper; the cut, or NULL when there is none (too little left, no line
 * end, no helper). */
static const char *par_start(eng *e, const char *p)
{
	const char *end = e->buf + e->len;
	if (par_on == 1 && sysconf(_SC_NPROCESSORS_ONLN) < 2)
		par_on = -1;   /* asked once: a second thread would only wait */
	/* a buffer with records fast_run stops at is read here alone, after
	 * two tries */
	if (par_on != 1 || e->hp_failed || e->par_miss >= 2 || end - p < PAR_MIN)
		return NULL;
	const char *half = p + (end - p) * e->par_frac / 64;
	const char *nl = memchr(half, '\n', (size_t)(end - half));
	if (!nl || end - nl < 2)
		return NULL;
	if (!e->hp && !(e->hp = helper_start(e)))
		return NULL;
	helper *h = e->hp;
	char *wb = h->sh.wb ? h->sh.wb : im_xmalloc(WR_CAP);
	/* the engine as it stands, less the writer (its thread owns it) */
	memcpy(&h->sh, e, offsetof(eng, w));
	memcpy((char *)&h->sh + offsetof(eng, hp), (const char *)e + offsetof(eng, hp),
	       sizeof(eng) - offsetof(eng, hp));
	memcpy(&h->res, e->r, sizeof h->res);
	h->res.rows = h->res.corrected = h->res.blank = 0;
	h->sh.r = &h->res;
	h->sh.worker = 1;
	h->sh.hp = NULL;
	h->sh.pend = h->sh.spare = NULL;   /* this thread's */
	h->sh.wb = wb;
	h->sh.wl = 0;
	h->sh.span = nl + 1;
	h->sh.line = 0;
	/* and then the next read buffer, where a read cannot wait (a pipe
	 * could keep it waiting for bytes this buffer's output does not
	 * need) */
	h->ah_in = NULL;
	if (e->in_reg && !e->eof && !e->ah_have) {
		if (!e->ah_alloc)
			e->ah_alloc = im_xcalloc(RD_ALLOC, 1);
		h->ah_in = e->in;
		h->ah_dst = e->ah_alloc + RD_GAP;
	}
	pthread_mutex_lock(&h->mu);
	h->p = nl + 1;
	STORE(h->busy, 1);
	pthread_cond_broadcast(&h->cv);
	pthread_mutex_unlock(&h->mu);
	/* the output so far goes out here, while the helper works: two
	 * threads busy, not a third for the writes (the helper's share,
	 * par_frac, makes up for this thread's writing) */
	w_pend(e);
	w_sync(e, e->wb, e->wl);
	e->wl = 0;
	return nl + 1;
}

/* Wait for the helper's half; take it when this thread stopped at the cut
 * (*p, *col) at a record start, and move *p and *col to where the helper
 * stopped.  A half the helper has not begun (no processor free for it)
 * is taken back and done here. */
static void par_finish(eng *e, const char *cut, const char **p, int *col, int ok)
{
	helper *h = e->hp;
	/* who came first: the one who did not gets more next time */
	int first = LOAD(h->busy);
	/* a helper not yet started is given a moment before its half is
	 * taken back (no processor free for it, then), and the helper at
	 * work a moment to finish, before this thread sleeps */
	spin_until(&h->running, 1, &h->busy, 0, &h->spin_miss);
	spin_until(&h->busy, 0, &h->busy, 0, &h->spin_miss);
	pthread_mutex_lock(&h->mu);
	if (LOAD(h->busy) && !LOAD(h->running)) {
		STORE(h->busy, 0);
		pthread_mutex_unlock(&h->mu);
		return;
	}
	if (first)
		e->par_frac += e->par_frac < 56;
	else
		e->par_frac -= e->par_frac > 8;
	while (LOAD(h->busy))
		pthread_cond_wait(&h->cv, &h->mu);
	pthread_mutex_unlock(&h->mu);
	if (h->ah_in) {
		/* what it read ahead is the input's next bytes, whatever
		 * becomes of its half */
		e->ah_have = 1;
		e->ah_data = h->ah_dst;
		e->ah_len = h->ah_got;
		e->ah_eof = h->ah_eof;
		e->ah_err = h->ah_err;
		h->ah_in = NULL;
	}
	if (!ok || *p != cut || *col != 1 || e->werr) {
		e->par_miss++;
		return;
	}
	w_put(e, e->span, (size_t)(cut - e->span));
	if (h->sh.wl >= PAR_SWAP_MIN) {
		/* no copy of the helper's output: this thread's buffer is
		 * written first (at the next cut, or the next flush), the
		 * helper's becomes this thread's, and the helper takes the
		 * spare */
		w_pend(e);
		e->pend = e->wb;
		e->pendl = e->wl;
		e->wb = h->sh.wb;
		e->wl = h->sh.wl;
		h->sh.wb = e->spare;
		e->spare = NULL;
	} else {
		w_put(e, h->sh.wb, h->sh.wl);
	}
	e->span = h->sh.span;
	e->r->rows += h->res.rows;
	e->r->corrected += h->res.corrected;
	e->r->blank += h->res.blank;
	e->line += h->sh.line;
	*p = h->p;
	*col = h->col;
}

/* The rows from p on. */
static int run(eng *e, const char *p)
{
	for (;;) {
		const char *end = e->buf + e->len;
		if (p == end) {
			if (e->eof)
				return 0;
			int rc = refill(e, (size_t)(p - e->buf));
			if (rc < 0)
				return -1;
			p = e->buf;
			if (rc == 0 && e->len == 0)
				return 0;
			continue;
		}
		int col = 1;
		const char *cut = par_start(e, p);
		int frc = fast_run(e, &p, &col, cut ? cut : end);
		if (cut)
			par_finish(e, cut, &p, &col, frc == 0);
		if (frc < 0)
			return -1;
		if (e->werr)
			return write_failed(e);
		if (p == end && col == 1)
			continue;
		long rec_line = e->line;
		for (;;) {
			field f;
			int rc = scan(e, p, e->line, col, &f);
			if (rc == SCAN_MORE) {
				rc = refill(e, (size_t)(p - e->buf));
				if (rc < 0)
					return -1;
				p = e->buf;
				end = e->buf + e->len;
				continue;
			}
			if (rc == SCAN_ERR)
				return -1;
			int at_end = f.q == end || *f.q == '\n';
			if (col == 1 && at_end && !f.quoted &&
			    (f.q == p || (f.q == p + 1 && *p == '\r'))) {
				e->r->blank++;
			} else {
				if (col <= e->maxcol && e->corr[col - 1] &&
				    do_cell(e, &f, e->line, col) < 0)
					return -1;
				if (at_end && row_done(e, col, rec_line) < 0)
					return -1;
			}
			e->line += f.nl;
			if (!at_end) {
				p = f.q + 1;
				col++;
				continue;
			}
			if (f.q < end) {
				p = f.q + 1;
				e->line++;
			} else {
				p = f.q;
			}
			break;
		}
		if (e->werr)
			return write_failed(e);
	}
}

/* ---- the first record: delimiter, header, columns --------------------- */

typedef struct hdr {
	char **text;    /* each field's text: unquoted, blanks trimmed; owned */
	const char **cs, **ce; /* raw content bounds in the buffer */
	int n, cap;
	const char *end; /* after the record's terminator */
	int nl;          /* lines the record spans (newlines in it, terminator included) */
} hdr;

static void hdr_free(hdr *h)
{
	for (int i = 0; i < h->n; i++)
		free(h->text[i]);
	free(h->text);
	free(h->cs);
	free(h->ce);
}

static char pick_delim(const char *s, const char *end)
{
	long tab = 0, comma = 0, semi = 0;
	int inq = 0;
	for (const char *p = s; p < end; p++) {
		if (*p == '"')
			inq = !inq;
		else if (inq)
			continue;
		else if (*p == '\n')
			break;
		else if (*p == '\t')
			tab++;
		else if (*p == ',')
			comma++;
		else if (*p == ';')
			semi++;
	}
	if (tab >= comma && tab >= semi && tab > 0)
		return '\t';
	if (comma >= semi)
		return ',';
	return ';';
}

static int read_first(eng *e, const char *p, hdr *h)
{
	int col = 1;
	memset(h, 0, sizeof *h);
	for (;;) {
		field f;
		int rc = scan(e, p, e->line, col, &f);
		if (rc == SCAN_MORE)
			return im_fail(e->err, "%s:%ld: first record longer than %d KiB",
				       e->name, e->line, CORR_FIRST_MAX / 1024);
		if (rc == SCAN_ERR)
			return -1;
		if (f.q - e->buf > CORR_FIRST_MAX)
			return im_fail(e->err, "%s:%ld: first record longer than %d KiB",
				       e->name, e->line, CORR_FIRST_MAX / 1024);
		if (h->n == h->cap) {
			h->cap = h->cap ? 2 * h->cap : 16;
			h->text = im_xrealloc(h->text, (size_t)h->cap * sizeof *h->text);
			h->cs = im_xrealloc(h->cs, (size_t)h->cap * sizeof *h->cs);
			h->ce = im_xrealloc(h->ce, (size_t)h->cap * sizeof *h->ce);
		}
		const char *s = f.cs, *t = f.ce;
		trim(&s, &t);
		char *txt = im_xmalloc((size_t)(t - s) + 1), *o = txt;
		for (const char *c = s; c < t; c++) {
			*o++ = *c;
			if (f.quoted && *c == '"' && c + 1 < t && c[1] == '"')
				c++;
		}
		*o = '\0';
		h->text[h->n] = txt;
		h->cs[h->n] = f.cs;
		h->ce[h->n] = f.ce;
		h->n++;
		h->nl += f.nl;
		if (f.q < e->buf + e->len && *f.q == e->delim) {
			p = f.q + 1;
			col++;
			continue;
		}
		h->end = f.q < e->buf + e->len ? f.q + 1 : f.q;
		h->nl += f.q < e->buf + e->len;
		return 0;
	}
}

/* "a, b, c" (cut to fit) into dst. */
static void list_header(const hdr *h, char *dst, size_t n)
{
	size_t k = 0;
	dst[0] = '\0';
	for (int i = 0; i < h->n; i++) {
		char pv[48];
		preview(pv, sizeof pv, h->text[i], strlen(h->text[i]));
		int w = snprintf(dst + k, n - k, "%s%s", i ? ", " : "", pv);
		if (w < 0 || (size_t)w >= n - k) {
			if (n > 4)
				memcpy(dst + n - 4, "...", 4);
			return;
		}
		k += (size_t)w;
	}
}

static int all_digits(const char *s)
{
	if (!*s)
		return 0;
	for (; *s; s++)
		if (!is_digit((unsigned char)*s))
			return 0;
	return 1;
}

static int add_col(corr_result *r, int index, char *err)
{
	for (int i = 0; i < r->ncols; i++)
		if (r->cols[i].index == index)
			return 0;
	if (r->ncols == CORR_MAXCOLS)
		return im_fail(err, "more than %d columns to correct", CORR_MAXCOLS);
	memset(&r->cols[r->ncols], 0, sizeof r->cols[0]);
	r->cols[r->ncols].index = index;
	r->cols[r->ncols].unit_assumed = 1;
	r->ncols++;
	return 0;
}

static int cmp_col(const void *a, const void *b)
{
	const corr_column *x = a, *y = b;
	return (x->index > y->index) - (x->index < y->index);
}

/* Choose the columns and decide about the header. */
static int choose(eng *e, const hdr *h)
{
	corr_result *r = e->r;
	const corr_opts *o = e->o;
	char list[160];
	int named = 0;
	list_header(h, list, sizeof list);
	if (o->ncolumns > 0) {
		for (int i = 0; i < o->ncolumns; i++) {
			const char *spec = o->columns[i];
			int idx = -1;
			if (all_digits(spec)) {
				long v = strlen(spec) > 7 ? COL_NUMBER_MAX + 1 : strtol(spec, NULL, 10);
				if (v < 1 || v > COL_NUMBER_MAX)
					return im_fail(e->err, "column number %.20s is out of range"
						       " (1 to %d)", spec, COL_NUMBER_MAX);
				idx = (int)v;
			} else {
				for (int j = 0; j < h->n && idx < 0; j++)
					if (strcmp(h->text[j], spec) == 0)
						idx = j + 1;
				for (int j = 0; j < h->n && idx < 0; j++)
					if (im_strcaseeq(h->text[j], spec))
						idx = j + 1;
				if (idx < 0) {
					char pv[48];
					preview(pv, sizeof pv, spec, strlen(spec));
					return im_fail(e->err, "%s: no column named '%s'; the first row"
						       " has: %s", e->name, pv, list);
				}
				named = 1;
			}
			if (add_col(r, idx, e->err) < 0)
				return -1;
		}
		/* a header: text in a chosen column of the first row, or, when the
		 * row has none of them, text anywhere in it */
		int present = 0;
		r->header = named;
		for (int i = 0; i < r->ncols && !r->header; i++) {
			int c = r->cols[i].index - 1;
			num m;
			present |= c < h->n;
			if (c < h->n && parse_num(h->cs[c], h->ce[c], e->tab_blank, &m) < 0)
				r->header = 1;
		}
		for (int j = 0; j < h->n && !r->header && !present; j++) {
			num m;
			r->header = parse_num(h->cs[j], h->ce[j], e->tab_blank, &m) < 0;
		}
		if (r->header)
			for (int i = 0; i < r->ncols; i++)
				if (r->cols[i].index > h->n)
					return im_fail(e->err, "%s: no column %d; the header has %d"
						       " column%s: %s", e->name, r->cols[i].index,
						       h->n, h->n == 1 ? "" : "s", list);
	} else {
		for (int j = 0; j < h->n; j++)
			if (corr_voltage_header(h->text[j], strlen(h->text[j]), NULL, NULL) &&
			    add_col(r, j + 1, e->err) < 0)
				return -1;
		if (r->ncols == 0) {
			int text = 0;
			for (int j = 0; j < h->n; j++) {
				num m;
				text |= parse_num(h->cs[j], h->ce[j], e->tab_blank, &m) < 0;
			}
			if (text)
				return im_fail(e->err, "%s: no voltage column in the header (%s);"
					       " give one with `column N|NAME`", e->name, list);
			return im_fail(e->err, "%s: no header row to find a voltage column in;"
				       " give one with `column N`", e->name);
		}
		r->header = 1;
	}
	qsort(r->cols, (size_t)r->ncols, sizeof r->cols[0], cmp_col);
	for (int i = 0; i < r->ncols; i++) {
		corr_column *c = &r->cols[i];
		c->unit_exp = 0;
		c->unit_assumed = 1;
		c->name[0] = '\0';
		if (r->header && c->index <= h->n) {
			const char *t = h->text[c->index - 1];
			snprintf(c->name, sizeof c->name, "%s", t);
			int ux, assumed;
			if (corr_voltage_header(t, strlen(t), &ux, &assumed) && !assumed) {
				c->unit_exp = ux;
				c->unit_assumed = 0;
			}
		}
	}
	return 0;
}

/* The engine buffers (the read buffer and two write buffers) are kept for
 * the next run rather than freed: a megabyte and more allocated and freed
 * per call dominates the cost of correcting a short file.  A run that
 * starts while another holds them (not done today: ionmix runs one
 * correction at a time) gets its own.  The kept ones stay reachable until
 * exit. */
static char *kept_rd, *kept_wr, *kept_wr2;
static int kept_busy;

static void bufs_get(char **rd, char **wr, char **wr2)
{
	if (!kept_busy) {
		kept_busy = 1;
		if (!kept_rd) {
			kept_rd = im_xcalloc(RD_ALLOC, 1);
			kept_wr = im_xmalloc(WR_CAP);
			kept_wr2 = im_xmalloc(WR_CAP);
		}
		*rd = kept_rd;
		*wr = kept_wr;
		*wr2 = kept_wr2;
		return;
	}
	*rd = im_xcalloc(RD_ALLOC, 1);
	*wr = im_xmalloc(WR_CAP);
	*wr2 = im_xmalloc(WR_CAP);
}

/* Give back what bufs_get gave (the write buffers in either order). */
static void bufs_put(char *rd, char *wr, char *wr2)
{
	if (rd == kept_rd) {
		kept_busy = 0;
		return;
	}
	free(rd);
	free(wr);
	free(wr2);
}

/* The metadata lines from *p on: the first o->skip lines, then lines that
 * start with '#'.  They are copied as they are (written when the buffer
 * moves on); a comment line follows when asked.  On return *p is the
 * first byte of the header, at the start of the buffer when any metadata
 * was passed so that the header has the whole buffer.  0 or -1. */
static int metadata(eng *e, const char **p)
{
	const char *q = *p;
	int hash = 0, crlf = 0;
	for (;;) {
		const char *end = e->buf + e->len;
		if (q == end) {
			if (e->eof)
				break;
			if (refill(e, (size_t)(q - e->buf)) < 0)
				return -1;
			q = e->buf;
			continue;
		}
		/* past the count: '#' lines, and blank lines after metadata */
		if (e->r->meta >= e->o->skip && *q != '#' &&
		    !(e->r->meta > 0 && (*q == '\n' || (*q == '\r' && q + 1 < end && q[1] == '\n'))))
			break;
		const char *nl = memchr(q, '\n', (size_t)(end - q));
		if (!nl && !e->eof) {
			if (q == e->buf && e->len == RD_CAP)
				return im_fail(e->err, "%s:%ld: metadata line longer than %d KiB",
					       e->name, e->line, RD_CAP / 1024);
			if (refill(e, (size_t)(q - e->buf)) < 0)
				return -1;
			q = e->buf;
			continue;
		}
		const char *le = nl ? nl : end;
		if (memchr(q, '\0', (size_t)(le - q)))
			return im_fail(e->err, "%s:%ld: binary file (NUL byte); expected CSV"
				       " or TSV text", e->name, e->line);
		hash |= *q == '#';
		crlf = nl && nl > q && nl[-1] == '\r';
		e->r->meta++;
		if (!nl) {
			q = end;
			break;
		}
		q = nl + 1;
		e->line++;
	}
	if (e->r->meta == 0) {
		*p = q;
		return 0;
	}
	/* the header at the start of the buffer: the metadata is written */
	if (q != e->buf && refill(e, (size_t)(q - e->buf)) < 0)
		return -1;
	if (hash && e->o->comment) {
		size_t n = corr_comment_format(&e->o->ljp, e->o->config, e->o->about,
					       NULL, 0);
		char *c = im_xmalloc(n + 3);
		corr_comment_format(&e->o->ljp, e->o->config, e->o->about, c, n + 1);
		memcpy(c + n, crlf ? "\r\n" : "\n", crlf ? 3 : 2);
		w_put(e, c, n + (crlf ? 2 : 1));
		free(c);
		e->r->comment = 1;
	}
	*p = e->buf;
	return 0;
}

int corr_stream(FILE *in, const char *in_name, FILE *out, const corr_opts *o,
		corr_result *r, char *err)
{
	eng e;
	hdr h;
	int rc = -1, bom;
	size_t got;
	const char *start;

	memset(r, 0, sizeof *r);
	r->ljp = o->ljp;
	r->ljp_mV = corr_ljp_mV(&o->ljp);
	r->delim = ',';
	r->config = o->config;
	r->about = o->about;
	if (o->skip < 0)
		return im_fail(err, "bad count of metadata lines %ld", o->skip);
	if ((int)o->config < CORR_WHOLE_CELL || (int)o->config > CORR_CELL_ATTACHED)
		return im_fail(err, "bad recording configuration %d", (int)o->config);
	if (o->ljp.decimals < 0 || o->ljp.decimals > CORR_LJP_DECIMALS_MAX)
		return im_fail(err, "bad LJP decimals %d", o->ljp.decimals);
	if (o->ncolumns < 0 || (o->ncolumns > 0 && !o->columns))
		return im_fail(err, "bad column list");
	memset(&e, 0, sizeof e);
	memset(&h, 0, sizeof h);
	e.in = in;
	{
		/* the helper may read ahead, except from what can keep a
		 * read waiting (a pipe, a socket, a terminal) */
		struct stat st;
		int fd = fileno(in);
		e.in_reg = fd < 0 || (fstat(fd, &st) == 0 && !S_ISFIFO(st.st_mode) &&
				      !S_ISSOCK(st.st_mode) && !S_ISCHR(st.st_mode));
	}
	e.out = out;
	e.name = in_name ? in_name : "input";
	e.o = o;
	e.r = r;
	e.err = err;
	e.line = 1;
	bufs_get(&e.buf, &e.wb, &e.wb2);
	e.rd_home = e.rd_alloc = e.buf;
	e.home_wb = e.wb;
	e.home_wb2 = e.wb2;
	e.par_frac = 32;
	dig3_init();

	errno = 0;
	got = fread(e.buf, 1, RD_CAP, in);
	e.len = got;
	e.buf[got] = '\0';
	if (got < RD_CAP) {
		if (ferror(in)) {
			im_fail(err, "%s: read error: %s", e.name, strerror(errno ? errno : EIO));
			goto done;
		}
		e.eof = 1;
	}
	e.span = e.buf;
	if (got == 0) {
		im_fail(err, "%s: empty file", e.name);
		goto done;
	}
	const char *nul = memchr(e.buf, '\0', got);
	if (nul) {
		long line = 1;
		for (const char *s = e.buf; s < nul; s++)
			line += *s == '\n';
		im_fail(err, "%s:%ld: binary file (NUL byte); expected CSV or TSV text",
			e.name, line);
		goto done;
	}
	bom = got >= 3 && memcmp(e.buf, "\xef\xbb\xbf", 3) == 0;
	start = e.buf + (bom ? 3 : 0);
	if (metadata(&e, &start) < 0)
		goto done;
	if (*start == '\n' || (start[0] == '\r' && start[1] == '\n')) {
		const char *s = start;
		while (s < e.buf + e.len && is_blank((unsigned char)*s))
			s++;
		if (s == e.buf + e.len && e.eof)
			im_fail(err, "%s: empty file (blank lines only)", e.name);
		else if (r->meta == 0)
			im_fail(err, "%s:1: the first line is blank; expected a header"
				" or a data row", e.name);
		else
			im_fail(err, "%s:%ld: the line after the metadata is blank; expected"
				" a header or a data row", e.name, e.line);
		goto done;
	}
	if (start == e.buf + e.len) {
		im_fail(err, "%s: only %ld metadata line%s, no header or data", e.name,
			r->meta, r->meta == 1 ? "" : "s");
		goto done;
	}
	e.delim = pick_delim(start, e.buf + e.len);
	r->delim = e.delim;
	e.tab_blank = e.delim != '\t';
	e.stop_u[(unsigned char)e.delim] = 1;
	e.stop_u['\n'] = 1;
	e.stop_u[0] = 1;
	e.stop_q['"'] = 1;
	e.stop_q[0] = 1;

	if (read_first(&e, start, &h) < 0 || choose(&e, &h) < 0)
		goto done;
	e.maxcol = r->cols[r->ncols - 1].index;
	e.corr = im_xcalloc((size_t)e.maxcol, 1);
	for (int i = 0; i < r->ncols; i++) {
		e.corr[r->cols[i].index - 1] = (unsigned char)(i + 1);
		ljp_prepare(&o->ljp, r->cols[i].unit_exp, &e.prep[i]);
		e.prep[i].flip = o->config == CORR_INSIDE_OUT || o->config == CORR_CELL_ATTACHED;
	}
	if (r->header) {
		e.line += h.nl;
		start = h.end;
	}
	if (run(&e, start) < 0)
		goto done;
	e.last = 1;
	w_put(&e, e.span, (size_t)(e.buf + e.len - e.span));
	w_flush(&e);
	writer_stop(&e);   /* every byte written before the verdict */
	if (e.werr) {
		write_failed(&e);
		goto done;
	}
	rc = 0;
done:
	hdr_free(&h);
	free(e.corr);
	writer_stop(&e);
	bufs_home(&e, helper_stop(&e));
	free(e.rd_alloc == e.rd_home ? e.ah_alloc : e.rd_alloc);
	bufs_put(e.rd_home, e.wb, e.wb2);
	return rc;
}

/* ---- files ------------------------------------------------------------ */

const char *corr_config_name(corr_config c)
{
	switch (c) {
	case CORR_OUTSIDE_OUT: return "outside-out";
	case CORR_INSIDE_OUT: return "inside-out";
	case CORR_CELL_ATTACHED: return "cell-attached";
	default: return "whole-cell";
	}
}

int corr_config_parse(const char *word, corr_config *c)
{
	static const corr_config all[] = {CORR_WHOLE_CELL, CORR_OUTSIDE_OUT,
					  CORR_INSIDE_OUT, CORR_CELL_ATTACHED};
	for (size_t i = 0; i < IM_COUNT(all); i++)
		if (strcmp(word, corr_config_name(all[i])) == 0) {
			*c = all[i];
			return 0;
		}
	return -1;
}

const char *corr_config_formula(corr_config c)
{
	switch (c) {
	case CORR_INSIDE_OUT: return "Vm = -(Vrecorded - LJP)";
	case CORR_CELL_ATTACHED: return "Vpatch - Vrest = -(Vrecorded - LJP)";
	default: return "Vm = Vrecorded - LJP";
	}
}

void corr_about_stamp(corr_about *a, char *datebuf, size_t n)
{
	time_t t = time(NULL);
	struct tm tm;
	a->version = IONMIX_VERSION;
	if (n > 0 && gmtime_r(&t, &tm) && strftime(datebuf, n, "%Y-%m-%dT%H:%M:%SZ", &tm) > 0)
		a->date = datebuf;
	else
		a->date = NULL;
}

/* A growing text; put() appends like printf, without a limit. */
typedef struct text {
	char *s;
	size_t n, cap;
} text;

static void put(text *t, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void put(text *t, const char *fmt, ...)
{
	va_list ap;
	va_start(ap, fmt);
	int w = vsnprintf(t->s ? t->s + t->n : NULL, t->s ? t->cap - t->n : 0, fmt, ap);
	va_end(ap);
	if (w < 0)
		return;
	if (!t->s || (size_t)w >= t->cap - t->n) {
		size_t need = t->n + (size_t)w + 1;
		t->cap = need > 2 * t->cap ? need : 2 * t->cap;
		t->s = im_xrealloc(t->s, t->cap);
		va_start(ap, fmt);
		vsnprintf(t->s + t->n, t->cap - t->n, fmt, ap);
		va_end(ap);
	}
	t->n += (size_t)w;
}

/* Copy the text into buf of n bytes, cut to n - 1, and free it.  Returns
 * the length copied. */
static size_t text_out(text *t, char *buf, size_t n)
{
	size_t k = t->n < n ? t->n : n ? n - 1 : 0;
	if (n > 0) {
		if (k)
			memcpy(buf, t->s, k);
		buf[k] = '\0';
	}
	free(t->s);
	return k;
}

/* What the LJP came from: shared by the note and the comment line. */
static void put_about(text *t, const corr_ljp *l, const corr_about *a, const char *sep)
{
	char ljp[32];
	corr_ljp_format(l, ljp, sizeof ljp);
	put(t, "LJP: %s mV%s", ljp, sep);
	put(t, "LJP range: %s%s", a && a->range ? a->range : "not known", sep);
	if (a && a->model) {
		put(t, "model: %s%s", a->model, sep);
		put(t, "pipette: %s%s", a->pipette ? a->pipette : "-", sep);
		put(t, "bath: %s%s", a->bath ? a->bath : "-", sep);
	} else {
		put(t, "model: none (the LJP as given)%s", sep);
	}
	if (a && isfinite(a->temperature_C))
		put(t, "temperature: %.1f C%s", a->temperature_C, sep);
	put(t, "ionmix: %s%s", a && a->version ? a->version : IONMIX_VERSION, sep);
	if (a && a->date)
		put(t, "date: %s%s", a->date, sep);
}

size_t corr_comment_format(const corr_ljp *l, corr_config c, const corr_about *a,
			   char *buf, size_t n)
{
	text t = {0};
	put(&t, "# ionmix correct: %s, %s; ", corr_config_formula(c), corr_config_name(c));
	put_about(&t, l, a, "; ");
	t.n -= 2;  /* the last separator */
	t.s[t.n] = '\0';
	/* names come from the user: no line end may enter the file */
	for (size_t i = 0; i < t.n; i++)
		if (t.s[i] == '\n' || t.s[i] == '\r')
			t.s[i] = ' ';
	size_t len = t.n;
	if (!buf || n == 0) {
		free(t.s);
		return len;
	}
	text_out(&t, buf, n);
	return len;
}

/* The note's text into *t (empty on entry). */
static void note_text(text *t, const corr_result *r, const char *in_name,
		      const char *out_name)
{
	put(t, "ionmix correct: the liquid junction potential was subtracted"
	    " (%s)\n", corr_config_formula(r->config));
	put(t, "recording configuration: %s\n", corr_config_name(r->config));
	put(t, "sign: the LJP is the potential of the bath relative to the pipette"
	    " solution, at zeroing\n");
	put_about(t, &r->ljp, r->about, "\n");
	put(t, "input: %s\n", in_name ? in_name : "-");
	if (out_name)
		put(t, "output: %s\n", out_name);
	if (r->meta)
		put(t, "metadata lines kept: %ld%s\n", r->meta,
		    r->comment ? " (and a comment line added after them)" : "");
	put(t, "columns:");
	for (int i = 0; i < r->ncols; i++) {
		const corr_column *c = &r->cols[i];
		const char *unit = c->unit_exp == -3 ? "V" : c->unit_exp == 3 ? "uV" : "mV";
		put(t, "%s %d", i ? ";" : "", c->index);
		if (c->name[0])
			put(t, " \"%s\"", c->name);
		put(t, " in %s%s", unit, c->unit_assumed ? " (assumed)" : "");
	}
	put(t, "\n");
	put(t, "delimiter: %s; header row: %s\n", corr_delim_name(r->delim),
	    r->header ? "yes" : "no");
	put(t, "rows: %ld; corrected: %ld; skipped: %ld (not a number or missing: %ld;"
	    " ragged rows: %ld); blank lines: %ld\n", r->rows, r->corrected,
	    r->skipped, r->bad, r->ragged, r->blank);
}

size_t corr_note_format(const corr_result *r, const char *in_name,
			const char *out_name, char *buf, size_t n)
{
	text t = {0};
	note_text(&t, r, in_name, out_name);
	return text_out(&t, buf, n);
}

/* 1 when path names the input: the same file as in_path, or the file open
 * as the input (si, its fstat; covers standard input). */
static int is_input(const char *path, const char *in_path, const struct stat *si)
{
	struct stat st;
	if (in_path && fio_same_file(path, in_path))
		return 1;
	return si && strcmp(path, "-") != 0 && stat(path, &st) == 0 &&
	       st.st_dev == si->st_dev && st.st_ino == si->st_ino;
}

int corr_file(const char *in_path, const char *out_path, FILE *out_fp,
	      const corr_opts *o, corr_result *r, char *err)
{
	struct stat si;
	int from_stdin = strcmp(in_path, "-") == 0, rc = -1;
	const char *in_name = from_stdin ? "standard input" : in_path;
	const struct stat *sip = NULL;
	FILE *in, *fp, *nfp = NULL;
	char *note = NULL;
	fio_batch b;

	memset(r, 0, sizeof *r);
	in = from_stdin ? stdin : fopen(in_path, "rb");
	if (!in)
		return im_fail(err, "cannot open %s: %s", in_path, strerror(errno));
	if (fstat(fileno(in), &si) == 0) {
		sip = &si;
		if (S_ISDIR(si.st_mode)) {
			if (!from_stdin)
				fclose(in);
			return im_fail(err, "%s is a directory, not a CSV or TSV file", in_name);
		}
	}
	if (!out_path) {
		if (!out_fp) {
			if (!from_stdin)
				fclose(in);
			return im_fail(err, "no output given");
		}
		rc = corr_stream(in, in_name, out_fp, o, r, err);
		if (rc == 0 && fflush(out_fp) != 0)
			rc = im_fail(err, "cannot write the output: %s", strerror(errno));
		if (!from_stdin)
			fclose(in);
		return rc;
	}
	fio_batch_init(&b);
	note = im_xmalloc(strlen(out_path) + sizeof CORR_NOTE_SUFFIX);
	sprintf(note, "%s%s", out_path, CORR_NOTE_SUFFIX);
	/* before anything is written: no output may be the input */
	if (is_input(out_path, from_stdin ? NULL : in_path, sip)) {
		im_fail(err, "%s is the input file; write to another name", out_path);
		goto done;
	}
	if (strcmp(out_path, "-") != 0 && is_input(note, from_stdin ? NULL : in_path, sip)) {
		im_fail(err, "the side note %s would replace the input file; write the"
			" output under another name", note);
		goto done;
	}
	if (fio_batch_open(&b, out_path, &fp, err) < 0)
		goto done;
	/* a note only beside a file that is replaced as a whole */
	if (!fio_is_direct(b.f[0]) && fio_batch_open(&b, note, &nfp, err) < 0)
		goto done;
	if (corr_stream(in, in_name, fp, o, r, err) < 0)
		goto done;
	if (nfp) {
		text t = {0};
		note_text(&t, r, in_name, out_path);
		size_t w = fwrite(t.s, 1, t.n, nfp);
		free(t.s);
		if (w != t.n) {
			im_fail(err, "cannot write %s: %s", note, strerror(errno));
			goto done;
		}
	}
	/* the data, then the note: never a note without its data */
	if (fio_batch_commit(&b, err) < 0)
		goto done;
	r->note = nfp != NULL;
	rc = 0;
done:
	if (rc < 0)
		fio_batch_abort(&b);  /* a no-op after a failed commit */
	free(note);
	if (!from_stdin)
		fclose(in);
	return rc;
}
