"""Plots drawn by hand: one layout (``layout``), drawn as inline SVG (``svg``) or a PDF (``pdf``).

No plotting library is loaded: the layout is a few boxes, ticks and
polylines, and both backends are a page of code each.  Same data, same bytes.
"""
