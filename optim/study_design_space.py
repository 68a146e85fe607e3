"""The design space: bounds the extruder and the envelope allow, and the decision variables.

Lower bounds below the extruder's minimum thicknesses are raised to them; bounds no design can
meet (a tip thinner than the extruder allows at any taper, fins too many or too thick for the
smallest root gap, heights above the envelope) are refused with the bound that would work.
Each span then becomes a free :class:`Variable` or a fixed value.
"""

from __future__ import annotations

import math

from optim.study_errors import ErrorContext, mm
from optim.study_resolved import span_value
from optim.study_schema import Span, StudyFile
from optim.study_types import VARIABLE_NAMES, Material, Variable
from optim.study_yaml import Loc
from optim.units import show

__all__ = ["decision_variables", "design_space"]


def design_space(sf: StudyFile, ctx: ErrorContext) -> dict[str, Span]:
    """The spans of the design space in SI, tightened to the extruder and checked reachable."""
    ds, ex = sf.design_space, sf.extruder
    spans: dict[str, Span] = {}
    for key in (
        "fin_count",
        "fin_pitch",
        "fin_thickness_root",
        "fin_thickness_tip",
        "fin_taper_ratio",
        "fin_height",
        "base_thickness",
    ):
        span = getattr(ds, key)
        if span is not None:
            spans[key] = span
    for key, minimum, label in (
        ("fin_thickness_root", ex.min_fin_thickness, "extruder.min_fin_thickness"),
        ("fin_thickness_tip", ex.min_fin_thickness, "extruder.min_fin_thickness"),
        ("base_thickness", ex.min_base_thickness, "extruder.min_base_thickness"),
    ):
        if key in spans:
            spans[key] = _tighten(ctx, key, spans[key], minimum, label)
    if "fin_taper_ratio" in spans:
        r, t = spans["fin_taper_ratio"], spans["fin_thickness_root"]
        if r.upper * t.upper < ex.min_fin_thickness * (1 - 1e-12):
            raise ctx.fail(
                ("design_space", "fin_taper_ratio"),
                f"{_span_text(r, 'number')} cannot be met: even the thickest "
                f"root ({mm(t.upper)}) at ratio {r.upper:g} gives a "
                f"{mm(r.upper * t.upper)} tip, below extruder.min_fin_thickness"
                f" = {mm(ex.min_fin_thickness)}; expected a ratio of at least "
                f"{ex.min_fin_thickness / t.upper:.3g}",
            )
    if "fin_thickness_tip" in spans:
        tip, root = spans["fin_thickness_tip"], spans["fin_thickness_root"]
        if tip.upper > root.upper:
            raise ctx.fail(
                ("design_space", "fin_thickness_tip"),
                f"{_span_text(tip, 'length')} cannot be met: a tip of "
                f"{mm(tip.upper)} is thicker than the thickest root "
                f"({mm(root.upper)}); expected tips at most "
                f"{mm(root.upper)}",
            )
    _reachable(sf, ctx, spans)
    return spans


def _tighten(ctx: ErrorContext, key: str, span: Span, minimum: float, label: str) -> Span:
    loc: Loc = ("design_space", key)
    if span.upper < minimum:
        what = "is" if span.fixed else "lies wholly"
        raise ctx.fail(
            loc,
            f"{_span_text(span, 'length')} {what} below {label} = "
            f"{mm(minimum)}; expected at least {mm(minimum)}",
        )
    if span.lower < minimum:
        return Span(minimum, span.upper)
    return span


def _reachable(sf: StudyFile, ctx: ErrorContext, spans: dict[str, Span]) -> None:
    """Refuse bounds no design can reach under the extruder's and envelope's limits."""
    ex, env = sf.extruder, sf.envelope
    W, R, g_min, r_f = env.base_width, ex.max_height_to_gap, ex.min_gap, ex.root_fillet
    t, H, tb = spans["fin_thickness_root"], spans["fin_height"], spans["base_thickness"]
    Hmax = env.max_height
    if H.lower + tb.lower > Hmax * (1 + 1e-12):
        raise ctx.fail(
            ("envelope", "max_height"),
            f"{mm(Hmax)} is below the lowest fin height plus the thinnest base "
            f"({mm(H.lower)} + {mm(tb.lower)}); expected at least "
            f"{mm(H.lower + tb.lower)} or lower bounds that fit",
        )
    if H.upper + tb.lower > Hmax * (1 + 1e-12):
        raise ctx.fail(
            ("design_space", "fin_height"),
            f"upper bound {mm(H.upper)} cannot be met: with the thinnest base "
            f"({mm(tb.lower)}) it exceeds envelope.max_height = {mm(Hmax)}; "
            f"expected at most {mm(Hmax - tb.lower)}",
        )
    if tb.upper + H.lower > Hmax * (1 + 1e-12):
        raise ctx.fail(
            ("design_space", "base_thickness"),
            f"upper bound {mm(tb.upper)} cannot be met: with the lowest fins "
            f"({mm(H.lower)}) it exceeds envelope.max_height = {mm(Hmax)}; "
            f"expected at most {mm(Hmax - H.lower)}",
        )

    def need(height: float) -> tuple[float, str]:
        """The smallest root gap allowed for fins of ``height``, and the limit that sets it."""
        options = [
            (g_min, f"extruder.min_gap = {mm(g_min)}"),
            (
                height / R,
                f"extruder.max_height_to_gap = {R:g} at a fin height of {mm(height)}",
            ),
            (2 * r_f, f"two root fillets of extruder.root_fillet = {mm(r_f)}"),
        ]
        return max(options, key=lambda o: o[0])

    if "fin_count" in spans:
        N = spans["fin_count"]

        def gap(n: float, th: float) -> float:
            return (W - th) / (n - 1) - th

        widest = gap(N.lower, t.lower)
        where = f"{N.lower:g} fins with {mm(t.lower)} roots on a {mm(W)} base"
    else:
        p = spans["fin_pitch"]
        if p.upper >= W - t.lower:
            raise ctx.fail(
                ("design_space", "fin_pitch"),
                f"upper bound {mm(p.upper)} leaves fewer than two fins on the "
                f"{mm(W)} base; expected a pitch below {mm(W - t.lower)}",
            )

        def gap(n: float, th: float) -> float:
            return n - th

        widest = gap(p.upper, t.lower)
        where = f"a {mm(p.upper)} pitch with {mm(t.lower)} roots"
    g_need, why = need(H.lower)
    if widest < g_need * (1 - 1e-9):
        key = "fin_count" if "fin_count" in spans else "fin_pitch"
        raise ctx.fail(
            ("design_space", key),
            f"no design in the bounds can be made: the widest root gap ({where})"
            f" is {mm(widest)}, below the {mm(g_need)} set by {why}; "
            "expected fewer fins, thinner fins or lower fins",
        )
    g_hi, why_hi = need(H.upper)
    if widest < g_hi * (1 - 1e-9):
        raise ctx.fail(
            ("design_space", "fin_height"),
            f"upper bound {mm(H.upper)} cannot be met: {why_hi} needs a root "
            f"gap of {mm(g_hi)}, but the widest gap in the bounds ({where}) is "
            f"{mm(widest)}; expected at most {mm(widest * R)}",
        )
    if "fin_count" in spans:
        N = spans["fin_count"]
        if gap(N.upper, t.lower) < g_need * (1 - 1e-9):
            n_max = math.floor((W - t.lower) / (g_need + t.lower) + 1e-9) + 1
            raise ctx.fail(
                ("design_space", "fin_count"),
                f"upper bound {N.upper:g} cannot be met: {N.upper:g} fins with "
                f"the thinnest roots ({mm(t.lower)}) on a {mm(W)} base leave a"
                f" {mm(gap(N.upper, t.lower))} root gap, below the "
                f"{mm(g_need)} set by {why}; expected at most {n_max}",
            )
        if gap(N.lower, t.upper) < g_need * (1 - 1e-9):
            t_max = (W - g_need * (N.lower - 1)) / N.lower
            raise ctx.fail(
                ("design_space", "fin_thickness_root"),
                f"upper bound {mm(t.upper)} cannot be met: even the fewest fins"
                f" ({N.lower:g}) with roots this thick leave a "
                f"{mm(gap(N.lower, t.upper))} root gap, below the "
                f"{mm(g_need)} set by {why}; expected at most "
                f"{mm(t_max)}",
            )
    else:
        p = spans["fin_pitch"]
        if p.lower - t.lower < g_need * (1 - 1e-9):
            raise ctx.fail(
                ("design_space", "fin_pitch"),
                f"lower bound {mm(p.lower)} cannot be met: with the thinnest "
                f"roots ({mm(t.lower)}) it leaves a {mm(p.lower - t.lower)} "
                f"root gap, below the {mm(g_need)} set by {why}; expected "
                f"at least {mm(g_need + t.lower)}",
            )
        if p.upper - t.upper < g_need * (1 - 1e-9):
            raise ctx.fail(
                ("design_space", "fin_thickness_root"),
                f"upper bound {mm(t.upper)} cannot be met: even the widest "
                f"pitch ({mm(p.upper)}) leaves a {mm(p.upper - t.upper)} root "
                f"gap, below the {mm(g_need)} set by {why}; expected at "
                f"most {mm(p.upper - g_need)}",
            )


def decision_variables(
    spans: dict[str, Span], materials: list[Material], fan_names: tuple[str, ...]
) -> tuple[tuple[Variable, ...], dict]:
    """The free variables and the fixed values, in :data:`VARIABLE_NAMES` order.

    Adds a fixed ``fin_taper_ratio`` of 1 to ``spans`` when neither tip thickness nor ratio is
    given (the resolved study writes it).
    """
    names = {
        "fin_count": "fin_count",
        "fin_pitch": "fin_pitch_m",
        "fin_thickness_root": "fin_thickness_root_m",
        "fin_thickness_tip": "fin_thickness_tip_m",
        "fin_taper_ratio": "fin_taper_ratio",
        "fin_height": "fin_height_m",
        "base_thickness": "base_thickness_m",
    }
    if "fin_thickness_tip" not in spans and "fin_taper_ratio" not in spans:
        spans["fin_taper_ratio"] = Span(1.0, 1.0)
    variables: dict[str, Variable] = {}
    fixed: dict[str, float | str] = {}
    for key, span in spans.items():
        var = names[key]
        if span.fixed:
            fixed[var] = int(span.lower) if key == "fin_count" else span.lower
        elif key == "fin_count":
            variables[var] = Variable(var, "int", int(span.lower), int(span.upper))
        else:
            variables[var] = Variable(var, "real", span.lower, span.upper)
    if len(materials) == 1:
        fixed["material"] = materials[0].name
    else:
        variables["material"] = Variable(
            "material", "choice", choices=tuple(m.name for m in materials)
        )
    if len(fan_names) == 1:
        fixed["fan"] = fan_names[0]
    elif len(fan_names) > 1:
        variables["fan"] = Variable("fan", "choice", choices=fan_names)
    order = {n: i for i, n in enumerate(VARIABLE_NAMES)}
    var_tuple = tuple(sorted(variables.values(), key=lambda v: order[v.name]))
    fixed_sorted = dict(sorted(fixed.items(), key=lambda kv: order[kv[0]]))
    return var_tuple, fixed_sorted


def _span_text(span: Span, kind: str) -> str:
    return show(span_value(span, kind))
