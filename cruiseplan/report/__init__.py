"""Reports for people and programs, without matplotlib.

Tables, the cruise card's content, the fit report and the renderers (text, markdown, CSV,
JSON).
"""
