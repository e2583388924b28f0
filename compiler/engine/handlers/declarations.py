"""Declaration handlers: symbols, conventions, bundles, splits, fibers, functions and uses.

They build the ring every later value lives in, so they always run (never
from the cache); each is ``(scope, statement, step) -> None``.
"""
from __future__ import annotations

from ... import names as names_pass, notation
from ...algebra import bundles as bundles_mod, fibers as fibers_mod, fixed_points, general_fibers
from ...algebra.localization import FixedPoint
from ...algebra.graded import Element
from ...calls import Function
from ...expressions import Missing, as_expr
from ...results import CheckResult, Step
from ...statements import clause_nodes as cn, nodes as n
from ..cache import digest
from ..scope import fraction_text
from .common import element, relation


def _symbol(scope, s: n.SymbolDecl, step: Step) -> None:
    for name in s.names:
        scope.bind(name, "symbol", scope.symbols[name], s.line)
    step.summary = ", ".join(s.names) + ": " + scope.specs[s.names[0]].describe()


def _convention(scope, s: n.ConventionDecl, step: Step) -> None:
    value = scope.conventions[s.name]
    scope.bind(s.name, "convention", scope.ring.scalar(value), s.line)
    origin = "default" if value == s.value else "overridden"
    step.summary = f"{s.name} = {fraction_text(value)} ({origin})"
    step.values.append(scope.history[s.name][-1][1])


def _bundle(scope, s: n.BundleDecl, step: Step) -> None:
    if isinstance(s.rank, str):
        return _symbolic_bundle(scope, s, step)
    for name in s.names:
        scope.bundles.declare(name, s.bundle_kind, s.rank)
        scope.bind(name, "bundle", name, s.line)
    rank = f"rank {s.rank}" if s.rank is not None else "rank 1"
    step.summary = f"{', '.join(s.names)}: {s.bundle_kind} bundle{'s' if len(s.names) > 1 else ''}, {rank}"


def _symbolic_bundle(scope, s: n.BundleDecl, step: Step) -> None:
    """``bundle V: complex, rank N``: the rank symbol must be a nonnegative integer."""
    spec = scope.specs[s.rank]
    nonnegative = spec.lower is not None and (spec.lower >= 0 or (spec.lower_strict and spec.lower > -1))
    if not (spec.integer and nonnegative):
        raise scope.fail(s.rank, f"the rank {s.rank} must be a symbol declared integer and "
                            f"nonnegative, as in 'symbol {s.rank}: integer, positive'")
    for name in s.names:
        scope.bundles.declare_symbolic(name, s.bundle_kind, scope.symbols[s.rank])
        scope.bind(name, "bundle", name, s.line)
    plural = "s" if len(s.names) > 1 else ""
    step.summary = (f"{', '.join(s.names)}: {s.bundle_kind} bundle{plural}, rank {s.rank}; "
                    "classes from the Chern character ch_k")


def _split(scope, s: n.SplitDecl, step: Step) -> None:
    used = scope.class_uses.get(s.bundle)
    if used is not None:
        raise scope.fail(s, f"'{s.bundle}' is split at line {s.line}, but a value at line {used} "
                            "already uses its classes; move the split before line " + str(used))
    parts = [p.name if p.name is not None else bundles_mod.Trivial(p.trivial) for p in s.parts]
    scope.bundles.split(s.bundle, parts)
    scope.keys[s.bundle] = digest(scope.keys.get(s.bundle), scope.step_key)
    unit = scope.bundles.kind(s.bundle)
    size = scope.bundles.rank if unit == "complex" else scope.bundles.real_rank
    sizes = [str(size(p)) if isinstance(p, str) else str(p.rank) for p in parts]
    account = f"{unit} rank {scope.bundles.rank(s.bundle)} = {' + '.join(sizes)}"
    step.checks.append(CheckResult(f"ranks add up: {account}", "proven"))


def _declare_fiber(scope, s, fiber, step: Step) -> None:
    scope.bind(s.name, "fiber", fiber, s.line)
    integrals = ", ".join(f"∫ {scope.ring.monomial(m).to_text()} = {v.to_text()}"
                          for m, v in fiber.integrals.items())
    step.summary = f"{s.name}: fiber of dimension {fiber.dimension}; {integrals}"


def _surface(scope, s: n.SurfaceFiber, step: Step) -> None:
    genus = as_expr(scope.evaluate(s.genus))
    if genus.is_integer is not True:
        raise scope.fail(s.genus, "the genus must be an integer or a symbol declared integer, "
                                  f"not {notation.text(genus)}")
    group = scope.new_group()
    scope.bundles.declare(s.tangent, "real", 2, group=group)
    scope.bind(s.tangent, "bundle", s.tangent, s.line)
    tangent_euler = scope.bundles.euler(s.tangent)
    _declare_fiber(scope, s, fibers_mod.surface_fiber(s.name, scope.ring, group, genus, tangent_euler),
                   step)


def _sphere(scope, s: n.SphereFiber, step: Step) -> None:
    rank = scope.bundles.rank(s.bundle)
    if scope.bundles.kind(s.bundle) != "real":
        raise scope.fail(s, f"the sphere bundle needs a real bundle; {s.bundle} is complex")
    top = scope.bundles.pontryagin(s.bundle, rank // 2) if rank % 2 and rank >= 3 else None
    scope.note_class_use(s.bundle, s.line)
    fiber = fibers_mod.sphere_fiber(
        s.name, scope.ring, scope.new_group(), s.bundle, rank, top, s.angular,
        scope.conventions["angular_integral"], planes=_planes(scope, s.bundle))
    scope.bind(s.angular, "class", scope.ring.monomial([(s.angular, 1)]), s.line)
    _declare_fiber(scope, s, fiber, step)


def _planes(scope, bundle: str) -> list:
    """Euler classes of the oriented planes B splits into, if it splits so."""
    parts = scope.bundles.parts(bundle)
    if not parts:
        return []
    planes = [p for p in parts if isinstance(p, str)]
    trivial = sum(p.rank for p in parts if not isinstance(p, str))
    if trivial != 1 or any(scope.bundles.real_rank(p) != 2 for p in planes):
        return []
    return [scope.bundles.euler(p) for p in planes]


def _general(scope, s: n.GeneralFiber, step: Step) -> None:
    group = scope.new_group()
    classes = general_fibers.declare_fiber_classes(
        scope.ring, group, [(c.name, c.degree) for c in s.classes], s.dimension, s.name)
    for c in s.classes:
        scope.bind(c.name, "class", classes[c.name], c.line)
    relations = [relation(scope, r) for r in s.relations]
    integrals = [(element(scope, eq.lhs, "an integral"), element(scope, eq.rhs, "an integral"))
                 for eq in s.integrals]
    try:
        fiber = general_fibers.general_fiber(s.name, scope.ring, group, s.dimension, relations,
                                             integrals)
    except fibers_mod.FiberError as err:
        if err.at is None:
            raise
        raise scope.fail(s.integrals[err.at], str(err)) from None
    _declare_fiber(scope, s, fiber, step)


def _fixed_points(scope, s: n.FixedPointFiber, step: Step) -> None:
    """A fiber given by the fixed points of a rotation; its data are checked
    at once (the checks show in this step) and it integrates by localization."""
    ring, group = scope.ring, scope.new_group()
    for name in s.parameters:
        scope.bind(name, "class", ring.generator(name, 2), s.line)
    identify = {}
    for name, node in zip(s.parameters, s.identified):
        if node is not None:
            identify[name] = element(scope, node, f"the value of the rotation parameter {name}")
            if identify[name].generator_keys() & set(s.parameters):
                raise scope.fail(node, f"{name} must stand for a base class, not for an "
                                       f"expression in the rotation parameters")
    points = [_fixed_point(scope, s, p) for p in s.points]
    restrictions = {}
    if s.tangent is not None:
        scope.bundles.declare(s.tangent, "real", s.dimension, group=group)
        scope.bind(s.tangent, "bundle", s.tangent, s.line)
        keys = scope.bundles.get(s.tangent).keys      # p1, ..., pk, e (only e for a plane)
        for index, key in enumerate(keys, 1):
            restrictions[key] = fixed_points.tangent_restrictions(
                s.name, ring, s.parameters, points, "e" if key == keys[-1] else "p", index)
    for name, values in zip(s.lines, s.line_values):
        scope.bundles.declare(name, "line", group=group)
        scope.bind(name, "bundle", name, s.line)
        restrictions[scope.bundles.get(name).keys[0]] = _restrictions(scope, name, values)
    fiber = fixed_points.localized_fiber(s.name, ring, group, s.dimension, s.parameters,
                                         points, restrictions, identify)
    scope.bind(s.name, "fiber", fiber, s.line)
    checks = fixed_points.consistency_checks(fiber)
    if s.model is not None:
        checks.append(_model_agreement(scope, s, fiber))
    elif any(m is not None for m in s.line_models):
        raise scope.fail(next(m for m in s.line_models if m is not None),
                         "a line stands for a class of a model fiber, but the header names "
                         "none (', model G')")
    for c in checks:
        step.checks.append(CheckResult(c.what, "proven" if c.ok else "failed", c.detail))
    rotation = ", ".join(f"{k} = {identify[k].to_text()}" if k in identify else f"{k} (formal)"
                         for k in s.parameters)
    step.summary = (f"{s.name}: fiber of dimension {s.dimension} with fixed points "
                    + ", ".join(f"{p.name} (order {fiber.text(p.order)})" for p in fiber.points)
                    + f"; rotation {rotation}; integrated by localization")


def _model_agreement(scope, s: n.FixedPointFiber, fiber):
    """The check that localization agrees with the general fiber ``s.model``
    on its top monomials, each of its classes stood for by a line's c1."""
    _, model = scope.lookup(s.model, s.model.line, s.model.column)
    if type(model) is not fibers_mod.Fiber or not model.integrals:
        raise scope.fail(s.model, f"{s.model} is not a fiber given by classes, relations "
                                  "and integrals")
    if model.dimension != s.dimension:
        raise scope.fail(s.model, f"{s.model} has dimension {model.dimension}, {s.name} has "
                                  f"{s.dimension}")
    classes = {}
    for line, name in zip(s.lines, s.line_models):
        if name is None:
            continue
        _, value = scope.lookup(name, name.line, name.column)
        key = fibers_mod.single_generator(value)
        if key not in model.class_keys():
            raise scope.fail(name, f"{name} is not a class of the fiber {s.model}")
        if key in classes:
            raise scope.fail(name, f"two lines of {s.name} stand for {name}")
        if scope.ring.generator_info(key).degree != 2:
            raise scope.fail(name, f"{name} has degree {scope.ring.generator_info(key).degree}; "
                                   "the c1 of a line standing for it has degree 2")
        classes[key] = scope.bundles.get(line).keys[0]
    try:
        return fixed_points.model_agreement(fiber, model, classes)
    except fibers_mod.FiberError as err:
        raise scope.fail(s.model, str(err)) from None


def _fixed_point(scope, s: n.FixedPointFiber, p: cn.FixedPointDecl) -> FixedPoint:
    """A point's order, checked first (a weight may divide by it), and its
    weights as linear forms in the rotation parameters."""
    try:
        order = fixed_points.checked_order(s.name, p.label, 1 if p.order is None else scope.evaluate(p.order))
    except fibers_mod.FiberError as err:
        raise scope.fail(p.order or p, str(err)) from None
    weights = []
    for node in p.weights:
        w = element(scope, node, "a tangent weight")
        coefficients = tuple(w.coefficient([(t, 1)]) for t in s.parameters)
        if w != sum((c * scope.ring.gen(t) for c, t in zip(coefficients, s.parameters)),
                    scope.ring.zero()):
            raise scope.fail(node, f"a tangent weight is a combination of the rotation "
                                   f"parameters {', '.join(s.parameters)}, not {w.to_text()}")
        weights.append(coefficients)
    try:
        return fixed_points.checked_point(s.name, FixedPoint(p.label, tuple(weights), order),
                                          len(s.parameters), s.dimension // 2)
    except fibers_mod.FiberError as err:
        raise scope.fail(p, str(err)) from None


def _restrictions(scope, name: str, values) -> dict:
    """{point label: restriction} of one line bundle; each point once."""
    out = {}
    for v in values:
        if v.label in out:
            raise scope.fail(v, f"the restriction of {name} to {v.label} is given twice")
        value = scope.evaluate(v.value)
        out[v.label] = value if isinstance(value, Element) else scope.ring.scalar(value)
    return out


def _define(scope, s: n.Define, step: Step) -> None:
    """The body's other names keep the values they have now (a later
    ``let!`` does not change the function); the report shows the definition."""
    captured = {name: (*scope.lookup(name, name.line, name.column), scope.exact_to(name))
                for name in names_pass.references(s)}
    where = f"at line {s.line}" + ("" if scope.path == scope.top_path else f" of {scope.path}")
    scope.bind(s.name, "function", Function(s.name, tuple(map(str, s.params)), s.body, captured, where),
               s.line)
    step.summary = s.source.split(None, 1)[1].lstrip("!").strip()


def _use(scope, s: n.UseDecl, step: Step) -> None:
    """Show what a used document brought in.  The run has already run its
    statements (``Run.run_statement``); their checks become this step's and
    their problems are reported here, with their own location."""
    module = s.module
    own = [d for d in module.exports if d.origin == module.display]
    shown = f"library {s.path}" if s.library else s.path  # as written: no folder of this machine
    if module.key in scope.reported:
        step.summary = f"{shown}: already used above"
        return
    scope.reported.add(module.key)
    step.summary = f"{shown}: " + ", ".join(f"{d.name} ({d.kind}, line {d.line})" for d in own)
    for inner in scope.used[module.key]:
        for c in inner.checks:
            if c.status == "error":  # told on the command line as its detail alone
                place = f"{module.display}:{inner.line}:{inner.column}"
                step.checks.append(CheckResult(c.what, "error", f"{place}: {c.detail}"))
            else:
                step.checks.append(CheckResult(f"{module.display}:{inner.line}: {c.what}",
                                               c.status, c.detail))
    for d in module.exports:
        binding = scope.bindings.get(d.name)
        if binding is None:
            continue
        if isinstance(binding.value, Missing):  # a later use points at this line
            scope.bind(d.name, binding.kind, Missing(d.name, s.line), s.line)
        elif d.name in scope.history:  # prose sees what this line brought in
            scope.history[d.name] = [(s.line, shown) for _, shown in scope.history[d.name]]
            if binding.kind == "value":
                step.values.append(scope.history[d.name][-1][1])


HANDLERS = {
    n.SymbolDecl: _symbol, n.ConventionDecl: _convention, n.BundleDecl: _bundle,
    n.SplitDecl: _split, n.SurfaceFiber: _surface, n.SphereFiber: _sphere,
    n.GeneralFiber: _general, n.FixedPointFiber: _fixed_points, n.Define: _define,
    n.UseDecl: _use,
}
