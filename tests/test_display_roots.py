"""Display form of roots beyond square roots (Cardano roots of cubic critical equations)."""
import sympy

from compiler.presentation import scalar_tree
from compiler.render.printers import LatexPrinter, MathMLPrinter, TextPrinter


def test_a_cube_root_is_displayed_as_a_root_not_as_a_power_zero():
    # 2^(1/3) + 1: the exponent 1/3 must survive (a wrong display once printed 2^{0})
    tree = scalar_tree(sympy.Integer(2) ** sympy.Rational(1, 3) + 1)
    assert TextPrinter().doprint(tree) in ("2^(1/3) + 1", "1 + 2^(1/3)")
    assert r"\sqrt[3]{2}" in LatexPrinter().doprint(tree)
    assert "<mroot>" in MathMLPrinter().doprint(tree)


def test_a_power_of_a_root_keeps_both_exponents():
    x = sympy.Symbol("x", positive=True)
    tree = scalar_tree((x + 1) ** sympy.Rational(2, 3))
    text = TextPrinter().doprint(tree)
    assert text == "((x + 1)^(1/3))^2", text
    latex = LatexPrinter().doprint(tree)
    assert r"\sqrt[3]{x + 1}" in latex and "^{2}" in latex, latex
