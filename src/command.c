/*
 * command.c - the command table, word splitting, dispatch with rollback,
 * the one line loop, and the commands that drive the loop itself: run,
 * help and quit.
 *
 * To add a command: write its handler (a cmd_fn: parse, call, render) in
 * the cmd_*.c file of what the user does, declare it in that file's
 * header, add one row below and a schema schemas/NAME.json for its JSON
 * result.  The row drives dispatch, the argument-count check, `help`,
 * completion and tests/ref/check_schemas.py.
 */
#include "command.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "cmd_bench.h"
#include "cmd_chem.h"
#include "cmd_correct.h"
#include "cmd_define.h"
#include "cmd_ephys.h"
#include "cmd_ghk.h"
#include "cmd_junction.h"
#include "cmd_ref.h"
#include "cmd_review.h"
#include "cmd_sweep.h"
#include "cmd_solution.h"
#include "cmd_store.h"
#include "common.h"
#include "render.h"
#include "signals.h"

static int cmd_run(im_ctx *ctx, int argc, char **argv, char *err);
static int cmd_help(im_ctx *ctx, int argc, char **argv, char *err);
static int cmd_quit(im_ctx *ctx, int argc, char **argv, char *err);

#define ANY -1

/* name, synopsis, help, min args, max args, handler, completion of the
 * first argument, of the rest, keep_on_fail.  Keep it in the order `help`
 * should list. */
static const cmd_def table[] = {
	{"solution", "NAME [from OTHER]", "make NAME the current solution (a copy of OTHER)",
	 1, 3, cmd_solution, COMPL_SOLUTION, COMPL_SOLUTION, 0},
	{"add", "COMPOUND AMOUNT [UNIT]", "add to the current solution (mM unless a unit: M mM uM nM g/L mg/mL)",
	 2, 3, cmd_add, COMPL_COMPOUND, COMPL_NONE, 0},
	{"set", "COMPOUND AMOUNT [UNIT]", "set a compound's amount in the current solution",
	 2, 3, cmd_set, COMPL_COMPOUND, COMPL_NONE, 0},
	{"remove", "COMPOUND", "take a compound out of the current solution",
	 1, 1, cmd_remove, COMPL_COMPOUND, COMPL_NONE, 0},
	{"clear", "", "empty the current solution",
	 0, 0, cmd_clear, COMPL_NONE, COMPL_NONE, 0},
	{"note", "[TEXT...|off]", "a note on the current solution, kept with saves and recipes",
	 0, ANY, cmd_note, COMPL_NONE, COMPL_NONE, 0},
	{"show", "[NAME]", "free ions and activities, ionic strength, pH, free Ca2+/Mg2+, osmolality, charge",
	 0, 1, cmd_show, COMPL_SOLUTION, COMPL_NONE, 0},
	{"ph", "TARGET with TITRANT [stock CONC [UNIT]] [at C]",
	 "hold the current solution at a pH (at C: where it holds) with a titrant (KOH, NaOH, CsOH, NMDG, Tris, HCl ...)",
	 3, 8, cmd_ph, COMPL_NONE, COMPL_COMPOUND, 0},
	{"gas", "co2 PERCENT [dry] [pressure ATM] | off",
	 "equilibrate the current solution with CO2 (bicarbonate baths)",
	 1, 5, cmd_gas, COMPL_NONE, COMPL_NONE, 0},
	{"free", "METAL AMOUNT [UNIT] [with COMPOUND] [at C]",
	 "hold the free Ca2+ or Mg2+ at AMOUNT with the total of a metal source",
	 2, 7, cmd_free, COMPL_ION, COMPL_COMPOUND, 0},
	{"osmo", "TARGET [with COMPOUND] [at C]",
	 "hold the current solution at TARGET mOsm/kg (default: with sucrose)",
	 1, 5, cmd_osmo, COMPL_NONE, COMPL_COMPOUND, 0},
	{"targets", "[drop NAME]", "the targets of the current solution, whether each is met; drop one (its amount stays)",
	 0, 2, cmd_targets, COMPL_NONE, COMPL_NONE, 0},
	{"constants", "[NAME|default]",
	 "list the compilations, a ligand's or metal's constants, or pick a compilation",
	 0, 1, cmd_constants, COMPL_NONE, COMPL_NONE, 0},
	{"temp", "[C]", "show or set the temperature in degrees C (default 25)",
	 0, 1, cmd_temp, COMPL_NONE, COMPL_NONE, 0},
	{"activity", "[davies|dh]", "activity-coefficient model (default davies)",
	 0, 1, cmd_activity, COMPL_NONE, COMPL_NONE, 0},
	{"nernst", "INSIDE OUTSIDE [activities]", "equilibrium potential of each ion, inside relative to outside",
	 2, 3, cmd_nernst, COMPL_SOLUTION, COMPL_SOLUTION, 0},
	{"junction", "PIPETTE BATH [activities] [model henderson|planck|diffusion|all]",
	 "liquid junction potential of a pipette | bath pair, its breakdown and corrections",
	 2, 5, cmd_junction, COMPL_SOLUTION, COMPL_SOLUTION, 0},
	{"exchange", "OLD NEW [pipette NAME] [ground agcl|bridge SALT CONC [UNIT]]",
	 "offset a bath exchange brings with a bare Ag/AgCl or salt-bridge ground",
	 2, 9, cmd_exchange, COMPL_SOLUTION, COMPL_SOLUTION, 0},
	{"erev", "INSIDE OUTSIDE ION=P [ION=P ...] [activities] [corrected]",
	 "GHK reversal potential of the permeant ions between two solutions (P in cm/s or relative)",
	 3, ANY, cmd_ghk_erev, COMPL_SOLUTION, COMPL_ION, 0},
	{"ratio", "INSIDE OUTSIDE ION REF at MV [ION=P ...] | INSIDE OUTSIDE ION REF shift FROM_BATH TO_BATH by MV [ION=P ...]",
	 "permeability ratio P(ION)/P(REF) from a measured reversal potential or its shift",
	 6, ANY, cmd_ghk_ratio, COMPL_SOLUTION, COMPL_ION, 0},
	{"iv", "INSIDE OUTSIDE ION=P [...] [from V1] [to V2] [step DV] [rect MV] [svg FILE] [csv FILE] [plain] [activities]",
	 "GHK current-voltage curves, rectification and a plot (P in cm/s or relative)",
	 3, ANY, cmd_ghk_iv, COMPL_SOLUTION, COMPL_ION, 0},
	{"sweep", "COMPOUND|temp FROM to TO [UNIT] [in SOLUTION] show QUANTITY [keep-pH] [points N] [svg FILE] [csv FILE] [plain]",
	 "follow pH, free Ca2+/Mg2+, osmolality, ionic strength, E, the LJP or E_rev over a range of an amount or the temperature",
	 6, ANY, cmd_sweep, COMPL_COMPOUND, COMPL_SOLUTION, 0},
	{"review", "PIPETTE BATH", "the checks to run before mixing, each with a verdict and its number",
	 2, 2, cmd_review, COMPL_SOLUTION, COMPL_SOLUTION, 0},
	{"weigh", "VOLUME [mL|L] [html FILE] [csv FILE] [prep C]",
	 "bench sheet: what to weigh or pipette for the current solution, in the order of work; printable HTML, CSV",
	 1, 8, cmd_weigh, COMPL_NONE, COMPL_FILE, 0},
	{"stock", "COMPOUND CONC [UNIT] | COMPOUND off", "take a compound from a stock solution on the bench sheet",
	 2, 3, cmd_stock, COMPL_COMPOUND, COMPL_NONE, 0},
	{"save", "[NAME]", "save a solution to the database",
	 0, 1, cmd_save, COMPL_SOLUTION, COMPL_NONE, 0},
	{"load", "NAME[@VERSION]", "load a saved solution (or one of its versions) and make it current",
	 1, 1, cmd_load, COMPL_SAVED, COMPL_NONE, 0},
	{"versions", "NAME", "the saved versions of a solution, with date and summary",
	 1, 1, cmd_versions, COMPL_SAVED, COMPL_NONE, 0},
	{"undo", "", "take back the last change to the workspace (several levels)",
	 0, 0, cmd_undo, COMPL_NONE, COMPL_NONE, 0},
	{"list", "[FILE.nwb]", "solutions in the workspace and in the database, or the series of an NWB file",
	 0, 1, cmd_list, COMPL_FILE, COMPL_NONE, 0},
	{"delete", "NAME", "delete a saved solution from the database",
	 1, 1, cmd_delete, COMPL_SAVED, COMPL_NONE, 0},
	{"export", "NAME FILE", "write a recipe: a script of commands that rebuilds NAME",
	 2, 2, cmd_export, COMPL_SOLUTION, COMPL_FILE, 0},
	{"run", "FILE", "run the commands in FILE; stops at the first bad line",
	 1, 1, cmd_run, COMPL_FILE, COMPL_NONE, 1},
	{"correct", "FILE|-|FILE.nwb|value MV... by MV|for PIPETTE BATH [to OUT] [OPTION]...",
	 "subtract the LJP from recorded voltages, Vm = Vrecorded - LJP (CSV/TSV columns, values, NWB offsets); "
	 "CSV options: column N|NAME, skip N, skip-bad, whole-cell|outside-out|inside-out|cell-attached, to -; "
	 "NWB options: series NAME..., again",
	 1, ANY, cmd_correct, COMPL_FILE, COMPL_FILE, 0},
	{"define", "COMPOUND formula FORMULA [yields ION N ...] [hazard TEXT] [source TEXT] | ion SYMBOL charge Z [mobility D source TEXT] [formula FORMULA | mass G]",
	 "a compound or ion of your own, kept in the user database (D in 1e-9 m2/s at 25 C)",
	 2, ANY, cmd_define, COMPL_NONE, COMPL_NONE, 0},
	{"fw", "COMPOUND GRAMS_PER_MOL|off", "the formula weight on the bottle (hydrate, lot) for weighing in the current solution",
	 2, 2, cmd_fw, COMPL_COMPOUND, COMPL_NONE, 0},
	{"info", "COMPOUND|ION", "reference data of a compound or ion, with sources",
	 1, 1, cmd_info, COMPL_COMPOUND, COMPL_NONE, 0},
	{"compounds", "[KIND]", "the compounds ionmix knows",
	 0, 1, cmd_compounds, COMPL_NONE, COMPL_NONE, 0},
	{"help", "[COMMAND]", "list the commands, or explain one",
	 0, 1, cmd_help, COMPL_COMMAND, COMPL_NONE, 0},
	{"quit", "", "leave ionmix (Ctrl-D too); in a script, stop there",
	 0, 0, cmd_quit, COMPL_NONE, COMPL_NONE, 0},
	{"exit", "", "the same as quit",
	 0, 0, cmd_quit, COMPL_NONE, COMPL_NONE, 0},
};

const cmd_def *cmd_table(int *n)
{
	*n = (int)IM_COUNT(table);
	return table;
}

const cmd_def *cmd_lookup(const char *name)
{
	for (size_t i = 0; i < IM_COUNT(table); i++)
		if (table[i].name[0] == name[0] && strcmp(table[i].name, name) == 0)
			return &table[i];
	return NULL;
}

int cmd_split(char *buf, char **argv, int max, char *err)
{
	int argc = 0;
	char *r = buf, *w = buf;
	for (;;) {
		while (*r == ' ' || *r == '\t' || *r == '\n' || *r == '\r')
			r++;
		if (*r == '\0' || *r == '#')
			break;
		if (argc == max)
			return im_fail(err, "more than %d words in one command", max);
		argv[argc++] = w;
		while (*r && *r != ' ' && *r != '\t' && *r != '\n' && *r != '\r') {
			if (*r == '"' || *r == '\'') {
				char q = *r++;
				while (*r && *r != q) {
					/* a word never holds a line break: messages
					 * that echo it must stay one line */
					if (*r == '\n' || *r == '\r') {
						if (r[strspn(r, "\r\n")] == '\0')
							break; /* open at the line's end */
						return im_fail(err, "a %c-quoted word cannot "
							       "hold a line break", q);
					}
					*w++ = *r++;
				}
				if (*r != q)
					return im_fail(err, "unterminated %c quote", q);
				r++;
			} else {
				*w++ = *r++;
			}
		}
		if (*r)
			r++;
		*w++ = '\0';
	}
	return argc;
}

/* The command a typo most likely meant: the only one it is a prefix of,
 * or the only one that differs by one letter swapped, added or dropped. */
static const char *nearest_command(const char *name)
{
	const char *best = NULL;
	size_t n = strlen(name);
	int hits = 0;
	for (size_t i = 0; i < IM_COUNT(table); i++)
		if (n >= 2 && strncmp(table[i].name, name, n) == 0) {
			best = table[i].name;
			hits++;
		}
	if (hits == 1)
		return best;
	hits = 0;
	for (size_t i = 0; i < IM_COUNT(table); i++) {
		const char *t = table[i].name;
		size_t m = strlen(t), a = 0;
		if (m + 1 < n || n + 1 < m)
			continue;
		while (a < n && a < m && t[a] == name[a])
			a++;
		/* the rest must match after skipping one letter on either side */
		if ((m == n && strcmp(t + a + 1, name + a + 1) == 0) ||
		    (m == n + 1 && strcmp(t + a + 1, name + a) == 0) ||
		    (n == m + 1 && strcmp(t + a, name + a + 1) == 0) ||
		    (m == n && a + 1 < n && t[a] == name[a + 1] && t[a + 1] == name[a] &&
		     strcmp(t + a + 2, name + a + 2) == 0)) {
			best = t;
			hits++;
		}
	}
	return hits == 1 ? best : NULL;
}

/* A compound name with spaces typed without quotes (`add QX-314 chloride
 * 5`): when the first argument of a command that takes a compound is not
 * one, and it and the next words (up to three more) are, the words become
 * one argument in buf.  The longest such name wins; a name is looked up
 * exactly (by name or alias), so the joining is never a guess. */
static void join_compound_words(im_ctx *ctx, const cmd_def *d, char **argv, int *argc,
				char *buf, size_t n)
{
	const rd_compound *c;
	char scratch[IM_ERRLEN];
	if (d->compl != COMPL_COMPOUND || *argc < 3 ||
	    ses_compound(ctx->ses, argv[1], &c, scratch) == 0)
		return;
	for (int last = *argc - 1 < 4 ? *argc - 1 : 4; last >= 2; last--) {
		size_t len = 0;
		for (int i = 1; i <= last && len < n; i++)
			len += snprintf(buf + len, n - len, "%s%s", i > 1 ? " " : "", argv[i]);
		if (len >= n || ses_compound(ctx->ses, buf, &c, scratch) != 0)
			continue;
		argv[1] = buf;
		memmove(&argv[2], &argv[last + 1], (size_t)(*argc - last - 1) * sizeof *argv);
		*argc -= last - 1;
		return;
	}
}

static int exec_one(im_ctx *ctx, char *cmd, char *err)
{
	char *argv[CMD_ARGS_MAX], joined[CMD_LINE_MAX + 1];
	int argc = cmd_split(cmd, argv, CMD_ARGS_MAX, err), nargs, rc;
	const cmd_def *d;
	ses_mark mark;
	char w[48];
	if (argc <= 0)
		return argc;
	d = cmd_lookup(argv[0]);
	if (!d) {
		const char *near = nearest_command(argv[0]);
		out_clip(w, sizeof w, argv[0]);
		if (near)
			return im_fail(err, "unknown command '%s'; did you mean %s?", w, near);
		return im_fail(err, "unknown command '%s' (type `help`)", w);
	}
	join_compound_words(ctx, d, argv, &argc, joined, sizeof joined);
	nargs = argc - 1;
	if (nargs < d->min_args)
		return im_fail(err, "%s: missing argument (usage: %s %s)", d->name, d->name,
			       d->synopsis);
	if (d->max_args != ANY && nargs > d->max_args)
		return im_fail(err, "%s: unexpected '%s' (usage: %s %s)", d->name,
			       out_clip(w, sizeof w, argv[d->max_args + 1]), d->name,
			       d->synopsis);
	/* `run` takes no mark: each of its lines takes its own, and its
	 * earlier lines stand when a later one fails */
	if (!d->keep_on_fail)
		ses_mark_take(ctx->ses, &mark);
	rc = d->fn(ctx, argc, argv, err);
	if (rc == 0 && (ctx->batch ? out_write_failed(ctx->out) : out_failed(ctx->out)) &&
	    !ctx->out->wsaid++)
		rc = im_fail(err, "cannot write the result of %s to %s: %s", d->name,
			     ctx->out->name ? ctx->out->name : "standard output",
			     strerror(ctx->out->werrno ? ctx->out->werrno : EIO));
	if (d->keep_on_fail)
		return rc;
	if (rc != 0)
		ses_mark_restore(ctx->ses, &mark);
	else
		ses_mark_drop(ctx->ses, &mark);
	return rc;
}

int cmd_exec(im_ctx *ctx, const char *line, char *err)
{
	size_t n = strlen(line);
	char buf[CMD_LINE_MAX + 2];
	char *start;
	char q = 0;
	if (n > CMD_LINE_MAX)
		return im_fail(err, "line is longer than %d bytes, the limit of one line",
			       CMD_LINE_MAX);
	for (size_t i = 0; i < n; i++) {
		unsigned char c = (unsigned char)line[i];
		if ((c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0x7f)
			return im_fail(err, "line holds the control byte 0x%02x at column %zu: "
					    "not a command", c, i + 1);
	}
	memcpy(buf, line, n + 1);
	start = buf;
	for (char *p = buf;; p++) {
		if (*p == '\0' || (*p == ';' && !q) || (*p == '#' && !q)) {
			int last = *p != ';';
			*p = '\0';
			if (exec_one(ctx, start, err))
				return -1;
			if (last)
				return 0;
			start = p + 1;
		} else if ((*p == '"' || *p == '\'') && (!q || q == *p)) {
			q = q ? 0 : *p;
		}
	}
}

/* ---- the one line loop ---- */

/* A stdio reader with bounded memory: a line is read into a buffer of
 * CMD_LINE_MAX + 1 bytes, never more; a longer line is handed over cut at
 * that length (the loop refuses it by its length) and the rest of it is
 * skipped on the next call; past CMD_SCRIPT_MAX bytes the reader stops
 * (-2), so /dev/zero or an endless stream ends instead of growing. */
typedef struct file_reader {
	FILE *fp;
	char buf[CMD_LINE_MAX + 2];
	unsigned long long total; /* bytes read so far */
	int skip;                 /* 1: the rest of an overlong line is due */
} file_reader;

static int file_next(void *arg, char **line, size_t *len)
{
	file_reader *f = arg;
	size_t n = 0;
	int c = 0;
	errno = 0;
	while (f->skip) {
		c = getc_unlocked(f->fp);
		if (c == EOF)
			break;
		if (++f->total > CMD_SCRIPT_MAX)
			return -2;
		if (c == '\n')
			f->skip = 0;
	}
	if (!f->skip || c != EOF) {
		while (n < CMD_LINE_MAX + 1 && (c = getc_unlocked(f->fp)) != EOF) {
			if (++f->total > CMD_SCRIPT_MAX)
				return -2;
			f->buf[n++] = (char)c;
			if (c == '\n')
				break;
		}
	}
	if (n == 0)
		/* a directory opens but does not read (EISDIR): not an empty script */
		return ferror(f->fp) ? (errno ? -1 : (errno = EIO, -1)) : 0;
	f->skip = n == CMD_LINE_MAX + 1 && f->buf[n - 1] != '\n';
	f->buf[n] = '\0';
	*line = f->buf;
	*len = n;
	return 1;
}

void cmd_reader_file(cmd_reader *r, FILE *fp)
{
	file_reader *f = im_xcalloc(1, sizeof *f);
	f->fp = fp;
	r->next = file_next;
	r->arg = f;
}

void cmd_reader_file_done(cmd_reader *r)
{
	free(r->arg);
	r->arg = NULL;
}

static void set_errfile(im_ctx *ctx, const char *file, int line)
{
	free(ctx->errfile);
	ctx->errfile = file ? im_xstrdup(file) : NULL;
	ctx->errline = line;
}

int cmd_loop(im_ctx *ctx, const cmd_reader *rd, int *line_out, char *err)
{
	char *line;
	size_t len;
	int lineno = 0, r = 0;
	*line_out = 0;
	while (!ctx->quit && (r = rd->next(rd->arg, &line, &len)) > 0) {
		int rc;
		lineno++;
		if (lineno == 1 && len >= 3 && memcmp(line, "\xef\xbb\xbf", 3) == 0) {
			/* a UTF-8 byte-order mark, as some editors write: not a command */
			line += 3;
			len -= 3;
		}
		set_errfile(ctx, NULL, 0);
		/* the limit is on what the line says, not on its line end */
		if (len > 0 && line[len - 1] == '\n')
			len--;
		if (len > 0 && line[len - 1] == '\r')
			len--;
		if (sig_cancelled()) /* Ctrl-C in the shell: a script stops between lines */
			rc = im_fail(err, "%s", SIG_CANCELLED_MSG);
		else if (len > CMD_LINE_MAX)
			rc = im_fail(err, "line is longer than %d bytes, the limit of one line",
				     CMD_LINE_MAX);
		else if (memchr(line, '\0', len))
			rc = im_fail(err, "line holds a NUL byte: not a text script");
		else
			rc = (line[len] = '\0', cmd_exec(ctx, line, err));
		if (rc == 0)
			continue;
		if (!ctx->interactive || out_failed(ctx->out)) {
			*line_out = lineno;
			return -1;
		}
		out_error(ctx->out, ctx->errfile, ctx->errline, err);
	}
	if (!ctx->quit && r == -2) {
		*line_out = lineno + 1;
		return im_fail(err, "input is longer than %d bytes, the limit of one script "
			       "(an endless stream?)", CMD_SCRIPT_MAX);
	}
	if (!ctx->quit && r < 0) {
		*line_out = lineno + 1;
		return im_fail(err, "cannot read it: %s", strerror(errno ? errno : EIO));
	}
	*line_out = lineno;
	return 0;
}

int cmd_run_stream(im_ctx *ctx, FILE *fp, int *line_out, char *err)
{
	cmd_reader rd;
	struct stat sb;
	int rc, batch = ctx->batch;
	/* A script in a file, not typed: its results need not reach the
	 * output command by command (a write each); stdio writes them as its
	 * buffer fills, and the first out_failed after the script the rest.
	 * A pipe or a terminal may be a program or a person waiting for each
	 * answer: flushed after every command. */
	if (!ctx->interactive && fstat(fileno(fp), &sb) == 0 && S_ISREG(sb.st_mode))
		ctx->batch = 1;
	cmd_reader_file(&rd, fp);
	rc = cmd_loop(ctx, &rd, line_out, err);
	cmd_reader_file_done(&rd);
	ctx->batch = batch;
	return rc;
}

/* ---- the commands of the loop itself ---- */

static int cmd_run(im_ctx *ctx, int argc, char **argv, char *err)
{
	FILE *fp;
	int line = 0, rc, before;
	render *r;
	(void)argc;
	if (ctx->run_depth >= 8)
		return im_fail(err, "run: scripts nested more than 8 deep (a script runs itself?)");
	fp = strcmp(argv[1], "-") == 0 ? stdin : fopen(argv[1], "r");
	if (!fp) {
		char w[128];
		int e = errno;
		return im_fail(err, "cannot open %s: %s", out_clip(w, sizeof w, argv[1]),
			       strerror(e));
	}
	ctx->run_depth++;
	before = ctx->interactive;
	ctx->interactive = 0; /* a script stops at its first error, even run from the shell */
	rc = cmd_run_stream(ctx, fp, &line, err);
	ctx->interactive = before;
	ctx->run_depth--;
	if (fp != stdin)
		fclose(fp);
	if (rc != 0) {
		if (!ctx->errfile) /* the failure was in this file, not deeper */
			set_errfile(ctx, argv[1], line);
		return -1;
	}
	r = render_new(ctx->out);
	/* the script's commands spoke for themselves: JSON only */
	render_str(r, "ran", NULL, argv[1]);
	render_int(r, "lines", NULL, line);
	return render_done(r);
}

static int cmd_help(im_ctx *ctx, int argc, char **argv, char *err)
{
	render *r = render_new(ctx->out);
	if (argc > 1) {
		const cmd_def *d = cmd_lookup(argv[1]);
		if (!d) {
			char w[48];
			render_drop(r);
			return im_fail(err, "no command '%s' (type `help` for the list)",
				       out_clip(w, sizeof w, argv[1]));
		}
		render_str(r, "command", NULL, d->name);
		render_str(r, "synopsis", NULL, d->synopsis);
		render_str(r, "help", NULL, d->help);
		render_text(r, "usage: %s %s\n  %s", d->name, d->synopsis, d->help);
		return render_done(r);
	}
	render_text(r, "commands (`help COMMAND` for its arguments):");
	render_table(r, "commands", NULL);
	for (size_t i = 0; i < IM_COUNT(table); i++) {
		render_row(r);
		render_str(r, "command", "", table[i].name);
		render_str(r, "synopsis", NULL, table[i].synopsis);
		render_str(r, "help", "", table[i].help);
	}
	render_table_end(r);
	return render_done(r);
}

static int cmd_quit(im_ctx *ctx, int argc, char **argv, char *err)
{
	render *r = render_new(ctx->out);
	(void)argc;
	(void)argv;
	(void)err;
	ctx->quit = 1;
	render_bool(r, "quit", NULL, 1);
	return render_done(r);
}

/* ---- the context ---- */

void ctx_init(im_ctx *ctx, refdb *ref, out *o)
{
	memset(ctx, 0, sizeof *ctx);
	ctx->ses = im_xmalloc(sizeof *ctx->ses);
	ses_init(ctx->ses, ref);
	ctx->out = o;
}

int ctx_load_chemistry(im_ctx *ctx, char *err)
{
	return ses_load_chemistry(ctx->ses, err);
}

void ctx_free(im_ctx *ctx)
{
	if (ctx->ses)
		ses_free(ctx->ses);
	free(ctx->ses);
	ctx->ses = NULL;
	free(ctx->errfile);
	ctx->errfile = NULL;
}
