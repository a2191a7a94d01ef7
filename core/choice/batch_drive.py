"""Drive force, net acceleration and top speed of one car with many final drive ratios.

With final drive ``f_c`` the overall ratio in gear g is ``gear_g * f_c * extra``: each
candidate ratio c puts the same engine, converter, tires and road load behind a different
gearing, so a gear's force and acceleration for every candidate are arrays of shape (c, n)
evaluated in one numpy call; engine and converter come from
:meth:`core.runs.drive_model.DriveModel.gearbox_input`, the same code the one-car model uses:
a clutch slipping at the launch rpm in the launch gear, a converter solved by
:func:`core.converter.matching.converter_operating_points` on the flattened grid (locked 1:1
in lock-up gears above the curve's first rpm), the traction cap, the rotating mass of the
gear and the decoupled mass while the engine slips.

Where every candidate's grid is the same in engine speed (the launch gear from rest, the
top-speed scan) the engine and converter are solved on one row and shared; the rows agree
to rounding, so the results agree with the one-car model to rounding.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.driveline.drivetrain import MAX_RATIO
from core.engine.curves import RPM_TO_RAD_S
from core.errors import DrivetrainError

if TYPE_CHECKING:
    from core.runs.drive_model import DriveModel

__all__ = [
    "BatchTopSpeed",
    "batch_acceleration",
    "batch_drive",
    "batch_top_speed",
    "candidate_masses",
    "checked_final_drives",
    "overall_ratios",
    "take_rows",
]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
BoolArray = NDArray[np.bool_]
_TOP_SPEED_GRID = 257  # as core.runs.performance.top_speed
_TOP_SPEED_BLOCK = 128  # candidates scanned together: (128, 257) doubles stay in cache
_SHARED_RTOL = 1e-12
_TOP_SPEED_INDEX = np.arange(_TOP_SPEED_GRID)[None, :]
_TOP_SPEED_STEPS = np.arange(_TOP_SPEED_GRID, dtype=np.float64)[None, :]


def checked_final_drives(final_drive_ratio: ArrayLike) -> FloatArray:
    """Validate candidate final drive ratios.

    Parameters
    ----------
    final_drive_ratio : array_like, shape (c,)
        Ratios [-], at least one, each finite and in (0, 50].

    Returns
    -------
    ndarray, shape (c,)

    Raises
    ------
    DrivetrainError
        On an empty or multi-dimensional list, or a ratio outside (0, 50].
    """
    f = np.asarray(final_drive_ratio, dtype=np.float64)
    if f.ndim != 1 or f.size == 0:
        raise DrivetrainError(
            f"`final_drive_ratio` must list one or more ratios, got shape {f.shape}",
            parameter="final_drive_ratio",
        )
    # two reductions see any NaN or ratio out of range; only then is it located
    if not (float(f.min()) > 0.0 and float(f.max()) <= MAX_RATIO):
        bad = np.flatnonzero(~np.isfinite(f) | (f <= 0.0) | (f > MAX_RATIO))
        i = int(bad[0])
        raise DrivetrainError(
            f"`final_drive_ratio[{i}]` must be finite and in (0, {MAX_RATIO:g}], got {f[i]}",
            parameter=f"final_drive_ratio[{i}]",
        )
    return f


def overall_ratios(model: DriveModel, final_drive_ratio: FloatArray) -> FloatArray:
    """Overall ratio in each gear for each candidate, shape (c, g) [-]."""
    gears = model.drivetrain.gear_ratios[None, :]
    result: FloatArray = gears * final_drive_ratio[:, None] * model.drivetrain.extra_reduction
    return result


def take_rows(values: FloatArray, index: IntArray) -> FloatArray:
    """``values[r, index[r]]`` for every row r of a (c, n) array, shape (c,)."""
    result: FloatArray = np.take_along_axis(values, index[:, None], axis=1)[:, 0]
    return result


def candidate_masses(
    model: DriveModel, final_drive_ratio: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """Effective mass per gear and decoupled mass for each final drive ratio [kg].

    Both the rotating equivalent ``[(Ie + It)*Ntf**2 + Id*Nf**2 + Iw] / r**2`` (Gillespie,
    ch. 2) and the mass-factor estimate ``m*(1.04 + 0.0025*Ntf**2)`` are ``A + B*f**2`` in
    the final drive ratio f, ``Ntf`` and ``Nf`` both being proportional to it; the vehicle's
    own methods at f = 1 and f = 2 fix A and B, once per car
    (:attr:`core.runs.drive_model.DriveModel.final_drive_masses`).

    Parameters
    ----------
    model : DriveModel
        The car.
    final_drive_ratio : ndarray, shape (c,)
        Candidate final drive ratios [-].

    Returns
    -------
    tuple of ndarray, shapes (c, g) and (c,)
        Effective mass in each gear and decoupled mass [kg].
    """
    terms = model.final_drive_masses
    f2 = final_drive_ratio**2
    b_eff, b_dec = terms.effective_per_f2_kg, terms.decoupled_per_f2_kg
    effective = terms.effective_base_kg[None, :] + b_eff[None, :] * f2[:, None]
    decoupled = terms.decoupled_base_kg + b_dec * f2
    return effective, decoupled


def _shared_row(n_in: FloatArray) -> FloatArray | None:
    """The first row when every row equals it to rounding, else None."""
    first: FloatArray = n_in[0]
    if n_in.shape[0] == 1:
        return first
    scale = max(float(np.max(np.abs(first))), 1.0)
    last = n_in[:, -1]  # rows that differ at their last point differ: no need to look further
    if float(np.max(np.abs(last - first[-1]))) > _SHARED_RTOL * scale:
        return None
    if float(np.max(np.abs(n_in - first))) <= _SHARED_RTOL * scale:
        return first
    return None


def batch_drive(
    model: DriveModel, gear: int, speed_m_s: FloatArray, ratio: FloatArray, launching: bool
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Drive force before traction, as :meth:`DriveModel.drive` for every candidate.

    Parameters
    ----------
    model : DriveModel
        The car.
    gear : int
        Gear index, 0 for first.
    speed_m_s : ndarray, shape (c, n)
        Road speeds of each candidate [m/s], >= 0.
    ratio : ndarray, shape (c,)
        Each candidate's overall ratio in this gear [-].
    launching : bool
        True in the launch gear from rest.

    Returns
    -------
    tuple of ndarray, shape (c, n)
        Force [N] (zero above the rev-limit speed), engine speed [rpm] (possibly a
        read-only view) and gearbox input speed [rpm].
    """
    r = model.tire.rolling_radius_m
    n_in = speed_m_s * ratio[:, None] / (r * RPM_TO_RAD_S)
    row = _shared_row(n_in)
    if row is not None:
        t_row, e_row = model.gearbox_input(gear, row, launching=launching)
        torque = np.broadcast_to(t_row, n_in.shape)
        engine = np.broadcast_to(e_row, n_in.shape)
    else:
        torque, engine = model.gearbox_input(gear, n_in, launching=launching)
    force = torque * ratio[:, None]
    force *= float(model.efficiency[gear])
    force /= r
    force[n_in > model.rev_limit_rpm * (1.0 + 1e-9)] = 0.0
    return force, engine, n_in


def batch_acceleration(
    model: DriveModel,
    gear: int,
    speed_m_s: FloatArray,
    ratio: FloatArray,
    masses: tuple[FloatArray, FloatArray],
    launching: bool,
) -> tuple[FloatArray, FloatArray]:
    """Net acceleration, as :meth:`DriveModel.acceleration` for every candidate.

    Parameters
    ----------
    model : DriveModel
        The car.
    gear : int
        Gear index, 0 for first.
    speed_m_s : ndarray, shape (c, n)
        Road speeds [m/s], >= 0.
    ratio : ndarray, shape (c,)
        Overall ratio in this gear [-].
    masses : tuple of ndarray, shapes (c,) and (c,)
        Effective mass in this gear and decoupled mass of each candidate [kg].
    launching : bool
        True in the launch gear from rest.

    Returns
    -------
    tuple of ndarray, shape (c, n)
        Net acceleration [m/s^2] and engine speed [rpm].
    """
    force, engine, n_in = batch_drive(model, gear, speed_m_s, ratio, launching)
    usable = np.minimum(force, model.traction_limit_n)
    resist = model.vehicle.road_load.force_n(np.maximum(speed_m_s, 0.0))
    # the engine's inertia rides with the car only while it follows the wheels
    slipping = engine > n_in * (1.0 + 1e-6) + 1e-6
    mass = np.where(slipping, masses[1][:, None], masses[0][:, None])
    return (usable - resist) / mass, np.array(engine, dtype=np.float64)


@dataclass(frozen=True)
class BatchTopSpeed:
    """Top speed of one car with each final drive ratio.

    Attributes
    ----------
    speed_m_s : ndarray, shape (c,)
        Top speed [m/s]; 0 where no gear can hold any speed.
    gear : ndarray of int, shape (c,)
        Gear it is reached in (1 = first).
    limited_by : tuple of str, length c
        ``"drag"`` or ``"rev_limit"``.
    by_gear_m_s : ndarray, shape (c, g)
        Top speed in each gear [m/s], NaN where the gear cannot hold any speed.
    """

    speed_m_s: FloatArray
    gear: IntArray
    limited_by: tuple[str, ...]
    by_gear_m_s: FloatArray


def _gear_top_speeds(
    model: DriveModel, gear: int, ratio: FloatArray, torque: FloatArray
) -> tuple[FloatArray, BoolArray]:
    """Top speed in one gear of each candidate [m/s] (NaN where it holds no speed) and
    whether drag sets it, from the gear's torque over the shared engine-speed row."""
    r = model.tire.rolling_radius_m
    lo = model.curve.rpm_min * RPM_TO_RAD_S * r / ratio
    hi = model.rev_limit_rpm * RPM_TO_RAD_S * r / ratio
    # np.linspace(lo, hi, _TOP_SPEED_GRID, axis=-1) term by term, laid out row by row
    v = _TOP_SPEED_STEPS * ((hi - lo) / (_TOP_SPEED_GRID - 1))[:, None]
    v += lo[:, None]
    v[:, -1] = hi
    spare = torque[None, :] * (ratio * float(model.efficiency[gear]) / r)[:, None]
    np.minimum(spare, model.traction_limit_n, out=spare)
    spare -= model.vehicle.road_load.force_n(v)
    spare[:, -1] = np.minimum(spare[:, -1], spare[:, -2])  # the limiter cuts drive
    strong: BoolArray = spare > 0.0
    first = np.argmax(strong, axis=1)  # the car reaches the gear's range above here
    each = np.arange(first.size)
    holds = strong[each, first]  # argmax gives the first True, or 0 where there is none
    neg: BoolArray = spare <= 0.0
    if first.any():  # rows that reach the range later look for the crossing past it
        neg &= first[:, None] <= _TOP_SPEED_INDEX
    k = np.argmax(neg, axis=1)
    crosses: BoolArray = holds & neg[each, k]
    km = np.maximum(k - 1, 0)
    s0, s1 = spare[each, km], spare[each, k]
    v0, v1 = v[each, km], v[each, k]
    frac = np.where(crosses, s0 / np.where(crosses, s0 - s1, 1.0), 0.0)
    speed = np.where(crosses, v0 + frac * (v1 - v0), np.where(holds, hi, np.nan))
    return speed, crosses


def batch_top_speed(model: DriveModel, final_drive_ratio: ArrayLike) -> BatchTopSpeed:
    """Top speed with each final drive ratio, as :func:`core.runs.performance.top_speed`.

    Parameters
    ----------
    model : DriveModel
        The car; its final drive ratio is replaced by each candidate.
    final_drive_ratio : array_like, shape (c,)
        Candidate final drive ratios [-], each finite and in (0, 50].

    Returns
    -------
    BatchTopSpeed
    """
    f = checked_final_drives(final_drive_ratio)
    overall = overall_ratios(model, f)
    r = model.tire.rolling_radius_m
    by_gear = np.full(overall.shape, np.nan)
    drag = np.zeros(overall.shape, dtype=np.bool_)
    for g in range(overall.shape[1]):
        # every scan runs over the same engine speeds, curve start to rev limit: one row of
        # torque serves all candidates (never above the limit, so never cut)
        first = overall[0, g]
        lo = model.curve.rpm_min * RPM_TO_RAD_S * r / first
        row = np.linspace(lo, model.rev_limit_rpm * RPM_TO_RAD_S * r / first, _TOP_SPEED_GRID)
        torque = model.gearbox_input(g, row * first / (r * RPM_TO_RAD_S))[0]
        # candidates a block at a time: the scans of a block stay in the processor's cache,
        # so the cost grows linearly with the candidates (each row is computed alone)
        for start in range(0, f.size, _TOP_SPEED_BLOCK):
            block = slice(start, start + _TOP_SPEED_BLOCK)
            by_gear[block, g], drag[block, g] = _gear_top_speeds(
                model, g, overall[block, g], torque
            )
    filled = np.where(np.isnan(by_gear), -np.inf, by_gear)
    best = np.argmax(filled, axis=1)
    none = np.all(np.isnan(by_gear), axis=1)
    limited = tuple(
        "drag" if n or bool(drag[c, b]) else "rev_limit"
        for c, (n, b) in enumerate(zip(none.tolist(), best.tolist(), strict=True))
    )
    return BatchTopSpeed(
        speed_m_s=np.where(none, 0.0, take_rows(filled, best)),
        gear=np.where(none, 1, best + 1).astype(np.int64),
        limited_by=limited,
        by_gear_m_s=by_gear,
    )
