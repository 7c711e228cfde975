"""The [report] table of a scene: the fields a nonconformance report carries, counts checked."""

import pytest

from geom import dumps, loads
from geom.scenefile import COUNT_KEYS, REPORT_KEYS, SceneError
from scenetext import bore_and_dowel


def _with_report(body: str) -> str:
    return bore_and_dowel() + "\n[report]\n" + body + "\n"


def test_every_field_of_a_nonconformance_report_is_read_and_written_back():
    body = "\n".join(f'{k} = "x-{k}"' for k in REPORT_KEYS if k not in COUNT_KEYS)
    body += "\nquantity = 50\nquantity_inspected = 12\nquantity_rejected = 3"
    sc = loads(_with_report(body))
    rep = dict(sc.report)
    assert rep["drawing"] == "x-drawing" and rep["calibration"] == "x-calibration"
    assert rep["quantity_inspected"] == "12" and rep["quantity_rejected"] == "3"
    again = dict(loads(dumps(sc)).report)
    assert again == rep
    assert "quantity_rejected = 3\n" in dumps(sc)  # counts stay numbers in the file


@pytest.mark.parametrize("body, field, fragment", [
    ("quantity_inspected = 4\nquantity_rejected = 5", "report.quantity_rejected", "at most report.quantity_inspected = 4"),
    ('quantity_rejected = "3"', "report.quantity_rejected", "whole number"),
    ("quantity_inspected = 2.5", "report.quantity_inspected", "whole number"),
    ("quantity_inspected = -1", "report.quantity_inspected", "from 0 to 1e9"),
    ('inspektor = "A. Moll"', "report", "inspektor"),
])
def test_bad_report_fields_are_named(body, field, fragment):
    with pytest.raises(SceneError) as e:
        loads(_with_report(body))
    assert field in str(e.value) and fragment in str(e.value), str(e.value)


def test_rejected_alone_is_allowed():
    # a count of rejected parts without a count inspected is a complete statement of its own
    assert dict(loads(_with_report("quantity_rejected = 2")).report)["quantity_rejected"] == "2"
