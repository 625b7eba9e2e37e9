/*
 * render.c - one description of a result, written as text or as JSON.
 */
#include "render.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"

typedef enum {
	N_STR, N_NUM, N_CONC, N_INT, N_BOOL, N_NULL, N_LIST, N_RANGE, /* values */
	N_TEXT, N_NOTE, N_TABLE, N_ROW, N_TEND, N_TEMPTY, N_OBJ, N_OEND
} nkind;

typedef struct node {
	nkind k;
	char *key, *label, *unit, *s; /* owned; any may be NULL */
	double v, v2; /* v2: the high end of an N_RANGE */
	long i;
	int digits, jsig;
	char **list; /* N_LIST: owned strings */
	int nlist;
} node;

/* Every string of a result lives in an arena of blocks freed at once
 * (a result holds hundreds of small strings: one malloc a block). */
typedef struct ablock {
	struct ablock *next;
	size_t used, cap;
	char data[];
} ablock;

#define FIRST_NODES 64   /* nodes that come with the result itself */
#define ARENA_BLOCK 8192

/* A result, its first FIRST_NODES nodes and its first arena block are one
 * allocation (a typical result needs nothing more); more nodes or
 * strings take blocks of their own. */
struct render {
	out *o;
	node *n; /* first, or an allocation once they are full */
	int count, cap;
	int in_table;
	ablock *arena; /* the newest block first; the last is first_block */
	ablock *first_block;
	int json;   /* o->json when the result began: the form it is written in */
	node spare; /* where a field the form does not show is set, unkept */
	node first[FIRST_NODES];
};

static char *ar_alloc(render *r, size_t n)
{
	ablock *b = r->arena;
	n = (n + 7) & ~(size_t)7;
	if (!b || b->cap - b->used < n) {
		size_t cap = n > ARENA_BLOCK ? n : ARENA_BLOCK;
		b = im_xmalloc(sizeof *b + cap);
		b->next = r->arena;
		b->used = 0;
		b->cap = cap;
		r->arena = b;
	}
	b->used += n;
	return b->data + b->used - n;
}

static char *ar_dup(render *r, const char *s)
{
	ablock *b = r->arena;
	size_t n;
	char *d;
	if (!s)
		return NULL;
	if (b) { /* one pass: copy into the block while it has room */
		size_t room = b->cap - b->used;
		d = b->data + b->used;
		for (size_t i = 0; i < room; i++)
			if ((d[i] = s[i]) == '\0') {
				b->used += (i + 8) & ~(size_t)7;
				return d;
			}
	}
	n = strlen(s) + 1;
	d = ar_alloc(r, n);
	memcpy(d, s, n);
	return d;
}

/* fmt with its "%s" (and "%%") filled in, into buf of n bytes: the
 * length, or -1 when fmt has another conversion or the text does not
 * fit (then vsnprintf does it). */
static int fmt_strings(char *buf, size_t n, const char *fmt, va_list ap)
{
	size_t len = 0;
	for (const char *f = fmt; *f; f++) {
		const char *s = f;
		size_t k = 1;
		if (*f != '%') { /* the literal run up to the next '%' */
			while (f[k] && f[k] != '%')
				k++;
			f += k - 1;
		} else if (f[1] == 's') {
			s = va_arg(ap, const char *);
			if (!s)
				return -1; /* printf's "(null)" */
			k = strlen(s);
			f++;
		} else if (f[1] == '%') {
			f++; /* s: one '%' */
		} else {
			return -1;
		}
		if (len + k >= n)
			return -1;
		memcpy(buf + len, s, k);
		len += k;
	}
	buf[len] = '\0';
	return (int)len;
}

/* printf into the arena, at whatever length it needs: once into a
 * buffer on the stack, a second time only for a longer text. */
static char *vfmt(render *r, const char *fmt, va_list ap)
{
	char first[256];
	va_list aq;
	int len;
	char *s;
	va_copy(aq, ap);
	len = fmt_strings(first, sizeof first, fmt, aq);
	va_end(aq);
	if (len >= 0) {
		s = ar_alloc(r, (size_t)len + 1);
		memcpy(s, first, (size_t)len + 1);
		return s;
	}
	va_copy(aq, ap);
	len = vsnprintf(first, sizeof first, fmt, aq);
	va_end(aq);
	if (len < 0)
		len = first[0] = 0;
	s = ar_alloc(r, (size_t)len + 1);
	if ((size_t)len < sizeof first)
		memcpy(s, first, (size_t)len + 1);
	else
		vsnprintf(s, (size_t)len + 1, fmt, ap);
	return s;
}

/* a, b and c joined, in the arena. */
static char *ar_cat3(render *r, const char *a, const char *b, const char *c)
{
	size_t na = strlen(a), nb = strlen(b), nc = strlen(c);
	char *s = ar_alloc(r, na + nb + nc + 1);
	memcpy(s, a, na);
	memcpy(s + na, b, nb);
	memcpy(s + na + nb, c, nc + 1);
	return s;
}

/* n zeroed bytes in the arena. */
static void *ar_zero(render *r, size_t n)
{
	void *p = ar_alloc(r, n);
	memset(p, 0, n);
	return p;
}

/* Whether the form r is written in shows a node: the text shows values
 * with a label, prose and tables; the JSON values with a key, objects,
 * notes and tables. */
static int shown(const render *r, nkind k, const char *key, const char *label)
{
	if (k <= N_RANGE)
		return r->json ? key != NULL : label != NULL;
	if (k == N_OBJ || k == N_OEND)
		return r->json;
	if (k == N_TEXT || k == N_TEMPTY)
		return !r->json;
	return 1;
}

/* A new node, or r->spare for one the form does not show. */
static node *add(render *r, nkind k, const char *key, const char *label, const char *unit)
{
	node *x;
	if (!shown(r, k, key, label))
		return &r->spare; /* written, never read */
	if (r->count == r->cap) {
		r->cap *= 2;
		if (r->n == r->first) {
			r->n = im_xmalloc((size_t)r->cap * sizeof *r->n);
			memcpy(r->n, r->first, sizeof r->first);
		} else {
			r->n = im_xrealloc(r->n, (size_t)r->cap * sizeof *r->n);
		}
	}
	x = &r->n[r->count++];
	memset(x, 0, sizeof *x);
	x->k = k;
	x->key = ar_dup(r, key);
	x->label = ar_dup(r, label);
	x->unit = ar_dup(r, unit);
	x->jsig = 10;
	return x;
}

render *render_new(out *o)
{
	/* the block after the struct: its size is a multiple of 8 (doubles) */
	render *r = im_xmalloc(sizeof *r + sizeof(ablock) + ARENA_BLOCK);
	r->o = o;
	r->n = r->first;
	r->count = 0;
	r->cap = FIRST_NODES;
	r->in_table = 0;
	r->json = o->json;
	r->first_block = r->arena = (ablock *)(r + 1);
	r->arena->next = NULL;
	r->arena->used = 0;
	r->arena->cap = ARENA_BLOCK;
	return r;
}

void render_str(render *r, const char *key, const char *label, const char *val)
{
	if (shown(r, N_STR, key, label))
		add(r, N_STR, key, label, NULL)->s = ar_dup(r, val);
}

void render_numj(render *r, const char *key, const char *label, const char *unit,
		 double v, int digits, int jsig)
{
	node *x = add(r, N_NUM, key, label, unit);
	x->v = v;
	x->digits = digits;
	x->jsig = jsig;
}

void render_num(render *r, const char *key, const char *label, const char *unit,
		double v, int digits)
{
	render_numj(r, key, label, unit, v, digits, 10);
}

void render_conc(render *r, const char *key, const char *label, double mM)
{
	add(r, N_CONC, key, label, NULL)->v = mM;
}

void render_int(render *r, const char *key, const char *label, long v)
{
	add(r, N_INT, key, label, NULL)->i = v;
}

void render_bool(render *r, const char *key, const char *label, int v)
{
	add(r, N_BOOL, key, label, NULL)->i = v != 0;
}

void render_charge(render *r, const char *key, const char *label, int z)
{
	node *x = add(r, N_INT, key, label, NULL);
	x->i = z;
	x->digits = 1;
}

void render_object(render *r, const char *key)
{
	add(r, N_OBJ, key, NULL, NULL);
}

void render_object_end(render *r)
{
	add(r, N_OEND, NULL, NULL, NULL);
}

void render_range(render *r, const char *key, const char *label, const char *unit, double lo,
		  double hi, int digits)
{
	node *x = add(r, N_RANGE, key, label, unit);
	x->v = lo;
	x->v2 = hi;
	x->digits = digits;
	x->jsig = 6;
}

void render_null(render *r, const char *key, const char *label)
{
	add(r, N_NULL, key, label, NULL);
}

void render_list(render *r, const char *key, const char *label, const char *const *v, int n)
{
	node *x;
	if (!shown(r, N_LIST, key, label))
		return;
	x = add(r, N_LIST, key, label, NULL);
	x->list = (char **)ar_alloc(r, (n > 0 ? (size_t)n : 1) * sizeof *x->list);
	for (int i = 0; i < n; i++)
		x->list[i] = ar_dup(r, v[i]);
	x->nlist = n;
}

void render_text(render *r, const char *fmt, ...)
{
	va_list ap;
	if (r->json) /* prose is the text's only */
		return;
	va_start(ap, fmt);
	add(r, N_TEXT, NULL, NULL, NULL)->s = vfmt(r, fmt, ap);
	va_end(ap);
}

void render_text_more(render *r, const char *fmt, ...)
{
	va_list ap;
	node *x = NULL;
	char *more, *s;
	if (r->json)
		return;
	for (int i = r->count - 1; i >= 0 && !x; i--)
		if (r->n[i].k == N_TEXT)
			x = &r->n[i];
	va_start(ap, fmt);
	more = vfmt(r, fmt, ap);
	va_end(ap);
	if (!x) {
		add(r, N_TEXT, NULL, NULL, NULL)->s = more;
		return;
	}
	s = ar_alloc(r, strlen(x->s) + strlen(more) + 1);
	strcpy(s, x->s);
	strcat(s, more);
	x->s = s;
}

void render_note(render *r, const char *fmt, ...)
{
	va_list ap;
	node *x = add(r, N_NOTE, "notes", "note: ", NULL);
	va_start(ap, fmt);
	x->s = vfmt(r, fmt, ap);
	va_end(ap);
}

void render_note_as(render *r, const char *key, const char *prefix, const char *fmt, ...)
{
	va_list ap;
	node *x = add(r, N_NOTE, key, prefix, NULL);
	va_start(ap, fmt);
	x->s = vfmt(r, fmt, ap);
	va_end(ap);
}

void render_table(render *r, const char *key, const char *title)
{
	add(r, N_TABLE, key, title, NULL);
	r->in_table = 1;
}

void render_row(render *r)
{
	add(r, N_ROW, NULL, NULL, NULL);
}

void render_table_end(render *r)
{
	add(r, N_TEND, NULL, NULL, NULL);
	r->in_table = 0;
}

void render_table_empty(render *r, const char *text)
{
	if (!r->json)
		add(r, N_TEMPTY, NULL, NULL, NULL)->s = ar_dup(r, text);
}

void render_drop(render *r)
{
	if (!r)
		return;
	while (r->arena != r->first_block) {
		ablock *b = r->arena;
		r->arena = b->next;
		free(b);
	}
	if (r->n != r->first)
		free(r->n);
	free(r);
}

/* ---- text ---- */

static int is_value(nkind k)
{
	return k <= N_RANGE;
}

/* Columns a UTF-8 string takes (continuation bytes take none). */
static int width(const char *s)
{
	int w = 0;
	for (; *s; s++)
		w += ((unsigned char)*s & 0xc0) != 0x80;
	return w;
}

/* The text of a value, with its unit when with_unit; caller frees. */
static const char *value_text(render *r, const node *x, int utf8, int with_unit)
{
	char num[64], hi[64];
	size_t len = 0;
	char *s;
	switch (x->k) {
	case N_STR:
		return x->s ? x->s : "-";
	case N_NUM:
		units_fmt_num(num, sizeof num, x->v, x->digits);
		break;
	case N_CONC:
		units_fmt_conc(num, sizeof num, x->v, utf8);
		break;
	case N_INT:
		snprintf(num, sizeof num, x->digits ? "%+ld" : "%ld", x->i);
		break;
	case N_BOOL:
		return x->i ? "yes" : "no";
	case N_RANGE:
		units_fmt_num(num, sizeof num, x->v, x->digits);
		units_fmt_num(hi, sizeof hi, x->v2, x->digits);
		s = ar_cat3(r, num, " to ", hi);
		return with_unit && x->unit ? ar_cat3(r, s, " ", x->unit) : s;
	case N_LIST:
		if (x->nlist == 0)
			return "-";
		for (int j = 0; j < x->nlist; j++)
			len += strlen(x->list[j]) + 2;
		s = ar_alloc(r, len + 2);
		s[0] = '\0';
		for (int j = 0; j < x->nlist; j++) {
			if (j)
				strcat(s, ", ");
			strcat(s, x->list[j]);
		}
		return s;
	default:
		return "-";
	}
	if (with_unit && x->unit && x->k == N_NUM && isfinite(x->v))
		return ar_cat3(r, num, " ", x->unit);
	return ar_dup(r, num);
}

/* Print a line of n bytes without trailing blanks. */
static void put_line(FILE *fp, char *line, size_t n)
{
	while (n > 0 && line[n - 1] == ' ')
		n--;
	line[n] = '\n';
	fwrite(line, 1, n + 1, fp);
	line[n] = '\0';
}

/* s and a line end. */
static void put_text(FILE *fp, const char *s)
{
	fputs(s, fp);
	fputc('\n', fp);
}

/* Append to a growing line buffer. */
typedef struct sbuf {
	char *s;
	size_t len, cap;
} sbuf;

/* A cell: two blanks, then s (w columns wide) padded to pad_to columns,
 * on the right when `right`. */
static void sb_cell(sbuf *b, const char *s, int w, int pad_to, int right)
{
	size_t n = strlen(s), pad = pad_to > w ? (size_t)(pad_to - w) : 0;
	char *p;
	if (b->len + n + pad + 3 > b->cap) {
		b->cap = 2 * (b->len + n + pad + 3) + 64;
		b->s = im_xrealloc(b->s, b->cap);
	}
	p = b->s + b->len;
	*p++ = ' ';
	*p++ = ' ';
	if (right) {
		memset(p, ' ', pad);
		p += pad;
	}
	memcpy(p, s, n);
	p += n;
	if (!right) {
		memset(p, ' ', pad);
		p += pad;
	}
	*p = '\0';
	b->len = (size_t)(p - b->s);
}

/* What makes cells one column: the key, or the label of a text-only cell. */
static const char *colid(const node *x)
{
	return x->key ? x->key : x->label;
}

static int same_col(const node *a, const node *b)
{
	const char *p = colid(a), *q = colid(b);
	return p[0] == q[0] && strcmp(p, q) == 0;
}

/* The text of the table that starts at node t (an N_TABLE); returns the
 * index of its N_TEND. */
static int text_table(render *r, int t)
{
	FILE *fp = r->o->fp;
	int end = t + 1, ncol = 0, nrow = 0, header = 0, utf8 = r->o->utf8;
	const node **col;
	int *w, *right;
	const char ***cell, **head;
	int **cellw; /* the columns each cell takes */
	sbuf lb = {0}; /* one line buffer for the header and every row */
	while (end < r->count && r->n[end].k != N_TEND)
		end++;
	/* columns: every labelled key, in the order of first appearance */
	col = ar_zero(r, ((size_t)(end - t) + 1) * sizeof *col);
	for (int i = t + 1, guess = 0; i < end; i++) {
		const node *x = &r->n[i];
		int k = 0;
		if (x->k == N_ROW) {
			nrow++;
			guess = 0;
		}
		if (!is_value(x->k) || !x->label)
			continue;
		/* cells come in column order: the next column first */
		if (guess < ncol && same_col(col[guess], x))
			k = guess;
		else
			while (k < ncol && !same_col(col[k], x))
				k++;
		guess = k + 1;
		if (k == ncol)
			col[ncol++] = x;
		else if (!col[k]->unit && x->unit) /* a null first: take the unit */
			col[k] = x;
	}
	w = ar_zero(r, ((size_t)ncol + 1) * sizeof *w);
	right = ar_zero(r, ((size_t)ncol + 1) * sizeof *right);
	head = ar_zero(r, ((size_t)ncol + 1) * sizeof *head);
	cell = ar_zero(r, ((size_t)nrow + 1) * sizeof *cell);
	cellw = ar_zero(r, ((size_t)nrow + 1) * sizeof *cellw);
	for (int k = 0; k < ncol; k++) {
		if (col[k]->label[0])
			header = 1;
		head[k] = col[k]->label;
		if (col[k]->unit && col[k]->k == N_NUM)
			head[k] = ar_cat3(r, col[k]->label, col[k]->label[0] ? " " : "",
					  col[k]->unit);
		w[k] = width(head[k]);
		right[k] = col[k]->k != N_STR && col[k]->k != N_LIST;
	}
	for (int i = t + 1, row = -1, guess = 0; i < end; i++) {
		const node *x = &r->n[i];
		if (x->k == N_ROW) {
			cell[++row] = ar_zero(r, ((size_t)ncol + 1) * sizeof **cell);
			cellw[row] = ar_zero(r, ((size_t)ncol + 1) * sizeof **cellw);
			guess = 0;
			continue;
		}
		if (!is_value(x->k) || !x->label || row < 0)
			continue;
		for (int m = 0; m < ncol; m++) {
			/* cells come in column order: try the next column first */
			int k = (guess + m) % ncol;
			if (col[k] == x || same_col(col[k], x)) {
				int cw;
				cell[row][k] = value_text(r, x, utf8, 0);
				cw = cellw[row][k] = width(cell[row][k]);
				if (cw > w[k])
					w[k] = cw;
				guess = k + 1;
				break;
			}
		}
	}
	if (r->n[t].label && nrow > 0 && ncol > 0)
		put_text(fp, r->n[t].label);
	if (header && nrow > 0) {
		lb.len = 0;
		for (int k = 0; k < ncol; k++)
			sb_cell(&lb, head[k], width(head[k]), w[k], right[k]);
		put_line(fp, lb.s, lb.len);
	}
	for (int row = 0; row < nrow && ncol > 0; row++) { /* ncol 0: for the JSON only */
		lb.len = 0;
		for (int k = 0; k < ncol; k++)
			sb_cell(&lb, cell[row][k] ? cell[row][k] : "", cellw[row][k], w[k],
				right[k]);
		put_line(fp, lb.s, lb.len);
	}
	for (int i = t + 1; i < end; i++)
		if (r->n[i].k == N_TEMPTY && (nrow == 0 || !r->n[i].s[0]))
			put_text(fp, r->n[i].s);
	free(lb.s);
	return end;
}

static void emit_text(render *r)
{
	FILE *fp = r->o->fp;
	int lw = 0;
	for (int i = 0; i < r->count; i++) {
		const node *x = &r->n[i];
		if (x->k == N_TABLE)
			while (i < r->count && r->n[i].k != N_TEND)
				i++;
		else if (is_value(x->k) && x->label && width(x->label) > lw)
			lw = width(x->label);
	}
	for (int i = 0; i < r->count; i++) {
		const node *x = &r->n[i];
		if (x->k == N_TABLE) {
			i = text_table(r, i);
		} else if (x->k == N_TEXT) {
			put_text(fp, x->s);
		} else if (x->k == N_NOTE && x->label) {
			fprintf(fp, "  %s%s\n", x->label, x->s);
		} else if (x->k == N_NOTE) { /* no prefix: a line of its own, not indented */
			put_text(fp, x->s);
		} else if (is_value(x->k) && x->label) {
			const char *v = value_text(r, x, r->o->utf8, 1);
			int pad = lw - width(x->label);
			fprintf(fp, "  %s%*s  %s\n", x->label, pad, "", v);
		}
	}
}

/* ---- JSON ---- */

static void json_value(jw *w, const node *x)
{
	switch (x->k) {
	case N_STR:
		jw_str(w, x->key, x->s);
		break;
	case N_NUM:
		jw_num(w, x->key, x->v, x->jsig);
		break;
	case N_CONC:
		jw_num(w, x->key, x->v, 10);
		break;
	case N_INT:
		jw_int(w, x->key, x->i);
		break;
	case N_BOOL:
		jw_bool(w, x->key, (int)x->i);
		break;
	case N_NULL:
		jw_str(w, x->key, NULL);
		break;
	case N_RANGE:
		jw_arr(w, x->key);
		jw_num(w, NULL, x->v, x->jsig);
		jw_num(w, NULL, x->v2, x->jsig);
		jw_close(w);
		break;
	case N_LIST:
		jw_arr(w, x->key);
		for (int j = 0; j < x->nlist; j++)
			jw_str(w, NULL, x->list[j]);
		jw_close(w);
		break;
	default:
		break;
	}
}

static void emit_json(const render *r)
{
	jw w;
	int row_open = 0;
	jw_begin(&w, r->o);
	for (int i = 0; i < r->count; i++) {
		const node *x = &r->n[i];
		if (is_value(x->k) && x->key) {
			json_value(&w, x);
		} else if (x->k == N_OBJ) {
			jw_obj(&w, x->key);
		} else if (x->k == N_OEND) {
			jw_close(&w);
		} else if (x->k == N_TABLE && !x->key) { /* a table for the text only */
			while (i < r->count && r->n[i].k != N_TEND)
				i++;
		} else if (x->k == N_TABLE) {
			jw_arr(&w, x->key);
			row_open = 0;
		} else if (x->k == N_ROW) {
			if (row_open)
				jw_close(&w);
			jw_obj(&w, NULL);
			row_open = 1;
		} else if (x->k == N_TEND) {
			if (row_open)
				jw_close(&w);
			jw_close(&w);
			row_open = 0;
		} else if (x->k == N_NOTE) {
			/* all notes of one key, as one array where the first stands */
			int first = 1;
			for (int j = 0; j < i; j++)
				if (r->n[j].k == N_NOTE && strcmp(r->n[j].key, x->key) == 0)
					first = 0;
			if (!first)
				continue;
			jw_arr(&w, x->key);
			for (int j = i; j < r->count; j++)
				if (r->n[j].k == N_NOTE && strcmp(r->n[j].key, x->key) == 0)
					jw_str(&w, NULL, r->n[j].s);
			jw_close(&w);
		}
	}
	jw_end(&w);
}

int render_done(render *r)
{
	if (r->in_table)
		render_table_end(r);
	if (r->json)
		emit_json(r);
	else
		emit_text(r);
	render_drop(r);
	return 0;
}
