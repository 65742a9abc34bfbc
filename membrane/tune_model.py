"""The model a tension search runs on: mode frequencies of a drum variant as a function.

A tune asks for the frequencies of a few labelled modes at a handful of tensions (and maybe a
second parameter). Each parameter set is solved once and kept; with full physics on one head
only the targets' orders are solved, and a set near one already solved is carried from it
(physics/continuation.py) rather than scanned whole. Used by membrane.tuning and
membrane.tune_refusals.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from .branches import labelled_root
from .drum import Drum
from .errors import InputError, SolverError
from .solver import M_MAX_LIMIT, N_MAX_LIMIT, solve


class TuneModel:
    """Mode frequencies of a drum variant, solved once per parameter set (cached).

    Full physics on one head (``by_order``): the first parameter set is solved whole; a
    later one is carried from the nearest set solved (physics/continuation.py: each root
    moved by its perturbation derivative, then Newton's method), and solved whole wherever
    that fails. ``carrying`` False solves every set whole (tuning.tension_for confirms the
    search's answer so).
    """

    def __init__(self, drum: Drum, modes, physics: str, n_max: int, losses: str = "all"):
        for m, n in modes:
            if not (0 <= m <= M_MAX_LIMIT and 1 <= n <= N_MAX_LIMIT):
                raise InputError("mode", f"{m},{n}", f"not a mode the solver has: m must be 0..{M_MAX_LIMIT}"
                                 f" and n 1..{N_MAX_LIMIT}")
        self.drum, self.modes, self.physics, self.losses = drum, list(modes), physics, losses
        self.m_max = max(m for m, _ in self.modes)
        self.n_max = max(n_max, max(n for _, n in self.modes))
        self.cache: dict = {}
        self.roots: dict = {}
        self.whole: set = set()  # parameter sets solved whole (not carried)
        self.carrying = True
        self.solves = 0
        self.carried = 0

    def variant(self, tension: float, free: str | None = None, value: float | None = None) -> Drum:
        drum = self.drum.with_tension(tension)
        if free == "areal_density":
            drum = replace(drum, head=replace(drum.head, areal_density=value))
        elif free == "volume":
            drum = replace(drum, body=replace(drum.body, volume=value))
        return drum

    @property
    def by_order(self) -> bool:
        """Whether each solve needs only the targets' orders: full physics on one head (the
        labels of a shell's pairs need the whole table's pairing)."""
        return self.physics == "full" and self.drum.resonant_head is None

    def _losses(self, drum):
        return drum.losses if self.losses == "all" else None

    def order_roots(self, tension: float, free: str | None = None, value: float | None = None) -> dict:
        """Order m -> its coupled.OrderRoots at a tension (full physics on one head only)."""
        key = (float(tension), free, value)
        if key not in self.roots:
            drum = self.variant(tension, free, value)
            carried = self._carry(key, drum) if self.carrying else None
            if carried is None:
                from .physics.assembly import solve_drum

                carried = {m: solve_drum(drum, m_max=m, n_max=self.n_max, losses=self._losses(drum), only=m)[0]
                           for m in sorted({m for m, _ in self.modes})}
                self.whole.add(key)
            else:
                self.carried += 1
            self.roots[key] = carried
        return self.roots[key]

    def _carry(self, key, drum):
        """The orders at ``key`` carried from the nearest parameter set solved, or None."""
        from .physics.assembly import carry_order

        tension, free, value = key
        # a set solved without the free parameter (the drum's present tension, solved before
        # a fit begins) is the drum at that parameter's present value
        base = None if free is None else self._present(free)
        near = [k for k in self.roots if k[1] == free or (k[1] is None and base is not None)]
        if not near:
            return None

        def steps(k):
            out = {"tension": math.log(tension / k[0])}
            if free is not None:
                out[free] = math.log(value / (k[2] if k[1] == free else base))
            return out

        start = min(near, key=lambda k: max(abs(d) for d in steps(k).values()))
        if max(abs(d) for d in steps(start).values()) < 1e-12:
            return dict(self.roots[start])  # the same drum to round-off (e.g. exp(ln T))

        def drum_at(st):  # the drum at changes of the logs from ``start``
            if all(d == 0.0 for d in st.values()):
                return self.variant(*start)
            if st == steps(start):
                return drum
            v = (start[2] if start[1] == free else base) * math.exp(st[free]) if free is not None else None
            return self.variant(start[0] * math.exp(st["tension"]), free, v)

        out = {}
        for m, od in self.roots[start].items():
            got = carry_order(od, drum_at, steps(start), n_max=self.n_max, losses=self._losses(drum))
            if got is None or any(labelled_root(got, n) is None for mm, n in self.modes if mm == m):
                return None
            out[m] = got
        return out

    def _present(self, free: str) -> float:
        """The drum's present value of a free parameter (kg/m^2 or m^3)."""
        return self.drum.head.areal_density if free == "areal_density" else self.drum.body.volume

    def whole_frequencies(self, tension: float, free: str | None = None, value: float | None = None) -> np.ndarray:
        """As :meth:`frequencies`, from a whole solve (a carried set is solved again)."""
        key = (float(tension), free, value)
        if key not in self.whole and key in self.roots:
            del self.roots[key]
            self.cache.pop(key, None)
        carrying, self.carrying = self.carrying, False
        try:
            return self.frequencies(tension, free, value)
        finally:
            self.carrying = carrying

    def exact(self) -> None:
        """Solve every parameter set whole from now on (carried ones are forgotten)."""
        self.carrying = False
        for key in list(self.roots):
            if key not in self.whole:
                del self.roots[key]
                self.cache.pop(key, None)

    def slopes(self, tension: float, free: str | None = None, value: float | None = None) -> np.ndarray:
        """d ln f / d ln T (and d ln f / d ln value when ``free``) of each target mode at a
        point already solved: (modes, 1 or 2), from the solved roots by first-order
        perturbation (physics/sensitivity.py), no solve of its own (full physics, one head)."""
        from .physics.sensitivity import log_slopes

        ods = self.order_roots(tension, free, value)
        names = ["tension"] + ([free] if free else [])
        out = []
        for m, n in self.modes:
            od = ods[m]
            r = labelled_root(od, n)
            out.append(log_slopes(od.root_set, od.index, complex(od.omega[r]), od.vectors[r], names))
        return np.array(out)

    def frequencies(self, tension: float, free: str | None = None, value: float | None = None) -> np.ndarray:
        key = (float(tension), free, value)
        if key not in self.cache:
            self.solves += 1
            if self.by_order:  # only the targets' orders: the same roots and labels as the table's
                ods = self.order_roots(tension, free, value)
                out = []
                for m, n in self.modes:
                    r = labelled_root(ods[m], n)
                    if r is None:
                        raise SolverError(f"mode ({m},{n}) was not among the solved roots")
                    out.append(ods[m].omega[r].real / (2 * np.pi))
                self.cache[key] = np.array(out)
            else:
                result = solve(self.variant(tension, free, value), self.physics,
                               m_max=self.m_max, n_max=self.n_max, losses=self.losses)
                self.cache[key] = np.array([result.find(m, n).frequency for m, n in self.modes])
        return self.cache[key]
