"""A small table of already formatted cells, rendered for the terminal, Markdown, HTML or CSV."""

from __future__ import annotations

import csv
import html
import io
from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class Table:
    """Rows of formatted cells under headers (all headers blank: a two-column key/value list)."""

    headers: list[str]
    rows: list[list[str]]
    note: str = ""
    """A line shown under the table (e.g. how many rows were left out)."""


@dataclass(frozen=True, slots=True)
class Section:
    """A titled table: one part of a run's summary."""

    title: str
    table: Table


def render_text(table: Table) -> str:
    """Columns padded to their widest cell, left-aligned; no header lines when it is blank."""
    cells = [table.headers, *table.rows]
    widths = [max(len(row[i]) for row in cells) for i in range(len(table.headers))]
    lines = ["  ".join(cell.ljust(width) for cell, width in zip(row, widths)).rstrip() for row in cells]
    if any(table.headers):
        lines.insert(1, "  ".join("-" * width for width in widths))
    else:
        del lines[0]
    return "\n".join(lines + ([table.note] if table.note else []))


def render_markdown(table: Table) -> str:
    """A GitHub-flavoured Markdown table ('|' in cells escaped)."""
    def line(row: list[str]) -> str:
        return "| " + " | ".join(cell.replace("|", "\\|") for cell in row) + " |"

    lines = [line(table.headers), "|" + "---|" * len(table.headers), *map(line, table.rows)]
    return "\n".join(lines + (["", table.note] if table.note else []))


def render_html(table: Table) -> str:
    """An HTML table with every cell escaped."""
    head = "".join(f"<th>{html.escape(h)}</th>" for h in table.headers)
    body = "".join("<tr>" + "".join(f"<td>{html.escape(c)}</td>" for c in row) + "</tr>" for row in table.rows)
    note = f"<p class=\"note\">{html.escape(table.note)}</p>" if table.note else ""
    thead = f"<thead><tr>{head}</tr></thead>" if any(table.headers) else ""
    return f"<table>{thead}<tbody>{body}</tbody></table>{note}"


def render_csv(table: Table) -> str:
    """Comma-separated values with the header row (the note is left out)."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(table.headers)
    writer.writerows(table.rows)
    return buffer.getvalue()


def render_sections_text(sections: list[Section]) -> str:
    """Each section's title over its text table, sections apart by a blank line."""
    return "\n\n".join(f"{s.title}\n{render_text(s.table)}" for s in sections)
