"""matezone's pure geometry core: features of size, tolerances, boundaries, fits.

Only numpy, shapely and scipy may be imported here (shapely and scipy lazily, inside the
functions that need them), never a GUI or rendering library: ``tests/test_layering.py``
enforces it.
"""

from .analysis import (
    Derived,
    FastenerResult,
    FeatureResult,
    MateResult,
    SceneResult,
    analyse_fastener,
    analyse_feature,
    analyse_mate,
    analyse_scene,
    clearance_at,
    mate_verdict,
    required_hole_fixed,
    result_to_json,
    term,
)
from .boundaries import (
    FeatureState,
    SizeOutOfLimits,
    bonus,
    effective_size,
    resultant_condition,
    tilt_angle_deg,
    tolerance_allowed,
    virtual_condition,
    worst_case_boundaries,
)
from .model import (
    Characteristic,
    Fastener,
    Feature,
    Kind,
    Mate,
    Material,
    Measured,
    Scene,
    Standard,
    Tolerance,
    Units,
    Zone,
    axis_direction,
    envelope_applies,
)
from .scenefile import SceneError, dumps, load, loads, save

__all__ = [n for n in dir() if not n.startswith("_")]
