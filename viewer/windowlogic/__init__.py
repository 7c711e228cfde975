"""What the desktop window shows and accepts, computed without Qt (importable with no display).

The widgets in :mod:`viewer.app` hold no logic of their own beyond layout: they ask these
modules for their texts and rows and hand the user's input to them.

- :mod:`~viewer.windowlogic.looks`: the colours of verdict roles and of a rejected field
- :mod:`~viewer.windowlogic.editing`: the scene as the dict a TOML file decodes to, parsed with
  the scene-file rules; the contents list's entries; new features and mates; removals
- :mod:`~viewer.windowlogic.fields`: typed text to numbers and back, the feature form's table
- :mod:`~viewer.windowlogic.focus`: which mate, feature, inspection or fastener is looked at
- :mod:`~viewer.windowlogic.whatif`: what-if states, the readout rows and the fit at a state,
  the size slider's positions (one display digit per key step)
- :mod:`~viewer.windowlogic.layers`: the layer names and the layer list's rows (the legend's
  colours of the layers a 3D scene holds)
- :mod:`~viewer.windowlogic.messages`: a rejected edit's message in the form's words
- :mod:`~viewer.windowlogic.readouts`: the readout table's lines for the focus
- :mod:`~viewer.windowlogic.inspection`: the lines and words of an inspection result
- :mod:`~viewer.windowlogic.banner`: the verdict banner's words and colour role
- :mod:`~viewer.windowlogic.points`: the points files an inspection or a report reads
- :mod:`~viewer.windowlogic.export`: the ``matezone report`` command the window runs
- :mod:`~viewer.windowlogic.teaching`: the size sweep the play control walks, the three-step
  lesson, the sweep export job; the exports' default file names
- :mod:`~viewer.windowlogic.picture`: the caption block of an exported picture, the readout
  table as tab-separated text
"""
