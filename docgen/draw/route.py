"""Orthogonal wiring on a grid: a maze router that keeps nets apart by construction.

The drawing plane is a grid of pitch :data:`PITCH` (half a schemdraw unit).  Part bodies,
leads and labels block grid nodes.  Each net is routed as a tree (pin to pin, then each further
pin to the nearest node of the tree) by Dijkstra's algorithm over (node, direction) states with a
cost for every bend, so wires come out short and straight.

Rules that make the result faithful (the read-back checks them independently):

* a node belongs to one net; another net may only *cross* it, straight through at right angles,
  and never where the owner has a pin, an end, a bend or a junction;
* nothing may attach to a crossing, so a crossing can never become a junction;
* a route may end only on its own net.

Rail connections end in a port symbol (ground, supply, net flag) at the first free spot in the
symbol's direction, so no long rail wires are needed.
"""

from __future__ import annotations

import heapq
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field

PITCH = 0.5
Node = tuple[int, int]
MOVES: tuple[Node, ...] = ((1, 0), (-1, 0), (0, 1), (0, -1))
BEND_COST = 4
PORT_COST = 2
PORT_DIRECTION = {"ground": (0, -1), "down": (0, -1), "up": (0, 1)}


def node_of(point: tuple[float, float]) -> Node:
    """The grid node at a point (points are on the grid by construction)."""
    return (round(point[0] / PITCH), round(point[1] / PITCH))


def point_of(node: Node) -> tuple[float, float]:
    """The drawing coordinates of a grid node."""
    return (node[0] * PITCH, node[1] * PITCH)


def nodes_in(box: tuple[float, float, float, float]) -> Iterable[Node]:
    """The grid nodes strictly inside ``box`` or on its edge."""
    x0, y0, x1, y1 = box
    for i in range(_ceil(x0 / PITCH), _floor(x1 / PITCH) + 1):
        for j in range(_ceil(y0 / PITCH), _floor(y1 / PITCH) + 1):
            yield (i, j)


def _ceil(value: float) -> int:
    return -int(-value // 1) if abs(value - round(value)) > 1e-9 else round(value)


def _floor(value: float) -> int:
    return int(value // 1) if abs(value - round(value)) > 1e-9 else round(value)


@dataclass
class Grid:
    """The routing state: what occupies each node and the wires laid so far."""

    bounds: tuple[int, int, int, int]
    blocked: set[Node] = field(default_factory=set)
    owner: dict[Node, str] = field(default_factory=dict)
    axes: dict[Node, set[str]] = field(default_factory=dict)
    fixed: set[Node] = field(default_factory=set)
    crossings: set[Node] = field(default_factory=set)
    tree: dict[str, set[Node]] = field(default_factory=dict)
    outward: dict[Node, Node] = field(default_factory=dict)
    reserved: dict[Node, str] = field(default_factory=dict)  # a pin's exit, kept for its net
    paths: list[tuple[str, list[Node]]] = field(default_factory=list)

    def block(self, box: tuple[float, float, float, float]) -> None:
        """Keep wires out of a box (a body with its leads, a label, a symbol)."""
        self.blocked.update(nodes_in(box))

    def add_pin(self, net: str, node: Node, outward: Node) -> None:
        """Reserve a pin for its net."""
        self.owner[node] = net
        self.fixed.add(node)
        self.outward[node] = outward
        self.blocked.discard(node)
        exit_node = (node[0] + outward[0], node[1] + outward[1])
        if exit_node not in self.blocked and exit_node not in self.owner:
            self.reserved.setdefault(exit_node, net)

    def free(self, node: Node) -> bool:
        """True if nothing at all uses the node."""
        return (node not in self.blocked and node not in self.owner and self._inside(node)
                and node not in self.reserved)

    def _inside(self, node: Node) -> bool:
        i0, j0, i1, j1 = self.bounds
        return i0 <= node[0] <= i1 and j0 <= node[1] <= j1

    # ---- laying a path -------------------------------------------------------------------

    def lay(self, net: str, path: list[Node]) -> None:
        """Record a routed path of ``net`` (from its start pin to where it joins)."""
        self.paths.append((net, path))
        nodes = self.tree.setdefault(net, set())
        for index, node in enumerate(path):
            if self.owner.get(node, net) != net:
                self.crossings.add(node)
                continue
            self.owner[node] = net
            nodes.add(node)
            used = self.axes.setdefault(node, set())
            for other in (path[index - 1] if index else None,
                          path[index + 1] if index + 1 < len(path) else None):
                if other is not None:
                    used.add("h" if other[1] == node[1] else "v")
            if index in (0, len(path) - 1) or len(used) > 1:
                self.fixed.add(node)

    # ---- searching -----------------------------------------------------------------------

    def search(self, net: str, start: Node,
               goal: Callable[[Node, Node | None], int | None]) -> list[Node] | None:
        """Cheapest orthogonal path from ``start`` to a node ``goal`` accepts.

        ``goal(node, arriving_direction)`` returns the extra cost of ending there, or ``None``.
        """
        first = self.outward.get(start)
        queue: list[tuple[int, int, Node, Node | None, bool]] = [(0, 0, start, first, False)]
        best: dict[tuple[Node, Node | None], int] = {(start, first): 0}
        parent: dict[tuple[Node, Node | None], tuple[Node, Node | None] | None] = {
            (start, first): None}
        counter = 0
        while queue:
            cost, _, node, heading, finished = heapq.heappop(queue)
            state = (node, heading)
            if finished:
                return self._unwind(parent, state)
            if cost > best.get(state, 1 << 30):
                continue
            crossing = self.owner.get(node, net) != net
            for move in MOVES:
                if (crossing and move != heading) or (
                        heading is not None and move == (-heading[0], -heading[1])):
                    continue
                nxt = (node[0] + move[0], node[1] + move[1])
                new_cost = cost + 1 + (BEND_COST if heading is not None and move != heading else 0)
                extra = goal(nxt, move) if nxt != start else None
                if extra is not None:
                    new_cost += extra
                elif not self._passable(net, nxt, move):
                    continue
                key = (nxt, move)
                if new_cost < best.get(key, 1 << 30):
                    best[key] = new_cost
                    parent[key] = state
                    counter += 1
                    heapq.heappush(queue, (new_cost, counter, nxt, move, extra is not None))
        return None

    def _passable(self, net: str, node: Node, move: Node) -> bool:
        if not self._inside(node) or node in self.blocked:
            return False
        if self.reserved.get(node, net) != net:
            return False
        holder = self.owner.get(node)
        if holder is None:
            return True
        if holder == net or node in self.fixed or node in self.crossings:
            return False
        return self.axes.get(node) == {"v" if move[1] == 0 else "h"}

    @staticmethod
    def _unwind(parent: dict, state: tuple[Node, Node | None]) -> list[Node]:
        path = []
        cursor = state
        while cursor is not None:
            path.append(cursor[0])
            cursor = parent[cursor]
        return path[::-1]

    # ---- nets and ports ------------------------------------------------------------------

    def target_cost(self, net: str, node: Node, move: Node) -> int | None:
        """Extra cost of joining ``net``'s tree at ``node`` arriving by ``move``, or None."""
        if node not in self.tree.get(net, ()) or node in self.crossings:
            return None
        outward = self.outward.get(node)
        if outward is not None and move != (-outward[0], -outward[1]):
            return None if move == outward else BEND_COST
        return 0

    def connect(self, net: str, start: Node) -> bool:
        """Route ``start`` (a pin) to the net's existing tree; False if no path exists."""
        path = self.search(net, start, lambda node, move: self.target_cost(net, node, move))
        if path is None:
            return False
        self.lay(net, path)
        return True

    def connect_port(self, net: str, start: Node, style: str,
                     fits: Callable[[Node], bool]) -> Node | None:
        """Route ``start`` to a new port symbol of ``style``; return the port's node."""
        wanted = PORT_DIRECTION.get(style)
        here = self.outward.get(start)
        if (wanted is None or here == wanted) and fits(start):
            self.lay(net, [start])
            return start

        def goal(node: Node, move: Node) -> int | None:
            if not self.free(node) or (wanted is not None and move != wanted):
                return None
            return PORT_COST if fits(node) else None

        path = self.search(net, start, goal)
        if path is None:
            return None
        self.lay(net, path)
        return path[-1]
