/*
 * fuzz_units.c - libFuzzer target for number, amount and volume parsing
 * and the unit-aware formatters.
 *
 * Input: the first byte picks a formula weight and a significant-digit
 * count; the rest is "NUMBER" or "NUMBER\nUNIT" (cut at a further line
 * break: words never hold one).  Checks, besides the
 * sanitizers: every accepted value is finite; amounts are in
 * (0, UNITS_MAX_mM] (and at least 1 fM), volumes in (0, 100 L]; a
 * rejection has a one-line message; the formatters stay inside their
 * buffers, NUL-terminate, and never print NaN or infinity for a finite
 * value.
 */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "units.h"

#include "fuzzutil.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void check_format(double v, int sig)
{
	char small[8], big[64];
	memset(small, 'x', sizeof small);
	units_fmt_conc(small, sizeof small, v, sig & 1);
	FZ_CHECK(memchr(small, '\0', sizeof small) != NULL, "units_fmt_conc unterminated");
	units_fmt_conc(big, sizeof big, v, sig & 1);
	FZ_CHECK(strlen(big) < sizeof big, "long");
	if (isfinite(v))
		fz_check_finite_text(big, strlen(big), "", 0);
	units_fmt_sig(small, sizeof small, v, sig);
	FZ_CHECK(memchr(small, '\0', sizeof small) != NULL, "units_fmt_sig unterminated");
	units_fmt_sig(big, sizeof big, v, sig);
	if (isfinite(v))
		fz_check_finite_text(big, strlen(big), "", 0);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	/* formula weights, g/mol: ordinary, zero, negative, non-finite, extreme */
	static const double fws[8] = {58.44, 0.0, -1.0, NAN, 1e-300, 1e300, 342.3, INFINITY};
	char err[IM_ERRLEN], *num, *unit = NULL, *nl;
	double v, mM, mL, fw;
	int sig;
	if (size == 0)
		return 0;
	fw = fws[data[0] & 7];
	sig = 1 + (data[0] >> 3) % 17;
	num = malloc(size);
	memcpy(num, data + 1, size - 1);
	num[size - 1] = '\0';
	nl = strchr(num, '\n');
	if (nl) {
		*nl = '\0';
		unit = nl + 1;
		/* words come from cmd_split, which never lets one hold a
		 * line break */
		unit[strcspn(unit, "\r\n")] = '\0';
	}
	num[strcspn(num, "\r")] = '\0';

	err[0] = '\0';
	if (units_number(num, &v, err) == 0) {
		FZ_CHECK(isfinite(v), "units_number gave %g for '%s'", v, num);
		check_format(v, sig);
	} else {
		fz_check_err(err, "units_number", 0);
	}

	err[0] = '\0';
	if (units_amount_mM(num, unit, fw, &mM, err) == 0) {
		FZ_CHECK(isfinite(mM) && mM >= 1e-9 && mM <= UNITS_MAX_mM,
			 "amount %g mM from '%s' '%s'", mM, num, unit ? unit : "(none)");
		check_format(mM, sig);
	} else {
		fz_check_err(err, "units_amount_mM", 0);
	}

	err[0] = '\0';
	if (units_volume_mL(num, unit, &mL, err) == 0)
		FZ_CHECK(isfinite(mL) && mL > 0 && mL <= 100000.0, "volume %g mL", mL);
	else
		fz_check_err(err, "units_volume_mL", 0);

	if (unit)
		(void)units_is_unit(unit);
	free(num);
	return 0;
}
