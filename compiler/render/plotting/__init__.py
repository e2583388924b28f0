"""Plots drawn by hand: one layout (``layout``), drawn as inline SVG (``svg``), or as a
text-free PDF (``pdf``) with the labels typeset over it by LaTeX (``texlabels``).

No plotting library is loaded: the layout is a few boxes, ticks and
polylines, and each backend is a page of code.  Same data, same bytes.
"""
