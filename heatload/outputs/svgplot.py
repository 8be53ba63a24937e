"""Static charts as inline SVG text for the printed report.

A report is a deliverable that is printed, mailed and archived: its charts
must open offline with no script and no request to any server, print crisply
at any size and keep the file small.  Inline SVG does all three (a few kB per
chart, against 4.7 MB for an interactive charting library), and the numbers
are printed on the charts themselves.  Only plain SVG 1.1 elements are used;
every text is escaped.  Colours come from :mod:`heatload.outputs.report_assets`.
"""

from __future__ import annotations

import html
import math

import numpy as np

FONT = "system-ui, -apple-system, Segoe UI, Roboto, Arial, sans-serif"
INK = "#1d2430"
MUTED = "#5b6675"
RULE = "#d5dbe3"


def _e(x):
    # XML allows no control characters (a name may carry an ESC or a CR)
    text = "".join(ch if ch.isprintable() else " " for ch in str(x))
    return html.escape(text, quote=True)


def nice_ticks(high, low=0.0, count=5):
    """Round tick values covering [low, high] (1, 2, 2.5, 5 x 10^k steps)."""
    span = max(high - low, 1e-12)
    raw = span / count
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw)
    start = math.floor(low / step) * step
    ticks = []
    v = start
    while v <= high + step * 0.999:
        ticks.append(round(v, 10))
        v += step
    return ticks


def tick_labels(ticks):
    """Tick values with as many decimals as their step needs (0, 2.5, 5 ...)."""
    step = abs(ticks[1] - ticks[0]) if len(ticks) > 1 else 1.0
    d = 0
    while d < 6 and abs(round(step, d) - step) > 1e-9 * max(step, 1e-12):
        d += 1
    return [f"{t:,.{d}f}" for t in ticks]


def fmt(v, digits=3):
    """A number with *digits* significant figures, thousands grouped."""
    if v == 0 or not math.isfinite(v):
        return "0" if v == 0 else "–"
    d = max(0, digits - 1 - int(math.floor(math.log10(abs(v)))))
    return f"{v:,.{d}f}"


def _svg(width, height, body, title):
    # inline SVG in HTML needs no namespace attribute (and the report holds no URL)
    return (f'<svg class="chart" role="img" '
            f'width="{width}" height="{height}" viewBox="0 0 {width} {height}" '
            f'font-family="{_e(FONT)}" font-size="11" fill="{INK}">'
            f"<title>{_e(title)}</title>{body}</svg>")


def _text(x, y, s, anchor="start", size=11, weight="normal", fill=INK, extra=""):
    return (f'<text x="{x:.1f}" y="{y:.1f}" text-anchor="{anchor}" font-size="{size}" '
            f'font-weight="{weight}" fill="{fill}"{extra}>{_e(s)}</text>')


def bar_chart(rows, unit, title, width=680, label_width=170, row_height=26,
              legend=None, note_width=0):
    """Horizontal bars on one scale, each with its value printed.

    Parameters
    ----------
    rows : list of dict
        ``label``; ``segments``: list of (value, colour, opacity); optional
        ``note`` (text after the bar), ``bold`` (label), ``grey`` (label muted).
    unit : str
        Unit of the scale, printed in the axis title.
    legend : list of (text, colour, opacity), optional
    """
    top = 30 + (18 if legend else 0)
    plot_w = width - label_width - 20 - note_width
    totals = [sum(max(v, 0.0) for v, *_ in r["segments"]) for r in rows]
    hi = max(totals + [1e-12])
    ticks = nice_ticks(hi)
    hi = ticks[-1]
    x0 = label_width
    scale = plot_w / hi
    height = top + row_height * len(rows) + 40
    out = [_text(0, 16, title, size=13, weight="600")]
    if legend:
        x = 0
        for text, colour, op in legend:
            out.append(f'<rect x="{x}" y="26" width="11" height="11" fill="{colour}" '
                       f'fill-opacity="{op}"/>')
            out.append(_text(x + 15, 35, text, size=10.5))
            x += 22 + 6.2 * len(text)
    for t, lab in zip(ticks, tick_labels(ticks)):
        x = x0 + t * scale
        out.append(f'<line x1="{x:.1f}" y1="{top - 4}" x2="{x:.1f}" '
                   f'y2="{top + row_height * len(rows)}" stroke="{RULE}" stroke-width="1"/>')
        out.append(_text(x, top + row_height * len(rows) + 14, lab, "middle", 10, fill=MUTED))
    out.append(_text(x0 + plot_w / 2, height - 6, unit, "middle", 11, fill=MUTED))
    for i, (r, tot) in enumerate(zip(rows, totals)):
        y = top + i * row_height
        lab_fill = MUTED if r.get("grey") else INK
        out.append(_text(x0 - 6, y + row_height * 0.62, r["label"], "end", 11,
                         "700" if r.get("bold") else "normal", lab_fill))
        x = x0
        for v, colour, op in r["segments"]:
            w = max(v, 0.0) * scale
            if w > 0:
                out.append(f'<rect x="{x:.1f}" y="{y + 4}" width="{w:.1f}" '
                           f'height="{row_height - 8}" fill="{colour}" fill-opacity="{op}" '
                           f'stroke="#ffffff" stroke-width="0.6"/>')
            x += w
        note = fmt(tot) + (f"  {r['note']}" if r.get("note") else "")
        out.append(_text(x + 4, y + row_height * 0.62, note, size=10.5,
                         fill=MUTED if r.get("grey") else INK))
    return _svg(width, height, "".join(out), title)


def grouped_bars(categories, series, unit, title, width=680, label_width=190,
                 bar_height=11):
    """Grouped horizontal bars on one scale: one group per category, one bar per
    series (``(name, colour, values)``), each value printed at its bar's end."""
    n = len(series)
    group_h = n * bar_height + 8
    top = 48
    plot_w = width - label_width - 70
    hi = max([max(v) for _, _, v in series if len(v)] + [1e-12])
    ticks = nice_ticks(hi)
    hi = ticks[-1]
    scale = plot_w / hi
    height = top + group_h * len(categories) + 40
    out = [_text(0, 16, title, size=13, weight="600")]
    x = 0
    for name, colour, _ in series:
        out.append(f'<rect x="{x}" y="26" width="11" height="11" fill="{colour}"/>')
        out.append(_text(x + 15, 35, name, size=10.5))
        x += 26 + 6.2 * len(name)
    x0 = label_width
    for t, lab in zip(ticks, tick_labels(ticks)):
        xx = x0 + t * scale
        out.append(f'<line x1="{xx:.1f}" y1="{top - 4}" x2="{xx:.1f}" '
                   f'y2="{top + group_h * len(categories)}" stroke="{RULE}"/>')
        out.append(_text(xx, top + group_h * len(categories) + 14, lab, "middle", 10,
                         fill=MUTED))
    out.append(_text(x0 + plot_w / 2, height - 6, unit, "middle", 11, fill=MUTED))
    for i, cat in enumerate(categories):
        y = top + i * group_h
        out.append(_text(x0 - 6, y + group_h / 2 + 3, cat, "end", 11))
        for j, (_, colour, values) in enumerate(series):
            v = max(float(values[i]), 0.0)
            yy = y + 2 + j * bar_height
            w = v * scale
            out.append(f'<rect x="{x0}" y="{yy}" width="{w:.1f}" height="{bar_height - 2}" '
                       f'fill="{colour}"/>')
            out.append(_text(x0 + w + 4, yy + bar_height - 3,
                             fmt(v) if v >= hi * 1e-4 else "0", size=9.5))
    return _svg(width, height, "".join(out), title)


def step_chart(durations, phase_names, panels, title, width=680, panel_height=150):
    """Step lines per phase over one cycle, phase names above.

    Parameters
    ----------
    durations : array_like
        Phase durations [s].
    phase_names : list of str
    panels : list of (axis title with unit, [(name, colour, dash, values per phase)])
    """
    d = np.asarray(durations, float)
    t = np.concatenate([[0.0], np.cumsum(d)])
    total = float(t[-1]) or 1.0
    left, right = 58, 12
    label_h = 90
    top = 24 + label_h
    plot_w = width - left - right
    sx = plot_w / total
    legend_h = 20
    height = top + len(panels) * (panel_height + 16) + 30 + legend_h
    out = [_text(0, 16, title, size=13, weight="600")]
    # phase bands and names (rotated so that short phases keep a readable name)
    for i, name in enumerate(phase_names):
        xa, xb = left + t[i] * sx, left + t[i + 1] * sx
        if i % 2 == 0:
            out.append(f'<rect x="{xa:.1f}" y="{top}" width="{xb - xa:.1f}" '
                       f'height="{len(panels) * (panel_height + 16) - 16}" fill="#f3f5f8"/>')
        xm = (xa + xb) / 2
        out.append(_text(xm + 3, top - 4, f"{i + 1} {name}", size=9.5, fill=MUTED,
                         extra=f' transform="rotate(-55 {xm + 3:.1f} {top - 4:.1f})"'))
    y0 = top
    for axis, lines in panels:
        hi = max([max(v) for *_, v in lines] + [1e-12])
        ticks = nice_ticks(hi)
        hi = ticks[-1]
        sy = panel_height / hi
        for tk, lab in zip(ticks, tick_labels(ticks)):
            y = y0 + panel_height - tk * sy
            out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + plot_w}" y2="{y:.1f}" '
                       f'stroke="{RULE}"/>')
            out.append(_text(left - 4, y + 3, lab, "end", 9.5, fill=MUTED))
        ym = y0 + panel_height / 2
        out.append(_text(12, ym, axis, "middle", 10.5, fill=MUTED,
                         extra=f' transform="rotate(-90 12 {ym:.1f})"'))
        for name, colour, dash, values in lines:
            pts = []
            for i, v in enumerate(values):
                y = y0 + panel_height - max(float(v), 0.0) * sy
                pts.append(f"{left + t[i] * sx:.1f},{y:.1f}")
                pts.append(f"{left + t[i + 1] * sx:.1f},{y:.1f}")
            da = ' stroke-dasharray="5 3"' if dash else ""
            out.append(f'<polyline points="{" ".join(pts)}" fill="none" stroke="{colour}" '
                       f'stroke-width="1.8"{da}/>')
        y0 += panel_height + 16
    xt = nice_ticks(total)
    for tk, lab in zip(xt, tick_labels(xt)):
        if tk > total * 1.001:
            continue
        x = left + tk * sx
        out.append(_text(x, y0 + 2, lab, "middle", 9.5, fill=MUTED))
    out.append(_text(left + plot_w / 2, y0 + 16, "time in the cycle [s]", "middle", 10.5,
                     fill=MUTED))
    x = left
    for name, colour, dash, _ in panels[0][1]:
        da = ' stroke-dasharray="5 3"' if dash else ""
        out.append(f'<line x1="{x}" y1="{y0 + 30}" x2="{x + 18}" y2="{y0 + 30}" '
                   f'stroke="{colour}" stroke-width="2"{da}/>')
        out.append(_text(x + 22, y0 + 34, name, size=10.5))
        x += 40 + 6.2 * len(name)
    return _svg(width, height, "".join(out), title)


def line_chart(curves, x_title, y_title, title, hlines=(), width=680, height=300):
    """Lines (``(name, colour, dash, x, y)``) with optional labelled horizontal
    lines (``(value, text, colour)``)."""
    left, right, top, bottom = 58, 12, 40, 60
    xs = np.concatenate([np.asarray(c[3], float) for c in curves]) if curves else np.zeros(1)
    ys = np.concatenate([np.asarray(c[4], float) for c in curves]) if curves else np.zeros(1)
    yv = list(ys) + [h[0] for h in hlines]
    y_lo, y_hi = float(np.nanmin(yv)), float(np.nanmax(yv))
    yt = nice_ticks(y_hi, y_lo)
    y_lo, y_hi = yt[0], yt[-1]
    xt = nice_ticks(float(np.nanmax(xs)) or 1.0)
    x_hi = xt[-1]
    pw, ph = width - left - right, height - top - bottom
    sx, sy = pw / x_hi, ph / max(y_hi - y_lo, 1e-12)
    out = [_text(0, 16, title, size=13, weight="600")]
    for tk, lab in zip(yt, tick_labels(yt)):
        y = top + ph - (tk - y_lo) * sy
        out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + pw}" y2="{y:.1f}" '
                   f'stroke="{RULE}"/>')
        out.append(_text(left - 4, y + 3, lab, "end", 9.5, fill=MUTED))
    for tk, lab in zip(xt, tick_labels(xt)):
        x = left + tk * sx
        out.append(_text(x, top + ph + 14, lab, "middle", 9.5, fill=MUTED))
    out.append(_text(left + pw / 2, top + ph + 30, x_title, "middle", 10.5, fill=MUTED))
    ym = top + ph / 2
    out.append(_text(12, ym, y_title, "middle", 10.5, fill=MUTED,
                     extra=f' transform="rotate(-90 12 {ym:.1f})"'))
    for value, text, colour in hlines:
        y = top + ph - (value - y_lo) * sy
        out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + pw}" y2="{y:.1f}" '
                   f'stroke="{colour}" stroke-dasharray="2 3"/>')
        out.append(_text(left + 4, y - 3, text, size=9.5, fill=colour))
    for name, colour, dash, x, y in curves:
        x = np.asarray(x, float)
        y = np.asarray(y, float)
        pts = " ".join(f"{left + a * sx:.1f},{top + ph - (b - y_lo) * sy:.1f}"
                       for a, b in zip(x, y))
        da = ' stroke-dasharray="5 3"' if dash else ""
        out.append(f'<polyline points="{pts}" fill="none" stroke="{colour}" '
                   f'stroke-width="1.8"{da}/>')
    x = left
    for name, colour, dash, *_ in curves:
        da = ' stroke-dasharray="5 3"' if dash else ""
        out.append(f'<line x1="{x}" y1="{height - 12}" x2="{x + 18}" y2="{height - 12}" '
                   f'stroke="{colour}" stroke-width="2"{da}/>')
        out.append(_text(x + 22, height - 8, name, size=10.5))
        x += 40 + 6.2 * len(name)
    return _svg(width, height, "".join(out), title)
