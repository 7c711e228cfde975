"""Datum reference frames and datum features of size: MMB/LMB, datum shift, the freedom a frame
leaves a pattern.

Datum A is the plane z = 0 (primary); a secondary datum feature of size (a pilot bore is a hole,
a boss a pin) fixes the frame's origin on its axis, (0, 0); a tertiary datum fixes the rotation
about that axis. A datum feature of size referenced at MMB (ASME) or with the MMR applied to the
datum (ISO 2692) is simulated by a fixed-size simulator at its maximum material boundary; when
the produced feature departs from that size, the part may shift on the simulator: the datum
shift. All lengths are in the scene's units, diametral unless said radial.

Sizes (ASME Y14.5-2009 4.11.4 / Y14.5-2018 7.11.4, from memory; ISO 2692 MMVS of a datum):

- no geometric tolerance relative to higher-precedence datums: MMB = MMC (LMB = LMC);
- an orientation or location tolerance to higher datums (or a straightness of its axis):
  MMB = MMC - t@MMC for a hole, MMC + t@MMC for a pin, i.e. its virtual condition
  relative to them (LMB = LMC + t@LMC for a hole, LMC - t@LMC for a pin).

>>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material, Units
>>> perp = Tolerance(Characteristic.PERPENDICULARITY, 0.02, material=Material.MMC, datums=("A",))
>>> bore = Feature("pilot", Kind.HOLE, (40.0, 40.05), 8.0, tolerance=perp)
>>> mmb(bore, higher=("A",)).formula(Units.MM)
'MMB = MMC - t@MMC = 40.000 - 0.020 = 39.980'
>>> s = datum_shift(bore, 40.03, "MMB", higher=("A",))
>>> s.diametral.formula(Units.MM), round(s.radial.value, 6)
('datum shift = size - MMB = 40.030 - 39.980 = 0.050', 0.025)
"""

from __future__ import annotations

from dataclasses import dataclass

from . import boundaries as B
from .analysis import Derived, term
from .model import Characteristic, Feature, Kind, Standard, Units  # noqa: F401  (the doctests' units)

BOUNDARIES = ("RMB", "MMB", "LMB")
PRECEDENCE = ("primary", "secondary", "tertiary")
ORIENT_LOCATE = (Characteristic.POSITION, Characteristic.PERPENDICULARITY,
                 Characteristic.PARALLELISM, Characteristic.ANGULARITY)

# terms of this module, in each standard's words (geom.analysis.term holds the rest)
_ASME = {
    "mmb": ("MMB", "maximum material boundary of the datum feature (the simulator size)"),
    "lmb": ("LMB", "least material boundary of the datum feature"),
    "rmb": ("RMB", "regardless of material boundary: the simulator contacts the feature"),
    "size": ("size", "actual mating size of the datum feature, related to the higher datums"),
    "shift": ("datum shift", "departure of the datum feature from its MMB (or LMB), diametral"),
    "shift_r": ("radial shift", "half the datum shift: how far the pattern may move off the datum axis"),
    "h_req": ("H", "clearance-hole MMC that the fixed-fastener formula requires"),
    "clearance": ("clearance", "worst-case clearance: hole boundary - pin boundary, diametral"),
    "pilot": ("pilot clearance", "datum bore MMB - datum boss MMB, diametral"),
}
_ISO = {
    "mmb": ("MMVS", "maximum material virtual size of the datum feature, the simulator size (ISO 2692, ISO 5459)"),
    "lmb": ("LMVS", "least material virtual size of the datum feature (ISO 2692)"),
    "rmb": ("no (M)", "no MMR on the datum: the simulator contacts the feature (ISO 5459)"),
    "size": ("size", "associated size of the datum feature (ISO 5459)"),
    "shift": ("datum mobility", "movement the MMR on the datum allows: departure from MMVS, diametral (ISO 2692)"),
    "shift_r": ("radial mobility", "half the datum mobility"),
    "h_req": ("H", "clearance-hole MMS that the fixed-fastener formula requires"),
    "clearance": ("clearance", "worst-case clearance: hole MMVS - pin MMVS, diametral"),
    "pilot": ("pilot clearance", "datum bore MMVS - datum boss MMVS, diametral"),
}


def datum_term(key: str, standard: Standard) -> tuple[str, str]:
    """(abbreviation, long name) for this module's terms, else :func:`geom.analysis.term`.

    >>> datum_term("mmb", Standard.ISO)[0], datum_term("mmc", Standard.ISO)[0]
    ('MMVS', 'MMS')
    """
    own = _ISO if standard is Standard.ISO else _ASME
    return own[key] if key in own else term(key, standard)


@dataclass(frozen=True)
class DatumDerived(Derived):
    """A :class:`geom.analysis.Derived` whose terms may be datum terms (MMB, datum shift).

    >>> DatumDerived("shift_r", 0.01, "{shift} / 2", "{} / 2", (0.02,)).formula(Units.MM)
    'radial shift = datum shift / 2 = 0.020 / 2 = 0.010'
    """

    term = staticmethod(datum_term)


# ---------------------------------------------------------------- values


@dataclass(frozen=True)
class DatumRef:
    """One datum in a frame: a plane (``feature`` None) or a datum feature of size, referenced
    RMB, MMB or LMB, at a precedence.

    >>> DatumRef("A").is_plane
    True
    >>> DatumRef("A", boundary="MMB")
    Traceback (most recent call last):
    ...
    ValueError: datum A: a plane has no size, so it cannot be referenced at MMB; use RMB
    """

    letter: str
    feature: Feature | None = None
    boundary: str = "RMB"
    precedence: str = "primary"

    def __post_init__(self):
        if not isinstance(self.letter, str) or not self.letter.strip():
            raise ValueError(f"datum letter must be a non-empty text, got {self.letter!r}")
        if self.boundary not in BOUNDARIES:
            raise ValueError(f"datum {self.letter}: boundary must be one of {', '.join(BOUNDARIES)}, "
                             f"got {self.boundary!r}")
        if self.precedence not in PRECEDENCE:
            raise ValueError(f"datum {self.letter}: precedence must be one of {', '.join(PRECEDENCE)}, "
                             f"got {self.precedence!r}")
        if self.feature is None and self.boundary != "RMB":
            raise ValueError(f"datum {self.letter}: a plane has no size, so it cannot be referenced at "
                             f"{self.boundary}; use RMB")
        if self.feature is not None and not isinstance(self.feature, Feature):
            raise ValueError(f"datum {self.letter}: the datum feature must be a Feature or None (a plane)")

    @property
    def is_plane(self) -> bool:
        return self.feature is None


@dataclass(frozen=True)
class DatumFrame:
    """An ordered datum reference frame: A a plane, primary; then B, C (planes or features of
    size) secondary and tertiary, in that order.

    >>> from geom.model import Feature, Kind
    >>> boss = Feature("boss", Kind.PIN, (24.95, 25.0), 6.0)
    >>> fr = frame(DatumRef("A"), DatumRef("B", boss, "MMB"))
    >>> fr.letters, fr.rotation
    (('A', 'B'), 'free')
    """

    refs: tuple[DatumRef, ...]

    def __post_init__(self):
        refs = tuple(self.refs)
        if not 1 <= len(refs) <= 3:
            raise ValueError(f"a datum frame has one to three datums, got {len(refs)}")
        letters = [r.letter for r in refs]
        if len(set(letters)) != len(letters):
            raise ValueError(f"datum letters repeat in the frame: {letters}")
        for r, p in zip(refs, PRECEDENCE):
            if r.precedence != p:
                raise ValueError(f"datum {r.letter} is {r.precedence} but stands {p} in the frame")
        if not refs[0].is_plane:
            raise ValueError(f"the primary datum {refs[0].letter} must be the plane (datum A is z = 0)")
        object.__setattr__(self, "refs", refs)

    @property
    def letters(self) -> tuple[str, ...]:
        return tuple(r.letter for r in self.refs)

    def ref(self, letter: str) -> DatumRef:
        for r in self.refs:
            if r.letter == letter:
                return r
        raise ValueError(f"datum {letter!r} is not in the frame {'|'.join(self.letters)}")

    def higher(self, letter: str) -> tuple[str, ...]:
        """The letters of higher precedence than ``letter``."""
        i = self.letters.index(self.ref(letter).letter)
        return self.letters[:i]

    @property
    def secondary(self) -> DatumRef | None:
        return self.refs[1] if len(self.refs) > 1 else None

    @property
    def tertiary(self) -> DatumRef | None:
        return self.refs[2] if len(self.refs) > 2 else None

    @property
    def rotation(self) -> str:
        """What the frame leaves of the rotation about the datum axis: "free" (no tertiary: a
        secondary feature of size fixes only the centre), "fixed" (a tertiary plane or a tertiary
        feature at RMB), "limited" (a tertiary feature at MMB/LMB: within its shift), "none" (no
        secondary feature of size: nothing to rotate about)."""
        sec, ter = self.secondary, self.tertiary
        if sec is None or sec.is_plane:
            return "fixed" if ter is not None else "none"
        if ter is None:
            return "free"
        return "fixed" if ter.is_plane or ter.boundary == "RMB" else "limited"


def frame(*refs: DatumRef) -> DatumFrame:
    """A frame from refs in order, their precedence set from their position."""
    from dataclasses import replace
    return DatumFrame(tuple(replace(r, precedence=PRECEDENCE[i]) if i < 3 else r for i, r in enumerate(refs)))


# ---------------------------------------------------------------- boundaries and shift


def _related(feature: Feature, higher: tuple[str, ...] | None) -> bool:
    """Does the feature's tolerance control it relative to the higher-precedence datums (or is it
    straightness of its axis, which needs no datum)?"""
    tol = feature.tolerance
    if tol is None:
        return False
    if tol.characteristic is Characteristic.STRAIGHTNESS:
        return True
    if tol.characteristic not in ORIENT_LOCATE:
        return False
    return higher is None or (len(tol.datums) > 0 and set(tol.datums) <= set(higher))


def _need_feature(feature, what: str) -> Feature:
    if feature is None:
        raise ValueError(f"{what}: a datum plane has no size, so it has no MMB, LMB or shift")
    if not isinstance(feature, Feature):
        raise ValueError(f"{what}: expected a datum feature of size (geom.model.Feature), got {feature!r}")  # noqa: TRY004 (the house rule: bad input is a ValueError)
    return feature


def mmb(feature: Feature | None, higher: tuple[str, ...] | None = None) -> DatumDerived:
    """The maximum material boundary of a datum feature of size (the fixed simulator's size).

    ``higher``: letters of the higher-precedence datums (None: the tolerance's own datums are
    taken as higher). Only a tolerance relative to them (or axis straightness) counts.

    >>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
    >>> boss = Feature("boss", Kind.PIN, (24.95, 25.0), 6.0)
    >>> mmb(boss).value
    25.0
    >>> pos = Tolerance(Characteristic.POSITION, 0.05, material=Material.MMC, datums=("A", "C"))
    >>> mmb(boss.with_(tolerance=pos), higher=("A",)).value   # to a lower datum C: does not count
    25.0
    >>> round(mmb(boss.with_(tolerance=pos), higher=("A", "C")).value, 6)
    25.05
    """
    return _boundary(_need_feature(feature, "MMB"), higher, "mmb")


def lmb(feature: Feature | None, higher: tuple[str, ...] | None = None) -> DatumDerived:
    """The least material boundary: LMC, or LMC + t@LMC (hole) / LMC - t@LMC (pin) with a
    tolerance to higher datums.

    >>> from geom.model import Feature, Kind, Tolerance, Characteristic, Material
    >>> perp = Tolerance(Characteristic.PERPENDICULARITY, 0.02, material=Material.MMC, datums=("A",))
    >>> round(lmb(Feature("b", Kind.HOLE, (40.0, 40.05), 8.0, tolerance=perp)).value, 6)
    40.12
    """
    return _boundary(_need_feature(feature, "LMB"), higher, "lmb")


def _boundary(f: Feature, higher, key: str) -> DatumDerived:
    """MMB ("mmb") or LMB ("lmb") of the datum feature ``f``: its MMC (LMC), grown by the
    tolerance at that size toward the material-free side where ``f`` is related to ``higher``."""
    mm = key == "mmb"
    size, name = (f.mmc, "mmc") if mm else (f.lmc, "lmc")
    if not _related(f, higher):
        return DatumDerived(key, size, "{" + name + "} (no geometric tolerance to higher datums)", "{}", (size,))
    t = B.tolerance_at_mmc(f) if mm else B.tolerance_at_lmc(f)
    outward = (f.kind is Kind.PIN) == mm  # a pin's MMB and a hole's LMB lie outside the size
    s = "+" if outward else "-"
    return DatumDerived(key, size + (t if outward else -t), "{" + name + "} " + s + " {t_" + name + "}",
                        "{} " + s + " {}", (size, t))


@dataclass(frozen=True)
class DatumShift:
    """The shift a datum feature of size allows at its produced size."""

    feature: Feature
    boundary: str  # "RMB" | "MMB" | "LMB"
    size: float  # produced actual mating size (related to the higher datums)
    simulator: DatumDerived | None  # MMB or LMB; None at RMB (the simulator adjusts)
    diametral: DatumDerived
    radial: DatumDerived


def datum_shift(feature: Feature | None, produced_size: float, boundary: str,
                higher: tuple[str, ...] | None = None) -> DatumShift:
    """Datum shift: the departure of the datum feature's actual mating size from its MMB
    (hole: size - MMB; pin: MMB - size), or from its LMB (hole: LMB - size; pin: size - LMB);
    zero at RMB. Diametral, never negative; the radial shift is half of it.

    >>> from geom.model import Feature, Kind, Units
    >>> boss = Feature("boss", Kind.PIN, (24.95, 25.0), 6.0)
    >>> s = datum_shift(boss, 24.97, "MMB")
    >>> s.diametral.formula(Units.MM), s.radial.formula(Units.MM)
    ('datum shift = MMB - size = 25.000 - 24.970 = 0.030', 'radial shift = datum shift / 2 = 0.030 / 2 = 0.015')
    >>> datum_shift(boss, 24.97, "RMB").diametral.value
    0.0
    >>> datum_shift(None, 1.0, "MMB")
    Traceback (most recent call last):
    ...
    ValueError: datum shift: a datum plane has no size, so it has no MMB, LMB or shift
    """
    f = _need_feature(feature, "datum shift")
    if boundary not in BOUNDARIES:
        raise ValueError(f"datum {f.id!r}: boundary must be one of {', '.join(BOUNDARIES)}, got {boundary!r}")
    try:
        size = B.check_size(f, float(produced_size))
    except (TypeError, ValueError) as e:
        raise ValueError(f"datum {f.id!r}: {e}") from None
    if boundary == "RMB":
        d = DatumDerived("shift", 0.0, "0 ({rmb})", "{}", (0.0,), note="RMB: the simulator contacts the feature")
        return DatumShift(f, boundary, size, None, d, DatumDerived("shift_r", 0.0, "0 ({rmb})", "{}", (0.0,)))
    sim = mmb(f, higher) if boundary == "MMB" else lmb(f, higher)
    hole = f.kind is Kind.HOLE
    outward = hole == (boundary == "MMB")  # hole at MMB / pin at LMB: size grows away from the boundary
    sym = f"{{size}} - {{{sim.key}}}" if outward else f"{{{sim.key}}} - {{size}}"
    ops = (size, sim.value) if outward else (sim.value, size)
    value = max(0.0, ops[0] - ops[1])
    d = DatumDerived("shift", value, sym, "{} - {}", ops)
    r = DatumDerived("shift_r", value / 2.0, "{shift} / 2", "{} / 2", (value,))
    return DatumShift(f, boundary, size, sim, d, r)


def shift_of(fr: DatumFrame, letter: str, produced_size: float | None) -> DatumShift | None:
    """The shift of datum ``letter`` of a frame (None for a plane). A datum feature at MMB/LMB
    needs its produced size; at RMB the size is not needed (MMC is used, the shift is zero)."""
    ref = fr.ref(letter)
    if ref.is_plane:
        return None
    if produced_size is None:
        if ref.boundary != "RMB":
            raise ValueError(f"datum {letter} is referenced at {ref.boundary}: its produced size is needed")
        produced_size = ref.feature.mmc
    return datum_shift(ref.feature, produced_size, ref.boundary, higher=fr.higher(letter))


def simulator_size(fr: DatumFrame, letter: str) -> DatumDerived | None:
    """The fixed simulator size of datum ``letter`` (MMB or LMB); None for a plane or at RMB."""
    ref = fr.ref(letter)
    if ref.is_plane or ref.boundary == "RMB":
        return None
    h = fr.higher(letter)
    return mmb(ref.feature, h) if ref.boundary == "MMB" else lmb(ref.feature, h)


@dataclass(frozen=True)
class Simulator:
    """A datum feature simulator of a functional gauge."""

    letter: str
    kind: str  # "plane" | "pin" (in a datum bore) | "hole" (over a datum boss)
    diameter: DatumDerived | None  # the MMB (or LMB); None for a plane or RMB (adjustable)
    note: str


def simulators(fr: DatumFrame) -> tuple[Simulator, ...]:
    """The frame's datum simulators: planes, and fixed pins/holes at MMB (or LMB); adjustable at RMB.

    >>> from geom.model import Feature, Kind
    >>> boss = Feature("boss", Kind.PIN, (24.95, 25.0), 6.0)
    >>> [(s.kind, s.diameter and s.diameter.value) for s in simulators(frame(DatumRef("A"), DatumRef("B", boss, "MMB")))]
    [('plane', None), ('hole', 25.0)]
    """
    out = []
    for r in fr.refs:
        if r.is_plane:
            out.append(Simulator(r.letter, "plane", None, "a plane the part seats on"))
            continue
        d = simulator_size(fr, r.letter)
        note = f"fixed at {r.boundary}" if d is not None else "RMB: adjustable, contacts the feature"
        out.append(Simulator(r.letter, "pin" if r.feature.kind is Kind.HOLE else "hole", d, note))
    return tuple(out)


def pilot_clearance(frame1: DatumFrame, frame2: DatumFrame) -> DatumDerived | None:
    """Worst-case pilot clearance of two parts' secondary datum features: bore MMB - boss MMB
    (diametral); None unless both are features of size.

    >>> from geom.model import Feature, Kind
    >>> bore = Feature("bore", Kind.HOLE, (40.0, 40.1), 8.0)
    >>> boss = Feature("boss", Kind.PIN, (39.9, 39.95), 6.0)
    >>> pilot_clearance(frame(DatumRef("A"), DatumRef("B", bore, "MMB")),
    ...                 frame(DatumRef("A"), DatumRef("B", boss, "MMB"))).formula(Units.MM)
    'pilot clearance = bore MMB - boss MMB = 40.000 - 39.950 = 0.050'
    """
    s1, s2 = frame1.secondary, frame2.secondary
    if s1 is None or s2 is None or s1.is_plane or s2.is_plane:
        return None
    (bore, fb), (boss, fp) = ((s1, frame1), (s2, frame2)) if s1.feature.kind is Kind.HOLE else ((s2, frame2), (s1, frame1))
    if bore.feature.kind is not Kind.HOLE or boss.feature.kind is not Kind.PIN:
        raise ValueError("the pilots must be a bore on one part and a boss on the other")
    mb, mp = mmb(bore.feature, fb.higher(bore.letter)), mmb(boss.feature, fp.higher(boss.letter))
    return DatumDerived("pilot", mb.value - mp.value, "bore {mmb} - boss {mmb}", "{} - {}", (mb.value, mp.value))


__all__ = ["BOUNDARIES", "PRECEDENCE", "DatumDerived", "DatumFrame", "DatumRef", "DatumShift", "Simulator",
    "datum_shift", "datum_term", "frame", "lmb", "mmb", "pilot_clearance", "shift_of", "simulator_size",
    "simulators"]
