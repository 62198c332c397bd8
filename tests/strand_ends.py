"""Shared fixtures of the stress tests: a wire, the end potentials of the named hookups, a one-layer coil."""

import numpy as np

from windsheet.physics.layout import cylinder_layout

D_CU, D_OV = 0.45e-3, 0.50e-3

SINGLE = np.array([[0.0, 1.0]])
# Series-aiding A.finish joined to B.start: A 0 -> 0.5, B 0.5 -> 1.
AIDING = np.array([[0.0, 0.5], [0.5, 1.0]])
# Series-opposing A.finish joined to B.finish; terminals A.start (1 V) and B.start (0 V).
OPPOSING = np.array([[1.0, 0.5], [0.0, 0.5]])


def one_layer(strands, turns):
    return cylinder_layout(0.02, 0.3, D_CU, D_OV, strands, turns, layers=1)
