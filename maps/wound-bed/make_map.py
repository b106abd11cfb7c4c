#!/usr/bin/env python3
"""Draws map.png for the wound-bed scenario: invented geometry, one pixel per patch.

Run from this folder: python3 make_map.py. Needs only the standard library (PNG written
with zlib by hand), so it runs anywhere. Colours must match the [[habitat]] colours of
scenario.toml exactly, and the image has no antialiasing: every pixel is one class.
"""
import math
import struct
import zlib

WIDTH, HEIGHT = 48, 32
SKIN = (0xE8, 0xC4, 0xA8)         # intact skin: a wall
GRANULATION = (0xC0, 0x48, 0x48)  # healing tissue at the wound's rim
SLOUGH = (0xC8, 0xB0, 0x60)       # moist exudate layer
NECROTIC = (0x40, 0x30, 0x28)     # dead tissue at the core
POCKET = (0x70, 0xA0, 0xD0)       # a deep pocket the rinse does not reach


def classify(x, y):
    # An ellipse tilted a little, centred off the middle; radius 1 is the wound's edge.
    cx, cy = 23.5, 15.5
    dx, dy = x - cx, y - cy
    a = math.radians(12)
    u = (dx * math.cos(a) + dy * math.sin(a)) / 21.0
    v = (-dx * math.sin(a) + dy * math.cos(a)) / 13.0
    r = math.hypot(u, v)
    if r > 1.0:
        return SKIN
    if math.hypot(x - 35.0, y - 20.0) < 3.2:
        return POCKET
    if r > 0.78:
        return GRANULATION
    if r > 0.45:
        return SLOUGH
    return NECROTIC


def png(rows):
    raw = b"".join(b"\x00" + bytes(c for px in row for c in px) for row in rows)

    def chunk(tag, data):
        body = tag + data
        return struct.pack(">I", len(data)) + body + struct.pack(">I", zlib.crc32(body) & 0xFFFFFFFF)

    header = struct.pack(">IIBBBBB", WIDTH, HEIGHT, 8, 2, 0, 0, 0)  # 8-bit RGB
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", header) + chunk(b"IDAT", zlib.compress(raw, 9)) + chunk(b"IEND", b"")


if __name__ == "__main__":
    image = [[classify(x, y) for x in range(WIDTH)] for y in range(HEIGHT)]
    with open("map.png", "wb") as f:
        f.write(png(image))
