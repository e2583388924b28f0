"""LaTeX → MathML for the author's own math, made safe for a stranger's document.

Computed values never come this way (``printers.MathMLPrinter`` writes them
directly); prose math and ``notation`` overrides do.

The converter copies ``\\text{...}`` verbatim and turns ``\\href`` and
``\\style`` into attributes, so its serialized string could carry a script or
a network fetch.  We take its element tree instead and write it out
ourselves: known MathML elements and harmless layout attributes only, every
text escaped.  No ``xmlns`` either: HTML5 puts ``<math>`` in the MathML
namespace by itself, and the report then holds no URL at all.
"""
from __future__ import annotations

import re
from xml.etree.ElementTree import Element

from markupsafe import Markup, escape

_ELEMENTS = frozenset(
    "math mrow mi mn mo ms mtext mspace msub msup msubsup mfrac msqrt mroot "
    "mover munder munderover mtable mtr mtd mlabeledtr mstyle menclose "
    "mpadded mphantom merror mmultiscripts mprescripts none".split()
)
_ATTRIBUTES = frozenset(
    "display mathvariant stretchy fence form accent accentunder separator "
    "lspace rspace columnalign columnlines columnspacing rowspacing rowlines "
    "displaystyle scriptlevel width height depth linebreak minsize maxsize "
    "movablelimits largeop symmetric notation mathsize linethickness".split()
)
# The converter leaves symbols as numeric character references in the text.
_CHAR_REF = re.compile(r"&#x([0-9A-Fa-f]{1,6});")


def _text(raw: str | None) -> str:
    if not raw:
        return ""
    return str(escape(_CHAR_REF.sub(lambda m: chr(int(m.group(1), 16)), raw)))


def _write(node: Element, out: list[str]) -> None:
    tag = node.tag if node.tag in _ELEMENTS else "mrow"
    attrs = "".join(
        f' {k}="{escape(v)}"' for k, v in sorted(node.attrib.items()) if k in _ATTRIBUTES
    )
    out.append(f"<{tag}{attrs}>{_text(node.text)}")
    for child in node:
        _write(child, out)
        out.append(_text(child.tail))
    out.append(f"</{tag}>")


def convert_to_element(latex: str, **options) -> Element:
    """The converter's tree, the converter loaded on first use: most values
    never pass through it, only an author's own math does."""
    from latex2mathml.converter import convert_to_element as convert
    return convert(latex, **options)


def to_mathml(latex: str, display: bool = False) -> Markup:
    """``latex`` as one ``<math>`` element, or its source flagged if unreadable."""
    try:
        tree = convert_to_element(latex, display="block" if display else "inline")
    except Exception:  # noqa: BLE001 - any malformed formula: show it, do not abort the report
        cls = "tex-error block" if display else "tex-error"
        return Markup(f'<code class="{cls}" title="could not typeset">{escape(latex)}</code>')
    out: list[str] = []
    _write(tree, out)
    return Markup("".join(out))


def inner_mathml(latex: str) -> Markup:
    """``latex`` as MathML content for use inside a ``<math>`` we write."""
    out: list[str] = []
    try:
        tree = convert_to_element(latex)
    except Exception:  # noqa: BLE001 - checked by the front matter reader; never abort a report
        return Markup(f"<mtext>{escape(latex)}</mtext>")
    for child in tree:
        _write(child, out)
    return Markup("".join(out))


def math_element(body: str, display: bool = False) -> Markup:
    """A ``<math>`` around MathML we generated ourselves; one ``<mrow>``
    inside, since the stylesheet makes display math a CSS block."""
    attribute = ' display="block"' if display else ""
    return Markup(f"<math{attribute}><mrow>{body}</mrow></math>")
