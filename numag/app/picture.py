"""Pictures of family results as small self-contained SVG files (no plotting library needed).

* a sweep over one parameter: the number of real solutions against the parameter (a step line), the
  values where J_x drops rank marked;
* a discriminant of one parameter: the parameter line with the real discriminant points and each region
  labelled with its real count; of two parameters: the cells (line, interval) coloured by their count,
  the real discriminant points on the lines, and (when traced) the real discriminant curve with its cusps
  and nodes and each cell's region of the plane.

Examples
--------
>>> svg = _document(200, 100, ['<circle cx="1" cy="1" r="1"/>'])
>>> svg.startswith('<svg') and svg.endswith('</svg>\\n')
True
"""

import math
from xml.sax.saxutils import escape

import numpy as np

from ..system.display import short_number

__all__ = ["sweep_svg", "discriminant_svg"]

_WIDTH, _HEIGHT, _MARGIN = 720, 360, 56
_COLOURS = ["#f2f0f7", "#cbc9e2", "#9e9ac8", "#756bb1", "#54278f", "#3f007d"]


def _document(width, height, items):
    body = "\n".join(items)
    return (f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
            f'viewBox="0 0 {width} {height}" font-family="sans-serif" font-size="12">\n{body}\n</svg>\n')


def _text(x, y, words, anchor="middle", size=12):
    return f'<text x="{x:.1f}" y="{y:.1f}" text-anchor="{anchor}" font-size="{size}">{escape(str(words))}</text>'


def _scale(low, high, start, stop):
    span = (high - low) or 1.0
    return lambda v: start + (v - low) / span * (stop - start)


def sweep_svg(result):
    """The real solutions of a one-parameter sweep against the parameter (SVG text)."""
    values = np.array([complex(m.parameters[0]).real for m in result.values])
    counts = result.real_counts()
    order = np.argsort(values)
    values, counts = values[order], counts[order]
    top = max(1, int(counts.max(initial=0)))
    x = _scale(values.min(), values.max(), _MARGIN, _WIDTH - _MARGIN / 2)
    y = _scale(0, top, _HEIGHT - _MARGIN, _MARGIN / 2)
    points = []
    for k, (v, c) in enumerate(zip(values, counts)):
        if k:
            points.append(f"{x(v):.1f},{y(counts[k - 1]):.1f}")
        points.append(f"{x(v):.1f},{y(c):.1f}")
    items = [f'<polyline fill="none" stroke="#3f007d" stroke-width="2" points="{" ".join(points)}"/>']
    for member in result.values:
        if len(member.rank_drops):
            v = complex(member.parameters[0]).real
            items.append(f'<line x1="{x(v):.1f}" x2="{x(v):.1f}" y1="{_MARGIN / 2}" y2="{_HEIGHT - _MARGIN}" '
                         'stroke="#d95f02" stroke-dasharray="4 3"/>')
    items += _axes(values.min(), values.max(), top, x, y, result.parameters[0], "real solutions")
    items.append(_text(_WIDTH / 2, 16, f"sweep over {result.parameters[0]}: real solutions (dashed: J_x drops rank)"))
    return _document(_WIDTH, _HEIGHT, items)


def _axes(low, high, top, x, y, x_label, y_label):
    items = [f'<line x1="{_MARGIN}" x2="{_WIDTH - _MARGIN / 2}" y1="{_HEIGHT - _MARGIN}" y2="{_HEIGHT - _MARGIN}" '
             'stroke="black"/>',
             f'<line x1="{_MARGIN}" x2="{_MARGIN}" y1="{_MARGIN / 2}" y2="{_HEIGHT - _MARGIN}" stroke="black"/>']
    for tick in np.linspace(low, high, 6):
        items.append(_text(x(tick), _HEIGHT - _MARGIN + 16, f"{tick:.4g}"))
    for tick in range(0, top + 1, max(1, top // 6)):
        items.append(_text(_MARGIN - 6, y(tick) + 4, tick, anchor="end"))
    items.append(_text(_WIDTH / 2, _HEIGHT - 14, x_label))
    items.append(f'<text x="14" y="{_HEIGHT / 2}" transform="rotate(-90 14 {_HEIGHT / 2})" '
                 f'text-anchor="middle">{escape(y_label)}</text>')
    return items


def _count(region):
    count = region.count
    if count.solutions is not None:
        return count.solutions, "real solutions"
    if count.branches is not None:
        return count.branches, "real branches"
    return None, "not counted"


def discriminant_svg(result, floor=None):
    """The regions of a discriminant with their real counts (SVG text); one or two parameters.

    ``floor``: discriminant points of one parameter at most this far from 0 are labelled 0, as in the text
    report (a point at 0 computes as 1e-17 or so; labelled as it is, it would read as a value).

    Examples
    --------
    >>> from numag.families.discriminant import Discriminant
    >>> result = Discriminant(("x",), ("b",), [], 1, [], np.array([-3.9e-17, 1.0]), [], {}, [], 1, 0.0)
    >>> [label in discriminant_svg(result, floor=1e-14) for label in (">0<", ">1<", "e-17")]
    [True, True, False]
    """
    if len(result.parameters) == 1:
        return _line_svg(result, floor or 0.0)
    return _cells_svg(result)


def _finite_bounds(regions, points):
    finite = [v for r in regions for v in (r.low, r.high) if not math.isinf(v)] + list(points)
    finite += [float(r.sample[-1]) for r in regions]
    low, high = (min(finite), max(finite)) if finite else (-1.0, 1.0)
    pad = max(1.0, (high - low) * 0.08)
    return low - pad, high + pad


def _line_svg(result, floor):
    low, high = _finite_bounds(result.regions, result.real_points)
    x = _scale(low, high, _MARGIN, _WIDTH - _MARGIN)
    middle = _HEIGHT / 2
    items = [_text(_WIDTH / 2, 20, f"discriminant of {result.parameters[0]}: regions and their real counts"),
             f'<line x1="{_MARGIN}" x2="{_WIDTH - _MARGIN}" y1="{middle}" y2="{middle}" stroke="black"/>']
    top = max([_count(r)[0] or 0 for r in result.regions] + [1])
    for region in result.regions:
        left, right = x(max(region.low, low)), x(min(region.high, high))
        value, what = _count(region)
        colour = _COLOURS[min(len(_COLOURS) - 1, int((value or 0) * (len(_COLOURS) - 1) / top))]
        items.append(f'<rect x="{left:.1f}" y="{middle - 30}" width="{max(right - left, 0.5):.1f}" height="30" '
                     f'fill="{colour}" stroke="white"/>')
        items.append(_text((left + right) / 2, middle - 36, "?" if value is None else value))
        if region is result.regions[0]:
            items.append(_text(_MARGIN, middle - 60, f"numbers: {what}", anchor="start"))
    for point in result.real_points:
        items.append(f'<circle cx="{x(point):.1f}" cy="{middle}" r="4" fill="#d95f02"/>')
        items.append(_text(x(point), middle + 20, short_number(point, floor), size=10))
    items.append(_text(_WIDTH / 2, _HEIGHT - 14, f"{result.parameters[0]} (dots: real discriminant points)"))
    return _document(_WIDTH, _HEIGHT, items)


def _cells_svg(result):
    lines = sorted({r.line for r in result.regions})
    if not lines:
        return _document(_WIDTH, _HEIGHT, [_text(_WIDTH / 2, _HEIGHT / 2, "no regions were computed")])
    low, high = _finite_bounds(result.regions, [])
    step = (lines[-1] - lines[0]) / max(len(lines) - 1, 1) if len(lines) > 1 else 1.0
    x = _scale(lines[0] - step / 2, lines[-1] + step / 2, _MARGIN, _WIDTH - _MARGIN / 2)
    y = _scale(low, high, _HEIGHT - _MARGIN, _MARGIN / 2)
    top = max([_count(r)[0] or 0 for r in result.regions] + [1])
    items = []
    region_of = {cell: number for number, region in enumerate(result.plane_regions, 1) for cell in region.cells}
    for index, region in enumerate(result.regions):
        value, _ = _count(region)
        colour = _COLOURS[min(len(_COLOURS) - 1, int((value or 0) * (len(_COLOURS) - 1) / top))]
        left, right = x(region.line - step / 2), x(region.line + step / 2)
        bottom, upper = y(max(region.low, low)), y(min(region.high, high))
        items.append(f'<rect x="{left:.1f}" y="{upper:.1f}" width="{right - left:.1f}" height="{bottom - upper:.1f}" '
                     f'fill="{colour}" stroke="white"/>')
        label = "?" if value is None else str(value)
        if index in region_of:
            label += f" (R{region_of[index]})"
        items.append(_text((left + right) / 2, (bottom + upper) / 2 + 4, label))
        for edge in (region.low, region.high):
            if not math.isinf(edge):
                items.append(f'<circle cx="{x(region.line):.1f}" cy="{y(edge):.1f}" r="3" fill="#d95f02"/>')
    if result.curve is not None:
        items += _curve_items(result.curve, x, y)
    for line in lines:
        items.append(_text(x(line), _HEIGHT - _MARGIN + 16, f"{line:.4g}"))
    for tick in np.linspace(low, high, 6):
        items.append(_text(_MARGIN - 6, y(tick) + 4, f"{tick:.3g}", anchor="end"))
    items.append(_text(_WIDTH / 2, _HEIGHT - 14, result.parameters[0]))
    items.append(f'<text x="14" y="{_HEIGHT / 2}" transform="rotate(-90 14 {_HEIGHT / 2})" '
                 f'text-anchor="middle">{escape(result.parameters[1])}</text>')
    title = (f"cells on lines {result.parameters[0]} = const: real counts (Rk: region of the plane; curve: the "
             "real discriminant; triangles: cusps, squares: nodes)" if result.curve is not None else
             f"cells on lines {result.parameters[0]} = const: real counts (dots: real discriminant points)")
    items.append(_text(_WIDTH / 2, 16, title, size=11))
    return _document(_WIDTH, _HEIGHT, items)


def _curve_items(curve, x, y):
    """The traced real discriminant curve (clipped to the picture's frame), its cusps and nodes."""
    left, right = sorted((x(curve.box[0][0]), x(curve.box[1][0])))
    top, bottom = sorted((y(curve.box[1][1]), y(curve.box[0][1])))
    items = [f'<clipPath id="frame"><rect x="{min(left, _MARGIN):.1f}" y="{_MARGIN / 2:.1f}" '
             f'width="{max(right, _WIDTH - _MARGIN / 2) - min(left, _MARGIN):.1f}" '
             f'height="{_HEIGHT - 1.5 * _MARGIN:.1f}"/></clipPath>']
    for arc in curve.arcs:
        points = " ".join(f"{x(p):.1f},{y(q):.1f}" for p, q in arc)
        items.append(f'<polyline clip-path="url(#frame)" fill="none" stroke="#d95f02" stroke-width="1.5" '
                     f'points="{points}"/>')
    for special in curve.special:
        cx, cy = x(special.point[0]), y(special.point[1])
        if special.kind.value == "cusp":
            items.append(f'<polygon points="{cx:.1f},{cy - 6:.1f} {cx - 5:.1f},{cy + 4:.1f} {cx + 5:.1f},{cy + 4:.1f}" '
                         'fill="#1b9e77"/>')
        elif special.kind.value == "undecided":  # hollow: not confirmed
            items.append(f'<rect x="{cx - 4:.1f}" y="{cy - 4:.1f}" width="8" height="8" fill="none" '
                         'stroke="#1b9e77"/>')
        else:
            items.append(f'<rect x="{cx - 4:.1f}" y="{cy - 4:.1f}" width="8" height="8" fill="#1b9e77"/>')
    return items
