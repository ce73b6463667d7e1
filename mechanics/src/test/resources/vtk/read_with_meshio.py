#!/usr/bin/python3
"""Reads a VTK legacy file with Debian's python3-meshio and prints what it found, one item per line.

Used by VtkWriterTest as an independent reader of the files the project writes.
Usage: /usr/bin/python3 read_with_meshio.py FILE.vtk [FILE.vtk ...]
Output, per file: a line "file PATH", then points N / cells TYPE N / point SUM / conn SUM /
pdata NAME SUM / cdata NAME SUM, where SUM is a weighted sum (sum of value * (index + 1)) printed
with 17 significant digits.
"""
import sys

import meshio
import numpy as np


def wsum(a):
    a = np.asarray(a, dtype=np.float64).ravel()
    return float(np.sum(a * (np.arange(a.size) + 1.0)))


for path in sys.argv[1:]:
    print("file %s" % path)
    m = meshio.read(path, file_format="vtk")
    print("points %d" % len(m.points))
    print("point %.17g" % wsum(m.points))
    for block in m.cells:
        print("cells %s %d" % (block.type, len(block.data)))
        print("conn %.17g" % wsum(block.data))
    for name, data in sorted(m.point_data.items()):
        print("pdata %s %.17g" % (name, wsum(data)))
    for name, blocks in sorted(m.cell_data.items()):
        print("cdata %s %.17g" % (name, wsum(np.concatenate([np.asarray(b).ravel() for b in blocks]))))
