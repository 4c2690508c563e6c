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

    def free(self, node: Node, net: str | None = None) -> bool:
        """True if nothing uses the node (a pin exit kept for ``net`` counts as free)."""
        return (node not in self.blocked and node not in self.owner and self._inside(node)
                and self.reserved.get(node, net) == net)

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
               goal: Callable[[Node, Node | None], int | None],
               towards: tuple[int, int, int, int] | None = None,
               targets: set[Node] | None = None) -> list[Node] | None:
        """Cheapest orthogonal path from ``start`` to a node ``goal`` accepts.

        ``goal(node, arriving_direction)`` returns the extra cost of ending there, or ``None``;
        it is asked only about ``targets`` if those are given.  ``towards``, the box all goals
        lie in, makes the search an A* search (the distance to the box never overestimates
        the cost left).
        """
        walls, crossable = self._obstacles(net)
        i0, j0, i1, j1 = self.bounds
        x0, y0, x1, y1 = towards if towards is not None else (0, 0, 0, 0)
        guided = towards is not None
        first = self.outward.get(start)
        queue: list[tuple[int, int, int, Node, Node | None, bool]] = [(0, 0, 0, start, first,
                                                                        False)]
        best: dict[tuple[Node, Node | None], int] = {(start, first): 0}
        parent: dict[tuple[Node, Node | None], tuple[Node, Node | None] | None] = {
            (start, first): None}
        counter = 0
        pop, push = heapq.heappop, heapq.heappush
        while queue:
            _, _, cost, node, heading, finished = pop(queue)
            state = (node, heading)
            if finished:
                return self._unwind(parent, state)
            if cost > best[state]:
                continue
            crossing = node in crossable
            for move in MOVES:
                if heading is not None and (move[0] == -heading[0] and move[1] == -heading[1]
                                            or crossing and move != heading):
                    continue
                nxt = (node[0] + move[0], node[1] + move[1])
                new_cost = cost + 1 + (BEND_COST if heading is not None and move != heading else 0)
                extra = (goal(nxt, move) if nxt != start and (targets is None or nxt in targets)
                         else None)
                if extra is not None:
                    new_cost += extra
                elif (nxt in walls or not (i0 <= nxt[0] <= i1 and j0 <= nxt[1] <= j1)
                      or crossable.get(nxt, "") == ("h" if move[1] == 0 else "v")):
                    continue
                key = (nxt, move)
                if new_cost < best.get(key, 1 << 30):
                    best[key] = new_cost
                    parent[key] = state
                    counter += 1
                    left = 0
                    if guided:
                        dx = max(0, x0 - nxt[0], nxt[0] - x1)
                        dy = max(0, y0 - nxt[1], nxt[1] - y1)
                        # going both across and along needs at least one more bend
                        left = dx + dy + (BEND_COST if dx and dy else 0)
                    push(queue, (new_cost + left, counter, new_cost, nxt, move,
                                 extra is not None))
        return None

    def _obstacles(self, net: str) -> tuple[set[Node], dict[Node, str]]:
        """Nodes ``net`` may not enter, and the crossable nodes of other nets with the axis
        their owner runs along (a crossing must go the other way)."""
        walls = set(self.blocked) | self.crossings
        walls.update(n for n, holder in self.reserved.items() if holder != net)
        crossable: dict[Node, str] = {}
        for node, holder in self.owner.items():
            used = self.axes.get(node, set())
            if holder == net or node in self.fixed or len(used) != 1:
                walls.add(node)
            else:
                crossable[node] = next(iter(used))
        return walls, crossable

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
        tree = self.tree.get(net, set())
        box = (min(n[0] for n in tree), min(n[1] for n in tree), max(n[0] for n in tree),
               max(n[1] for n in tree)) if tree else None
        path = self.search(net, start, lambda node, move: self.target_cost(net, node, move),
                           box, tree)
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
