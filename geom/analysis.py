"""Whole-scene analysis: per-feature boundaries, per-mate worst-case fit, fastener tolerances.

Every number carries the formula that produced it (:class:`Derived`), so the CLI, the report
and the viewer print the same derivation.

>>> from geom.scenefile import loads
>>> scene = loads('''
... title = "t"
... units = "in"
... [[feature]]
... id = "h"
... kind = "hole"
... limits = [1.120, 1.124]
... length = 0.5
... [feature.tolerance]
... characteristic = "perpendicularity"
... value = 0.002
... material = "MMC"
... datums = ["A"]
... ''')
>>> r = analyse_scene(scene)
>>> r.features["h"].virtual_condition.formula(scene.units, scene.standard)
'VC = MMC - t = 1.1200 - 0.0020 = 1.1180'
"""

from __future__ import annotations

from dataclasses import dataclass

from . import boundaries as B
from .model import (
    Characteristic, Fastener, Feature, Kind, Material, Scene, Standard, Units, Zone, envelope_applies,
)

# ---------------------------------------------------------------- names in each standard's terms

_ASME = {
    "mmc": ("MMC", "maximum material condition"),
    "lmc": ("LMC", "least material condition"),
    "vc_MMC": ("VC", "virtual condition (MMC)"),
    "vc_LMC": ("VC", "virtual condition (LMC)"),
    "rc": ("RC", "resultant condition"),
    "inner": ("IB", "inner boundary"),
    "outer": ("OB", "outer boundary"),
    "bonus": ("bonus", "bonus tolerance"),
    "t": ("t", "stated tolerance"),
    "t_mmc": ("t@MMC", "tolerance at MMC"),
    "t_pos": ("T", "position tolerance"),
    "t_lmc": ("t@LMC", "tolerance at LMC"),
    "rfs": ("RFS", "regardless of feature size"),
    "t_allowed": ("tolerance allowed", "tolerance allowed at the produced size"),
}
_ISO = {
    "mmc": ("MMS", "maximum material size"),
    "lmc": ("LMS", "least material size"),
    "vc_MMC": ("MMVS", "maximum material virtual size (ISO 2692)"),
    "vc_LMC": ("LMVS", "least material virtual size (ISO 2692)"),
    "rc": ("RC", "resultant condition (no ISO term: the opposite worst-case size)"),
    "inner": ("IB", "inner worst-case boundary (no ISO term)"),
    "outer": ("OB", "outer worst-case boundary (no ISO term)"),
    "bonus": ("increase", "tolerance increase from the MMR/LMR (ISO 2692)"),
    "t": ("t", "stated tolerance"),
    "t_mmc": ("t@MMS", "tolerance at MMS"),
    "t_pos": ("T", "position tolerance"),
    "t_lmc": ("t@LMS", "tolerance at LMS"),
    "rfs": ("indep.", "no modifier: independency (ISO 8015)"),
    "t_allowed": ("tolerance allowed", "tolerance allowed at the produced size (stated + increase)"),
}


def term(key: str, standard: Standard) -> tuple[str, str]:
    """(abbreviation, long name) of a quantity in the standard's own terms."""
    return (_ISO if standard is Standard.ISO else _ASME)[key]


# ---------------------------------------------------------------- derived values with formulas


class _Abbr(dict):
    """``{key}`` in a symbolic formula -> the term's abbreviation (``lookup(key, standard)``)."""

    def __init__(self, lookup, standard: Standard):
        super().__init__()
        self.lookup, self.standard = lookup, standard

    def __missing__(self, key):
        return self.lookup(key, self.standard)[0]


@dataclass(frozen=True)
class Derived:
    """A computed length with the formula that produced it.

    ``symbolic`` uses term keys in braces, e.g. ``"{mmc} - {t}"``; ``operands`` are the numbers
    substituted, in order, into ``numeric`` (a format pattern with ``{}`` slots).
    """

    key: str  # term key of the result, e.g. "vc_MMC"
    value: float | None
    symbolic: str = ""
    numeric: str = ""
    operands: tuple[float, ...] = ()
    note: str = ""  # why the value is None, or a caveat

    @staticmethod
    def term(key: str, standard: Standard) -> tuple[str, str]:
        """The term table this value's names come from (a subclass may add its own terms)."""
        return term(key, standard)

    def abbr(self, standard: Standard) -> str:
        return self.term(self.key, standard)[0]

    def formula(self, units: Units, standard: Standard = Standard.ASME) -> str:
        """``VC = MMC - t = 10.000 - 0.020 = 9.980`` in the standard's terms."""
        name = self.abbr(standard)
        if self.value is None:
            return f"{name}: none ({self.note})" if self.note else f"{name}: none"
        if not self.symbolic:
            return f"{name} = {units.fmt(self.value)}"
        sym = self.symbolic.format_map(_Abbr(self.term, standard))
        num = self.numeric.format(*(units.fmt(v) for v in self.operands))
        if num == units.fmt(self.value):  # nothing to substitute: avoid "x = 1 = 1"
            return f"{name} = {sym} = {num}"
        return f"{name} = {sym} = {num} = {units.fmt(self.value)}"


@dataclass(frozen=True)
class FeatureResult:
    feature: Feature
    mmc: Derived
    lmc: Derived
    bonus_max: Derived
    tolerance_at_mmc: Derived
    tolerance_at_lmc: Derived
    virtual_condition: Derived
    resultant_condition: Derived
    inner_boundary: Derived
    outer_boundary: Derived
    tilt_max_deg: float | None
    envelope: bool
    notes: tuple[str, ...]
    # hole with a projected zone: its IB/OB apply within the projected height; this is the
    # boundary over the hole's own length, the one a mating pin meets
    in_hole_boundary: "Derived | None" = None
    # only where the feature has refinements: the main tolerance and each refinement with its own
    # boundaries (geom.refinement.ControlResult), set by analyse_scene
    controls: tuple = ()


def _none(key: str, note: str) -> Derived:
    return Derived(key, None, note=note)


def analyse_feature(f: Feature, standard: Standard = Standard.ASME) -> FeatureResult:
    tol = f.tolerance
    s = "+" if f.kind is Kind.PIN else "-"
    o = "-" if f.kind is Kind.PIN else "+"
    mmc = Derived("mmc", f.mmc, "smallest size" if f.kind is Kind.HOLE else "largest size", "{}", (f.mmc,))
    lmc = Derived("lmc", f.lmc, "largest size" if f.kind is Kind.HOLE else "smallest size", "{}", (f.lmc,))
    notes: list[str] = []
    env = envelope_applies(f, standard)
    inner_v, outer_v = B.worst_case_boundaries(f, standard)

    if tol is None:
        why = "no geometric tolerance"
        bonus = _none("bonus", why)
        t_mmc = _none("t_mmc", why)
        t_lmc = _none("t_lmc", why)
        vc = _none("vc_MMC", why)
        rc = _none("rc", why)
        mm_side = (
            Derived("inner" if f.kind is Kind.HOLE else "outer", f.mmc, "{mmc} (envelope: perfect form at MMC)", "{}", (f.mmc,))
            if env
            else _none("inner" if f.kind is Kind.HOLE else "outer",
                       "no envelope under ISO 8015 independency: form is not limited by the size")
        )
        lm_side = _none("outer" if f.kind is Kind.HOLE else "inner", "nothing relates this side to a datum")
        if not env:
            notes.append("ISO 8015 independency and no geometric tolerance: the size limits do not "
                         "limit form; add the envelope (E) or a geometric tolerance to bound it.")
        inner, outer = (mm_side, lm_side) if f.kind is Kind.HOLE else (lm_side, mm_side)
        return FeatureResult(f, mmc, lmc, bonus, t_mmc, t_lmc, vc, rc, inner, outer, None, env, tuple(notes))

    t = tol.value
    bmax = B.bonus_max(f)
    tm, tl = B.tolerance_at_mmc(f), B.tolerance_at_lmc(f)
    if tol.material is Material.MMC:
        bonus = Derived("bonus", bmax, "|{lmc} - {mmc}|", "|{} - {}|", (f.lmc, f.mmc))
        t_mmc = Derived("t_mmc", tm, "{t}", "{}", (t,))
        t_lmc = Derived("t_lmc", tl, "{t} + {bonus}", "{} + {}", (t, bmax))
        vc = Derived("vc_MMC", B.virtual_condition(f), "{mmc} " + s + " {t}", "{} " + s + " {}", (f.mmc, t))
        rc = Derived("rc", B.resultant_condition(f), "{lmc} " + o + " {t} " + o + " {bonus}",
                     "{} " + o + " {} " + o + " {}", (f.lmc, t, bmax))
    elif tol.material is Material.LMC:
        bonus = Derived("bonus", bmax, "|{mmc} - {lmc}|", "|{} - {}|", (f.mmc, f.lmc))
        t_mmc = Derived("t_mmc", tm, "{t} + {bonus}", "{} + {}", (t, bmax))
        t_lmc = Derived("t_lmc", tl, "{t}", "{}", (t,))
        vc = Derived("vc_LMC", B.virtual_condition(f), "{lmc} " + o + " {t}", "{} " + o + " {}", (f.lmc, t))
        rc = Derived("rc", B.resultant_condition(f), "{mmc} " + s + " {t} " + s + " {bonus}",
                     "{} " + s + " {} " + s + " {}", (f.mmc, t, bmax))
    else:
        bonus = Derived("bonus", 0.0, "0 (no modifier)", "{}", (0.0,))
        t_mmc = Derived("t_mmc", tm, "{t}", "{}", (t,))
        t_lmc = Derived("t_lmc", tl, "{t}", "{}", (t,))
        mod = "no modifier (independency)" if standard is Standard.ISO else "RFS"
        vc = _none("vc_MMC", f"{mod}: no virtual condition; see inner/outer boundary")
        rc = _none("rc", f"{mod}: no resultant condition; see inner/outer boundary")
    # inner / outer boundary, written from the worst-case sizes at MMC and LMC
    mm_key, lm_key = ("inner", "outer") if f.kind is Kind.HOLE else ("outer", "inner")
    mm_val = inner_v if f.kind is Kind.HOLE else outer_v
    lm_val = outer_v if f.kind is Kind.HOLE else inner_v
    iso = standard is Standard.ISO
    if mm_val is None and lm_val is None:  # no modifier and no envelope: independency
        why = "no modifier and no envelope: under independency the size does not limit form"
        mm_side, lm_side = _none(mm_key, why), _none(lm_key, why)
        notes.append("no modifier and no envelope (independency): local sizes do not "
                     "limit form, so no worst-case boundary exists; add (E) or a modifier to bound it")
    else:
        if mm_val is None:
            mm_side = _none(mm_key, f"independency (ISO 8015): on the {term('mmc', standard)[0]} side form "
                                    "is not limited by the size; only (M) or (E) bounds it")
        elif env and tol.characteristic is Characteristic.STRAIGHTNESS:
            mm_side = Derived(mm_key, mm_val, "{mmc} (envelope: tighter than the straightness VC)", "{}", (f.mmc,))
        else:
            mm_side = Derived(mm_key, mm_val, "{mmc} " + s + " {t_mmc}", "{} " + s + " {}", (f.mmc, tm))
        if lm_val is None:
            lm_side = _none(lm_key, f"independency (ISO 8015): on the {term('lmc', standard)[0]} side form "
                                    "is not limited by the size; only (L) bounds it")
        else:
            lm_side = Derived(lm_key, lm_val, "{lmc} " + o + " {t_lmc}", "{} " + o + " {}", (f.lmc, tl))
        if iso and (mm_val is None or lm_val is None):
            notes.append("independency (ISO 8015): a side that neither a modifier nor the envelope bounds has "
                         "no worst-case boundary (form is not limited by the size there); none is computed "
                         "on a perfect-form assumption")
    if iso and rc.value is not None:
        side_ok = (lm_val is not None) if tol.material is Material.MMC else (mm_val is not None)
        if not side_ok:
            rc = _none("rc", "independency (ISO 8015): form is not limited on that side, so no resultant "
                             "boundary exists")
    inner, outer = (mm_side, lm_side) if f.kind is Kind.HOLE else (lm_side, mm_side)

    if tol.zone is Zone.WIDTH:
        notes.append("width zone: the boundaries are two parallel planes this far apart, "
                     "controlling the axis in one direction only")
    if tol.characteristic is Characteristic.STRAIGHTNESS:
        notes.append("straightness of the derived median line: the boundaries are not oriented "
                     "or located to a datum; the axis may bend, not tilt")
    if tol.projected:
        notes.append(f"projected tolerance zone: the tolerance applies over {tol.projected:g} "
                     "beyond datum A, where the mating part sits")
    if tol.characteristic in (Characteristic.PARALLELISM, Characteristic.ANGULARITY) and tol.zone is Zone.DIAMETER:
        notes.append(f"a diameter zone for {tol.characteristic.value} to a datum plane controls the axis "
                     "in every direction; check that the drawing means this (pictures draw the axis "
                     "in the x-z plane)")
    if t == 0 and tol.material is not Material.RFS:
        mc = tol.material.value if standard is Standard.ASME else {"MMC": "MMS", "LMC": "LMS"}[tol.material.value]
        vcn = term(vc.key, standard)[0]
        notes.append(f"zero tolerance at {mc}: {vcn} = {mc}; all tolerance comes from the departure from {mc}")
    tilt = B.tilt_angle_deg(f, max(tm, tl))
    in_hole = None
    if tol.projected and f.kind is Kind.HOLE and inner.value is not None:
        in_hole = projected_hole_boundary(f)
    return FeatureResult(f, mmc, lmc, bonus, t_mmc, t_lmc, vc, rc, inner, outer, tilt, env, tuple(notes), in_hole)


# ---------------------------------------------------------------- mates


@dataclass(frozen=True)
class MateResult:
    hole: str
    pin: str
    hole_boundary: Derived  # inner boundary of the hole (or MMC with perfect form assumed)
    pin_boundary: Derived  # outer boundary of the pin
    clearance_min: float  # worst case with the geometric tolerances
    clearance_min_size: float  # from the size limits alone: hole MMC - pin MMC (ISO 286)
    clearance_max: float  # loosest fit from the size limits: hole LMC - pin LMC
    assembles: bool
    assumptions: tuple[str, ...]

    @property
    def verdict(self) -> str:
        return mate_verdict(self.clearance_min, self.assembles)


def mate_verdict(clearance: float, assembles: bool, units: Units | None = None) -> str:
    fmt = (lambda v: units.fmt(v) + " " + units.value) if units else (lambda v: f"{v:.6g}")
    if not assembles:
        return f"INTERFERES by {fmt(-clearance)} in the worst case: the pin may not enter the hole"
    if line_to_line(clearance):
        return "ASSEMBLES line-to-line in the worst case (zero clearance, no margin)"
    return f"ASSEMBLES in the worst case with {fmt(clearance)} clearance"


def _mate_side(res: FeatureResult, which: str) -> tuple[Derived, str | None]:
    d = res.inner_boundary if which == "inner" else res.outer_boundary
    if d.value is not None:
        return d, None
    f = res.feature
    v = B.perfect_form_boundary(f)
    if f.tolerance is None:
        assumed = Derived(which, v, "{mmc} (perfect form assumed)", "{}", (f.mmc,))
    else:
        sign = "+" if f.kind is Kind.PIN else "-"
        assumed = Derived(which, v, "{mmc} " + sign + " {t_mmc} (perfect form assumed)", "{} " + sign + " {}",
                          (f.mmc, B.tolerance_at_mmc(f)))
    return assumed, (f"'{f.id}': no worst-case boundary is defined ({d.note}); "
                     f"the fit assumes perfect form")


def projected_hole_boundary(f: Feature) -> Derived:
    """Inner boundary over the hole's own length L of a hole whose tolerance is projected: there
    the axis may wander beyond the projected zone (ASME Y14.5-2009 §7.4.1 and the fastener
    appendix, from memory): position MMC - t(1 + 2L/P); orientation (floating zone) MMC - t L/P."""
    tol = f.tolerance
    t, L, P = B.tolerance_at_mmc(f), f.length, tol.projected
    if tol.characteristic is Characteristic.POSITION:
        v = f.mmc - t * (1.0 + 2.0 * L / P)
        return Derived("inner", v, "{mmc} - {t_mmc}(1 + 2L/P)", "{} - {}*(1 + 2*{}/{})", (f.mmc, t, L, P),
                       note="over the hole's own length")
    v = f.mmc - t * L / P
    return Derived("inner", v, "{mmc} - {t_mmc} L/P", "{} - {}*{}/{}", (f.mmc, t, L, P),
                   note="over the hole's own length")


def _projected_hole_side(res: FeatureResult, base: Derived) -> tuple[Derived, str]:
    """A hole whose tolerance is projected: the pin engages the hole's own length L."""
    f = res.feature
    tol = f.tolerance
    d = res.in_hole_boundary or projected_hole_boundary(f)
    return d, (f"'{f.id}' has a projected zone ({tol.projected:g}): inside the part the axis may leave "
               f"that zone; the pin engages the hole's own length {f.length:g}, so its boundary there is used")


FIT_SLACK = 1e-9  # a line-to-line fit (zero clearance) still assembles


def fits(clearance: float) -> bool:
    """The one fit predicate: a worst-case clearance of zero or more assembles (line-to-line
    included, within ``FIT_SLACK``); a negative one is interference (common practice, no source).

    >>> fits(0.0), fits(-1e-12), fits(-0.001)
    (True, True, False)
    """
    return clearance >= -FIT_SLACK


def line_to_line(clearance: float) -> bool:
    return abs(clearance) <= FIT_SLACK


def tolerance_allowed_derived(f: Feature, bonus: float, source: str = "") -> Derived:
    """Tolerance allowed = stated tolerance + bonus (ISO: increase), as a :class:`Derived`,
    the one place every front end takes this formula from.

    >>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material, Units
    >>> t = Tolerance(Characteristic.POSITION, 0.002, material=Material.MMC, datums=("A", "B"))
    >>> h = Feature("h", Kind.HOLE, (1.120, 1.124), 0.5, tolerance=t)
    >>> tolerance_allowed_derived(h, 0.003).formula(Units.IN)
    'tolerance allowed = t + bonus = 0.0020 + 0.0030 = 0.0050'
    """
    t = f.tolerance.value if f.tolerance is not None else 0.0
    return Derived("t_allowed", t + bonus, "{t} + {bonus}", "{} + {}", (t, bonus), note=source)


def analyse_mate(hole: FeatureResult, pin: FeatureResult) -> MateResult:
    hb, n1 = _mate_side(hole, "inner")
    ht = hole.feature.tolerance
    if n1 is None and ht is not None and ht.projected:
        hb, n1 = _projected_hole_side(hole, hb)
    pb, n2 = _mate_side(pin, "outer")
    cmin = hb.value - pb.value
    assumptions = ["both parts seat on datum A and the pin enters normal to it"]
    assumptions += [n for n in (n1, n2) if n]
    for r in (hole, pin):
        tol = r.feature.tolerance
        if tol is None or tol.characteristic is Characteristic.STRAIGHTNESS:
            assumptions.append(f"'{r.feature.id}' has no orientation or location control to A; "
                               "its axis is assumed normal to A")
    pt = pin.feature.tolerance
    hd = ht.datums if ht is not None else ()
    pd = pt.datums if pt is not None else ()
    extra = sorted(set(hd[1:]) | set(pd[1:]))
    if extra:
        what = (f"datum feature {extra[0]} of the two parts coincides" if len(extra) == 1 else
                f"datum features {', '.join(extra)} of the two parts coincide")
        assumptions.append(f"{what} in assembly (or the parts are free to float on A so the pin finds the hole)")
    if pt is not None and pt.projected:
        assumptions.append(f"the hole engages the pin within its projected height ({pt.projected:g})")
    return MateResult(
        hole=hole.feature.id,
        pin=pin.feature.id,
        hole_boundary=hb,
        pin_boundary=pb,
        clearance_min=cmin,
        clearance_min_size=hole.feature.mmc - pin.feature.mmc,
        clearance_max=hole.feature.lmc - pin.feature.lmc,
        assembles=fits(cmin),
        assumptions=tuple(assumptions),
    )


def clearance_at(hole: Feature, pin: Feature, hole_state: B.FeatureState, pin_state: B.FeatureState) -> float:
    """What-if clearance: the hole's clear opening minus the pin's swept envelope, both normal
    to A, with the used shares of the tolerances allowed at the produced sizes combining
    adversely (worst relative direction)."""
    return B.effective_size(hole, hole_state) - B.effective_size(pin, pin_state)


# ---------------------------------------------------------------- fasteners


@dataclass(frozen=True)
class FastenerResult:
    fastener: Fastener
    position_tolerance: Derived
    position_tolerance_unprojected: Derived | None


def required_hole_fixed(F: float, t1: float, t2: float, P: float, D: float) -> float:
    """Clearance-hole MMC for a fixed fastener without a projected zone:
    H = F + T1 + T2 (1 + 2P/D)  (ASME Y14.5-2018 Appendix B, from memory)."""
    return F + t1 + t2 * (1.0 + 2.0 * P / D)


def analyse_fastener(fa: Fastener) -> FastenerResult:
    H, F = fa.hole, fa.fastener
    if fa.kind == "floating":
        T = Derived("t_pos", H - F, "H - F", "{} - {}", (H, F))
        return FastenerResult(fa, T, None)
    T = Derived("t_pos", (H - F) / 2.0, "(H - F) / 2", "({} - {}) / 2", (H, F))
    P, D = fa.projection, fa.thread_depth
    Tu = Derived("t_pos", (H - F) / (2.0 + 2.0 * P / D), "(H - F) / (2 + 2P/D)",
                 "({} - {}) / (2 + 2*{}/{})", (H, F, P, D))
    return FastenerResult(fa, T, Tu)


# ---------------------------------------------------------------- scene


@dataclass(frozen=True)
class SceneResult:
    scene: Scene
    features: dict[str, FeatureResult]
    mates: tuple[MateResult, ...]
    fasteners: dict[str, FastenerResult]
    frames: object = None  # geom.frames.FramesResult of the datums, patterns, interfaces (None: the scene has none)


def analyse_scene(scene: Scene) -> SceneResult:
    feats = {f.id: analyse_feature(f, scene.standard) for f in scene.features}
    if any(f.refinements for f in scene.features):  # only then is the refinement module loaded
        from .refinement import with_controls

        feats = with_controls(feats, scene.standard, scene.units)
    mates = tuple(analyse_mate(feats[m.hole], feats[m.pin]) for m in scene.mates)
    fas = {fa.id: analyse_fastener(fa) for fa in scene.fasteners}
    frames = None
    if scene.datums or scene.patterns or scene.interfaces:  # only then are the datum modules loaded
        from .frames import analyse_frames  # they build on this module

        frames = analyse_frames(scene)
    return SceneResult(scene, feats, mates, fas, frames)


def mate_formula(m: MateResult, units: Units, standard: Standard) -> str:
    h, p = m.hole_boundary, m.pin_boundary
    return (f"clearance = {h.abbr(standard)}(hole) - {p.abbr(standard)}(pin) = "
            f"{units.fmt(h.value)} - {units.fmt(p.value)} = {units.fmt(m.clearance_min, signed=True)}")
