"""Modbus register words <-> numbers, for every data type, byte order and word order a profile names.

Modbus carries 16-bit registers big-endian on the wire (Modbus Application Protocol
Specification V1.1b3, section 4.2); a value wider than one register spans consecutive
registers, most significant word first unless the device says otherwise ("word_order =
little"), and some devices also swap the two bytes inside each register ("byte_order = little").
"""

from __future__ import annotations

import struct

_FORMATS = {"int16": "h", "uint16": "H", "int32": "i", "uint32": "I", "float32": "f", "float64": "d"}


def _words_to_bytes(words: list[int], byte_order: str, word_order: str) -> bytes:
    ordered = words if word_order == "big" else words[::-1]
    data = b"".join(w.to_bytes(2, "big") for w in ordered)
    if byte_order == "little":
        data = b"".join(data[i + 1 : i + 2] + data[i : i + 1] for i in range(0, len(data), 2))
    return data


def decode(words: list[int], data_type: str, byte_order: str = "big", word_order: str = "big") -> float:
    """The number held in `words` (each 0..65535)."""
    return float(struct.unpack(">" + _FORMATS[data_type], _words_to_bytes(list(words), byte_order, word_order))[0])


def encode(value: float, data_type: str, byte_order: str = "big", word_order: str = "big") -> list[int]:
    """Register words holding `value` (integers are rounded and clipped to the type's range)."""
    code = _FORMATS[data_type]
    if code in "hHiI":
        bits = struct.calcsize(code) * 8
        low, high = (-(1 << (bits - 1)), (1 << (bits - 1)) - 1) if code.islower() else (0, (1 << bits) - 1)
        value = min(max(round(value), low), high)
    data = struct.pack(">" + code, value)
    words = [int.from_bytes(data[i : i + 2], "big") for i in range(0, len(data), 2)]
    if byte_order == "little":
        words = [((w & 0xFF) << 8) | (w >> 8) for w in words]
    return words if word_order == "big" else words[::-1]
