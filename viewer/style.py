"""matezone's colour scheme, shared by the 3D scene (viewer/scene3d/), the 2D figures
(viewer/figures/) and the report.

Designed for a white page and a projector: every role has its own luminance as well as its own
hue, so the pictures still read in greyscale print (relative luminance, sRGB, in brackets; the
steps between neighbouring roles are at least ~0.04, and the roles that touch in a picture differ
far more). Red is reserved for interference: nothing else in a picture uses it, so a red pixel
always means "the parts overlap".

Colours are '#rrggbb' strings (matplotlib and PyVista both accept them); ``rgb()`` gives floats.
Importing this module loads nothing but the standard library; matplotlib is imported lazily by
``clearance_colormap``.
"""

from __future__ import annotations

# --------------------------------------------------------------------------- roles
BACKGROUND = "#FFFFFF"  # page / window background (1.00)
TEXT = "#16161D"  # labels, readouts, outlines (0.01)
PART = "#BFC6CE"  # the part around the hole, drawn translucent (0.56)
DATUM = "#8A8470"  # datum plane A and the datum feature symbol (0.23)
ZONE = "#2E9E5E"  # tolerance zone (cylinder or slab), translucent (0.26)
ZONE_AXIS = "#17502F"  # axis of the tolerance zone: true position / floating zone axis (0.06)
AXIS = "#0A1A5C"  # the feature's actual (worst-case) axis (0.01)
SURFACE = "#3B78C4"  # the feature's surface at the produced size, translucent (0.18)
VC = "#7B2D90"  # virtual-condition (mating-side worst-case) boundary, wireframe (0.08)
RC = "#E39A00"  # resultant-condition (opposite) boundary, wireframe (0.40)
MATE = "#D7B47A"  # the mating pin / hole where no clearance colouring applies (0.48)
MATE_AXIS = "#5A3A0C"  # the mating feature's axis (0.05)
INTERFERENCE = "#E0002B"  # material overlap: the warning colour (0.16, and the only red)
TIGHT = "#16161D"  # marker of the tightest spot when it is a clearance (same as TEXT)
PROJECTED = "#006874"  # projected tolerance zone and the mating part in it (0.11)
OK = "#1B6B3A"  # verdict text when the parts assemble (0.10)
NOT_PROVEN = "#8A5A00"  # inspection verdict neither proven nor disproven / not evaluated (0.12)
ENVELOPE = "#56626E"  # unrelated actual mating envelope of a measured feature, translucent (0.12)
ENVELOPE_RELATED = "#C77C00"  # related actual mating envelope (held to the datum), dashed wireframe (0.29)
MEDIAN_LINE = AXIS  # derived median line (section centres) of a measured feature
FEATURE_AXIS = AXIS  # feature axis (axis of the unrelated envelope) of a measured feature, where it governs
NEUTRAL = "#56626E"  # a check that was not evaluated (no colour claims a verdict)
AXIS_NOT_GOVERNING = NEUTRAL  # an axis reading shown beside the governing one (it does not govern)

# Colour of each verdict role of geom.conformance.verdict_word (the one mapping of verdicts to
# colours; the window uses the same roles with its own banner backgrounds).
ROLE_COLOUR = {"ok": OK, "fail": INTERFERENCE, "unproven": NOT_PROVEN, "none": NEUTRAL}

# Clearance colouring of the mating surface, from tight (0) to loose: a sequential ramp of
# rising luminance (0.29 .. 0.91) in blue-green-cream with no red, so the interference red
# below zero can never be confused with it, in colour or in grey.
# Tight -> loose; the ramp's darkest end (0.29) is still well above the red (0.16), so in grey
# the interference is the darkest thing on the mating surface.
CLEARANCE_COLORS = ("#4C9DB0", "#7CC3A2", "#C5E3A0", "#FFF4C2")
CLEARANCE_CMAP = "matezone_clearance"  # name of the matplotlib colormap built from the list

# Radial deviation of measured points from their least-squares cylinder: a diverging ramp,
# brown (material inside the fitted cylinder: negative) through a light neutral (zero) to blue
# (outside: positive). No red: red still means only interference.
DEVIATION_COLORS = ("#7A3E08", "#D09A55", "#E4E4E4", "#78A9D6", "#17457F")
DEVIATION_CMAP = "matezone_deviation"

PART_OPACITY = 0.16
DATUM_OPACITY = 0.30
ZONE_OPACITY = 0.30
SURFACE_OPACITY = 0.28
PROJECTED_OPACITY = 0.22

FONT_FAMILY = "arial"  # VTK's built-in families: arial, courier, times
MONO_FAMILY = "courier"


def rgb(colour: str) -> tuple[float, float, float]:
    """'#rrggbb' -> (r, g, b) floats in 0..1."""
    h = colour.lstrip("#")
    return tuple(int(h[i:i + 2], 16) / 255.0 for i in (0, 2, 4))  # type: ignore[return-value]


def rgb255(colour: str) -> tuple[int, int, int]:
    h = colour.lstrip("#")
    return tuple(int(h[i:i + 2], 16) for i in (0, 2, 4))  # type: ignore[return-value]


def luminance(colour: str) -> float:
    """Relative luminance (sRGB -> linear, Rec. 709 weights; WCAG 2 definition)."""
    lin = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in rgb(colour)]
    return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]


def clearance_colormap(lo: float, hi: float, n: int = 256):
    """A matplotlib ListedColormap for signed clearance over [lo, hi]: INTERFERENCE below zero,
    the CLEARANCE_COLORS ramp from zero (tight) to ``hi`` (loose)."""
    from matplotlib.colors import LinearSegmentedColormap, ListedColormap

    import numpy as np

    ramp = LinearSegmentedColormap.from_list(CLEARANCE_CMAP, CLEARANCE_COLORS)
    if hi <= lo:
        hi = lo + 1.0
    v = lo + (hi - lo) * (np.arange(n) + 0.5) / n
    pos_top = max(hi, 1e-300)
    cols = np.empty((n, 4))
    neg = v < 0
    cols[neg] = (*rgb(INTERFERENCE), 1.0)
    cols[~neg] = ramp(np.clip(v[~neg] / pos_top, 0.0, 1.0))
    return ListedColormap(cols, name=CLEARANCE_CMAP)


def deviation_colormap(n: int = 256):
    """A matplotlib colormap for signed radial deviation (use with a clim symmetric about 0, so
    zero falls on the neutral middle colour)."""
    from matplotlib.colors import LinearSegmentedColormap

    return LinearSegmentedColormap.from_list(DEVIATION_CMAP, DEVIATION_COLORS, N=n)


LEGEND_ROLES = {
    "part": PART,
    "datum": DATUM,
    "zone": ZONE,
    "zone_axis": ZONE_AXIS,
    "axis": AXIS,
    "surface": SURFACE,
    "vc": VC,
    "rc": RC,
    "mate": MATE,
    "interference": INTERFERENCE,
    "projected": PROJECTED,
    "envelope": ENVELOPE,
    "envelope_related": ENVELOPE_RELATED,
}
