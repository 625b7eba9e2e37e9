"""nwbfiles.py - write small test recordings in the NWB 2.x layout with
Debian's python3-h5py (shared by check_nwb.py and bench_nwb.sh).

The layout follows the NWB 2.x core schema (nwb.base / nwb.icephys,
https://nwb-schema.readthedocs.io): root attributes nwb_version,
neurodata_type NWBFile and namespace core; series under /acquisition and
/stimulus/presentation; each series a group with neurodata_type,
namespace, comments and description, a `data` dataset carrying the
attributes conversion, resolution, unit and (from NWB 2.5) offset, and
starting_time with its rate.  Recording values are invented test signals.
"""
import h5py
import numpy as np

VSTR = h5py.string_dtype("utf-8")


def _series(parent, name, ntype, unit, data, conversion, offset, electrode):
    g = parent.create_group(name)
    g.attrs["neurodata_type"] = ntype
    g.attrs["namespace"] = "core"
    g.attrs["comments"] = "no comments"
    g.attrs["description"] = "test sweep"
    g.attrs["stimulus_description"] = "step"
    g.attrs["sweep_number"] = np.uint32(1)
    d = g.create_dataset("data", data=data)
    d.attrs["conversion"] = np.float32(conversion)
    d.attrs["resolution"] = np.float32(-1.0)
    d.attrs["unit"] = unit
    if offset is not None:
        d.attrs["offset"] = np.float32(offset)
    st = g.create_dataset("starting_time", data=0.0)
    st.attrs["rate"] = np.float32(20000.0)
    st.attrs["unit"] = "seconds"
    g.create_dataset("gain", data=np.float32(1.0))
    g["electrode"] = h5py.SoftLink(electrode)
    return g


def write(path, version="2.5.0", nsamples=2000, extra_ccs=0, with_offset=True,
          seed=1):
    """One file with a CurrentClampSeries (int16 with a conversion), a
    VoltageClampSeries (current), a VoltageClampStimulusSeries (float32
    command potential), a CurrentClampStimulusSeries, an IZeroClampSeries,
    and extra_ccs more CurrentClampSeries."""
    rng = np.random.default_rng(seed)
    off = (lambda v: v) if with_offset else (lambda v: None)
    with h5py.File(path, "w") as f:
        f.attrs["nwb_version"] = version
        f.attrs["neurodata_type"] = "NWBFile"
        f.attrs["namespace"] = "core"
        f.create_dataset("identifier", data="test-0001", dtype=VSTR)
        f.create_dataset("session_description", data="ionmix test file", dtype=VSTR)
        f.create_dataset("session_start_time", data="2026-01-01T10:00:00+00:00", dtype=VSTR)
        f.create_dataset("timestamps_reference_time", data="2026-01-01T10:00:00+00:00",
                         dtype=VSTR)
        for grp in ("analysis", "processing", "stimulus/templates", "general"):
            f.require_group(grp)
        el = f.create_group("general/intracellular_ephys/electrode0")
        el.attrs["neurodata_type"] = "IntracellularElectrode"
        el.attrs["namespace"] = "core"
        el.create_dataset("description", data="test electrode", dtype=VSTR)
        e = "/general/intracellular_ephys/electrode0"
        acq = f.create_group("acquisition")
        pres = f.create_group("stimulus/presentation")
        vm = rng.integers(-2400, -1800, nsamples).astype(np.int16)
        _series(acq, "ccs_sweep1", "CurrentClampSeries", "volts", vm,
                3.0517578125e-05, off(0.0), e)
        _series(acq, "vcs_sweep2", "VoltageClampSeries", "amperes",
                rng.normal(-50e-12, 5e-12, nsamples).astype(np.float32), 1.0, off(0.0), e)
        _series(acq, "izero_sweep3", "IZeroClampSeries", "volts",
                rng.normal(-0.065, 0.001, nsamples).astype(np.float32), 1.0, off(0.002), e)
        _series(pres, "vcss_sweep2", "VoltageClampStimulusSeries", "volts",
                np.repeat(np.float32([-0.07, -0.02, -0.07]), nsamples // 3 + 1)[:nsamples],
                1.0, off(0.0), e)
        _series(pres, "ccss_sweep1", "CurrentClampStimulusSeries", "amperes",
                np.repeat(np.float32([0, 1e-10, 0]), nsamples // 3 + 1)[:nsamples],
                1.0, off(0.0), e)
        for k in range(extra_ccs):
            _series(acq, "ccs_extra%03d" % k, "CurrentClampSeries", "volts",
                    rng.normal(-0.07, 0.002, nsamples).astype(np.float32), 1.0, off(0.0), e)
