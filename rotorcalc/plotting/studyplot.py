"""Pictures of an uncertainty study (:mod:`rotorcalc.analysis.study`): each critical speed's
distribution over the samples against the operating range, the probability of failure by
kind with its interval, and each input's influence."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..units import to_rpm
from ..vocabulary import CAUTION
from . import _style as st
from ._artists import Artists


@dataclass(frozen=True)
class StudyArtists(Artists):
    """What a study picture drew (and ``figure``, ``ax``, ``legend``): ``parts`` the
    histograms or bars, one per critical, kind or input; ``caution_text``."""

    parts: list = None
    caution_text: object = None


def _caution(ax):
    return ax.annotate(CAUTION, xy=(0.0, 0.0), xycoords="axes fraction", xytext=(0, -40),
                       textcoords="offset points", ha="left", va="top",
                       fontsize=st.FONT_NOTE, color=st.MUTED, annotation_clip=False)


@st.literal_text
def plot_study_criticals(result, operating, *, ax=None):
    """Histogram of each critical speed over the samples (rpm), the operating range shaded
    and trip dashed."""
    fig, ax, created = st.axes_for(ax, figsize=(9.0, 4.8))
    if created:
        fig.subplots_adjust(left=0.09, right=0.97, bottom=0.22, top=0.88)
    st.style_axes(ax)
    valid = result.independent
    ax.axvspan(to_rpm(operating.min_speed), to_rpm(operating.max_speed),
               color=st.BAND_FILL, zorder=0, label="operating range")
    if operating.trip_speed:
        ax.axvline(to_rpm(operating.trip_speed), color=st.BAND_EDGE, linestyle=st.TRIP_DASH,
                   linewidth=1.0, label="trip speed")
    parts = []
    for j, crit in enumerate(result.base):
        speeds = np.array([r["criticals"][str(j)]["speed_rpm"] for r in valid
                           if str(j) in r["criticals"]])
        if not len(speeds):
            continue
        colour = st.SERIES_COLOURS[j % len(st.SERIES_COLOURS)]
        _, _, bars = ax.hist(speeds, bins=30, histtype="stepfilled", alpha=0.35, color=colour,
                             edgecolor=colour, linewidth=1.2,
                             label=f"critical {j + 1} ({to_rpm(crit.speed):.0f} rpm "
                                   f"{crit.whirl}), {len(speeds)} samples")
        parts.append(bars)
    st.label_axes(ax, "Critical speed (rpm)", "Samples",
                  f"Critical speeds over {len(valid)} samples")
    legend = ax.legend(loc="upper right", fontsize=st.FONT_NOTE + 0.5, frameon=False)
    return StudyArtists(figure=fig, ax=ax, legend=legend, parts=parts,
                        caution_text=_caution(ax))


@st.literal_text
def plot_study_probability(result, operating=None, *, ax=None):
    """The probability of each kind of failure (and of each critical failing its margin),
    with its confidence interval."""
    shown = [p for p in result.probabilities]
    fig, ax, created = st.axes_for(ax, figsize=(9.0, 0.9 + 0.38 * len(shown)))
    if created:
        fig.subplots_adjust(left=0.42, right=0.95, bottom=0.22, top=0.9)
    st.style_axes(ax)
    y = np.arange(len(shown))[::-1]
    est = np.array([p.estimate for p in shown]) * 100
    low = np.array([p.interval[0] for p in shown]) * 100
    high = np.array([p.interval[1] for p in shown]) * 100
    bars = ax.barh(y, est, color=[st.SOURCE if e > 0 else st.FAINT for e in est], height=0.6)
    ax.errorbar(est, y, xerr=[est - low, high - est], fmt="o", color=st.INK, ecolor=st.INK,
                markersize=4, capsize=3, linewidth=1.0)
    ax.set_yticks(y, [p.what for p in shown], fontsize=st.FONT_TICK)
    ax.set_xlim(0, max(5.0, float(high.max()) * 1.15))
    st.label_axes(ax, f"Probability of failure (%), {result.plan.confidence:.0%} interval",
                  None, f"Probability of failure over {shown[0].trials} samples")
    return StudyArtists(figure=fig, ax=ax, parts=list(bars), caution_text=_caution(ax))


@st.literal_text
def plot_study_influence(result, operating=None, *, ax=None):
    """Each input's influence on the smallest margin excess and the lowest log decrement
    (bars per input): the Sobol total indices with their intervals when the study has
    them, else the rank correlations."""
    outputs = ["margin excess %", "lowest log dec"]
    names = [u.name for u in result.plan.inputs]
    fig, ax, created = st.axes_for(ax, figsize=(9.0, 1.2 + 0.45 * len(names)))
    if created:
        fig.subplots_adjust(left=0.3, right=0.95, bottom=0.2, top=0.88)
    st.style_axes(ax)
    y = np.arange(len(names))[::-1]
    parts = []
    sobol = any(result.sobol.get(o) is not None for o in outputs)
    top = 1.0      # a total index's estimate (or interval) may pass 1 by sampling error
    for k, output in enumerate(outputs):
        at = y + (0.2 if k == 0 else -0.2)
        if sobol:
            ix = result.sobol.get(output)
            if ix is None:
                continue
            parts.append(ax.barh(at, np.clip(ix.total, 0, None), height=0.38,
                                 color=st.ITEM_COLOURS[k], label=output))
            low, high = ix.total_interval[:, 0], ix.total_interval[:, 1]
            top = max(top, float(np.nanmax(high)))
            ax.errorbar(ix.total, at, xerr=[np.clip(ix.total - low, 0, None),
                                            np.clip(high - ix.total, 0, None)],
                        fmt="none", ecolor=st.INK, capsize=2, linewidth=0.8)
            continue
        row = result.influence.get(output, {})
        rho = np.array([np.nan if row.get(n) is None else row[n] for n in names])
        parts.append(ax.barh(at, np.nan_to_num(rho), height=0.38,
                             color=st.ITEM_COLOURS[k], label=output))
    ax.axvline(0.0, color=st.MUTED, linewidth=0.8)
    ax.set_xlim((-0.02, 1.05 * top) if sobol else (-1.05, 1.05))
    ax.set_yticks(y, names, fontsize=st.FONT_TICK)
    st.label_axes(ax, "Sobol total index (share of the variance), bootstrap interval"
                  if sobol else "Spearman rank correlation", None, "Influence of each input")
    legend = ax.legend(loc="lower right", bbox_to_anchor=(1.0, 1.0), ncol=2,
                       fontsize=st.FONT_NOTE + 0.5, frameon=False)
    return StudyArtists(figure=fig, ax=ax, legend=legend, parts=parts,
                        caution_text=_caution(ax))
