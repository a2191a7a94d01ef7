"""Tests of the torque converter in the drivetrain: tables, shift plan and shift search.

References: the converter definitions K = N_in/sqrt(T_in), SR = N_out/N_in, TR = T_out/T_in
(SAE J641 terminology, memory), the stall check value of REFERENCES.md (K 144
rpm/sqrt(lbf*ft) on a flat 300 lbf*ft curve stalls at 2494.2 rpm), wheel torque = engine
torque x converter torque ratio x gear x final drive x efficiency (Gillespie ch. 2, common
practice), and the search's own candidates (it is never slower than any plan it tried).
Every car here is invented demo data.
"""

from __future__ import annotations

import dataclasses
import math
import os
from typing import Any

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Coupling, Launch, Vehicle
from core.converter.drive import ConverterDrive, converter_input
from core.converter.tables import TorqueConverter
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import torque_curve_from_torque
from core.runs.drive_model import DriveModel, drive_model
from core.runs.milestones import time_at_distance
from core.runs.performance import optimal_shift_rpm
from core.runs.simulate import simulate_run
from core.shifts import plan as plan_module
from core.shifts.best import ShiftChoice, best_shifts
from core.shifts.plan import shift_plan

LBF_FT_IN_NM = 1.3558179483314004  # scipy.constants: lbf * foot
K_US = 144.0  # rpm/sqrt(lbf*ft), REFERENCES.md
TORQUE_NM = 300.0 * LBF_FT_IN_NM
CURVE = torque_curve_from_torque([1000.0, 3500.0, 6000.0], [TORQUE_NM] * 3)
CONVERTER = TorqueConverter.from_stall(2.0, stall_k_factor=K_US / math.sqrt(LBF_FT_IN_NM))
DRIVETRAIN = make_drivetrain([2.8, 1.6, 1.0], 3.5, efficiency=0.9)
TIRE = tire_from_diameter(0.7)
QUARTER_MILE_M = 402.336
EXAMPLES = max(int(os.environ.get("GEARWORK_FUZZ_EXAMPLES", "48")) // 8, 1)


def test_converter_at_stall_runs_the_engine_at_the_reference_stall_speed() -> None:
    # REFERENCES.md: K 144 rpm/sqrt(lbf*ft) on a flat 300 lbf*ft curve stalls at 2494.2 rpm
    # (n = K*sqrt(T)); the output is the stall torque ratio times the engine torque
    out = converter_input(ConverterDrive(CONVERTER), CURVE, 6000.0, 0, np.array([0.0]))
    assert_allclose(out.engine_rpm, [2494.2], rtol=2e-5)
    assert_allclose(out.torque_ratio, [2.0], rtol=1e-9)
    assert_allclose(out.torque_nm, [2.0 * TORQUE_NM], rtol=1e-9)


def test_converter_tables_count_the_torque_ratio_at_the_speed_ratio_it_runs_at() -> None:
    # SAE J641 definitions: at each row the engine speed n and turbine speed n_t give
    # SR = n_t/n, the converter absorbs T = (n/K(SR))^2 and passes TR(SR)*T on; wheel torque
    # = TR*T*gear*final*efficiency (Gillespie ch. 2), tractive force = wheel torque / r
    plan = shift_plan(CURVE, DRIVETRAIN, TIRE, converter=ConverterDrive(CONVERTER))
    for table in plan.gears:
        assert table.engine_rpm is not None and table.torque_ratio is not None
        # rows where the engine is not yet held at the rev limit (there the converter passes
        # only what it absorbs at the limiter)
        free = table.engine_rpm < 6000.0 * (1.0 - 1e-9)
        assert free.sum() >= 2
        sr = table.rpm[free] / table.engine_rpm[free]
        k = CONVERTER.k_factor_at(sr)
        assert_allclose((table.engine_rpm[free] / k) ** 2, TORQUE_NM, rtol=1e-6)
        assert_allclose(table.torque_ratio[free], CONVERTER.torque_ratio_at(sr), rtol=1e-6)
        expected = (
            table.torque_ratio[free]
            * TORQUE_NM
            * table.overall_ratio
            * 0.9
            / TIRE.rolling_radius_m
        )
        assert_allclose(table.tractive_force_n[free], expected, rtol=1e-6)


def test_a_lockup_gear_passes_the_engine_torque_one_to_one() -> None:
    # locked, engine and turbine turn together and TR = 1 (definition of lock-up)
    plan = shift_plan(CURVE, DRIVETRAIN, TIRE, converter=ConverterDrive(CONVERTER, frozenset({3})))
    top = plan.gears[2]
    assert top.engine_rpm is not None and top.torque_ratio is not None
    assert_allclose(top.engine_rpm, top.rpm, rtol=0)
    assert_allclose(top.torque_ratio, 1.0, rtol=0)
    plain = shift_plan(CURVE, DRIVETRAIN, TIRE).gears[2]
    assert_allclose(top.tractive_force_n, plain.tractive_force_n, rtol=1e-12)


def test_converter_plan_shifts_on_engine_rpm_and_counts_the_next_gears_multiplication() -> None:
    # with a flat curve and no converter the wheel force of the lower gear is always the
    # larger (force ~ ratio), so the plan shifts at the rev limit; with a converter the next
    # gear multiplies torque at the low speed ratio it lands at, and each shift rpm is the
    # engine speed at the shift's turbine speed
    drive = ConverterDrive(CONVERTER)
    plain = shift_plan(CURVE, DRIVETRAIN, TIRE)
    assert all(s.shift_rpm == 6000.0 for s in plain.shifts)
    plan = shift_plan(CURVE, DRIVETRAIN, TIRE, converter=drive)
    for i, s in enumerate(plan.shifts):
        turbine = (
            s.shift_speed_m_s
            * DRIVETRAIN.overall_ratios[i]
            / (TIRE.rolling_radius_m * 2.0 * math.pi / 60.0)
        )
        engine = converter_input(drive, CURVE, 6000.0, i, np.array([turbine])).engine_rpm
        assert_allclose(s.shift_rpm, engine[0], rtol=1e-9)
        # the next gear's multiplied force overtakes before the rev-limit speed: a true
        # crossover, where the two forces are equal (scan cell 1/512 of the range wide)
        assert s.reason.value == "crossover" and s.crossings == 1
        assert turbine < 6000.0
        assert_allclose(s.force_after_n, s.force_before_n, rtol=2e-3)


def test_a_converter_plans_coincident_band_is_reported_in_engine_rpm(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # the search works in turbine speed; every rpm the plan reports (shift, overtakes and
    # the band where both gears pull alike) is the engine speed the converter settles at
    # there. The band is planted in the search's answer: a real one needs two gears whose
    # multiplied forces agree to 1e-4 over 2 % of their range.
    drive = ConverterDrive(CONVERTER)
    band = (2500.0, 3000.0)  # turbine speed [rpm], gear 1 slipping there

    def with_band(*args: Any, **kwargs: Any) -> tuple[ShiftChoice, ...]:
        found = best_shifts(*args, **kwargs)
        return (dataclasses.replace(found[0], coincident_rpm=band), *found[1:])

    monkeypatch.setattr(plan_module, "best_shifts", with_band)
    plan = shift_plan(CURVE, DRIVETRAIN, TIRE, converter=drive)
    engine = converter_input(drive, CURVE, 6000.0, 0, np.array(band)).engine_rpm
    assert engine[0] > band[0] and engine[1] > band[1]  # slipping: engine ahead of turbine
    got = plan.shifts[0].coincident_rpm
    assert got is not None
    assert_allclose(got, engine, rtol=1e-12)
    (note,) = [n for n in plan.notices if n.code == "coincident_force"]
    assert f"from {engine[0]:.0f} to {engine[1]:.0f} rpm" in note.message


def pickup(mu: float = 0.8) -> DriveModel:
    """A heavy four-speed automatic pickup (invented)."""
    mass = 2540.0
    load = RoadLoad.from_speed_dependent_rolling(mass, 1.11, 1.2)
    geometry = AxleGeometry.from_front_weight_share(3.56, 0.76, 0.57)
    vehicle = Vehicle(mass, load, geometry, DriveLayout.REAR, mu)
    curve = torque_curve_from_torque(
        [1000.0, 2000.0, 3000.0, 4000.0, 5000.0, 5500.0],
        [407.0, 515.0, 549.0, 522.0, 447.0, 393.0],
    )
    converter = TorqueConverter.from_stall(
        2.1, stall_speed_rpm=2200.0, stall_engine_torque_nm=530.0
    )
    launch = Launch(
        coupling=Coupling.CONVERTER,
        converter=converter,
        lockup_gears=frozenset({3, 4}),
        shift_time_s=0.35,
    )
    drivetrain = make_drivetrain([3.06, 1.63, 1.0, 0.7], 3.73, efficiency=0.85)
    return drive_model(curve, drivetrain, tire_from_diameter(0.804), vehicle, launch)


def quarter_time(model: DriveModel, rpm: np.ndarray) -> float:
    run = simulate_run(model, rpm, cover_distance_m=QUARTER_MILE_M + 0.3048)
    end = time_at_distance(run, QUARTER_MILE_M + 0.3048)
    start = time_at_distance(run, 0.3048)
    assert end is not None and start is not None
    return end - start


def test_the_shift_search_of_an_automatic_is_never_slower_than_any_seed() -> None:
    # the search times its seeds first (the plan, the rev limit, the wheel-force crossover,
    # net acceleration): its answer is the quickest of them or better, and says which won
    model = pickup()
    limit = np.full(3, model.rev_limit_rpm)
    best = optimal_shift_rpm(
        model,
        limit,
        start_speed_m_s=0.0,
        rollout_m=0.3048,
        finish_distance_m=QUARTER_MILE_M,
        finish_speed_m_s=None,
        max_evaluations=20,
        initial_name="custom",
    )
    assert best.seeds and best.won_by in {name for name, _ in best.seeds} | {"search"}
    assert best.time_s <= min(t for _, t in best.seeds)
    assert_allclose(best.time_s, quarter_time(model, best.shift_rpm), rtol=1e-12)
    assert best.time_s <= quarter_time(model, limit)


@settings(max_examples=EXAMPLES, derandomize=True, database=None, deadline=None)
@given(
    stall_rpm=st.floats(1800.0, 3200.0),
    stall_ratio=st.floats(1.6, 2.6),
    mass=st.floats(1200.0, 3000.0),
    lockup=st.sets(st.integers(1, 3), max_size=3),
    shift_time=st.floats(0.0, 0.5),
)
def test_for_random_converter_cars_the_optimised_plan_is_never_slower_than_the_rev_limit(
    stall_rpm: float, stall_ratio: float, mass: float, lockup: set[int], shift_time: float
) -> None:
    # property: the rev-limit plan is one of the search's seeds, so the optimised quarter
    # mile is never slower than shifting at the rev limit (fixed seed, few examples; `make
    # fuzz` runs more, GEARWORK_FUZZ_EXAMPLES / 8)
    curve = torque_curve_from_torque(
        [1000.0, 3000.0, 5000.0, 6000.0], [300.0, 380.0, 340.0, 280.0]
    )
    converter = TorqueConverter.from_stall(
        stall_ratio,
        stall_speed_rpm=stall_rpm,
        stall_engine_torque_nm=float(curve.torque_scalar(stall_rpm)),
    )
    launch = Launch(
        coupling=Coupling.CONVERTER,
        converter=converter,
        lockup_gears=frozenset(lockup),
        shift_time_s=shift_time,
    )
    load = RoadLoad.from_speed_dependent_rolling(mass, 0.7, 1.2)
    geometry = AxleGeometry.from_front_weight_share(2.8, 0.55, 0.55)
    vehicle = Vehicle(mass, load, geometry, DriveLayout.REAR, 1.0)
    model = drive_model(
        curve, make_drivetrain([2.9, 1.7, 1.0], 3.4, efficiency=0.88), TIRE, vehicle, launch
    )
    limit = np.full(2, model.rev_limit_rpm)
    best = optimal_shift_rpm(
        model,
        limit,
        start_speed_m_s=0.0,
        rollout_m=0.3048,
        finish_distance_m=QUARTER_MILE_M,
        finish_speed_m_s=None,
        max_evaluations=10,
    )
    assert best.time_s <= quarter_time(model, limit) * (1.0 + 1e-12)
