#!/usr/bin/python3
"""imgcheck.py - check that an image is not blank and that charts drew in it.

usage: imgcheck.py IMAGE WIDTH HEIGHT MIN_COLOURED
Reads 8-bit PNG (grey, RGB, RGBA; no interlace) with numpy and zlib, or binary
PPM (P6).  Checks the size, that at least 2 % of the pixels differ from the most
common colour, and that at least MIN_COLOURED pixels are strongly coloured
(channel spread > 80), which text and rules in grey do not produce but chart
lines, bars and bands do.  Prints what it measured."""
import struct
import sys
import zlib

import numpy as np


def read_png(path):
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise SystemExit("not a PNG")
    pos, idat, w = 8, [], None
    while pos < len(data):
        (n,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + n]
        pos += 12 + n
        if kind == b"IHDR":
            w, h, depth, ctype, _, _, interlace = struct.unpack(">IIBBBBB", body)
            if depth != 8 or interlace or ctype not in (0, 2, 6):
                raise SystemExit("unsupported PNG layout")
            bpp = {0: 1, 2: 3, 6: 4}[ctype]
        elif kind == b"IDAT":
            idat.append(body)
        elif kind == b"IEND":
            break
    raw = np.frombuffer(zlib.decompress(b"".join(idat)), dtype=np.uint8).reshape(h, w * bpp + 1)
    filt = raw[:, 0].astype(np.int32)
    if filt.max() > 4:
        raise SystemExit("bad PNG filter")
    line = raw[:, 1:].reshape(h, w, bpp).astype(np.int32)
    out = np.zeros((h, w, bpp), dtype=np.int32)
    # Undo the row filters along anti-diagonals y + x = d: a pixel depends only
    # on its left, upper and upper-left neighbours, all on earlier diagonals.
    for d in range(h + w - 1):
        ys = np.arange(max(0, d - w + 1), min(h, d + 1))
        xs = d - ys
        a = np.where((xs > 0)[:, None], out[ys, np.maximum(xs - 1, 0)], 0)
        b = np.where((ys > 0)[:, None], out[np.maximum(ys - 1, 0), xs], 0)
        c = np.where(((xs > 0) & (ys > 0))[:, None], out[np.maximum(ys - 1, 0), np.maximum(xs - 1, 0)], 0)
        p = a + b - c
        pa, pb, pc = np.abs(p - a), np.abs(p - b), np.abs(p - c)
        paeth = np.where((pa <= pb) & (pa <= pc), a, np.where(pb <= pc, b, c))
        f = filt[ys][:, None]
        pred = np.select([f == 0, f == 1, f == 2, f == 3], [0, a, b, (a + b) >> 1], paeth)
        out[ys, xs] = (line[ys, xs] + pred) & 255
    img = out.reshape(h, w, bpp)
    if bpp == 1:
        img = np.repeat(img, 3, axis=2)
    return img[:, :, :3]


def read_ppm(path):
    data = open(path, "rb").read()
    parts, pos = [], 0
    while len(parts) < 4:
        while data[pos:pos + 1].isspace():
            pos += 1
        start = pos
        while not data[pos:pos + 1].isspace():
            pos += 1
        parts.append(data[start:pos])
    pos += 1
    if parts[0] != b"P6" or parts[3] != b"255":
        raise SystemExit("not an 8-bit P6 PPM")
    w, h = int(parts[1]), int(parts[2])
    return np.frombuffer(data[pos:pos + w * h * 3], dtype=np.uint8).reshape(h, w, 3)


def main():
    path, want_w, want_h, min_col = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
    img = read_ppm(path) if path.endswith(".ppm") else read_png(path)
    h, w, _ = img.shape
    flat = img.reshape(-1, 3).astype(np.int32)
    keys = (flat[:, 0] << 16) | (flat[:, 1] << 8) | flat[:, 2]
    vals, counts = np.unique(keys, return_counts=True)
    background = counts.max() / keys.size
    spread = flat.max(axis=1) - flat.min(axis=1)
    coloured = int((spread > 80).sum())
    print(f"{path}: {w}x{h}, {len(vals)} colours, background {background:.3f}, coloured pixels {coloured}")
    ok = True
    if (want_w and w != want_w) or (want_h and h != want_h):
        print(f"size {w}x{h}, want {want_w}x{want_h}")
        ok = False
    if background > 0.98:
        print("blank: almost every pixel has the background colour")
        ok = False
    if coloured < min_col:
        print(f"only {coloured} coloured pixels, want at least {min_col}: the charts did not draw")
        ok = False
    sys.exit(0 if ok else 1)


main()
