/*
 * h5lazy.c - dlopen the HDF5 library on first use (see h5lazy.h).
 */
#define IM_H5_LOADER
#include "h5lazy.h"

#include <dlfcn.h>
#include <stddef.h>

#include "common.h"

/* the library's run-time name, found by the Makefile from the library it
 * compiled against; the development link as a second try */
#ifndef IM_HDF5_SONAME
#define IM_HDF5_SONAME "libhdf5.so"
#endif
#ifndef IM_HDF5_DEVLIB
#define IM_HDF5_DEVLIB "libhdf5.so"
#endif

#define IM_H5_STR2(x) #x
#define IM_H5_STR(x) IM_H5_STR2(x) /* the name after HDF5's own version macros */

im_h5_api im_h5;

int im_h5_load(char *err)
{
	static void *lib;
	static const struct {
		const char *name;
		size_t off;
	} sym[] = {
#define IM_H5_SYM(f) {IM_H5_STR(f), offsetof(im_h5_api, p_##f)},
		IM_H5_FUNCS(IM_H5_SYM) IM_H5_VARS(IM_H5_SYM)
#undef IM_H5_SYM
	};
	void *h;
	im_h5_api t;
	if (lib)
		return 0;
	h = dlopen(IM_HDF5_SONAME, RTLD_NOW | RTLD_LOCAL);
	if (!h)
		h = dlopen(IM_HDF5_DEVLIB, RTLD_NOW | RTLD_LOCAL);
	if (!h) {
		const char *why = dlerror();
		return im_fail(err, "NWB files need the HDF5 library (%s): %s", IM_HDF5_SONAME,
			       why ? why : "not found");
	}
	for (size_t i = 0; i < IM_COUNT(sym); i++) {
		void *p = dlsym(h, sym[i].name);
		if (!p) {
			dlclose(h);
			return im_fail(err, "the HDF5 library %s lacks %s", IM_HDF5_SONAME,
				       sym[i].name);
		}
		*(void **)((char *)&t + sym[i].off) = p;
	}
	im_h5 = t;
	lib = h;
	return 0;
}
