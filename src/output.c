/*
 * output.c - human text and JSON lines through one writer.
 */
#include "output.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <string.h>

int out_failed(out *o)
{
	errno = 0;
	if (fflush(o->fp) != 0 || ferror(o->fp)) {
		if (!o->werrno)
			o->werrno = errno ? errno : EIO;
		return 1;
	}
	return 0;
}

int out_write_failed(out *o)
{
	/* out_failed's flush tries the write again, for the cause in errno */
	return ferror(o->fp) ? out_failed(o) : 0;
}

void out_printf(out *o, const char *fmt, ...)
{
	va_list ap;
	if (o->json)
		return;
	va_start(ap, fmt);
	vfprintf(o->fp, fmt, ap);
	va_end(ap);
}

void out_note(out *o, const char *fmt, ...)
{
	va_list ap;
	if (o->json)
		return;
	va_start(ap, fmt);
	vfprintf(o->fp, fmt, ap);
	va_end(ap);
	fputc('\n', o->fp);
}

/* Length of the valid UTF-8 sequence at p (2 to 4 bytes), or 0 when the
 * bytes there are not one (stray continuation, overlong form, surrogate,
 * beyond U+10FFFF, cut short). */
static int utf8_len(const unsigned char *p)
{
	unsigned c = p[0], cp, min;
	int need;
	if (c >= 0xc2 && c <= 0xdf)
		need = 1, min = 0x80, cp = c & 0x1f;
	else if (c >= 0xe0 && c <= 0xef)
		need = 2, min = 0x800, cp = c & 0x0f;
	else if (c >= 0xf0 && c <= 0xf4)
		need = 3, min = 0x10000, cp = c & 0x07;
	else
		return 0;
	for (int i = 1; i <= need; i++) {
		if ((p[i] & 0xc0) != 0x80) /* also stops at the terminating NUL */
			return 0;
		cp = cp << 6 | (p[i] & 0x3f);
	}
	if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff))
		return 0;
	return need + 1;
}

char *out_clip(char *buf, size_t size, const char *s)
{
	size_t n = strlen(s), keep;
	if (n < size) {
		memcpy(buf, s, n + 1);
		return buf;
	}
	keep = size - 4;
	/* back off continuation bytes so the cut falls between characters */
	while (keep > 0 && ((unsigned char)s[keep] & 0xc0) == 0x80)
		keep--;
	memcpy(buf, s, keep);
	memcpy(buf + keep, "...", 4);
	return buf;
}

void out_text_escaped(FILE *fp, const char *msg)
{
	for (const unsigned char *p = (const unsigned char *)msg; *p; p++) {
		if (*p >= 0x80) {
			int k = utf8_len(p);
			if (k == 0) {
				fprintf(fp, "\\x%02x", *p);
				continue;
			}
			fwrite(p, 1, (size_t)k, fp);
			p += k - 1;
		} else if ((*p < 0x20 && *p != '\t') || *p == 0x7f) {
			fprintf(fp, "\\x%02x", *p);
		} else {
			fputc(*p, fp);
		}
	}
}

void out_csv_field(FILE *fp, const char *s)
{
	if (!strpbrk(s, ",\"\r\n")) {
		fputs(s, fp);
		return;
	}
	fputc('"', fp);
	for (; *s; s++) {
		if (*s == '"')
			fputc('"', fp);
		fputc(*s, fp);
	}
	fputc('"', fp);
}

/* JSON text must be UTF-8 (RFC 8259, section 8.1): bytes that are not,
 * such as a name typed in another encoding and echoed in a message, are
 * written as U+FFFD, the replacement character.  Runs of bytes that need
 * no escape go out in one fwrite (a stream's lock per byte cost 2 % of a
 * fuzz run of scripts). */
void out_json_string(FILE *fp, const char *s)
{
	const unsigned char *p = (const unsigned char *)s, *run = p;
	fputc('"', fp);
	for (;; p++) {
		int k;
		if (*p >= 0x20 && *p < 0x80 && *p != '"' && *p != '\\')
			continue;
		if (*p >= 0x80 && (k = utf8_len(p)) > 0) {
			p += k - 1;
			continue;
		}
		if (p > run)
			fwrite(run, 1, (size_t)(p - run), fp);
		run = p + 1;
		switch (*p) {
		case '\0': fputc('"', fp); return;
		case '"': fputs("\\\"", fp); break;
		case '\\': fputs("\\\\", fp); break;
		case '\n': fputs("\\n", fp); break;
		case '\r': fputs("\\r", fp); break;
		case '\t': fputs("\\t", fp); break;
		default:
			if (*p >= 0x80) /* not UTF-8 */
				fputs("\\ufffd", fp);
			else
				fprintf(fp, "\\u%04x", *p);
		}
	}
}

void out_error(out *o, const char *file, int line, const char *msg)
{
	/* when the results cannot be written, neither can a JSON error: it
	 * goes to the error stream as text */
	if (o->json && !o->werrno) {
		fputs("{\"error\":", o->fp);
		out_json_string(o->fp, msg);
		if (file) {
			fputs(",\"file\":", o->fp);
			out_json_string(o->fp, file);
			fprintf(o->fp, ",\"line\":%d", line);
		}
		fputs("}\n", o->fp);
		fflush(o->fp);
		return;
	}
	/* results still in stdio's buffer (a script in a file) go first; if
	 * they cannot be written, that is said once, before this message */
	if (out_failed(o) && !o->wsaid) {
		o->wsaid = 1;
		fprintf(o->errfp, "ionmix: cannot write to %s: %s\n",
			o->name ? o->name : "standard output", strerror(o->werrno));
	}
	fputs("ionmix: ", o->errfp);
	if (file) {
		out_text_escaped(o->errfp, file);
		fprintf(o->errfp, ":%d: ", line);
	}
	out_text_escaped(o->errfp, msg);
	fputc('\n', o->errfp);
	fflush(o->errfp);
}

/* Comma and key before a value at the current level. */
static void sep(jw *w, const char *key)
{
	FILE *fp = w->o->fp;
	if (w->count[w->depth]++)
		fputc(',', fp);
	if (key) {
		out_json_string(fp, key);
		fputc(':', fp);
	}
}

void jw_begin(jw *w, out *o)
{
	memset(w, 0, sizeof *w);
	w->o = o;
	fputc('{', o->fp);
}

void jw_end(jw *w)
{
	while (w->depth > 0)
		jw_close(w);
	fputs("}\n", w->o->fp); /* the line loop flushes after each command (out_failed) */
}

void jw_str(jw *w, const char *key, const char *val)
{
	sep(w, key);
	if (val)
		out_json_string(w->o->fp, val);
	else
		fputs("null", w->o->fp);
}

void jw_num(jw *w, const char *key, double val, int sig)
{
	sep(w, key);
	if (!isfinite(val)) {
		fputs("null", w->o->fp);
		return;
	}
	if (val == 0)
		val = 0; /* no "-0" */
	fprintf(w->o->fp, "%.*g", sig, val);
}

void jw_int(jw *w, const char *key, long val)
{
	sep(w, key);
	fprintf(w->o->fp, "%ld", val);
}

void jw_bool(jw *w, const char *key, int val)
{
	sep(w, key);
	fputs(val ? "true" : "false", w->o->fp);
}

static void open_nested(jw *w, const char *key, int c)
{
	sep(w, key);
	fputc(c, w->o->fp);
	if (w->depth < 15)
		w->depth++;
	w->count[w->depth] = 0;
	w->close[w->depth] = c == '{' ? '}' : ']';
}

void jw_obj(jw *w, const char *key)
{
	open_nested(w, key, '{');
}

void jw_arr(jw *w, const char *key)
{
	open_nested(w, key, '[');
}

void jw_close(jw *w)
{
	if (w->depth == 0)
		return;
	fputc(w->close[w->depth], w->o->fp);
	w->depth--;
}
