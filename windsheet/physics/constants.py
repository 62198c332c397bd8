"""Physical constants windsheet uses, written out so that start-up need not import scipy.

``scipy.constants`` takes about 0.1 s to import; these few values are all
the size path needs.  ``tests/test_constants.py`` checks each against
``scipy.constants``.
"""

from __future__ import annotations

#: Vacuum electric permittivity ε0. [F/m]
#: CODATA 2022 recommended value (NIST, physics.nist.gov/constants; the value
#: scipy.constants carries from scipy 1.15).
EPSILON_0 = 8.8541878188e-12

#: Standard atmosphere. [Pa]
#: Exact by definition (CGPM 1954; CODATA 2022 lists it as exact).
ATMOSPHERE = 101325.0

#: One torr, 1/760 of a standard atmosphere. [Pa]
#: Exact by definition (CODATA 2022, adopted values).
TORR = ATMOSPHERE / 760.0
