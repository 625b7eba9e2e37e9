/*
 * fuzzutil.h - helpers shared by the libFuzzer targets in tests/fuzz/:
 * a scratch directory that is emptied after every input, confinement of
 * file names to it, and the checks every target applies to what ionmix
 * printed (one-line errors, no NaN or infinity, valid JSON lines).
 *
 * A failed check prints one line to stderr and aborts, which libFuzzer
 * reports as a crash and saves the input as an artifact.
 */
#ifndef IONMIX_FUZZUTIL_H
#define IONMIX_FUZZUTIL_H

#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static char fz_dir[512];
/* fz_dir, open for the whole run and rewound for every input: an opendir
 * per input cost 3 % of fuzz_recipe (its 32 KiB buffer, under ASan). */
static DIR *fz_dirp;

#define FZ_CHECK(cond, ...)                                                   \
	do {                                                                  \
		if (!(cond)) {                                                \
			fprintf(stderr, "fuzz check failed: %s: ", #cond);    \
			fprintf(stderr, __VA_ARGS__);                         \
			fputc('\n', stderr);                                  \
			abort();                                              \
		}                                                             \
	} while (0)

/* Remove every entry of fz_dir (the programs under test create plain
 * files only: the database, its -wal and -shm, exports, plots). */
static inline void fz_empty_dir(void)
{
	struct dirent *e;
	if (!fz_dirp)
		return;
	rewinddir(fz_dirp);
	while ((e = readdir(fz_dirp)) != NULL) {
		if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
			continue;
		unlinkat(dirfd(fz_dirp), e->d_name, 0);
	}
}

static inline void fz_remove_dir(void)
{
	fz_empty_dir();
	if (fz_dirp)
		closedir(fz_dirp);
	fz_dirp = NULL;
	rmdir(fz_dir);
}

/* Make the scratch directory under $TMPDIR (or /tmp), removed at exit.
 * Aborts when it cannot: a target without it would write elsewhere. */
static inline const char *fz_scratch(const char *tag)
{
	const char *t = getenv("TMPDIR");
	snprintf(fz_dir, sizeof fz_dir, "%s/ionmix-%s-XXXXXX", t && *t ? t : "/tmp", tag);
	FZ_CHECK(mkdtemp(fz_dir) != NULL, "cannot make %s", fz_dir);
	fz_dirp = opendir(fz_dir);
	FZ_CHECK(fz_dirp != NULL, "cannot read %s", fz_dir);
	atexit(fz_remove_dir);
	return fz_dir;
}

/* Fuzzed commands may name files (export, run, correct, iv svg/csv).
 * Keep them inside the scratch directory, which is the working directory
 * of the target: a '/' that starts a path, follows "." or "..", or
 * follows a quote or blank becomes '_'.  A '/' after a letter or digit
 * stays (units g/L, mg/mL; "a/b" only resolves when a is a directory,
 * and the scratch directory never holds one). */
static inline void fz_confine_paths(char *s, size_t n)
{
	for (size_t i = 0; i < n; i++) {
		unsigned char prev = i ? (unsigned char)s[i - 1] : ' ';
		int alnum = (prev >= 'a' && prev <= 'z') || (prev >= 'A' && prev <= 'Z') ||
			    (prev >= '0' && prev <= '9');
		if (s[i] == '/' && !alnum)
			s[i] = '_';
	}
}

/* An error message: non-empty, one line, and bounded: under 256 bytes
 * of its own beside what it echoes of the input (in_n bytes; a file name
 * as typed is echoed whole, other words are cut short). */
static inline void fz_check_err(const char *err, const char *what, size_t in_n)
{
	FZ_CHECK(err[0] != '\0', "%s failed with an empty message", what);
	FZ_CHECK(strchr(err, '\n') == NULL, "%s: message has a newline: %s", what, err);
	FZ_CHECK(strlen(err) < 256 + in_n, "%s: message too long (%zu bytes from %zu)", what,
		 strlen(err), in_n);
}

static inline int fz_word(unsigned char c)
{
	return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
	       c == '_';
}

/* 1 when s[i..i+k) is a whole token: no letter, digit, '_' or '.' on
 * either side (so "1.nan" or "nanM" are not tokens, "= nan" and "(inf)"
 * are). */
static inline int fz_whole(const char *s, size_t n, size_t i, size_t k)
{
	return (i == 0 || (!fz_word((unsigned char)s[i - 1]) && s[i - 1] != '.')) &&
	       (i + k == n || (!fz_word((unsigned char)s[i + k]) && s[i + k] != '.'));
}

/* 1 when s[0..k) equals tok[0..k).  Byte by byte rather than memcmp:
 * libFuzzer intercepts every memcmp to learn from it, which costs more
 * than the comparison when the checks below call it at every position of
 * the output. */
static inline int fz_eq(const char *s, const char *tok, size_t k)
{
	for (size_t i = 0; i < k; i++)
		if (s[i] != tok[i])
			return 0;
	return 1;
}

/* 1 when tok occurs in s[0..n), case-sensitively. */
static inline int fz_has_sub(const char *s, size_t n, const char *tok)
{
	size_t k = strlen(tok);
	for (size_t i = 0; i + k <= n; i++)
		if (fz_eq(s + i, tok, k))
			return 1;
	return 0;
}

/* Human output holds no NaN or infinity in a numeric position: a token
 * spelled as printf spells a non-finite double ("nan", "-nan", "inf",
 * "-inf", and the upper-case forms of %G), unless the input spells the
 * same letters once its quotes are taken away: names are echoed, and a word
 * such as ar}na'N Cl'axchange is echoed as "naN Claxchange", which no
 * printf writes.  JSON output is checked by fz_check_json_lines, whose
 * grammar has no NaN or infinity in a value. */
static inline void fz_check_finite_text(const char *out, size_t n, const char *in,
					size_t in_n)
{
	static const char *const forms[] = {"nan", "inf", "NAN", "INF"};
	char *plain = malloc(in_n + 1);
	size_t m = 0;
	FZ_CHECK(plain != NULL, "out of memory");
	for (size_t i = 0; i < in_n; i++)
		if (in[i] != '\'' && in[i] != '"')
			plain[m++] = in[i];
	plain[m] = '\0';
	for (size_t f = 0; f < sizeof forms / sizeof forms[0]; f++) {
		const char *tok = forms[f];
		for (size_t i = 0; i + 3 <= n; i++) {
			size_t st = i;
			if (!fz_eq(out + i, tok, 3))
				continue;
			if (st > 0 && (out[st - 1] == '-' || out[st - 1] == '+'))
				st--; /* the sign printf writes belongs to the token */
			if (!fz_whole(out, n, st, i + 3 - st))
				continue;
			if (fz_has_sub(plain, m, tok))
				continue; /* the input spelled it: an echoed word or unit */
			free(plain);
			FZ_CHECK(0, "%s printed in a numeric position: %.*s",
				 tok[0] == 'n' || tok[0] == 'N' ? "NaN" : "infinity",
				 (int)(n < 400 ? n : 400), out);
		}
	}
	free(plain);
}

/* ---- a strict JSON checker (RFC 8259, UTF-8) for one line ---- */

typedef struct fz_json {
	const unsigned char *p, *end;
	int depth;
} fz_json;

static inline void fz_ws(fz_json *j)
{
	while (j->p < j->end && (*j->p == ' ' || *j->p == '\t'))
		j->p++;
}

/* Length of the UTF-8 sequence at p (1..4), 0 when invalid. */
static inline int fz_utf8(const unsigned char *p, const unsigned char *end)
{
	unsigned c = p[0], need, min, cp;
	if (c < 0x80)
		return 1;
	if (c >= 0xc2 && c <= 0xdf) {
		need = 1;
		min = 0x80;
		cp = c & 0x1f;
	} else if (c >= 0xe0 && c <= 0xef) {
		need = 2;
		min = 0x800;
		cp = c & 0x0f;
	} else if (c >= 0xf0 && c <= 0xf4) {
		need = 3;
		min = 0x10000;
		cp = c & 0x07;
	} else {
		return 0;
	}
	if (end - p <= (long)need)
		return 0;
	for (unsigned i = 1; i <= need; i++) {
		if ((p[i] & 0xc0) != 0x80)
			return 0;
		cp = cp << 6 | (p[i] & 0x3f);
	}
	if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff))
		return 0;
	return (int)need + 1;
}

static inline int fz_jvalue(fz_json *j);

static inline int fz_jstring(fz_json *j)
{
	if (j->p >= j->end || *j->p != '"')
		return 0;
	j->p++;
	while (j->p < j->end && *j->p != '"') {
		if (*j->p < 0x20)
			return 0;
		if (*j->p == '\\') {
			j->p++;
			if (j->p >= j->end)
				return 0;
			if (*j->p == 'u') {
				for (int i = 1; i <= 4; i++)
					if (j->p + i >= j->end ||
					    !strchr("0123456789abcdefABCDEF", j->p[i]) || !j->p[i])
						return 0;
				j->p += 5;
			} else if (strchr("\"\\/bfnrt", *j->p) && *j->p) {
				j->p++;
			} else {
				return 0;
			}
			continue;
		}
		int k = fz_utf8(j->p, j->end);
		if (!k)
			return 0;
		j->p += k;
	}
	if (j->p >= j->end)
		return 0;
	j->p++;
	return 1;
}

static inline int fz_jnumber(fz_json *j)
{
	const unsigned char *s = j->p;
	if (j->p < j->end && *j->p == '-')
		j->p++;
	if (j->p < j->end && *j->p == '0') {
		j->p++;
	} else if (j->p < j->end && *j->p >= '1' && *j->p <= '9') {
		while (j->p < j->end && *j->p >= '0' && *j->p <= '9')
			j->p++;
	} else {
		return 0;
	}
	if (j->p < j->end && *j->p == '.') {
		j->p++;
		if (j->p >= j->end || *j->p < '0' || *j->p > '9')
			return 0;
		while (j->p < j->end && *j->p >= '0' && *j->p <= '9')
			j->p++;
	}
	if (j->p < j->end && (*j->p == 'e' || *j->p == 'E')) {
		j->p++;
		if (j->p < j->end && (*j->p == '+' || *j->p == '-'))
			j->p++;
		if (j->p >= j->end || *j->p < '0' || *j->p > '9')
			return 0;
		while (j->p < j->end && *j->p >= '0' && *j->p <= '9')
			j->p++;
	}
	return j->p > s;
}

static inline int fz_jword(fz_json *j, const char *w)
{
	size_t k = strlen(w);
	if ((size_t)(j->end - j->p) < k || memcmp(j->p, w, k) != 0)
		return 0;
	j->p += k;
	return 1;
}

static inline int fz_jcontainer(fz_json *j, int obj)
{
	int first = 1;
	if (++j->depth > 64)
		return 0;
	j->p++;
	for (;;) {
		fz_ws(j);
		if (j->p >= j->end)
			return 0;
		if (*j->p == (obj ? '}' : ']')) {
			j->p++;
			j->depth--;
			return 1;
		}
		if (!first) {
			if (*j->p != ',')
				return 0;
			j->p++;
			fz_ws(j);
		}
		first = 0;
		if (obj) {
			if (!fz_jstring(j))
				return 0;
			fz_ws(j);
			if (j->p >= j->end || *j->p != ':')
				return 0;
			j->p++;
			fz_ws(j);
		}
		if (!fz_jvalue(j))
			return 0;
	}
}

static inline int fz_jvalue(fz_json *j)
{
	if (j->p >= j->end)
		return 0;
	switch (*j->p) {
	case '{': return fz_jcontainer(j, 1);
	case '[': return fz_jcontainer(j, 0);
	case '"': return fz_jstring(j);
	case 't': return fz_jword(j, "true");
	case 'f': return fz_jword(j, "false");
	case 'n': return fz_jword(j, "null");
	default: return fz_jnumber(j);
	}
}

/* Every line of buf[0..n) is one JSON object; the last line ends in '\n'. */
static inline void fz_check_json_lines(const char *buf, size_t n)
{
	const char *p = buf, *end = buf + n;
	FZ_CHECK(n == 0 || buf[n - 1] == '\n', "JSON output does not end in a newline");
	while (p < end) {
		const char *nl = memchr(p, '\n', (size_t)(end - p));
		fz_json j = {(const unsigned char *)p, (const unsigned char *)nl, 0};
		FZ_CHECK(nl && *p == '{', "JSON line is not an object: %.*s",
			 (int)((nl ? nl : end) - p > 300 ? 300 : (nl ? nl : end) - p), p);
		FZ_CHECK(fz_jvalue(&j) && j.p == j.end, "invalid JSON line: %.*s",
			 (int)(nl - p > 300 ? 300 : nl - p), p);
		p = nl + 1;
	}
}

#endif
