"""Exact samples of |psi|^2, tested statistically against closed forms and brute force.

Seeds are fixed, so each test is deterministic; the sample sizes make the tests meaningful
(a wrong distribution of the size of the differences checked here fails them by orders of
magnitude). The statistics come from scipy.stats; the reference distributions from sympy's
hydrogen radial functions, scipy.special's spherical harmonics and brute-force grids.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

import orbviz
from orbviz.cli import main
from orbviz.levels.sampling import sample


def _radial_cdf(n: int, l: int):
    """The exact radial CDF of hydrogen (Z = 1) from sympy.physics.hydrogen.R_nl, integrated
    in closed form by sympy, as a numpy function of r."""
    import sympy as sp
    from sympy.physics.hydrogen import R_nl

    r, s = sp.symbols("r s", positive=True)
    density = sp.simplify(s**2 * R_nl(n, l, s, 1) ** 2)
    cdf = sp.integrate(density, (s, 0, r))
    return sp.lambdify(r, cdf, "numpy")


@pytest.mark.parametrize(("spec", "n", "l"), [("1s", 1, 0), ("2s", 2, 0), ("3pz", 3, 1)])
def test_radii_follow_the_exact_radial_distribution(spec, n, l):
    cdf = _radial_cdf(n, l)
    points = sample(orbviz.state(spec), 100_000, seed=7)
    radii = np.linalg.norm(points.positions.astype(np.float64), axis=1)
    result = stats.kstest(radii, cdf)  # Kolmogorov-Smirnov against the closed form
    assert result.pvalue > 0.01, result
    # the KS distance of an exact sampler shrinks as 1/sqrt(N): at 100x fewer points it is
    # about 10x larger (median over seeds, within a factor 3)
    small = [
        stats.kstest(
            np.linalg.norm(sample(orbviz.state(spec), 1000, seed=s).positions, axis=1), cdf
        ).statistic
        for s in range(15)
    ]
    ratio = np.median(small) / result.statistic
    assert 10 / 3 < ratio < 10 * 3, ratio


@pytest.mark.parametrize(("spec", "l", "m"), [("2pz", 1, 0), ("3dz2", 2, 0), ("4fz3", 3, 0)])
def test_polar_angles_follow_the_spherical_harmonic(spec, l, m):
    # cos(theta) binned in 20 cells against the integral of |Y_l0|^2 over each cell (scipy's
    # sph_harm_y, integrated by scipy.integrate.quad), chi-square test
    from scipy.integrate import quad
    from scipy.special import sph_harm_y

    points = sample(orbviz.state(spec), 100_000, seed=11).positions.astype(np.float64)
    cos_t = points[:, 2] / np.linalg.norm(points, axis=1)
    edges = np.linspace(-1, 1, 21)
    observed, _ = np.histogram(cos_t, edges)

    def weight(c):
        return 2 * math.pi * abs(sph_harm_y(l, m, math.acos(c), 0.0)) ** 2

    expected = np.array([quad(weight, a, b)[0] for a, b in zip(edges[:-1], edges[1:], strict=True)])
    expected *= len(cos_t) / expected.sum()
    assert stats.chisquare(observed, expected).pvalue > 0.01


def test_the_fraction_inside_the_90_percent_surface_is_0_9():
    state = orbviz.state("3dz2")
    level = orbviz.summarise(state)["isovalue"]
    points = sample(state, 100_000, seed=3).positions.astype(np.float64)
    inside = (state.density(points[:, 0], points[:, 1], points[:, 2]) >= level).mean()
    sigma = math.sqrt(0.9 * 0.1 / len(points))  # binomial standard error
    assert abs(inside - 0.9) < 3 * sigma, (inside, sigma)


@pytest.mark.parametrize("spec", ["0.6*2s+0.8*3pz", "bond(1s,1s,R=2,-)", "3,2,1", "2sp3[1]"])
def test_superpositions_follow_the_density_on_a_fine_grid(spec):
    # brute force: |psi|^2 integrated over the cells of a grid (midpoint rule on 4^3 sub-points
    # per cell), chi-square against the sample's counts in the cells
    state = orbviz.state(spec)
    points = sample(state, 200_000, seed=5).positions.astype(np.float64)
    half = state.radial_quantile(0.99)
    edges = np.linspace(-half, half, 9)
    counts, _ = np.histogramdd(points, bins=[edges] * 3)
    sub = (np.arange(4) + 0.5) / 4 * (edges[1] - edges[0])
    centres = edges[:-1][:, None] + sub[None, :]
    axis = centres.ravel()
    gx, gy, gz = np.meshgrid(axis, axis, axis, indexing="ij")
    density = state.density(gx, gy, gz).reshape(8, 4, 8, 4, 8, 4).sum(axis=(1, 3, 5))
    expected = density / density.sum() * counts.sum()  # the sample's share inside the box
    big = expected > 20  # chi-square needs enough expected counts per cell
    assert (
        stats.chisquare(counts[big], expected[big] * counts[big].sum() / expected[big].sum()).pvalue
        > 0.001
    )


@pytest.mark.parametrize("spec", ["3dxy", "0.6*2s+0.8*3pz", "bond(1s,1s,R=2,-)"])
def test_signs_agree_with_psi_at_the_points(spec):
    state = orbviz.state(spec)
    points = sample(state, 20_000, seed=2)
    xyz = points.positions.astype(np.float64)
    psi = state.psi(xyz[:, 0], xyz[:, 1], xyz[:, 2])
    assert np.all(np.sign(psi[psi != 0]) == points.phase[psi != 0])


def test_complex_phases_are_the_angle_of_psi():
    # for 2,1,1, psi ~ sin(theta) exp(i phi) (Condon-Shortley: Y_11 = -sqrt(3/8pi) sin e^{i phi})
    points = sample(orbviz.state("2,1,1"), 5_000, seed=4)
    phi = np.arctan2(points.positions[:, 1], points.positions[:, 0])
    expected = np.angle(-np.exp(1j * phi))
    diff = np.angle(np.exp(1j * (points.phase - expected)))
    assert np.abs(diff).max() < 1e-4


def test_the_same_seed_gives_the_same_points():
    state = orbviz.state("2sp3[1]")
    a, b = sample(state, 1000, seed=9), sample(state, 1000, seed=9)
    assert np.array_equal(a.positions, b.positions) and a.positions.dtype == np.float32


# ---------------------------------------------------------------- files and engraving


def test_a_block_holds_every_point_inside_its_margin_and_no_two_are_too_close(tmp_path, capsys):
    from scipy.spatial import cKDTree

    out = tmp_path / "block.xyz"
    argv = ["sample", "3dz2", "--points", "300000", "--seed", "1", "--block", "50x50x80mm"]
    assert main([*argv, "--min-spacing", "0.1", "-o", str(out)]) == 0
    xyz = np.loadtxt(out, comments="#")[:, :3]
    margin = 3.0  # the default
    assert np.all(xyz >= margin - 1e-3) and np.all(xyz <= np.array([50, 50, 80]) - margin + 1e-3)
    tree = cKDTree(xyz)  # scipy's k-d tree as the independent check of the spacing
    distances, _ = tree.query(xyz, k=2)
    assert distances[:, 1].min() >= 0.1 - 1e-4
    assert len(xyz) > 100_000  # the shape survives the thinning
    assert "kept at 0.1 mm spacing" in capsys.readouterr().err


@pytest.mark.parametrize("suffix", [".ply", ".csv", ".xyz", ".npy"])
def test_every_point_format_reads_back(tmp_path, suffix):
    out = tmp_path / f"p{suffix}"
    assert main(["sample", "2pz", "--points", "2000", "--seed", "1", "-o", str(out)]) == 0
    state = orbviz.state("2pz")
    if suffix == ".ply":
        import meshio  # an independent PLY reader

        mesh = meshio.read(out)
        xyz, phase = mesh.points, mesh.point_data["phase"]
        assert "x y z in bohr" in out.read_bytes()[:400].decode("ascii", "replace")
    elif suffix == ".npy":
        table = np.load(out)
        xyz, phase = table[:, :3], table[:, 3]
    else:
        table = np.loadtxt(out, comments="#", delimiter="," if suffix == ".csv" else None)
        xyz, phase = table[:, :3], table[:, 3]
    assert len(xyz) == 2000
    psi = state.psi(*np.asarray(xyz, dtype=np.float64).T)
    assert np.all(np.sign(psi) == phase)


@pytest.mark.parametrize(
    ("argv", "fragment"),
    [
        (["--points", "0"], "--points: expected a whole number from 1 to 10000000"),
        (["--points", "100000001"], "--points: expected a whole number"),
        (["--size", "2"], "--size: expected a number from 5 to 1000"),
        (["--block", "50x50mm"], "--block: expected WxDxH with a unit"),
        (["--block", "1x50x50mm"], "each side 5 to 1000 mm"),
        (["--min-spacing", "0.1"], "--min-spacing: needs a physical size"),
        (["--size", "60", "--block", "50x50x50mm"], "give --size or --block, not both"),
        (["--block", "10x10x10mm", "--margin", "5"], "--margin: 5 mm on each side leaves no room"),
        (["--inside", "1.5"], "--inside: expected a number from 0.01 to 0.999"),
        (["--size", "5", "--min-spacing", "10"], "--min-spacing: 10 mm leaves"),
        (["--units", "mm"], "--units: expected bohr or angstrom"),
        (["-o", "x.obj"], "use .csv, .npy, .ply, .xyz"),
    ],
)
def test_bad_sampling_options_are_refused_in_one_line(tmp_path, capsys, argv, fragment):
    args = ["sample", "2pz", "--points", "2000", *argv]
    if "-o" not in argv:
        args += ["-o", str(tmp_path / "p.ply")]
    else:
        args[args.index("-o") + 1] = str(tmp_path / args[args.index("-o") + 1])
    status = main(args)
    err = capsys.readouterr().err
    assert status == 2 and err.count("\n") == 1 and fragment in err, err
    assert not any(tmp_path.iterdir())
