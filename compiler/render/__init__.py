"""Renderers: the results model to HTML, LaTeX and JSON, through one printer family."""

#: The LaTeX appendix styles: results and claims for a paper, or every statement and check.
TEX_STYLES = ("appendix", "audit")
