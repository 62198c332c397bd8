"""windsheet's written-out physical constants against scipy.constants."""

import pytest
from scipy import constants as sc

from windsheet.physics import constants


# scipy.constants (CODATA 2022 from scipy 1.15, CODATA 2018 before): ε0; the two
# editions differ by 7e-10 relative, so either is within 1e-9.
def test_vacuum_permittivity():
    assert constants.EPSILON_0 == pytest.approx(sc.epsilon_0, rel=1e-9)


# scipy.constants.atm and .torr: exact by definition (101325 Pa, 1/760 atm).
@pytest.mark.parametrize("name, reference", [("ATMOSPHERE", sc.atm), ("TORR", sc.torr)])
def test_pressure_units(name, reference):
    assert getattr(constants, name) == pytest.approx(reference, rel=1e-15)


# The modules that use them read the same values (no second copy drifting apart).
def test_users_read_the_module():
    from windsheet.physics import conductor_capacitance
    from windsheet.physics import discharge
    assert conductor_capacitance.EPS0 == constants.EPSILON_0
    assert discharge.ATMOSPHERE == constants.ATMOSPHERE
