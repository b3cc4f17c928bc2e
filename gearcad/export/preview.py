"""preview.png: the plate with every gear in place, to scale (matplotlib, no display needed)."""

from __future__ import annotations

import os
from pathlib import Path

from .atomic import atomic_write

__all__ = ["write_preview"]

LAYER_COLOURS = ("#1f5fa8", "#c0392b", "#1e8449", "#8e44ad", "#b9770e", "#117a65")


def write_preview(scene, path: str | os.PathLike[str], dpi: int = 110) -> Path:
    """Draw ``scene`` (a :class:`gearcad.export.cutting.Scene`) to a PNG file at ``path``."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt
    from matplotlib.patches import Circle, Polygon

    import numpy as np

    span = np.ptp(scene.plate, axis=0)
    fig, ax = plt.subplots(figsize=(8, 8 * max(span[1], 1) / max(span[0], 1) + 0.8))
    try:
        ax.add_patch(Polygon(scene.plate, closed=True, facecolor="#f4f1ea", edgecolor="#555555", linewidth=1.0))
        for x, y, d in scene.holes:
            ax.add_patch(Circle((x, y), d / 2, facecolor="white", edgecolor="#555555", linewidth=0.6))
        holes_of = scene.gear_holes or tuple(() for _ in scene.gears)
        order = sorted(range(len(scene.gears)), key=lambda i: not holes_of[i])  # rings first, gears on top
        for i in order:
            name, layer, outline, (cx, cy), tip = scene.gears[i]
            colour = LAYER_COLOURS[layer % len(LAYER_COLOURS)]
            ax.add_patch(Polygon(outline, closed=True, facecolor=colour, alpha=0.18, edgecolor=colour, linewidth=0.6))
            for hole in holes_of[i]:
                ax.add_patch(Polygon(hole, closed=True, facecolor="#f4f1ea", edgecolor=colour, linewidth=0.5))
            at = (cx, cy - 0.55 * tip) if not holes_of[i] else (cx, cy - 0.93 * tip)
            ax.annotate(name, at, ha="center", va="center", fontsize=7, color=colour)
        for (x0, y0), (x1, y1) in scene.links:
            ax.plot([x0, x1], [y0, y1], color="#333333", linewidth=0.6, linestyle="--")
        ax.set_aspect("equal")
        ax.autoscale_view()
        ax.set_xlabel("x, mm (plate coordinates)")
        ax.set_ylabel("y, mm")
        ax.set_title(scene.title + "\ndashed: meshing centre lines; colour: layer", fontsize=9)
        ax.grid(True, linewidth=0.3, alpha=0.5)
        return atomic_write(path, lambda tmp: fig.savefig(tmp, dpi=dpi, format="png", metadata={"Software": None}))
    finally:
        plt.close(fig)
