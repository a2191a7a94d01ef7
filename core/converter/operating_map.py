"""A converter's wide-open-throttle operating point as a table over turbine speed.

At wide-open throttle the engine settles where its torque meets what the converter
absorbs, ``T(n) = (n/K(SR))**2`` (SAE J641 terms: capacity factor K, speed ratio
``SR = n_turbine/n``). Read the other way round, every engine speed ``n`` fixes the
capacity the converter must have, ``K = n/sqrt(T(n))``, and so its speed ratio,
``SR = K^-1(n/sqrt(T(n)))``, and the turbine speed ``SR*n`` it belongs to: no equation to
solve, one interpolation per engine speed. Evaluated once per car on a dense row of engine
speeds, it gives engine speed and output torque as functions of turbine speed, which a run
reads by linear interpolation (:meth:`core.runs.drive_model.DriveModel.gearbox_input`).

Where no balance lies between the curve's first rpm and the rev limit the engine is held
at the end it is pushed against, as :func:`core.converter.matching.converter_operating_points`
does: at the curve's first rpm with its full torque for slow turbines if the converter
absorbs more there, and at the rev limit with only the torque the converter absorbs for
fast turbines. A capacity table that falls with speed ratio has no single inverse; then
the table is solved point by point with that function instead.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.converter.matching import EngineTorqueFn, converter_operating_points
from core.converter.tables import TorqueConverter

__all__ = ["ENGINE_NODES", "ConverterMap", "converter_map"]

FloatArray = NDArray[np.float64]
ENGINE_NODES = 1025  # engine speeds at which the balance is read, curve start to rev limit
_HELD_NODES = 129  # turbine speeds on each stretch where the engine is held at an end


@dataclass(frozen=True, eq=False)
class ConverterMap:
    """Engine speed and converter output torque against turbine speed (lock-up open).

    Attributes
    ----------
    turbine_rpm : ndarray, shape (m,)
        Turbine speed [rpm], strictly increasing from 0 to the rev limit.
    engine_rpm : ndarray, shape (m,)
        Engine speed there [rpm].
    output_torque_nm : ndarray, shape (m,)
        Turbine torque there [N*m].
    """

    turbine_rpm: FloatArray
    engine_rpm: FloatArray
    output_torque_nm: FloatArray


def _solved(
    converter: TorqueConverter, torque_fn: EngineTorqueFn, rpm_min: float, rpm_max: float
) -> ConverterMap:
    turbine = np.linspace(0.0, rpm_max, ENGINE_NODES)
    points = converter_operating_points(
        converter, turbine, torque_fn, rpm_min=rpm_min, rpm_max=rpm_max
    )
    return ConverterMap(turbine, points.engine_rpm, points.output_torque_nm)


def converter_map(
    converter: TorqueConverter, torque_fn: EngineTorqueFn, *, rpm_min: float, rpm_max: float
) -> ConverterMap:
    """Tabulate a converter's operating point against turbine speed, lock-up open.

    Parameters
    ----------
    converter : TorqueConverter
        The converter; its lock-up clutch is ignored.
    torque_fn : callable
        Vectorised engine torque [N*m] at engine speeds [rpm].
    rpm_min, rpm_max : float
        The curve's first rpm and the rev limit [rpm], 0 < rpm_min < rpm_max.

    Returns
    -------
    ConverterMap
        From turbine speed 0 to ``rpm_max``.
    """
    conv = dataclasses.replace(converter, lockup_speed_ratio=None)
    sr_nodes, k_nodes = conv.speed_ratio, conv.k_factor
    if np.any(np.diff(k_nodes) < 0.0):
        return _solved(conv, torque_fn, rpm_min, rpm_max)
    n = np.linspace(rpm_min, rpm_max, ENGINE_NODES)
    torque = np.asarray(torque_fn(n), dtype=np.float64)
    with np.errstate(divide="ignore"):
        need = n / np.sqrt(torque)  # capacity the converter must have at each engine speed
    if np.any(np.diff(need) <= 0.0):
        return _solved(conv, torque_fn, rpm_min, rpm_max)
    balanced = need >= k_nodes[0]  # below stall no speed ratio balances the engine
    sr = np.interp(need, k_nodes, sr_nodes)
    parts_t, parts_n, parts_q = [], [], []
    if balanced[0]:
        # the converter absorbs more than the engine makes at rpm_min: held there
        sr0 = float(sr[0])
        ratios = np.union1d(np.linspace(0.0, sr0, _HELD_NODES), sr_nodes[sr_nodes < sr0])
        ratios = ratios[ratios < sr0]
        parts_t.append(ratios * rpm_min)
        parts_n.append(np.full(ratios.size, rpm_min))
        parts_q.append(conv.torque_ratio_at(ratios) * float(torque[0]))
    elif balanced.any():
        # stall between two engine nodes: K(0) = n/sqrt(T(n)) read off linearly
        i = int(np.argmax(balanced))
        stall = float(np.interp(k_nodes[0], need[i - 1 : i + 1], n[i - 1 : i + 1]))
        parts_t.append(np.zeros(1))
        parts_n.append(np.array([stall]))
        parts_q.append(conv.torque_ratio_at(np.zeros(1)) * torque_fn(np.array([stall])))
    # the speed ratio's table nodes, where its slope changes, placed exactly
    lo, hi = (float(need[balanced][0]), float(need[-1])) if balanced.any() else (0.0, 0.0)
    exact = (k_nodes > lo) & (k_nodes < hi) & (np.diff(k_nodes, prepend=-1.0) > 0.0)
    n_k = np.interp(k_nodes[exact], need, n)
    n_b = np.concatenate([n[balanced], n_k])
    order = np.argsort(n_b, kind="stable")
    n_b = n_b[order]
    sr_b = np.concatenate([sr[balanced], sr_nodes[exact]])[order]
    q_b = np.concatenate([torque[balanced], np.asarray(torque_fn(n_k), dtype=np.float64)])
    parts_t.append(sr_b * n_b)
    parts_n.append(n_b)
    parts_q.append(conv.torque_ratio_at(sr_b) * q_b[order])
    top = float(sr_b[-1]) if sr_b.size else 0.0
    if top < 1.0:
        # faster turbines would need the engine above the rev limit: held there, giving
        # only what the converter absorbs
        ratios = np.union1d(np.linspace(top, 1.0, _HELD_NODES), sr_nodes[sr_nodes > top])
        ratios = ratios[ratios > top] if sr_b.size else ratios
        parts_t.append(ratios * rpm_max)
        parts_n.append(np.full(ratios.size, rpm_max))
        absorbed = (rpm_max / conv.k_factor_at(ratios)) ** 2
        parts_q.append(conv.torque_ratio_at(ratios) * absorbed)
    turbine = np.concatenate(parts_t)
    if np.any(np.diff(turbine) <= 0.0):
        return _solved(conv, torque_fn, rpm_min, rpm_max)
    return ConverterMap(turbine, np.concatenate(parts_n), np.concatenate(parts_q))
