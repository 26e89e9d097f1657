"""Physical constants, defined once, in SI units.

Values are the defining constants of the International Standard Atmosphere
(ICAO Doc 7488/3; U.S. Standard Atmosphere, 1976), which agree below 32 km.
"""

#: Standard acceleration of gravity [m/s^2].
G0 = 9.80665
#: Specific gas constant of dry air [J/(kg K)].
R_AIR = 287.05287
#: Ratio of specific heats of air [-].
GAMMA = 1.4
#: Sea-level standard temperature [K].
T0 = 288.15
#: Sea-level standard pressure [Pa].
P0 = 101325.0
#: Sea-level standard density [kg/m^3].
RHO0 = 1.225
#: Sea-level standard speed of sound [m/s].
A0 = (GAMMA * R_AIR * T0) ** 0.5
#: Troposphere temperature lapse rate [K/m] (temperature falls with height).
LAPSE = 0.0065
#: Tropopause geopotential altitude [m].
H_TROPOPAUSE = 11000.0
#: Earth radius used by the 1976 standard to relate geometric and geopotential height [m].
R_EARTH = 6356766.0
#: Sutherland's law constants for air: mu = BETA_S T^1.5 / (T + S_SUTH).
BETA_S = 1.458e-6
S_SUTH = 110.4
#: 0 degC in kelvin.
T_ZERO_C = 273.15
#: Mean Earth radius for great-circle navigation [m] (IUGG mean radius R1).
R_EARTH_MEAN = 6371008.8

# --- Conventions and conversion factors, defined once ----------------------------------

#: International foot [m].
FT = 0.3048
#: International nautical mile [m].
NMI = 1852.0
#: Foot per minute [m/s].
FT_PER_MIN = FT / 60.0
#: Default stall margin: cruise at or above 1.3 x stall speed (common practice, no source).
DEFAULT_STALL_MARGIN = 1.3
#: Mach number above which the incompressible drag polar is not trusted (common practice).
MACH_LIMIT = 0.6
