"""``python -m bench.serving_floor``: the service as ``python -m service`` runs it, except
that ``POST /v1/shift-plan`` answers with the shift plan of the benchmark's request
computed once at start-up (the request is still read, checked and validated, the answer
still serialised and sent, through every middleware and the calculation slot's thread).

What a computed plan costs served, less what the same request costs here, is what the
computation, its document and its summary cost served; what it costs here is the floor no
faster computation can go below. Used by :mod:`bench.shift_plan` only.
"""

from __future__ import annotations

from typing import Any

from service import __main__ as service_main
from service.mapping.shift_plan import compute_shift_plan
from service.output.shift_plan_summary import shift_plan_summary
from service.routes import shift_plan as route
from service.schemas.shift_plan import ShiftPlanRequest


def _answer_once() -> None:
    from bench.shift_plan import hundred_point_request

    body = ShiftPlanRequest.model_validate(hundred_point_request())
    done = compute_shift_plan(body)
    summary = shift_plan_summary(
        done.plan, done.curve, done.drivetrain, done.tire, body.units, body.reference
    )

    def computed(_: ShiftPlanRequest) -> Any:
        return done

    def summarised(*_: object) -> str:
        return summary

    # the route's handler reads both names from its module when it runs
    vars(route).update(compute_shift_plan=computed, shift_plan_summary=summarised)


if __name__ == "__main__":
    _answer_once()
    service_main.main()
