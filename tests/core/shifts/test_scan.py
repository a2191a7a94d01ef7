"""A plain scan read from its signs alone gives what the full reading gives."""

from __future__ import annotations

import numpy as np

from core.shifts.scan import UNIT_SCAN, found_cut, found_plain, is_plain


def test_plain_scan_read_from_signs_equals_the_cut_scan() -> None:
    # invented wavy efforts crossing a few times per row, some rows close to each other;
    # wherever the scan is plain, both readings find the same crossings and counts
    rng = np.random.default_rng(11)
    plain = 0
    for _ in range(200):
        p = int(rng.integers(1, 8))
        lo = rng.uniform(1000.0, 3000.0, p)
        hi = lo + rng.uniform(500.0, 5000.0, p)
        span = hi - lo
        grid = lo[:, None] + span[:, None] * UNIT_SCAN
        phase = rng.uniform(0.0, 6.0, (p, 1))
        e_cur = 5000.0 + 3000.0 * np.sin(grid / rng.uniform(300.0, 3000.0) + phase)
        e_next = e_cur * (1.0 + rng.uniform(-0.05, 0.05) * np.cos(grid / 700.0 + phase))
        diff = e_cur - e_next
        scale = np.maximum(np.abs(e_cur).max(axis=1), np.abs(e_next).max(axis=1))
        valid = np.ones(p, dtype=bool)
        if not is_plain(grid, diff, (valid, span), scale):
            continue
        assert found_plain(grid, diff, hi, None) == found_cut(
            grid, diff, e_cur, (hi, span, valid), scale, None
        )
        plain += 1
    assert plain > 100
