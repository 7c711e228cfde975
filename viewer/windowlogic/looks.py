"""The window's colours, as plain strings: one look per verdict role and the mark of a rejected
field. The role colours are the PDF's (:data:`viewer.style.ROLE_COLOUR`), so the window's banner
and the report's headline look alike."""

from __future__ import annotations

from viewer import style

ERROR_STYLE = "border: 2px solid #c62828; background: #fff3f3;"

# The one mapping of verdict roles (geom.conformance.verdict_word, PartVerdict.role) to the
# window's looks: (text and border colour, background, mark). A mate's fit uses the same roles
# (assembles: "ok", interferes: "fail", nothing to judge: "none").
ROLE_LOOK = {
    "ok": (style.ROLE_COLOUR["ok"], "#e8f5e9", "✔"),
    "fail": (style.ROLE_COLOUR["fail"], "#ffebee", "✖"),
    "unproven": (style.ROLE_COLOUR["unproven"], "#fff3e0", "?"),
    "none": (style.ROLE_COLOUR["none"], "#eceff1", "–"),
}
OK_GREEN, BAD_RED, NEUTRAL = ROLE_LOOK["ok"][0], ROLE_LOOK["fail"][0], ROLE_LOOK["none"][0]

# message levels -> (background, text and border colour) of the message bar
MESSAGE_LOOK = {"error": ("#fdecea", BAD_RED), "info": ("#e8f5e9", OK_GREEN)}
MESSAGE_DEFAULT = ("#eceff1", NEUTRAL)
