"""The words of the headline numbers, shared by the printed lines and the plot legends, so
that both report the same, stated quantity: the final value (the time mean over the run's
averaging window), or "undefined" with the reason where the map is too flat for a hotspot."""

from __future__ import annotations

import math


def window_phrase(attrs: dict) -> str:
    """"mean over days 80-87.5", or "last output, day 30" (a run shorter than its window)."""
    length = attrs.get("averaging_window_days")
    end = attrs.get("averaging_end_days")
    if length is None or end is None:
        return "final value"
    if not length:
        return f"last output, day {end:g}"
    return f"mean over days {end - length:g}-{end:g}"


def hotspot_phrase(attrs: dict, with_harmonic: bool = True) -> str:
    """The final hotspot offsets of a run in words: "hotspot +42.1 deg (equatorial maximum;
    first harmonic +40.0; mean over days 80-87.5)", or "hotspot undefined (longitudinal
    contrast 0.0071 below 0.01 ...)"."""
    offset = float(attrs.get("final_hotspot_offset", math.nan))
    if not math.isfinite(offset):
        reason = attrs.get("hotspot_offset_reason", "the equatorial thickness is flat")
        return f"hotspot undefined ({reason})"
    harmonic = float(attrs.get("final_hotspot_offset_harmonic", math.nan))
    parts = ["equatorial maximum"]
    if with_harmonic:
        parts.append(f"first harmonic {harmonic:+.1f}" if math.isfinite(harmonic)
                     else "first harmonic undefined")
    parts.append(window_phrase(attrs))
    return f"hotspot {offset:+.1f} deg ({'; '.join(parts)})"
