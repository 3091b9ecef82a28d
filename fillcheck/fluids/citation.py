"""A catalog or model source note turned into the publication a printed report cites.

The catalog keeps the whole record of where a figure came from: the publication, the software
that carried its figures, how a value was computed, what was recalled from memory. A printed
report names only the publication (authors, year, journal or book); the rest stays in the
catalog and the documentation.
"""

from __future__ import annotations

import re

_TOOL_WORDS = ("coolprop", "chemicals", "from memory", "refprop", "bibliography", "propssi")
"""Words that mark a part of a note as a record of software or of recall, not a publication."""

_STATUS = (("unpublished", "unpublished"), ("personal communication", "personal communication"))
"""What a removed remark says about the publication's status, kept in the citation."""

_EMBEDDED = re.compile(r"[A-Z][^();:]*?\(\d{4}\),[^;()]*")
"""A publication inside a longer note: 'Authors (year), journal volume, page'."""


def _parenthesised(text: str) -> list[tuple[int, int]]:
    """The spans [start, end) of the outermost parenthesised groups of ``text``."""
    spans, depth, start = [], 0, 0
    for i, ch in enumerate(text):
        if ch == "(":
            if depth == 0:
                start = i
            depth += 1
        elif ch == ")" and depth:
            depth -= 1
            if depth == 0:
                spans.append((start, i + 1))
    return spans


def _tidy(text: str) -> str:
    text = re.sub(r"\s+", " ", text).strip()
    text = re.sub(r"\s+([,;.])", r"\1", text)
    return text.strip(" ,;:")


def _without_remarks(text: str) -> tuple[str, list[str]]:
    """``text`` without its parenthesised remarks about software or recall, and the status
    words ('unpublished', ...) those remarks carried."""
    status: list[str] = []
    out, last = [], 0
    for a, b in _parenthesised(text):
        group = text[a:b].lower()
        if any(w in group for w in _TOOL_WORDS) or "submitted" in group:
            out.append(text[last:a])
            last = b
            status += [said for key, said in _STATUS if key in group]
            if "submitted" in group:
                status.append("submitted")
    out.append(text[last:])
    return _tidy("".join(out)), status


def citation(note: str) -> str:
    """The publication a source note names, as a printed report cites it.

    ``"Lemmon, Span (2006), J. Chem. Eng. Data 51, 785 [CoolProp key ...] (figures as carried
    by CoolProp 8.0.0): ..."`` gives ``"Lemmon, Span (2006), J. Chem. Eng. Data 51, 785"``.
    Several publications separated by ``;`` are kept; remarks about the software that carried
    the figures, or about what was recalled, are dropped; a note that names its publication
    only inside such a remark gives that publication.
    """
    head = note.split(" [CoolProp key")[0].split(" (figures")[0]
    parts = []
    for part in head.split("; "):
        text, status = _without_remarks(part)
        if any(w in text.lower() for w in _TOOL_WORDS):
            found = _EMBEDDED.search(part)
            if found is None:
                continue
            text = _tidy(found.group(0))
            if "believed" in part:
                text += " (attribution not confirmed)"
        text += ")" * (text.count("(") - text.count(")"))
        if status and not text.endswith(status[0]):
            text += ", " + status[0]
        if text:
            parts.append(text)
    return "; ".join(dict.fromkeys(parts)) if parts else "not recorded"
