"""Immutable values: features of size, geometric tolerances, mates, fasteners, scenes.

All lengths are in the scene's units (``mm`` or ``in``); angles in degrees.
The datum frame: datum A is the plane z = 0, a feature's nominal axis starts at
its basic location ``at`` = (x, y) on A.

>>> bore = Feature("bore", Kind.HOLE, (10.000, 10.015), 15.0)
>>> bore.mmc, bore.lmc
(10.0, 10.015)
>>> pin = Feature("dowel", Kind.PIN, (9.985, 9.995), 15.0)
>>> pin.mmc, pin.lmc
(9.995, 9.985)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from enum import Enum


class Kind(str, Enum):
    """Internal (hole) or external (pin) feature of size."""

    HOLE = "hole"
    PIN = "pin"


class Material(str, Enum):
    """Material-condition modifier of a geometric tolerance."""

    MMC = "MMC"
    LMC = "LMC"
    RFS = "RFS"


class Characteristic(str, Enum):
    POSITION = "position"
    PERPENDICULARITY = "perpendicularity"
    PARALLELISM = "parallelism"
    ANGULARITY = "angularity"
    STRAIGHTNESS = "straightness"


class Zone(str, Enum):
    """Shape of the tolerance zone of a derived axis."""

    DIAMETER = "diameter"  # cylinder
    WIDTH = "width"  # two parallel planes


class Standard(str, Enum):
    ASME = "asme"  # ASME Y14.5: Rule #1 (envelope) by default
    ISO = "iso"  # ISO 8015 independency: envelope only when asked for


class Units(str, Enum):
    MM = "mm"
    IN = "in"

    @property
    def decimals(self) -> int:
        """Usual reporting precision: mm to 3 decimals, inch to 4 (common practice, no source)."""
        return 3 if self is Units.MM else 4

    def digits(self, value: float) -> int:
        """Decimals that show ``value`` without hiding it.

        The usual precision, unless that would change the number: a value with a few more
        decimals (a typed 0.00015 in, a derived 7.9845 mm) is shown in full, up to three more
        decimals; a longer (measured) non-zero value that would print as zero gets two
        significant digits.

        >>> Units.IN.digits(0.00015), Units.MM.digits(7.9845), Units.MM.digits(8.0)
        (5, 4, 3)
        >>> Units.MM.digits(0.0213471), Units.MM.digits(0.0003127)
        (3, 5)
        """
        d = self.decimals
        v = round(float(value), 9)
        for k in range(d, d + 4):
            if abs(round(v, k) - v) <= 5e-10:
                return k
        if round(v, d) == 0.0 and v != 0.0:
            return min(9, d + max(1, -math.floor(math.log10(abs(v))) + 1 - d))
        return d

    def fmt(self, value: float | None, signed: bool = False) -> str:
        """Format a length at the units' usual precision, or with the digits it needs not to be
        hidden (:meth:`digits`); "-" for None.

        >>> Units.MM.fmt(7.985), Units.IN.fmt(0.00015), Units.MM.fmt(-0.0)
        ('7.985', '0.00015', '0.000')
        """
        if value is None:
            return "-"
        k = self.digits(value)
        v = round(value, k) + 0.0  # drop negative zero
        return f"{v:+.{k}f}" if signed else f"{v:.{k}f}"

    def fmt_cmp(self, *values: float) -> tuple[str, ...]:
        """Format numbers that are compared with each other, with the same decimals, enough to
        keep unequal numbers from printing equal (a reading of 0.0183 against a limit of 0.018
        prints ``0.0183`` and ``0.0180``, never ``0.018`` twice).

        >>> Units.MM.fmt_cmp(0.0183, 0.018)
        ('0.0183', '0.0180')
        >>> Units.MM.fmt_cmp(0.012, 0.018)
        ('0.012', '0.018')
        """
        vals = [float(v) for v in values]
        k = max([self.digits(v) for v in vals] or [self.decimals])
        top = max(k, self.decimals + 3)
        while k < top:
            shown = [round(v, k) for v in vals]
            clash = any(shown[i] == shown[j] and abs(vals[i] - vals[j]) > 5e-10
                        for i in range(len(vals)) for j in range(i + 1, len(vals)))
            if not clash:
                break
            k += 1
        return tuple(f"{round(v, k) + 0.0:.{k}f}" for v in vals)


@dataclass(frozen=True)
class Tolerance:
    """A geometric tolerance applied to the derived median line (axis) of a feature of size."""

    characteristic: Characteristic
    value: float
    zone: Zone = Zone.DIAMETER
    material: Material = Material.RFS
    datums: tuple[str, ...] = ()
    projected: float | None = None  # projected tolerance zone height
    angle: float | None = None  # basic angle to datum A (angularity only), degrees

    def symbol(self, units: "Units | None" = None) -> str:
        """Compact feature-control-frame text, e.g. ``⟂ ⌀0.020 (M) | A``."""
        sym = {
            Characteristic.POSITION: "⌖",
            Characteristic.PERPENDICULARITY: "⟂",
            Characteristic.PARALLELISM: "∥",
            Characteristic.ANGULARITY: "∠",
            Characteristic.STRAIGHTNESS: "⏤",
        }[self.characteristic]
        dia = "⌀" if self.zone is Zone.DIAMETER else ""
        mod = {Material.MMC: " (M)", Material.LMC: " (L)", Material.RFS: ""}[self.material]
        num = units.fmt if units is not None else (lambda v: f"{v:g}")
        proj = f" (P){num(self.projected)}" if self.projected else ""
        dat = "".join(f" | {d}" for d in self.datums)
        return f"{sym} {dia}{num(self.value)}{mod}{proj}{dat}"


@dataclass(frozen=True)
class Measured:
    """Inspection values typed into the scene for a produced part (see :mod:`geom.inspect`)."""

    size: float | None = None  # unrelated actual mating size
    related_size: float | None = None  # related (datum-oriented) actual mating size
    axis_deviation: float | None = None  # zone size needed by the derived axis
    axis_bottom: tuple[float, float] | None = None  # axis point (x, y) at z = 0
    axis_top: tuple[float, float] | None = None  # axis point (x, y) at z = length
    local_sizes: tuple[float, float] | None = None  # smallest and largest local size
    uncertainty: float | None = None  # expanded uncertainty U (k = 2)
    points: str | None = None  # CSV of surface points, relative to the scene file


@dataclass(frozen=True)
class Feature:
    """A cylindrical feature of size: a hole (internal) or a pin (external)."""

    id: str
    kind: Kind
    limits: tuple[float, float]  # (smallest, largest) size
    length: float  # length of engagement along the axis
    at: tuple[float, float] = (0.0, 0.0)  # basic location on datum A
    tolerance: Tolerance | None = None
    envelope: bool | None = None  # None: the standard's default (ASME yes, ISO no)
    measured: Measured | None = None
    name: str = ""  # free text shown on pictures
    # tighter controls on the same feature beside ``tolerance`` (e.g. a perpendicularity to A
    # refining a position to A|B|C): see :mod:`geom.refinement`
    refinements: tuple[Tolerance, ...] = ()

    @property
    def mmc(self) -> float:
        """Maximum material size: smallest hole, largest pin."""
        return self.limits[0] if self.kind is Kind.HOLE else self.limits[1]

    @property
    def lmc(self) -> float:
        """Least material size: largest hole, smallest pin."""
        return self.limits[1] if self.kind is Kind.HOLE else self.limits[0]

    @property
    def size_tolerance(self) -> float:
        return self.limits[1] - self.limits[0]

    @property
    def label(self) -> str:
        return self.name or self.id

    def with_(self, **changes) -> "Feature":
        return replace(self, **changes)


@dataclass(frozen=True)
class Mate:
    """One hole receiving one pin (on the other part), both located from datum A."""

    hole: str
    pin: str


@dataclass(frozen=True)
class Fastener:
    """A fastener pattern: floating (clearance holes in both parts) or fixed (one part threaded)."""

    id: str
    kind: str  # "floating" | "fixed"
    fastener: float  # F, fastener MMC (largest) size
    hole: float  # H, clearance hole MMC (smallest) size
    thread_depth: float | None = None  # D, minimum thread depth / thickness of the fixed part
    projection: float | None = None  # P, maximum thickness of the part with the clearance hole


@dataclass(frozen=True)
class DatumSpec:
    """A datum of the scene's frame beyond the plane A: a plane (``feature`` None) or a feature
    of size of the scene (its id: a pilot bore is a hole, a boss a pin), referenced at
    ``boundary`` RMB, MMB or LMB (ISO: without or with the MMR/LMR on the datum)."""

    letter: str
    feature: str | None = None
    boundary: str = "RMB"


@dataclass(frozen=True)
class PatternSpec:
    """Several members of one feature of size (the scene feature ``feature``: its size and its
    position tolerance, whose datums are the frame) at basic ``locations`` (x, y) in the datum
    frame; ``requirement`` "simultaneous" or "separate" (None: the standard's default).
    ``measured``: per member (x, y, size) as produced, from the datum feature's actual axis;
    ``datum_sizes``: produced sizes of the datum features of size (letter, size). ``lower``:
    (t2, repeated datums, "composite" | "two_segment") of a second tier."""

    id: str
    feature: str
    locations: tuple[tuple[float, float], ...]
    requirement: str | None = None
    measured: tuple[tuple[float, float, float], ...] = ()
    datum_sizes: tuple[tuple[str, float], ...] = ()
    # a composite position's lower tier (or the lower of two single segments): (value, datums, form)
    lower: tuple[float, tuple[str, ...], str] | None = None
    # CMM points per member (CSV paths relative to the scene file, in member order), and of the
    # datum features of size (letter, CSV path): the measured members are then computed from them
    points: tuple[str, ...] = ()
    datum_points: tuple[tuple[str, str], ...] = ()


@dataclass(frozen=True)
class InterfaceSpec:
    """Two parts' patterns put together: ``holes`` (a pattern of holes, part 1) over ``pins``
    (a pattern of pins, studs or threaded holes, part 2), the members paired by basic location;
    ``fastener``: F, where fasteners pass through (floating or fixed cases)."""

    holes: str
    pins: str
    fastener: float | None = None


@dataclass(frozen=True)
class Scene:
    title: str
    units: Units
    standard: Standard = Standard.ASME
    features: tuple[Feature, ...] = ()
    mates: tuple[Mate, ...] = ()
    fasteners: tuple[Fastener, ...] = ()
    report: tuple[tuple[str, str], ...] = ()  # title-block fields for exported reports
    source: str | None = field(default=None, compare=False)  # file it was read from
    datums: tuple[DatumSpec, ...] = ()  # the frame beyond A (B, C), in precedence order
    patterns: tuple[PatternSpec, ...] = ()
    interfaces: tuple[InterfaceSpec, ...] = ()
    # the statistical fit's inputs (``[[process]]`` and ``[yield]`` tables): a
    # ``geom.yieldspec.StatSpec`` (defined there, so plain scenes load nothing more), or None
    statistics: "object | None" = None

    def feature(self, fid: str) -> Feature:
        for f in self.features:
            if f.id == fid:
                return f
        raise KeyError(fid)

    def replace_feature(self, feat: Feature) -> "Scene":
        return replace(self, features=tuple(feat if f.id == feat.id else f for f in self.features))

    def with_(self, **changes) -> "Scene":
        return replace(self, **changes)


def envelope_applies(feature: Feature, standard: Standard) -> bool:
    """Does the envelope requirement (perfect form at MMC) apply to this feature?

    ASME Y14.5-2018 Rule #1 (from memory): applies by default, except that a straightness
    tolerance on the derived median line overrides it (its boundary is the virtual condition).
    ISO 8015:2011 independency: only where the envelope is indicated (ISO 14405-1 (E)).
    An explicit ``envelope = true/false`` in the scene always wins.
    """
    if feature.envelope is not None:
        return feature.envelope
    tol = feature.tolerance
    if tol is not None and tol.characteristic is Characteristic.STRAIGHTNESS:
        return False
    return standard is Standard.ASME


def axis_direction(tol: Tolerance | None) -> tuple[float, float, float]:
    """Nominal axis direction in the datum frame (datum A is z = 0).

    Perpendicularity, position, straightness and features without tolerance: +z.
    Parallelism: +x (axis parallel to A). Angularity: in the x-z plane at the basic angle to A.
    """
    if tol is None:
        return (0.0, 0.0, 1.0)
    if tol.characteristic is Characteristic.PARALLELISM:
        return (1.0, 0.0, 0.0)
    if tol.characteristic is Characteristic.ANGULARITY and tol.angle is not None:
        a = math.radians(tol.angle)
        return (math.cos(a), 0.0, math.sin(a))
    return (0.0, 0.0, 1.0)


def datum_problem(tol: Tolerance | None) -> str | None:
    """Why the datums referenced cannot do what the tolerance needs, or None.

    Datum A is a plane: it orients (an axis normal or parallel to it, or at a basic angle) but
    locates nothing in x and y, and it does not fix a direction about its own normal. So
    (ASME Y14.5 and ISO 5459 degrees of freedom of a datum reference frame, common practice):

    - position needs datums beyond A to locate the axis (e.g. A | B | C, or A | B with B a
      feature of size);
    - a width zone (two parallel planes) needs a datum beyond A to fix the planes' direction;
    - angularity and parallelism of an axis need a datum beyond A to fix the direction the axis
      leans in (A fixes only the angle to itself).

    >>> datum_problem(Tolerance(Characteristic.POSITION, 0.1, datums=("A",)))[:40]
    'position to datum A alone leaves the axi'
    >>> datum_problem(Tolerance(Characteristic.PERPENDICULARITY, 0.1, datums=("A",))) is None
    True
    """
    if tol is None or tol.characteristic is Characteristic.STRAIGHTNESS or len(tol.datums) > 1:
        return None
    ch = tol.characteristic
    if ch is Characteristic.POSITION:
        return ("position to datum A alone leaves the axis unlocated in x and y (a plane orients, it "
                "does not locate); reference the datums that locate it, e.g. datums = [\"A\", \"B\", \"C\"], "
                "or use perpendicularity to A to control orientation only")
    if tol.zone is Zone.WIDTH:
        return (f"a width zone (two parallel planes) for {ch.value} to datum A alone has no fixed direction "
                "(it may turn about A's normal); add the datum that orients it, e.g. datums = [\"A\", \"B\"], "
                "or use a diameter zone")
    if ch in (Characteristic.ANGULARITY, Characteristic.PARALLELISM):
        return (f"{ch.value} of an axis to datum A alone fixes its angle to A but not the direction it runs "
                "in; add the datum that orients it, e.g. datums = [\"A\", \"B\"]")
    return None
