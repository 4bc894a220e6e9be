"""result.h5 describes itself: units on every dataset, named dimensions (time, node)."""

from __future__ import annotations

import tomllib

import h5py
import numpy as np
import pytest

from quenchwise.case import parse_case
from quenchwise.results import write_result_h5

TEXT = ('title = "t"\n[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 40\n'
        '[quench]\nseverity_h = 0.5\nend_c = 150\n[temper]\ntemperature_c = 500\nhours = 1\n')


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    from quenchwise.workflows import simulate

    result = simulate([parse_case(tomllib.loads(TEXT), TEXT, "t.toml")])[0]
    path = tmp_path_factory.mktemp("h5") / "result.h5"
    write_result_h5(result, path)
    return result, path


def test_every_dataset_has_units_and_the_arrays_their_scales(written):
    result, path = written
    with h5py.File(path) as f:
        assert all("units" in ds.attrs for ds in f.values())
        assert f["temperature_c"].attrs["units"] == "degC" and f["time_s"].attrs["units"] == "s"
        assert f["martensite"].attrs["units"] == "1" and f["hv_tempered"].attrs["units"] == "HV"
        assert [d[0].name for d in f["temperature_c"].dims] == ["/time", "/node"]
        assert f["hv"].dims[0][0].name == "/node" and f["time_s"].dims[0][0].name == "/time"
        np.testing.assert_array_equal(f["time"][()], result.history.time_s)


def test_xarray_reads_named_dimensions(written):
    xr = pytest.importorskip("xarray")
    pytest.importorskip("h5netcdf")
    result, path = written
    ds = xr.open_dataset(path, engine="h5netcdf")
    try:
        assert ds["temperature_c"].dims == ("time", "node")
        assert ds["hv"].dims == ("node",) and ds["hv"].attrs["units"] == "HV"
        assert ds.sizes["node"] == result.hv.size and ds.sizes["time"] == result.history.time_s.size
        np.testing.assert_allclose(ds["depth_mm"].values, result.depth_mm)
    finally:
        ds.close()
