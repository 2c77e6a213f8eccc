#!/usr/bin/python3
# make-npy.py: writes the small .npy fixtures of the reader tests with NumPy
# itself (an independent writer). Values: e[b,i,j,l] = 100 b + 10 i + j + 0.25 l.
import numpy as np
import numpy.lib.format as fmt

shape = (2, 4, 3, 2)
b, i, j, l = np.indices(shape)
e = 100.0 * b + 10.0 * i + j + 0.25 * l

np.save("grid-le.npy", e.astype("<f8"))
np.save("grid-be.npy", e.astype(">f8"))
for version in ((2, 0), (3, 0)):
    with open("grid-v%d.npy" % version[0], "wb") as f:
        fmt.write_array(f, e.astype("<f8"), version=version)
np.save("grid-fortran.npy", np.asfortranarray(e))
np.save("grid-f4.npy", e.astype("<f4"))
np.save("grid-rank3.npy", e[0])
