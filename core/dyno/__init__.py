"""Dyno exports: columns, numbers, rows and speed-based files turned into torque curves."""
