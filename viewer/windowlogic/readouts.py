"""The readout table's lines, without Qt: quantity, value and formula for the focus. For a mate
or feature: each feature at its what-if state, then its limits and worst-case boundaries; the
mate's worst case; the fastener tables. (An inspection's lines are in
:mod:`viewer.windowlogic.inspection`.) Every number and formula comes from geom.

A :class:`Table` collects the lines and records what each value means, ``(feature id, quantity)
-> value``, so that tests and the window can ask for a quantity by name.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from geom.analysis import SceneResult, mate_formula, term
from geom.readout import feature_rows

from .whatif import whatif_rows

FEATURE_HEAD = "#e3f2fd"  # background of a block's heading: a feature (or inspection) at its state
FIXED_HEAD = "#eceff1"  # background of a heading of values that do not move with the what-if
CONSTANT = "#fff8e1"  # background of a what-if row that does not change with the produced size


def _same(text: str) -> str:
    return text


@dataclass(frozen=True)
class Line:
    """One row of the table: its three cells, its look (bold, background, text colour of the
    first two cells) and its tooltip ("" for the cell's own text)."""

    cells: tuple[str, str, str]
    look: tuple = (False, None, None)
    tip: str = ""


class Table:
    """Lines being collected. ``ui`` turns free text into what the window can draw (symbols no
    installed font has become words, :func:`viewer.app.glyphs.ui_text`); the identity by default."""

    def __init__(self, ui: Callable[[str], str] = _same):
        self.lines: list[Line] = []
        self.values: dict[tuple[str, str], str] = {}  # (feature id, quantity) -> value shown
        self.ui = ui

    def add(self, cells, bold=False, bg: str | None = None, tip: str = "", fg: str | None = None) -> None:
        self.lines.append(Line(tuple(cells), (bold, bg, fg), tip))

    def row(self, fid: str, quantity: str, value: str, formula: str = "", **kw) -> None:
        """A line whose value is recorded under ``(fid, quantity)``."""
        self.values[(fid, quantity)] = value
        self.add((quantity, value, formula), **kw)


def fixed_rows(res: SceneResult, fid: str, units, standard) -> list:
    """geom's rows for a feature's limits and boundaries (they do not move with the what-if)."""
    return list(feature_rows(res.features[fid], units, standard))


def feature_lines(t: Table, res: SceneResult, fid: str, state, units, standard, fixed=fixed_rows) -> None:
    """Feature ``fid`` at its what-if ``state``, then its limits and worst-case boundaries."""
    r = res.features[fid]
    t.add((f"{r.feature.kind.value} {fid} at the sizes set", "", ""), bold=True, bg=FEATURE_HEAD)
    for row in whatif_rows(res, fid, state):
        t.values[(fid, row.quantity)] = row.value
        t.add((row.quantity, row.value, row.formula), bg=CONSTANT if row.constant else None,
              tip="Does not change with the produced size" if row.constant else "")
    t.add((f"{fid}: limits and worst-case boundaries", "", ""), bold=True, bg=FIXED_HEAD)
    for q, v, fml in fixed(res, fid, units, standard):
        t.values[(fid, q)] = v
        t.add((q, t.ui(v), t.ui(fml)))
    for n in r.notes:
        t.add(("note", "", n))


def mate_lines(t: Table, res: SceneResult, mi: int, units, standard) -> None:
    """The worst case of mate ``mi``: clearance with the tolerances and from the sizes alone."""
    u, st = units, standard
    mr = res.mates[mi]
    t.add((f"mate {mi + 1}: worst case", "", ""), bold=True, bg=FIXED_HEAD)
    t.add(("worst-case clearance", u.fmt(mr.clearance_min, signed=True), mate_formula(mr, u, st)))
    t.add(("clearance from sizes alone", u.fmt(mr.clearance_min_size, signed=True),
           f"hole {term('mmc', st)[0]} - pin {term('mmc', st)[0]}"))
    t.add(("loosest fit from sizes", u.fmt(mr.clearance_max, signed=True),
           f"hole {term('lmc', st)[0]} - pin {term('lmc', st)[0]}"))
    for a in mr.assumptions:
        t.add(("assumes", "", a))


def fastener_lines(t: Table, res: SceneResult, units, standard, only: str | None = None) -> None:
    """The position tolerance of every fastener table, or of ``only`` with its inputs too."""
    u, st = units, standard
    for fid, fr in res.fasteners.items():
        if only is not None and fid != only:
            continue
        fa = fr.fastener
        t.add((f"fastener {fid} ({fa.kind})", "", ""), bold=True, bg=FIXED_HEAD)
        if only is not None:  # the fastener looked at: its inputs too
            t.row(fid, "fastener F (at its largest size)", u.fmt(fa.fastener), "")
            t.row(fid, "clearance hole H (at its smallest size)", u.fmt(fa.hole), "")
            if fa.projection is not None:
                t.row(fid, "projection P", u.fmt(fa.projection), "")
            if fa.thread_depth is not None:
                t.row(fid, "thread depth D", u.fmt(fa.thread_depth), "")
        t.values[(fid, "position tolerance")] = u.fmt(fr.position_tolerance.value)
        t.add(("position tolerance", u.fmt(fr.position_tolerance.value), fr.position_tolerance.formula(u, st)))
        if fr.position_tolerance_unprojected is not None:
            t.add(("without a projected zone", u.fmt(fr.position_tolerance_unprojected.value),
                   fr.position_tolerance_unprojected.formula(u, st)))


def pattern_lines(t: Table, res: SceneResult, units, standard, pid: str, states: dict | None = None) -> None:
    """A pattern's datums, members (measured: the right-way reading and the wrong way's allowed;
    else the zone at MMC) and gauge, and the pairs of its interfaces."""
    from .whatif import pattern_now

    u, st = units, standard
    pr = pattern_now(res, res.scene, pid, states or {})
    t.add((f"pattern {pid}", "", f"{pr.pattern.count} × {pr.pattern.feature.id} to "
           f"{'|'.join(pr.pattern.frame.letters)}, {pr.pattern.requirement} requirement"), bold=True, bg=FIXED_HEAD)
    for d in res.frames.datums:
        if d.letter in pr.pattern.frame.letters:
            t.add((f"datum {d.letter} boundary ({d.boundary})", u.fmt(d.mmb.value), d.mmb.formula(u, st)))
            if d.shift_max is not None:
                t.add((f"datum {d.letter}: most shift", u.fmt(d.shift_max.diametral.value),
                       d.shift_max.diametral.formula(u, st) + " (moves the pattern as one body)"))
    for m, g in zip(pr.members, pr.gauge.pins):
        where = f"({u.fmt(m.basic[0])}, {u.fmt(m.basic[1])})"
        t.add((f"member {m.index + 1} at {where}: gauge {g.kind}", u.fmt(g.diameter.value), g.diameter.formula(u, st)))
    if pr.right is not None:
        for i, r in enumerate(pr.right.readings):
            wrong = "" if pr.wrong is None else \
                f"; shift as bonus (the wrong way) would allow {u.fmt(pr.wrong.readings[i].allowed)}"
            t.add((f"member {r.index + 1}: position after the best fit", u.fmt(r.position),
                   f"allowed {u.fmt(r.allowed)}, margin {u.fmt(r.margin, signed=True)}{wrong}"))
            if pr.composite is not None:
                lo = pr.composite.lower.readings[i]
                t.add((f"member {r.index + 1}: lower tier", u.fmt(lo.position),
                       f"allowed {u.fmt(lo.allowed)}, margin {u.fmt(lo.margin, signed=True)}"))
    for it in res.frames.interfaces:
        if pid in (it.holes, it.pins):
            for pc in it.mate.pairs:
                t.add((f"{it.holes} / {it.pins} pair {pc.index + 1}", u.fmt(pc.clearance_min.value),
                       pc.clearance_min.formula(u, st)))
            if it.mate.pilot is not None:
                t.add((f"{it.holes} / {it.pins} pilots", u.fmt(it.mate.pilot.value), it.mate.pilot.formula(u, st)))


def focus_table(res: SceneResult, scene, states, features, mate: int | None, fastener: str | None,
                ui: Callable[[str], str] = _same, fixed=fixed_rows, pattern: str | None = None) -> Table:
    """The lines for a mate, feature, fastener or pattern focus: ``features`` at their
    ``states``, the mate ``mate``'s worst case, then the fastener ``fastener`` (every fastener
    when None and no pattern is looked at), or the pattern ``pattern``."""
    u, st = scene.units, scene.standard
    t = Table(ui)
    if pattern is not None:
        pattern_lines(t, res, u, st, pattern, states)
        return t
    for fid in features:
        feature_lines(t, res, fid, states[fid], u, st, fixed)
    if mate is not None:
        mate_lines(t, res, mate, u, st)
    fastener_lines(t, res, u, st, fastener)
    return t
