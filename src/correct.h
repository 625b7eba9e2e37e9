/*
 * correct.h - streaming correction of recorded voltages for the liquid
 * junction potential: Vm = Vrecorded - LJP, applied to one or more columns
 * of a CSV or TSV file, every other byte copied unchanged.
 *
 * The rules, in one place (the command help and the tests follow them):
 *
 * Reading.  The delimiter is the one of tab, comma and semicolon that occurs
 * most often outside quotes in the first record (ties: tab, then comma, then
 * semicolon; none: comma).  Fields follow RFC 4180: a field that starts with
 * a double quote is quoted, may hold delimiters, newlines and doubled quotes,
 * and ends at the closing quote; a quote inside an unquoted field is an
 * ordinary byte.  Records end at LF; a CR before it is part of the line end
 * and is written back as read, so LF and CRLF files stay as they were.  A
 * UTF-8 byte-order mark at the start is copied and ignored for matching.
 * A field may be at most CORR_FIELD_MAX bytes (quotes included) and the
 * first record at most CORR_FIRST_MAX bytes; longer ones stop with an error
 * naming the line and column.  Memory is bounded (a read buffer and two
 * write buffers, kept between runs), so files larger than memory work.  A NUL byte anywhere stops with "binary
 * file".  Lines are counted physically (a quoted newline starts a new line);
 * error positions are FILE:LINE:COLUMN with COLUMN the 1-based field number.
 *
 * Columns.  Given by 1-based number ("2") or by header name ("Vm (mV)",
 * exact, then ASCII case-insensitive).  Without any, the columns whose
 * header names a voltage are taken (corr_voltage_header); when there is
 * none, the error asks for a column.  The first record is a header when a
 * chosen column holds a non-empty cell there that is not a number (when it
 * has none of the chosen columns: when any of its cells is not a number; a
 * column given by name implies a header); a header is copied unchanged.
 *
 * Units.  The LJP is in mV.  A column whose header gives its unit as V or
 * uV (µV) gets the LJP in that unit (LJP/1000 V, LJP*1000 uV); a column
 * without a unit in its header is taken to be in mV (reported as assumed).
 *
 * Arithmetic.  Exact, in decimal: the cell's digits are read as an integer
 * with d decimals, the LJP (an exact decimal with l decimals, see corr_ljp)
 * is brought to the same unit, and the difference is printed with
 * max(d, l) decimals, so no digit of either is lost and every corrected
 * value equals input minus LJP to its last printed digit.  When l <= d the
 * cell keeps its number of decimals, and correcting by +X then by -X gives
 * back the original bytes for cells in plain form: optional '-', digits,
 * optional '.' and digits.  Styles are kept where the result allows: "5."
 * keeps its dot, ".5" has no leading zero while the integer part is 0, a
 * leading '+' stays on results >= 0; leading zeros ("007") are dropped and
 * "-0" is printed "0" - so those forms may not round-trip byte for byte
 * (their values always do).  Scientific cells ("1.2e-3") keep their exponent text as
 * written, and the mantissa absorbs the change: "-7.0e-2" (V) minus 14.2 mV
 * is "-8.42e-2".  Numbers with more than CORR_DIGITS_MAX digits once
 * aligned, or once corrected (a carry into a new leading digit), stop
 * with an error rather than lose digits or write a number that could not
 * be read back.
 *
 * Cells.  Blanks (space, and tab when it is not the delimiter) around a
 * number, the quotes of a quoted cell and a CR are kept as they are.  An
 * empty cell (or blanks only) is copied and counted as skipped.  A cell that
 * is not a number stops with FILE:LINE:COLUMN and the cause, unless
 * skip_bad, which copies it and counts it (skipped and bad).  A row with
 * fewer fields than a corrected column stops with FILE:LINE, unless
 * skip_bad: its missing cells count as skipped and bad, the row as ragged,
 * the cells it has are corrected.  A line that is empty (or only a CR) is
 * copied and counted as blank, not as a row.
 *
 * Metadata.  Lines before the header are kept verbatim and not read as
 * records: the first `skip` lines (corr_opts), then every line that starts
 * with '#' (after a byte-order mark).  The header (or first data row) is
 * the line after them; line numbers in messages count the metadata lines.
 * When the metadata has '#' lines and corr_opts.comment is set, one more
 * comment line "# ionmix correct: ..." (corr_comment_format) is written
 * after them, with the line end of the last metadata line, so the file
 * itself records what was subtracted.
 *
 * Recording configuration (corr_opts.config), the rules `junction` prints
 * (electrode.h, el_true_mV), with V the recorded value and LJP the
 * junction when the offset was zeroed:
 *   whole-cell, outside-out:  Vm = V - LJP
 *   inside-out:               Vm = -(V - LJP)   (the bath faces the inner
 *                                                side of the patch)
 *   cell-attached:            Vpatch - Vrest = -(V - LJP)
 * The negation is exact too: the digits are those of V - LJP, the sign
 * flipped ("-0" printed "0").
 *
 * Record of what was done.  corr_file with an output path writes the data
 * and a side note OUT.ionmix.txt (see corr_note_format) through the one
 * file writer (fileio.h) as one batch: both go to temporary files in the
 * target directory and are renamed only when both were written, the data
 * first, so there is never a note without its data; on any error or
 * cancellation (signals.h) both temporaries are removed and an earlier OUT
 * stays as it was.  No output (data or note) may be the input file itself
 * (compared by device and inode).  An output that is not a regular file
 * (standard output, a FIFO, a terminal, /dev/null) is written straight
 * through and gets no note.  The CSV itself stays byte-for-byte pure
 * unless a comment line is asked for (above).
 *
 * Speed.  Plain records (no quoted field) take a fast path (the commonest,
 * short rows ending in the corrected cell, four at a time with AVX2 where
 * the processor has it: corr_set_wide), and a large buffer of them is
 * shared with a second thread (corr_set_parallel); none of these changes
 * a byte of the output.
 *
 * Cancellation.  The engine polls sig_cancelled() at every refill of its
 * read buffer (every 512 KiB) and stops with SIG_CANCELLED_MSG.
 *
 * Nothing here prints except to the output stream it is given.
 */
#ifndef IONMIX_CORRECT_H
#define IONMIX_CORRECT_H

#include <stddef.h>
#include <stdio.h>

#define CORR_FIELD_MAX (64 * 1024)   /* bytes per field, quotes included */
#define CORR_FIRST_MAX (256 * 1024)  /* bytes in the first record */
#define CORR_MAXCOLS 64              /* columns corrected in one run */
#define CORR_DIGITS_MAX 100          /* digits of a cell once aligned */
#define CORR_LJP_MAX_mV 1000.0       /* |LJP| above this is refused */
#define CORR_LJP_DECIMALS_MAX 9
#define CORR_NAME_MAX 64             /* header text kept per column */
#define CORR_NOTE_SUFFIX ".ionmix.txt"

/* An LJP as an exact decimal: scaled / 10^decimals mV. */
typedef struct corr_ljp {
	long long scaled;
	int decimals;   /* 0..CORR_LJP_DECIMALS_MAX */
} corr_ljp;

/* Parse an LJP in mV as typed ("14.2", "-3", "1.42e1").  The decimals are
 * those written: "14.20" has 2, "1.42e1" has 1.  Rejects anything but a
 * plain decimal (no NaN, inf, hex, blanks or trailing text), |LJP| above
 * CORR_LJP_MAX_mV and more than CORR_LJP_DECIMALS_MAX decimals.  0 or -1. */
int corr_ljp_parse(const char *s, corr_ljp *l, char *err);
/* An LJP computed as a double, rounded half away from zero to `decimals`
 * (0..CORR_LJP_DECIMALS_MAX).  Rejects non-finite and out-of-range values. */
int corr_ljp_from_mV(double ljp_mV, int decimals, corr_ljp *l, char *err);
double corr_ljp_mV(const corr_ljp *l);
/* "14.2", "-0.25": the exact decimal, into buf of n bytes (32 suffice). */
void corr_ljp_format(const corr_ljp *l, char *buf, size_t n);

/* The trivial form, for one value: mv - ljp_mV into *out_mV.  Rejects
 * non-finite inputs.  0 or -1. */
int corr_value(double mv, double ljp_mV, double *out_mV, char *err);

/* Correct one cell by the rules above.  s[0..n) is the cell's content (no
 * quotes); unit_exp is the column's unit as a power of ten relative to mV
 * (0 mV, -3 V, 3 uV).  Writes the new content (blanks kept) to buf of bufsz
 * bytes (CORR_DIGITS_MAX + n + 8 always suffice), NUL-terminated, length
 * in *len.  Returns 0 when corrected, 1 when the cell is empty or blank
 * (buf then holds a copy), -1 with err when it is not a number or has too
 * many digits. */
int corr_cell(const char *s, size_t n, const corr_ljp *l, int unit_exp,
	      char *buf, size_t bufsz, size_t *len, char *err);

/* Does header text h[0..n) name a voltage?  Returns 1 when its unit is mV,
 * V, uV, µV or μV (in "name (unit)", "name [unit]", "name/unit", "name_unit",
 * "name unit", or the unit alone - but "V" alone is a name), or when it has no
 * unit and its name, lower-cased with non-alphanumerics dropped, is one of
 * v, vm, vmem, vmembrane, voltage, potential, membranepotential, e, em,
 * vcmd, vcommand, vhold, vholding, vp, vpip, vpipette, or contains
 * "voltage" or "potential".  A header with another unit ("I (pA)") is not
 * a voltage.  *unit_exp gets the unit as above (0 when none), *assumed 1
 * when no unit was given.  Either pointer may be NULL. */
int corr_voltage_header(const char *h, size_t n, int *unit_exp, int *assumed);

/* Recording configurations: the form of the correction (see above). */
typedef enum corr_config {
	CORR_WHOLE_CELL = 0,
	CORR_OUTSIDE_OUT,
	CORR_INSIDE_OUT,
	CORR_CELL_ATTACHED,
} corr_config;

/* "whole-cell", "outside-out", "inside-out", "cell-attached". */
const char *corr_config_name(corr_config c);
/* The configuration named by word (the names above); 0, or -1 when word
 * names none. */
int corr_config_parse(const char *word, corr_config *c);
/* The formula applied, e.g. "Vm = -(Vrecorded - LJP)". */
const char *corr_config_formula(corr_config c);

/* What the side note and the comment line record beside the LJP; every
 * pointer may be NULL (then "not given" or left out).  Not owned. */
typedef struct corr_about {
	const char *pipette, *bath;  /* solution names, for an LJP computed from them */
	const char *model;           /* e.g. "Henderson (concentrations)"; NULL: given */
	const char *range;           /* the LJP's range when known, e.g. "13.1 to 15.0 mV" */
	const char *version;         /* ionmix version */
	const char *date;            /* when, ISO 8601 UTC */
	double temperature_C;        /* NAN when not relevant */
} corr_about;

/* Fill a->version and a->date (into datebuf, 32 bytes) for now. */
void corr_about_stamp(corr_about *a, char *datebuf, size_t n);

typedef struct corr_opts {
	const char *const *columns; /* "2" or a header name; NULL/0: voltage headers */
	int ncolumns;
	corr_ljp ljp;               /* mV, subtracted */
	int skip_bad;               /* 1: copy bad cells and ragged rows, count them */
	long skip;                  /* leading lines kept verbatim (0: only '#' lines) */
	corr_config config;         /* the form of the correction */
	int comment;                /* 1: add a comment line after '#' metadata */
	const corr_about *about;    /* for the comment line and the note; may be NULL */
} corr_opts;

typedef struct corr_column {
	int index;                  /* 1-based field number */
	char name[CORR_NAME_MAX];   /* header text ("" without a header), cut to fit */
	int unit_exp;               /* 0 mV, -3 V, 3 uV */
	int unit_assumed;           /* 1: no unit in the header, mV taken */
} corr_column;

typedef struct corr_result {
	long rows;          /* data records; header and blank lines not counted */
	long corrected;     /* cells rewritten */
	long skipped;       /* cells copied unchanged: empty, plus bad */
	long bad;           /* of those: not a number, or missing (skip_bad only) */
	long ragged;        /* rows lacking a corrected column (skip_bad only) */
	long blank;         /* empty lines copied */
	long meta;          /* metadata lines kept before the header */
	int comment;        /* 1: a comment line was added after them */
	int note;           /* 1: corr_file wrote the side note */
	corr_config config;
	const corr_about *about; /* as given in corr_opts (not owned) */
	double ljp_mV;
	corr_ljp ljp;
	char delim;         /* ',', '\t' or ';' */
	int header;         /* 1: the first record is a header */
	int ncols;
	corr_column cols[CORR_MAXCOLS]; /* ascending by index */
} corr_result;

/* Stream in to out.  in_name names the input in messages.  On failure
 * returns -1 with a one-line message; what was written to out by then is
 * incomplete (corr_file never leaves such a file).  *r is filled as far as
 * the run went.  Nothing is closed. */
int corr_stream(FILE *in, const char *in_name, FILE *out, const corr_opts *o,
		corr_result *r, char *err);

/* Correct the file at in_path ("-": standard input, not closed).  With
 * out_path, write it through fileio.h (atomically for a regular file or a
 * new name; a new file gets 0666 less the umask, an existing one keeps its
 * mode) together with the side note out_path CORR_NOTE_SUFFIX, as
 * described above; r->note says whether the note was written.  out_path
 * "-" is standard output.  An output or note that is the input file is
 * refused before anything is written.  Without out_path, write to out_fp
 * (flushed) and no note. */
int corr_file(const char *in_path, const char *out_path, FILE *out_fp,
	      const corr_opts *o, corr_result *r, char *err);

/* Whether corr_stream may cut a large read buffer in two and have a
 * second thread do the second half (on: the default, where there is more
 * than one processor) or not.  The output, counts and messages are the
 * same either way; for tests and measurements. */
void corr_set_parallel(int on);

/* Whether the leanest loop may work on four rows at once with AVX2 where
 * the processor has it (on: the default) or not; the output is the same
 * either way.  For tests and measurements. */
void corr_set_wide(int on);

/* The side note's text: what was subtracted (the formula of r->config),
 * the LJP, its range, pipette, bath, temperature, model, ionmix version and
 * date (r->about), from which columns of which file, and the counts.
 * Several lines, each ending in '\n'; out_name may be NULL.  Returns the
 * length (cut to n - 1). */
size_t corr_note_format(const corr_result *r, const char *in_name,
			const char *out_name, char *buf, size_t n);

/* The comment line (starting "# ionmix correct:", no line end) for the
 * LJP l, configuration c and a (may be NULL), into buf of n bytes; returns
 * its length (cut to n - 1). */
size_t corr_comment_format(const corr_ljp *l, corr_config c, const corr_about *a,
			   char *buf, size_t n);

/* "comma", "tab", "semicolon". */
const char *corr_delim_name(char delim);

#endif
