"""Warnings about how well the logged rpm and speed fit the stated gears.

* ``speed_calibration``: logged rpm and the rpm implied by speed and gear differ by more
  than ``CALIBRATION_NOTICE`` (tire size, tire growth, a speed channel that reads off).
* ``few_samples_match``: fewer than half the moving samples of the pass match a gear
  (wrong ratios or tire, a converter that slips, or a speed channel that is not road
  speed).
* ``wheelspin_suspected``: after the first gear was matched, the engine turns faster than
  the current gear allows at the logged speed (beyond the match tolerance) for at least
  ``SPIN_MIN_S``; with a ground-speed channel (GPS) that is the driven wheels spinning, or
  a slipping clutch or converter.
* ``no_gear_match``: other unmatched stretches longer than ``LONG_UNMATCHED_S`` after the
  first gear was matched.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from core.logs.signal import GearMatch, SampleSegment
from core.notices import Notice

__all__ = ["CALIBRATION_NOTICE", "LONG_UNMATCHED_S", "SPIN_MIN_S", "match_notices"]

FloatArray = NDArray[np.float64]

CALIBRATION_NOTICE = 0.02
SPIN_MIN_S = 0.2  # [s]
LONG_UNMATCHED_S = 1.0  # [s]


def _stretches(mask: NDArray[np.bool_], shortest: int) -> list[tuple[int, int]]:
    """(first, last) of every run of True at least ``shortest`` samples long."""
    padded = np.concatenate(([False], mask, [False])).astype(np.int8)
    edges = np.flatnonzero(np.diff(padded))
    pairs = zip(edges[0::2].tolist(), (edges[1::2] - 1).tolist(), strict=True)
    return [(s, e) for s, e in pairs if e - s + 1 >= shortest]


def match_notices(
    match: GearMatch,
    segments: list[SampleSegment],
    time_s: FloatArray,
    speed_m_s: FloatArray,
    overall_ratios: FloatArray,
    interval_s: float,
) -> list[Notice]:
    """Warnings on calibration, unmatched stretches and suspected wheelspin.

    Parameters
    ----------
    match : GearMatch
        Gear per sample.
    segments : list of SampleSegment
        Segments found from it.
    time_s, speed_m_s : ndarray, shape (n,)
        Times [s] and smoothed speeds [m/s] of the samples.
    overall_ratios : ndarray, shape (g,)
        Overall ratio of each gear.
    interval_s : float
        Sample spacing [s].

    Returns
    -------
    list of Notice
    """
    notes = []
    if abs(match.calibration - 1.0) > CALIBRATION_NOTICE:
        notes.append(
            Notice(
                "speed_calibration",
                f"Logged rpm runs {100.0 * (match.calibration - 1.0):+.1f} % from the rpm the "
                "tire and ratios imply at the logged speed; check the tire size and the speed "
                "channel. Figures are corrected by that factor.",
                "drivetrain.tire",
            )
        )
    moving = ~np.isnan(match.log_ratio)
    matched = match.gear > 0
    if moving.any() and matched.sum() < 0.5 * moving.sum():
        notes.append(
            Notice(
                "few_samples_match",
                f"Only {100.0 * matched.sum() / moving.sum():.0f} % of the moving samples "
                "match a gear: check the gear ratios, final drive and tire, and that the speed "
                "channel is road speed.",
                "drivetrain",
            )
        )
    if not segments:
        return notes
    # gear in use: the last matched gear, carried forward over unmatched samples
    index = np.where(matched, np.arange(matched.size), 0)
    carried = match.gear[np.maximum.accumulate(index)]
    after_first = np.arange(matched.size) >= segments[0].first
    log_gear = np.log(overall_ratios)[np.maximum(carried, 1) - 1]
    unmatched = after_first & ~matched & moving
    spin = unmatched & (np.nan_to_num(match.log_ratio) > log_gear + match.tolerance)
    runs = _stretches(spin, max(round(SPIN_MIN_S / interval_s), 1))
    if runs:
        s, e = runs[0]
        notes.append(
            Notice(
                "wheelspin_suspected",
                f"The engine turns faster than gear {int(carried[s])} allows at the logged "
                f"speed from t = {time_s[s]:.2f} to {time_s[e]:.2f} s"
                + (f" and {len(runs) - 1} more time(s)" if len(runs) > 1 else "")
                + ": wheelspin, or a slipping clutch or converter.",
                "rpm",
            )
        )
    spin_free = unmatched & ~spin & (speed_m_s > 0.0)
    long_runs = _stretches(spin_free, max(round(LONG_UNMATCHED_S / interval_s), 1))
    if long_runs:
        s, e = long_runs[0]
        notes.append(
            Notice(
                "no_gear_match",
                f"No gear matches the rpm-to-speed ratio from t = {time_s[s]:.2f} to "
                f"{time_s[e]:.2f} s"
                + (f" and {len(long_runs) - 1} more time(s)" if len(long_runs) > 1 else "")
                + ": a slow shift, slipping clutch or converter, or ratios that do not fit.",
                "rpm",
            )
        )
    return notes
