"""Coordinates for the small line charts the pages draw as inline SVG: a plot area of
`WIDTH` x `HEIGHT` units, x from 0 to its maximum left to right, y from 0 at the foot."""

from collections.abc import Sequence
from typing import Any

WIDTH, HEIGHT = 220.0, 110.0


def points(series: Sequence[tuple[float, float]], x_max: float, y_max: float) -> str:
    """An SVG `points` list of (x, y) pairs scaled to the plot area; nothing past x_max.

    >>> points([(0.0, 1.0), (5.0, 0.5)], 10.0, 1.0)
    '0.0,0.0 110.0,55.0'
    """
    scaled = [
        f"{WIDTH * x / x_max:.1f},{HEIGHT * (1 - min(y, y_max) / y_max):.1f}"
        for x, y in series
        if x <= x_max and y_max > 0
    ]
    return " ".join(scaled)


def steps(series: Sequence[tuple[float, float]], x_max: float) -> list[tuple[float, float]]:
    """A step function's corners up to x_max: each value holds until the next x.

    >>> steps([(0.0, 1.0), (2.0, 0.8), (7.0, 0.0)], 5.0)
    [(0.0, 1.0), (2.0, 1.0), (2.0, 0.8), (5.0, 0.8)]
    """
    shown = [(x, y) for x, y in series if x <= x_max]
    corners: list[tuple[float, float]] = []
    for index, (x, y) in enumerate(shown):
        if index:
            corners.append((x, shown[index - 1][1]))
        corners.append((x, y))
    if shown:
        corners.append((x_max, shown[-1][1]))
    return corners


def band(
    lows: Sequence[tuple[float, float]], highs: Sequence[tuple[float, float]], x_max: float
) -> str:
    """A polygon's `points` enclosing a band: along the highs, back along the lows."""
    return points([*highs, *reversed(lows)], x_max, 1.0)


def survival_chart(group: Any, x_max: float) -> dict[str, str]:
    """The polylines of a group's survival chart: Turnbull steps, Weibull fit, its band."""
    turnbull = [(point.years, point.surviving) for point in group.turnbull]
    fit = [(point.years, point.surviving) for point in group.weibull_curve]
    lows = [(point.years, point.low) for point in group.weibull_curve if point.low is not None]
    highs = [(point.years, point.high) for point in group.weibull_curve if point.high is not None]
    return {
        "steps": points(steps(turnbull, x_max), x_max, 1.0) if turnbull else "",
        "fit": points(fit, x_max, 1.0),
        "band": band(lows, highs, x_max) if lows and highs else "",
    }


def cost_chart(group: Any) -> dict[str, Any]:
    """A group's yearly cost against the test interval, with its least marked."""
    curve = [(point.interval_years, point.yearly_cost) for point in group.cost_curve]
    if not curve:
        return {}
    right = max(x for x, _ in curve)
    top = max(y for _, y in curve)
    least = min(curve, key=lambda point: point[1])
    x, y = points([least], right, top).split(",")
    return {"line": points(curve, right, top), "right": right, "top": top, "cx": x, "cy": y}
