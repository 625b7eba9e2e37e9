/*
 * review.h - the checks a careful electrophysiologist runs on a pipette |
 * bath pair before mixing (osmolality, pH and buffer capacity, free Ca2+
 * and Mg2+, charge balance, equilibrium potentials, LJP, the ground,
 * hazards), each with a verdict and the number behind it.  A report, not
 * a printout: cmd_review.c renders it.
 */
#ifndef IONMIX_REVIEW_H
#define IONMIX_REVIEW_H

#include "session.h"

enum { REVIEW_FINE, REVIEW_CHECK, REVIEW_PROBLEM };

typedef struct review_item {
	char *check;    /* what is checked, e.g. "osmolality pipette"; owned */
	int verdict;    /* REVIEW_FINE, REVIEW_CHECK or REVIEW_PROBLEM */
	double value;   /* the number behind it in `unit`; NAN: none */
	char *unit;     /* "mOsm/kg", "mV", "mM", "nM", "mEq/L", "mM/pH", "" (pH); owned */
	char *note;     /* one line of explanation, any length; owned */
} review_item;

typedef struct review_report {
	review_item *it; /* owned */
	int n, cap;
	int count[3];    /* items per verdict */
	double temp_C;
} review_report;

/* Review pipette sp against bath sb at the session's temperature and
 * model.  0 with *r filled (free with review_free), or -1 with err (an
 * empty solution, a failed computation); *r is empty then. */
int review_pair(session *ses, const solution *sp, const solution *sb, review_report *r,
		char *err);
void review_free(review_report *r);

/* "fine", "check" or "problem". */
const char *review_verdict_name(int verdict);

#endif
