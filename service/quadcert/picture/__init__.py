"""How a certificate was earned, drawn: f enclosed over every panel, the panel ends, and each panel's share of
the error bound. :func:`boxes` computes the picture's data (certified like the integral), :func:`render_svg`
draws it for reports; the page at ``/`` draws the same data in the browser."""

from ._boxes import ENVELOPES, LOW_ORDER, Box, boxes, y_range
from ._svg import render as render_svg
from ._svg import summary

__all__ = ["ENVELOPES", "LOW_ORDER", "Box", "boxes", "render_svg", "summary", "y_range"]
