"""`quenchwise run` on finite parts (issue 17): files, columns, maps, summary; bad keys one line, exit 2."""

import csv
import json

import h5py
import numpy as np
import pytest

from test_run_cli import CONTRACT_COLUMNS


def test_run_writes_the_finite_part_files(cli, cases_dir, tmp_path):
    out = tmp_path / "shaft"
    code, stdout, stderr = cli("run", cases_dir / "stepped_shaft_oil.toml", "--out", out)
    assert code == 0, stderr
    for name in ("result.h5", "profile.csv", "profile_axial.csv", "hardness_map.png", "martensite_map.png",
                 "hardness.png", "cooling.png"):
        assert (out / name).is_file(), name
    assert "softest surface" in stdout and "softest section" in stdout and "Caution" in stdout
    rows = list(csv.DictReader((out / "profile.csv").open()))
    assert list(rows[0].keys()) == CONTRACT_COLUMNS                      # DESIGN.md 4, the contract's columns
    depth = [float(r["depth_mm"]) for r in rows]
    assert depth == sorted(depth) and 32.5 - 3.0 < depth[-1] < 32.5   # to the axis of the 65 mm step
    axial = list(csv.DictReader((out / "profile_axial.csv").open()))
    assert {r["line"] for r in axial} == {"axis", "surface"}
    z = [float(r["z_mm"]) for r in axial if r["line"] == "surface"]
    assert z == sorted(z) and z[-1] < 195.0 < z[-1] + 2.0
    # the surface line follows the steps: its radius is 22.5, 32.5 and 25 mm minus half a cell
    r_surface = np.array([float(r["r_mm"]) for r in axial if r["line"] == "surface"])
    assert r_surface.max() == pytest.approx(32.5, abs=0.5) and r_surface.min() == pytest.approx(22.5, abs=0.5)
    with h5py.File(out / "result.h5") as f:
        n_t, n = f["temperature_c"].shape
        assert f["r_mm"].shape == (n,) and f["z_mm"].shape == (n,) and f["time_s"].shape == (n_t,)
        assert f["r_mm"].attrs["units"] == "mm" and f["z_mm"].attrs["units"] == "mm"
        assert f["depth_mm"].attrs["units"] == "mm" and 0.0 < f["depth_mm"][()].min() < f["depth_mm"][()].max() < 32.5
        assert f["hrc"].attrs["units"] == "HRC" and f["temperature_c"].attrs["units"] == "degC"
        total = sum(f[k][()] for k in ("ferrite", "pearlite", "bainite", "martensite", "austenite"))
        np.testing.assert_allclose(total, 1.0, atol=1e-9)
        assert f["z_mm"][()].max() < 195.0 and f["r_mm"][()].max() < 32.5
        assert "stepped_shaft" in f.attrs["case"]


def test_json_summary_has_the_softest_points(cli, cases_dir):
    code, stdout, stderr = cli("run", cases_dir / "stepped_shaft_oil.toml", "--json")
    assert code == 0, stderr
    s = json.loads(stdout)
    soft = s["softest"]
    assert soft["section"]["hrc"] <= soft["surface"]["hrc"]
    assert soft["section"]["hrc"] <= min(p["hrc"] for p in s["points"]) + 1e-9
    assert soft["surface"]["faces"]
    assert s["quench"]["lower_end"].endswith("(h x 0.7)")


@pytest.mark.parametrize("part, quench, key", [
    ('shape = "plate"\nthickness_mm = 20\nlength_mm = 100', "", "part.length_mm"),
    ('shape = "bar"\ndiameter_mm = 20', "end_face_h_scale = 0.5", "quench.end_face_h_scale"),
    ('shape = "bar"\ndiameter_mm = 20\nlength_mm = 50', "end_face_h_scale = 0", "quench.end_face_h_scale"),
    ('shape = "bar"\ndiameter_mm = 20\nlength_mm = 50', "lower_end_h_scale = -1", "quench.lower_end_h_scale"),
    ('shape = "stepped_shaft"\nstep_diameters_mm = [20, 30]\nstep_lengths_mm = [40]', "", "part.step_lengths_mm"),
    ('shape = "stepped_shaft"\nstep_diameters_mm = [20, "x"]\nstep_lengths_mm = [40, 40]', "", "part.step_diameters_mm"),
    ('shape = "stepped_shaft"\nstep_diameters_mm = [20, 30]\nstep_lengths_mm = [40, 40]\nfillet_radius_mm = 8', "",
     "part.fillet_radius_mm"),
    ('shape = "stepped_shaft"\nstep_diameters_mm = [20, 30]\nstep_lengths_mm = [40, 40]\ndiameter_mm = 20', "",
     "part.diameter_mm"),
    ('shape = "bar"\ndiameter_mm = 20\nlength_mm = 50', 'end_faces_medium = "no_such_oil"', "quench.end_faces_medium"),
])
def test_bad_finite_keys_are_one_line_and_status_2(cli, tmp_path, part, quench, key):
    case = tmp_path / "bad.toml"
    case.write_text(f'[steel]\ngrade = "4140"\n[part]\n{part}\n[quench]\nmedium = "oil_conventional_60c_moderate"\n{quench}\n')
    out = tmp_path / "never"
    code, _, stderr = cli("run", case, "--out", out)
    assert code == 2 and len(stderr.strip().splitlines()) == 1 and key in stderr, stderr
    assert not out.exists()


def test_radial_cells_only_for_finite_parts(cli, tmp_path):
    case = tmp_path / "bad.toml"
    case.write_text('[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 20\n[quench]\n'
                    'medium = "oil_conventional_60c_moderate"\n[mesh]\nradial_cells = 30\n')
    code, _, stderr = cli("run", case)
    assert code == 2 and "mesh.radial_cells" in stderr and len(stderr.strip().splitlines()) == 1


def test_sheet_of_a_finite_part_shows_its_map(cli, cases_dir, tmp_path, monkeypatch):
    import quenchwise.part_maps as maps

    drawn = []
    original = maps.sheet_map
    monkeypatch.setattr(maps, "sheet_map", lambda ax, result, units=None: (drawn.append(result), original(ax, result, units)))
    code, _, stderr = cli("sheet", cases_dir / "stepped_shaft_oil.toml", "--out", tmp_path / "sheet", "--default-steps")
    assert code == 0, stderr
    assert (tmp_path / "sheet" / "sheet.pdf").is_file() and (tmp_path / "sheet" / "sheet.png").is_file()
    assert len(drawn) == 1 and drawn[0].finite
