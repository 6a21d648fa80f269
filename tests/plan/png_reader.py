"""A minimal PNG reader (8-bit greyscale/RGB/RGBA, not interlaced) for checking renders.

Follows the PNG specification (W3C PNG, 2nd ed., ISO/IEC 15948:2003): chunks, zlib-compressed
IDAT, per-row filters 0-4 (None, Sub, Up, Average, Paeth).
"""

from __future__ import annotations

import struct
import zlib

SIGNATURE = b"\x89PNG\r\n\x1a\n"
CHANNELS = {0: 1, 2: 3, 6: 4}


def _paeth(a: int, b: int, c: int) -> int:
    p = a + b - c
    pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
    if pa <= pb and pa <= pc:
        return a
    return b if pb <= pc else c


def read_png(data: bytes) -> tuple[int, int, int, list[bytearray]]:
    """Return (width, height, channels, rows of raw pixel bytes)."""
    assert data.startswith(SIGNATURE), "not a PNG file"
    pos, idat = 8, b""
    width = height = depth = colour = interlace = -1
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos : pos + 4])
        kind = data[pos + 4 : pos + 8]
        body = data[pos + 8 : pos + 8 + length]
        pos += 12 + length
        if kind == b"IHDR":
            width, height, depth, colour, _, _, interlace = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat += body
        elif kind == b"IEND":
            break
    assert depth == 8 and colour in CHANNELS and interlace == 0, (depth, colour, interlace)
    channels = CHANNELS[colour]
    raw = zlib.decompress(idat)
    stride = width * channels
    rows: list[bytearray] = []
    previous = bytearray(stride)
    for y in range(height):
        start = y * (stride + 1)
        kind, line = raw[start], bytearray(raw[start + 1 : start + 1 + stride])
        for i in range(stride):
            left = line[i - channels] if i >= channels else 0
            up = previous[i]
            corner = previous[i - channels] if i >= channels else 0
            if kind == 1:
                line[i] = (line[i] + left) & 0xFF
            elif kind == 2:
                line[i] = (line[i] + up) & 0xFF
            elif kind == 3:
                line[i] = (line[i] + (left + up) // 2) & 0xFF
            elif kind == 4:
                line[i] = (line[i] + _paeth(left, up, corner)) & 0xFF
        rows.append(line)
        previous = line
    return width, height, channels, rows


def pixel(image: tuple[int, int, int, list[bytearray]], x: int, y: int) -> tuple[int, ...]:
    """Colour at (x, y) as a tuple of channel values."""
    _, _, channels, rows = image
    return tuple(rows[y][x * channels : (x + 1) * channels])
