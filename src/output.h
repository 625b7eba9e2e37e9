/*
 * output.h - the one writer every result goes through: human text, or one
 * JSON object per result on one line (--json).  Tests point it at a
 * memory buffer to capture what a command printed.
 */
#ifndef IONMIX_OUTPUT_H
#define IONMIX_OUTPUT_H

#include <stdio.h>

typedef struct out {
	FILE *fp;       /* where results go (stdout, or a memstream in tests) */
	FILE *errfp;    /* where human error messages go (stderr) */
	int json;       /* 1: results and errors as JSON lines on fp */
	int utf8;       /* 1: the terminal takes UTF-8 (plots, micro sign) */
	const char *name; /* fp's name for messages; NULL: "standard output" */
	int werrno;     /* errno of the first failed write, set by out_failed */
	int wsaid;      /* 1 once a message has said that writing to fp failed */
} out;

/* 1 when a write to o->fp has failed (it is flushed first: a full disk,
 * a closed pipe, /dev/full); o->werrno then holds the cause.  The line
 * loop turns it into a failed command and main into exit status 1. */
int out_failed(out *o);
/* As out_failed without the flush: 1 when a write stdio has made so far
 * failed (a script from a file leaves the writing to stdio's buffer, see
 * cmd_run_stream). */
int out_write_failed(out *o);

/* Human text; nothing is printed in JSON mode. */
void out_printf(out *o, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* An error: {"error": msg[, "file", "line"]} on fp in JSON mode, else
 * "ionmix: [FILE:LINE: ]msg" on errfp.  file may be NULL. */
void out_error(out *o, const char *file, int line, const char *msg);
/* A caution or warning line (human: on fp, prefixed; JSON: ignored, since
 * the result object carries a "cautions"/"warnings" array). */
void out_note(out *o, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* JSON writer.  Nesting up to 16 levels; keys are NULL inside arrays.
 * Numbers are printed with %.*g at `sig` significant digits (locale-proof:
 * the program never sets LC_NUMERIC); non-finite numbers become null. */
typedef struct jw {
	out *o;
	int depth;
	int count[16];  /* values written at each level */
	char close[16]; /* '}' or ']' for each open level */
} jw;

void jw_begin(jw *w, out *o);  /* opens the top-level object */
void jw_end(jw *w);            /* closes it and writes the newline */
void jw_str(jw *w, const char *key, const char *val); /* val NULL -> null */
void jw_num(jw *w, const char *key, double val, int sig);
void jw_int(jw *w, const char *key, long val);
void jw_bool(jw *w, const char *key, int val);
void jw_obj(jw *w, const char *key);   /* opens a nested object */
void jw_arr(jw *w, const char *key);   /* opens a nested array */
void jw_close(jw *w);                  /* closes the innermost object/array */

/* Copy s into buf (size > 4) for a message: cut, when it does not fit,
 * at a UTF-8 character boundary with "..." after it, never inside a
 * character.  Returns buf. */
char *out_clip(char *buf, size_t size, const char *s);

/* Write msg for a terminal: valid UTF-8 and tabs as they are, every other
 * control byte and every byte that is not part of valid UTF-8 as \xNN
 * (so a name typed in another encoding never reaches the terminal raw). */
void out_text_escaped(FILE *fp, const char *msg);

/* Write s as a JSON string literal (with quotes) to fp. */
void out_json_string(FILE *fp, const char *s);
/* s as one CSV field (RFC 4180): quoted, with its quotes doubled, when it
 * holds a comma, a quote or a line break; as it is otherwise. */
void out_csv_field(FILE *fp, const char *s);

#endif
