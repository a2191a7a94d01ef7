"""Hydrodynamic torque converter: capacity and torque-ratio tables over speed ratio.

Definitions (SAE J641 terminology): speed ratio ``SR = n_turbine/n_engine``, capacity
factor ``K = n_engine/sqrt(T_in)`` [rpm/sqrt(N*m)], torque ratio ``TR = T_out/T_in`` and
efficiency ``SR*TR``. A converter is two tables over ``SR`` in [0, 1], linearly interpolated.
The engine settles where its torque equals what the converter absorbs,
``T_engine(n) = (n/K(SR))**2``; at ``SR = 0`` (turbine held) that speed is the stall speed.
``core.converter.matching`` solves for it.

A K-factor of 144 rpm/sqrt(lbf*ft), the unit common in the US trade, is 123.67
rpm/sqrt(N*m) (divide by sqrt(1.3558179483314)).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.checks import require_positive
from core.errors import VehicleError

__all__ = ["TorqueConverter"]

FloatArray = NDArray[np.float64]

_CONVERTER_PHASE_POINTS = 17
_COUPLING_PHASE_POINTS = 9
_UNITY_K_MULTIPLIER = 10.0


def _fail(name: str, condition: str) -> VehicleError:
    return VehicleError(f"`{name}` {condition}", parameter=name)


def _table(values: ArrayLike, name: str, size: int | None = None) -> FloatArray:
    """A read-only copy of a 1-D table of finite values, checked against ``size``."""
    table = np.array(values, dtype=np.float64)
    if table.ndim != 1 or table.size < 2:
        raise _fail(name, f"must be a 1-D array of at least 2 values, got shape {table.shape}")
    if size is not None and table.size != size:
        raise _fail(name, f"must have {size} values like `speed_ratio`, got {table.size}")
    invalid = ~np.isfinite(table)
    if size is not None:
        invalid |= table <= 0.0
    bad = np.flatnonzero(invalid)
    if bad.size:
        index = int(bad[0])
        rule = "finite" if size is None else "finite and > 0"
        raise _fail(f"{name}[{index}]", f"must be {rule}, got {table[index]}")
    table.setflags(write=False)
    return table


@dataclass(frozen=True, eq=False)
class TorqueConverter:
    """A torque converter given by K-factor and torque-ratio tables over speed ratio.

    Attributes
    ----------
    speed_ratio : ndarray, shape (m,)
        Speed ratio nodes [-], strictly increasing from exactly 0 to exactly 1.
    k_factor : ndarray, shape (m,)
        Capacity factor at each node [rpm/sqrt(N*m)], > 0.
    torque_ratio : ndarray, shape (m,)
        Torque ratio at each node [-], > 0.
    lockup_speed_ratio : float or None
        Speed ratio at or above which a lock-up clutch closes and the converter becomes a
        1:1 coupling, 0 < value <= 1; None when there is no lock-up clutch.
    """

    speed_ratio: FloatArray
    k_factor: FloatArray
    torque_ratio: FloatArray
    lockup_speed_ratio: float | None = None

    def __post_init__(self) -> None:
        speed_ratio = _table(self.speed_ratio, "speed_ratio")
        if speed_ratio[0] != 0.0 or speed_ratio[-1] != 1.0:
            raise _fail(
                "speed_ratio",
                f"must run from 0 to 1, got {speed_ratio[0]:g} to {speed_ratio[-1]:g}",
            )
        steps = np.flatnonzero(np.diff(speed_ratio) <= 0.0)
        if steps.size:
            index = int(steps[0]) + 1
            raise _fail(
                f"speed_ratio[{index}]",
                f"must be > the value before it {speed_ratio[index - 1]:g}, "
                f"got {speed_ratio[index]:g}",
            )
        lockup = self.lockup_speed_ratio
        if lockup is not None and not 0.0 < lockup <= 1.0:
            raise _fail("lockup_speed_ratio", f"must lie in (0, 1] or be None, got {lockup}")
        object.__setattr__(self, "speed_ratio", speed_ratio)
        object.__setattr__(self, "k_factor", _table(self.k_factor, "k_factor", speed_ratio.size))
        object.__setattr__(
            self, "torque_ratio", _table(self.torque_ratio, "torque_ratio", speed_ratio.size)
        )

    @classmethod
    def from_stall(
        cls,
        stall_torque_ratio: float,
        *,
        stall_k_factor: float | None = None,
        stall_speed_rpm: float | None = None,
        stall_engine_torque_nm: float | None = None,
        coupling_speed_ratio: float = 0.87,
        k_factor_rise: float = 0.1,
        lockup: bool = True,
    ) -> TorqueConverter:
        """A converter of a simple, typical shape from its stall data.

        Give the stall K-factor, or the stall speed together with the engine torque at that
        speed (then ``K(0) = stall_speed_rpm/sqrt(stall_engine_torque_nm)``). The shape is a
        modelling choice, not measured data:

        * torque ratio falls linearly from ``stall_torque_ratio`` at ``SR = 0`` to 1 at
          ``coupling_speed_ratio`` and stays 1 above it;
        * up to the coupling point the K-factor rises modestly,
          ``K = K(0)*(1 + k_factor_rise*(SR/SR_c)**2)``, tabulated at 17 evenly spaced
          points; above it, in the fluid-coupling phase, K climbs as the fourth power of
          the way from coupling to ``SR = 1``, to ten times its coupling value there
          (tabulated at 9 points), so under power it keeps slipping a few per cent
          rather than reaching ``SR = 1``;
        * with ``lockup`` the converter locks (1:1) from the coupling point on.

        Parameters
        ----------
        stall_torque_ratio : float
            Torque ratio at stall [-], >= 1 (typically 1.8 to 2.5).
        stall_k_factor : float, optional
            K-factor at stall [rpm/sqrt(N*m)], > 0.
        stall_speed_rpm : float, optional
            Stall speed [rpm], > 0.
        stall_engine_torque_nm : float, optional
            Engine torque at the stall speed [N*m], > 0; required with ``stall_speed_rpm``.
        coupling_speed_ratio : float, optional
            Speed ratio where the torque ratio reaches 1 [-], 0 < value < 1.
        k_factor_rise : float, optional
            Relative rise of K from stall to the coupling point [-], >= 0.
        lockup : bool, optional
            Whether a lock-up clutch closes at the coupling point.

        Returns
        -------
        TorqueConverter

        Examples
        --------
        >>> c = TorqueConverter.from_stall(2.0, stall_k_factor=120.0, coupling_speed_ratio=0.8)
        >>> c.torque_ratio_at([0.0, 0.4, 0.9]).tolist()
        [2.0, 1.5, 1.0]
        """
        if stall_k_factor is None:
            if stall_speed_rpm is None or stall_engine_torque_nm is None:
                raise _fail(
                    "stall_k_factor",
                    "or `stall_speed_rpm` with `stall_engine_torque_nm` must be given",
                )
            require_positive(stall_speed_rpm, "stall_speed_rpm", VehicleError)
            require_positive(stall_engine_torque_nm, "stall_engine_torque_nm", VehicleError)
            stall_k_factor = stall_speed_rpm / math.sqrt(stall_engine_torque_nm)
        elif stall_speed_rpm is not None or stall_engine_torque_nm is not None:
            raise _fail(
                "stall_k_factor",
                "cannot be combined with `stall_speed_rpm` or `stall_engine_torque_nm`",
            )
        require_positive(stall_k_factor, "stall_k_factor", VehicleError)
        if not (math.isfinite(stall_torque_ratio) and stall_torque_ratio >= 1.0):
            raise _fail("stall_torque_ratio", f"must be finite and >= 1, got {stall_torque_ratio}")
        if not 0.0 < coupling_speed_ratio < 1.0:
            raise _fail("coupling_speed_ratio", f"must lie in (0, 1), got {coupling_speed_ratio}")
        if not (math.isfinite(k_factor_rise) and k_factor_rise >= 0.0):
            raise _fail("k_factor_rise", f"must be finite and >= 0, got {k_factor_rise}")
        phase = np.linspace(0.0, coupling_speed_ratio, _CONVERTER_PHASE_POINTS)
        fraction = phase / coupling_speed_ratio
        k_phase = stall_k_factor * (1.0 + k_factor_rise * fraction**2)
        tr_phase = stall_torque_ratio + (1.0 - stall_torque_ratio) * fraction
        coupling = np.linspace(coupling_speed_ratio, 1.0, _COUPLING_PHASE_POINTS)[1:]
        way = (coupling - coupling_speed_ratio) / (1.0 - coupling_speed_ratio)
        k_coupling = k_phase[-1] * (1.0 + (_UNITY_K_MULTIPLIER - 1.0) * way**4)
        return cls(
            speed_ratio=np.append(phase, coupling),
            k_factor=np.append(k_phase, k_coupling),
            torque_ratio=np.append(tr_phase, np.ones(coupling.size)),
            lockup_speed_ratio=coupling_speed_ratio if lockup else None,
        )

    def k_factor_at(self, speed_ratio: ArrayLike) -> FloatArray:
        """Interpolated K-factor [rpm/sqrt(N*m)] at speed ratios in [0, 1], shape (n,)."""
        ratio = np.asarray(speed_ratio, dtype=np.float64)
        result: FloatArray = np.interp(ratio, self.speed_ratio, self.k_factor)
        return result

    def torque_ratio_at(self, speed_ratio: ArrayLike) -> FloatArray:
        """Interpolated torque ratio [-] at speed ratios in [0, 1], shape (n,)."""
        ratio = np.asarray(speed_ratio, dtype=np.float64)
        result: FloatArray = np.interp(ratio, self.speed_ratio, self.torque_ratio)
        return result

    def efficiency_at(self, speed_ratio: ArrayLike) -> FloatArray:
        """Hydrodynamic efficiency ``SR*TR`` [-] at speed ratios in [0, 1], shape (n,)."""
        ratio = np.asarray(speed_ratio, dtype=np.float64)
        result: FloatArray = ratio * self.torque_ratio_at(ratio)
        return result
