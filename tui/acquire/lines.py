"""Bytes from a wire -> complete text lines, keeping the unfinished tail for the next chunk.

Split chunks ourselves (never pyserial's `readline`, which reads one byte per system call).
"""

from __future__ import annotations

#: a tail longer than this without a terminator is noise, not a line
MAX_LINE_BYTES = 4096


class LineSplitter:
    """Feed chunks, get complete non-empty lines; counts the bytes thrown away.

    `terminator` None accepts CR, LF and CRLF alike (and an empty line between CR and LF
    split across two chunks is simply skipped).
    """

    def __init__(self, terminator: bytes | None = None, encoding: str = "utf-8", max_line: int = MAX_LINE_BYTES):
        self.terminator = terminator
        self.encoding = encoding
        self.max_line = max_line
        self.tail = b""
        self.discarded_bytes = 0
        self.overlong = 0

    def feed(self, data: bytes) -> list[str]:
        data = self.tail + data if self.tail else data
        if self.terminator is None:
            end = max(data.rfind(b"\n"), data.rfind(b"\r")) + 1
        else:
            found = data.rfind(self.terminator)
            end = found + len(self.terminator) if found >= 0 else 0
        self.tail = data[end:]
        if len(self.tail) > self.max_line:
            self.discarded_bytes += len(self.tail)
            self.overlong += 1
            self.tail = b""
        if not end:
            return []
        text = data[:end].decode(self.encoding, "replace")
        if self.terminator is None:
            parts = text.replace("\r", "\n").split("\n")
        else:
            parts = text.split(self.terminator.decode(self.encoding, "replace"))
        return [line for line in parts if line]

    def reset(self) -> int:
        """Forget the unfinished tail (after a disconnect); returns the bytes dropped."""
        dropped, self.tail = len(self.tail), b""
        self.discarded_bytes += dropped
        return dropped
