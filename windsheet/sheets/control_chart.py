"""The individuals control chart of one QC line, drawn with matplotlib as SVG.

It draws what :func:`windsheet.qc.qc_stats.line_chart` returns (points, centre,
limits, signals) and computes nothing itself.  matplotlib is imported here
only, when a chart is drawn: the rest of windsheet starts without it.
"""

from __future__ import annotations

import io

#: Printed size: fits the text width of A4 and letter at 1:1, so 9 pt type prints at 9 pt.
FIGSIZE_IN = (7.0, 3.8)
FONT_PT = 9


def _pct(r):
    return None if r is None else (r - 1.0) * 100.0


def control_chart_svg(chart: dict, title: str, ylabel: str = "measured / predicted − 1 [%]") -> str:
    """The chart as SVG text: points, centre line, the shaded ±3σ band and every run-rule signal named.

    The look is windsheet's own: the band between the limits shaded, the limits
    named in the legend (not at the plot's edge), each signal marked with the
    number of the rule it breaks, failed units drawn as crosses that move
    nothing, whole-number unit ticks and a title that wraps rather than clips.

    Parameters
    ----------
    chart : dict
        From :func:`windsheet.qc.qc_stats.line_chart`: ``points`` (``ratio``,
        ``serial``), ``limits`` (``centre``, ``ucl``, ``lcl``, ``sigma``),
        ``signals`` (``rule``, ``points``), ``rules`` and ``sigma_estimate``.
    title : str
        The chart's heading (family and QC line).

    Returns
    -------
    svg : str
        A standalone SVG document; text stays text (searchable, sharp at any scale).
    """
    import matplotlib  # noqa: deferred: only charts need it
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure

    import textwrap

    from matplotlib.ticker import MaxNLocator

    pts = chart["points"]
    lim = chart["limits"]
    y = [_pct(p["ratio"]) for p in pts]
    x = list(range(1, len(y) + 1))
    excluded = set(chart.get("excluded") or [])
    kept = [i for i in range(len(y)) if i not in excluded]
    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "windsheet", "font.size": FONT_PT,
                                "font.family": "DejaVu Sans"}):
        fig = Figure(figsize=FIGSIZE_IN)
        FigureCanvasSVG(fig)
        ax = fig.add_axes((0.09, 0.40, 0.88, 0.46))
        ax.set_xlim(0.5, max(len(y), 2) + 0.5)
        # The band between the limits is shaded; each limit is named in the legend with its value.
        if lim.get("ucl") is not None:
            ax.axhspan(_pct(lim["lcl"]), _pct(lim["ucl"]), color="#e8eef5", zorder=0,
                       label=f"±3σ band: UCL {_pct(lim['ucl']):+.2f} %, LCL {_pct(lim['lcl']):+.2f} %")
            for value in (lim["ucl"], lim["lcl"]):
                ax.axhline(_pct(value), linestyle=(0, (4, 2)), linewidth=0.8, color="#4a6f94", zorder=1)
        if lim.get("centre") is not None:
            ax.axhline(_pct(lim["centre"]), linestyle="-", linewidth=1.0, color="#4a6f94", zorder=1,
                       label=f"CL {_pct(lim['centre']):+.2f} % (mean of the units that passed)")
        ax.plot([x[i] for i in kept], [y[i] for i in kept], marker="o", markersize=3.2, linewidth=0.8,
                color="black", zorder=3, label="units that passed, in sign-off order")
        if excluded:
            ax.plot([x[i] for i in sorted(excluded)], [y[i] for i in sorted(excluded)], linestyle="none",
                    marker="x", markersize=6, markeredgewidth=1.4, color="#7a1f1f", zorder=3,
                    label="failed or incomplete (not in the limits)")
        # Each signal is marked by the number of the rule it breaks, written beside the point.
        for sig in chart.get("signals") or []:
            number = sig["rule"].split(":")[0].replace("Rule ", "")
            for i in sig["points"]:
                ax.annotate(number, xy=(x[i], y[i]), xytext=(0, 6), textcoords="offset points", ha="center",
                            fontsize=FONT_PT, fontweight="bold", color="#7a1f1f", zorder=4)
        ax.xaxis.set_major_locator(MaxNLocator(integer=True))
        ax.set_title("\n".join(textwrap.wrap(title, 95)), fontsize=FONT_PT + 1, loc="left")
        ax.set_ylabel(ylabel)
        ax.set_xlabel("unit")
        ax.grid(True, axis="y", linewidth=0.3, color="#cccccc")
        ax.legend(loc="upper left", bbox_to_anchor=(-0.02, -0.2), fontsize=FONT_PT - 1, frameon=False, ncol=2)
        found = "; ".join(f"{s['rule']} at unit {', '.join(str(i + 1) for i in s['points'])}"
                          for s in chart.get("signals") or []) or "none"
        fig.text(0.09, 0.02, f"Limits ±3σ, {chart['sigma_estimate']}. Rules checked: "
                 f"{'; '.join(chart['rules'])}. Signals (numbered by rule on the chart): {found}.",
                 fontsize=FONT_PT - 1.5, wrap=True)
        buf = io.StringIO()
        fig.savefig(buf, format="svg", metadata={"Date": None})
    return buf.getvalue()


def report_charts(report: dict) -> dict:
    """SVG of every charted line of a QC report: ``{(family key, line key): svg}``."""
    out = {}
    for fam in report["families"]:
        for line in fam["lines"]:
            if line["key"] in report["chart_lines"] and line["chart"]["limits"]["n"] >= 2:
                out[(fam["key"], line["key"])] = control_chart_svg(line["chart"], f"{fam['label']}: {line['item']}")
    return out
