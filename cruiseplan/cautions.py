"""The cautions every table, card, figure and plan carries, defined once."""

#: Cautions printed in full with every table, card and plan.
CAUTIONS = (
    "Planning aid only: not a substitute for the approved flight manual (AFM/POH), "
    "licensed flight planning or local rules, which come first.",
    "Figures come from a physics model of the airframe file; real aircraft, engines, "
    "batteries and weather differ. Verify against the flight manual and add margins.",
    "Reserves shown are those you set; local rules decide the minimum reserve.",
)

#: Short caution in the footer of every card and figure.
CAUTION_LINE = "Planning aid only \u2014 the flight manual and local rules come first"

#: Caution on every plan whose winds and temperatures come from a gridded forecast.
FORECAST_CAUTION = ("a forecast is a forecast: official weather briefings and the flight "
                    "manual come first")
