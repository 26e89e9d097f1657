"""Figures for crews: range map, power curves, profiles, cruise card, survey plan view.

The only part of cruiseplan that imports matplotlib, one module per kind of figure; nothing
imports it at package import, and the CLI imports it only in the commands that draw.
Figures are drawn into :class:`matplotlib.figure.Figure` objects (no pyplot state, so a
notebook's backend is left alone; the CLI renders off-screen on Agg) and turned into PNG or
PDF bytes by :func:`figure_bytes`, so a failed drawing never leaves a partial file. The
cruise card is laid out as text and written to PDF without a figure (:func:`card_layout`,
:func:`card_pdf`); each module is imported when one of its names is first used.

Made to be printed: lines use the Okabe-Ito colour-blind-safe palette [1]_ and filled
contours the cividis colour map [2]_; each series also differs in line style and marker so a
grey print reads the same; every axis names its unit; every figure carries a caution footer.

References
----------
.. [1] M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and
   presentations that are friendly to colorblind people", J*Fly, 2008.
.. [2] J. R. Nunez, C. R. Anderton and R. S. Renslow, "Optimizing colormaps with
   consideration for color vision deficiency to enable accurate interpretation of
   scientific data", *PLoS ONE* 13(7), 2018, e0199239 (cividis).
.. [3] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, secs. 5.4
   (power required and available), 5.7 (range and endurance).
"""

import importlib

#: Where each public name lives. The modules are imported when a name is first used
#: (PEP 562), so the card, which needs only the font files, does not load the figure
#: machinery the plots need.
_HOMES = {
    "cruiseplan.plots.cardpage": ("CARD_FONTS", "CARD_PAGES", "card_layout", "card_pages",
                                  "card_pdf", "cruise_card", "page_figure"),
    "cruiseplan.plots.cruise": ("LIMIT_FIELDS", "altitude_profile", "power_curves",
                                "specific_range_map"),
    "cruiseplan.plots.profile": ("mission_profile",),
    "cruiseplan.plots.residuals": ("fit_residuals",),
    "cruiseplan.plots.style": ("FORMATS", "LIMIT_HATCHES", "MIN_FONT", "OBJECTIVE_STYLES",
                               "OKABE_ITO", "PLOT_SIZE", "SERIES_STYLES", "figure_bytes",
                               "speed_span"),
    "cruiseplan.plots.survey": ("survey_plan_view",),
    "cruiseplan.report.card": ("CARD_MIN_FONT",),
}
_HOME_OF = {name: module for module, names in _HOMES.items() for name in names}

__all__ = sorted(_HOME_OF)


def __getattr__(name):
    module = _HOME_OF.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value  # found directly from now on
    return value


def __dir__():
    return sorted(set(globals()) | set(__all__))
