"""The one-file report: the document (``towercost.report.document``) laid out as HTML or Markdown with jinja2.

HTML: one self-contained file (styles inline, plots embedded as PNG data
URIs, no script, no font or link to fetch), every string from the scenario
escaped by jinja2's autoescaping. Markdown: the same sections for documents,
scenario strings escaped so that they show as typed, plots embedded as data
URIs.
"""

from __future__ import annotations

import re
from pathlib import Path

TEMPLATES = Path(__file__).resolve().parent / "templates"

#: Report formats by file extension.
FORMATS = {".html": "html", ".htm": "html", ".md": "md"}

_MD_SPECIAL = re.compile(r"([\\`*_\[\]|])")


def markdown_text(value) -> str:
    r"""A string shown as typed in Markdown: emphasis, code, link and table marks escaped, HTML as entities, one line.

    >>> markdown_text("<b>*x*</b> | y & z")
    '&lt;b&gt;\\*x\\*&lt;/b&gt; \\| y &amp; z'
    """
    text = " ".join(str(value).split())
    text = text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    return _MD_SPECIAL.sub(r"\\\1", text)


def _environment(fmt: str):
    from jinja2 import Environment, FileSystemLoader, StrictUndefined

    env = Environment(loader=FileSystemLoader(str(TEMPLATES)), autoescape=fmt == "html",
                      undefined=StrictUndefined, trim_blocks=False, lstrip_blocks=False,
                      keep_trailing_newline=True)
    env.filters["md"] = markdown_text
    return env


def render(context: dict, fmt: str = "html") -> str:
    """The report text in ``fmt`` ("html" or "md") from the document's data."""
    if fmt not in ("html", "md"):
        raise ValueError(f"a report is html or md, got {fmt!r}")
    env = _environment(fmt)
    css = (TEMPLATES / "report.css").read_text(encoding="utf-8")
    return env.get_template(f"report.{fmt}.j2").render(**context, css=css)


def report_text(scenario, result, fmt: str = "html", *, source: str = "", when=None) -> str:
    """The whole report of an optimize result: curves per candidate, plots, tables, laid out in ``fmt``."""
    from towercost.report import document
    from towercost.select.ranking import cost_curve

    agents = list(dict.fromkeys(int(a) for a in result.per_agent.agent))   # one curve per candidate (its trays)
    curves = [cost_curve(scenario, result.case.agents[a]) for a in agents]
    return render(document.build(scenario, result, curves, source=source, when=when), fmt)
