"""Acceleration runs: one integrator, strip timing, timed-run reports, performance figures."""
