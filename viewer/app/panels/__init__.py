"""Side panels of the window, one module each; every panel observes the
:class:`~viewer.app.model.SceneModel` and holds no logic beyond layout (the texts and rows come
from :mod:`viewer.windowlogic`).

- :mod:`.contents`: the scene-contents list (mates, features, inspections, fasteners) and its
  add / remove buttons
- :mod:`.forms`: the editor forms' common behaviour, the scene form, the mate form
- :mod:`.feature_form`: the feature editor
- :mod:`.whatif`: the what-if controls (produced size, tilt direction, tolerance used)
- :mod:`.play`: the teaching play control (a size sweep played into the what-if states) and
  the three-step lesson
- :mod:`.layers`: the layer list under the 3D view (legend and layer toggles in one) and the
  Layers menu that stays open while toggling
- :mod:`.inspection`: the inspection controls (data source, bonus basis, load points)
- :mod:`.verdict`: the verdict banner
- :mod:`.readouts`: the readout table
- :mod:`.messages`: the message bar
- :mod:`.common`: widget helpers and the window's looks
"""

from viewer.windowlogic.fields import length_decimals
from viewer.windowlogic.inspection import BASIS_TEXT, axis_readings, other_axis_basis

from .common import BAD_RED, ERROR_STYLE, NEUTRAL, OK_GREEN, ROLE_LOOK
from .contents import ContentsList
from .feature_form import FeatureForm
from .forms import Form, MateForm, SceneForm
from .inspection import InspectionControls
from .layers import LayerList, StayOpenMenu
from .messages import MessageBar
from .play import Lesson, PlayBar, SweepPlayer
from .readouts import ReadoutTable
from .verdict import VerdictBanner
from .whatif import FeatureControls, LengthSpin, WhatIfPanel

__all__ = [
    "BAD_RED", "BASIS_TEXT", "ERROR_STYLE", "NEUTRAL", "OK_GREEN", "PlayBar", "ROLE_LOOK", "ContentsList", "FeatureControls",
    "FeatureForm", "Form", "InspectionControls", "LayerList", "LengthSpin", "Lesson", "MateForm", "MessageBar",
    "ReadoutTable", "StayOpenMenu",
    "SceneForm", "SweepPlayer", "VerdictBanner", "WhatIfPanel", "axis_readings", "length_decimals", "other_axis_basis",
]
