"""gearwork core: pure gearing, shift-point and vehicle computation in SI units.

No web framework, no I/O, no module state. Functions take floats, NumPy arrays or frozen
dataclasses and return frozen dataclasses.
"""

from __future__ import annotations

from core import checks as _checks
from core import errors as _errors
from core import notices as _notices
from core import units as _units
from core.air import altimeter as _air_altimeter
from core.air import atmosphere as _air_atmosphere
from core.air import weather as _air_weather
from core.air.altimeter import *  # noqa: F403
from core.air.atmosphere import *  # noqa: F403
from core.air.weather import *  # noqa: F403
from core.car import calibration as _car_calibration
from core.car import coast_down as _car_coast_down
from core.car import coast_down_reference as _car_coast_down_reference
from core.car import gradeability as _car_gradeability
from core.car import inertia as _car_inertia
from core.car import road_load as _car_road_load
from core.car import traction as _car_traction
from core.car import vehicle as _car_vehicle
from core.car.calibration import *  # noqa: F403
from core.car.coast_down import *  # noqa: F403
from core.car.coast_down_reference import *  # noqa: F403
from core.car.gradeability import *  # noqa: F403
from core.car.inertia import *  # noqa: F403
from core.car.road_load import *  # noqa: F403
from core.car.traction import *  # noqa: F403
from core.car.vehicle import *  # noqa: F403
from core.checks import *  # noqa: F403
from core.choice import batch_drive as _choice_batch_drive
from core.choice import setups as _choice_setups
from core.choice import sweep as _choice_sweep
from core.choice import sweep_optimum as _choice_sweep_optimum
from core.choice import sweep_spec as _choice_sweep_spec
from core.choice.batch_drive import *  # noqa: F403
from core.choice.setups import *  # noqa: F403
from core.choice.sweep import *  # noqa: F403
from core.choice.sweep_optimum import *  # noqa: F403
from core.choice.sweep_spec import *  # noqa: F403
from core.converter import drive as _converter_drive
from core.converter import matching as _converter_matching
from core.converter import operating_map as _converter_operating_map
from core.converter import tables as _converter_tables
from core.converter.drive import *  # noqa: F403
from core.converter.matching import *  # noqa: F403
from core.converter.operating_map import *  # noqa: F403
from core.converter.tables import *  # noqa: F403
from core.driveline import chassis as _driveline_chassis
from core.driveline import drivetrain as _driveline_drivetrain
from core.driveline import gearing as _driveline_gearing
from core.driveline import landing as _driveline_landing
from core.driveline import spacing as _driveline_spacing
from core.driveline import speedometer as _driveline_speedometer
from core.driveline import tires as _driveline_tires
from core.driveline.chassis import *  # noqa: F403
from core.driveline.drivetrain import *  # noqa: F403
from core.driveline.gearing import *  # noqa: F403
from core.driveline.landing import *  # noqa: F403
from core.driveline.spacing import *  # noqa: F403
from core.driveline.speedometer import *  # noqa: F403
from core.driveline.tires import *  # noqa: F403
from core.dyno import columns as _dyno_columns
from core.dyno import file as _dyno_file
from core.dyno import numbers as _dyno_numbers
from core.dyno import parse as _dyno_parse
from core.dyno import road as _dyno_road
from core.dyno import rows as _dyno_rows
from core.dyno import values as _dyno_values
from core.dyno.columns import *  # noqa: F403
from core.dyno.file import *  # noqa: F403
from core.dyno.numbers import *  # noqa: F403
from core.dyno.parse import *  # noqa: F403
from core.dyno.road import *  # noqa: F403
from core.dyno.rows import *  # noqa: F403
from core.dyno.values import *  # noqa: F403
from core.engine import correction as _engine_correction
from core.engine import curves as _engine_curves
from core.engine import pchip as _engine_pchip
from core.engine import reference_air as _engine_reference_air
from core.engine.correction import *  # noqa: F403
from core.engine.curves import *  # noqa: F403
from core.engine.pchip import *  # noqa: F403
from core.engine.reference_air import *  # noqa: F403
from core.errors import *  # noqa: F403
from core.logs import check as _logs_check
from core.logs import crossover as _logs_crossover
from core.logs import header as _logs_header
from core.logs import pass_data as _logs_pass_data
from core.logs import shift as _logs_shift
from core.logs import signal as _logs_signal
from core.logs import spin as _logs_spin
from core.logs import text as _logs_text
from core.logs.check import *  # noqa: F403
from core.logs.crossover import *  # noqa: F403
from core.logs.header import *  # noqa: F403
from core.logs.pass_data import *  # noqa: F403
from core.logs.shift import *  # noqa: F403
from core.logs.signal import *  # noqa: F403
from core.logs.spin import *  # noqa: F403
from core.logs.text import *  # noqa: F403
from core.notices import *  # noqa: F403
from core.readers import delimited as _readers_delimited
from core.readers import encoding as _readers_encoding
from core.readers.delimited import *  # noqa: F403
from core.readers.encoding import *  # noqa: F403
from core.runs import batch as _runs_batch
from core.runs import batch_timing as _runs_batch_timing
from core.runs import drive_model as _runs_drive_model
from core.runs import integrator as _runs_integrator
from core.runs import milestones as _runs_milestones
from core.runs import performance as _runs_performance
from core.runs import report as _runs_report
from core.runs import run_blocks as _runs_run_blocks
from core.runs import simulate as _runs_simulate
from core.runs.batch import *  # noqa: F403
from core.runs.batch_timing import *  # noqa: F403
from core.runs.drive_model import *  # noqa: F403
from core.runs.integrator import *  # noqa: F403
from core.runs.milestones import *  # noqa: F403
from core.runs.performance import *  # noqa: F403
from core.runs.report import *  # noqa: F403
from core.runs.run_blocks import *  # noqa: F403
from core.runs.simulate import *  # noqa: F403
from core.shifts import best as _shifts_best
from core.shifts import overtake as _shifts_overtake
from core.shifts import pattern as _shifts_pattern
from core.shifts import plan as _shifts_plan
from core.shifts import scan as _shifts_scan
from core.shifts import search as _shifts_search
from core.shifts import shift_rpm as _shifts_shift_rpm
from core.shifts import window as _shifts_window
from core.shifts.best import *  # noqa: F403
from core.shifts.overtake import *  # noqa: F403
from core.shifts.pattern import *  # noqa: F403
from core.shifts.plan import *  # noqa: F403
from core.shifts.scan import *  # noqa: F403
from core.shifts.search import *  # noqa: F403
from core.shifts.shift_rpm import *  # noqa: F403
from core.shifts.window import *  # noqa: F403
from core.units import *  # noqa: F403

__all__ = []
__all__ += _air_altimeter.__all__
__all__ += _air_atmosphere.__all__
__all__ += _air_weather.__all__
__all__ += _car_calibration.__all__
__all__ += _car_coast_down.__all__
__all__ += _car_coast_down_reference.__all__
__all__ += _car_gradeability.__all__
__all__ += _car_inertia.__all__
__all__ += _car_road_load.__all__
__all__ += _car_traction.__all__
__all__ += _car_vehicle.__all__
__all__ += _checks.__all__
__all__ += _choice_batch_drive.__all__
__all__ += _choice_setups.__all__
__all__ += _choice_sweep.__all__
__all__ += _choice_sweep_optimum.__all__
__all__ += _choice_sweep_spec.__all__
__all__ += _converter_drive.__all__
__all__ += _converter_matching.__all__
__all__ += _converter_operating_map.__all__
__all__ += _converter_tables.__all__
__all__ += _driveline_chassis.__all__
__all__ += _driveline_drivetrain.__all__
__all__ += _driveline_gearing.__all__
__all__ += _driveline_landing.__all__
__all__ += _driveline_spacing.__all__
__all__ += _driveline_speedometer.__all__
__all__ += _driveline_tires.__all__
__all__ += _dyno_columns.__all__
__all__ += _dyno_file.__all__
__all__ += _dyno_numbers.__all__
__all__ += _dyno_parse.__all__
__all__ += _dyno_road.__all__
__all__ += _dyno_rows.__all__
__all__ += _dyno_values.__all__
__all__ += _engine_correction.__all__
__all__ += _engine_curves.__all__
__all__ += _engine_pchip.__all__
__all__ += _engine_reference_air.__all__
__all__ += _errors.__all__
__all__ += _logs_check.__all__
__all__ += _logs_crossover.__all__
__all__ += _logs_header.__all__
__all__ += _logs_pass_data.__all__
__all__ += _logs_shift.__all__
__all__ += _logs_signal.__all__
__all__ += _logs_spin.__all__
__all__ += _logs_text.__all__
__all__ += _notices.__all__
__all__ += _readers_delimited.__all__
__all__ += _readers_encoding.__all__
__all__ += _runs_batch.__all__
__all__ += _runs_batch_timing.__all__
__all__ += _runs_drive_model.__all__
__all__ += _runs_integrator.__all__
__all__ += _runs_milestones.__all__
__all__ += _runs_performance.__all__
__all__ += _runs_report.__all__
__all__ += _runs_run_blocks.__all__
__all__ += _runs_simulate.__all__
__all__ += _shifts_best.__all__
__all__ += _shifts_overtake.__all__
__all__ += _shifts_pattern.__all__
__all__ += _shifts_plan.__all__
__all__ += [n for n in _shifts_scan.__all__ if n not in __all__]
__all__ += _shifts_search.__all__
__all__ += _shifts_shift_rpm.__all__
__all__ += _shifts_window.__all__
__all__ += _units.__all__
__all__ = sorted(set(__all__))
