"""Drawings of predicted structures: 3D models from the analysis, drawn as SVG.

One source: a :class:`Model` is built from the very isomers (ideal polyhedron
sites) the rules judge claims against, and both the static SVG and the page's
turning script draw that model.  Conventions (shown in the page's legend):

- atoms are discs coloured by element from a palette chosen to stay apart for
  the common colour-vision deficiencies (Okabe and Ito's), and always carry
  their symbol, so colour is never the only cue;
- bonds are drawn once per bond order (one, two or three lines);
- lone pairs are translucent lobes with a dashed outline, pointing from the
  centre along their site;
- sites of bipyramids and square pyramids are marked ax / eq / ap / bas;
- an angle a claim mentions is drawn as an arc with its ideal value.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from html import escape
from typing import Any

from ..chem.model import LONE_PAIR
from ..review.predictions import written_shape

# Okabe and Ito's palette (Color Universal Design, 2002); each element kind gets one entry,
# with a dark or light symbol chosen for contrast.
PALETTE = {
    "H": ("#FFFFFF", "#000000"),
    "C": ("#555555", "#FFFFFF"),
    "N": ("#0072B2", "#FFFFFF"),
    "O": ("#D55E00", "#FFFFFF"),
    "F": ("#009E73", "#FFFFFF"),
    "Cl": ("#56B4E9", "#000000"),
    "Br": ("#882255", "#FFFFFF"),
    "I": ("#CC79A7", "#000000"),
    "S": ("#F0E442", "#000000"),
    "P": ("#E69F00", "#000000"),
}
OTHER_ELEMENT = ("#BBBBBB", "#000000")
LONE_PAIR_FILL = "#9E9AC8"
SITE_MARKS = {"axial": "ax", "equatorial": "eq", "apical": "ap", "basal": "bas"}
# The default view: turned about the vertical axis, then tipped towards the viewer, so that
# bipyramids stand upright and their equator shows as an ellipse.
VIEW_YAW, VIEW_PITCH = math.radians(15.0), math.radians(18.0)


@dataclass(frozen=True, slots=True)
class ModelAtom:
    label: str  # as written ("F", "OH"), the centre's symbol, or LONE_PAIR
    element: str | None  # None for a lone pair
    position: tuple[float, float, float]  # ångström-like units, centre at the origin
    site: str  # "centre", "axial", "equatorial", ...


@dataclass(frozen=True, slots=True)
class Model:
    """One arrangement of one centre: what a drawing shows."""

    formula: str
    atoms: tuple[ModelAtom, ...]  # the centre first
    bonds: tuple[tuple[int, int, int], ...]  # (atom index, atom index, order)
    caption: str  # isomer name, point group, polarity, rank
    description: str  # the text alternative
    angles: tuple[tuple[int, int, float], ...] = ()  # (site index, site index, degrees) to mark

    def angle_between(self, first: int, second: int) -> float:
        """Degrees between two atoms as seen from the centre (measured back from the coordinates)."""
        centre = self.atoms[0].position
        u = [a - c for a, c in zip(self.atoms[first].position, centre)]
        v = [b - c for b, c in zip(self.atoms[second].position, centre)]
        cosine = sum(a * b for a, b in zip(u, v)) / (math.hypot(*u) * math.hypot(*v))
        return math.degrees(math.acos(max(-1.0, min(1.0, cosine))))


def models_of(analysis: Any, mentioned: tuple[tuple[str, str, str], ...] = (), limit: int = 6) -> list[Model]:
    """The drawable arrangements of a species' first centre: the expected isomer first.

    ``mentioned`` holds the angles claims name (A, X, B): each is marked in the drawings.
    Empty outside the model or where the centre has no fixed arrangement of sites.
    """
    if analysis is None or analysis.outside_model is not None or not analysis.centres:
        return []
    centre = analysis.centres[0]
    ordered = sorted(centre.isomers, key=lambda isomer: isomer.rank)
    seen_mirrors: set[int] = set()
    models = []
    for index, isomer in enumerate(ordered):
        original = centre.isomers.index(isomer)
        if original in seen_mirrors:
            continue  # one of each enantiomer pair is enough to see the arrangement
        if isomer.enantiomer is not None:
            seen_mirrors.add(isomer.enantiomer)
        models.append(_model(analysis, centre, isomer, mentioned))
        if len(models) == limit:
            break
    return models


def _model(analysis: Any, centre: Any, isomer: Any, mentioned: tuple[tuple[str, str, str], ...]) -> Model:
    from ..chem.bondlength import predict_bond_length

    orders = {l.label: l.bond_order for l in centre.ligands}
    atoms = [ModelAtom(centre.central, centre.central, (0.0, 0.0, 0.0), "centre")]
    bonds = []
    upright = _upright(centre.electron_geometry, isomer.sites)
    for site in isomer.sites:
        if site.label == LONE_PAIR:
            length = 1.0
        else:
            predicted = predict_bond_length(centre.central, site.symbol, orders.get(site.label, 1))
            length = predicted.angstrom if predicted is not None else 1.5
        position = tuple(round(length * c, 4) for c in upright(site.vector))
        atoms.append(ModelAtom(site.label, None if site.label == LONE_PAIR else site.symbol, position, site.position))
        if site.label != LONE_PAIR:
            bonds.append((0, len(atoms) - 1, orders.get(site.label, 1)))
    angles = []
    for a, x, b in mentioned:
        if x != centre.central:
            continue
        pair = _first_pair(atoms, a, b)
        if pair is not None:
            model = Model(analysis.formula, tuple(atoms), (), "", "")
            angles.append((pair[0], pair[1], round(model.angle_between(*pair), 2)))
    polarity = "polar" if isomer.polar else "nonpolar"
    rank = "expected" if isomer.rank == 1 else f"rank {isomer.rank}"
    caption = f"{isomer.name} · {isomer.point_group} · {polarity} · {rank}"
    return Model(analysis.formula, tuple(atoms), tuple(bonds), caption,
                 _description(analysis.formula, centre, isomer, atoms, angles), tuple(angles))


def _upright(geometry: str, sites) -> Any:
    """A rotation that stands the drawing the way chemists draw it (a pure turn: angles unchanged).

    Bipyramids, square pyramids and octahedra already have their axis along z (shown upright).
    A tetrahedron is turned so its lone pairs (or one bond) point up; a trigonal plane is stood
    on edge facing the viewer, with a lone pair on top.
    """
    def turn(vector, onto):
        """Rodrigues' rotation taking unit ``vector`` onto unit ``onto``."""
        cross = (vector[1] * onto[2] - vector[2] * onto[1], vector[2] * onto[0] - vector[0] * onto[2],
                 vector[0] * onto[1] - vector[1] * onto[0])
        dot = sum(a * b for a, b in zip(vector, onto))
        sine = math.hypot(*cross)
        if sine < 1e-9:
            return (lambda v: v) if dot > 0 else (lambda v: (v[0], -v[1], -v[2]))  # a half turn about x
        axis = tuple(c / sine for c in cross)
        angle = math.atan2(sine, dot)

        def rotate(v):
            c, s_ = math.cos(angle), math.sin(angle)
            k_dot = sum(a * b for a, b in zip(axis, v))
            k_cross = (axis[1] * v[2] - axis[2] * v[1], axis[2] * v[0] - axis[0] * v[2], axis[0] * v[1] - axis[1] * v[0])
            return tuple(v[i] * c + k_cross[i] * s_ + axis[i] * k_dot * (1 - c) for i in range(3))
        return rotate

    def unit(v):
        norm = math.hypot(*v)
        return tuple(c / norm for c in v) if norm > 1e-9 else None

    pairs = [site.vector for site in sites if site.label == LONE_PAIR]
    total = unit(tuple(sum(v[i] for v in pairs) for i in range(3))) if pairs else None
    if geometry == "tetrahedral":
        up = turn(total or unit(sites[0].vector), (0.0, 0.0, 1.0))
        # then about the vertical, so the first bond down lies across the picture, not towards the viewer
        lowest = min((up(site.vector) for site in sites if site.label != LONE_PAIR), key=lambda v: v[2])
        across = unit((lowest[0], lowest[1], 0.0))
        spin = turn(across, (1.0, 0.0, 0.0)) if across else (lambda v: v)
        return lambda v: spin(up(v))
    if geometry == "trigonal-planar":
        standing = turn((0.0, 0.0, 1.0), (0.0, -1.0, 0.0))  # the plane's normal towards the viewer
        top = unit(standing(total or sites[0].vector))
        lift = turn(top, (0.0, 0.0, 1.0)) if top else (lambda v: v)
        return lambda v: lift(standing(v))
    if geometry == "octahedral" and pairs:  # lone pairs above (and below) the plane or the base
        return turn(unit(pairs[0]), (0.0, 0.0, 1.0))
    return lambda v: v


def _first_pair(atoms: list[ModelAtom], a: str, b: str) -> tuple[int, int] | None:
    for i in range(1, len(atoms)):
        for j in range(i + 1, len(atoms)):
            names = {(atoms[i].element, atoms[j].element), (atoms[j].element, atoms[i].element)}
            if (a, b) in names:
                return i, j
    return None


def _description(formula: str, centre: Any, isomer: Any, atoms: list[ModelAtom],
                 angles: list[tuple[int, int, float]]) -> str:
    """The drawing in words: shape, what sits where, the marked angles."""
    placed: dict[tuple[str, str], int] = {}
    for atom in atoms[1:]:
        what = "lone pair" if atom.element is None else atom.label
        placed[(what, atom.site)] = placed.get((what, atom.site), 0) + 1
    where = ", ".join(f"{n} {what}{'s' if n > 1 and what == 'lone pair' else ''}"
                      + (f" {atom_site}" if atom_site not in ("vertex",) else "")
                      for (what, atom_site), n in placed.items())
    marked = "; ".join(f"{atoms[i].label}-{centre.central}-{atoms[j].label} {value:g}°" for i, j, value in angles)
    return (f"{formula}: {written_shape(centre.shape)} at {centre.central} ({where}); {isomer.point_group}, "
            f"{'polar' if isomer.polar else 'nonpolar'}" + (f"; marked: {marked}" if marked else ""))


def view(position: tuple[float, float, float], yaw: float = VIEW_YAW, pitch: float = VIEW_PITCH) -> tuple[float, float, float]:
    """(screen right, screen up, towards the viewer) of a model point.

    The polyhedra put their main axis along model z, shown upright: the model is turned about z
    (yaw), then tipped about the screen's horizontal axis (pitch).  The page's script does the same.
    """
    x, y, z = position
    x, y = x * math.cos(yaw) - y * math.sin(yaw), x * math.sin(yaw) + y * math.cos(yaw)
    y, z = y * math.cos(pitch) - z * math.sin(pitch), y * math.sin(pitch) + z * math.cos(pitch)
    return x, z, -y


def svg(model: Model, size: int = 220, element_id: str = "") -> str:
    """A standalone SVG of the model in the default view (the page's script redraws it when turned)."""
    reach = max((math.hypot(*atom.position) for atom in model.atoms), default=1.0) or 1.0
    scale = size * 0.36 / reach  # the farthest atom stays clear of the edge, however long the bonds
    half = size / 2
    projected = [view(atom.position) for atom in model.atoms]

    def point(index: int) -> tuple[float, float]:
        right, up, _ = projected[index]
        return half + scale * right, half - scale * up

    parts = []
    for first, second, order in model.bonds:
        parts.append((min(projected[first][2], projected[second][2]) - 0.01, _bond(point(first), point(second), order)))
    for index, atom in enumerate(model.atoms):
        depth = projected[index][2]
        if atom.element is None:
            parts.append((depth, _lobe(point(0), point(index), scale)))
        else:
            parts.append((depth + 0.001, _atom(point(index), atom, scale, index == 0)))
    for first, second, value in model.angles:
        if value < 179.0:  # a straight angle needs no arc: the atoms in line show it
            parts.append((10.0, _arc(point(0), point(first), point(second), value, scale)))
    body = "".join(text for _, text in sorted(parts, key=lambda item: item[0]))
    data = escape(json.dumps({"atoms": [[a.element or "", list(a.position), a.site] for a in model.atoms],
                              "bonds": [list(b) for b in model.bonds],
                              "angles": [list(a) for a in model.angles]}, separators=(",", ":")), quote=True)
    identity = f' id="{escape(element_id, quote=True)}"' if element_id else ""
    return (f'<svg{identity} class="molecule" xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {size} {size}" '
            f'width="{size}" height="{size}" role="img" aria-label="{escape(model.description, quote=True)}" '
            f'data-model="{data}"><title>{escape(model.description)}</title>{body}</svg>')


def _bond(start: tuple[float, float], end: tuple[float, float], order: int) -> str:
    dx, dy = end[0] - start[0], end[1] - start[1]
    length = math.hypot(dx, dy) or 1.0
    nx, ny = -dy / length * 3.2, dx / length * 3.2
    offsets = {1: (0.0,), 2: (-0.5, 0.5), 3: (-1.0, 0.0, 1.0)}.get(order, (0.0,))
    return "".join(
        f'<line x1="{start[0] + k * nx:.1f}" y1="{start[1] + k * ny:.1f}" x2="{end[0] + k * nx:.1f}" '
        f'y2="{end[1] + k * ny:.1f}" stroke="#222" stroke-width="2.2" stroke-linecap="round"/>'
        for k in offsets)


def _atom(at: tuple[float, float], atom: ModelAtom, scale: float, is_centre: bool) -> str:
    fill, ink = PALETTE.get(atom.element or "", OTHER_ELEMENT)
    radius = scale * (0.42 if is_centre else 0.32)
    mark = SITE_MARKS.get(atom.site)
    site = (f'<text x="{at[0] + radius + 1:.1f}" y="{at[1] - radius:.1f}" font-size="9" fill="#333">{mark}</text>'
            if mark else "")
    return (f'<circle cx="{at[0]:.1f}" cy="{at[1]:.1f}" r="{radius:.1f}" fill="{fill}" stroke="#222" stroke-width="1.2"/>'
            f'<text x="{at[0]:.1f}" y="{at[1] + 4:.1f}" font-size="11" font-family="sans-serif" text-anchor="middle" '
            f'fill="{ink}">{escape(atom.label if len(atom.label) <= 3 else atom.element or "")}</text>{site}')


def _lobe(centre: tuple[float, float], tip: tuple[float, float], scale: float) -> str:
    dx, dy = tip[0] - centre[0], tip[1] - centre[1]
    angle = math.degrees(math.atan2(dy, dx))
    reach = max(math.hypot(dx, dy), scale * 0.3)
    mid = (centre[0] + dx * 0.75, centre[1] + dy * 0.75)
    return (f'<ellipse cx="{mid[0]:.1f}" cy="{mid[1]:.1f}" rx="{reach * 0.55:.1f}" ry="{scale * 0.28:.1f}" '
            f'transform="rotate({angle:.1f} {mid[0]:.1f} {mid[1]:.1f})" fill="{LONE_PAIR_FILL}" fill-opacity="0.55" '
            f'stroke="#54278F" stroke-dasharray="3 2"/>')


def _arc(centre: tuple[float, float], first: tuple[float, float], second: tuple[float, float], value: float,
         scale: float) -> str:
    radius = scale * 0.7
    a1 = math.atan2(first[1] - centre[1], first[0] - centre[0])
    a2 = math.atan2(second[1] - centre[1], second[0] - centre[0])
    if (a2 - a1) % (2 * math.pi) > math.pi:
        a1, a2 = a2, a1
    p1 = (centre[0] + radius * math.cos(a1), centre[1] + radius * math.sin(a1))
    p2 = (centre[0] + radius * math.cos(a2), centre[1] + radius * math.sin(a2))
    middle = a1 + ((a2 - a1) % (2 * math.pi)) / 2
    label = (centre[0] + radius * 1.45 * math.cos(middle), centre[1] + radius * 1.45 * math.sin(middle))
    return (f'<path d="M{p1[0]:.1f},{p1[1]:.1f} A{radius:.1f},{radius:.1f} 0 0 1 {p2[0]:.1f},{p2[1]:.1f}" '
            f'fill="none" stroke="#000" stroke-width="1"/>'
            f'<text x="{label[0]:.1f}" y="{label[1]:.1f}" font-size="10" text-anchor="middle" fill="#000">{value:g}°</text>')


def picture_markdown(analysis: Any, mentioned: tuple[tuple[str, str, str], ...] = (), size: int = 160) -> str | None:
    """A Markdown image of the expected arrangement (an SVG data URI), or None when nothing is drawn."""
    import base64

    models = models_of(analysis, mentioned, limit=1)
    if not models:
        return None
    encoded = base64.b64encode(svg(models[0], size=size).encode("utf-8")).decode("ascii")
    alternative = models[0].description.replace("[", "(").replace("]", ")")
    return f"![{alternative}](data:image/svg+xml;base64,{encoded})"


def angles_claimed(annotation: Any) -> tuple[tuple[str, str, str], ...]:
    """The angles (A, X, B) an annotation's claims name: each is marked in its drawings."""
    from ..notation.model import AngleClaim, AngleOrderClaim

    found: list[tuple[str, str, str]] = []
    for claim in annotation.claims:
        if isinstance(claim, AngleClaim) and claim.atoms:
            found.append(claim.atoms)
        elif isinstance(claim, AngleOrderClaim):
            found.extend((claim.left, claim.right))
    return tuple(dict.fromkeys(found))
