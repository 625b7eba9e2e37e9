/*
 * h5lazy.h - the HDF5 library, loaded on first use instead of at start.
 *
 * Linking libhdf5 pulls in some 35 shared libraries (curl, TLS, Kerberos,
 * LDAP ...) whose relocation cost more than half of every start of
 * ionmix, though only the NWB commands use HDF5.  nwb.c and h5undo.c
 * include this header in place of <hdf5.h>: every HDF5 function and
 * global it names is redirected through the table im_h5, which
 * im_h5_load fills with dlopen
 * and dlsym.  Call im_h5_load (0, or -1 with err naming the library and
 * the loader's reason) before the first HDF5 call; later calls return at
 * once.  Types, constants and headers are HDF5's own, so a mismatch with
 * the library's prototypes fails at compile time.
 */
#ifndef IONMIX_H5LAZY_H
#define IONMIX_H5LAZY_H

#include <hdf5.h>
#if H5_VERSION_GE(1, 13, 0)
/* from 1.13 on, H5FDregister and the file driver's structures (h5undo.c)
 * are declared apart */
#include <H5FDdevelop.h>
#endif

/* every HDF5 function nwb.c and h5undo.c call, and those their macros call */
#define IM_H5_FUNCS(X) \
	X(H5open) X(H5check_version) X(H5free_memory) \
	X(H5Aclose) X(H5Acreate2) X(H5Adelete) X(H5Aexists) X(H5Aget_space) \
	X(H5Aget_type) X(H5Aopen) X(H5Aread) X(H5Awrite) \
	X(H5Dclose) X(H5Dopen2) X(H5Eset_auto2) X(H5Ewalk2) \
	X(H5Fclose) X(H5Fis_hdf5) X(H5Fopen) X(H5Gclose) X(H5Gopen2) \
	X(H5Iget_type) X(H5Lexists) X(H5Literate) X(H5Oclose) X(H5Oopen) \
	X(H5Sclose) X(H5Screate) X(H5Sget_simple_extent_npoints) \
	X(H5Tclose) X(H5Tcopy) X(H5Tget_class) X(H5Tget_cset) X(H5Tget_size) \
	X(H5Tget_strpad) X(H5Tis_variable_str) X(H5Tset_cset) X(H5Tset_size) \
	X(H5Tset_strpad) \
	X(H5FDregister) X(H5Pcreate) X(H5Pclose) X(H5Pset_driver)
/* the library's globals behind H5T_NATIVE_DOUBLE, H5T_C_S1 and
 * H5P_FILE_ACCESS */
#define IM_H5_VARS(X) X(H5T_NATIVE_DOUBLE_g) X(H5T_C_S1_g) X(H5P_CLS_FILE_ACCESS_ID_g)

#define IM_H5_FIELD(f) __typeof__(&f) p_##f;
typedef struct im_h5_api {
	IM_H5_FUNCS(IM_H5_FIELD)
	IM_H5_VARS(IM_H5_FIELD)
} im_h5_api;
#undef IM_H5_FIELD

extern im_h5_api im_h5;

/* Load the library and fill im_h5 (once).  0, or -1 with err. */
int im_h5_load(char *err);

#ifndef IM_H5_LOADER
#undef H5open
#undef H5check_version
#undef H5free_memory
#undef H5Aclose
#undef H5Acreate2
#undef H5Adelete
#undef H5Aexists
#undef H5Aget_space
#undef H5Aget_type
#undef H5Aopen
#undef H5Aread
#undef H5Awrite
#undef H5Dclose
#undef H5Dopen2
#undef H5Eset_auto2
#undef H5Ewalk2
#undef H5Fclose
#undef H5Fis_hdf5
#undef H5Fopen
#undef H5Gclose
#undef H5Gopen2
#undef H5Iget_type
#undef H5Lexists
#undef H5Literate
#undef H5Oclose
#undef H5Oopen
#undef H5Sclose
#undef H5Screate
#undef H5Sget_simple_extent_npoints
#undef H5Tclose
#undef H5Tcopy
#undef H5Tget_class
#undef H5Tget_cset
#undef H5Tget_size
#undef H5Tget_strpad
#undef H5Tis_variable_str
#undef H5Tset_cset
#undef H5Tset_size
#undef H5Tset_strpad
#undef H5FDregister
#undef H5Pcreate
#undef H5Pclose
#undef H5Pset_driver
#define H5open (*im_h5.p_H5open)
#define H5check_version (*im_h5.p_H5check_version)
#define H5free_memory (*im_h5.p_H5free_memory)
#define H5Aclose (*im_h5.p_H5Aclose)
#define H5Acreate2 (*im_h5.p_H5Acreate2)
#define H5Adelete (*im_h5.p_H5Adelete)
#define H5Aexists (*im_h5.p_H5Aexists)
#define H5Aget_space (*im_h5.p_H5Aget_space)
#define H5Aget_type (*im_h5.p_H5Aget_type)
#define H5Aopen (*im_h5.p_H5Aopen)
#define H5Aread (*im_h5.p_H5Aread)
#define H5Awrite (*im_h5.p_H5Awrite)
#define H5Dclose (*im_h5.p_H5Dclose)
#define H5Dopen2 (*im_h5.p_H5Dopen2)
#define H5Eset_auto2 (*im_h5.p_H5Eset_auto2)
#define H5Ewalk2 (*im_h5.p_H5Ewalk2)
#define H5Fclose (*im_h5.p_H5Fclose)
#define H5Fis_hdf5 (*im_h5.p_H5Fis_hdf5)
#define H5Fopen (*im_h5.p_H5Fopen)
#define H5Gclose (*im_h5.p_H5Gclose)
#define H5Gopen2 (*im_h5.p_H5Gopen2)
#define H5Iget_type (*im_h5.p_H5Iget_type)
#define H5Lexists (*im_h5.p_H5Lexists)
#define H5Literate (*im_h5.p_H5Literate)
#define H5Oclose (*im_h5.p_H5Oclose)
#define H5Oopen (*im_h5.p_H5Oopen)
#define H5Sclose (*im_h5.p_H5Sclose)
#define H5Screate (*im_h5.p_H5Screate)
#define H5Sget_simple_extent_npoints (*im_h5.p_H5Sget_simple_extent_npoints)
#define H5Tclose (*im_h5.p_H5Tclose)
#define H5Tcopy (*im_h5.p_H5Tcopy)
#define H5Tget_class (*im_h5.p_H5Tget_class)
#define H5Tget_cset (*im_h5.p_H5Tget_cset)
#define H5Tget_size (*im_h5.p_H5Tget_size)
#define H5Tget_strpad (*im_h5.p_H5Tget_strpad)
#define H5Tis_variable_str (*im_h5.p_H5Tis_variable_str)
#define H5Tset_cset (*im_h5.p_H5Tset_cset)
#define H5Tset_size (*im_h5.p_H5Tset_size)
#define H5Tset_strpad (*im_h5.p_H5Tset_strpad)
#define H5FDregister (*im_h5.p_H5FDregister)
#define H5Pcreate (*im_h5.p_H5Pcreate)
#define H5Pclose (*im_h5.p_H5Pclose)
#define H5Pset_driver (*im_h5.p_H5Pset_driver)
#define H5T_NATIVE_DOUBLE_g (*im_h5.p_H5T_NATIVE_DOUBLE_g)
#define H5T_C_S1_g (*im_h5.p_H5T_C_S1_g)
#define H5P_CLS_FILE_ACCESS_ID_g (*im_h5.p_H5P_CLS_FILE_ACCESS_ID_g)
#endif

#endif
