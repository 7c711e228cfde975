"""Headless report: per mate (and per feature in no mate) a 3D picture, the 2D views as PNG, SVG
and PDF, one PDF evidence page each (title block, requirement, images, numbers with formulas,
effect on fit, disposition, signatures, caution), an inspection page per measured feature, the
fastener pages and ``results.json``.

No display is needed: the 3D picture is rendered off-screen by :func:`viewer.scene3d.render_image`
and the 2D views are matplotlib figures saved by the Agg / PDF / SVG backends. Every number printed
comes from :mod:`geom.analysis` and :mod:`geom.inspect` (through :mod:`geom.readout`), formatted
at the units' precision.

Where things live:

* :mod:`~viewer.report.page` — the sheet, the one way a page starts and ends (title block,
  caution), tables, wrapping, disposition, cropping a 3D render;
* :mod:`~viewer.report.fit` — the items of a report and the fit (mate) page;
* :mod:`~viewer.report.readings` and :mod:`~viewer.report.inspection` — the words of the
  inspection page, and the page;
* :mod:`~viewer.report.fastener` — the fastener page and its schematic;
* :mod:`~viewer.report.writer` — :func:`write_report`, which writes the folder.

>>> from geom import analyse_scene, loads
>>> res = analyse_scene(loads('units = "mm"\\n[[feature]]\\nid = "bore 1"\\nkind = "hole"\\n'
...                           'limits = [6.0, 6.012]\\nlength = 8\\n'))
>>> [(i.file_key, i.label) for i in report_items(res)]
[('feature_bore_1', 'feature bore 1')]
"""

from .fastener import (
    FASTENERS_PER_PAGE,
    build_fastener_page,
    draw_fastener,
    fastener_figure,
    fastener_rows,
    fastener_words,
)
from .fit import (
    DESIGN_SUBTITLE,
    DESIGN_TITLE,
    VIEW_FILES,
    Item,
    build_page,
    effect_on_fit,
    is_worst_case,
    item_states,
    report_items,
)
from .inspection import DISAGREE_TITLE, IMAGE_MIN, LOWER_SIZES, build_inspection_page
from .page import (
    DISPOSITIONS,
    GREY,
    MARGIN,
    PAGE,
    PAGE_3D_ASPECT,
    crop_to_content,
    evidence_page,
)
from .readings import (
    INSPECTED_CHECKS,
    SECTION_ROWS,
    check_meaning,
    condensed_sections,
    inspected_ids,
    reading_rows,
    scene_inspections,
)
from .writer import (
    VECTOR_FORMATS,
    Progress,
    inspection_images,
    page_image_3d,
    write_report,
)

__all__ = [
    "DESIGN_SUBTITLE", "DESIGN_TITLE", "DISAGREE_TITLE", "DISPOSITIONS", "FASTENERS_PER_PAGE", "GREY",
    "IMAGE_MIN", "INSPECTED_CHECKS", "LOWER_SIZES", "MARGIN", "PAGE", "PAGE_3D_ASPECT", "SECTION_ROWS",
    "VECTOR_FORMATS", "VIEW_FILES", "Item", "Progress", "build_fastener_page", "build_inspection_page",
    "build_page", "check_meaning", "condensed_sections", "crop_to_content", "draw_fastener", "effect_on_fit",
    "evidence_page", "fastener_figure", "fastener_rows", "fastener_words", "inspected_ids", "inspection_images",
    "is_worst_case", "item_states", "page_image_3d", "reading_rows", "report_items", "scene_inspections",
    "write_report",
]
