#!/usr/bin/env python3
"""Draw the editor's window icon, assets/icon/plateload.png (128 x 128 RGBA).

An original drawing made for plateload: a standard on a base jack, its base plate on a sole
board, and the load spreading into the ground beneath. Standard library only; run it from the
repository root: python3 assets/icon/make_icon.py
"""
import struct
import zlib

SIZE = 128
SS = 4  # supersampling per axis
N = SIZE * SS


def rounded_square(x, y, r):
    """Inside a square of side SIZE with corners of radius r (icon units)?"""
    cx = min(max(x, r), SIZE - r)
    cy = min(max(y, r), SIZE - r)
    return (x - cx) ** 2 + (y - cy) ** 2 <= r * r


def rect(x0, y0, x1, y1):
    return lambda x, y: x0 <= x < x1 and y0 <= y < y1


def polygon(points):
    def inside(x, y):
        c = False
        j = len(points) - 1
        for i, (xi, yi) in enumerate(points):
            xj, yj = points[j]
            if (yi > y) != (yj > y) and x < (xj - xi) * (y - yi) / (yj - yi) + xi:
                c = not c
            j = i
        return c
    return inside


# (shape, RGBA), painted in order. Icon units: 0..128, y down.
LAYERS = [
    (lambda x, y: rounded_square(x, y, 22), (35, 49, 63, 255)),          # background
    (lambda x, y: rounded_square(x, y, 22) and y >= 92, (92, 78, 62, 255)),  # ground
    (polygon([(26, 93), (102, 93), (116, 128), (12, 128)]), (232, 170, 62, 110)),  # load spread
    (rect(26, 86, 102, 93), (205, 160, 96, 255)),                         # sole board
    (rect(40, 80, 88, 86), (240, 128, 40, 255)),                          # base plate
    (rect(60, 58, 68, 80), (150, 162, 176, 255)),                         # jack screw
    (rect(56, 24, 72, 60), (224, 231, 238, 255)),                         # standard
    (rect(61, 6, 67, 12), (240, 128, 40, 255)),                           # load arrow shaft
    (polygon([(52, 11), (76, 11), (64, 21)]), (240, 128, 40, 255)),       # load arrow head
]
# Everything is clipped to the rounded square.
def clipped(f):
    return lambda x, y: rounded_square(x, y, 22) and f(x, y)


LAYERS = [(clipped(f), c) for f, c in LAYERS]


def pixel(px, py):
    x, y = (px + 0.5) / SS, (py + 0.5) / SS
    r = g = b = a = 0.0
    for inside, (cr, cg, cb, ca) in LAYERS:
        if inside(x, y):
            al = ca / 255.0
            # "over" compositing, straight alpha
            na = al + a * (1 - al)
            if na > 0:
                r = (cr * al + r * a * (1 - al)) / na
                g = (cg * al + g * a * (1 - al)) / na
                b = (cb * al + b * a * (1 - al)) / na
            a = na
    return r, g, b, a


def main():
    rows = []
    big = [[pixel(px, py) for px in range(N)] for py in range(N)]
    for y in range(SIZE):
        row = bytearray([0])  # PNG filter: none
        for x in range(SIZE):
            acc = [0.0, 0.0, 0.0, 0.0]
            for dy in range(SS):
                for dx in range(SS):
                    r, g, b, a = big[y * SS + dy][x * SS + dx]
                    acc[0] += r * a
                    acc[1] += g * a
                    acc[2] += b * a
                    acc[3] += a
            n = SS * SS
            alpha = acc[3] / n
            if alpha > 0:
                rgb = [min(255, round(c / acc[3])) for c in acc[:3]]
            else:
                rgb = [0, 0, 0]
            row += bytes(rgb + [min(255, round(alpha * 255))])
        rows.append(bytes(row))

    def chunk(kind, data):
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)

    png = b"\x89PNG\r\n\x1a\n"
    png += chunk(b"IHDR", struct.pack(">IIBBBBB", SIZE, SIZE, 8, 6, 0, 0, 0))
    png += chunk(b"IDAT", zlib.compress(b"".join(rows), 9))
    png += chunk(b"IEND", b"")
    with open("assets/icon/plateload.png", "wb") as f:
        f.write(png)


if __name__ == "__main__":
    main()
