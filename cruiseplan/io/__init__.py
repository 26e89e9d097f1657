"""Files in: the airframe, mission and flight-log files and their text forms.

One TOML schema reader, and the bundled files shipped with the package. Imports no
planning or report.
"""
