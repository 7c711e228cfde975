"""The demo scenes (TOML) and the demo scan (CSV); this file only makes the folder a package.

An installed matezone ships this folder as the package ``matezone.scenes`` (mapped in
pyproject.toml), so the demo scenes are found through the import system from a wheel as well as
from a source checkout: ``matezone.cli.bundled_scenes()`` and ``matezone.cli.demo_scene()``.
Users and the README refer to the files as ``scenes/NAME.toml`` from the top of the checkout.
"""
