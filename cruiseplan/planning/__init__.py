"""Planning on the physics: grids, best cruise, climb, missions, reserves, fits, Monte Carlo.

Imports no io, report, plots or cli.
"""
