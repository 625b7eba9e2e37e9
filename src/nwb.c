/*
 * nwb.c - list and LJP-correct the patch-clamp series of NWB 2.x files
 * through the HDF5 C library, attributes only.  See nwb.h.
 */
#define _GNU_SOURCE /* copy_file_range */
#include "nwb.h"

#include "common.h"
#include "fileio.h"
#include "h5undo.h"

#include "h5lazy.h" /* <hdf5.h>, the library loaded on first use */

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>

/* The groups whose direct children are series (NWB 2.x layout). */
static const char *const series_groups[] = { "/acquisition", "/stimulus/presentation" };

/* neurodata_type -> kind; how to add a row: the type as NWB names it. */
static const struct {
	const char *type;
	nwb_kind kind;
} kinds[] = {
	{ "CurrentClampSeries", NWB_CURRENT_CLAMP },
	{ "IZeroClampSeries", NWB_IZERO_CLAMP },
	{ "VoltageClampStimulusSeries", NWB_VCLAMP_STIMULUS },
	{ "VoltageClampSeries", NWB_VOLTAGE_CLAMP },
	{ "CurrentClampStimulusSeries", NWB_CCLAMP_STIMULUS },
	{ "PatchClampSeries", NWB_OTHER_PATCH },
};

int nwb_kind_is_potential(nwb_kind k)
{
	return k == NWB_CURRENT_CLAMP || k == NWB_IZERO_CLAMP || k == NWB_VCLAMP_STIMULUS;
}

const char *nwb_kind_what(nwb_kind k)
{
	switch (k) {
	case NWB_CURRENT_CLAMP:
	case NWB_IZERO_CLAMP:
		return "membrane potential";
	case NWB_VCLAMP_STIMULUS:
		return "command potential";
	case NWB_VOLTAGE_CLAMP:
		return "membrane current";
	case NWB_CCLAMP_STIMULUS:
		return "injected current";
	default:
		return "patch-clamp series";
	}
}

/* ---- HDF5 errors ---- */

static void quiet(void)
{
	H5Eset_auto2(H5E_DEFAULT, NULL, NULL);
}

static herr_t first_desc(unsigned n, const H5E_error2_t *e, void *data)
{
	char *buf = data;
	(void)n;
	if (buf[0] == '\0' && e->desc && e->desc[0]) {
		snprintf(buf, 160, "%s", e->desc);
		for (char *p = buf; *p; p++)
			if (*p == '\n' || *p == '\r')
				*p = ' ';
	}
	return 0;
}

/* The innermost message of HDF5's error stack, into buf (160 bytes). */
static void h5_cause(char *buf)
{
	buf[0] = '\0';
	H5Ewalk2(H5E_DEFAULT, H5E_WALK_UPWARD, first_desc, buf);
	if (buf[0] == '\0')
		snprintf(buf, 160, "damaged or unreadable");
}

/* ---- attributes ---- */

/* The string attribute name of obj (heap), or NULL when it is missing or
 * not one string. */
static char *attr_str(hid_t obj, const char *name)
{
	char *res = NULL;
	if (H5Aexists(obj, name) <= 0)
		return NULL;
	hid_t a = H5Aopen(obj, name, H5P_DEFAULT);
	if (a < 0)
		return NULL;
	hid_t ft = H5Aget_type(a), sp = H5Aget_space(a);
	if (ft >= 0 && sp >= 0 && H5Tget_class(ft) == H5T_STRING &&
	    H5Sget_simple_extent_npoints(sp) == 1) {
		hid_t mt = H5Tcopy(H5T_C_S1);
		H5Tset_cset(mt, H5Tget_cset(ft));
		if (H5Tis_variable_str(ft) > 0) {
			char *p = NULL;
			H5Tset_size(mt, H5T_VARIABLE);
			if (H5Aread(a, mt, &p) >= 0 && p) {
				res = im_xstrdup(p);
				H5free_memory(p);
			}
		} else {
			size_t n = H5Tget_size(ft);
			char *p = im_xcalloc(n + 1, 1);
			H5Tset_size(mt, n);
			H5Tset_strpad(mt, H5Tget_strpad(ft));
			if (H5Aread(a, mt, p) >= 0)
				res = p;
			else
				free(p);
		}
		H5Tclose(mt);
	}
	if (ft >= 0)
		H5Tclose(ft);
	if (sp >= 0)
		H5Sclose(sp);
	H5Aclose(a);
	return res;
}

/* The numeric attribute name of obj as a double: 1 found, 0 missing,
 * -1 present but not one number. */
static int attr_num(hid_t obj, const char *name, double *v)
{
	if (H5Aexists(obj, name) <= 0)
		return 0;
	hid_t a = H5Aopen(obj, name, H5P_DEFAULT);
	if (a < 0)
		return -1;
	int rc = -1;
	hid_t ft = H5Aget_type(a), sp = H5Aget_space(a);
	if (ft >= 0 && sp >= 0 &&
	    (H5Tget_class(ft) == H5T_FLOAT || H5Tget_class(ft) == H5T_INTEGER) &&
	    H5Sget_simple_extent_npoints(sp) == 1 && H5Aread(a, H5T_NATIVE_DOUBLE, v) >= 0)
		rc = 1;
	if (ft >= 0)
		H5Tclose(ft);
	if (sp >= 0)
		H5Sclose(sp);
	H5Aclose(a);
	return rc;
}

static int write_comments(hid_t g, const char *text)
{
	int rc = -1;
	hid_t t = H5Tcopy(H5T_C_S1), sp = H5Screate(H5S_SCALAR), a = -1;
	H5Tset_size(t, H5T_VARIABLE);
	H5Tset_cset(t, H5T_CSET_UTF8);
	if (H5Aexists(g, "comments") > 0 && H5Adelete(g, "comments") < 0)
		goto done;
	a = H5Acreate2(g, "comments", t, sp, H5P_DEFAULT, H5P_DEFAULT);
	if (a >= 0 && H5Awrite(a, t, &text) >= 0)
		rc = 0;
done:
	if (a >= 0)
		H5Aclose(a);
	H5Sclose(sp);
	H5Tclose(t);
	return rc;
}

/* ---- reading ---- */

int nwb_is_nwb(const char *path)
{
	size_t n = strlen(path);
	if (n > 4 && strcasecmp(path + n - 4, ".nwb") == 0)
		return 1;
	static const unsigned char sig[8] = { 0x89, 'H', 'D', 'F', '\r', '\n', 0x1a, '\n' };
	unsigned char b[8];
	FILE *fp = fopen(path, "rb");
	if (!fp)
		return 0;
	size_t got = fread(b, 1, 8, fp);
	fclose(fp);
	return got == 8 && memcmp(b, sig, 8) == 0;
}

static nwb_kind kind_of(const char *type, int *known)
{
	*known = 0;
	if (!type)
		return NWB_OTHER_PATCH;
	for (size_t i = 0; i < IM_COUNT(kinds); i++)
		if (strcmp(type, kinds[i].type) == 0) {
			*known = 1;
			return kinds[i].kind;
		}
	size_t n = strlen(type);
	*known = n > 11 && strcmp(type + n - 11, "ClampSeries") == 0;
	return NWB_OTHER_PATCH;
}

static void count_records(nwb_series *s)
{
	s->corrections = 0;
	s->last_ljp_mV = NAN;
	const char *p = s->comments;
	while ((p = strstr(p, NWB_RECORD_MARK)) != NULL) {
		s->corrections++;
		p += strlen(NWB_RECORD_MARK);
		const char *l = strstr(p, "; LJP ");
		if (l)
			s->last_ljp_mV = strtod(l + 6, NULL);
	}
}

typedef struct walk {
	nwb_file *f;
	const char *parent;
	int cap;
	int failed;
} walk;

static herr_t visit(hid_t parent, const char *name, const H5L_info_t *info, void *data)
{
	walk *w = data;
	if (info->type != H5L_TYPE_HARD && info->type != H5L_TYPE_SOFT)
		return 0;
	hid_t g = H5Oopen(parent, name, H5P_DEFAULT);
	if (g < 0)
		return 0;
	if (H5Iget_type(g) != H5I_GROUP) {
		H5Oclose(g);
		return 0;
	}
	char *type = attr_str(g, "neurodata_type");
	int known;
	nwb_kind k = kind_of(type, &known);
	if (!known) {
		free(type);
		H5Oclose(g);
		return 0;
	}
	if (w->f->n == w->cap) {
		w->cap = w->cap ? 2 * w->cap : 16;
		w->f->s = im_xrealloc(w->f->s, (size_t)w->cap * sizeof *w->f->s);
	}
	nwb_series *s = &w->f->s[w->f->n++];
	memset(s, 0, sizeof *s);
	s->name = im_xstrdup(name);
	s->path = im_xmalloc(strlen(w->parent) + strlen(name) + 2);
	sprintf(s->path, "%s/%s", w->parent, name);
	s->type = type;
	s->kind = k;
	s->conversion = 1.0;
	s->comments = attr_str(g, "comments");
	if (!s->comments)
		s->comments = im_xstrdup("");
	count_records(s);
	s->unit = NULL;
	if (H5Lexists(g, "data", H5P_DEFAULT) > 0) {
		hid_t d = H5Oopen(g, "data", H5P_DEFAULT);
		if (d >= 0) {
			s->unit = attr_str(d, "unit");
			if (attr_num(d, "conversion", &s->conversion) <= 0)
				s->conversion = 1.0;
			s->has_offset = attr_num(d, "offset", &s->offset) == 1;
			H5Oclose(d);
		}
	}
	if (!s->unit)
		s->unit = im_xstrdup("");
	H5Oclose(g);
	return 0;
}

/* Open path (flags: H5F_ACC_RDONLY or _RDWR, through fapl), or -1 with a
 * one-line err. */
static hid_t open_h5(const char *path, unsigned flags, hid_t fapl, char *err)
{
	struct stat st;
	if (stat(path, &st) != 0)
		return im_fail(err, "cannot read %s: %s", path, strerror(errno));
	if (S_ISDIR(st.st_mode))
		return im_fail(err, "cannot read %s: it is a directory", path);
	htri_t is = H5Fis_hdf5(path);
	if (is == 0)
		return im_fail(err, "%s is not an HDF5 file (an NWB 2.x recording is one)", path);
	hid_t f = H5Fopen(path, flags, fapl);
	if (f < 0) {
		char cause[160];
		h5_cause(cause);
		return im_fail(err, "cannot open %s as HDF5 (truncated or damaged?): %s", path, cause);
	}
	return f;
}

static int read_open(hid_t fid, const char *path, nwb_file *f, char *err)
{
	memset(f, 0, sizeof *f);
	hid_t root = H5Gopen2(fid, "/", H5P_DEFAULT);
	if (root < 0)
		return im_fail(err, "cannot read the root group of %s", path);
	f->version = attr_str(root, "nwb_version");
	H5Gclose(root);
	if (!f->version)
		return im_fail(err, "%s is HDF5 but not NWB (no nwb_version attribute at the root)",
			       path);
	walk w = { f, NULL, 0, 0 };
	for (size_t i = 0; i < IM_COUNT(series_groups); i++) {
		if (H5Lexists(fid, "/stimulus", H5P_DEFAULT) <= 0 && i == 1)
			continue;
		if (H5Lexists(fid, series_groups[i], H5P_DEFAULT) <= 0)
			continue;
		hid_t g = H5Gopen2(fid, series_groups[i], H5P_DEFAULT);
		if (g < 0)
			continue;
		hsize_t idx = 0;
		w.parent = series_groups[i];
		H5Literate(g, H5_INDEX_NAME, H5_ITER_INC, &idx, visit, &w);
		H5Gclose(g);
	}
	return 0;
}

/* Read path into f (as nwb_read).  keep NULL: read-only, closed again;
 * otherwise opened read-write through the undo driver (h5undo.h) and left
 * open in *keep for the change, so the file is opened and its metadata
 * read once. */
static int read_file(const char *path, hid_t *keep, nwb_file *f, char *err)
{
	char note[IM_ERRLEN];
	memset(f, 0, sizeof *f);
	int rec = h5u_recover(path, note, sizeof note, err);
	if (rec < 0 || im_h5_load(err))
		return -1;
	quiet();
	hid_t fapl = keep ? h5u_fapl(err) : H5P_DEFAULT;
	if (fapl < 0)
		return -1;
	hid_t fid = open_h5(path, keep ? H5F_ACC_RDWR : H5F_ACC_RDONLY, fapl, err);
	if (keep)
		H5Pclose(fapl);
	if (keep && fid < 0 && h5u_was_locked())
		im_fail(err, "cannot change %s in place: another program has it open (locked);"
			" close it there, or write a corrected copy with `to OUT.nwb`", path);
	int rc = fid < 0 ? -1 : read_open(fid, path, f, err);
	if (fid >= 0 && (rc || !keep))
		H5Fclose(fid);
	if (keep && (rc || fid < 0))
		h5u_discard(); /* nothing was written */
	if (rc)
		nwb_file_free(f);
	else if (keep)
		*keep = fid;
	if (rc == 0 && rec == 1)
		f->recovered = im_xstrdup(note);
	return rc;
}

int nwb_read(const char *path, nwb_file *f, char *err)
{
	return read_file(path, NULL, f, err);
}

void nwb_file_free(nwb_file *f)
{
	for (int i = 0; i < f->n; i++) {
		free(f->s[i].name);
		free(f->s[i].path);
		free(f->s[i].type);
		free(f->s[i].unit);
		free(f->s[i].comments);
	}
	free(f->s);
	free(f->version);
	free(f->recovered);
	memset(f, 0, sizeof *f);
}

void nwb_result_free(nwb_result *r)
{
	for (int i = 0; i < r->n; i++) {
		free(r->c[i].name);
		free(r->c[i].path);
		free(r->c[i].unit);
	}
	free(r->c);
	free(r->recovered);
	memset(r, 0, sizeof *r);
}

/* ---- correcting ---- */

/* mV per unit of the series ("volts": 1000), or 0 when unit is not a
 * potential. */
static double mV_per_unit(const char *unit)
{
	if (strcmp(unit, "volts") == 0 || strcmp(unit, "volt") == 0 || strcmp(unit, "V") == 0 ||
	    strcmp(unit, "Volts") == 0)
		return 1000.0;
	if (strcmp(unit, "millivolts") == 0 || strcmp(unit, "mV") == 0)
		return 1.0;
	if (strcmp(unit, "microvolts") == 0 || strcmp(unit, "uV") == 0)
		return 1e-3;
	return 0;
}

static const nwb_series *find(const nwb_file *f, const char *name, int *ambiguous)
{
	const nwb_series *hit = NULL;
	*ambiguous = 0;
	for (int i = 0; i < f->n; i++) {
		const nwb_series *s = &f->s[i];
		if (strcmp(s->path, name) == 0 || strcmp(s->path + 1, name) == 0)
			return s;
		if (strcmp(s->name, name) == 0) {
			if (hit)
				*ambiguous = 1;
			hit = s;
		}
	}
	return hit;
}

/* "a, b, c" of the potential series (heap). */
static char *names_of(const nwb_file *f)
{
	size_t n = 1;
	for (int i = 0; i < f->n; i++)
		n += strlen(f->s[i].name) + 2;
	char *b = im_xmalloc(n);
	b[0] = '\0';
	for (int i = 0; i < f->n; i++) {
		if (i)
			strcat(b, ", ");
		strcat(b, f->s[i].name);
	}
	return b;
}

/* Check one chosen series. */
static int check_series(const nwb_file *f, const nwb_series *s, const char *path, int again,
			char *err)
{
	if (!nwb_kind_is_potential(s->kind))
		return im_fail(err, "%s is a %s (%s): only CurrentClampSeries, IZeroClampSeries"
			       " and VoltageClampStimulusSeries hold a potential to correct",
			       s->name, s->type, nwb_kind_what(s->kind));
	if (!s->has_offset)
		return im_fail(err, "%s in %s has no offset attribute (the file says NWB %s; offset"
			       " came with NWB 2.5): ionmix corrects only through the offset, never"
			       " the data; upgrade the file to NWB 2.5 or later, or correct an"
			       " exported CSV", s->name, path, f->version[0] ? f->version : "?");
	if (mV_per_unit(s->unit) == 0)
		return im_fail(err, "%s has unit '%.40s', not a potential (volts expected)",
			       s->name, s->unit);
	if (!isfinite(s->offset) || !isfinite(s->conversion))
		return im_fail(err, "%s has a non-finite offset or conversion", s->name);
	if (s->corrections > 0 && !again) {
		char l[48] = "";
		if (isfinite(s->last_ljp_mV))
			snprintf(l, sizeof l, " for an LJP of %+.4g mV", s->last_ljp_mV);
		return im_fail(err, "%s was already corrected by ionmix%s (see its comments); add"
			       " `again` to correct it once more", s->name, l);
	}
	return 0;
}

/* The record appended to comments (heap). */
static char *record_text(const nwb_record *r, double delta, const char *unit)
{
	char range[96], who[512], temp[32];
	if (r->has_range)
		snprintf(range, sizeof range, "range %.1f to %.1f mV", r->lo_mV, r->hi_mV);
	else
		snprintf(range, sizeof range, "range not computed");
	if (r->pipette)
		snprintf(who, sizeof who, "pipette solution %.200s, bath solution %.200s",
			 r->pipette, r->bath);
	else
		snprintf(who, sizeof who, "solutions not stated");
	if (r->has_temp)
		snprintf(temp, sizeof temp, "%.1f C", r->t_C);
	else
		snprintf(temp, sizeof temp, "temperature not stated");
	const char *fmt = NWB_RECORD_MARK " offset changed by %.10g %s (Vm = recorded - LJP)"
			  "; LJP %s%s mV (bath relative to pipette solution), %s; %s; %s; %s"
			  "; ionmix %s; %s";
	const char *sign = r->ljp_text[0] == '-' ? "" : "+";
	int n = snprintf(NULL, 0, fmt, delta, unit, sign, r->ljp_text, range, who, temp,
			 r->model, r->version, r->date);
	char *b = im_xmalloc((size_t)n + 1);
	snprintf(b, (size_t)n + 1, fmt, delta, unit, sign, r->ljp_text, range, who, temp,
		 r->model, r->version, r->date);
	return b;
}

/* Copy every byte of src into the open descriptor dst (at its start). */
static int copy_bytes(const char *src, int dst, const char *shown, char *err)
{
	int in = open(src, O_RDONLY);
	if (in < 0)
		return im_fail(err, "cannot read %s: %s", src, strerror(errno));
	struct stat st;
	if (fstat(in, &st) != 0) {
		int e = errno;
		close(in);
		return im_fail(err, "cannot read %s: %s", src, strerror(e));
	}
	off_t left = st.st_size;
	int fallback = 0;
	while (left > 0 && !fallback) {
		ssize_t k = copy_file_range(in, NULL, dst, NULL, (size_t)left, 0);
		if (k < 0 && (errno == ENOSYS || errno == EXDEV || errno == EINVAL ||
			      errno == EOPNOTSUPP)) {
			fallback = 1;
			break;
		}
		if (k <= 0) {
			int e = k < 0 ? errno : EIO;
			close(in);
			return im_fail(err, "cannot write %s: %s", shown, strerror(e));
		}
		left -= k;
	}
	if (fallback) {
		char buf[65536];
		ssize_t k;
		while ((k = read(in, buf, sizeof buf)) > 0) {
			for (ssize_t off = 0; off < k;) {
				ssize_t w = write(dst, buf + off, (size_t)(k - off));
				if (w < 0) {
					int e = errno;
					close(in);
					return im_fail(err, "cannot write %s: %s", shown, strerror(e));
				}
				off += w;
			}
		}
		if (k < 0) {
			int e = errno;
			close(in);
			return im_fail(err, "cannot read %s: %s", src, strerror(e));
		}
	}
	close(in);
	return 0;
}

/* Change the chosen series in the open copy. */
static int apply(hid_t fid, const nwb_series *const *pick, int n, const nwb_record *rec,
		 nwb_result *res, char *err)
{
	res->c = im_xcalloc((size_t)n, sizeof *res->c);
	for (int i = 0; i < n; i++) {
		const nwb_series *s = pick[i];
		hid_t g = H5Gopen2(fid, s->path, H5P_DEFAULT);
		hid_t d = g >= 0 ? H5Dopen2(g, "data", H5P_DEFAULT) : -1;
		hid_t a = d >= 0 ? H5Aopen(d, "offset", H5P_DEFAULT) : -1;
		double delta = -rec->ljp_mV / mV_per_unit(s->unit);
		double nv = s->offset + delta, back = NAN;
		int ok = a >= 0 && H5Awrite(a, H5T_NATIVE_DOUBLE, &nv) >= 0 &&
			 H5Aread(a, H5T_NATIVE_DOUBLE, &back) >= 0;
		if (ok) {
			char *rt = record_text(rec, delta, s->unit);
			const char *old = s->comments;
			int keep = old[0] && strcmp(old, "no comments") != 0;
			char *text = im_xmalloc(strlen(old) + strlen(rt) + 2);
			sprintf(text, "%s%s%s", keep ? old : "", keep ? "\n" : "", rt);
			ok = write_comments(g, text) == 0;
			free(text);
			free(rt);
		}
		if (a >= 0)
			H5Aclose(a);
		if (d >= 0)
			H5Dclose(d);
		if (g >= 0)
			H5Gclose(g);
		if (!ok) {
			char cause[160];
			h5_cause(cause);
			return im_fail(err, "cannot change %s: %s", s->name, cause);
		}
		nwb_change *c = &res->c[res->n++];
		c->name = im_xstrdup(s->name);
		c->path = im_xstrdup(s->path);
		c->unit = im_xstrdup(s->unit);
		c->old_offset = s->offset;
		c->new_offset = back;
		c->delta = delta;
		c->again = s->corrections > 0;
	}
	return 0;
}

/* The corrected copy: copy in_path to out_path's temporary, change the
 * copy, fsync and rename it into place (the copy's cost grows with the
 * file; a new file has to be written whole). */
static int to_copy(const char *in_path, const char *out_path, const nwb_series *const *pick,
		   int np, const nwb_record *rec, nwb_result *res, char *err)
{
	fio_file *out;
	char note[IM_ERRLEN];
	/* an interrupted change of the file replaced: undone first, or its
	 * journal would not match the new file */
	if (h5u_recover(out_path, note, sizeof note, err) < 0)
		return -1;
	if (fio_open(&out, out_path, err))
		return -1;
	if (fio_is_direct(out)) {
		fio_abort(out);
		return im_fail(err, "cannot write %s: an NWB file must go to a regular file",
			       out_path);
	}
	fflush(fio_stream(out));
	if (copy_bytes(in_path, fileno(fio_stream(out)), out_path, err)) {
		fio_abort(out);
		return -1;
	}
	hid_t fid = H5Fopen(fio_temp_path(out), H5F_ACC_RDWR, H5P_DEFAULT);
	if (fid < 0) {
		char cause[160];
		h5_cause(cause);
		fio_abort(out);
		return im_fail(err, "cannot open the copy of %s: %s", in_path, cause);
	}
	int arc = apply(fid, pick, np, rec, res, err);
	if (H5Fclose(fid) < 0 && arc == 0) {
		char cause[160];
		h5_cause(cause);
		arc = im_fail(err, "cannot write %s: %s", out_path, cause);
	}
	if (arc) {
		fio_abort(out);
		nwb_result_free(res);
		return -1;
	}
	if (fio_commit(out, err)) {
		nwb_result_free(res);
		return -1;
	}
	return 0;
}

/* In place, on *fid opened by read_file through the undo driver
 * (h5undo.h): HDF5's writes are kept in memory and reach the file with
 * an undo journal at h5u_commit, so the cost follows the metadata
 * changed, not the size of the data, and the file has every change or
 * none.  *fid is closed (-1) on return. */
static int in_place(const char *path, hid_t *fid, const nwb_series *const *pick, int np,
		    const nwb_record *rec, nwb_result *res, char *err)
{
	int arc = apply(*fid, pick, np, rec, res, err);
	herr_t closed = H5Fclose(*fid);
	*fid = -1;
	if (closed < 0 && arc == 0) {
		char cause[160];
		h5_cause(cause);
		arc = im_fail(err, "cannot write %s: %s", path, cause);
	}
	if (arc || h5u_commit(path, err)) {
		h5u_discard();
		nwb_result_free(res);
		return -1;
	}
	return 0;
}

/* 1 when path is a file ionmix may change in place. */
static int writable(const char *path)
{
	struct stat st;
	return stat(path, &st) == 0 && S_ISREG(st.st_mode) && access(path, W_OK) == 0 &&
	       (st.st_mode & (S_IWUSR | S_IWGRP | S_IWOTH));
}

int nwb_correct(const char *in_path, const char *out_path, const char *const *names,
		int nnames, int again, const nwb_record *rec, nwb_result *res, char *err)
{
	nwb_file f;
	memset(res, 0, sizeof *res);
	if (!isfinite(rec->ljp_mV))
		return im_fail(err, "the LJP is not a finite number");
	if (out_path && fio_same_file(in_path, out_path))
		out_path = NULL;
	hid_t fid = -1; /* in place: the file, open read-write */
	if (read_file(in_path, !out_path && writable(in_path) ? &fid : NULL, &f, err))
		return -1;

	/* choose and check, before anything is written */
	const nwb_series **pick = im_xcalloc((size_t)(f.n + nnames + 1), sizeof *pick);
	int np = 0, rc = -1;
	if (nnames == 0) {
		for (int i = 0; i < f.n; i++)
			if (nwb_kind_is_potential(f.s[i].kind))
				pick[np++] = &f.s[i];
		if (np == 0) {
			im_fail(err, "%s has no CurrentClampSeries, IZeroClampSeries or"
				" VoltageClampStimulusSeries under /acquisition or"
				" /stimulus/presentation", in_path);
			goto out;
		}
	} else {
		for (int k = 0; k < nnames; k++) {
			int amb;
			const nwb_series *s = find(&f, names[k], &amb);
			if (!s) {
				char *all = names_of(&f);
				im_fail(err, "no patch-clamp series '%.60s' in %s (it has: %.120s)",
					names[k], in_path, f.n ? all : "none");
				free(all);
				goto out;
			}
			if (amb) {
				im_fail(err, "'%.60s' names more than one series; give its path, e.g."
					" %s", names[k], s->path + 1);
				goto out;
			}
			for (int j = 0; j < np; j++)
				if (pick[j] == s) {
					im_fail(err, "series %s is named twice", s->name);
					goto out;
				}
			pick[np++] = s;
		}
	}
	for (int i = 0; i < np; i++)
		if (check_series(&f, pick[i], in_path, again, err))
			goto out;
	if (!out_path) {
		if (fid < 0) {
			im_fail(err, "%s is read-only: write the corrected copy elsewhere with"
				" `to OUT.nwb`", in_path);
			goto out;
		}
	}

	if (out_path ? to_copy(in_path, out_path, pick, np, rec, res, err)
		     : in_place(in_path, &fid, pick, np, rec, res, err))
		goto out;
	if (f.recovered) {
		res->recovered = f.recovered;
		f.recovered = NULL;
	}
	rc = 0;
out:
	if (fid >= 0) { /* refused before any change */
		H5Fclose(fid);
		h5u_discard();
	}
	free(pick);
	nwb_file_free(&f);
	return rc;
}
