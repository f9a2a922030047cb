"""Gauge and absolute pressure, and the site's atmospheric pressure.

The trade reads gauge pressure; water and steam properties need absolute pressure.
"""

STANDARD_ATMOSPHERE_KPA = 101.325


def absolute_from_gauge(
    pressure_kpa_g: float, atmospheric_pressure_kpa: float = STANDARD_ATMOSPHERE_KPA
) -> float:
    """Absolute pressure [kPa] from gauge pressure [kPa(g)] and the local atmosphere [kPa].

    >>> absolute_from_gauge(1000.0)
    1101.325
    """
    return pressure_kpa_g + atmospheric_pressure_kpa


def gauge_from_absolute(
    pressure_kpa_abs: float, atmospheric_pressure_kpa: float = STANDARD_ATMOSPHERE_KPA
) -> float:
    """Gauge pressure [kPa(g)] from absolute pressure [kPa] and the local atmosphere [kPa].

    >>> round(gauge_from_absolute(201.325), 9)
    100.0
    """
    return pressure_kpa_abs - atmospheric_pressure_kpa


def atmospheric_pressure_at_elevation_kpa(elevation_m: float) -> float:
    """Standard-atmosphere pressure [kPa] at an elevation above sea level [m].

    p = 101.325 * (1 - 2.25577e-5 * z) ** 5.25588, the troposphere of the ICAO
    Standard Atmosphere (ISO 2533:1975), valid from -500 m to 11 000 m.

    >>> round(atmospheric_pressure_at_elevation_kpa(1000.0), 2)
    89.87
    """
    if not -500.0 <= elevation_m <= 11_000.0:
        raise ValueError(
            f"elevation {elevation_m:.6g} m is outside the standard atmosphere's "
            "troposphere, -500 to 11000 m"
        )
    return float(STANDARD_ATMOSPHERE_KPA * (1.0 - 2.25577e-5 * elevation_m) ** 5.25588)
