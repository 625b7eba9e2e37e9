/*
 * nwb.h - patch-clamp recordings in Neurodata Without Borders files
 * (NWB 2.x, HDF5): list the series, and correct a membrane or command
 * potential for the liquid junction potential by changing only the
 * series' `offset` attribute, never a data sample.
 *
 * In NWB 2.5 and later a series' value in its `unit` is
 *     value = data * conversion + offset
 * (attributes of the `data` dataset), so Vm = Vrecorded - LJP is the
 * offset made smaller by the LJP expressed in the series' unit (volts:
 * LJP_mV / 1000).  Series are looked for where NWB keeps them: the
 * direct children of /acquisition and /stimulus/presentation.
 *
 * Which series carry a potential: CurrentClampSeries and
 * IZeroClampSeries (the membrane potential) and VoltageClampStimulusSeries
 * (the command potential).  VoltageClampSeries (a current) and
 * CurrentClampStimulusSeries (an injected current) are listed but never
 * corrected.
 *
 * Each correction appends a record to the series' `comments` attribute
 * (text starting NWB_RECORD_MARK), which is how a second correction is
 * recognised and refused unless asked for.  A correction to another file
 * works on a copy made in the target's directory through fileio (so a
 * signal handler's fio_remove_temps removes it), changed, fsync'ed and
 * renamed over the target: a reader sees the old file or the whole new
 * one.  A correction in place changes the file itself through h5undo.h:
 * only the changed metadata is written, after an undo journal, so it
 * costs the same whatever the size of the data and the file gets every
 * change or none, also across a crash (the next read of the file undoes
 * an interrupted one: nwb_file.recovered).  Files are checked before
 * anything is written, so a refused correction leaves no file behind.
 *
 * Every function silences HDF5's own error printing and returns 0, or -1
 * with a one-line message in err.
 */
#ifndef IONMIX_NWB_H
#define IONMIX_NWB_H

/* The text that starts each correction record in `comments`. */
#define NWB_RECORD_MARK "ionmix LJP correction:"

typedef enum nwb_kind {
	NWB_CURRENT_CLAMP,      /* CurrentClampSeries: membrane potential */
	NWB_IZERO_CLAMP,        /* IZeroClampSeries: membrane potential, no current */
	NWB_VCLAMP_STIMULUS,    /* VoltageClampStimulusSeries: command potential */
	NWB_VOLTAGE_CLAMP,      /* VoltageClampSeries: membrane current */
	NWB_CCLAMP_STIMULUS,    /* CurrentClampStimulusSeries: injected current */
	NWB_OTHER_PATCH         /* another PatchClampSeries */
} nwb_kind;

typedef struct nwb_series {
	char *name;          /* the link name, e.g. "ccs_sweep1" (owned) */
	char *path;          /* "/acquisition/ccs_sweep1" (owned) */
	char *type;          /* neurodata_type as written (owned) */
	nwb_kind kind;
	char *unit;          /* data.unit, "" when missing (owned) */
	double conversion;   /* data.conversion; 1 when missing */
	int has_offset;      /* 0: no data.offset (NWB before 2.5) */
	double offset;       /* data.offset in `unit` */
	char *comments;      /* "" when missing (owned) */
	int corrections;     /* records of NWB_RECORD_MARK in comments */
	double last_ljp_mV;  /* the LJP of the last record; NaN when none */
} nwb_series;

typedef struct nwb_file {
	char *version;       /* root attribute nwb_version, "" when missing (owned) */
	nwb_series *s;       /* patch-clamp series, in file order (owned) */
	int n;
	char *recovered;     /* one line when an interrupted correction was undone
				before reading, else NULL (owned) */
} nwb_file;

/* 1 when path names an .nwb file (by extension, any case) or a file that
 * starts with the HDF5 signature, 0 otherwise. */
int nwb_is_nwb(const char *path);

/* Read the patch-clamp series of path (opened read-only).  -1 with err on
 * a missing, non-HDF5, truncated or damaged file, or one without an NWB
 * root.  Free with nwb_file_free. */
int nwb_read(const char *path, nwb_file *f, char *err);
void nwb_file_free(nwb_file *f);

/* 1 when a series of this kind holds a potential ionmix may correct. */
int nwb_kind_is_potential(nwb_kind k);
/* A few words for the kind: "membrane potential", "membrane current". */
const char *nwb_kind_what(nwb_kind k);

/* What a correction records beside the new offset. */
typedef struct nwb_record {
	const char *ljp_text;   /* the LJP subtracted, exact decimal in mV ("15.9") */
	double ljp_mV;          /* the same as a number */
	int has_range;          /* 1: lo_mV..hi_mV is the LJP's range */
	double lo_mV, hi_mV;
	const char *pipette;    /* solution names; NULL when the LJP was given */
	const char *bath;
	int has_temp;
	double t_C;
	const char *model;      /* "Henderson equation, concentrations" or "given" */
	const char *version;    /* ionmix version */
	const char *date;       /* ISO 8601, UTC */
} nwb_record;

/* One series changed. */
typedef struct nwb_change {
	char *name;           /* owned */
	char *path;           /* owned */
	char *unit;           /* owned */
	double old_offset;    /* in unit */
	double new_offset;    /* in unit, as stored (the attribute's own type) */
	double delta;         /* new - old as computed: -LJP in unit */
	int again;            /* 1: the series had been corrected before */
} nwb_change;

typedef struct nwb_result {
	nwb_change *c;        /* owned */
	int n;
	char *recovered;      /* as nwb_file's: an earlier interrupted correction
				 undone first, else NULL (owned) */
} nwb_result;

/* Correct in_path for rec->ljp_mV.  names[0..nnames) choose series by
 * name or path; none: every membrane and command potential series.
 * out_path NULL corrects in place (refused when the file is read-only);
 * otherwise the corrected copy goes to out_path and in_path is untouched.
 * A series already corrected is refused unless again.  Nothing is written
 * when any check fails.  Free res with nwb_result_free. */
int nwb_correct(const char *in_path, const char *out_path, const char *const *names,
		int nnames, int again, const nwb_record *rec, nwb_result *res, char *err);
void nwb_result_free(nwb_result *r);

#endif
