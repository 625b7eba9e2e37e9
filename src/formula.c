/*
 * formula.c - chemical formulas to formula weights and charges.  See
 * formula.h for the grammar.
 */
#include "formula.h"

#include "common.h"

#include <ctype.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Standard atomic weights, g/mol, elements 1-92 (Tc and Pm: the mass
 * number of the longest-lived isotope, as the table gives).  Source:
 * Coplen, Atomic Weights of the Elements 1999, Pure Appl Chem 73:667
 * (2001), with the changes of the 2001 review, as tabulated by NIST
 * (Coursey, Schwab & Dragoset) and shipped in Debian's
 * python3-periodictable 1.6.0 (periodictable.mass); copied from that
 * package, not recalled.  Later IUPAC revisions move H, C, N, O, Cl and
 * others by less than 0.001 g/mol, below what a balance resolves. */
static const struct {
	const char *sym;
	double g_mol;
} weights[] = {
	{"H", 1.00794},
	{"He", 4.002602},
	{"Li", 6.941},
	{"Be", 9.012182},
	{"B", 10.811},
	{"C", 12.0107},
	{"N", 14.0067},
	{"O", 15.9994},
	{"F", 18.9984032},
	{"Ne", 20.1797},
	{"Na", 22.98977},
	{"Mg", 24.305},
	{"Al", 26.981538},
	{"Si", 28.0855},
	{"P", 30.973761},
	{"S", 32.065},
	{"Cl", 35.453},
	{"Ar", 39.948},
	{"K", 39.0983},
	{"Ca", 40.078},
	{"Sc", 44.95591},
	{"Ti", 47.867},
	{"V", 50.9415},
	{"Cr", 51.9961},
	{"Mn", 54.938049},
	{"Fe", 55.845},
	{"Co", 58.9332},
	{"Ni", 58.6934},
	{"Cu", 63.546},
	{"Zn", 65.409},
	{"Ga", 69.723},
	{"Ge", 72.64},
	{"As", 74.9216},
	{"Se", 78.96},
	{"Br", 79.904},
	{"Kr", 83.798},
	{"Rb", 85.4678},
	{"Sr", 87.62},
	{"Y", 88.90585},
	{"Zr", 91.224},
	{"Nb", 92.90638},
	{"Mo", 95.94},
	{"Tc", 98},
	{"Ru", 101.07},
	{"Rh", 102.9055},
	{"Pd", 106.42},
	{"Ag", 107.8682},
	{"Cd", 112.411},
	{"In", 114.818},
	{"Sn", 118.71},
	{"Sb", 121.76},
	{"Te", 127.6},
	{"I", 126.90447},
	{"Xe", 131.293},
	{"Cs", 132.90545},
	{"Ba", 137.327},
	{"La", 138.9055},
	{"Ce", 140.116},
	{"Pr", 140.90765},
	{"Nd", 144.24},
	{"Pm", 145},
	{"Sm", 150.36},
	{"Eu", 151.964},
	{"Gd", 157.25},
	{"Tb", 158.92534},
	{"Dy", 162.5},
	{"Ho", 164.93032},
	{"Er", 167.259},
	{"Tm", 168.93421},
	{"Yb", 173.04},
	{"Lu", 174.967},
	{"Hf", 178.49},
	{"Ta", 180.9479},
	{"W", 183.84},
	{"Re", 186.207},
	{"Os", 190.23},
	{"Ir", 192.217},
	{"Pt", 195.078},
	{"Au", 196.96655},
	{"Hg", 200.59},
	{"Tl", 204.3833},
	{"Pb", 207.2},
	{"Bi", 208.98038},
	{"Po", 209},
	{"At", 210},
	{"Rn", 222},
	{"Fr", 223},
	{"Ra", 226},
	{"Ac", 227},
	{"Th", 232.0381},
	{"Pa", 231.03588},
	{"U", 238.02891},
};

#define MAX_DEPTH 8

const char *formula_weights_source(void)
{
	return "Coplen, Atomic Weights of the Elements 1999, Pure Appl Chem 73:667 (2001), "
	       "as tabulated by NIST and in python3-periodictable 1.6.0";
}

static int find_element(const char *s, size_t len)
{
	for (size_t i = 0; i < IM_COUNT(weights); i++) {
		if (strlen(weights[i].sym) == len && strncmp(weights[i].sym, s, len) == 0)
			return (int)i;
	}
	return -1;
}

double formula_atomic_weight(const char *sym)
{
	int k = sym ? find_element(sym, strlen(sym)) : -1;
	return k < 0 ? NAN : weights[k].g_mol;
}

typedef struct parser {
	const char *text; /* whole formula, for messages */
	const char *p;    /* cursor */
	char *err;
	double count[IM_COUNT(weights)];
} parser;

static int fail_at(parser *ps, const char *what)
{
	return im_fail(ps->err, "formula '%.60s': %s at position %d", ps->text, what,
		       (int)(ps->p - ps->text) + 1);
}

/* number := digits [ '.' digits ]; *has = 0 when there is none (count 1).
 * Only a leading coefficient (lead = 1, '0.5H2O') may have decimals: after
 * an element or a bracket '2.6H2O' reads as 2, then the hydrate dot. */
static int number(parser *ps, double *v, int *has, int lead)
{
	const char *s = ps->p;
	*has = 0;
	*v = 1;
	if (!isdigit((unsigned char)*s))
		return 0;
	double x = 0;
	while (isdigit((unsigned char)*s))
		x = x * 10 + (*s++ - '0');
	if (lead && *s == '.' && isdigit((unsigned char)s[1])) {
		double scale = 0.1;
		s++;
		while (isdigit((unsigned char)*s)) {
			x += (*s++ - '0') * scale;
			scale /= 10;
		}
	}
	ps->p = s;
	if (!(x > 0) || x > 1e6)
		return fail_at(ps, "a count must be above 0 and at most 1e6");
	*v = x;
	*has = 1;
	return 0;
}

static int groups(parser *ps, double mult, int depth, char close);

/* One group; *got = 0 when the cursor is not at a group. */
static int group(parser *ps, double mult, int depth, int *got)
{
	const char *s = ps->p;
	*got = 0;
	if (*s == '(' || *s == '[') {
		char close = *s == '(' ? ')' : ']';
		if (depth >= MAX_DEPTH)
			return fail_at(ps, "parentheses nested too deeply");
		/* the count follows the closing bracket: find it first */
		const char *q = s + 1;
		int level = 1;
		while (*q && level > 0) {
			if (*q == '(' || *q == '[')
				level++;
			else if (*q == ')' || *q == ']')
				level--;
			q++;
		}
		if (level != 0)
			return fail_at(ps, "an unclosed parenthesis");
		parser save = *ps;
		ps->p = q;
		double n;
		int has;
		if (number(ps, &n, &has, 0) != 0)
			return -1;
		const char *after = ps->p;
		*ps = save;
		ps->p = s + 1;
		if (groups(ps, mult * n, depth + 1, close) != 0)
			return -1;
		if (*ps->p != close)
			return fail_at(ps, "a mismatched parenthesis");
		ps->p = after;
		*got = 1;
		return 0;
	}
	if (isupper((unsigned char)*s)) {
		size_t len = islower((unsigned char)s[1]) ? 2 : 1;
		int k = find_element(s, len);
		if (k < 0) {
			char sym[3] = {s[0], len == 2 ? s[1] : '\0', '\0'};
			return im_fail(ps->err, "formula '%.60s': unknown element '%s'", ps->text, sym);
		}
		ps->p = s + len;
		double n;
		int has;
		if (number(ps, &n, &has, 0) != 0)
			return -1;
		ps->count[k] += mult * n;
		*got = 1;
		return 0;
	}
	return 0;
}

static int groups(parser *ps, double mult, int depth, char close)
{
	int any = 0, got;
	for (;;) {
		if (group(ps, mult, depth, &got) != 0)
			return -1;
		if (!got)
			break;
		any = 1;
	}
	if (!any)
		return fail_at(ps, close ? "an empty group" : "an element expected");
	return 0;
}

static int separator(parser *ps)
{
	const unsigned char *s = (const unsigned char *)ps->p;
	if (*s == '.' || *s == '*') {
		ps->p += 1;
		return 1;
	}
	if (s[0] == 0xC2 && s[1] == 0xB7) {
		ps->p += 2;
		return 1;
	}
	return 0;
}

static int charge(parser *ps, int *z)
{
	const char *s = ps->p;
	*z = 0;
	if (*s == '^') {
		s++;
		int n = 0, digits = 0;
		while (isdigit((unsigned char)*s) && digits < 2) {
			n = n * 10 + (*s++ - '0');
			digits++;
		}
		if (!digits)
			n = 1;
		if (*s != '+' && *s != '-') {
			ps->p = s;
			return fail_at(ps, "a charge needs '+' or '-'");
		}
		if (n < 1 || n > 9) {
			ps->p = s;
			return fail_at(ps, "a charge must be 1 to 9");
		}
		*z = *s == '+' ? n : -n;
		ps->p = s + 1;
		return 0;
	}
	if (*s == '+' || *s == '-') {
		char sign = *s;
		int n = 0;
		while (*s == sign && n < 10) {
			n++;
			s++;
		}
		*z = sign == '+' ? n : -n;
		ps->p = s;
	}
	return 0;
}

int formula_parse(const char *text, formula_info *out, char *err)
{
	parser ps = {.text = text ? text : "", .p = text ? text : "", .err = err};
	if (*ps.p == '\0')
		return im_fail(err, "an empty formula");
	do {
		double mult;
		int has;
		if (number(&ps, &mult, &has, 1) != 0)
			return -1;
		if (groups(&ps, mult, 0, 0) != 0)
			return -1;
	} while (separator(&ps));
	int z;
	if (charge(&ps, &z) != 0)
		return -1;
	if (*ps.p != '\0')
		return fail_at(&ps, "an unexpected character");
	double fw = 0;
	int n = 0;
	for (size_t i = 0; i < IM_COUNT(weights); i++) {
		if (ps.count[i] > 0) {
			fw += ps.count[i] * weights[i].g_mol;
			n++;
		}
	}
	out->fw_g_mol = fw;
	out->charge = z;
	out->elements = n;
	return 0;
}
