"""Draw fieldkit's app icons (a low wire between two supports sending its signal straight up).

Run: .venv/bin/python assets/icons/make_icons.py  — writes assets/icons/*.png and copies them to web/icons/.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from PIL import Image, ImageDraw

HERE = Path(__file__).resolve().parent
WEB_ICONS = HERE.parent.parent / "web" / "icons"
GREEN = (29, 77, 58)
AMBER = (230, 140, 20)
PAPER = (246, 244, 238)


def draw(size: int, *, maskable: bool) -> Image.Image:
    k = 4  # draw large, then shrink: smooth edges without an antialiasing library
    n = size * k
    img = Image.new("RGB" if maskable else "RGBA", (n, n), GREEN if maskable else (0, 0, 0, 0))
    d = ImageDraw.Draw(img)
    if not maskable:
        d.rounded_rectangle((0, 0, n - 1, n - 1), radius=n // 6, fill=GREEN)
    inset = 0.18 if maskable else 0.08  # maskable icons keep their content in the middle 80 %
    s = n * (1 - 2 * inset)
    o = n * inset

    def p(x: float, y: float) -> tuple[float, float]:
        return (o + x * s, o + y * s)

    w = max(2, int(s * 0.035))
    # two supports
    for x in (0.12, 0.88):
        d.line([p(x, 0.92), p(x, 0.52)], fill=PAPER, width=w)
    # the hung wire: a shallow sag between the supports, feedpoint in the middle
    pts = [p(0.12 + 0.76 * t / 20, 0.56 + 0.10 * (1 - (2 * t / 20 - 1) ** 2)) for t in range(21)]
    d.line(pts, fill=AMBER, width=int(w * 1.3), joint="curve")
    cx, cy = p(0.5, 0.66)
    r = s * 0.035
    d.ellipse((cx - r, cy - r, cx + r, cy + r), fill=AMBER)
    # signal going up: three arcs above the wire
    for i, radius in enumerate((0.16, 0.28, 0.40)):
        rr = radius * s
        box = (cx - rr, cy - rr - s * 0.06, cx + rr, cy + rr - s * 0.06)
        d.arc(box, start=215, end=325, fill=PAPER if i < 2 else AMBER, width=w)
    # ground
    d.line([p(0.02, 0.93), p(0.98, 0.93)], fill=PAPER, width=w)
    return img.resize((size, size), Image.LANCZOS)


def main() -> None:
    WEB_ICONS.mkdir(parents=True, exist_ok=True)
    for name, size, maskable in (
        ("icon-192.png", 192, False),
        ("icon-512.png", 512, False),
        ("icon-maskable-512.png", 512, True),
    ):
        target = HERE / name
        draw(size, maskable=maskable).save(target, optimize=True)
        shutil.copyfile(target, WEB_ICONS / name)


if __name__ == "__main__":
    main()
