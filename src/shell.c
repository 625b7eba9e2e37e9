/*
 * shell.c - readline prompt, history and completion around cmd_exec.
 */
#include "shell.h"

#include <ctype.h>
#include <errno.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/select.h>
#include <sys/stat.h>

#include <readline/history.h>
#include <readline/readline.h>

#include "common.h"
#include "signals.h"
#include "units.h"
#include "usercomp.h"
#include "userdb.h"

static im_ctx *sh_ctx; /* readline's callbacks take no user pointer */

char *shell_history_path(void)
{
	const char *xdg = getenv("XDG_STATE_HOME"), *home = getenv("HOME");
	char buf[4096];
	if (xdg && *xdg == '/')
		snprintf(buf, sizeof buf, "%s/ionmix/history", xdg);
	else if (home && *home)
		snprintf(buf, sizeof buf, "%s/.local/state/ionmix/history", home);
	else
		return NULL;
	return im_xstrdup(buf);
}

/* ---- completion ---- */

/* A growing list of candidates (owned strings), deduplicated. */
typedef struct clist {
	char **v;
	int n, cap;
} clist;

static void cl_add(clist *l, const char *s)
{
	for (int i = 0; i < l->n; i++)
		if (strcmp(l->v[i], s) == 0)
			return;
	if (l->n + 2 > l->cap) {
		l->cap = l->cap ? 2 * l->cap : 32;
		l->v = im_xrealloc(l->v, (size_t)l->cap * sizeof *l->v);
	}
	l->v[l->n++] = im_xstrdup(s);
}

static int starts_with_ci(const char *s, const char *prefix)
{
	return strncasecmp(s, prefix, strlen(prefix)) == 0;
}

/* Which compounds fit the place being completed. */
typedef enum { PICK_ALL, PICK_TITRANT, PICK_METAL, PICK_FILLER, PICK_PRESENT } pick;

static int fits(const rd_compound *c, pick p, const rd_ion *metal, const solution *cur)
{
	switch (p) {
	case PICK_TITRANT:
		return im_strcaseeq(c->kind, "acid") || im_strcaseeq(c->kind, "base");
	case PICK_METAL:
		for (int k = 0; k < c->nyields; k++)
			if (c->yields[k].ion == metal)
				return 1;
		return 0;
	case PICK_FILLER:
		for (int k = 0; k < c->nyields; k++)
			if (c->yields[k].ion->z != 0)
				return 0;
		return c->nyields > 0;
	case PICK_PRESENT:
		for (int i = 0; cur && i < cur->n; i++)
			if (cur->items[i].c == c)
				return 1;
		return 0;
	default:
		return 1;
	}
}

/* Canonical names of the compounds (shipped, then user-defined) whose
 * name or an alias starts with prefix, case-insensitively. */
static void compounds_matching(session *ses, const char *prefix, pick p, const rd_ion *metal,
			       clist *out)
{
	char err[IM_ERRLEN];
	const refdb *ref = ses->ref;
	struct usercomp *uc = ses_defs(ses, err);
	const solution *cur = ses->ws.current >= 0 ? ses->ws.sol[ses->ws.current] : NULL;
	for (int i = 0; i < refdb_ncompounds(ref); i++) {
		const rd_compound *c = refdb_compound_at(ref, i);
		if (starts_with_ci(c->name, prefix) && fits(c, p, metal, cur))
			cl_add(out, c->name);
	}
	for (int i = 0; i < refdb_naliases(ref); i++) {
		const char *a = refdb_alias_at(ref, i);
		const rd_compound *c = refdb_compound(ref, a);
		if (c && starts_with_ci(a, prefix) && fits(c, p, metal, cur))
			cl_add(out, c->name);
	}
	for (int i = 0; i < uc_ncompounds(uc); i++) {
		const rd_compound *c = uc_compound_at(uc, i);
		if (starts_with_ci(c->name, prefix) && fits(c, p, metal, cur))
			cl_add(out, c->name);
	}
}

static void words_matching(const char *const *w, int n, const char *prefix, clist *out)
{
	for (int i = 0; i < n; i++)
		if (w[i] && starts_with_ci(w[i], prefix))
			cl_add(out, w[i]);
}

static char **saved_list(session *ses, int *n)
{
	char err[IM_ERRLEN], **names = NULL;
	int failed;
	struct userdb *u = ses_userdb(ses, 0, err, &failed);
	*n = 0;
	if (u) {
		int k = udb_list(u, &names, err);
		*n = k > 0 ? k : 0;
	}
	return names;
}

/* Turn the candidates into readline's array: [0] what replaces the text
 * (the one match, or the longest common prefix of all, never shorter
 * than what was typed), then the matches; NULL when none.  skip: bytes
 * of each candidate already on the line before the text (a multi-word
 * name typed unquoted); quote_spaces: quote a name with a space. */
static char **finish(clist *l, const char *text, size_t skip, int quote_spaces)
{
	char **m;
	size_t lcp;
	if (l->n == 0) {
		free(l->v);
		return NULL;
	}
	m = im_xmalloc((size_t)(l->n + 2) * sizeof *m);
	for (int i = 0; i < l->n; i++) {
		const char *s = l->v[i] + (strlen(l->v[i]) >= skip ? skip : 0);
		if (quote_spaces && strchr(s, ' ')) {
			char *q = im_xmalloc(strlen(s) + 3);
			sprintf(q, "\"%s\"", s);
			m[i + 1] = q;
		} else {
			m[i + 1] = im_xstrdup(s);
		}
		free(l->v[i]);
	}
	free(l->v);
	m[l->n + 1] = NULL;
	if (l->n == 1) {
		m[0] = m[1];
		m[1] = NULL;
		return m;
	}
	lcp = strlen(m[1]);
	for (int i = 2; i <= l->n; i++) {
		size_t k = 0;
		while (k < lcp && m[i][k] && tolower((unsigned char)m[i][k]) ==
					     tolower((unsigned char)m[1][k]))
			k++;
		lcp = k;
	}
	/* keep what was typed: a common prefix shorter than it (matches of
	 * another case, or through aliases) would eat the user's text */
	if (lcp < strlen(text) || (quote_spaces && m[1][0] == '"' && lcp < 2))
		m[0] = im_xstrdup(text);
	else {
		m[0] = im_xmalloc(lcp + 1);
		memcpy(m[0], m[1], lcp);
		m[0][lcp] = '\0';
	}
	return m;
}

static const char *const unit_words[] = {"M", "mM", "uM", "nM", "g/L", "mg/mL", "mg/L", "%"};

char **shell_complete(im_ctx *ctx, const char *line, int start, int end, int quoted,
		      int *files)
{
	char *argv[CMD_ARGS_MAX], buf[CMD_LINE_MAX + 1], err[IM_ERRLEN], text[CMD_LINE_MAX + 1];
	char joined[CMD_LINE_MAX + 1];
	int argc, cut = start;
	const cmd_def *d;
	compl_kind want;
	session *ses = ctx->ses;
	clist l = {NULL, 0, 0};
	double num;
	*files = 0;
	snprintf(text, sizeof text, "%.*s", end - start, line + start);
	/* an opening quote before the text belongs to the word being typed */
	if (cut > 0 && (line[cut - 1] == '"' || line[cut - 1] == '\''))
		cut--;
	snprintf(buf, sizeof buf, "%.*s", cut, line);
	{ /* complete within the last ';'-separated command */
		char *semi = strrchr(buf, ';');
		argc = cmd_split(semi ? semi + 1 : buf, argv, CMD_ARGS_MAX, err);
	}
	if (argc < 0)
		return NULL;
	if (argc == 0) {
		const cmd_def *t;
		int n;
		t = cmd_table(&n);
		for (int i = 0; i < n; i++)
			if (starts_with_ci(t[i].name, text))
				cl_add(&l, t[i].name);
		return finish(&l, text, 0, 0);
	}
	if (!(d = cmd_lookup(argv[0])))
		return NULL;
	/* after a number, the units (commands that take an amount) */
	if (argc >= 3 && units_number(argv[argc - 1], &num, err) == 0 &&
	    (strcmp(d->name, "add") == 0 || strcmp(d->name, "set") == 0 ||
	     strcmp(d->name, "stock") == 0 || strcmp(d->name, "free") == 0)) {
		words_matching(unit_words, (int)IM_COUNT(unit_words), text, &l);
		return finish(&l, text, 0, 0);
	}
	/* after `with`: what that command adds */
	if (argc >= 2 && strcmp(argv[argc - 1], "with") == 0) {
		pick p = strcmp(d->name, "ph") == 0     ? PICK_TITRANT
			 : strcmp(d->name, "free") == 0 ? PICK_METAL
			 : strcmp(d->name, "osmo") == 0 ? PICK_FILLER : PICK_ALL;
		const rd_ion *metal = NULL;
		if (p == PICK_METAL && ses_ion(ses, argv[1], &metal, err))
			return NULL;
		compounds_matching(ses, text, p, metal, &l);
		return finish(&l, text, 0, !quoted);
	}
	want = argc == 1 ? d->compl : d->compl_rest;
	/* a compound name with spaces typed without quotes: the words after
	 * the command and the text, taken together */
	if (d->compl == COMPL_COMPOUND && argc >= 2 && !quoted) {
		size_t len = 0;
		joined[0] = '\0';
		for (int i = 1; i < argc && len < sizeof joined; i++)
			len += snprintf(joined + len, sizeof joined - len, "%s ", argv[i]);
		if (len < sizeof joined) {
			size_t skip = len;
			snprintf(joined + len, sizeof joined - len, "%s", text);
			compounds_matching(ses, joined, strcmp(d->name, "remove") == 0 ? PICK_PRESENT
										   : PICK_ALL, NULL, &l);
			if (l.n)
				return finish(&l, text, skip, 0);
		}
	}
	switch (want) {
	case COMPL_COMPOUND:
		compounds_matching(ses, text, argc == 1 && strcmp(d->name, "remove") == 0
						       ? PICK_PRESENT : PICK_ALL, NULL, &l);
		return finish(&l, text, 0, !quoted);
	case COMPL_ION: {
		char uerr[IM_ERRLEN];
		struct usercomp *uc = ses_defs(ses, uerr);
		for (int i = 0; i < refdb_nions(ses->ref); i++)
			if (starts_with_ci(refdb_ion_at(ses->ref, i)->symbol, text))
				cl_add(&l, refdb_ion_at(ses->ref, i)->symbol);
		for (int i = 0; i < uc_nions(uc); i++)
			if (uc_ion_at(uc, i)->z != 0 && starts_with_ci(uc_ion_at(uc, i)->symbol, text))
				cl_add(&l, uc_ion_at(uc, i)->symbol);
		return finish(&l, text, 0, 0);
	}
	case COMPL_SOLUTION:
	case COMPL_SAVED: {
		int n = 0;
		char **saved = saved_list(ses, &n);
		if (want == COMPL_SOLUTION)
			for (int i = 0; i < ses->ws.n; i++)
				if (starts_with_ci(ses->ws.sol[i]->name, text))
					cl_add(&l, ses->ws.sol[i]->name);
		words_matching((const char *const *)saved, n, text, &l);
		for (int i = 0; i < n; i++)
			free(saved[i]);
		free(saved);
		return finish(&l, text, 0, 0);
	}
	case COMPL_COMMAND: {
		int n;
		const cmd_def *t = cmd_table(&n);
		for (int i = 0; i < n; i++)
			if (starts_with_ci(t[i].name, text))
				cl_add(&l, t[i].name);
		return finish(&l, text, 0, 0);
	}
	case COMPL_FILE:
		*files = 1;
		return NULL;
	default:
		return NULL;
	}
}

static char **complete(const char *text, int start, int end)
{
	int files = 0;
	char **m;
	(void)text;
	rl_attempted_completion_over = 1;
	m = shell_complete(sh_ctx, rl_line_buffer, start, end, rl_completion_quote_character != 0,
			   &files);
	if (files) {
		rl_attempted_completion_over = 0;
		return rl_completion_matches(text, rl_filename_completion_function);
	}
	return m;
}

/* ---- the loop ---- */

static void make_parent(const char *path)
{
	char buf[4096];
	snprintf(buf, sizeof buf, "%s", path);
	for (char *p = buf + 1; *p; p++)
		if (*p == '/') {
			*p = '\0';
			mkdir(buf, 0700);
			*p = '/';
		}
}

/* ---- reading a line: readline's callback interface, so that Ctrl-C at
 * the prompt clears the line being typed and keeps the shell ---- */

static char *cb_line;
static int cb_done;

static void on_line(char *line)
{
	cb_line = line;
	cb_done = 1;
	rl_callback_handler_remove();
}

/* A line from the terminal (caller frees), or NULL at end of input. */
static char *read_line(const char *prompt)
{
	FILE *in = rl_instream ? rl_instream : stdin;
	sigset_t block, orig;
	/* SIGINT is let in only while waiting (pselect), so that one arriving
	 * between the check of the flag and the wait is not slept through */
	sigemptyset(&block);
	sigaddset(&block, SIGINT);
	sigprocmask(SIG_BLOCK, &block, &orig);
	sig_clear(); /* a Ctrl-C during the last command was for it, not for this line */
	cb_done = 0;
	cb_line = NULL;
	rl_callback_handler_install(prompt, on_line);
	while (!cb_done) {
		fd_set fds;
		int rc;
		FD_ZERO(&fds);
		FD_SET(fileno(in), &fds);
		rc = sig_cancelled() ? 0 : pselect(fileno(in) + 1, &fds, NULL, NULL, NULL, &orig);
		if (sig_cancelled()) { /* Ctrl-C: drop what was typed, a new prompt */
			sig_clear();
			rl_free_line_state();
			rl_callback_sigcleanup();
			rl_replace_line("", 0);
			rl_point = rl_end = 0;
			fputs("^C", rl_outstream ? rl_outstream : stdout);
			rl_crlf();
			rl_on_new_line();
			rl_redisplay();
			continue;
		}
		if (rc < 0 && errno == EINTR)
			continue;
		if (rc < 0) {
			rl_callback_handler_remove();
			sigprocmask(SIG_SETMASK, &orig, NULL);
			return NULL;
		}
		rl_callback_read_char();
	}
	sigprocmask(SIG_SETMASK, &orig, NULL);
	return cb_line;
}

/* The readline reader of cmd_loop: a prompt naming the current
 * solution and the temperature, history kept in history_path. */
typedef struct rl_reader {
	im_ctx *ctx;
	const char *history_path;
	char *line;
	int eof;      /* 1: Ctrl-D (end of input) ended the loop */
} rl_reader;

static int rl_next(void *arg, char **line, size_t *len)
{
	rl_reader *r = arg;
	char prompt[128];
	session *ses = r->ctx->ses;
	solution *s = ses->ws.current >= 0 ? ses->ws.sol[ses->ws.current] : NULL;
	if (ses->keep_ws && ses->keep_err[0]) { /* said once; then no more tries */
		out_printf(r->ctx->out, "note: the workspace is no longer kept for the next "
			   "start: %s\n", ses->keep_err);
		ses->keep_ws = 0;
	}
	fflush(r->ctx->out->fp);
	free(r->line);
	snprintf(prompt, sizeof prompt, "ionmix [%s, %.1f C]> ", s ? s->name : "no solution",
		 ses->temp_C);
	r->line = read_line(prompt);
	sig_clear(); /* a Ctrl-C before this command is not for it */
	if (!r->line) {
		r->eof = 1;
		return 0;
	}
	if (r->line[strspn(r->line, " \t")] != '\0') {
		add_history(r->line);
		if (r->history_path) {
			make_parent(r->history_path);
			if (append_history(1, r->history_path) != 0)
				write_history(r->history_path);
		}
	}
	*line = r->line;
	*len = strlen(r->line);
	return 1;
}

/* The names of the workspace solutions that differ from what is saved,
 * comma-separated into buf; returns how many. */
static int unsaved_names(im_ctx *ctx, char *buf, size_t n)
{
	char err[IM_ERRLEN];
	size_t len = 0;
	int count = 0;
	buf[0] = '\0';
	for (int i = 0; i < ctx->ses->ws.n; i++) {
		const solution *s = ctx->ses->ws.sol[i];
		if (ses_unsaved(ctx->ses, s, err) == 0)
			continue;
		count++;
		if (len < n)
			len += snprintf(buf + len, n - len, "%s%s", len ? ", " : "", s->name);
	}
	if (len >= n && n > 4)
		strcpy(buf + n - 4, "...");
	return count;
}

/* Leaving with unsaved solutions: name them and ask once.  1: leave. */
static int confirm_leave(im_ctx *ctx)
{
	char names[512], *answer;
	int n = unsaved_names(ctx, names, sizeof names), yes;
	if (n == 0)
		return 1;
	out_printf(ctx->out, "\nnot saved: %s%s\n", names,
		   ctx->ses->keep_ws ? " (the workspace is kept for the next start; `save NAME` "
				       "keeps a solution for good)" : "");
	fflush(ctx->out->fp);
	answer = read_line("leave anyway? [y/N] ");
	sig_clear();
	if (!answer) /* a second Ctrl-D: leave */
		return 1;
	yes = answer[0] == 'y' || answer[0] == 'Y';
	free(answer);
	return yes;
}

/* Restore the workspace kept by the last session, saying so in one line. */
static void restore_kept(im_ctx *ctx)
{
	char err[IM_ERRLEN], names[256];
	size_t len = 0;
	int n;
	session *s = ctx->ses;
	if (!s->db_path)
		return;
	n = 0;
	if (ses_restore_kept(s, &n, err) < 0) {
		out_printf(ctx->out, "note: the workspace of the last session was not restored: "
			   "%s\n", err);
		return;
	}
	s->keep_ws = 1;
	if (n == 0)
		return;
	names[0] = '\0';
	for (int i = 0; i < s->ws.n && len < sizeof names; i++)
		len += snprintf(names + len, sizeof names - len, "%s%s", i ? ", " : "",
				s->ws.sol[i]->name);
	if (len >= sizeof names)
		strcpy(names + sizeof names - 4, "...");
	out_printf(ctx->out, "restored the workspace of the last session: %d solution%s (%s), "
		   "%.1f C%s%s\n", n, n == 1 ? "" : "s", names, s->temp_C,
		   s->ws.current >= 0 ? ", current " : "",
		   s->ws.current >= 0 ? s->ws.sol[s->ws.current]->name : "");
}

int shell_run(im_ctx *ctx, const char *history_path)
{
	char err[IM_ERRLEN];
	int line;
	rl_reader rr = {ctx, history_path, NULL, 0};
	cmd_reader rd = {rl_next, &rr};
	sh_ctx = ctx;
	rl_readline_name = "ionmix";
	rl_attempted_completion_function = complete;
	rl_basic_word_break_characters = " \t\n\"';";
	rl_completer_quote_characters = "\"'"; /* a quoted name is one word */
	rl_catch_signals = 0; /* SIGINT is signals.c's: a flag read_line polls */
	using_history();
	stifle_history(2000);
	if (history_path)
		read_history(history_path);
	out_printf(ctx->out, "ionmix: type `help` for the commands, `quit` or Ctrl-D to leave\n");
	restore_kept(ctx);
	for (;;) {
		rr.eof = 0;
		if (cmd_loop(ctx, &rd, &line, err)) { /* only when the output fails */
			out_error(ctx->out, NULL, 0, err);
			break;
		}
		if (confirm_leave(ctx))
			break;
		ctx->quit = 0;
	}
	free(rr.line);
	if (history_path)
		history_truncate_file(history_path, 2000);
	out_printf(ctx->out, "\n");
	return 0;
}
