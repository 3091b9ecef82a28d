"""User text made safe to show: control characters become visible escapes.

Every piece of text read from a scenario or a register (ids, the title, gas names, quantities,
keys, cells) and every refusal message passes through :func:`neutralise`, so no renderer (the
terminal, JSON, HTML, an error message) ever receives a raw escape sequence, newline or other
control character from the input.
"""

from __future__ import annotations

import re

_SHOWN = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}
_UNSAFE = re.compile(
    "[\x00-\x1f\x7f-\x9f"  # C0 controls, DEL, C1 controls
    "\u2028\u2029"  # line and paragraph separators
    "\u202a-\u202e\u2066-\u2069"  # bidirectional embeddings, overrides and isolates
    "\ufeff]"  # a byte-order mark inside text
)


def _escape(m: re.Match[str]) -> str:
    c = m.group()
    if c in _SHOWN:
        return _SHOWN[c]
    n = ord(c)
    return f"\\x{n:02x}" if n < 0x100 else f"\\u{n:04x}"


def neutralise(text: str) -> str:
    """``text`` with each control character replaced by a visible escape.

    ``"\\x1b[2J"`` (an ANSI clear-screen) becomes the six characters ``\\x1b[2J``, a newline
    ``\\n``, a tab ``\\t``; other C0 and C1 controls, DEL, the Unicode line and paragraph
    separators, bidirectional overrides and a byte-order mark become ``\\xNN`` or ``\\uNNNN``.
    Text without them is returned unchanged, and the result passes through unchanged again.
    """
    if _UNSAFE.search(text) is None:
        return text
    return _UNSAFE.sub(_escape, text)
