"""Axle loads under acceleration and the traction limit of the driven axles.

Geometry follows Gillespie, Fundamentals of Vehicle Dynamics, ch. 2: wheelbase ``L``,
centre-of-gravity height ``h``, ``b`` the distance from the CG to the front axle and ``c``
from the CG to the rear axle (``b + c = L``). Under a longitudinal acceleration ``ax``::

    Wf = W*(c/L - (ax/g)*h/L)        Wr = W*(b/L + (ax/g)*h/L)

The traction limit is the closed form obtained by putting ``(W/g)*ax = Fx - Rx`` into these
loads, with ``Rx`` the rolling resistance, and asking that no driven axle need more than
``mu`` times its load (Gillespie eqs. 2-19 and 2-20: rear drive
``Fx = mu*W*(b - fr*h)/L / (1 - mu*h/L)``, front drive ``mu*W*(c + fr*h)/L / (1 + mu*h/L)``).
On a slope of angle ``theta`` the weight's normal part ``W*cos(theta)`` takes the place of
``W`` and the grade force ``W*sin(theta)`` joins the inertia force at the CG height, so the
transfer is still ``(h/L)*(Fx - Rx)``. Aerodynamic drag is taken to act at the CG height
(Gillespie's ``ha = h``), so at any steady or accelerating state the transfer is
``(h/L)*(Fx - Rx)`` and drag leaves the limit unchanged; aerodynamic lift and the inertia of
rotating parts are ignored.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.checks import require_positive, require_range
from core.errors import VehicleError
from core.units import STANDARD_GRAVITY_M_S2

__all__ = [
    "AxleGeometry",
    "AxleLoads",
    "DriveLayout",
    "axle_loads",
    "grip_limit_n",
    "traction_limit_n",
]

FloatArray = NDArray[np.float64]


class DriveLayout(enum.Enum):
    """Which axles are driven. ``ALL`` takes a front torque share in ``traction_limit_n``."""

    REAR = "rear"
    FRONT = "front"
    ALL = "all"


@dataclass(frozen=True)
class AxleGeometry:
    """Wheelbase and centre-of-gravity position of a vehicle.

    Attributes
    ----------
    wheelbase_m : float
        Wheelbase ``L`` [m], > 0.
    cg_height_m : float
        Height of the centre of gravity above the road ``h`` [m], > 0.
    cg_to_front_axle_m : float
        Distance from the CG forward to the front axle ``b`` [m], 0..L.
    """

    wheelbase_m: float
    cg_height_m: float
    cg_to_front_axle_m: float

    def __post_init__(self) -> None:
        require_positive(self.wheelbase_m, "wheelbase_m", VehicleError)
        require_positive(self.cg_height_m, "cg_height_m", VehicleError)
        if not 0.0 <= self.cg_to_front_axle_m <= self.wheelbase_m:
            raise VehicleError(
                f"`cg_to_front_axle_m` must lie in [0, wheelbase_m = {self.wheelbase_m:g}], "
                f"got {self.cg_to_front_axle_m:g}",
                parameter="cg_to_front_axle_m",
            )

    @classmethod
    def from_front_weight_share(
        cls, wheelbase_m: float, cg_height_m: float, front_weight_share: float
    ) -> AxleGeometry:
        """Geometry from the static share of the weight on the front axle.

        The static front load is ``W*c/L``, so ``c = share*L`` and ``b = (1 - share)*L``.

        Parameters
        ----------
        wheelbase_m : float
            Wheelbase ``L`` [m], > 0.
        cg_height_m : float
            CG height ``h`` [m], > 0.
        front_weight_share : float
            Static front-axle load over total weight [-], 0..1.

        Returns
        -------
        AxleGeometry

        Examples
        --------
        >>> AxleGeometry.from_front_weight_share(2.5, 0.5, 0.6).cg_to_front_axle_m
        1.0
        """
        require_positive(wheelbase_m, "wheelbase_m", VehicleError)
        require_range(front_weight_share, "front_weight_share", 0.0, 1.0, VehicleError)
        return cls(wheelbase_m, cg_height_m, (1.0 - front_weight_share) * wheelbase_m)

    @classmethod
    def from_axle_masses(
        cls, wheelbase_m: float, cg_height_m: float, front_axle_kg: float, rear_axle_kg: float
    ) -> AxleGeometry:
        """Geometry from static axle masses (scale readings) [kg].

        Parameters
        ----------
        wheelbase_m : float
            Wheelbase ``L`` [m], > 0.
        cg_height_m : float
            CG height ``h`` [m], > 0.
        front_axle_kg, rear_axle_kg : float
            Static mass on each axle [kg], > 0.

        Returns
        -------
        AxleGeometry
        """
        require_positive(front_axle_kg, "front_axle_kg", VehicleError)
        require_positive(rear_axle_kg, "rear_axle_kg", VehicleError)
        share = front_axle_kg / (front_axle_kg + rear_axle_kg)
        return cls.from_front_weight_share(wheelbase_m, cg_height_m, share)

    @property
    def cg_to_rear_axle_m(self) -> float:
        """Distance from the CG to the rear axle ``c = L - b`` [m]."""
        return self.wheelbase_m - self.cg_to_front_axle_m

    @property
    def front_weight_share(self) -> float:
        """Static share of the weight on the front axle ``c/L`` [-]."""
        return self.cg_to_rear_axle_m / self.wheelbase_m


@dataclass(frozen=True)
class AxleLoads:
    """Normal loads on the two axles.

    Attributes
    ----------
    front_n : ndarray, shape (n,)
        Front-axle load [N]; negative where the front wheels would have lifted.
    rear_n : ndarray, shape (n,)
        Rear-axle load [N].
    """

    front_n: FloatArray
    rear_n: FloatArray


def axle_loads(mass_kg: float, geometry: AxleGeometry, acceleration_m_s2: ArrayLike) -> AxleLoads:
    """Axle loads under longitudinal acceleration (Gillespie ch. 2).

    ``Wf = W*(c/L - (ax/g)*h/L)``, ``Wr = W*(b/L + (ax/g)*h/L)``, ``W = m*g``. The formula is
    not clipped: a negative front load means the front wheels would have left the road.

    Parameters
    ----------
    mass_kg : float
        Vehicle mass [kg], > 0.
    geometry : AxleGeometry
        Wheelbase and CG position.
    acceleration_m_s2 : array_like, shape (n,)
        Longitudinal acceleration [m/s^2]; negative when braking.

    Returns
    -------
    AxleLoads
        Front and rear loads [N], each shaped like ``acceleration_m_s2``.

    Examples
    --------
    >>> g = AxleGeometry(2.0, 0.5, 1.0)
    >>> loads = axle_loads(1000.0, g, [0.0, 9.80665])
    >>> loads.front_n.round(4).tolist(), loads.rear_n.round(4).tolist()
    ([4903.325, 2451.6625], [4903.325, 7354.9875])
    """
    require_positive(mass_kg, "mass_kg", VehicleError)
    acceleration = np.asarray(acceleration_m_s2, dtype=np.float64)
    flat = acceleration.reshape(-1)
    bad = np.flatnonzero(~np.isfinite(flat))
    if bad.size:
        index = int(bad[0])
        where = "acceleration_m_s2" if acceleration.ndim == 0 else f"acceleration_m_s2[{index}]"
        raise VehicleError(f"`{where}` must be finite, got {flat[index]}", parameter=where)
    weight_n = mass_kg * STANDARD_GRAVITY_M_S2
    length = geometry.wheelbase_m
    transfer = weight_n * (acceleration / STANDARD_GRAVITY_M_S2) * geometry.cg_height_m / length
    front: FloatArray = weight_n * geometry.cg_to_rear_axle_m / length - transfer
    rear: FloatArray = weight_n * geometry.cg_to_front_axle_m / length + transfer
    return AxleLoads(front_n=front, rear_n=rear)


def traction_limit_n(
    mass_kg: float,
    geometry: AxleGeometry,
    friction_coefficient: float,
    layout: DriveLayout,
    *,
    front_torque_share: float | None = None,
    rolling_resistance_n: float = 0.0,
    grade_percent: float = 0.0,
) -> float:
    """Largest tractive force the driven tires can put down, in closed form.

    Let the front axle take a share ``s`` of the tractive force ``Fx`` and the rear ``1 - s``
    (``s = 0`` rear drive, ``s = 1`` front drive, ``0..1`` all-wheel drive with a fixed
    torque split). With ``a = Fx/W``, ``k = mu*h/L`` and the loads of :func:`axle_loads`,
    each axle may use at most ``mu`` times its load:

    * front: ``s*a <= mu*(c/L - a*h/L)``, so ``a <= mu*(c/L) / (s + k)``;
    * rear: ``(1 - s)*a <= mu*(b/L + a*h/L)``, so ``a <= mu*(b/L) / (1 - s - k)`` when
      ``1 - s - k > 0``, and no limit otherwise (load transfer outgrows the demand).

    The limit is ``W`` times the lesser bound: the axle that saturates first caps the force,
    and the torque split scales how much of ``Fx`` each axle must carry. With ``s = 1`` this is
    Gillespie's front-drive limit ``mu*W*(c/L)/(1 + k)``; with ``s = 0`` the rear bound is the
    rear-drive limit ``mu*W*(b/L)/(1 - k)`` and the front bound becomes ``W*c/h``, the force at
    which the front wheels lift, which caps rear drive when ``mu > c/h``. An all-wheel-drive
    split equal to the front load share at the limit, ``s = c/L - k``, saturates both axles at
    once and gives ``mu*W``, the most any split can reach.

    With ``rolling_resistance_n`` (``Rx``) the load transfer is ``(h/L)*(Fx - Rx)``, the
    rolling-resistance term of Gillespie eqs. 2-19 and 2-20; on a grade ``W`` becomes
    ``W*cos(theta)`` (see the module docstring and :func:`grip_limit_n`). With both left at
    0 the form is the level, road-load-free one above.

    Parameters
    ----------
    mass_kg : float
        Vehicle mass [kg], > 0.
    geometry : AxleGeometry
        Wheelbase and CG position.
    friction_coefficient : float
        Peak tire-road friction coefficient ``mu`` [-], > 0.
    layout : DriveLayout
        Driven axles.
    front_torque_share : float, optional
        For ``DriveLayout.ALL`` only, and required there: share of the drive torque sent to
        the front axle [-], 0..1.
    rolling_resistance_n : float, optional
        Rolling resistance of all wheels at the state considered [N], >= 0.
    grade_percent : float, optional
        Road grade ``100*tan(theta)`` [%].

    Returns
    -------
    float
        Traction-limited tractive force [N].

    Raises
    ------
    VehicleError
        If an argument is out of range, or ``front_torque_share`` is missing for
        ``DriveLayout.ALL`` or given for another layout.

    Examples
    --------
    >>> g = AxleGeometry.from_front_weight_share(2.5, 0.5, 0.5)
    >>> round(traction_limit_n(1000.0, g, 1.0, DriveLayout.ALL, front_torque_share=0.3), 3)
    9806.65
    """
    require_positive(mass_kg, "mass_kg", VehicleError)
    require_positive(friction_coefficient, "friction_coefficient", VehicleError)
    if layout is DriveLayout.ALL:
        if front_torque_share is None:
            raise VehicleError(
                "`front_torque_share` must be given for all-wheel drive, got None",
                parameter="front_torque_share",
            )
        require_range(front_torque_share, "front_torque_share", 0.0, 1.0, VehicleError)
        share = front_torque_share
    elif front_torque_share is not None:
        raise VehicleError(
            f"`front_torque_share` applies to all-wheel drive only, got {front_torque_share:g} "
            f"with {layout.value} drive",
            parameter="front_torque_share",
        )
    else:
        share = 1.0 if layout is DriveLayout.FRONT else 0.0
    if not math.isfinite(rolling_resistance_n) or rolling_resistance_n < 0.0:
        raise VehicleError(
            f"`rolling_resistance_n` must be finite and >= 0, got {rolling_resistance_n}",
            parameter="rolling_resistance_n",
        )
    if not math.isfinite(grade_percent):
        raise VehicleError(
            f"`grade_percent` must be finite, got {grade_percent}", parameter="grade_percent"
        )
    normal_n = mass_kg * STANDARD_GRAVITY_M_S2 * math.cos(math.atan(grade_percent / 100.0))
    limit = grip_limit_n(
        np.array([normal_n]),
        np.array([rolling_resistance_n]),
        geometry,
        friction_coefficient,
        share,
    )
    return float(limit[0])


def grip_limit_n(
    normal_load_n: FloatArray,
    rolling_resistance_n: FloatArray,
    geometry: AxleGeometry,
    friction_coefficient: float,
    front_share: float,
) -> FloatArray:
    """The traction limit of :func:`traction_limit_n` for many states at once.

    With ``N`` the weight's component normal to the road, ``Rx`` the rolling resistance,
    ``s`` the front share of the drive and ``k = mu*h/L``, each axle carries at most ``mu``
    times its load ``Wf = (N*c - h*(Fx - Rx))/L``, ``Wr = (N*b + h*(Fx - Rx))/L``:

    * front: ``Fx <= mu*(N*c + h*Rx)/L / (s + k)``;
    * rear: ``Fx <= mu*(N*b - h*Rx)/L / (1 - s - k)`` when ``1 - s - k > 0``, else no limit.

    Parameters
    ----------
    normal_load_n : ndarray, shape (n,)
        ``W*cos(theta)`` [N].
    rolling_resistance_n : ndarray, shape (n,)
        Rolling resistance of all wheels [N], >= 0.
    geometry : AxleGeometry
        Wheelbase and CG position.
    friction_coefficient : float
        Peak friction coefficient ``mu`` [-], > 0.
    front_share : float
        Front share ``s`` of the tractive force [-], 0..1.

    Returns
    -------
    ndarray, shape (n,)
        Largest tractive force [N], >= 0.

    Examples
    --------
    Rear drive, Gillespie eq. 2-19 with ``fr = 0.015``:

    >>> g = AxleGeometry(2.5, 0.5, 1.25)
    >>> w = 1000.0 * 9.80665
    >>> f = grip_limit_n(np.array([w]), np.array([0.015 * w]), g, 1.0, 0.0)
    >>> bool(abs(f[0] - w * (1.25 - 0.015 * 0.5) / 2.5 / (1 - 0.5 / 2.5)) < 1e-9)
    True
    """
    mu = friction_coefficient
    length = geometry.wheelbase_m
    h = geometry.cg_height_m
    k = mu * h / length
    front = (
        mu
        * (normal_load_n * geometry.cg_to_rear_axle_m + h * rolling_resistance_n)
        / length
        / (front_share + k)
    )
    rear_denominator = 1.0 - front_share - k
    if rear_denominator > 0.0:
        rear = (
            mu
            * (normal_load_n * geometry.cg_to_front_axle_m - h * rolling_resistance_n)
            / length
            / rear_denominator
        )
        front = np.minimum(front, rear)
    result: FloatArray = np.maximum(front, 0.0)
    return result
