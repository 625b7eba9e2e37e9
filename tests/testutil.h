/*
 * testutil.h - helpers shared by the cmocka tests.
 * cmocka 1.1.5's assert_float_equal works in float precision, so doubles
 * are compared with assert_close(actual, expected, rel, abs): it passes
 * when |a-e| <= abs or |a-e| <= rel*|e|, and prints both values otherwise.
 */
#ifndef IONMIX_TESTUTIL_H
#define IONMIX_TESTUTIL_H

#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <cmocka.h>

#define assert_close(a, e, rel, abs_) \
	assert_close_at((a), (e), (rel), (abs_), #a, __FILE__, __LINE__)

static inline void assert_close_at(double a, double e, double rel, double abs_,
				   const char *what, const char *file, int line)
{
	double d = fabs(a - e);
	if (isfinite(a) && (d <= abs_ || d <= rel * fabs(e)))
		return;
	fail_msg("%s:%d: %s = %.12g, expected %.12g (rel %g, abs %g)", file,
		 line, what, a, e, rel, abs_);
}

#endif
