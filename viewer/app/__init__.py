"""The desktop window (PyQt5, pyvistaqt): the only package that imports Qt.

One model, many observers: :class:`.model.SceneModel` holds the scene, its analysis, the
what-if states and the focus, and its Qt signals are the only change notification; every
widget reads it and calls its methods, no widget talks to another.

- :mod:`.main`: start the application and the window (``matezone view``)
- :mod:`.window`: the main window (layout, files, recent files, exports); :mod:`.menus` its menus
- :mod:`.model`: the observed model; :mod:`.workers` the inspection and report jobs run off the
  GUI thread
- :mod:`.panels`: the side panels, one module each (contents, forms, what-if, inspection,
  verdict banner, readout table, message bar)
- :mod:`.views`: the 3D and 2D views
- :mod:`.glyphs`: characteristic symbols in the installed fonts; :mod:`.platform`: Qt platform
  questions asked before a QApplication exists

The logic behind the panels needs no Qt and lives in :mod:`viewer.windowlogic`.
"""
