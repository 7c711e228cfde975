"""The per-block sampling of one mate or one interface of two patterns (see :mod:`geom.yieldmc`
for the geometry): each returns ``fn(rng, n) -> dict of arrays`` and the worst-case figures
(``info``) the statistics are set beside."""

from __future__ import annotations

import numpy as np

from .model import Kind, Scene
from .yieldmc import Sampler, discs_feasible, discs_margin, mate_clearance


def _radial(e):
    return 2.0 * np.hypot(e[..., 0], e[..., 1])


def mate_run(scene: Scene, index: int, sm: dict[str, Sampler]):
    from .analysis import analyse_feature, analyse_mate

    m = scene.mates[index]
    h, p = sm[m.hole], sm[m.pin]
    res = analyse_mate(analyse_feature(h.f, scene.standard), analyse_feature(p.f, scene.standard))
    th = h.f.mmc - res.hole_boundary.value
    tp = res.pin_boundary.value - p.f.mmc

    def fn(rng, n):
        hs, eh = h.draw(rng, n)
        ps, ep = p.draw(rng, n)
        c = mate_clearance(h, p, hs, ps, eh, ep)
        return {"clearance": c, "assembles": c >= -1e-9,
                f"rej:{h.f.id}": ~h.conforms(hs, eh), f"rej:{p.f.id}": ~p.conforms(ps, ep),
                f"in:{h.f.id} size": hs, f"in:{p.f.id} size": ps,
                f"in:{h.f.id} axis": _radial(eh), f"in:{p.f.id} axis": _radial(ep)}

    lo_h, hi_h = h.f.limits
    lo_p, hi_p = p.f.limits
    stack = ((f"{h.f.id} size", (lo_h + hi_h) / 2, (hi_h - lo_h) / 2),
             (f"{p.f.id} size", -(lo_p + hi_p) / 2, (hi_p - lo_p) / 2),
             (f"{h.f.id} axis", -th / 2, th / 2), (f"{p.f.id} axis", -tp / 2, tp / 2))
    info = {"label": f"{m.hole} / {m.pin}", "worst_case": res.clearance_min, "stack": stack,
            "features": (h, p), "assumptions": tuple(res.assumptions) + (
                "the two axes' errors are independent; the clearance is hole size - pin size - "
                "2 |relative axis error| (the worst-case geometry with the sampled values)",)}
    if any(s.f.tolerance is not None and s.f.tolerance.projected for s in (h, p)):
        info["assumptions"] += ("a projected zone: the sampled axis error is applied over the engagement "
                                "(the worst case uses the in-hole boundary)",)
    return fn, info


def _datum_sampler(pat, sm):
    sec = pat.frame.secondary
    return None if sec is None or sec.is_plane else sm[sec.feature.id]


def _shift_radius(pat, size):
    """Radial datum shift of the pattern's secondary datum feature at its sampled size."""
    from .datums import mmb, lmb

    sec = pat.frame.secondary
    if sec is None or sec.is_plane or sec.boundary == "RMB":
        return np.zeros_like(size)
    h = pat.frame.higher(sec.letter)
    b = (mmb if sec.boundary == "MMB" else lmb)(sec.feature, h).value
    hole = sec.feature.kind is Kind.HOLE
    outward = hole == (sec.boundary == "MMB")
    return np.clip((size - b) if outward else (b - size), 0.0, None) / 2.0


def pattern_conforms(s: Sampler, locs_err, sizes, shift_r) -> np.ndarray:
    """Each member's size within limits, and one translation within the datum shift that puts
    every member's axis in its own zone t + bonus (rotation not used: conservative)."""
    lo, hi = s.f.limits
    ok = ((sizes >= lo - 1e-9) & (sizes <= hi + 1e-9)).all(axis=1)
    c = np.concatenate([-locs_err, np.zeros((len(sizes), 1, 2))], axis=1)
    r = np.concatenate([s.allowed(sizes) / 2.0, shift_r[:, None]], axis=1)
    return ok & discs_feasible(c, r + 1e-12)


def interface_margin(ea, eb, radii, pilot_r):
    """The largest common margin (diametral) of pairs with hole errors ``ea`` (N, k, 2), pin errors
    ``eb``, radii (H - P) / 2 (N, k) and the pilot's radial clearance ``pilot_r`` (N,)."""
    c = np.concatenate([eb - ea, np.zeros((len(radii), 1, 2))], axis=1)
    r = np.concatenate([radii, pilot_r[:, None]], axis=1)
    shrink = np.arange(r.shape[1]) < r.shape[1] - 1  # the pilot disc is a constraint, not shrunk
    step = 4096  # sub-batches keep the candidate arrays in cache
    return np.concatenate([discs_margin(c[i:i + step], r[i:i + step], shrink) for i in range(0, len(r), step)])


def interface_run(scene: Scene, index: int, sm: dict[str, Sampler]):
    from .frames import pattern_of
    from .patterns import mate_patterns

    it = scene.interfaces[index]
    specs = {p.id: p for p in scene.patterns}
    pat1, pat2 = pattern_of(scene, specs[it.holes]), pattern_of(scene, specs[it.pins])
    wc = mate_patterns(pat1, pat2, it.fastener)
    h, q = sm[pat1.feature.id], sm[pat2.feature.id]
    k = pat1.count
    # pair part 2's members to part 1's by basic location
    def key(b):
        return (round(b[0], 9), round(b[1], 9))

    order = [list(map(key, pat2.locations)).index(key(b)) for b in pat1.locations]
    d1, d2 = _datum_sampler(pat1, sm), _datum_sampler(pat2, sm)
    pil = None
    if d1 is not None and d2 is not None:
        pil = (0, 1) if d1.f.kind is Kind.HOLE else (1, 0)  # (bore, boss) among (d1, d2)
    notes = list(wc.assumptions) + [
        "rotation of one part on the other is not used to help assembly (conservative)",
        "each part is judged by its own tolerance with the pattern free to shift within its datum shift "
        "(translation only)",
    ]
    if pil is None:
        notes.append("no pilot pair: the datum frames coincide in assembly (no relative translation)")
    fixed = q.f.kind is Kind.HOLE and q.f.tolerance is not None and q.f.tolerance.projected
    if q.f.kind is Kind.HOLE:
        notes.append(("threaded holes: the fastener (MMC F) centred on the thread axis" if fixed else
                      "floating fastener (MMC F) through both clearance holes"))

    def fn(rng, n):
        hs, ea = h.draw(rng, (n, k))
        qs, eb = q.draw(rng, (n, k))
        qs, eb = qs[:, order], eb[:, order]
        drawn = [d.draw(rng, n) if d is not None else (np.zeros(n), np.zeros((n, 2))) for d in (d1, d2)]
        if pil is not None:
            (bs, be), (ps, pe) = drawn[pil[0]], drawn[pil[1]]
            bore, boss = (d1, d2)[pil[0]], (d1, d2)[pil[1]]
            pilot_c = mate_clearance(bore, boss, bs, ps, be, pe)
        else:
            pilot_c = np.zeros(n)
        if q.f.kind is Kind.PIN:
            radii = (hs - qs) / 2.0
        elif fixed:
            radii = (hs - it.fastener) / 2.0
        else:
            radii = (hs + qs - 2.0 * it.fastener) / 2.0
        marg = interface_margin(ea, eb, radii, pilot_c / 2.0)
        out = {"clearance": marg, "assembles": marg >= -1e-9}
        sr1 = _shift_radius(pat1, drawn[0][0])
        sr2 = _shift_radius(pat2, drawn[1][0])
        out[f"rej:{h.f.id}"] = ~pattern_conforms(h, ea, hs, sr1)
        out[f"rej:{q.f.id}"] = ~pattern_conforms(q, eb, qs, sr2)
        for d, (ds, de) in zip((d1, d2), drawn):
            if d is not None:
                out[f"rej:{d.f.id}"] = ~d.conforms(ds, de)
        if pil is not None:
            out["in:pilot clearance"] = pilot_c
        out[f"in:{h.f.id} sizes (smallest)"] = hs.min(axis=1)
        out[f"in:{q.f.id} sizes (largest)"] = qs.max(axis=1)
        out[f"in:{h.f.id} axes (largest)"] = _radial(ea).max(axis=1)
        out[f"in:{q.f.id} axes (largest)"] = _radial(eb).max(axis=1)
        return out

    tight = wc.pairs[wc.tightest]
    lo_h, hi_h = h.f.limits
    th = h.f.mmc - tight.hole_boundary
    if q.f.kind is Kind.PIN:
        lo_q, hi_q = q.f.limits
        tq = tight.pin_boundary - q.f.mmc
        pin_row = (f"{q.f.id} size", -(lo_q + hi_q) / 2, (hi_q - lo_q) / 2)
    else:
        tq = tight.pin_boundary - it.fastener
        pin_row = ("fastener F", -it.fastener, 0.0)
    stack = ((f"{h.f.id} size", (lo_h + hi_h) / 2, (hi_h - lo_h) / 2), pin_row,
             (f"{h.f.id} axis", -th / 2, th / 2), (f"{q.f.id} axis", -tq / 2, tq / 2))
    worst = min([pc.clearance_min.value for pc in wc.pairs] + ([wc.pilot.value] if wc.pilot is not None
                                                                and wc.pilot.value < 0 else []))
    feats = (h, q) + tuple(d for d in (d1, d2) if d is not None)
    info = {"label": f"{it.holes} over {it.pins}", "worst_case": worst, "stack": stack, "features": feats,
            "assumptions": tuple(notes)}
    return fn, info
