"""Every flow-weighted matrix of a step as one affine function of the consumers' draws.

The link flows are affine in the consumers' volumetric draws,
``q = a + B·v`` (:mod:`planner.ship.flows`), and each matrix the step needs
is linear in the link flows; so all of them, flattened into one vector, are
``c + v·D`` with ``c = a·T`` and ``D = Bᵀ·T`` worked out once per simulation
(``T``: which link adds to which entry). One product per step then gives

- the link flows ``q`` (L,);
- ``[A | Bp]`` (S, S + P): the stirred-volume system matrix
  ``(ss − diag(in))/V`` and the pipe outflows' weights into the stirred
  volumes ``sp/V``, over the volumes the propagators hold (1/h);
- ``[ss | sp]`` (S, S + P): the flows into each stirred volume;
- ``[ps | pp]`` (P, S + P): the flows into each pipe;
- the total inflow and outflow of each stirred volume (S each), the flow
  through each pipe (P);
- ``[ss − diag(out) | sp]`` (S, S + P): what each stirred volume's content
  gains per unit of the compositions flowing (its inflows less its outflow);
- the net inflow of each tank (S, 0 for a fixed volume) and the flow from
  each pipe into the stirred volumes (P);
- ``A`` and ``Bp`` again, each contiguous (S, S and S, P),

all m³/h but for ``[A | Bp]``, as :class:`~planner.flushing.network.FlowMatrices`
names them. Grouping the sums this way makes a node whose inflow does not
depend on the draws (a mixing tank fed by the supply and the return of a fixed
loop) come out the same to the last bit at every step, so its propagators are
reused.
"""

from __future__ import annotations

import itertools
import math
from typing import NamedTuple

import numpy as np

from planner.flushing.flows import NEG_FLOW_M3H, FlushError
from planner.flushing.network import PIPE, STIRRED, Network, Routing
from planner.flushing.step import shares_of

_SNAP = 1e-13  # a coefficient of D this small (relative to the largest) is a cancellation: 0


class Flows(NamedTuple):
    """The matrices of one step's link flows (views into one vector)."""

    links_m3h: np.ndarray  # (L,)
    system: np.ndarray  # (S, S + P): [A | Bp], 1/h
    into_stirred: np.ndarray  # (S, S + P): [ss | sp], m³/h
    into_pipes: np.ndarray  # (P, S + P): [ps | pp], m³/h
    stirred_in: np.ndarray  # (S,) m³/h
    stirred_out: np.ndarray  # (S,) m³/h
    pipe_flow: np.ndarray  # (P,) m³/h
    balance: np.ndarray  # (S, S + P): [ss − diag(stirred_out) | sp], m³/h
    tank_net: np.ndarray  # (S,) inflow less outflow of each tank (0 for a fixed volume), m³/h
    pipe_to_stirred: np.ndarray  # (P,) flow from each pipe into the stirred volumes, m³/h
    a: np.ndarray  # (S, S): system[:, :S], contiguous, 1/h
    bp: np.ndarray  # (S, P): system[:, S:], contiguous, 1/h


class FlowMap:
    """The affine map from the consumers' draws (C,) m³/h to a step's :class:`Flows`.

    ``single_inflow``: every pipe is fed by one link, so the share of each
    pipe's inflow from each node is 0 or 1 whatever the flows (``unit_shares``).
    :meth:`flows` writes into one buffer: its :class:`Flows` hold until the next call.
    """

    def __init__(self, net: Network, routing: Routing, volume_m3: np.ndarray) -> None:
        s, p, n_links = len(net.stirred), len(net.pipes), len(routing.src)
        self.net = net
        shapes = ((n_links,), (s, s + p), (s, s + p), (p, s + p), (s,), (s,), (p,), (s, s + p),
                  (s,), (p,), (s, s), (s, p))
        self._bounds = [0, *itertools.accumulate(math.prod(sh) for sh in shapes)]
        self._shapes = shapes
        self._per_link = _per_link(routing, s, p, self._bounds, net.is_tank.tolist())
        self._constant = net.flow_constant_m3h @ self._per_link
        d = net.flow_per_consumption.T @ self._per_link
        d[np.abs(d) <= _SNAP * float(np.abs(d).max(initial=0.0))] = 0.0
        self._per_consumption = d
        fed = routing.dst_kind == PIPE
        counts = np.bincount(routing.dst[fed], minlength=p)
        self.single_inflow = bool(np.all(counts == 1))
        b = self._bounds
        unit = (self._per_link[:, b[3] : b[4]] != 0.0).any(axis=0).astype(float)
        self.unit_shares = shares_of(unit.reshape(p, s + p), s)
        self._flat = np.zeros(b[-1])
        self._views = Flows(*[self._flat[b[i] : b[i + 1]].reshape(sh)
                              for i, sh in enumerate(shapes)])
        self.set_volumes(volume_m3)

    def set_volumes(self, volume_m3: np.ndarray) -> None:
        """Hold the stirred volumes (S,) m³ that ``[A | Bp]`` divides by."""
        b, (s, width) = self._bounds, self._shapes[1]
        scale = np.ones(b[-1])
        inv = 1.0 / np.asarray(volume_m3, dtype=float)
        scale[b[1] : b[2]] = np.repeat(inv, width)
        scale[b[10] : b[11]] = np.repeat(inv, s)
        scale[b[11] : b[12]] = np.repeat(inv, width - s)
        self.volume_m3 = np.array(volume_m3, dtype=float)
        self._c = self._constant * scale
        self._d = self._per_consumption * scale
        self._t = self._per_link * scale

    def flows(self, consumption_m3h: np.ndarray, time_h: float) -> Flows:
        """The step's flows for volumetric draws (C,) m³/h (``time_h`` for the message).

        Raises :class:`~planner.flushing.flows.FlushError` when a link flow
        would be below −1e-9 m³/h; flows between that and 0 are taken as 0.
        """
        flat = self._flat
        np.dot(consumption_m3h, self._d, out=flat)
        flat += self._c
        q = self._views.links_m3h
        if q.size and min(q.tolist()) < 0.0:
            self._clip(q.copy(), time_h)
        return self._views

    def _clip(self, q: np.ndarray, time_h: float) -> None:
        """Rewrite the flows from link flows ``q`` clipped at 0 (FlushError below −1e-9 m³/h)."""
        i = int(np.argmin(q))
        if q[i] < -NEG_FLOW_M3H:
            raise FlushError(
                f"flow on link {self.net.link_names[i]} would be {q[i]:.4g} m³/h at "
                f"t = {time_h:.4f} h: a pump rate below the consumption it must cover"
            )
        np.dot(np.maximum(q, 0.0), self._t, out=self._flat)


def _per_link(routing: Routing, s: int, p: int, bounds: list[int], is_tank: list[bool]
              ) -> np.ndarray:
    """``T`` (L, K): the entries of the flat vector each unit of link flow adds to."""
    n_links = len(routing.src)
    t = np.zeros((n_links, bounds[-1]))
    width = s + p
    for link in range(n_links):
        sk, si = int(routing.src_kind[link]), int(routing.src[link])
        dk, di = int(routing.dst_kind[link]), int(routing.dst[link])
        col = si if sk == STIRRED else s + si
        t[link, bounds[0] + link] = 1.0  # the link flow itself
        if sk == STIRRED:
            t[link, bounds[5] + si] += 1.0  # stirred_out
            t[link, bounds[7] + si * width + si] -= 1.0  # balance: − outflow on the diagonal
            if is_tank[si]:
                t[link, bounds[8] + si] -= 1.0  # tank_net
        if dk == STIRRED:
            t[link, bounds[1] + di * width + col] += 1.0  # system, off the diagonal part
            t[link, bounds[1] + di * width + di] -= 1.0  # system: − inflow on the diagonal
            if sk == STIRRED:  # the same, as A and Bp
                t[link, bounds[10] + di * s + si] += 1.0
            else:
                t[link, bounds[11] + di * p + si] += 1.0
            t[link, bounds[10] + di * s + di] -= 1.0
            t[link, bounds[2] + di * width + col] += 1.0  # into_stirred
            t[link, bounds[4] + di] += 1.0  # stirred_in
            t[link, bounds[7] + di * width + col] += 1.0  # balance
            if is_tank[di]:
                t[link, bounds[8] + di] += 1.0  # tank_net
            if sk != STIRRED:
                t[link, bounds[9] + si] += 1.0  # pipe_to_stirred
        elif dk == PIPE:
            t[link, bounds[3] + di * width + col] += 1.0  # into_pipes
            t[link, bounds[6] + di] += 1.0  # pipe_flow
    return t
