"""Logged passes: reading logger exports, signals, and the verdict on each shift."""
