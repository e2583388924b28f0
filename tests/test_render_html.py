"""The HTML report: self-contained, escaped, and showing every step and check.

Safety is the point of most of these: the spec ("Prose") requires that a
shared report must not run a stranger's script, and the report must open
with no network.
"""
from __future__ import annotations

import re
from html.parser import HTMLParser

from compiler.render.html import to_html
from compiler.render.mathml import to_mathml
from compiler.render.printers import MathMLPrinter
from compiler.results import CheckResult, Prose, Report, Step, ValueRecord
from support import make_report


def _html(report=None) -> str:
    return to_html(report or make_report())


def _prose_report(markdown: str, allow_html: bool = False, refs=None) -> Report:
    return Report("anomark", "0.1.0", "d.md", "T", [], "", "", {}, 12,
                  [Prose(markdown, 1, refs or {})], {}, allow_html=allow_html)


class _Tags(HTMLParser):
    """Collects start tags and their attributes."""

    def __init__(self):
        super().__init__()
        self.tags: list[tuple[str, dict]] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))


def _tags(html: str) -> list[tuple[str, dict]]:
    p = _Tags()
    p.feed(html)
    return p.tags


def test_math_is_mathml():
    html = _html()
    assert html.count("<math") == html.count("</math>") > 5
    assert '<math display="block">' in html  # $$...$$ and step values
    assert "<msup><mi>x</mi><mn>2</mn></msup>" in html  # the prose's $x^2$
    assert "xmlns" not in html


def test_value_reference_shows_the_value():
    html = _html()
    prose = html.split('<div class="prose">')[1].split("</div>")[0]
    # @{I8} becomes the value's MathML, written from its tree, not the literal reference
    assert "@{I8}" not in prose
    assert MathMLPrinter().doprint(make_report().values["I8"].tree) in prose
    # the value is long, so a display; the full stop after it ends the display, not the next line
    assert "<mo>.</mo></mrow></math></p>" in prose and "</math>.</p>" not in prose


def test_scripts_escaped_in_prose_and_sources():
    html = _html()
    assert "<script" not in html.lower()
    escaped = "&lt;script&gt;alert(1)&lt;/script&gt;"
    prose = html.split('<div class="prose">')[1]
    assert escaped in prose.split("</div>")[0]
    source = html.split('id="step-5"')[1].split("</pre>")[0]
    assert escaped in source


def test_no_external_references():
    html = _html()
    for needle in ("http://", "https://", "src=", "<link", "@import", "<script", "url(http"):
        assert needle not in html
    for tag, attrs in _tags(html):
        assert not tag.startswith("script") and not any(k.startswith("on") for k in attrs), (tag, attrs)
        assert all(v is None or v.startswith("#") for k, v in attrs.items() if k == "href")


def test_css_inlined():
    html = _html()
    assert "<style>" in html and ".margin" in html and "grid-template-columns" in html


def test_summary_at_top():
    html = _html()
    front = html.split("<main>")[0]
    assert "Anomaly of a twisted compactification" in front
    assert "A. Writer, B. Reader" in front and "2024-05-01" in front
    assert "Not passed" in front
    for status, n in (("steps", 8), ("proven", 2), ("sampled", 1), ("failed", 1), ("error", 1)):
        assert f'<span class="n">{n}</span> {status}' in front
    assert "<code>angular_integral</code> = 2" in front
    assert 'href="#step-5">line 14</a>' in front and 'href="#step-6">line 15</a>' in front


def test_failed_check_flagged_with_detail():
    html = _html()
    step = html.split('id="step-5"')[1].split("</section>")[0]
    assert html.count('<section class="step failed"') == 1
    assert '<li class="check failed">' in step
    assert "at N = 2: left 1/2, right 2" in step
    assert '<li class="check error">' in html and "undefined name missing" in html
    assert '<li class="check sampled">' in html and "equal at 24 random points" in html


def test_steps_in_reading_order_with_line_numbers():
    html = _html()
    positions = [html.index(f'id="step-{i}"') for i in range(1, 9)]
    assert positions == sorted(positions)
    assert html.index("Setup") < positions[0] < positions[-1] < html.index("Finally")
    assert re.search(r'<span class="lineno"[^>]*>11</span><pre><code>let I8 = ', html)


def test_remainder_table_plot_summary():
    html = _html()
    assert '<div class="remainder"><span class="label">remainder</span><math display="block">' in html
    table = html.split("<table>")[1].split("</table>")[0]
    assert table.count("<tr>") == 5  # header + N, g in 2..3
    assert "<mfrac><mn>53</mn><mn>24</mn></mfrac>" in table  # cells printed from their trees
    assert "<msub><mi>a</mi><mo>∗</mo></msub>" in table.split("</thead>")[0]  # a_star as a name
    figure = html.split('<figure class="plot">')[1].split("</figure>")[0]
    assert figure.startswith("<svg") and "<tspan font-style=\"italic\">a</tspan>" in figure  # a_star as a name
    assert figure.count("<polyline") == 1
    assert "one curve, 11 points" in html


def test_raw_html_only_when_allowed():
    md = "Some <em>raw</em> text."
    assert "&lt;em&gt;raw&lt;/em&gt;" in to_html(_prose_report(md))
    assert "<em>raw</em>" in to_html(_prose_report(md, allow_html=True))


def test_mathml_cannot_smuggle_markup():
    # The converter copies \text verbatim and turns \href/\style into attributes.
    md = (r"$\text{<script>alert(1)</script>}$ $\href{javascript:alert(1)}{x}$ "
          r"$\style{background:url(http://example.org/x)}{y}$ $a < b \& c$")
    html = to_html(_prose_report(md))
    assert "<script" not in html and "javascript:" not in html and "http://" not in html
    assert "<mtext>&lt;script&gt;alert(1)&lt;/script&gt;</mtext>" in html
    assert "<mo>&lt;</mo>" in html


def test_images_not_fetched():
    html = to_html(_prose_report("![a diagram](https://example.org/d.png)"))
    assert "src=" not in html and "example.org" not in html and "[a diagram]" in html


def test_unreadable_math_shown_as_source():
    html = to_html(_prose_report(r"bad $\left( x$ math"))
    assert '<code class="tex-error" title="could not typeset">\\left( x</code>' in html


def test_names_and_details_escaped():
    v = ValueRecord("x", "1", [0])
    step = Step(1, 2, 1, 2, "check x == 1", "check", [], values=[v])
    step.summary = "<b>bold</b>"
    report = Report("anomark", "0.1.0", "<i>d</i>.md", "<img src=x>", ["<u>A</u>"], "", "", {"<c>": "1"}, 12,
                    [step], {"x": v})
    html = to_html(report)
    assert "<b>" not in html and "<u>" not in html and "<img" not in html and "<i>" not in html
    assert "&lt;b&gt;bold&lt;/b&gt;" in html and "&lt;img src=x&gt;" in html


def _value_page(v: ValueRecord, notation=None) -> str:
    return to_html(Report("anomark", "0.1.0", "d.md", "T", [], "", "", {}, 12,
                          [Step(1, 2, 1, 2, "show I6", "show", [], values=[v])], {v.name: v},
                          notation=notation or {}))


def test_long_values_aligned_over_lines():
    terms = [["mul", ["div", ["int", k], ["int", 48]], ["pow", ["cls", f"p1(T{k})"], 2], ["cls", f"c1(L{k})"]]
             for k in range(1, 7)]
    html = _value_page(ValueRecord("I6", "...", [6], ["add", *terms]))
    value = html.split('<div class="value"')[1].split("</div>")[0]
    assert value.count("<mtr>") >= 2 and value.count("<mn>48</mn>") == 6


def test_computed_values_written_directly_as_mathml():
    # The converter marks its brackets fence="true"; our printer writes values itself.
    html = _html()
    value = html.split('<div class="value" id="value-I8">')[1].split("</div>")[0]
    assert 'fence="true"' not in value
    assert "<msub><mi>I</mi><mrow><mn>8</mn><mo>,</mo><mi>free</mi></mrow></msub>" in value


def test_notation_override_and_rule():
    v = ValueRecord("kRRR", "...", [0], ["mul", ["sym", "nv_minus_nh"], ["sym", "eps_star"]])
    html = _value_page(v)
    assert "<msub><mi>k</mi><mrow><mi>R</mi><mi>R</mi><mi>R</mi></mrow></msub>" in html
    assert "<mi>nv</mi><mo>\u2212</mo><mi>nh</mi>" in html and "<msub><mi>\u03f5</mi><mo>\u2217</mo></msub>" in html
    html = _value_page(v, {"kRRR": r"\kappa_{3}"})
    assert "<msub><mi>\u03ba</mi><mrow><mn>3</mn></mrow></msub>" in html


def test_routine_checks_fold_and_claims_stay_in_view():
    html = _html()
    let = html.split('id="step-2"')[1].split("</section>")[0]
    assert '<details class="routine"><summary>' in let and "1 routine check proven" in let
    claim = html.split('id="step-4"')[1].split("</section>")[0]
    assert "<details" not in claim and "claim holds" in claim  # a check statement stays in full view
    failed = html.split('id="step-5"')[1].split("</section>")[0]
    assert "<details" not in failed


def test_headline_results_open_the_report():
    report = make_report()
    report.headline = ["kR"]
    html = to_html(report)
    results = html.split('<section class="results"')[1].split("</section>")[0]
    assert '<a href="#value-kR">' in results and "<main>" not in results
    assert html.index('class="results"') < html.index("<main>")
    assert "8</span> steps, <span class=\"n\">5</span> checks" in html


def test_same_report_same_page():
    assert _html() == _html()


def test_extremization_details_as_math():
    detail = "critical points r = 2/3; r = 4/3; kept r = 2/3: d²a/dr² = -9/16 < 0"
    v = ValueRecord("r_star", "2/3", [0], ["div", ["int", 2], ["int", 3]])
    step = Step(1, 2, 1, 2, "maximize a over r -> r_star, a_star", "maximize", ["r_star"], values=[v],
                checks=[CheckResult("one admissible critical point", "proven", detail)])
    html = to_html(Report("anomark", "0.1.0", "d.md", "T", [], "", "", {}, 12, [step], {"r_star": v}))
    shown = html.split('<ul class="extremum">')[1].split("</ul>")[0]
    assert [label for label in re.findall(r'<span class="label">([^<]*)</span>', shown)] == [
        "critical point", "critical point", "kept", "second-order test"]
    assert "<mi>∂</mi>" in shown or "∂" in shown
    assert detail not in html  # not repeated as raw text in the margin
