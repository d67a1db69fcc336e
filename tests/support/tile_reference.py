"""
Independent check of a run's tile pyramids (server/cli/tiles.ts, README "Tile pyramids").

For each picture: reads the `.tiles` file by its documented layout (PNG tiles, JSON index, 12-byte trailer),
decodes every tile with the small PNG decoder below (zlib from the standard library and numpy: no code
shared with the product, which encodes with pngjs), stitches each level and compares it pixel by pixel with
the level's picture painted here by numpy from the run's .npy arrays:
  - far fields: mean pooling of the float32 map by the level's factor (accumulated in float32 in the same
    order as a row-major pass, so the sums round alike), gamma 0.5 up to the full scale of the preview-size
    map (brightest pixel more than 2 px from the zero order), target windows outlined one pixel outside;
  - phase maps and rotation (2θ): every factor-th cell, wrapped to −π…π, cyclic colours;
  - atom index: every factor-th cell over count − 1, sequential colours;
all with the last array row at the top (+v / +y up, README "Picture convention"). The colour tables follow
their definition in shared/optics/colormap.ts's header (sequential stops, three cosines 120° apart).
Also compares the level whose side equals the single preview PNG with that PNG.

Usage: python3 tile_reference.py spec.json → JSON on stdout, per picture: levels [{side, tiles, mismatched,
badTiles}], previewSide, previewMismatched.
"""
import json
import math
import struct
import sys
import zlib

import numpy as np

SEQUENTIAL_STOPS = [(8, 10, 32), (18, 62, 98), (24, 122, 128), (214, 150, 44), (255, 246, 224)]


def js_round(v):
    return math.floor(v + 0.5)


def sequential(t):
    x = min(1.0, max(0.0, t)) * (len(SEQUENTIAL_STOPS) - 1)
    i = min(len(SEQUENTIAL_STOPS) - 2, math.floor(x))
    f = x - i
    a, b = SEQUENTIAL_STOPS[i], SEQUENTIAL_STOPS[i + 1]
    return [js_round(a[k] + (b[k] - a[k]) * f) for k in range(3)]


def cyclic(phase):
    return [js_round(255 * (0.55 + 0.4 * math.cos(phase - (2 * math.pi * j) / 3))) for j in range(3)]


SEQ_LUT = np.array([sequential(i / 255) for i in range(256)], dtype=np.uint8)
CYC_LUT = np.array([cyclic(2 * math.pi * (i / 255) - math.pi) for i in range(256)], dtype=np.uint8)


def paint(levels, lut):
    k = np.clip(np.floor(255 * levels + 0.5), 0, 255).astype(np.int64)
    return lut[k]


def decode_png(data):
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    pos, idat, width = 8, [], None
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos : pos + 8])
        body = data[pos + 8 : pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour = struct.unpack(">IIBB", body[:10])
            assert depth == 8 and colour in (2, 6), (depth, colour)
            channels = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat.append(body)
        elif kind == b"IEND":
            break
        pos += 12 + length
    raw = np.frombuffer(zlib.decompress(b"".join(idat)), dtype=np.uint8)
    stride = width * channels
    rows = raw.reshape(height, stride + 1)
    out = np.zeros((height, stride), dtype=np.uint8)
    previous = np.zeros(stride, dtype=np.int64)
    for r in range(height):
        kind, line = rows[r, 0], rows[r, 1:].astype(np.int64)
        if kind == 0:
            cur = line
        elif kind == 1:
            cur = line.reshape(width, channels).cumsum(axis=0).reshape(-1) % 256
        elif kind == 2:
            cur = (line + previous) % 256
        else:
            cur = np.zeros(stride, dtype=np.int64)
            for i in range(stride):
                left = cur[i - channels] if i >= channels else 0
                up = previous[i]
                if kind == 3:
                    cur[i] = (line[i] + (left + up) // 2) % 256
                else:
                    upleft = previous[i - channels] if i >= channels else 0
                    p = left + up - upleft
                    pa, pb, pc = abs(p - left), abs(p - up), abs(p - upleft)
                    pred = left if pa <= pb and pa <= pc else (up if pb <= pc else upleft)
                    cur[i] = (line[i] + pred) % 256
        out[r] = cur
        previous = cur
    return out.reshape(height, width, channels)[:, :, :3]


def pool(values, factor):
    """Mean pooling with float32 sums added in row-major order, each sum rounded to float32 as it grows."""
    if factor == 1:
        return values
    n = values.shape[0]
    m = n // factor
    acc = np.zeros((m, m), dtype=np.float32)
    norm = 1.0 / (factor * factor)
    for dy in range(factor):
        for dx in range(factor):
            acc = (acc.astype(np.float64) + values[dy::factor, dx::factor].astype(np.float64) * norm).astype(np.float32)
    return acc


def full_scale(m):
    c = m.shape[0] / 2
    ys, xs = np.indices(m.shape)
    near = (np.abs(xs - c) <= 2) & (np.abs(ys - c) <= 2)
    away = np.where(near, 0, m)
    top, peak = float(away.max()), float(m.max())
    return top if top > 0 else (peak if peak > 0 else None)


def outline(image, x0, y0, width, height, colour):
    h, w, _ = image.shape
    x1, y1 = x0 + width - 1, y0 + height - 1
    for x in range(x0, x1 + 1):
        for y in (y0, y1):
            if 0 <= x < w and 0 <= y < h:
                image[y, x] = colour
    for y in range(y0, y1 + 1):
        for x in (x0, x1):
            if 0 <= x < w and 0 <= y < h:
                image[y, x] = colour


def far_field_level(spec, total, factor):
    n = total.shape[0]
    scale = full_scale(pool(total, spec["previewFactor"]))
    m = pool(total, factor).astype(np.float64)
    inv = 1.0 / scale if scale else 0.0
    image = paint(np.where(m > 0, np.sqrt(np.maximum(m, 0) * inv), 0.0), SEQ_LUT)
    for w in spec["windows"]:
        outline(image, math.floor(w["x0"] / factor) - 1, math.floor(w["y0"] / factor) - 1,
                math.ceil(w["width"] / factor) + 2, math.ceil(w["height"] / factor) + 2, w["color"])
    return image[::-1]


def phase_level(values, factor):
    v = values[::factor, ::factor].astype(np.float64)
    two_pi = 2 * math.pi
    wrapped = v - two_pi * np.floor((v + math.pi) / two_pi)
    return paint((wrapped + math.pi) / two_pi, CYC_LUT)[::-1]


def index_level(values, factor, count):
    v = values[::factor, ::factor].astype(np.float64)
    return paint(v * (1.0 / (count - 1) if count > 1 else 0.0), SEQ_LUT)[::-1]


def reference(spec, arrays, factor):
    kind = spec["kind"]
    if kind == "farfield":
        return far_field_level(spec, arrays, factor)
    if kind == "phase":
        return phase_level(arrays, factor)
    if kind == "rotation":
        return phase_level(2 * arrays, factor)
    return index_level(arrays, factor, spec["count"])


def check(folder, spec):
    arrays = np.load(f"{folder}/{spec['npy']}", allow_pickle=False)
    n = arrays.shape[0]
    blob = open(f"{folder}/{spec['tiles']}", "rb").read()
    assert blob[-8:] == b"PWTILES1", "no trailer"
    (length,) = struct.unpack("<I", blob[-12:-8])
    index = json.loads(blob[-12 - length : -12])
    size = index["tileSize"]
    result = {"levels": [], "width": index["width"], "height": index["height"], "tileSize": size}
    preview = decode_png(open(f"{folder}/{spec['picture']}", "rb").read())
    result["previewSide"] = preview.shape[1]
    for level, tiles in zip(index["levels"], index["tiles"]):
        side = level["width"]
        stitched = np.zeros((level["height"], side, 3), dtype=np.uint8)
        bad_tiles = 0
        for k, (offset, count) in enumerate(tiles):
            x, y = k % level["columns"], k // level["columns"]
            tile = decode_png(blob[offset : offset + count])
            want = (min(size, level["height"] - y * size), min(size, side - x * size))
            if tile.shape[:2] != want:
                bad_tiles += 1
                continue
            stitched[y * size : y * size + want[0], x * size : x * size + want[1]] = tile
        expected = reference(spec, arrays, n // side)
        mismatched = int(np.any(stitched != expected, axis=2).sum())
        result["levels"].append({"side": side, "tiles": len(tiles), "columns": level["columns"], "rows": level["rows"], "badTiles": bad_tiles, "mismatched": mismatched})
        if side == preview.shape[1]:
            result["previewMismatched"] = int(np.any(stitched != preview, axis=2).sum())
    return result


if __name__ == "__main__":
    job = json.load(open(sys.argv[1]))
    print(json.dumps({spec["picture"]: check(job["folder"], spec) for spec in job["pictures"]}))
