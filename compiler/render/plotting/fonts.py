"""The Times metrics a plot's labels are measured with: which font has each character, and how wide it is.

The SVG names a Times-like family, so its text takes the room measured here;
the LaTeX appendix typesets the labels in the paper's fonts in the same room.
Advance widths, in thousandths of the font size, are from Adobe's AFM files
as shipped with TeX Live (fonts/afm/adobe/times/ptmr8a.afm, ptmri8a.afm and
fonts/afm/adobe/symbol/psyr.afm), codes 32 to 126; for Times, code 39 is
quotesingle and 96 grave, as in WinAnsiEncoding.
"""
from __future__ import annotations

ROMAN, ITALIC, SYMBOL = "Times-Roman", "Times-Italic", "Symbol"


def _table(widths: str) -> dict[int, int]:
    return {32 + i: int(w) for i, w in enumerate(widths.split())}


_WIDTHS = {
    ROMAN: _table(
        "250 333 408 500 500 833 778 180 333 333 500 564 250 333 250 278 500 500 500 500 500 500 500 "
        "500 500 500 278 278 564 564 564 444 921 722 667 667 722 611 556 722 722 333 389 722 611 889 "
        "722 722 556 722 667 556 611 722 722 944 722 722 611 333 278 333 469 500 333 444 500 444 500 "
        "444 333 500 500 278 278 500 278 778 500 500 500 500 333 389 278 500 500 722 500 500 444 480 "
        "200 480 541"),
    ITALIC: _table(
        "250 333 420 500 500 833 778 214 333 333 500 675 250 333 250 278 500 500 500 500 500 500 500 "
        "500 500 500 333 333 675 675 675 500 920 611 611 667 722 611 611 722 722 333 444 667 556 833 "
        "667 722 611 722 611 500 556 722 611 833 611 556 556 389 278 389 422 500 333 500 500 444 500 "
        "444 278 500 500 278 278 444 278 722 500 500 500 500 389 389 278 500 444 667 444 444 389 400 "
        "275 400 541"),
    SYMBOL: {**_table(
        "250 333 713 500 549 833 778 439 333 333 500 549 250 549 250 278 500 500 500 500 500 500 500 "
        "500 500 500 278 278 549 549 549 444 549 722 667 722 612 611 763 603 722 333 631 722 686 889 "
        "722 722 768 741 556 592 611 690 439 768 645 795 611 333 863 333 658 500 500 631 549 549 494 "
        "439 521 411 603 329 603 549 549 576 521 549 549 521 549 603 439 576 713 686 493 686 494 480 "
        "200 480 549"),
        0xA2: 247, 0xA5: 713, 0xAE: 987, 0xB1: 549, 0xB4: 549, 0xB6: 494, 0xC4: 768, 0xC5: 768,
        0xD1: 713, 0xD7: 250},
}
#: Letters outside WinAnsiEncoding but in other Times glyphs: a fair middle width.
_OTHER_WIDTH = 500

#: Unicode → Symbol-font code: Greek by the font's Latin positions, then the
#: mathematical signs a label can hold (minus, asterisk, prime, times, ...).
_SYMBOL_CODES = {
    **dict(zip("αβγδεζηθικλμνξοπρστυφχψωϕϑςϖϵ", b"abgdezhqiklmnxoprstufcywjJVve")),
    **dict(zip("ΑΒΓΔΕΖΗΘΙΚΛΜΝΞΟΠΡΣΤΥΦΧΨΩ", b"ABGDEZHQIKLMNXOPRSTUFCYW")),
    "−": 0x2D, "∗": 0x2A, "′": 0xA2, "∞": 0xA5, "→": 0xAE, "±": 0xB1, "×": 0xB4, "∂": 0xB6,
    "⊗": 0xC4, "⊕": 0xC5, "∇": 0xD1, "·": 0xD7,
}


def glyph(char: str, italic: bool) -> tuple[str, int]:
    """The font and byte code that draw ``char``; ``?`` when no base font has it."""
    if char in _SYMBOL_CODES:
        return SYMBOL, _SYMBOL_CODES[char]
    font = ITALIC if italic else ROMAN
    try:
        return font, char.encode("cp1252")[0]
    except (UnicodeEncodeError, IndexError):
        return font, ord("?")


def width(font: str, code: int) -> float:
    """Advance width of one glyph, in units of the font size."""
    return _WIDTHS[font].get(code, _OTHER_WIDTH) / 1000
