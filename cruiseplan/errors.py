"""Exception and warning types of cruiseplan.

Every error raised for bad input is a :class:`CruiseplanError` (a ``ValueError``) whose
message is one line that names what was given, what was expected and, where possible,
the remedy. The CLI prints that line and exits with status 2.
"""


class CruiseplanError(ValueError):
    """Base class of all input errors raised by cruiseplan."""


class AtmosphereRangeError(CruiseplanError):
    """An altitude lies outside the range of the atmosphere model."""


class AirframeFileError(CruiseplanError):
    """An airframe file is missing, unreadable or fails validation."""


class UnitError(CruiseplanError):
    """A value has the wrong dimension or cannot be parsed as a quantity."""


class MissionFileError(CruiseplanError):
    """A mission file is malformed."""


class StudyFileError(CruiseplanError):
    """A study file (a sweep's axes and records) is missing, unreadable or invalid."""


class LogFileError(CruiseplanError):
    """A flight-log file is malformed."""


class ForecastFileError(CruiseplanError):
    """A gridded forecast file is unreadable, malformed, or does not cover the route."""


class CruiseplanWarning(UserWarning):
    """Odd but possible input, e.g. a mass above the maximum take-off mass."""


def lookup(table, key, what: str):
    """``table[key]``, or a :class:`CruiseplanError` that lists the valid keys.

    Parameters
    ----------
    table : mapping
        A registry or choice table.
    key : object
        The name asked for.
    what : str
        What the name is of, for the message (``"output format"``).

    Returns
    -------
    object
        The entry.

    Raises
    ------
    CruiseplanError
        ``"output format 'xml' is not one of csv, json, markdown, text"``.
    """
    try:
        return table[key]
    except (KeyError, TypeError):
        raise CruiseplanError(f"{what} {key!r} is not one of "
                              f"{', '.join(sorted(str(k) for k in table))}") from None
