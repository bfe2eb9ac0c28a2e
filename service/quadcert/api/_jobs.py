"""What a worker process runs: a validated :class:`~quadcert.quadrature.Request` in, an answer's body out.

A job is built on the event loop (``_computation``) after the request was parsed there, so the worker never
reads the formula text again. Everything in a :class:`Job` pickles, the Request included; an error raised
here travels back to the loop as the exception itself, with all its fields (see ``errors.py``).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

from .._version import ENGINE_VERSION
from ..errors import InvalidInput
from ..picture import Box, boxes, render_svg, summary, y_range
from ..quadrature import Request, certified_digits
from ..results import check_body, integral_body, outward, plan_body
from ._exact_json import dumps
from ._pool import Task


@dataclass(frozen=True)
class Job:
    """One unit of work for a worker."""

    request: Request
    #: what the caller typed, echoed in the answer as sent (tolerance, variable, claimed_value)
    echo: dict[str, Any]
    include_mesh: bool = False
    #: the most panels an answer may carry; a larger mesh is refused rather than sent
    max_mesh_panels: int | None = None
    claimed_value: Any = None
    #: the engine's own deadline for this job; the pool may shorten it to what is left
    deadline_seconds: float | None = None
    #: for a picture: "svg" (a document for reports) or "json" (the boxes, for the page)
    picture: str = "json"
    options: dict[str, Any] = field(default_factory=dict)

    def seconds(self, left: float | None) -> float | None:
        """The engine's deadline: this job's own, or what the pool leaves it, whichever comes first."""
        candidates = [s for s in (self.deadline_seconds, left) if s is not None]
        return min(candidates) if candidates else None


def run_integral(job: Job, left: float | None) -> dict[str, Any]:
    result = job.request.integrate(deadline_seconds=job.seconds(left), include_mesh=job.include_mesh, **job.options)
    limit = job.max_mesh_panels
    if limit is not None and result.mesh is not None and len(result.mesh) > limit:
        raise InvalidInput(
            f"the mesh has {len(result.mesh)} panels, more than the {limit} an answer may carry; "
            "ask without include_mesh, or with a looser tolerance",
            code="mesh_too_large",
            field="include_mesh",
        )
    # the answer's final shape, bounds printed outward, built here in the worker, not on the event loop
    return integral_body(result, job.echo)


def run_check(job: Job, left: float | None) -> dict[str, Any]:
    result = job.request.check(
        job.claimed_value, deadline_seconds=job.seconds(left), include_mesh=job.include_mesh, **job.options
    )
    return check_body(result, job.echo)


def run_plan(job: Job, left: float | None) -> dict[str, Any]:
    return plan_body(job.request.plan())


def run_picture(job: Job, left: float | None) -> dict[str, Any]:
    """The integral with its mesh, and the picture of it: the boxes as JSON, or the SVG document."""
    result = job.request.integrate(deadline_seconds=job.seconds(left), include_mesh=True, **job.options)
    mesh = result.mesh or ()
    if job.max_mesh_panels is not None and len(mesh) > job.max_mesh_panels:
        raise InvalidInput(
            f"the picture would have {len(mesh)} panels, more than the {job.max_mesh_panels} an answer may carry; "
            "loosen the tolerance",
            code="mesh_too_large",
            field="tolerance",
        )
    drawn = boxes(job.request.formula, job.request.values, mesh)
    variable = job.request.formula.variable
    integral = integral_body(replace(result, mesh=None), job.echo)  # the mesh travels as the boxes
    if job.picture == "svg":
        return {"svg": render_svg(result, drawn, variable, ENGINE_VERSION), "stop_reason": result.stop_reason}
    body = {
        "integral": integral,
        "digits": certified_digits(*result.enclosure),
        "boxes": [_box(b) for b in drawn],
        "y_range": list(y_range(drawn)),
        "summary": summary(result, drawn),
    }
    # encoded here: a 100,000-panel picture is megabytes of JSON, and the event loop only forwards bytes
    return {"json": dumps(body), "stop_reason": result.stop_reason}


def _box(box: Box) -> list[Any]:
    """[lower, upper, f low, f high, error share, bound]: bounds outward, a tail's end as "inf"/"-inf"."""
    f_low, f_high = (None, None) if box.f_range is None else box.f_range
    return [
        outward(box.lower, up=False),
        outward(box.upper, up=True),
        None if f_low is None else outward(f_low, up=False),
        None if f_high is None else outward(f_high, up=True),
        outward(box.error, up=True),
        box.bound,
    ]


#: the task for each kind of answer (the kind is also part of the cache key)
TASKS: dict[str, Task] = {
    "integral": run_integral,
    "check": run_check,
    "plan": run_plan,
    "picture-json": run_picture,
    "picture-svg": run_picture,
}
