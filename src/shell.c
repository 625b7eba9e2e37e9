/*
 * shell.c - readline prompt, history and completion around cmd_exec.
 */
#include "shell.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include <readline/history.h>
#include <readline/readline.h>

#include "common.h"
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

static compl_kind want;     /* what the word being completed is */
static char **saved_names;  /* saved solutions, fetched once per completion */
static int nsaved;

static const char *candidate(int i)
{
	im_ctx *c = sh_ctx;
	int n;
	switch (want) {
	case COMPL_COMMAND: {
		const cmd_def *t = cmd_table(&n);
		return i < n ? t[i].name : NULL;
	}
	case COMPL_COMPOUND:
		n = refdb_ncompounds(c->ses->ref);
		if (i < n)
			return refdb_compound_at(c->ses->ref, i)->name;
		i -= n;
		return i < refdb_naliases(c->ses->ref) ? refdb_alias_at(c->ses->ref, i) : NULL;
	case COMPL_ION:
		return i < refdb_nions(c->ses->ref) ? refdb_ion_at(c->ses->ref, i)->symbol : NULL;
	case COMPL_SOLUTION:
		if (i < c->ses->ws.n)
			return c->ses->ws.sol[i]->name;
		i -= c->ses->ws.n;
		return i < nsaved ? saved_names[i] : NULL;
	case COMPL_SAVED:
		return i < nsaved ? saved_names[i] : NULL;
	default:
		return NULL;
	}
}

static char *generator(const char *text, int state)
{
	static int i;
	static size_t len;
	const char *s;
	if (!state) {
		i = 0;
		len = strlen(text);
	}
	while ((s = candidate(i++))) {
		if (strncasecmp(s, text, len) != 0)
			continue;
		if (!strchr(s, ' '))
			return im_xstrdup(s);
		if (want == COMPL_COMPOUND && refdb_compound(sh_ctx->ses->ref, s) &&
		    strcmp(refdb_compound(sh_ctx->ses->ref, s)->name, s) == 0) {
			/* a canonical name with a space completes quoted; aliases
			 * with spaces are left out (too many near-duplicates) */
			char *q = im_xmalloc(strlen(s) + 3);
			sprintf(q, "\"%s\"", s);
			return q;
		}
	}
	return NULL;
}

static void fetch_saved(void)
{
	char err[IM_ERRLEN];
	int failed;
	struct userdb *u = ses_userdb(sh_ctx->ses, 0, err, &failed);
	for (int i = 0; i < nsaved; i++)
		free(saved_names[i]);
	free(saved_names);
	saved_names = NULL;
	nsaved = 0;
	if (u) {
		int n = udb_list(u, &saved_names, err);
		nsaved = n > 0 ? n : 0;
	}
}

static char **complete(const char *text, int start, int end)
{
	char *argv[CMD_ARGS_MAX], buf[CMD_LINE_MAX + 1], err[IM_ERRLEN];
	int argc;
	const cmd_def *d;
	(void)end;
	rl_attempted_completion_over = 1;
	snprintf(buf, sizeof buf, "%.*s", start, rl_line_buffer);
	{ /* complete within the last ';'-separated command */
		char *semi = strrchr(buf, ';');
		argc = cmd_split(semi ? semi + 1 : buf, argv, CMD_ARGS_MAX, err);
	}
	if (argc < 0)
		return NULL;
	if (argc == 0) {
		want = COMPL_COMMAND;
	} else {
		d = cmd_lookup(argv[0]);
		if (!d)
			return NULL;
		want = argc == 1 ? d->compl : d->compl_rest;
	}
	if (want == COMPL_NONE)
		return NULL;
	if (want == COMPL_FILE) {
		rl_attempted_completion_over = 0;
		return rl_completion_matches(text, rl_filename_completion_function);
	}
	if (want == COMPL_SOLUTION || want == COMPL_SAVED)
		fetch_saved();
	return rl_completion_matches(text, generator);
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

/* The readline reader of cmd_loop: a prompt naming the current
 * solution and the temperature, history kept in history_path. */
typedef struct rl_reader {
	im_ctx *ctx;
	const char *history_path;
	char *line;
} rl_reader;

static int rl_next(void *arg, char **line, size_t *len)
{
	rl_reader *r = arg;
	char prompt[128];
	solution *s = ws_current(&r->ctx->ses->ws);
	fflush(r->ctx->out->fp);
	free(r->line);
	snprintf(prompt, sizeof prompt, "ionmix [%s, %.1f C]> ", s ? s->name : "no solution",
		 r->ctx->ses->temp_C);
	r->line = readline(prompt);
	if (!r->line)
		return 0;
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

int shell_run(im_ctx *ctx, const char *history_path)
{
	char err[IM_ERRLEN];
	int line;
	rl_reader rr = {ctx, history_path, NULL};
	cmd_reader rd = {rl_next, &rr};
	sh_ctx = ctx;
	rl_readline_name = "ionmix";
	rl_attempted_completion_function = complete;
	rl_basic_word_break_characters = " \t\n\"';";
	using_history();
	stifle_history(2000);
	if (history_path)
		read_history(history_path);
	out_printf(ctx->out, "ionmix: type `help` for the commands, `quit` or Ctrl-D to leave\n");
	if (cmd_loop(ctx, &rd, &line, err)) /* only when the output fails */
		out_error(ctx->out, NULL, 0, err);
	free(rr.line);
	if (history_path)
		history_truncate_file(history_path, 2000);
	for (int i = 0; i < nsaved; i++)
		free(saved_names[i]);
	free(saved_names);
	saved_names = NULL;
	nsaved = 0;
	out_printf(ctx->out, "\n");
	return 0;
}
