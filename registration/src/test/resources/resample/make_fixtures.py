#!/usr/bin/python3
"""Regenerates the resampling fixtures with SciPy 1.10 scipy.ndimage (Debian python3-scipy).

Run from this folder:  /usr/bin/python3 make_fixtures.py

Files (all raw little-endian, no header; shapes and meanings in fixtures.json):
  volume.f32            input samples, float32, x fastest (numpy shape (nz, ny, nx), C order)
  points_inside.f64     N x 3 voxel coordinates (i, j, k) inside [0, n-1], float64
  points_outside.f64    M x 3 voxel coordinates, some outside the grid, float64
  linear.f64            map_coordinates(order=1) at points_inside
  cubic_mirror.f64      map_coordinates(order=3, mode='mirror', prefilter=True) at points_inside
  linear_nearest.f64    map_coordinates(order=1, mode='nearest') at points_outside
  percentiles.f64       numpy.percentile (default 'linear' method) at 1, 50, 99 % of all voxels,
                        then of the voxels with value > 0.2 (the masked case), float64
  gauss.f64             gaussian_filter(volume, sigma=(sz, sy, sx) voxels, mode='reflect',
                        truncate=4.0), float64 output, x fastest
"""
import json

import numpy as np
import scipy
from scipy import ndimage

NX, NY, NZ = 9, 7, 5
SIGMA_VOXELS_XYZ = (1.3, 0.7, 2.5)  # sigma along i, j, k; k radius 10 > nz = 5 (repeated reflection)

rng = np.random.default_rng(20261202)
# Smooth-ish content plus noise, so that both interpolation and smoothing are non-trivial.
k, j, i = np.meshgrid(np.arange(NZ), np.arange(NY), np.arange(NX), indexing="ij")
vol = (np.sin(0.7 * i) * np.cos(0.5 * j) + 0.3 * k + rng.uniform(-0.5, 0.5, size=(NZ, NY, NX)))
vol = vol.astype("<f4")

n_in = 500
pts_in = np.column_stack([
    rng.uniform(0, NX - 1, n_in), rng.uniform(0, NY - 1, n_in), rng.uniform(0, NZ - 1, n_in)])
# Put some points exactly on the faces and corners of the box.
pts_in[0] = [0, 0, 0]
pts_in[1] = [NX - 1, NY - 1, NZ - 1]
pts_in[2:40, 0] = NX - 1
pts_in[40:80, 2] = 0
pts_in[80:120, 1] = NY - 1

n_out = 200
pts_out = np.column_stack([
    rng.uniform(-3, NX + 2, n_out), rng.uniform(-3, NY + 2, n_out), rng.uniform(-3, NZ + 2, n_out)])

def zyx(p):
    return np.vstack([p[:, 2], p[:, 1], p[:, 0]])

v64 = vol.astype(np.float64)
linear = ndimage.map_coordinates(v64, zyx(pts_in), order=1, mode="mirror", prefilter=False)
cubic = ndimage.map_coordinates(v64, zyx(pts_in), order=3, mode="mirror", prefilter=True)
linear_nearest = ndimage.map_coordinates(v64, zyx(pts_out), order=1, mode="nearest", prefilter=False)
levels = [1, 50, 99]
percentiles = np.concatenate([np.percentile(v64, levels), np.percentile(v64[v64 > 0.2], levels)])
gauss = ndimage.gaussian_filter(v64, sigma=SIGMA_VOXELS_XYZ[::-1], mode="reflect", truncate=4.0)

vol.tofile("volume.f32")
pts_in.astype("<f8").tofile("points_inside.f64")
pts_out.astype("<f8").tofile("points_outside.f64")
linear.astype("<f8").tofile("linear.f64")
cubic.astype("<f8").tofile("cubic_mirror.f64")
linear_nearest.astype("<f8").tofile("linear_nearest.f64")
gauss.astype("<f8").tofile("gauss.f64")
percentiles.astype("<f8").tofile("percentiles.f64")

with open("fixtures.json", "w") as f:
    json.dump({
        "source": "scipy.ndimage " + scipy.__version__ + ", numpy " + np.__version__,
        "dims_xyz": [NX, NY, NZ],
        "points_inside": n_in,
        "points_outside": n_out,
        "sigma_voxels_xyz": list(SIGMA_VOXELS_XYZ),
        "gaussian_truncate": 4.0,
        "percentile_levels": levels,
        "percentile_mask": "value > 0.2",
        "byte_order": "little-endian",
    }, f, indent=2)
    f.write("\n")
