/*
 * common.c - error buffers, allocation, physical helpers shared by all.
 */
#include "common.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

double im_rt_f_mV(double t_C)
{
	return 1000.0 * IM_GAS_J_MOL_K * (t_C + IM_ZERO_C_K) / IM_FARADAY_C_MOL;
}

int im_fail(char *err, const char *fmt, ...)
{
	if (err) {
		va_list ap;
		int n;
		va_start(ap, fmt);
		n = vsnprintf(err, IM_ERRLEN, fmt, ap);
		va_end(ap);
		if (n >= IM_ERRLEN) {
			/* cut between UTF-8 characters, and say it was cut */
			size_t k = IM_ERRLEN - 4;
			while (k > 0 && ((unsigned char)err[k] & 0xc0) == 0x80)
				k--;
			memcpy(err + k, "...", 4);
		}
	}
	return -1;
}

static void *oom(size_t n)
{
	fprintf(stderr, "ionmix: out of memory (%zu bytes)\n", n);
	exit(3);
}

void *im_xmalloc(size_t n)
{
	void *p = malloc(n ? n : 1);
	return p ? p : oom(n);
}

void *im_xcalloc(size_t count, size_t size)
{
	void *p = calloc(count ? count : 1, size ? size : 1);
	return p ? p : oom(count * size);
}

void *im_xrealloc(void *p, size_t n)
{
	void *q = realloc(p, n ? n : 1);
	return q ? q : oom(n);
}

char *im_xstrdup(const char *s)
{
	size_t n = strlen(s) + 1;
	return memcpy(im_xmalloc(n), s, n);
}

static int lower(int c)
{
	return (c >= 'A' && c <= 'Z') ? c + ('a' - 'A') : c;
}

int im_strcaseeq(const char *a, const char *b)
{
	while (*a && *b && lower((unsigned char)*a) == lower((unsigned char)*b))
		a++, b++;
	return *a == '\0' && *b == '\0';
}
