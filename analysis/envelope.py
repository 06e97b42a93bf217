"""Envelopes of bending moment, shear, deflection and reactions over load arrangements.

The strip is solved once for a set of unit cases: the characteristic permanent load on
every segment (case 0) and the characteristic variable load of each segment alone (one case
per loaded segment). Every arrangement is a superposition of these, gamma_G G + gamma_Q
sum_(loaded i) Q_i, so

* ``ALL_SUBSETS``: the worst subset at a station takes exactly the Q_i that act in the
  unfavourable sense there: max = gamma_G G + gamma_Q sum max(0, Q_i) (n + 1 solves,
  never 2^n);
* ``ALL_AND_ALTERNATE``: the worst of three fixed sets (UK NA to EN 1992-1-1, 5.1.3(1)).

Redistribution (``analysis.redistribution``) is linear and is applied to the unit cases.
Large strips are evaluated in blocks of stations, so memory stays bounded.

Restraint variants (``analyse_envelope_variants``): one beam analysed with different end
restraints (e.g. a monolithic end idealised as fixed and as pinned) under the same loads;
the envelope is the max/min over the variants at each station, and every governing
``Arrangement`` names its variant. Each variant costs one single envelope.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Literal

import numpy as np

from analysis.arrangements import (
    ActionFactors,
    Arrangement,
    Combination,
    Equation,
    PatternRule,
    alternate_sets,
    equations,
    make_arrangement,
    segment_name,
)
from analysis.beam import BeamModel, Load, Restraint
from analysis.redistribution import check_delta, redistribute_solution
from analysis.stations import Stations
from analysis.stiffness import NodeSolution, solve_nodes
from analysis.summaries import SpanSummary, SupportSummary

__all__ = [
    "SpanSummary",
    "StripEnvelope",
    "SupportSummary",
    "analyse_envelope",
    "analyse_envelope_variants",
    "unit_cases",
]

StationKind = Literal["m_max", "m_min", "v_max", "v_min"]
NodeKind = Literal["m_max", "m_min", "r_max", "r_min"]

# Block size: stations x cases evaluated at once.
_BLOCK_ENTRIES = 1_000_000
# A unit case smaller than this fraction of the largest is round-off for labelling.
_LABEL_RTOL = 1.0e-12


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class _Basis:
    """Unit-case solution and the rule that combines it (internal)."""

    sol: NodeSolution  # case 0 permanent, case k >= 1 variable on segment q_segments[k-1]
    q_segments: np.ndarray  # (n_q,)
    equations: tuple[Equation, ...]
    pattern: PatternRule
    set_matrix: np.ndarray  # (n_sets, n_q) 0/1, ALL_AND_ALTERNATE only
    set_segments: tuple[tuple[int, ...], ...]

    def bounds(self, vals: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """From unit-case values (k, 1 + n_q), cases last: max and min over arrangements for
        every equation, each (k, n_eq), and the worst set index (k,) (ALL_AND_ALTERNATE)."""
        g = vals[:, :1]
        q = vals[:, 1:]
        if self.pattern is PatternRule.ALL_SUBSETS:
            ones = np.ones((q.shape[1], 1))  # matmul sums short rows faster than sum()
            hi = np.maximum(q, 0.0) @ ones
            lo = q @ ones - hi
            i_hi = i_lo = np.zeros(vals.shape[0], dtype=np.intp)
        else:
            sq = q @ self.set_matrix.T
            i_hi, i_lo = sq.argmax(axis=1), sq.argmin(axis=1)
            hi = np.take_along_axis(sq, i_hi[:, None], axis=1)
            lo = np.take_along_axis(sq, i_lo[:, None], axis=1)
        gg = np.array([e.gamma_g for e in self.equations])[None, :]
        gq = np.array([e.gamma_q for e in self.equations])[None, :]
        return gg * g + gq * hi, gg * g + gq * lo, i_hi, i_lo

    def envelope(self, vals: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(max, min) over every arrangement and equation, each (k,)."""
        hi, lo, _, _ = self.bounds(vals)
        return hi.max(axis=1), lo.min(axis=1)

    def governing(self, vals: np.ndarray, want_max: bool) -> tuple[Equation, tuple[int, ...]]:
        """Equation and loaded segments of the worst arrangement for values (1 + n_q,)."""
        hi, lo, i_hi, i_lo = self.bounds(vals[None, :])
        e = int(np.argmax(hi[0]) if want_max else np.argmin(lo[0]))
        eq = self.equations[e]
        if self.pattern is PatternRule.ALL_AND_ALTERNATE:
            return eq, self.set_segments[int((i_hi if want_max else i_lo)[0])]
        q = vals[1:]
        tol = _LABEL_RTOL * float(np.abs(q).max()) if q.size else 0.0
        pick = q > tol if want_max else q < -tol
        return eq, tuple(int(s) for s in self.q_segments[pick])

    def combine(self, vals: np.ndarray, eq: Equation, loaded: Sequence[int]) -> np.ndarray:
        """Values of one arrangement from unit-case values (..., 1 + n_q), cases last."""
        mask = np.isin(self.q_segments, np.asarray(loaded, dtype=np.intp))
        return eq.gamma_g * vals[..., 0] + eq.gamma_q * vals[..., 1:][..., mask].sum(axis=-1)


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class _Variant:
    """One restraint variant of the beam and its unit-case basis (internal)."""

    name: str  # "" for the one and only model
    model: BeamModel
    basis: _Basis


def _frozen(a: np.ndarray) -> np.ndarray:
    a = np.ascontiguousarray(a)
    a.setflags(write=False)
    return a


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class StripEnvelope:
    """Envelopes at the stations (arrays read-only) and per node; sagging moments positive.

    Over several restraint variants (``analyse_envelope_variants``) every array is the
    max/min over the variants, ``model`` is the first variant's and each governing
    ``Arrangement`` names its variant.
    """

    model: BeamModel
    stations: Stations
    combination: Combination
    pattern: PatternRule
    factors: ActionFactors
    redistribution_delta: float
    m_max_knm: np.ndarray  # (n_st,)
    m_min_knm: np.ndarray
    v_max_kn: np.ndarray
    v_min_kn: np.ndarray
    # Elastic deflection (EI = model.ei_knm2), SLS combinations only (None for ULS).
    deflection_max_mm: np.ndarray | None
    deflection_min_mm: np.ndarray | None
    node_m_max_knm: np.ndarray  # (n_nodes,)
    node_m_min_knm: np.ndarray
    reactions_max_kn: np.ndarray
    reactions_min_kn: np.ndarray
    variants: tuple[str, ...]  # restraint variants enveloped, ("",) for a single model
    _parts: tuple[_Variant, ...] = field(repr=False, compare=False)

    def model_of(self, variant: str) -> BeamModel:
        """The beam model of one restraint variant."""
        return self._part(variant).model

    def _part(self, variant: str) -> _Variant:
        for part in self._parts:
            if part.name == variant:
                return part
        raise ValueError(f"variant {variant!r} is not one of {list(self.variants)}")

    def _pick(self, rows: Sequence[np.ndarray], want_max: bool) -> Arrangement:
        """Worst arrangement over the variants from unit-case values (1 + n_q,) of each
        variant at one place; near ties go to the earlier variant (deterministic labels)."""
        extremes = []
        for part, vals in zip(self._parts, rows):
            hi, lo, _, _ = part.basis.bounds(vals[None, :])
            extremes.append(float(hi.max()) if want_max else -float(lo.min()))
        best = max(extremes)
        tol = _LABEL_RTOL * (1.0 + max(abs(e) for e in extremes))
        k = next(k for k, e in enumerate(extremes) if e >= best - tol)
        part = self._parts[k]
        eq, loaded = part.basis.governing(rows[k], want_max)
        return make_arrangement(self.model, eq.name, loaded, part.name)

    def governing(self, kind: StationKind, i: int) -> Arrangement:
        """The arrangement giving ``kind`` at station i."""
        quantity = {"m_max": 0, "m_min": 0, "v_max": 1, "v_min": 1}
        if kind not in quantity:
            raise ValueError(f"kind must be one of {sorted(quantity)}, got {kind!r}")
        n = len(self.stations)
        if not -n <= i < n:
            raise IndexError(f"station {i} out of range (0..{n - 1})")
        idx = np.array([i % n])
        rows = [
            (p.basis.sol.moments_t(idx) if quantity[kind] == 0 else p.basis.sol.shears_t(idx))[0]
            for p in self._parts
        ]
        return self._pick(rows, kind.endswith("max"))

    def governing_labels(self, kind: StationKind) -> tuple[str, ...]:
        """Label of the arrangement giving ``kind`` at every station, in station order: the
        same as ``governing(kind, i).label`` for each i, computed for all stations at once."""
        quantity = {"m_max": 0, "m_min": 0, "v_max": 1, "v_min": 1}
        if kind not in quantity:
            raise ValueError(f"kind must be one of {sorted(quantity)}, got {kind!r}")
        want_max = kind.endswith("max")
        idx = np.arange(len(self.stations))
        vals, parts = [], []
        for p in self._parts:
            v = p.basis.sol.moments_t(idx) if quantity[kind] == 0 else p.basis.sol.shears_t(idx)
            hi, lo, i_hi, i_lo = p.basis.bounds(v)
            vals.append(v)
            parts.append((hi, lo, i_hi if want_max else i_lo))
        extremes = np.array(
            [hi.max(axis=1) if want_max else -lo.min(axis=1) for hi, lo, _ in parts]
        )
        best = extremes.max(axis=0)
        tol = _LABEL_RTOL * (1.0 + np.abs(extremes).max(axis=0))
        chosen = np.argmax(extremes >= best - tol, axis=0)  # first variant within the tie
        labels: list[str] = []
        cache: dict[tuple[int, int, tuple[int, ...]], str] = {}
        for i in range(len(idx)):
            k = int(chosen[i])
            part, (hi, lo, i_set) = self._parts[k], parts[k]
            basis = part.basis
            e = int(np.argmax(hi[i]) if want_max else np.argmin(lo[i]))
            if basis.pattern is PatternRule.ALL_AND_ALTERNATE:
                loaded = basis.set_segments[int(i_set[i])]
            else:
                q = vals[k][i, 1:]
                qtol = _LABEL_RTOL * float(np.abs(q).max()) if q.size else 0.0
                pick = q > qtol if want_max else q < -qtol
                loaded = tuple(int(s) for s in basis.q_segments[pick])
            key = (k, e, loaded)
            if key not in cache:
                eq = basis.equations[e]
                cache[key] = make_arrangement(self.model, eq.name, loaded, part.name).label
            labels.append(cache[key])
        return tuple(labels)

    def governing_at_node(self, kind: NodeKind, node: int) -> Arrangement:
        """The arrangement giving the node moment ("m_max"/"m_min") or reaction
        ("r_max"/"r_min") at a node."""
        src = {"m_max": 0, "m_min": 0, "r_max": 1, "r_min": 1}
        if kind not in src:
            raise ValueError(f"kind must be one of {sorted(src)}, got {kind!r}")
        rows = [
            (p.basis.sol.node_moment_knm if src[kind] == 0 else p.basis.sol.reactions_kn)[:, node]
            for p in self._parts
        ]
        return self._pick(rows, kind.endswith("max"))

    def _basis_of(self, arrangement: Arrangement) -> tuple[_Basis, Equation]:
        basis = self._part(arrangement.variant).basis
        eq = next((e for e in basis.equations if e.name == arrangement.equation), None)
        if eq is None:
            names = [e.name for e in basis.equations]
            raise ValueError(f"equation {arrangement.equation!r} is not one of {names}")
        return basis, eq

    def arrangement_values(
        self, arrangement: Arrangement, idx: slice | np.ndarray = slice(None)
    ) -> tuple[np.ndarray, np.ndarray]:
        """(M kNm, V kN) of one arrangement (on its variant) at stations ``idx``
        (redistributed like the envelope)."""
        basis, eq = self._basis_of(arrangement)
        sol, loaded = basis.sol, arrangement.loaded_segments
        m = basis.combine(sol.moments_t(idx), eq, loaded)
        v = basis.combine(sol.shears_t(idx), eq, loaded)
        return m, v

    def arrangement_reactions(self, arrangement: Arrangement) -> np.ndarray:
        """(n_nodes,) reactions (kN, up +) of one arrangement (on its variant; redistributed
        like the envelope)."""
        basis, eq = self._basis_of(arrangement)
        return basis.combine(basis.sol.reactions_kn.T, eq, arrangement.loaded_segments)

    def _peak(self, i: int, want_max: bool) -> tuple[float, float, Arrangement]:
        """Envelope extreme near station i, refined between stations for the governing
        arrangement (M is quadratic and V linear between stations)."""
        st = self.stations
        j = int(st.segment[i])
        sl = st.of_segment(j)
        arr = self.governing("m_max" if want_max else "m_min", i)
        env = self.m_max_knm if want_max else self.m_min_knm
        best_m, best_x = float(env[i]), float(st.x_mm[i])
        lo, hi = max(sl.start, i - 1), min(sl.stop - 1, i + 1)
        ids = np.arange(lo, hi + 1)
        m, v = self.arrangement_values(arr, ids)
        x = st.x_mm[ids]
        sign = 1.0 if want_max else -1.0
        for a in range(ids.size - 1):
            h = x[a + 1] - x[a]
            v0, v1 = sign * v[a], sign * v[a + 1]
            if h <= 0 or not (v0 > 0.0 > v1):
                continue
            t = h * v0 / (v0 - v1)
            m_star = m[a] + sign * v0 * t / 2000.0  # kN * mm -> kNm
            if sign * m_star > sign * best_m:
                best_m, best_x = float(m_star), float(x[a] + t)
        return best_m, best_x, arr

    def span_summaries(self) -> tuple[SpanSummary, ...]:
        """One summary per segment, left to right."""
        st, model = self.stations, self.model
        n = model.n_segments
        lc, rc = model.is_cantilever(0), model.is_cantilever(n - 1)
        out = []
        for j in range(n):
            sl = st.of_segment(j)
            i_max = sl.start + int(np.argmax(self.m_max_knm[sl]))
            i_min = sl.start + int(np.argmin(self.m_min_knm[sl]))
            m_max, x_max, g_max = self._peak(i_max, True)
            m_min, x_min, g_min = self._peak(i_min, False)
            a, b = sl.start, sl.stop - 1
            out.append(
                SpanSummary(
                    segment=j,
                    name=segment_name(j, n, lc, rc),
                    length_mm=model.segment_length_mm(j),
                    m_max_knm=m_max,
                    x_mm=x_max,
                    governing=g_max,
                    m_min_knm=m_min,
                    x_m_min_mm=x_min,
                    governing_m_min=g_min,
                    v_start_max_kn=float(self.v_max_kn[a]),
                    v_start_min_kn=float(self.v_min_kn[a]),
                    v_end_max_kn=float(self.v_max_kn[b]),
                    v_end_min_kn=float(self.v_min_kn[b]),
                )
            )
        return tuple(out)

    def _face(self, segment: int, local_mm: float, node: int) -> float | None:
        if segment < 0 or segment >= self.model.n_segments:
            return None
        if self.model.support_width_mm[node] <= 0:
            return float(self.node_m_min_knm[node])
        i = self.stations.find(segment, local_mm)
        return None if i is None else float(self.m_min_knm[i])

    def support_summaries(self) -> tuple[SupportSummary, ...]:
        """One summary per supported node (free ends are skipped)."""
        model = self.model
        n_nodes = len(model.node_x_mm)
        out = []
        for j, r in enumerate(model.restraints):
            if r is Restraint.FREE:
                continue
            t_mm = float(model.support_width_mm[j])
            g_min = self.governing_at_node("m_min", j)
            f_sup = float(self.arrangement_reactions(g_min)[j])
            interior = 0 < j < n_nodes - 1
            m_c = float(self.node_m_min_knm[j])
            delta_m = max(f_sup, 0.0) * t_mm / 1000.0 / 8.0 if interior else 0.0
            reduced = min(0.0, m_c + delta_m) if interior and m_c < 0.0 else None
            left_len = model.segment_length_mm(j - 1) if j > 0 else 0.0
            out.append(
                SupportSummary(
                    node=j,
                    x_mm=float(model.node_x_mm[j]),
                    restraint=r,
                    width_mm=t_mm,
                    m_min_knm=m_c,
                    governing_m_min=g_min,
                    m_left_face_knm=self._face(j - 1, left_len - t_mm / 2.0, j),
                    m_right_face_knm=self._face(j if j < n_nodes - 1 else -1, t_mm / 2.0, j),
                    reaction_for_m_min_kn=f_sup,
                    delta_m_knm=delta_m,
                    m_min_reduced_knm=reduced,
                    reaction_max_kn=float(self.reactions_max_kn[j]),
                    governing_reaction_max=self.governing_at_node("r_max", j),
                    reaction_min_kn=float(self.reactions_min_kn[j]),
                    governing_reaction_min=self.governing_at_node("r_min", j),
                )
            )
        return tuple(out)


def _check_assigned(model: BeamModel, loads: Sequence[Load], what: str) -> None:
    for i, load in enumerate(loads):
        seg = getattr(load, "segment", None)
        if isinstance(seg, bool) or not isinstance(seg, (int, np.integer)):
            raise TypeError(f"{what} load {i}: needs a segment index, got {seg!r}")


def analyse_envelope(
    model: BeamModel,
    permanent: Sequence[Load],
    variable: Sequence[Load],
    factors: ActionFactors,
    combination: Combination,
    pattern: PatternRule,
    redistribution_delta: float = 1.0,
) -> StripEnvelope:
    """Envelope of the strip for characteristic permanent and variable loads.

    ``combination`` picks the equations (ULS 6.10 or 6.10a/b, or the SLS characteristic /
    quasi-permanent combinations); ``pattern`` picks the loaded-segment sets. Support
    moments of every arrangement are multiplied by ``redistribution_delta``
    (EN 1992-1-1 5.5; 1.0 = elastic).
    """
    return analyse_envelope_variants(
        [("", model)], permanent, variable, factors, combination, pattern, redistribution_delta
    )


def _check_variants(models: Sequence[tuple[str, BeamModel]]) -> None:
    """Variants must be one beam whose end restraints alone differ."""
    if isinstance(models, (str, bytes)) or not isinstance(models, Sequence) or not models:
        raise TypeError("models must be a non-empty sequence of (name, BeamModel) pairs")
    names: list[str] = []
    for k, item in enumerate(models):
        if not (isinstance(item, tuple) and len(item) == 2):
            raise TypeError(f"models[{k}] must be a (name, BeamModel) pair, got {item!r}")
        name, model = item
        if not isinstance(name, str) or not isinstance(model, BeamModel):
            raise TypeError(f"models[{k}] must be a (str, BeamModel) pair, got {item!r}")
        if name in names:
            raise ValueError(f"variant name {name!r} appears twice")
        names.append(name)
    first = models[0][1]
    for name, model in models[1:]:
        same = (
            model.node_x_mm == first.node_x_mm
            and model.support_width_mm == first.support_width_mm
            and model.ei_knm2 == first.ei_knm2
            and model.station_spacing_fraction == first.station_spacing_fraction
            and model.restraints[1:-1] == first.restraints[1:-1]
        )
        if not same:
            raise ValueError(
                f"variant {name!r}: nodes, support widths, EI, station spacing and interior "
                f"supports must equal those of variant {models[0][0]!r} (only end restraints "
                "may differ)"
            )
        for end in (0, -1):
            if (model.restraints[end] is Restraint.FREE) != (
                first.restraints[end] is Restraint.FREE
            ):
                raise ValueError(
                    f"variant {name!r}: a free end (cantilever tip) must be free in every variant"
                )


def unit_cases(
    permanent: Sequence[Load], variable: Sequence[Load]
) -> tuple[list[list[Load]], list[str], np.ndarray]:
    """The unit cases of the envelopes: (cases, their names, loaded segments): the
    permanent loads, then the variable loads of each loaded segment alone (ascending)."""
    by_segment: dict[int, list[Load]] = {}
    for ld in variable:
        by_segment.setdefault(int(ld.segment), []).append(ld)
    q_segments = np.array(sorted(by_segment), dtype=np.intp)
    cases: list[list[Load]] = [list(permanent)] + [by_segment[int(s)] for s in q_segments]
    case_names = ["permanent"] + [f"variable on segment {int(s)}" for s in q_segments]
    return cases, case_names, q_segments


def _one_variant(
    name: str,
    sol: NodeSolution,
    q_segments: np.ndarray,
    eqs: tuple[Equation, ...],
    pattern: PatternRule,
    delta: float,
    with_deflection: bool,
) -> tuple[_Variant, list[np.ndarray]]:
    """Basis and envelopes of one variant from its solved unit cases: [m_max, m_min, v_max,
    v_min, d_max, d_min, node m_max, node m_min, r_max, r_min] (max at even, min at odd
    positions; the deflections are empty unless ``with_deflection``)."""
    model = sol.model
    if delta != 1.0:
        sol = redistribute_solution(sol, delta)
    if pattern is PatternRule.ALL_AND_ALTERNATE:
        set_segments = alternate_sets(model.n_segments)
    else:
        set_segments = ()
    set_matrix = np.array(
        [[1.0 if s in sset else 0.0 for s in q_segments] for sset in set_segments]
    ).reshape(len(set_segments), q_segments.size)
    basis = _Basis(sol, q_segments, eqs, pattern, set_matrix, set_segments)

    n_st = len(sol.stations)
    n_d = n_st if with_deflection else 0
    outs = [np.empty(n_st) for _ in range(4)] + [np.empty(n_d) for _ in range(2)]
    block = max(64, _BLOCK_ENTRIES // sol.n_cases)
    for a in range(0, n_st, block):
        sl = slice(a, min(n_st, a + block))
        outs[0][sl], outs[1][sl] = basis.envelope(sol.moments_t(sl))
        outs[2][sl], outs[3][sl] = basis.envelope(sol.shears_t(sl))
        if with_deflection:
            outs[4][sl], outs[5][sl] = basis.envelope(sol.deflections_t(sl))
    outs += list(basis.envelope(sol.node_moment_knm.T))
    outs += list(basis.envelope(sol.reactions_kn.T))
    return _Variant(name, model, basis), outs


def _same_stations(a: Stations, b: Stations) -> bool:
    return len(a) == len(b) and all(
        np.array_equal(x, y)
        for x, y in (
            (a.x_mm, b.x_mm),
            (a.segment, b.segment),
            (a.local_mm, b.local_mm),
            (a.side, b.side),
            (a.start, b.start),
        )
    )


def analyse_envelope_variants(
    models: Sequence[tuple[str, BeamModel]],
    permanent: Sequence[Load],
    variable: Sequence[Load],
    factors: ActionFactors,
    combination: Combination,
    pattern: PatternRule,
    redistribution_delta: float = 1.0,
    solved: Sequence[NodeSolution] | None = None,
) -> StripEnvelope:
    """Envelope over restraint variants of one beam under the same loads.

    ``models`` are (name, model) pairs with the same nodes, supports widths and EI; only the
    end restraints differ (e.g. a monolithic end FIXED in one and PINNED in another). Each
    variant is enveloped as ``analyse_envelope`` does; the result takes the max/min over the
    variants at every station and node, its ``model`` is the first variant's, and each
    governing ``Arrangement`` carries its variant's name (``Arrangement.variant``), which
    ``arrangement_values`` and ``arrangement_reactions`` use to pick the model.

    ``solved`` optionally gives each variant's unit cases already solved (elastic, e.g. by
    ``analysis.floor.solve_nodes_floor`` for many strips at once): the cases of
    ``unit_cases(permanent, variable)`` on that variant's model; the result is the same.
    """
    _check_variants(models)
    delta = check_delta(redistribution_delta)
    if not isinstance(factors, ActionFactors):
        raise TypeError(f"factors must be an ActionFactors, got {type(factors).__name__}")
    combination = Combination(combination)
    eqs = equations(combination, factors)
    pattern = PatternRule(pattern)
    first = models[0][1]
    _check_assigned(first, permanent, "permanent")
    _check_assigned(first, variable, "variable")
    cases, case_names, q_segments = unit_cases(permanent, variable)
    if solved is not None and len(solved) != len(models):
        raise ValueError(f"{len(solved)} solved variants for {len(models)} models")
    with_deflection = combination in (Combination.CHARACTERISTIC, Combination.QUASI_PERMANENT)

    parts: list[_Variant] = []
    outs: list[np.ndarray] = []
    for k, (name, model) in enumerate(models):
        sol = solve_nodes(model, cases, case_names) if solved is None else solved[k]
        if not (isinstance(sol, NodeSolution) and sol.model == model and sol.n_cases == len(cases)):
            raise ValueError(f"solved[{k}] is not variant {name!r}'s model under the unit cases")
        part, arrays = _one_variant(name, sol, q_segments, eqs, pattern, delta, with_deflection)
        if parts and not _same_stations(part.basis.sol.stations, parts[0].basis.sol.stations):
            raise ValueError(f"variant {name!r}: stations differ from variant {models[0][0]!r}")
        if not outs:
            outs = arrays
        else:
            outs = [
                np.maximum(o, a) if k % 2 == 0 else np.minimum(o, a)
                for k, (o, a) in enumerate(zip(outs, arrays))
            ]
        parts.append(part)
    return StripEnvelope(
        model=first,
        stations=parts[0].basis.sol.stations,
        combination=combination,
        pattern=pattern,
        factors=factors,
        redistribution_delta=delta,
        m_max_knm=_frozen(outs[0]),
        m_min_knm=_frozen(outs[1]),
        v_max_kn=_frozen(outs[2]),
        v_min_kn=_frozen(outs[3]),
        deflection_max_mm=_frozen(outs[4]) if with_deflection else None,
        deflection_min_mm=_frozen(outs[5]) if with_deflection else None,
        node_m_max_knm=_frozen(outs[6]),
        node_m_min_knm=_frozen(outs[7]),
        reactions_max_kn=_frozen(outs[8]),
        reactions_min_kn=_frozen(outs[9]),
        variants=tuple(p.name for p in parts),
        _parts=tuple(parts),
    )
