"""The pattern page: a pattern of holes or pins in its datum frame, the datum feature's MMB and
shift, the functional gauge, the measured members judged the right way (the pattern moved as one
body within the shift) beside the wrong way (the shift added to each member), and the interfaces
it takes part in, pair by pair. Every number comes from :func:`geom.frames.analyse_frames`
(through ``res.frames``)."""

from __future__ import annotations

from geom.analysis import SceneResult
from viewer import style as S
from viewer.figures.pattern import draw_pattern, exaggeration_for, pattern_result

from .page import CONTENT_W, GREY, MARGIN, PAGE, _disposition, _paragraphs, _table, evidence_page


def pattern_rows(res: SceneResult, pid: str) -> tuple[list[list[str]], list]:
    """The member table (heading first) and its cell colours: basic location, size, then the
    right-way and the wrong-way readings where the pattern was measured, else the zone at MMC
    and the gauge pin."""
    u = res.scene.units
    pr = pattern_result(res, pid)
    if pr.right is None:
        rows = [["member", "basic x", "basic y", "zone at MMC", "gauge pin (VC)"]]
        rows += [[str(m.index + 1), u.fmt(m.basic[0]), u.fmt(m.basic[1]), f"⌀{u.fmt(m.allowed.value)}",
                  f"⌀{u.fmt(g.diameter.value)}"] for m, g in zip(pr.members, pr.gauge.pins)]
        return rows, None
    rows = [["member", "basic x, y", "size", "position", "allowed", "margin"]]
    if pr.wrong is not None:
        rows[0] += ["shift as bonus: allowed", "margin"]
    if pr.composite is not None:
        rows[0] += ["lower tier: position", "allowed", "margin"]
    cols = [None]
    for i, r in enumerate(pr.right.readings):
        ok = S.ROLE_COLOUR["ok" if r.margin >= -1e-12 else "fail"]
        row = [str(r.index + 1) + (" (governs)" if r.index == pr.right.governs else ""),
               f"{u.fmt(r.basic[0])}, {u.fmt(r.basic[1])}", u.fmt(r.size), f"⌀{u.fmt(r.position)}",
               f"⌀{u.fmt(r.allowed)}", u.fmt(r.margin, signed=True)]
        col = [None, None, None, None, None, ok]
        if pr.wrong is not None:
            w = pr.wrong.readings[i]
            row += [f"⌀{u.fmt(w.allowed)}", u.fmt(w.margin, signed=True)]
            col += [GREY, GREY]
        if pr.composite is not None:
            lo = pr.composite.lower.readings[i]
            row += [f"⌀{u.fmt(lo.position)}", f"⌀{u.fmt(lo.allowed)}", u.fmt(lo.margin, signed=True)]
            col += [None, None, S.ROLE_COLOUR["ok" if lo.margin >= -1e-12 else "fail"]]
        rows.append(row)
        cols.append(col)
    return rows, cols


def pattern_words(res: SceneResult, pid: str) -> list[str]:
    """What the page says in words: the datum, the shift and what it is not, the verdict."""
    u, st = res.scene.units, res.scene.standard
    pr = pattern_result(res, pid)
    out = []
    for d in res.frames.datums:
        if d.letter in pr.pattern.frame.letters:
            text = f"Datum {d.letter} ('{d.feature}', at {d.boundary}): {d.mmb.formula(u, st)}."
            if d.shift_max is not None:
                text += (f" A produced datum feature may depart from it by up to {u.fmt(d.shift_max.diametral.value)}"
                         f" ({u.fmt(d.shift_max.radial.value)} radially): the pattern's zones then move together,"
                         " as one body; the shift is not extra tolerance for each member.")
            out.append(text)
    if pr.right is not None:
        c = pr.right
        shift = "" if c.datum is None else (f" at the produced datum size {u.fmt(c.datum.size)}, shift available "
                                           f"{u.fmt(c.datum.diametral.value)}")
        out.append(f"Measured: the best fit within the shift{shift} moves the pattern by "
                   f"({u.fmt(c.shift[0])}, {u.fmt(c.shift[1])}) and turns it {c.rotation_deg:.4f} deg; "
                   f"member {c.governs + 1} governs: {'CONFORMS' if c.conforms else 'DOES NOT CONFORM'}.")
        if pr.composite is not None:
            t2, datums, form = pr.spec.lower
            lo = pr.composite.lower
            g = lo.readings[lo.governs]
            what = ("feature-relating tier (the zones free to translate, oriented by the repeated datums)"
                    if form == "composite" else "lower single segment (located by its datums)")
            out.append(f"The {what}, ⌀{u.fmt(t2)} to {'|'.join(datums)}: member {g.index + 1} reads "
                       f"⌀{u.fmt(g.position)} against ⌀{u.fmt(g.allowed)}: "
                       f"{'CONFORMS' if lo.conforms else 'DOES NOT CONFORM'}. Both tiers: "
                       f"{'CONFORMS' if pr.conforms else 'DOES NOT CONFORM'}.")
        w = pr.wrong
        if w is not None and w.conforms != c.conforms:
            out.append("Adding the shift to each member's tolerance (the wrong way) would "
                       f"{'accept' if w.conforms else 'reject'} this pattern: that reading is not a verdict.")
    return out


def interface_rows(res: SceneResult, pid: str) -> list[list[str]]:
    u, st = res.scene.units, res.scene.standard
    rows = [["interface", "pair", "basic x, y", "worst-case clearance"]]
    for it in res.frames.interfaces:
        if pid not in (it.holes, it.pins):
            continue
        for pc in it.mate.pairs:
            rows.append([f"{it.holes} / {it.pins}" + (" (tightest)" if pc.index == it.mate.tightest else ""),
                         str(pc.index + 1), f"{u.fmt(pc.basic[0])}, {u.fmt(pc.basic[1])}",
                         pc.clearance_min.formula(u, st)])
        if it.mate.pilot is not None:
            rows.append([f"{it.holes} / {it.pins}", "pilots", "0, 0", it.mate.pilot.formula(u, st)])
    return rows if len(rows) > 1 else []


def _interface_picture(p, res: SceneResult, pid: str, x0: float, y: float, W: float, room: float) -> float:
    """Both parts of the pattern's first interface in 3D (rendered off-screen, iso, cut open at
    the tightest pair), where the page has room for it (at least 1.4 in); the y under it."""
    from viewer.scene3d import render_image
    from viewer.scene3d.interface import build_interface_scene, interfaces_of

    idx = interfaces_of(res, pid)
    if not idx or room < 1.4:
        return y
    h = min(room, 3.4)
    w = min(W, h * 1.5)
    img = render_image(build_interface_scene(res, idx[0]), view="iso", size=(int(w * 200), int(h * 200)))
    ax = p.fig.add_axes(p.rect(x0 + (W - w) / 2, y, w, h))
    ax.imshow(img, interpolation="antialiased")
    ax.set_axis_off()
    ax.set_gid("interface-3d")
    return y + h


def build_pattern_page(res: SceneResult, pid: str, page_no: int, pages: int, file_name: str | None = None):
    """The page of pattern ``pid``: its picture (right and wrong way where measured), the member
    table, the datum and the verdict in words, and the interface pairs."""
    pr = pattern_result(res, pid)
    p0 = pr.pattern
    u = res.scene.units
    char = f"position of {p0.count} {p0.feature.kind.value}s '{p0.feature.id}' to {'|'.join(p0.frame.letters)}"
    tol = p0.feature.tolerance.symbol(u)
    with evidence_page(res, "PATTERN IN ITS DATUM FRAME", f"{p0.requirement} requirement", char, tol,
                       page_no, pages) as (p, y):
        x0, W = MARGIN, CONTENT_W
        y += 0.1
        ways = ("right", "wrong") if pr.wrong is not None else ("right",)
        k = exaggeration_for(pr)
        from viewer.scene3d.interface import interfaces_of

        h = 2.5 if interfaces_of(res, pid) else 3.2  # room for the interface's 3D picture below
        w = (W - 0.3 * (len(ways) - 1)) / len(ways)
        handles = None
        for i, way in enumerate(ways):
            ax = p.fig.add_axes(p.rect(x0 + i * (w + 0.3), y + 0.35, w, h - 0.35))
            _k, hs = draw_pattern(ax, res, pid, way, k, fs=6.5)
            handles = handles or hs
        y += h + 0.3
        leg = p.fig.legend([a for a, _ in handles], [t for _, t in handles], fontsize=5.6, ncol=2, frameon=False,
                           loc="upper left", bbox_to_anchor=(x0 / PAGE[0], 1 - y / PAGE[1]))
        leg.set_gid("legend")
        y += 0.42
        cap = (f"top view; zones, measured axes and the shift drawn x{k:g} about the basic locations; gauge, "
               f"simulator and locations true ({u.value})" + (f"; full picture: {file_name}" if file_name else ""))
        p.text(x0, y, cap, fontsize=5.8, color=GREY)
        y += 0.22
        rows, cols = pattern_rows(res, pid)
        share = {"shift as bonus: allowed": 1.5, "lower tier: position": 1.3, "basic x, y": 1.3, "member": 0.9}
        share = [share.get(h, 0.8) for h in rows[0]]
        widths = [W * v / sum(share) for v in share]
        y = _table(p, x0, y, widths, rows, 6.3, colours=cols) + 0.1
        y = _paragraphs(p, x0, y, W, 6.5, "WHAT THIS SHOWS", pattern_words(res, pid), "pattern-words")
        irows = interface_rows(res, pid)
        if irows:
            y += 0.05
            y = _table(p, x0, y, [1.9, 0.6, 1.2, W - 3.7], irows, 6.3, aligns=["left"] * 4)
            y = _interface_picture(p, res, pid, x0, y + 0.1, W,
                                   PAGE[1] - (1.4 if pr.right is not None else 0.95) - y - 0.1)
        if pr.right is not None:  # a measured pattern: the page is evidence to sign
            _disposition(p, x0, max(y + 0.25, PAGE[1] - 1.25), W)
    return p.fig
