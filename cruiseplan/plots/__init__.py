"""Figures for crews: range map, power curves, profiles, cruise card, survey plan view.

The only part of cruiseplan that imports matplotlib, one module per kind of figure; nothing
imports it at package import, and the CLI imports it only in the commands that draw.
Figures are drawn into :class:`matplotlib.figure.Figure` objects (no pyplot state, so a
notebook's backend is left alone; the CLI renders off-screen on Agg) and turned into PNG or
PDF bytes by :func:`figure_bytes`, so a failed drawing never leaves a partial file.

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

from cruiseplan.plots.cardpage import CARD_FONTS, card_pages, cruise_card
from cruiseplan.plots.cruise import LIMIT_FIELDS, altitude_profile, power_curves, specific_range_map
from cruiseplan.plots.profile import mission_profile
from cruiseplan.plots.residuals import fit_residuals
from cruiseplan.plots.style import (
    CARD_PAGES,
    FORMATS,
    LIMIT_HATCHES,
    MIN_FONT,
    OBJECTIVE_STYLES,
    OKABE_ITO,
    PLOT_SIZE,
    SERIES_STYLES,
    figure_bytes,
    pages_pdf,
    speed_span,
)
from cruiseplan.plots.survey import survey_plan_view
from cruiseplan.report.card import CARD_MIN_FONT

__all__ = [
    "CARD_FONTS", "CARD_MIN_FONT", "CARD_PAGES", "FORMATS", "LIMIT_FIELDS", "LIMIT_HATCHES",
    "MIN_FONT",
    "OBJECTIVE_STYLES", "OKABE_ITO", "PLOT_SIZE", "SERIES_STYLES", "altitude_profile",
    "card_pages", "cruise_card", "figure_bytes", "fit_residuals", "mission_profile",
    "pages_pdf", "power_curves", "specific_range_map", "speed_span", "survey_plan_view",
]
