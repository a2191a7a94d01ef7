"""Tests of core.converter.tables: torque-converter tables and the stall-data builder."""

from __future__ import annotations

import math
import re
from collections.abc import Callable

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy import constants

from core.converter.tables import TorqueConverter
from core.errors import VehicleError

LBF_FT_IN_NM = constants.pound_force * constants.foot  # scipy.constants


def test_us_k_factor_converts_to_the_si_check_value() -> None:
    # REFERENCES.md: 144 rpm/sqrt(lbf*ft) = 123.67 rpm/sqrt(N*m); K scales as 1/sqrt(torque).
    assert_allclose(144.0 / math.sqrt(LBF_FT_IN_NM), 123.67, rtol=5e-5)


def test_from_stall_torque_ratio_falls_linearly_to_one_at_coupling() -> None:
    converter = TorqueConverter.from_stall(2.2, stall_k_factor=120.0, coupling_speed_ratio=0.85)
    ratio = np.array([0.0, 0.2125, 0.425, 0.85, 0.9, 1.0])
    expected = np.array([2.2, 1.9, 1.6, 1.0, 1.0, 1.0])
    assert_allclose(converter.torque_ratio_at(ratio), expected, rtol=1e-12)


def test_from_stall_k_factor_rises_by_the_given_share_up_to_coupling() -> None:
    converter = TorqueConverter.from_stall(
        2.0, stall_k_factor=120.0, coupling_speed_ratio=0.8, k_factor_rise=0.15
    )
    k = converter.k_factor_at([0.0, 0.4, 0.8])
    # Quadratic rise sampled at 17 nodes: the midpoint is a node, so it is exact too.
    assert_allclose(k, [120.0, 120.0 * 1.0375, 120.0 * 1.15], rtol=1e-12)
    assert np.all(np.diff(converter.k_factor) >= 0.0)


def test_from_stall_fluid_coupling_phase_k_climbs_to_ten_times_coupling_value() -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=100.0, coupling_speed_ratio=0.9)
    assert_allclose(converter.k_factor_at([1.0]), [10.0 * 110.0], rtol=1e-12)


def test_from_stall_speed_and_torque_give_the_stall_k_factor() -> None:
    # Definition (SAE J641 terminology, memory): K = N_in / sqrt(T_in).
    converter = TorqueConverter.from_stall(
        2.0, stall_speed_rpm=2400.0, stall_engine_torque_nm=400.0
    )
    assert_allclose(converter.k_factor[0], 120.0, rtol=1e-14)


def test_efficiency_is_speed_ratio_times_torque_ratio() -> None:
    # Standard definition: efficiency = SR*TR; at the coupling point it equals SR_c.
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=120.0, coupling_speed_ratio=0.88)
    ratio = np.linspace(0.0, 1.0, 11)
    assert_allclose(
        converter.efficiency_at(ratio), ratio * converter.torque_ratio_at(ratio), rtol=1e-15
    )
    assert_allclose(converter.efficiency_at([0.88]), [0.88], rtol=1e-12)


def test_lockup_choice_sets_the_lockup_speed_ratio() -> None:
    locking = TorqueConverter.from_stall(2.0, stall_k_factor=120.0, coupling_speed_ratio=0.86)
    open_ = TorqueConverter.from_stall(2.0, stall_k_factor=120.0, lockup=False)
    assert locking.lockup_speed_ratio == 0.86
    assert open_.lockup_speed_ratio is None


def test_tables_are_copied_and_read_only() -> None:
    source = np.array([150.0, 160.0, 400.0])
    converter = TorqueConverter(np.array([0.0, 0.85, 1.0]), source, np.array([2.0, 1.0, 1.0]))
    source[0] = 1.0
    assert converter.k_factor[0] == 150.0
    with pytest.raises(ValueError, match="read-only"):
        converter.k_factor[0] = 2.0


def test_table_converter_interpolates_linearly() -> None:
    converter = TorqueConverter(
        np.array([0.0, 0.5, 1.0]), np.array([100.0, 120.0, 300.0]), np.array([2.4, 1.4, 1.0])
    )
    assert_allclose(converter.k_factor_at([0.25, 0.75]), [110.0, 210.0], rtol=1e-14)
    assert_allclose(converter.torque_ratio_at([0.25, 0.75]), [1.9, 1.2], rtol=1e-14)


SR = [0.0, 0.5, 1.0]
K = [100.0, 110.0, 300.0]
TR = [2.0, 1.3, 1.0]


@pytest.mark.parametrize(
    ("call", "parameter", "message"),
    [
        pytest.param(
            lambda: TorqueConverter(np.array([0.1, 0.5, 1.0]), np.array(K), np.array(TR)),
            "speed_ratio",
            "must run from 0 to 1",
            id="speed-ratio-not-from-zero",
        ),
        pytest.param(
            lambda: TorqueConverter(np.array([0.0, 0.5, 0.9]), np.array(K), np.array(TR)),
            "speed_ratio",
            "must run from 0 to 1",
            id="speed-ratio-not-to-one",
        ),
        pytest.param(
            lambda: TorqueConverter(
                np.array([0.0, 0.6, 0.6, 1.0]), np.array([*K, 1.0]), np.array([*TR, 1.0])
            ),
            "speed_ratio[2]",
            "must be > the value before it",
            id="speed-ratio-repeated",
        ),
        pytest.param(
            lambda: TorqueConverter(np.array(SR), np.array([100.0, -1.0, 300.0]), np.array(TR)),
            "k_factor[1]",
            "must be finite and > 0",
            id="k-factor-negative",
        ),
        pytest.param(
            lambda: TorqueConverter(np.array(SR), np.array(K), np.array([2.0, 1.0])),
            "torque_ratio",
            "must have 3 values",
            id="torque-ratio-short",
        ),
        pytest.param(
            lambda: TorqueConverter(np.array(SR), np.array(K), np.array([2.0, math.nan, 1.0])),
            "torque_ratio[1]",
            "must be finite",
            id="torque-ratio-nan",
        ),
        pytest.param(
            lambda: TorqueConverter(np.array(SR), np.array(K), np.array(TR), 0.0),
            "lockup_speed_ratio",
            "must lie in",
            id="lockup-at-zero",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(0.9, stall_k_factor=120.0),
            "stall_torque_ratio",
            "must be finite and >= 1",
            id="stall-torque-ratio-below-one",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(2.0, stall_k_factor=120.0, coupling_speed_ratio=1),
            "coupling_speed_ratio",
            "must lie in",
            id="coupling-at-one",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(2.0, stall_k_factor=120.0, k_factor_rise=-0.1),
            "k_factor_rise",
            "must be finite and >= 0",
            id="k-rise-negative",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(2.0),
            "stall_k_factor",
            "must be given",
            id="no-stall-data",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(2.0, stall_speed_rpm=2400.0),
            "stall_k_factor",
            "must be given",
            id="stall-speed-without-torque",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(2.0, stall_k_factor=120.0, stall_speed_rpm=2400.0),
            "stall_k_factor",
            "cannot be combined",
            id="k-factor-and-stall-speed",
        ),
        pytest.param(
            lambda: TorqueConverter.from_stall(
                2.0, stall_speed_rpm=2400.0, stall_engine_torque_nm=0.0
            ),
            "stall_engine_torque_nm",
            "must be finite and > 0",
            id="stall-torque-zero",
        ),
    ],
)
def test_invalid_converter_data_is_rejected(
    call: Callable[[], object], parameter: str, message: str
) -> None:
    with pytest.raises(VehicleError, match=f"`{re.escape(parameter)}`.*{message}") as info:
        call()
    assert info.value.parameter == parameter
