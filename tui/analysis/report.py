"""A single-file report of one or more runs: the comparison, each run's summary and figures.

HTML carries its figures as inline SVG; Markdown as base64 PNG data URIs, so either file
can be mailed or archived alone.
"""

from __future__ import annotations

import base64
import html
import re
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path

from tui.analysis.figures import png_bytes, svg_text
from tui.analysis.tables import Section, Table, render_html, render_markdown
from tui.cli import SAFETY_NOTE
from tui.errors import UsageError

#: report file suffix -> format
FORMATS = {".html": "html", ".htm": "html", ".md": "markdown", ".markdown": "markdown"}

_STYLE = """
body { font-family: system-ui, sans-serif; margin: 2em auto; max-width: 72em; padding: 0 1em; }
table { border-collapse: collapse; margin: 0.5em 0 1em; font-size: 0.9em; }
th, td { border: 1px solid #bbb; padding: 0.2em 0.6em; text-align: left; }
th { background: #eee; }
.note { color: #555; font-size: 0.9em; }
figure { margin: 1em 0; } figure svg { max-width: 100%; height: auto; }
"""


@dataclass(frozen=True, slots=True)
class RunPart:
    """What the report shows of one run."""

    title: str
    sections: list[Section]
    figures: list[tuple[str, object]] = field(default_factory=list)
    """(caption, matplotlib Figure) pairs."""


def report_format(path: Path) -> str:
    """'html' or 'markdown' from the file's suffix; a UsageError for anything else."""
    try:
        return FORMATS[path.suffix.lower()]
    except KeyError:
        raise UsageError(f"report {str(path)!r}: name it .html or .md to choose the format") from None


def write_report(path: Path, runs: list[RunPart], *, comparison: Table | None = None, notes: tuple[str, ...] = ()) -> None:
    """Write the report; notes are lines shown under the title (e.g. configurations used)."""
    form = _Html if report_format(path) == "html" else _Markdown
    stamp = datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
    parts = [form.heading(1, "rigside analysis")]
    parts += [form.note(line) for line in (f"Written {stamp} by rigside analyze.", *notes, SAFETY_NOTE)]
    if comparison is not None:
        parts += [form.heading(2, "Comparison of runs"), form.table(comparison)]
    for run in runs:
        parts.append(form.heading(2, run.title))
        for section in run.sections:
            parts += [form.heading(3, section.title), form.table(section.table)]
        parts += [form.figure(caption, figure) for caption, figure in run.figures]
    path.write_text(form.document(parts), encoding="utf-8")


class _Markdown:
    table = staticmethod(render_markdown)

    @staticmethod
    def heading(level: int, text: str) -> str:
        return f"{'#' * level} {text}"

    @staticmethod
    def note(text: str) -> str:
        return text

    @staticmethod
    def figure(caption: str, figure) -> str:
        return f"![{caption}](data:image/png;base64,{base64.b64encode(png_bytes(figure)).decode('ascii')})"

    @staticmethod
    def document(parts: list[str]) -> str:
        return "\n\n".join(parts) + "\n"


class _Html:
    table = staticmethod(render_html)

    @staticmethod
    def heading(level: int, text: str) -> str:
        return f"<h{level}>{html.escape(text)}</h{level}>"

    @staticmethod
    def note(text: str) -> str:
        return f"<p class=\"note\">{html.escape(text)}</p>"

    @staticmethod
    def figure(caption: str, figure) -> str:
        """The figure's SVG without its XML prologue, inside the page."""
        svg = re.sub(r"^.*?(?=<svg)", "", svg_text(figure), flags=re.DOTALL)
        return f"<figure>{svg}<figcaption>{html.escape(caption)}</figcaption></figure>"

    @staticmethod
    def document(parts: list[str]) -> str:
        return (
            "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>rigside analysis</title>"
            f"<style>{_STYLE}</style></head><body>\n" + "\n".join(parts) + "\n</body></html>\n"
        )
