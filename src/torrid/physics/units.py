"""Unit conventions shared by every layer: timescales are given in days of 86400 s."""

SECONDS_PER_DAY = 86400.0
