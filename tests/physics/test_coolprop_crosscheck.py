"""IF97 against an independent formulation: CoolProp's default water model, IAPWS-95.

The two formulations are different fits of the same measurements (IAPWS-95: Wagner and
Pruss 2002, J. Phys. Chem. Ref. Data 31:387); saturation enthalpies agree to about
0.02 % (from memory), so 0.1 % is a firm bound.
"""

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

from service.physics import steam_tables
from service.physics.flash import flash_of_condensate

PRESSURES_KPA = [float(p) for p in np.geomspace(1.0, 20_000.0, 25)]


def _coolprop_saturation_kj_kg(pressure_kpa: float, quality: float) -> float:
    return float(PropsSI("H", "P", pressure_kpa * 1000.0, "Q", quality, "Water")) / 1000.0


@pytest.mark.parametrize("pressure_kpa", PRESSURES_KPA)
def test_saturation_enthalpies_agree_with_coolprop_iapws95(pressure_kpa: float) -> None:
    saturation = steam_tables.saturation_at_pressure(pressure_kpa)
    assert saturation.hf_kj_kg == pytest.approx(
        _coolprop_saturation_kj_kg(pressure_kpa, 0.0), rel=1e-3
    )
    assert saturation.hg_kj_kg == pytest.approx(
        _coolprop_saturation_kj_kg(pressure_kpa, 1.0), rel=1e-3
    )


@pytest.mark.parametrize("inlet_kpa", PRESSURES_KPA[5:])
def test_flash_fractions_agree_with_coolprop_iapws95(inlet_kpa: float) -> None:
    return_kpa = inlet_kpa / 4.0
    hf_inlet = _coolprop_saturation_kj_kg(inlet_kpa, 0.0)
    hf_return = _coolprop_saturation_kj_kg(return_kpa, 0.0)
    hg_return = _coolprop_saturation_kj_kg(return_kpa, 1.0)
    coolprop_flash = (hf_inlet - hf_return) / (hg_return - hf_return)
    flash = flash_of_condensate(inlet_kpa, return_kpa)
    assert flash.flash_fraction == pytest.approx(coolprop_flash, rel=1e-3)
