"""Superpositions in motion: norm, the beat period of <z>(t) against CODATA, frames, refusals."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.constants import physical_constants
from scipy.optimize import curve_fit

from orbviz.cli import main
from orbviz.states.dynamics import StationaryError, beat_period, evolve
from orbviz.states.orbital import Orbital
from tests.conftest import as_trimesh


def _quadrature(order=32, radial=160, rate=0.5):
    t, wt = np.polynomial.legendre.leggauss(order)
    phi = np.arange(2 * order) * math.pi / order
    x, wr = np.polynomial.laguerre.laggauss(radial)
    r, wr = x / rate, wr * np.exp(x) / rate
    R, T, P = np.meshgrid(r, t, phi, indexing="ij")
    W = wr[:, None, None] * wt[None, :, None] * (math.pi / order) * R**2
    s = np.sqrt(1 - T**2)
    return R * s * np.cos(P), R * s * np.sin(P), R * T, W


def test_norm_is_conserved():
    x, y, z, w = _quadrature()
    orbital = Orbital.from_spec("0.6*1s + 0.8*3dz2 + 0.5j*2pz")
    for t in [0.0, 3.7, 41.0, 1e3]:
        dens = np.abs(evolve(orbital, t).psi(x, y, z, dtype=np.float64)) ** 2
        assert np.sum(dens * w) == pytest.approx(1.0, abs=1e-8)


def test_z_expectation_beats_with_the_codata_period():
    # E_n = -R_inf hc / n^2 (CODATA): 1s-2p gap (3/4) R_inf hc, so T = h / dE
    rydberg = physical_constants["Rydberg constant times hc in eV"][0]
    planck = physical_constants["Planck constant in eV/Hz"][0]
    expected = planck / (0.75 * rydberg) * 1e15  # fs
    orbital = Orbital.from_spec("1s + 2pz")
    beat = beat_period(orbital)
    assert beat.femtoseconds == pytest.approx(expected, rel=1e-9)
    x, y, z, w = _quadrature()
    times = np.linspace(0, 2 * beat.period, 25)
    mean_z = [
        np.sum(z * np.abs(evolve(orbital, t).psi(x, y, z, dtype=np.float64)) ** 2 * w)
        for t in times
    ]
    import warnings

    from scipy.optimize import OptimizeWarning

    with warnings.catch_warnings():  # the model fits exactly, so its covariance is singular
        warnings.simplefilter("ignore", OptimizeWarning)
        (amplitude, omega, phase), _ = curve_fit(
            lambda t, a, om, p: a * np.cos(om * t + p),
            times,
            mean_z,
            p0=[0.7, 2 * math.pi / beat.period, 0.0],
        )
    assert 2 * math.pi / omega * physical_constants["atomic unit of time"][
        0
    ] * 1e15 == pytest.approx(expected, rel=1e-6)
    # amplitude 2 c1 c2 <1s|z|2p0> = <1s|z|2p0> = 128 sqrt2 / 243 bohr (Bethe & Salpeter, from
    # memory; it also follows from the closed forms of R_10 and R_21)
    assert abs(amplitude) == pytest.approx(128 * math.sqrt(2) / 243, rel=1e-6)


def test_frames_share_one_level_and_move(tmp_path):
    from orbviz.figures.animation import animate
    from orbviz.figures.animation_files import write_animation
    from orbviz.figures.options import AnimationOptions

    options = AnimationOptions(frames=6, grid=40, size=(160, 120))
    movie = animate(Orbital.from_spec("1s+2pz"), options, keep_bodies=True)
    assert len(movie.images) == 6 and all(img.shape == (120, 160, 4) for img in movie.images)
    # the enclosed volume's centre of mass (trimesh) swings up and down along z in one period
    import trimesh

    centre = [
        trimesh.util.concatenate([as_trimesh(b) for b in bodies]).center_mass[2]
        for bodies in movie.bodies
    ]
    assert max(centre) > 0.2 and min(centre) < -0.2
    written = write_animation(movie, tmp_path / "frames")
    assert [p.name for p in written] == [f"frame_{k:03d}.png" for k in range(6)]


def test_degenerate_superposition_is_refused(capsys):
    with pytest.raises(StationaryError):
        beat_period(Orbital.from_spec("2s + 2pz"))
    assert main(["animate", "2px+2py", "-o", "x.gif"]) == 2
    err = capsys.readouterr().err
    assert "does not move" in err and err.count("\n") == 1


def _animate(out, *, frames: int, size: str) -> int:
    """orbviz animate of 1s+2pz at a small grid, through the CLI in process."""
    return main(
        [
            "animate",
            "1s+2pz",
            "--frames",
            str(frames),
            "--grid",
            "32",
            "--size",
            size,
            "-o",
            str(out),
        ]
    )


def test_animate_cli_gif(tmp_path, capsys):
    from PIL import Image

    out = tmp_path / "beat.gif"
    assert _animate(out, frames=4, size="160x120") == 0
    with Image.open(out) as image:
        assert image.n_frames == 4
    assert "T = 0.4053 fs" in capsys.readouterr().out
    assert main(["animate", "1s+2pz", "-o", str(tmp_path / "beat.avi")]) == 2
    assert ".mp4" in capsys.readouterr().err and not (tmp_path / "beat.avi").exists()


def test_animate_cli_mp4(tmp_path, capsys):
    import imageio.v2 as imageio  # an independent reader, through ffmpeg

    out = tmp_path / "beat.mp4"
    assert _animate(out, frames=5, size="161x121") == 0
    reader = imageio.get_reader(out)
    assert reader.count_frames() == 5
    assert reader.get_meta_data()["size"] == (162, 122)  # padded to even sides for H.264
    reader.close()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["beat.mp4"]


def test_animated_glb_passes_the_khronos_validator(tmp_path):
    import json as _json
    import struct

    from tests.test_export import _validate

    out = tmp_path / "beat.glb"
    assert _animate(out, frames=5, size="120x90") == 0
    report = _validate(out)  # the Khronos reference validator
    assert report["issues"]["numErrors"] == 0
    assert report["info"]["animationCount"] == 1
    # one node per frame, each with a STEP scale track (read from the GLB's JSON chunk)
    data = out.read_bytes()
    length = struct.unpack("<I", data[12:16])[0]
    tree = _json.loads(data[20 : 20 + length])
    frames = [
        n
        for n in tree["nodes"]
        if n.get("name", "").startswith("frame-") and n["name"].count("-") == 1
    ]
    assert len(frames) == 5
    (anim,) = tree["animations"]
    assert len(anim["channels"]) == 5
    assert all(s["interpolation"] == "STEP" for s in anim["samplers"])


@pytest.mark.parametrize(
    "spec, potential",
    [
        # Coulomb: E depends on n only (Bohr; Griffiths eq. 4.70): 2s and 2p are one level
        ("2s + 2pz", "coulomb"),
        # the isotropic harmonic well: E = (2 n_r + l + 3/2) omega (the three-dimensional
        # isotropic oscillator, Sakurai & Napolitano, Modern Quantum Mechanics; from memory;
        # n_r = n - l - 1 here): 3s (n_r 2, l 0) and 4dxy (n_r 1, l 2) are both 11/2 omega
        ("3s + 4dxy", "harmonic:0.37"),
    ],
)
def test_numerically_degenerate_mixtures_do_not_move(capsys, tmp_path, spec, potential):
    out = tmp_path / "a.gif"
    status = main(["animate", spec, "--potential", potential, "--frames", "2", "-o", str(out)])
    err = capsys.readouterr().err
    assert status == 2 and "does not move" in err and "solver's error estimates" in err
    assert not out.exists()


def test_a_numerical_coulomb_beat_has_the_exact_period():
    # 1s + 2pz: dE = 1/2 - 1/8 = 3/8 hartree (Bohr), T = 2 pi / dE in atomic units of time
    from orbviz.states.potentials import Coulomb

    state = Orbital.from_spec("1s + 2pz").in_potential(Coulomb(1.0))
    beat = beat_period(state)
    assert beat.period == pytest.approx(2 * math.pi / 0.375, rel=1e-7)
    atomic_time_fs = physical_constants["atomic unit of time"][0] * 1e15  # CODATA
    assert beat.femtoseconds == pytest.approx(2 * math.pi / 0.375 * atomic_time_fs, rel=1e-7)
