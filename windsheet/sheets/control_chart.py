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
    """The chart as SVG text: points, centre line, ±3σ limits and every run-rule signal named.

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

    pts = chart["points"]
    lim = chart["limits"]
    y = [_pct(p["ratio"]) for p in pts]
    x = list(range(1, len(y) + 1))
    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "windsheet", "font.size": FONT_PT,
                                "font.family": "DejaVu Sans"}):
        fig = Figure(figsize=FIGSIZE_IN)
        FigureCanvasSVG(fig)
        ax = fig.add_axes((0.09, 0.42, 0.72, 0.50))
        ax.plot(x, y, marker="o", markersize=3.5, linewidth=0.9, color="black", label="units, in sign-off order")
        ax.set_xlim(0.5, max(len(y), 2) + 0.5)
        for value, name, style in ((lim.get("ucl"), "UCL", "--"), (lim.get("centre"), "CL", "-"),
                                   (lim.get("lcl"), "LCL", "--")):
            if value is None:
                continue
            ax.axhline(_pct(value), linestyle=style, linewidth=0.9, color="#555555")
            ax.annotate(f"{name} {_pct(value):+.2f} %", xy=(1.0, _pct(value)), xycoords=("axes fraction", "data"),
                        xytext=(4, 0), textcoords="offset points", va="center", fontsize=FONT_PT)
        markers = ("s", "D", "^")
        for k, sig in enumerate(chart.get("signals") or []):
            ax.plot([x[i] for i in sig["points"]], [y[i] for i in sig["points"]], linestyle="none",
                    marker=markers[k % 3], markersize=8, markerfacecolor="none", markeredgecolor="#b00000",
                    markeredgewidth=1.3, label=sig["rule"])
        ax.set_title(title, fontsize=FONT_PT + 1, loc="left")
        ax.set_ylabel(ylabel)
        ax.set_xlabel("unit")
        ax.grid(True, linewidth=0.3, color="#cccccc")
        ax.legend(loc="upper left", bbox_to_anchor=(-0.02, -0.2), fontsize=FONT_PT - 1, frameon=False, ncol=2)
        found = "; ".join(f"{s['rule']} at unit {', '.join(str(i + 1) for i in s['points'])}"
                          for s in chart.get("signals") or []) or "none"
        fig.text(0.09, 0.02, f"Limits ±3σ, {chart['sigma_estimate']}. Rules checked: "
                 f"{'; '.join(chart['rules'])}. Signals: {found}.", fontsize=FONT_PT - 1.5, wrap=True)
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
