"""The 3D scene: a geom result plus a what-if state in, named meshes out; headless rendering.

Pure builders (no Qt): :func:`build_mate_scene`, :func:`build_feature_scene` and
:func:`build_inspection_scene` (a measured feature: points coloured by radial deviation, median
line, actual mating envelopes, zone at the tolerance allowed, virtual condition) return a frozen
:class:`Scene3D` of layers of PyVista meshes with their ``add_mesh`` styles, 3D labels, the
readouts printed on the picture, a legend and three cameras. :func:`add_to_plotter` puts a scene
into any ``pyvista.Plotter`` (the Qt window's ``QtInteractor`` is one; :class:`LiveScene` keeps
it there and puts later scenes into the same actors); :func:`render_image` writes an off-screen
PNG.

Geometry (the datum frame of :mod:`geom.placement`): datum A is z = 0, the part occupies
0 <= z <= length, a projected zone lies at -projected <= z <= 0. Surfaces around an axis are
right circular cylinders about that axis, cut by planes parallel to A (so their ends sit on the
part's faces). Tolerances are far too small to see at true scale, so the drawing applies a
*radial exaggeration* k about the reference radius R0 (the hole's MMC radius): a lateral
deviation e of an axis from the zone axis is drawn as k*e and a radius r as R0 + k*(r - R0).
Zones, gaps, tilts and size differences all grow by k together and stay in proportion; lengths
along the axis are true. k = 1 draws true geometry. The clearance colouring is always computed
on the TRUE geometry (k = 1), whatever k the picture uses (:mod:`.clearance`).

Where things live:

- :mod:`.values` -- layer and view names, :class:`Layer`, :class:`Label`, :class:`Scene3D`
- :mod:`.rings` -- ring points, distances and normals (numpy)
- :mod:`.primitives` -- VTK meshes built directly, interned meshes
- :mod:`.assemble` -- the scene being assembled, replayed pieces, cameras, the finish
- :mod:`.text` -- frame text, boundary names, readout lines
- :mod:`.feature` -- one feature's zone, axis, surface, boundaries, part and datum
- :mod:`.clearance` -- the clearance colouring and its fixed scale
- :mod:`.fit` -- :func:`build_mate_scene`, :func:`build_feature_scene`, the projected zone
- :mod:`.measured`, :mod:`.inspection` -- :func:`build_inspection_scene` and its layers
- :mod:`.section` -- :func:`section_cut`, :func:`view_scene` (the cut in numpy)
- :mod:`.plotter` -- :func:`add_to_plotter`, :func:`apply_view`, :func:`render_image`
- :mod:`.live` -- :class:`LiveScene`: a later scene into the same actors

Every cache here is a :class:`viewer.memo.Memo`; :func:`clear_caches` empties them all.
"""

from ..exaggeration import NICE, auto_exaggeration, nice_floor, subject_exaggeration
from ..memo import clear_caches
from .fit import build_feature_scene, build_mate_scene
from .inspection import build_inspection_scene
from .live import LiveScene, keep_scalar_bars_in_view
from .plotter import add_to_plotter, apply_view, render_image, render_variants
from .section import section_cut, view_scene
from .values import (
    HIDDEN_BY_DEFAULT,
    LAYERS,
    N_FINE,
    N_PHI,
    N_PHI_CAGE,
    N_Z_MATE,
    VIEWS,
    CLOSE_UP,
    Camera,
    Label,
    Layer,
    Scene3D,
)

__all__ = [
    "HIDDEN_BY_DEFAULT", "LAYERS", "N_FINE", "N_PHI", "N_PHI_CAGE", "N_Z_MATE", "NICE", "VIEWS", "CLOSE_UP", "Camera",
    "Label", "Layer", "LiveScene", "Scene3D", "add_to_plotter", "apply_view", "auto_exaggeration",
    "build_feature_scene", "build_inspection_scene", "build_mate_scene", "clear_caches",
    "keep_scalar_bars_in_view", "nice_floor", "render_image", "render_variants", "section_cut",
    "subject_exaggeration", "view_scene",
]
