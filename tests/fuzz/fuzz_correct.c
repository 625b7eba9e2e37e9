/*
 * fuzz_correct.c - libFuzzer target for the streaming LJP correction of
 * CSV/TSV files (corr_stream), read from memory (fmemopen) and written to
 * memory (open_memstream).
 *
 * Input: the first byte picks one of eight option sets (columns by
 * header, by number, several, none; LJP with 0, 1 or 3 decimals, negative;
 * skip-bad on or off; metadata lines skipped by count; whole-cell or
 * inside-out); the rest is the file.  Checks, besides the sanitizers: a
 * failure has a one-line message; on success the counts add up (every
 * chosen cell of every row is corrected or skipped, bad cells are among
 * the skipped), correcting the output back (by the opposite LJP, or for
 * inside-out by the same one, its own inverse) succeeds with the same
 * counts (but for cells at the digit limit, below), and no numeric
 * output position holds NaN or infinity: text the input had ("nan" in a
 * note column, a skipped cell) is copied, so the output may spell
 * "nan"/"inf" exactly as often as the input and no more.
 * Where the processor has AVX2 the input is also corrected without the
 * four-rows-at-once loop (corr_set_wide(0)): the bytes, the counts and the
 * message must be the same.
 *
 * Persistent: nothing is set up per input beyond the two memory streams,
 * and the engine keeps its buffers between runs (correct.c).
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "correct.h"

#include "fuzzutil.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

typedef struct optset {
	const char *cols[3];
	int ncols;
	const char *ljp;
	const char *back;  /* the LJP that undoes the correction */
	int skip_bad;
	long skip;         /* metadata lines by count */
	corr_config config;
} optset;

static const optset sets[8] = {
	{{NULL}, 0, "14.2", "-14.2", 0, 0, CORR_WHOLE_CELL},
	{{NULL}, 0, "-3", "3", 1, 0, CORR_WHOLE_CELL},
	{{"2"}, 1, "0.125", "-0.125", 0, 0, CORR_WHOLE_CELL},
	{{"Vm (mV)"}, 1, "14.2", "-14.2", 1, 0, CORR_WHOLE_CELL},
	{{"1", "3"}, 2, "7", "-7", 0, 0, CORR_WHOLE_CELL},
	{{"V", "2", "voltage"}, 3, "-0.5", "0.5", 1, 0, CORR_WHOLE_CELL},
	{{"3"}, 1, "999.999", "999.999", 1, 0, CORR_INSIDE_OUT},
	{{"vm"}, 1, "0", "0", 0, 2, CORR_WHOLE_CELL},
};

/* How often "nan" or "inf" occurs in p[0..n), any case. */
static long nonfinite_words(const char *p, size_t n)
{
	long k = 0;
	for (size_t i = 0; i + 3 <= n; i++) {
		char a = (char)(p[i] | 0x20), b = (char)(p[i + 1] | 0x20), c = (char)(p[i + 2] | 0x20);
		k += (a == 'n' && b == 'a' && c == 'n') || (a == 'i' && b == 'n' && c == 'f');
	}
	return k;
}

static FILE *open_input(const char *p, size_t n)
{
	return n ? fmemopen((void *)p, n, "rb") : fopen("/dev/null", "rb");
}

/* One pass; returns rc, with *out (malloc'd, caller frees) and its size. */
static int pass(const char *in, size_t n, const optset *s, const char *ljp,
		corr_result *r, char **out, size_t *outn, char *err)
{
	corr_opts o;
	FILE *fin = open_input(in, n), *fout;
	int rc;
	FZ_CHECK(fin != NULL, "fmemopen");
	*out = NULL;
	*outn = 0;
	fout = open_memstream(out, outn);
	memset(&o, 0, sizeof o);
	o.columns = s->ncols ? s->cols : NULL;
	o.ncolumns = s->ncols;
	o.skip_bad = s->skip_bad;
	o.skip = s->skip;
	o.config = s->config;
	FZ_CHECK(corr_ljp_parse(ljp, &o.ljp, err) == 0, "LJP %s: %s", ljp, err);
	memset(r, 0, sizeof *r);
	err[0] = '\0';
	rc = corr_stream(fin, "fuzz.csv", fout, &o, r, err);
	fclose(fin);
	fclose(fout);
	return rc;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	char err[IM_ERRLEN], *out = NULL, *back = NULL;
	size_t outn, backn;
	corr_result r, r2;
	const optset *s;
	int rc;
	if (size == 0)
		return 0;
	s = &sets[data[0] & 7];
	rc = pass((const char *)data + 1, size - 1, s, s->ljp, &r, &out, &outn, err);
	FZ_CHECK(rc == 0 || rc == -1, "corr_stream returned %d", rc);
	{
		/* the one-row loop gives the same bytes, counts and message */
		char err1[IM_ERRLEN], *out1 = NULL;
		size_t outn1;
		corr_result r1;
		corr_set_wide(0);
		int rc1 = pass((const char *)data + 1, size - 1, s, s->ljp, &r1, &out1, &outn1, err1);
		corr_set_wide(1);
		FZ_CHECK(rc1 == rc, "one-row loop: rc %d, four-row loop: rc %d", rc1, rc);
		FZ_CHECK(outn1 == outn && (outn == 0 || memcmp(out1, out, outn) == 0),
			 "the one-row and four-row loops wrote different bytes");
		FZ_CHECK(r1.rows == r.rows && r1.corrected == r.corrected && r1.skipped == r.skipped &&
			 r1.blank == r.blank, "the one-row and four-row loops counted differently");
		FZ_CHECK(!rc || strcmp(err1, err) == 0, "different messages: '%s', '%s'", err1, err);
		free(out1);
	}
	if (rc) {
		fz_check_err(err, "corr_stream", 0);
	} else {
		FZ_CHECK(r.rows >= 0 && r.corrected >= 0 && r.skipped >= r.bad && r.bad >= 0 &&
			 r.ragged >= 0 && r.blank >= 0, "negative counts");
		FZ_CHECK(r.ncols >= 1 && r.ncols <= CORR_MAXCOLS, "%d columns", r.ncols);
		FZ_CHECK(r.corrected + r.skipped == r.rows * r.ncols,
			 "%ld corrected + %ld skipped != %ld rows x %d columns", r.corrected,
			 r.skipped, r.rows, r.ncols);
		FZ_CHECK(nonfinite_words(out, outn) == nonfinite_words((const char *)data + 1, size - 1),
			 "NaN or infinity in a numeric output position");
		rc = pass(out, outn, s, s->back, &r2, &back, &backn, err);
		FZ_CHECK(rc == 0, "correcting the output back failed: %s", err);
		/* A number at the digit limit whose result would pass it (a carry
		 * into a new leading digit) is refused one way and copied; the
		 * way back, which sees it as it was, may correct it (its result
		 * is smaller).  So the way back may correct cells the first pass
		 * called bad, never the reverse: everything written can be read
		 * back (correct.c; this check found a cell of 100 digits written
		 * as 101 that the way back called not a number). */
		FZ_CHECK(r2.rows == r.rows && r2.ncols == r.ncols && r2.bad <= r.bad &&
			 r.bad - r2.bad == r2.corrected - r.corrected &&
			 r2.corrected + r2.skipped == r.corrected + r.skipped,
			 "the way back counted differently: %ld corrected, %ld bad against %ld, %ld",
			 r2.corrected, r2.bad, r.corrected, r.bad);
	}
	free(out);
	free(back);
	return 0;
}
