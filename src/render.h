/*
 * render.h - a command's result, described once, written as text or as
 * JSON.
 *
 * A handler builds a result from fields (key, label, unit, digits, value)
 * in the order the text should show them, then calls render_done, which
 * writes either the human text or one JSON object on one line, both from
 * the same fields, so the two cannot disagree and no command is silent
 * under --json.  Every number goes through the one formatter
 * (units_fmt_num, units_fmt_conc).
 *
 * Text: a field with a label prints as "  label  value unit", labels of
 * consecutive fields aligned; a field whose label is NULL is in the JSON
 * only (a line of render_text already shows it, or it is machine detail
 * such as full precision).  A table prints a header of its columns'
 * labels (with units) and one aligned line per row.  render_text adds a
 * line of prose to the text (its numbers must also be fields);
 * render_note adds a line to the text and to the JSON array "notes".
 * A field whose key is NULL is in the text only (a remark column).
 *
 * JSON: keys in snake_case with the unit as suffix (E_mV), numbers with
 * 10 significant digits unless a field asks otherwise, non-finite numbers
 * as null, tables as arrays of objects.
 *
 * Memory: the result and every string given to it are copied; render_done
 * and render_drop free it.  Nothing here fails except writing, which
 * out_failed reports.
 */
#ifndef IONMIX_RENDER_H
#define IONMIX_RENDER_H

#include "output.h"
#include "units.h"

typedef struct render render;

/* A new, empty result for o. */
render *render_new(out *o);

/* Scalar fields (or cells, inside a row).  key: the JSON key; label: the
 * text label (NULL: JSON only; "": a column without a header); unit: the
 * unit written after the value in text (NULL: none).  digits: UNITS_SIG(n)
 * or UNITS_DEC(n). */
void render_str(render *r, const char *key, const char *label, const char *val);
void render_num(render *r, const char *key, const char *label, const char *unit,
		double v, int digits);
/* As render_num with jsig significant digits in the JSON. */
void render_numj(render *r, const char *key, const char *label, const char *unit,
		 double v, int digits, int jsig);
/* A concentration: the JSON value in mM under key (10 significant digits),
 * the text with a switching unit (mM, uM, nM, pM). */
void render_conc(render *r, const char *key, const char *label, double mM);
void render_int(render *r, const char *key, const char *label, long v);
void render_bool(render *r, const char *key, const char *label, int v);
/* A charge number: "+2" in text, 2 in JSON. */
void render_charge(render *r, const char *key, const char *label, int z);
/* A range: the JSON array [lo, hi] under key, the text "lo to hi unit". */
void render_range(render *r, const char *key, const char *label, const char *unit, double lo,
		  double hi, int digits);
/* A JSON null with a text "-". */
void render_null(render *r, const char *key, const char *label);
/* A list of strings under key (JSON array; text: "  label  a, b, c"). */
void render_list(render *r, const char *key, const char *label, const char *const *v, int n);

/* A line of text only, printf-style (no trailing newline needed). */
void render_text(render *r, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* Append printf-style text to the last line of render_text (a line built
 * in pieces); with no such line yet, starts one. */
void render_text_more(render *r, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* A note: a text line "  note: ..." and an entry of the JSON array
 * "notes" (or of `key` with render_note_as, the text line "  PREFIXtext",
 * or "text" without indent when prefix is NULL). */
void render_note(render *r, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
void render_note_as(render *r, const char *key, const char *prefix, const char *fmt, ...)
	__attribute__((format(printf, 4, 5)));

/* A table: a JSON array of objects under key; in text a title line (NULL:
 * none), a header and aligned rows.  render_row starts a row; the fields
 * that follow are its cells, until the next render_row or
 * render_table_end.  A cell missing from a row prints blank.  A table
 * whose key is NULL is in the text only. */
void render_table(render *r, const char *key, const char *title);
void render_row(render *r);
void render_table_end(render *r);
/* A line printed under the table's text only, or "" for a blank line. */
void render_table_empty(render *r, const char *text);

/* A nested JSON object under key; its fields print as scalars in text. */
void render_object(render *r, const char *key);
void render_object_end(render *r);

/* Write the result (text or JSON by r's output) and free it.  Returns 0;
 * a write error is seen by out_failed. */
int render_done(render *r);
/* Free without writing (a handler that fails after starting a result). */
void render_drop(render *r);

#endif
