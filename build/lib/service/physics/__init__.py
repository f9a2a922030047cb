"""The calculation core: pure functions of water, steam, orifices and money.

Nothing here does I/O or imports the web or the database. Units are declared once:
pressure kPa (absolute unless a name ends in `_kpa_g`), temperature degC, specific
enthalpy kJ/kg, mass flow kg/h, diameters mm, yearly masses t, energy GJ.
"""
