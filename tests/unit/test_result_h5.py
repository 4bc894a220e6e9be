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
        np.testing.assert_allclose(ds["depth_mm"].values, result.depth_mm[::-1])   # file: centre outward
    finally:
        ds.close()


def test_result_arrays_run_from_the_surface_inward(written):
    # issue 16: a Result reads like profile.csv, the first node is the one at the quenched surface
    # (a cell centre: half the outer cell below it), the last the centre.
    result, _ = written
    assert result.depth_mm[0] == pytest.approx(500.0 * result.history.cell_width_m[0], abs=1e-12)
    assert np.all(np.diff(result.depth_mm) > 0) and result.position_mm[-1] == pytest.approx(20.0 - result.depth_mm[-1])
    surface, _, centre = result.summary()["points"]
    assert result.hrc[0] == pytest.approx(surface["hrc"], abs=0.05)
    assert result.hrc[-1] == pytest.approx(centre["hrc"], abs=0.05)
    assert 100 * result.fractions["martensite"][0] == pytest.approx(surface["martensite_pct"], abs=0.05)
    # the temperatures too: at the end of the quench the centre (last column) is the hottest node
    last = result.history.temperature_c[-1]
    assert np.argmax(last) == last.size - 1 and np.argmin(last) == 0


def test_files_keep_their_order(written, tmp_path):
    # result.h5 keeps DESIGN.md's order (position_mm from the centre line outward, temperature_c
    # columns alike); profile.csv runs from the quenched surface inward, as before.
    from quenchwise.results import profile_csv_text

    result, path = written
    with h5py.File(path) as f:
        assert np.all(np.diff(f["position_mm"][()]) > 0)
        np.testing.assert_array_equal(f["position_mm"][()], result.position_mm[::-1])
        np.testing.assert_array_equal(f["hv"][()], result.hv[::-1])
        np.testing.assert_array_equal(f["martensite"][()], result.fractions["martensite"][::-1])
        np.testing.assert_array_equal(f["temperature_c"][()], result.history.temperature_c[:, ::-1])
        assert np.argmax(f["temperature_c"][-1]) == 0          # the centre is the file's first node
    rows = [line.split(",") for line in profile_csv_text(result).splitlines()[1:]]
    assert float(rows[0][0]) == pytest.approx(result.depth_mm[0], abs=1e-4)
    assert [float(r[0]) for r in rows] == sorted(float(r[0]) for r in rows)
