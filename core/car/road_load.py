"""Road load: the force that resists a vehicle at steady speed, and gradeability.

Every form reduces to a polynomial in road speed ``v`` [m/s] plus the grade force::

    F(v) = c * (C0 + C1*v) + C2*v**2 + m*g*sin(theta),   tan(theta) = grade_percent/100

* Constant rolling coefficient (Gillespie, Fundamentals of Vehicle Dynamics, ch. 4):
  ``C0 = fr*m*g``, ``C1 = 0``, ``C2 = 0.5*rho*CdA``; ``c = cos(theta)``, because rolling
  resistance follows the load normal to the road.
* Speed-dependent rolling coefficient ``fr = f0 + f1*v`` (Gillespie ch. 4 gives
  ``fr = 0.0041 + 0.000041*V_mph`` for radial tires, i.e. ``f1 = 0.000041/0.44704`` s/m):
  ``C0 = f0*m*g``, ``C1 = f1*m*g``, ``C2 = 0.5*rho*CdA``; ``c = cos(theta)``.
* Coast-down coefficients ``F0 + F1*v + F2*v**2`` (the certification convention), measured
  on a level road: ``C0, C1, C2 = F0, F1, F2`` and ``c = 1``; only the grade force is added.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.checks import require_finite, require_non_negative, require_positive
from core.errors import VehicleError
from core.units import MPH_M_S, STANDARD_GRAVITY_M_S2

__all__ = [
    "RADIAL_ROLLING_COEFFICIENT",
    "RADIAL_ROLLING_SPEED_COEFFICIENT_S_M",
    "RoadLoad",
    "RoadLoadForm",
    "gradeability_percent",
]

FloatArray = NDArray[np.float64]

RADIAL_ROLLING_COEFFICIENT = 0.0041
"""Speed-independent rolling coefficient of radial tires, ``f0`` [-] (Gillespie ch. 4)."""
RADIAL_ROLLING_SPEED_COEFFICIENT_S_M = 0.000041 / MPH_M_S
"""Speed coefficient of radial tires, ``f1`` [s/m]: 0.000041 per mph (Gillespie ch. 4)."""


class RoadLoadForm(enum.Enum):
    """How a road load was specified; decides whether ``C0`` and ``C1`` follow the grade."""

    CONSTANT_ROLLING = "constant_rolling"
    SPEED_DEPENDENT_ROLLING = "speed_dependent_rolling"
    COAST_DOWN = "coast_down"


@dataclass(frozen=True)
class RoadLoad:
    """Resisting force of a vehicle as a polynomial in road speed plus the grade force.

    Build it with one of the constructors, :meth:`from_constant_rolling`,
    :meth:`from_speed_dependent_rolling` or :meth:`from_coast_down`; the module docstring
    gives the coefficients of each form.

    Attributes
    ----------
    form : RoadLoadForm
        How the load was specified.
    mass_kg : float
        Vehicle mass [kg], > 0.
    constant_n : float
        Level-road speed-independent term ``C0`` [N], >= 0.
    linear_n_s_m : float
        Level-road term proportional to speed ``C1`` [N*s/m], >= 0.
    quadratic_n_s2_m2 : float
        Term proportional to speed squared ``C2`` [N*s^2/m^2], >= 0.
    grade_percent : float
        Road grade, ``100*tan(theta)`` [%]; positive uphill, negative downhill.
    """

    form: RoadLoadForm
    mass_kg: float
    constant_n: float
    linear_n_s_m: float
    quadratic_n_s2_m2: float
    grade_percent: float = 0.0

    def __post_init__(self) -> None:
        require_positive(self.mass_kg, "mass_kg", VehicleError)
        require_non_negative(self.constant_n, "constant_n", VehicleError)
        require_non_negative(self.linear_n_s_m, "linear_n_s_m", VehicleError)
        require_non_negative(self.quadratic_n_s2_m2, "quadratic_n_s2_m2", VehicleError)
        require_finite(self.grade_percent, "grade_percent", VehicleError)

    @classmethod
    def from_constant_rolling(
        cls,
        mass_kg: float,
        drag_area_m2: float,
        air_density_kg_m3: float,
        rolling_coefficient: float,
        grade_percent: float = 0.0,
    ) -> RoadLoad:
        """Aerodynamic drag ``0.5*rho*CdA*v**2`` plus rolling resistance ``fr*m*g*cos(theta)``.

        Parameters
        ----------
        mass_kg : float
            Vehicle mass [kg], > 0.
        drag_area_m2 : float
            Drag coefficient times frontal area, ``Cd*A`` [m^2], >= 0.
        air_density_kg_m3 : float
            Air density [kg/m^3], > 0.
        rolling_coefficient : float
            Rolling-resistance coefficient ``fr`` [-], >= 0.
        grade_percent : float, optional
            Road grade [%].

        Returns
        -------
        RoadLoad

        Examples
        --------
        >>> load = RoadLoad.from_constant_rolling(1000.0, 0.6, 1.2, 0.01)
        >>> load.force_n([0.0, 10.0]).round(5).tolist()
        [98.0665, 134.0665]
        """
        require_positive(mass_kg, "mass_kg", VehicleError)
        require_non_negative(drag_area_m2, "drag_area_m2", VehicleError)
        require_positive(air_density_kg_m3, "air_density_kg_m3", VehicleError)
        require_non_negative(rolling_coefficient, "rolling_coefficient", VehicleError)
        return cls(
            form=RoadLoadForm.CONSTANT_ROLLING,
            mass_kg=mass_kg,
            constant_n=rolling_coefficient * mass_kg * STANDARD_GRAVITY_M_S2,
            linear_n_s_m=0.0,
            quadratic_n_s2_m2=0.5 * air_density_kg_m3 * drag_area_m2,
            grade_percent=grade_percent,
        )

    @classmethod
    def from_speed_dependent_rolling(
        cls,
        mass_kg: float,
        drag_area_m2: float,
        air_density_kg_m3: float,
        rolling_coefficient: float = RADIAL_ROLLING_COEFFICIENT,
        rolling_speed_coefficient_s_m: float = RADIAL_ROLLING_SPEED_COEFFICIENT_S_M,
        grade_percent: float = 0.0,
    ) -> RoadLoad:
        """Aerodynamic drag plus rolling resistance with ``fr = f0 + f1*v``.

        Parameters
        ----------
        mass_kg : float
            Vehicle mass [kg], > 0.
        drag_area_m2 : float
            Drag coefficient times frontal area, ``Cd*A`` [m^2], >= 0.
        air_density_kg_m3 : float
            Air density [kg/m^3], > 0.
        rolling_coefficient : float, optional
            ``f0`` [-], >= 0; defaults to Gillespie's radial-tire value 0.0041.
        rolling_speed_coefficient_s_m : float, optional
            ``f1`` [s/m], >= 0; defaults to Gillespie's 0.000041 per mph in SI.
        grade_percent : float, optional
            Road grade [%].

        Returns
        -------
        RoadLoad
        """
        require_positive(mass_kg, "mass_kg", VehicleError)
        require_non_negative(drag_area_m2, "drag_area_m2", VehicleError)
        require_positive(air_density_kg_m3, "air_density_kg_m3", VehicleError)
        require_non_negative(rolling_coefficient, "rolling_coefficient", VehicleError)
        require_non_negative(
            rolling_speed_coefficient_s_m, "rolling_speed_coefficient_s_m", VehicleError
        )
        weight_n = mass_kg * STANDARD_GRAVITY_M_S2
        return cls(
            form=RoadLoadForm.SPEED_DEPENDENT_ROLLING,
            mass_kg=mass_kg,
            constant_n=rolling_coefficient * weight_n,
            linear_n_s_m=rolling_speed_coefficient_s_m * weight_n,
            quadratic_n_s2_m2=0.5 * air_density_kg_m3 * drag_area_m2,
            grade_percent=grade_percent,
        )

    @classmethod
    def from_coast_down(
        cls,
        mass_kg: float,
        f0_n: float,
        f1_n_s_m: float,
        f2_n_s2_m2: float,
        grade_percent: float = 0.0,
    ) -> RoadLoad:
        """Level-road coast-down coefficients ``F0 + F1*v + F2*v**2`` plus the grade force.

        Parameters
        ----------
        mass_kg : float
            Vehicle mass [kg], > 0; used for the grade force only.
        f0_n : float
            ``F0`` [N], >= 0.
        f1_n_s_m : float
            ``F1`` [N*s/m], >= 0.
        f2_n_s2_m2 : float
            ``F2`` [N*s^2/m^2], >= 0.
        grade_percent : float, optional
            Road grade [%].

        Returns
        -------
        RoadLoad
        """
        require_positive(mass_kg, "mass_kg", VehicleError)
        require_non_negative(f0_n, "f0_n", VehicleError)
        require_non_negative(f1_n_s_m, "f1_n_s_m", VehicleError)
        require_non_negative(f2_n_s2_m2, "f2_n_s2_m2", VehicleError)
        return cls(
            form=RoadLoadForm.COAST_DOWN,
            mass_kg=mass_kg,
            constant_n=f0_n,
            linear_n_s_m=f1_n_s_m,
            quadratic_n_s2_m2=f2_n_s2_m2,
            grade_percent=grade_percent,
        )

    @property
    def grade_angle_rad(self) -> float:
        """Road angle ``theta = atan(grade_percent/100)`` [rad]."""
        return math.atan(self.grade_percent / 100.0)

    @property
    def grade_force_n(self) -> float:
        """Grade force ``m*g*sin(theta)`` [N]; negative downhill."""
        return self.mass_kg * STANDARD_GRAVITY_M_S2 * math.sin(self.grade_angle_rad)

    @property
    def rolling_normal_factor(self) -> float:
        """What the level-road ``C0`` and ``C1`` terms are multiplied by on the grade [-]:
        ``cos(theta)`` for rolling resistance, 1 for coast-down coefficients."""
        return 1.0 if self.form is RoadLoadForm.COAST_DOWN else math.cos(self.grade_angle_rad)

    def rolling_resistance_n(self, speed_m_s: FloatArray) -> FloatArray:
        """The terms acting at the contact patch, ``c*(C0 + C1*v)`` [N], shape of the speeds
        (for coast-down coefficients, ``F0 + F1*v``)."""
        result: FloatArray = self.rolling_normal_factor * (
            self.constant_n + self.linear_n_s_m * speed_m_s
        )
        return result

    def force_n(self, speed_m_s: ArrayLike) -> FloatArray:
        """Total resisting force at each road speed.

        Parameters
        ----------
        speed_m_s : array_like, shape (n,)
            Road speed [m/s], >= 0.

        Returns
        -------
        ndarray, shape (n,)
            Resisting force [N]: rolling (or coast-down) terms, drag and grade force.

        Raises
        ------
        VehicleError
            If a speed is negative or not finite.
        """
        speed = np.asarray(speed_m_s, dtype=np.float64)
        flat = speed.reshape(-1)
        # two reductions see any NaN, infinity or negative speed; only then is it located
        if flat.size and not (float(flat.min()) >= 0.0 and float(flat.max()) < math.inf):
            index = int(np.flatnonzero(~np.isfinite(flat) | (flat < 0.0))[0])
            where = "speed_m_s" if speed.ndim == 0 else f"speed_m_s[{index}]"
            raise VehicleError(
                f"`{where}` must be finite and >= 0, got {flat[index]:g}", parameter=where
            )
        normal = 1.0 if self.form is RoadLoadForm.COAST_DOWN else math.cos(self.grade_angle_rad)
        grade = self.grade_force_n
        # normal*(C0 + C1*v) + F2*v**2 + grade, term by term in place (on a level road the
        # factor 1 and the grade force 0 change nothing and are left out)
        result: FloatArray = self.linear_n_s_m * speed
        result += self.constant_n
        if normal != 1.0:
            result *= normal
        drag = speed * speed
        drag *= self.quadratic_n_s2_m2
        result += drag
        if grade != 0.0:
            result += grade
        return result


def gradeability_percent(
    net_force_n: ArrayLike, mass_kg: float, rolling_coefficient: float = 0.0
) -> FloatArray:
    """Steepest grade on which a spare tractive force still holds the speed.

    Solves ``F = m*g*(sin(theta) + fr*cos(theta))`` for ``theta`` and returns
    ``100*tan(theta)``. With the default ``rolling_coefficient = 0`` the caller has already
    taken rolling resistance (and drag) out of ``net_force_n`` and the result is
    ``100*tan(asin(F/(m*g)))``; give ``fr`` instead to let the rolling resistance shrink
    with ``cos(theta)`` on the slope. Writing ``phi = atan(fr)``, the solution is
    ``theta = asin(F/(m*g*sqrt(1 + fr**2))) - phi``.

    A force at or above ``m*g*sqrt(1 + fr**2)`` holds speed on any slope and gives
    ``+inf``; a force at or below ``-m*g`` (no slope, however steep downhill, supplies it)
    gives ``-inf``. A negative force gives a negative (downhill) grade: the gentlest descent
    on which the vehicle can hold its speed. The result is the first grade, climbing from
    level, at which the resistance reaches ``F``; the traction limit is not considered.

    Parameters
    ----------
    net_force_n : array_like, shape (n,)
        Spare tractive force at the speed of interest [N]: tractive force less drag, and
        less rolling resistance when ``rolling_coefficient`` is 0.
    mass_kg : float
        Vehicle mass [kg], > 0.
    rolling_coefficient : float, optional
        Rolling-resistance coefficient ``fr`` [-], >= 0.

    Returns
    -------
    ndarray, shape (n,)
        Grade [%], ``100*tan(theta)``.

    Examples
    --------
    >>> gradeability_percent([0.0, 9.80665 * 1000 / 2**0.5], 1000.0).round(6).tolist()
    [0.0, 100.0]
    """
    require_positive(mass_kg, "mass_kg", VehicleError)
    require_non_negative(rolling_coefficient, "rolling_coefficient", VehicleError)
    force = np.asarray(net_force_n, dtype=np.float64)
    flat = force.reshape(-1)
    bad = np.flatnonzero(np.isnan(flat))
    if bad.size:
        index = int(bad[0])
        where = "net_force_n" if force.ndim == 0 else f"net_force_n[{index}]"
        raise VehicleError(f"`{where}` must not be NaN", parameter=where)
    weight_n = mass_kg * STANDARD_GRAVITY_M_S2
    phi = math.atan(rolling_coefficient)
    ratio = force / (weight_n * math.hypot(1.0, rolling_coefficient))
    theta = np.arcsin(np.clip(ratio, -1.0, 1.0)) - phi
    grade = 100.0 * np.tan(theta)
    grade = np.where(ratio >= 1.0, np.inf, grade)
    result: FloatArray = np.where(force <= -weight_n, -np.inf, grade)
    return result
