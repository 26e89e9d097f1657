"""Physics in SI numpy arrays, importable without matplotlib.

Atmosphere, airspeeds, winds, great circles, aerodynamics, drag build-up, propulsion and
rotors. Imports nothing above the base layer (units, constants, errors, limits).
"""
