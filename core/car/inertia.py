"""Equivalent mass of the rotating parts of a driveline, gear by gear.

Accelerating a vehicle also spins up the engine, transmission, driveshaft and wheels. Seen
from the road, their inertia adds an equivalent mass (Gillespie, Fundamentals of Vehicle
Dynamics, ch. 2)::

    Mr = [(Ie + It)*Ntf**2 + Id*Nf**2 + Iw] / r**2

with ``Ntf`` the overall ratio (transmission times final drive), ``Nf`` the final drive
ratio and ``r`` the tire rolling radius. Without inertia data, the mass factor
``1 + 0.04 + 0.0025*Ntf**2`` (a rule of thumb quoted by Gillespie and, as
``1.04 + 0.0025*xi**2``, by Wong, Theory of Ground Vehicles) estimates ``(m + Mr)/m``.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.checks import require_non_negative, require_positive
from core.errors import VehicleError

__all__ = [
    "equivalent_mass_kg",
    "mass_factor",
    "rotating_mass_kg",
]

FloatArray = NDArray[np.float64]


def _overall_ratios(overall_ratios: ArrayLike) -> FloatArray:
    """Validate overall ratios: a 1-D array of finite values > 0."""
    ratios = np.asarray(overall_ratios, dtype=np.float64)
    if ratios.ndim != 1 or ratios.size == 0:
        raise VehicleError(
            f"`overall_ratios` must be a non-empty 1-D array, got shape {ratios.shape}",
            parameter="overall_ratios",
        )
    bad = np.flatnonzero(~np.isfinite(ratios) | (ratios <= 0.0))
    if bad.size:
        index = int(bad[0])
        raise VehicleError(
            f"`overall_ratios[{index}]` must be finite and > 0, got {ratios[index]}",
            parameter=f"overall_ratios[{index}]",
        )
    return ratios


def rotating_mass_kg(
    overall_ratios: ArrayLike,
    final_drive_ratio: float,
    rolling_radius_m: float,
    *,
    engine_inertia_kg_m2: float,
    driveshaft_inertia_kg_m2: float,
    wheel_inertia_kg_m2: float,
) -> FloatArray:
    """Equivalent translating mass of the rotating parts in each gear.

    ``Mr = [Ie*Ntf**2 + Id*Nf**2 + Iw] / r**2`` (Gillespie ch. 2, with his ``Ie + It``
    taken as one inertia).

    Parameters
    ----------
    overall_ratios : array_like, shape (n,)
        Overall ratio ``Ntf`` in each gear, transmission times final drive [-], > 0.
    final_drive_ratio : float
        Final drive ratio ``Nf`` [-], > 0; the driveshaft turns at ``Nf`` times the wheels.
    rolling_radius_m : float
        Tire rolling radius ``r`` [m], > 0.
    engine_inertia_kg_m2 : float
        Everything turning at engine speed: engine, flywheel or converter, clutch and
        transmission input [kg*m^2], >= 0.
    driveshaft_inertia_kg_m2 : float
        Driveshaft and parts turning with it [kg*m^2], >= 0.
    wheel_inertia_kg_m2 : float
        All wheels, tires and axle shafts together [kg*m^2], >= 0.

    Returns
    -------
    ndarray, shape (n,)
        Equivalent mass ``Mr`` in each gear [kg].

    Examples
    --------
    >>> rotating_mass_kg([12.0, 4.0], 4.0, 0.3, engine_inertia_kg_m2=0.2,
    ...                  driveshaft_inertia_kg_m2=0.05, wheel_inertia_kg_m2=4.0).round(4)
    array([373.3333,  88.8889])
    """
    ratios = _overall_ratios(overall_ratios)
    require_positive(final_drive_ratio, "final_drive_ratio", VehicleError)
    require_positive(rolling_radius_m, "rolling_radius_m", VehicleError)
    require_non_negative(engine_inertia_kg_m2, "engine_inertia_kg_m2", VehicleError)
    require_non_negative(driveshaft_inertia_kg_m2, "driveshaft_inertia_kg_m2", VehicleError)
    require_non_negative(wheel_inertia_kg_m2, "wheel_inertia_kg_m2", VehicleError)
    inertia_at_wheels = (
        engine_inertia_kg_m2 * ratios**2
        + driveshaft_inertia_kg_m2 * final_drive_ratio**2
        + wheel_inertia_kg_m2
    )
    result: FloatArray = inertia_at_wheels / rolling_radius_m**2
    return result


def mass_factor(overall_ratios: ArrayLike) -> FloatArray:
    """Rule-of-thumb mass factor ``1 + 0.04 + 0.0025*Ntf**2`` in each gear.

    Parameters
    ----------
    overall_ratios : array_like, shape (n,)
        Overall ratio ``Ntf`` in each gear [-], > 0.

    Returns
    -------
    ndarray, shape (n,)
        ``(m + Mr)/m`` estimated from the overall ratio alone [-].

    Examples
    --------
    >>> mass_factor([10.5, 3.0]).round(6)
    array([1.315625, 1.0625  ])
    """
    ratios = _overall_ratios(overall_ratios)
    result: FloatArray = 1.04 + 0.0025 * ratios**2
    return result


def equivalent_mass_kg(mass_kg: float, overall_ratios: ArrayLike) -> FloatArray:
    """Vehicle mass plus rotating parts, ``m * mass_factor(Ntf)``, in each gear.

    Parameters
    ----------
    mass_kg : float
        Vehicle mass [kg], > 0.
    overall_ratios : array_like, shape (n,)
        Overall ratio ``Ntf`` in each gear [-], > 0.

    Returns
    -------
    ndarray, shape (n,)
        Equivalent mass to accelerate [kg].
    """
    require_positive(mass_kg, "mass_kg", VehicleError)
    result: FloatArray = mass_kg * mass_factor(overall_ratios)
    return result
