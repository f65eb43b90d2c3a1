"""Every number shown in report.html is a number of report.json, as rounded for reading.

The page is read with Python's ``html.parser`` (style sheets, inline images and the methods
section, whose numbers are fixed wording and literature citations, left out); each
number in its text must equal, at the decimals shown, a number the JSON holds (or that number as
a percentage, or in billions), or be part of a label the JSON holds (dates, names). The JSON's
own copies of the page's sentences are left out of the pool, so a sentence's figures must come
from the results, not from themselves. The demo series is invented; it is the input here, never
a check value.
"""

import json
import re
from html.parser import HTMLParser

import pytest

from regimetrend.report import write_report
from tests.test_report import demo_analysis

NUMBER = re.compile(r"(?<![\w.])[-+−]?\d[\d,]*(?:\.\d+)?(?:\s?(billion|trillion))?")
# numbers that are part of the page's fixed wording, not results: interval levels, the test
# level, the p-value floor, and the first horizon / one period
FIXED = {"80", "95", "5", "0.001", "1", "0.05"}


class _Text(HTMLParser):
    def __init__(self):
        super().__init__()
        self.skip = 0
        self.parts = []

        self.open: list[bool] = []  # per open element: does it start a skipped part?

    def handle_starttag(self, tag, attrs):
        skipped = tag in ("style", "script") or dict(attrs).get("id") == "methods"
        if tag not in ("img", "br", "meta", "link", "hr", "input"):
            self.open.append(skipped)
        self.skip += skipped

    def handle_endtag(self, tag):
        if self.open:
            self.skip -= self.open.pop()

    def handle_data(self, data):
        if not self.skip:
            self.parts.append(data)


def _pool(result):
    """(numbers, label tokens) of the JSON, without the report's own sentences."""
    numbers, tokens = [], set()

    def walk(x, key=""):
        if key == "report":
            return
        if isinstance(x, dict):
            for k, v in x.items():
                walk(v, k)
        elif isinstance(x, list):
            for v in x:
                walk(v, key)
        elif isinstance(x, bool) or x is None:
            return
        elif isinstance(x, (int, float)):
            numbers.append(float(x))
        elif isinstance(x, str):
            tokens.update(m.group(0).lstrip("+-−") for m in NUMBER.finditer(x))
    walk(result)
    return numbers, tokens


def _matches(text, numbers, tokens) -> bool:
    word = "billion" if "billion" in text else "trillion" if "trillion" in text else ""
    core = text.replace(word, "").strip().replace("−", "-").lstrip("+")
    if core.lstrip("-") in tokens or core.lstrip("-") in FIXED:
        return True
    value = float(core.replace(",", ""))
    decimals = len(core.split(".")[1]) if "." in core else 0
    scale = {"billion": 1e9, "trillion": 1e12}.get(word, 1.0)
    tol = 0.5 * 10 ** -decimals + 1e-12
    for x in numbers:
        for shown in (x / scale, 100 * x / scale):
            if abs(abs(shown) - abs(value)) <= tol:
                return True
    return False


@pytest.fixture(scope="module")
def report_files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("numbers")
    write_report(demo_analysis("Lumen Grid energy sold (MWh)"), folder)
    return folder


def test_every_number_in_the_html_is_in_the_json(report_files):
    result = json.loads((report_files / "report.json").read_text(encoding="utf-8"))
    parser = _Text()
    parser.feed((report_files / "report.html").read_text(encoding="utf-8"))
    text = " ".join(parser.parts)
    numbers, tokens = _pool(result)
    shown = [m.group(0) for m in NUMBER.finditer(text)]
    assert len(shown) > 100  # the page shows its tables, facts and sentences
    unmatched = [s for s in shown if not _matches(s, numbers, tokens)]
    assert not unmatched, unmatched[:20]


def test_the_check_catches_a_number_the_json_does_not_hold(report_files):
    result = json.loads((report_files / "report.json").read_text(encoding="utf-8"))
    numbers, tokens = _pool(result)
    assert not _matches("987,654,321.123", numbers, tokens)
