"""Synthetic logged passes: an invented car run through the simulator with chosen shift rpm,
sampled at a logger's rate and given Gaussian noise with a fixed seed.

The car (a rear-drive four-speed coupe) is invented demo data; its curve peaks at 4500 rpm
and falls off steeply towards the 7500 rpm limit, so the net-acceleration crossover of
every gear pair lies near 6300 rpm, well below the limit: shifting at the limiter is late,
shifting at 80 % of the crossover is early. The simulator (``core.runs.simulate``) stands in
for the car: ``simulate_run`` integrates the same net acceleration that
``core.runs.performance.acceleration_shifts`` finds the crossovers of, so those crossovers are
the truth the log analysis should recover.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import NDArray

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Launch, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import Tire, tire_from_diameter
from core.engine.curves import torque_curve_from_torque
from core.runs.drive_model import DriveModel, drive_model
from core.runs.performance import acceleration_shifts
from core.runs.simulate import RunResult, simulate_run

__all__ = [
    "CURVE_RPM",
    "CURVE_TORQUE_NM",
    "FINAL_DRIVE",
    "GEAR_RATIOS",
    "REV_LIMIT_RPM",
    "SHIFT_TIME_S",
    "TIRE_DIAMETER_M",
    "SyntheticPass",
    "crossover_rpm",
    "crossover_speed_m_s",
    "demo_model",
    "demo_tire",
    "synthetic_pass",
]

FloatArray = NDArray[np.float64]

CURVE_RPM = [1500.0, 2500.0, 3500.0, 4500.0, 5500.0, 6500.0, 7500.0]
CURVE_TORQUE_NM = [260.0, 300.0, 330.0, 340.0, 310.0, 250.0, 170.0]
GEAR_RATIOS = [3.2, 2.1, 1.5, 1.15]
FINAL_DRIVE = 3.9
TIRE_DIAMETER_M = 0.64
REV_LIMIT_RPM = 7500.0
SHIFT_TIME_S = 0.3
MASS_KG = 1250.0


def demo_tire() -> Tire:
    """The invented car's tire: 640 mm, rolling radius 0.32 m."""
    return tire_from_diameter(TIRE_DIAMETER_M)


@lru_cache(maxsize=4)
def demo_model(rev_limit_rpm: float = REV_LIMIT_RPM) -> DriveModel:
    """The invented car (grip ample: friction 1.8, so the crossovers are engine-limited)."""
    curve = torque_curve_from_torque(CURVE_RPM, CURVE_TORQUE_NM)
    drivetrain = make_drivetrain(GEAR_RATIOS, FINAL_DRIVE, efficiency=0.9)
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.65, 1.2, 0.012)
    geometry = AxleGeometry.from_front_weight_share(2.6, 0.5, 0.52)
    vehicle = Vehicle(MASS_KG, load, geometry, DriveLayout.REAR, 1.8)
    launch = Launch(launch_rpm=3500.0, shift_time_s=SHIFT_TIME_S)
    return drive_model(
        curve, drivetrain, demo_tire(), vehicle, launch, rev_limit_rpm=rev_limit_rpm
    )


def crossover_rpm(rev_limit_rpm: float = REV_LIMIT_RPM) -> list[float]:
    """The core's net-acceleration shift rpm of each gear change (all crossovers here)."""
    return [c.shift_rpm for c in acceleration_shifts(demo_model(rev_limit_rpm))]


def crossover_speed_m_s() -> list[float]:
    """Road speed of each net-acceleration crossover [m/s]."""
    model = demo_model()
    return [model.speed_at_rpm(i, n) for i, n in enumerate(crossover_rpm())]


@dataclass(frozen=True)
class SyntheticPass:
    """A simulated run as a logger would record it.

    Attributes
    ----------
    run : RunResult
        The noise-free simulated run (its shifts are the truth).
    time_s, speed_m_s, rpm, acceleration_m_s2 : ndarray, shape (n,)
        Logged channels with noise [s, m/s, rpm, m/s^2].
    """

    run: RunResult
    time_s: FloatArray
    speed_m_s: FloatArray
    rpm: FloatArray
    acceleration_m_s2: FloatArray


@lru_cache(maxsize=64)
def synthetic_pass(
    shift_rpm: tuple[float, ...],
    *,
    rate_hz: float = 25.0,
    seed: int = 1,
    speed_noise_m_s: float = 0.1 / 3.6,
    rpm_noise: float = 15.0,
    acceleration_noise_m_s2: float = 0.15,
    rev_limit_rpm: float = REV_LIMIT_RPM,
    distance_m: float = 402.336,
) -> SyntheticPass:
    """Simulate a quarter-mile pass shifting at ``shift_rpm`` and log it at ``rate_hz``.

    The run's trace is resampled with ``numpy.interp``; during each shift the logged
    acceleration is the coasting deceleration (no drive). Noise is Gaussian from
    ``numpy.random.default_rng(seed)``.
    """
    run = simulate_run(demo_model(rev_limit_rpm), list(shift_rpm), cover_distance_m=distance_m)
    keep = np.diff(run.time_s, prepend=-np.inf) > 0.0  # the trace repeats each shift's end
    t_run = run.time_s[keep]
    t = np.arange(0.0, float(t_run[-1]), 1.0 / rate_hz)
    speed = np.interp(t, t_run, run.speed_m_s[keep])
    rpm = np.interp(t, t_run, run.engine_rpm[keep])
    accel = np.interp(t, t_run, run.acceleration_m_s2[keep])
    for s in run.shifts:
        during = (t > s.time_s) & (t < s.time_s + SHIFT_TIME_S)
        accel[during] = float(
            np.interp(s.time_s + SHIFT_TIME_S, t_run, run.acceleration_m_s2[keep])
        )
    rng = np.random.default_rng(seed)
    return SyntheticPass(
        run,
        t,
        np.maximum(speed + rng.normal(0.0, speed_noise_m_s, t.size), 0.0),
        rpm + rng.normal(0.0, rpm_noise, t.size),
        accel + rng.normal(0.0, acceleration_noise_m_s2, t.size),
    )
