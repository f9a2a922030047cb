"""Colour pairs of the stylesheet meet WCAG 2.1 AA contrast (4.5:1 for text).

Source: WCAG 2.1, success criterion 1.4.3, with relative luminance and contrast ratio as
defined in its glossary (sRGB, L = 0.2126 R + 0.7152 G + 0.0722 B).
"""

import re
from pathlib import Path

import pytest

CSS = (Path(__file__).resolve().parents[2] / "static" / "traptally.css").read_text()
COLOURS = dict(re.findall(r"--([a-z-]+):\s*(#[0-9a-fA-F]{6})", CSS))


def _channel(value: int) -> float:
    share = value / 255
    return share / 12.92 if share <= 0.03928 else ((share + 0.055) / 1.055) ** 2.4


def _luminance(colour: str) -> float:
    red, green, blue = (int(colour[i : i + 2], 16) for i in (1, 3, 5))
    return 0.2126 * _channel(red) + 0.7152 * _channel(green) + 0.0722 * _channel(blue)


def contrast(foreground: str, background: str) -> float:
    lighter, darker = sorted((_luminance(foreground), _luminance(background)), reverse=True)
    return (lighter + 0.05) / (darker + 0.05)


def test_the_formula_matches_wcag_extremes() -> None:
    assert contrast("#000000", "#ffffff") == pytest.approx(21.0)
    assert contrast("#777777", "#ffffff") == pytest.approx(4.48, abs=0.01)


@pytest.mark.parametrize(
    ("foreground", "background"),
    [
        ("--ink", "--paper"),
        ("--ink", "--wash"),
        ("--muted", "--paper"),
        ("--muted", "--wash"),
        ("--accent", "--paper"),
        ("--accent-ink", "--accent"),
        ("--bad", "--paper"),
        ("--ok", "--paper"),
        ("--warn", "--paper"),
    ],
)
def test_text_colours_meet_aa(foreground: str, background: str) -> None:
    pair = COLOURS[foreground.lstrip("-")], COLOURS[background.lstrip("-")]
    assert contrast(*pair) >= 4.5, (foreground, background, round(contrast(*pair), 2))


@pytest.mark.parametrize(
    ("foreground", "background"),
    [
        ("#a3221b", "#fbeceb"),
        ("#1d2327", "#e9f4ec"),
        ("#1d2327", "#fdf3e6"),
        ("#ffffff", "#1d2327"),
    ],
    ids=["error-summary", "saved-banner", "notice", "top-bar"],
)
def test_banners_meet_aa(foreground: str, background: str) -> None:
    assert contrast(foreground, background) >= 4.5
