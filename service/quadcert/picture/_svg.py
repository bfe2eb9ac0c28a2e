"""The picture as a standalone SVG document, for reports: the band of boxes, the panel ends, and each panel's
share of the error bound on a log scale, with a caption that says what was certified.

Every panel is one ``<rect class="box">``, so a reader (or a test) can count them. Panels certified by a
lower-order Peano bound or a range bound carry the class ``coarse``; pieces bounded by an envelope next to a
singular point or in a tail carry ``envelope`` and span the height, since f has no finite box there.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from xml.sax.saxutils import escape

from ..arithmetic import shown
from ..results import IntegralResult, bound_text
from ._boxes import ENVELOPES, LOW_ORDER, Box, y_range

WIDTH, HEIGHT = 960, 600
LEFT, RIGHT = 80, 24
BAND_TOP, BAND_BOTTOM = 70, 380
ERROR_TOP, ERROR_BOTTOM = 410, 520
TAIL_SHARE = 0.06  # of the plot's width, for a tail drawn at each infinite end
BOUNDARY_LIMIT = 2000  # panel ends are drawn as lines up to this many panels, as a rug beyond
TOOLTIP_LIMIT = 5000  # panels described one by one (a <title> each) up to this many

_STYLE = """
svg { font: 13px system-ui, sans-serif; }
.paper { fill: #fbfbf8; } .ink { fill: #1d2433; } .axis { stroke: #59607a; stroke-width: 1; }
.box { fill: #3f7cac; fill-opacity: 0.55; stroke: #23527a; stroke-width: 0.4; }
.box.coarse { fill: #d9822b; stroke: #9a5410; }
.box.envelope { fill: url(#hatch); stroke: #7a3b69; }
.end { stroke: #23527a; stroke-opacity: 0.35; stroke-width: 0.5; }
.error { fill: #7a3b69; fill-opacity: 0.7; }
.muted { fill: #59607a; }
@media (prefers-color-scheme: dark) {
  .paper { fill: #161a22; } .ink { fill: #e7eaf1; } .axis { stroke: #9aa3bd; } .muted { fill: #9aa3bd; }
  .box { fill: #6fa8d6; stroke: #a9d0f0; } .box.coarse { fill: #f0a35b; stroke: #ffd2a6; }
  .end { stroke: #a9d0f0; } .error { fill: #d88fc4; }
}
"""


def render(result: IntegralResult, boxes: Sequence[Box], variable: str, engine: str) -> str:
    """The SVG text of one certified integral's picture."""
    xs = _XScale(boxes)
    y_low, y_high = y_range(boxes)
    ys = _Linear(y_low, y_high, BAND_BOTTOM, BAND_TOP)
    errors = [b.error for b in boxes if b.error > 0 and math.isfinite(b.error)]
    e_low = math.floor(math.log10(min(errors))) if errors else -16
    e_high = math.ceil(math.log10(max(errors))) if errors else 0
    if e_high <= e_low:
        e_high = e_low + 1
    es = _Linear(e_low, e_high, ERROR_BOTTOM, ERROR_TOP)

    parts = [
        (
            f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {WIDTH} {HEIGHT}" width="{WIDTH}" height="{HEIGHT}" '
            'role="img" aria-labelledby="title desc">'
        ),
        f'<title id="title">{escape(_title(result, variable))}</title>',
        f'<desc id="desc">{escape(summary(result, boxes))}</desc>',
        f"<style>{_STYLE}</style>",
        (
            '<defs><pattern id="hatch" width="6" height="6" patternUnits="userSpaceOnUse" '
            'patternTransform="rotate(45)">'
            '<rect width="6" height="6" fill="#7a3b69" fill-opacity="0.15"/>'
            '<line x1="0" y1="0" x2="0" y2="6" stroke="#7a3b69" stroke-width="2"/></pattern></defs>'
        ),
        f'<rect class="paper" width="{WIDTH}" height="{HEIGHT}"/>',
        f'<text class="ink" x="{LEFT}" y="28" font-size="16">{escape(_title(result, variable))}</text>',
        f'<text class="muted" x="{LEFT}" y="50">{escape(_certificate(result))}</text>',
    ]
    parts += _axes(xs, ys, es, y_low, y_high, e_low, e_high, variable)
    parts.append(
        f'<clipPath id="band"><rect x="{LEFT}" y="{BAND_TOP}" width="{WIDTH - LEFT - RIGHT}" '
        f'height="{BAND_BOTTOM - BAND_TOP}"/></clipPath>'
    )
    parts.append('<g class="boxes" clip-path="url(#band)">')
    for b in boxes:
        x0, x1 = xs(b.lower), xs(b.upper)
        width = max(x1 - x0, 0.6)
        kind = " envelope" if b.bound in ENVELOPES else (" coarse" if b.bound in LOW_ORDER else "")
        if b.f_range is None:
            top, bottom = float(BAND_TOP), float(BAND_BOTTOM)
        else:
            top, bottom = ys(b.f_range[1]), ys(b.f_range[0])
        # each panel in words where a reader can hover over it; a large mesh keeps the document light
        tip = f"<title>{escape(_panel_text(b, variable))}</title>" if len(boxes) <= TOOLTIP_LIMIT else ""
        parts.append(
            f'<rect class="box{kind}" x="{x0:.2f}" y="{top:.2f}" width="{width:.2f}" '
            f'height="{max(bottom - top, 0.6):.2f}">{tip}</rect>'
        )
    parts.append("</g>")
    parts += _ends(xs, boxes)
    parts.append('<g class="errors">')
    for b in boxes:
        if b.error > 0 and math.isfinite(b.error):
            x0, top = xs(b.lower), es(math.log10(b.error))
            width = max(xs(b.upper) - x0, 0.6)
            parts.append(
                f'<rect class="error" x="{x0:.2f}" y="{top:.2f}" width="{width:.2f}" '
                f'height="{max(ERROR_BOTTOM - top, 0.6):.2f}"/>'
            )
    parts.append("</g>")
    parts.append(
        f'<text class="muted" x="{LEFT}" y="{HEIGHT - 36}">Boxes: f enclosed over each panel (orange: a lower-order '
        "or range bound; hatched: an envelope next to a singular point or in a tail).</text>"
    )
    parts.append(
        f'<text class="muted" x="{LEFT}" y="{HEIGHT - 16}">{escape(engine)}. The certificate covers the formula '
        "as written; engineering decisions stay with licensed practice and local codes.</text>"
    )
    parts.append("</svg>")
    return "\n".join(parts)


def summary(result: IntegralResult, boxes: Sequence[Box]) -> str:
    """The picture in words, for screen readers and the page's text alternative."""
    coarse = sum(b.bound in LOW_ORDER for b in boxes)
    envelopes = sum(b.bound in ENVELOPES for b in boxes)
    worst = max(boxes, key=lambda b: b.error, default=None)
    low, high = y_range(boxes)
    clipped = sum(b.f_range is not None and (b.f_range[0] < low or b.f_range[1] > high) for b in boxes)
    text = (
        f"{len(boxes)} panels; {coarse} certified by a lower-order or range bound; {envelopes} envelope pieces; "
        f"{clipped} boxes reach beyond the y axis and are cut at its edge. "
        f"The enclosure is [{bound_text(result.enclosure[0], up=False)}, {bound_text(result.enclosure[1], up=True)}]"
        f" with error bound {bound_text(result.error_bound, up=True)}."
    )
    if worst is not None:
        text += (
            f" The largest share of the error, {bound_text(worst.error, up=True)}, comes from the panel "
            f"[{_number(worst.lower, 'down')}, {_number(worst.upper, 'up')}]."
        )
    return text


def _title(result: IntegralResult, variable: str) -> str:
    return f"∫ {result.integrand} d{variable} from {result.lower_limit} to {result.upper_limit}"


def _certificate(result: IntegralResult) -> str:
    met = "certified" if result.tolerance_met else f"not within tolerance ({result.stop_reason})"
    return (
        f"enclosure [{bound_text(result.enclosure[0], up=False)}, {bound_text(result.enclosure[1], up=True)}], "
        f"error bound {bound_text(result.error_bound, up=True)} ({met}), {result.nodes} nodes, {result.panels} panels"
    )


def _panel_text(box: Box, variable: str) -> str:
    """A panel in words, its bounds printed outward."""
    where = f"{variable} in [{_number(box.lower, 'down')}, {_number(box.upper, 'up')}]"
    if box.f_range is None:
        f_text = "f not bounded here"
    else:
        f_text = f"f in [{_number(box.f_range[0], 'down')}, {_number(box.f_range[1], 'up')}]"
    return f"{where}: {f_text}; error share {_number(box.error, 'up')} ({box.bound})"


def _number(value: float, direction: str = "near", digits: int = 6) -> str:
    if math.isinf(value):
        return "inf" if value > 0 else "-inf"
    return shown(value, digits, direction)


class _Linear:
    def __init__(self, low: float, high: float, out_low: float, out_high: float) -> None:
        self.low, self.high, self.out_low, self.out_high = low, high, out_low, out_high

    def __call__(self, value: float) -> float:
        share = (value - self.low) / (self.high - self.low)
        return self.out_low + min(max(share, -0.05), 1.05) * (self.out_high - self.out_low)


class _XScale:
    """Finite x on a linear scale; a tail's infinite end at a band of its own at the edge."""

    def __init__(self, boxes: Sequence[Box]) -> None:
        ends = [v for b in boxes for v in (b.lower, b.upper) if math.isfinite(v)] or [0.0, 1.0]
        self.low, self.high = min(ends), max(ends)
        if not self.high > self.low:
            self.high = self.low + 1
        self.left_tail = any(b.lower == -math.inf for b in boxes)
        self.right_tail = any(b.upper == math.inf for b in boxes)
        span = WIDTH - LEFT - RIGHT
        tail = TAIL_SHARE * span
        self.start = LEFT + (tail if self.left_tail else 0)
        self.stop = WIDTH - RIGHT - (tail if self.right_tail else 0)

    def __call__(self, value: float) -> float:
        if value == -math.inf:
            return float(LEFT)
        if value == math.inf:
            return float(WIDTH - RIGHT)
        return self.start + (value - self.low) / (self.high - self.low) * (self.stop - self.start)


def _axes(
    xs: _XScale, ys: _Linear, es: _Linear, y_low: float, y_high: float, e_low: int, e_high: int, variable: str
) -> list[str]:
    parts = [
        f'<line class="axis" x1="{LEFT}" y1="{BAND_BOTTOM}" x2="{WIDTH - RIGHT}" y2="{BAND_BOTTOM}"/>',
        f'<line class="axis" x1="{LEFT}" y1="{BAND_TOP}" x2="{LEFT}" y2="{BAND_BOTTOM}"/>',
        f'<line class="axis" x1="{LEFT}" y1="{ERROR_BOTTOM}" x2="{WIDTH - RIGHT}" y2="{ERROR_BOTTOM}"/>',
        f'<line class="axis" x1="{LEFT}" y1="{ERROR_TOP}" x2="{LEFT}" y2="{ERROR_BOTTOM}"/>',
        (
            f'<text class="muted" x="{LEFT - 8}" y="{ys(y_high) + 4:.1f}" text-anchor="end">'
            f"{_number(y_high, 'up', 4)}</text>"
        ),
        (
            f'<text class="muted" x="{LEFT - 8}" y="{ys(y_low) + 4:.1f}" text-anchor="end">'
            f"{_number(y_low, 'down', 4)}</text>"
        ),
        f'<text class="muted" x="{LEFT - 8}" y="{ERROR_TOP + 4}" text-anchor="end">1e{e_high}</text>',
        f'<text class="muted" x="{LEFT - 8}" y="{ERROR_BOTTOM + 4}" text-anchor="end">1e{e_low}</text>',
        f'<text class="muted" x="{LEFT}" y="{ERROR_TOP - 6}">error share per panel (log scale)</text>',
        f'<text class="muted" x="{xs.start:.1f}" y="{BAND_BOTTOM + 16}">{_number(xs.low)}</text>',
        f'<text class="muted" x="{xs.stop:.1f}" y="{BAND_BOTTOM + 16}" text-anchor="end">{_number(xs.high)}</text>',
        (
            f'<text class="muted" x="{(xs.start + xs.stop) / 2:.1f}" y="{BAND_BOTTOM + 16}" text-anchor="middle">'
            f"{escape(variable)}</text>"
        ),
    ]
    if xs.left_tail:
        parts.append(f'<text class="muted" x="{LEFT}" y="{BAND_BOTTOM + 16}">−∞</text>')
    if xs.right_tail:
        parts.append(f'<text class="muted" x="{WIDTH - RIGHT}" y="{BAND_BOTTOM + 16}" text-anchor="end">∞</text>')
    return parts


def _ends(xs: _XScale, boxes: Sequence[Box]) -> list[str]:
    """Panel ends: lines through the band when few enough to read, else a rug under the axis."""
    ends = sorted({b.lower for b in boxes} | {b.upper for b in boxes})
    parts = ['<g class="ends">']
    top, bottom = (BAND_TOP, BAND_BOTTOM) if len(boxes) <= BOUNDARY_LIMIT else (BAND_BOTTOM, BAND_BOTTOM + 5)
    path = "".join(f"M{xs(v):.2f} {top}V{bottom}" for v in ends)
    parts.append(f'<path class="end" d="{path}"/>')
    parts.append("</g>")
    return parts
