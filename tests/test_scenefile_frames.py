"""Scene files: the [[datum]], [[pattern]] and [[interface]] tables (geom/scenefile_frames.py) load
into the expected values, refuse bad input with one message naming file and field, and write back
so that loads(dumps(s)) == s."""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from geom import dumps, load, loads
from geom.model import DatumSpec, InterfaceSpec
from geom.scenefile import SceneError
from geom.scenefile_frames import frame_of, pattern_of

ROOT = Path(__file__).resolve().parent.parent
SCENES = sorted((ROOT / "scenes").glob("*.toml"))
FILE = "frames.toml"


def circle(count, diameter, start):
    """Bolt-circle locations computed here, independently of geom.patterns.bolt_circle:
    x = r cos(a), y = r sin(a), a = start + 360 k / n (plane geometry)."""
    r = diameter / 2.0
    return [(r * math.cos(math.radians(start + 360.0 * k / count)),
             r * math.sin(math.radians(start + 360.0 * k / count))) for k in range(count)]


STUDS = circle(4, 60.0, 45.0)
STUD_LOCS = "[" + ", ".join(f"[{x!r}, {y!r}]" for x, y in STUDS) + "]"
# invented demo values, 0.01 - 0.03 off the basic locations
MEASURED = [[21.22, 21.20, 6.63], [-21.20, 21.23, 6.61], [-21.23, -21.21, 6.65], [21.21, -21.22, 6.62]]

# a cover (pilot bore B at MMB, 4 clearance holes on a 60 bolt circle) over a housing (boss C at
# MMB, 4 studs at the same basic locations); invented demo sizes
GOOD = f"""title = "cover over housing"
units = "mm"
standard = "asme"
[[feature]]
id = "pilot"
kind = "hole"
limits = [40.0, 40.05]
length = 8.0
[feature.tolerance]
characteristic = "perpendicularity"
value = 0.02
material = "MMC"
datums = ["A"]
[[feature]]
id = "boss"
kind = "pin"
limits = [39.9, 39.95]
length = 6.0
[[feature]]
id = "bolt-hole"
kind = "hole"
limits = [6.6, 6.8]
length = 8.0
[feature.tolerance]
characteristic = "position"
value = 0.2
material = "MMC"
datums = ["A", "B"]
[[feature]]
id = "stud"
kind = "pin"
limits = [5.9, 6.0]
length = 10.0
[feature.tolerance]
characteristic = "position"
value = 0.1
material = "MMC"
datums = ["A", "C"]
[[datum]]
letter = "B"
feature = "pilot"
boundary = "MMB"
[[datum]]
letter = "C"
feature = "boss"
boundary = "MMB"
[[pattern]]
id = "cover-bolts"
feature = "bolt-hole"
bolt_circle = {{ count = 4, diameter = 60.0, start = 45.0 }}
measured = {MEASURED!r}
datum_sizes = {{ B = 40.03 }}
[[pattern]]
id = "housing-studs"
feature = "stud"
locations = {STUD_LOCS}
[[interface]]
holes = "cover-bolts"
pins = "housing-studs"
"""


def edit(old, new, text=GOOD):
    assert text.count(old) == 1, old
    return text.replace(old, new, 1)


def test_valid_scene_loads_into_the_expected_values():
    s = loads(GOOD, FILE)
    assert s.datums == (DatumSpec("B", "pilot", "MMB"), DatumSpec("C", "boss", "MMB"))
    bolts, studs = s.patterns
    assert (bolts.id, bolts.feature, studs.id, studs.feature) == ("cover-bolts", "bolt-hole", "housing-studs", "stud")
    # independent cos/sin computation (circle above): 4 members on a 60 circle from 45 degrees
    assert [c for xy in bolts.locations for c in xy] == pytest.approx([c for xy in STUDS for c in xy], abs=1e-12)
    assert bolts.locations[0] == pytest.approx((30 / math.sqrt(2), 30 / math.sqrt(2)))  # r cos 45, r sin 45
    assert studs.locations == tuple(STUDS)  # written with repr: read back exactly
    assert bolts.measured == tuple(map(tuple, MEASURED)) and bolts.datum_sizes == (("B", 40.03),)
    assert bolts.requirement is None and studs.measured == () and studs.datum_sizes == ()
    assert s.interfaces == (InterfaceSpec("cover-bolts", "housing-studs", None),)
    p = pattern_of(s, bolts)
    # ASME default for patterns to the same datums: simultaneous (Y14.5-2009 4.19, from memory)
    assert p.requirement == "simultaneous" and p.frame.letters == ("A", "B") and p.count == 4
    assert p.frame.secondary.feature.id == "pilot" and p.frame.secondary.boundary == "MMB"
    assert p.frame.rotation == "free"  # no tertiary: a pilot fixes the centre only (geom.datums docstring)
    assert frame_of(s, ("A", "C")).secondary.feature.id == "boss"


def test_iso_default_requirement_and_threaded_holes():
    text = edit('standard = "asme"', 'standard = "iso"')
    # the housing carries threaded holes with a projected zone: an interface needs the fastener F
    text = edit('id = "stud"\nkind = "pin"\nlimits = [5.9, 6.0]', 'id = "stud"\nkind = "hole"\nlimits = [5.0, 5.2]', text)
    text = edit('value = 0.1\nmaterial = "MMC"\ndatums = ["A", "C"]',
                'value = 0.1\nmaterial = "MMC"\ndatums = ["A", "C"]\nprojected = 10.0', text)
    text = edit('pins = "housing-studs"\n', 'pins = "housing-studs"\nfastener = 6.0\n', text)
    s = loads(text, FILE)
    # ISO: separate zones unless CZ is indicated (ISO 5458:2018, from memory)
    assert pattern_of(s, s.patterns[0]).requirement == "separate"
    assert s.interfaces[0].fastener == 6.0
    assert loads(dumps(s)) == s


BAD = [
    # (scene text, field path, message fragment)
    (edit('letter = "B"', 'letter = "A"'), "datum[0].letter", "datum A is always the plane"),
    (edit('letter = "B"', 'letter = "b"'), "datum[0].letter", "one capital letter"),
    (edit('letter = "C"', 'letter = "B"'), "datum[1].letter", "each datum letter once"),
    (edit('feature = "pilot"\nboundary', 'feature = "pilott"\nboundary'), "datum[0].feature", "did you mean 'pilot'"),
    (edit('feature = "boss"\nboundary', 'feature = "pilot"\nboundary'), "datum[1].feature", "already datum B"),
    (edit('feature = "boss"\nboundary = "MMB"', 'boundary = "MMB"'), "datum[1].boundary", "datum plane"),
    (edit('boundary = "MMB"\n[[datum]]', 'boundary = "MMC"\n[[datum]]'), "datum[0].boundary", "did you mean 'MMB'"),
    (edit('letter = "B"', 'leter = "B"'), "datum[0].leter", "unknown key"),
    (edit('feature = "bolt-hole"', 'feature = "bolt-hol"'), "pattern[0].feature", "did you mean 'bolt-hole'"),
    (edit('feature = "bolt-hole"', 'feature = "pilot"'), "pattern[0].feature", "diameter position tolerance"),
    (edit('datums = ["A", "C"]', 'datums = ["A", "D"]'), "pattern[1].feature", "references D"),
    (edit('feature = "pilot"\nboundary = "MMB"', 'boundary = "RMB"'), "pattern[0].feature", "does not locate"),
    (edit("start = 45.0 }", "start = 45.0 }\nlocations = [[1.0, 2.0]]"), "pattern[0].bolt_circle", "not both"),
    (edit("count = 4,", "count = 0,"), "pattern[0].bolt_circle.count", "from 1 to 360"),
    (edit("count = 4,", "count = 4.5,"), "pattern[0].bolt_circle.count", "whole number"),
    (edit("count = 4,", "count = 361,"), "pattern[0].bolt_circle.count", "from 1 to 360"),
    (edit("diameter = 60.0", "diameter = -60.0"), "pattern[0].bolt_circle.diameter", "> 0"),
    (edit(f"locations = {STUD_LOCS}", 'locations = [[1.0, 0.0], [0.0, 1.0], ["2", 0.0], [0.0, 2.0]]'),
     "pattern[1].locations[2][0]", "expected a number, got the string"),
    (edit(f"locations = {STUD_LOCS}", "locations = [[1.0, 0.0], [0.0, 1.0], [nan, 0.0], [0.0, 2.0]]"),
     "pattern[1].locations[2][0]", "finite"),
    (edit(f"locations = {STUD_LOCS}", "locations = [[1.0, 0.0], [0.0, 1.0], [2.0], [0.0, 2.0]]"),
     "pattern[1].locations[2]", "a basic location [x, y]"),
    (edit(f"locations = {STUD_LOCS}", "locations = [[1.0, 0.0], [0.0, 1e7]]"),
     "pattern[1].locations[1][1]", "magnitude at most"),
    (edit(f"locations = {STUD_LOCS}", "locations = [[1.0, 0.0], [1.0, 0.0]]"),
     "pattern[1].locations[1]", "first at pattern[1].locations[0]"),
    (edit(f"locations = {STUD_LOCS}\n", ""), "pattern[1].locations", "missing"),
    (edit(f"measured = {MEASURED!r}", f"measured = {MEASURED[:3]!r}"), "pattern[0].measured", "one row"),
    (edit(f"measured = {MEASURED!r}", "measured = [[21.22, 21.2, 6.63], [1.0, 2.0], [0, 0, 6.6], [0, 1, 6.6]]"),
     "pattern[0].measured[1]", "[x, y, produced size]"),
    (edit("datum_sizes = { B = 40.03 }", "datum_sizes = { C = 40.03 }"), "pattern[0].datum_sizes.C",
     "a datum feature of size of the frame A|B"),
    (edit("datum_sizes = { B = 40.03 }\n", ""), "pattern[0].datum_sizes", "missing B"),
    (edit("datum_sizes = { B = 40.03 }", 'datum_sizes = { "B\\nC" = 40.03 }'), "pattern[0].datum_sizes",
     "expected datum letters as keys"),
    (edit("datum_sizes = { B = 40.03 }", "datum_sizes = { B = -1.0 }"), "pattern[0].datum_sizes.B", "> 0"),
    (edit("datum_sizes = { B = 40.03 }", 'requirement = "both"'), "pattern[0].requirement", "expected one of"),
    (edit('id = "housing-studs"', 'id = "cover-bolts"'), "pattern[1].id", "unique id among patterns"),
    (edit('id = "cover-bolts"', 'id = "cover=bolts"'), "pattern[0].id", "without '='"),
    (edit('feature = "stud"', 'feature = "stud"\nlocaitons = 3'), "pattern[1].locaitons",
     "unknown key (did you mean 'locations'?)"),
    (GOOD.split("[[pattern]]")[0] + '[pattern]\nid = "p"\nfeature = "bolt-hole"\n', "pattern",
     "expected an array of tables"),
    (edit('holes = "cover-bolts"', 'holes = "cover-bolt"'), "interface[0].holes", "did you mean 'cover-bolts'"),
    (edit('holes = "cover-bolts"\npins = "housing-studs"', 'holes = "housing-studs"\npins = "cover-bolts"'),
     "interface[0].holes", "expected a pattern of holes"),
    (edit('pins = "housing-studs"', 'pins = "cover-bolts"'), "interface[0].pins", "twice"),
    (edit(f"locations = {STUD_LOCS}", f"locations = {STUD_LOCS[:STUD_LOCS.rindex(', [')]}]"),
     "interface[0].pins", "as many members as 'cover-bolts' (4), got 3"),
    (edit(f"locations = {STUD_LOCS}", "bolt_circle = { count = 4, diameter = 60.0 }"),
     "interface[0].pins", "same basic locations"),
    (edit('pins = "housing-studs"', 'pins = "housing-studs"\nfastener = 6.0'), "interface[0].fastener",
     "expected no fastener"),
    (edit('id = "stud"\nkind = "pin"', 'id = "stud"\nkind = "hole"'), "interface[0].fastener", "missing"),
    (edit('pins = "housing-studs"', 'pins = "housing-studs"\nfastner = 6.0'), "interface[0].fastner", "unknown key"),
    (GOOD + '[[interface]]\nholes = "cover-bolts"\npins = "housing-studs"\n', "interface[1]", "given twice"),
]


@pytest.mark.parametrize("text, path, fragment", BAD, ids=[f"{b[1]}-{i}" for i, b in enumerate(BAD)])
def test_bad_tables_name_file_and_field(text, path, fragment):
    with pytest.raises(SceneError) as e:
        loads(text, FILE)
    msg = str(e.value)
    assert msg.startswith(f"{FILE}: {path}: "), msg  # file, then the field path (scenefile's contract)
    assert fragment in msg, msg
    assert "\n" not in msg


def test_bad_table_through_the_command(tmp_path, capsys):
    from matezone.cli import main

    f = tmp_path / "broken.toml"
    f.write_text(BAD[13][0], encoding="utf-8")
    assert main(["analyze", str(f)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and str(f) in err and "pattern[0].bolt_circle.count" in err, err


VARIANTS = {
    "good": GOOD,
    "separate, LMB pilot": edit("datum_sizes = { B = 40.03 }", 'requirement = "separate"\ndatum_sizes = { B = 40.03 }',
                                edit('feature = "pilot"\nboundary = "MMB"', 'feature = "pilot"\nboundary = "LMB"')),
    "RMB datums, no measured": edit("datum_sizes = { B = 40.03 }\n", "",
                                    edit(f"measured = {MEASURED!r}\n", "",
                                         GOOD.replace('boundary = "MMB"', 'boundary = "RMB"'))),
    "plane datum C as tertiary": edit('datums = ["A", "B"]', 'datums = ["A", "B", "C"]',
                                      edit('feature = "boss"\nboundary = "MMB"', 'boundary = "RMB"',
                                           GOOD.split('[[pattern]]\nid = "housing-studs"')[0])),
}


@pytest.mark.parametrize("name", list(VARIANTS))
def test_round_trip_variants(name):
    s = loads(VARIANTS[name], FILE)
    again = loads(dumps(s), FILE)
    assert again == s and again.patterns == s.patterns and again.datums == s.datums
    assert dumps(again) == dumps(s)


@pytest.mark.parametrize("path", SCENES, ids=[p.name for p in SCENES])
def test_existing_scenes_round_trip_unchanged(path):
    s = load(path)
    text = dumps(s)
    assert loads(text) == s
    if not (s.datums or s.patterns or s.interfaces):  # a scene without frames writes none
        assert "[[datum]]" not in text and "[[pattern]]" not in text


coord = st.floats(-1000.0, 1000.0, allow_nan=False, allow_infinity=False)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(locs=st.lists(st.tuples(coord, coord), min_size=1, max_size=6, unique=True),
       requirement=st.sampled_from([None, "simultaneous", "separate"]),
       size=st.floats(6.6, 6.8), with_measured=st.booleans(), datum_size=st.floats(40.0, 40.05))
def test_round_trip_property(locs, requirement, size, with_measured, datum_size):
    text = GOOD.split("[[pattern]]")[0]
    loc_text = "[" + ", ".join(f"[{x!r}, {y!r}]" for x, y in locs) + "]"
    text += f'[[pattern]]\nid = "p"\nfeature = "bolt-hole"\nlocations = {loc_text}\n'
    if requirement:
        text += f'requirement = "{requirement}"\n'
    if with_measured:
        rows = "[" + ", ".join(f"[{x!r}, {y!r}, {size!r}]" for x, y in locs) + "]"
        text += f"measured = {rows}\ndatum_sizes = {{ B = {datum_size!r} }}\n"
    text += f'[[pattern]]\nid = "q"\nfeature = "stud"\nlocations = {loc_text}\n'
    text += '[[interface]]\nholes = "p"\npins = "q"\n'
    s = loads(text, FILE)
    assert s.patterns[0].locations == tuple(locs)
    assert loads(dumps(s), FILE) == s


def test_example_annotated_still_loads():
    s = load(ROOT / "scenes" / "example_annotated.toml")
    assert [f.id for f in s.features] == ["bore", "dowel"] and [f.id for f in s.fasteners] == ["cover-screws",
                                                                                              "cover-studs"]
    assert loads(dumps(s)) == s


def test_example_annotated_documents_the_new_tables():
    """The commented examples in example_annotated.toml are valid tables: uncommented and put
    after the file's features, they load."""
    text = (ROOT / "scenes" / "example_annotated.toml").read_text(encoding="utf-8")
    block = text.split("# >>> frames example\n", 1)[1].split("# <<< frames example", 1)[0]
    lines = [ln[2:] if ln.startswith("# ") else ("" if ln == "#" else ln) for ln in block.splitlines()]
    s = loads("\n".join(lines), "example-frames.toml")
    assert [d.letter for d in s.datums] == ["B", "C"] and [p.id for p in s.patterns] == ["cover-bolts", "housing-studs"]
    assert len(s.patterns[0].locations) == 4 and len(s.interfaces) == 1
    assert s.patterns[0].lower == (0.1, ("A",), "composite")


HOSTILE = ["1e308", "-1e308", "1e-320", "0", "-0.0", "nan", "inf", "1" + "0" * 400, '"x"', "[]", "{}", "true",
           "2026-12-02", '"\\u202e"', '"' + "x" * 300 + '"', "[[1]]", "[[1, 2, 3]]", "{ B = [] }", '{ "" = 1 }',
           "[[1e308, 1e308]]", "[[0, 0], [0, 0]]", "{ count = 1, diameter = 1e-9 }"]
TABLE_LINES = [i for i, ln in enumerate(GOOD.splitlines())
               if " = " in ln and i > GOOD.splitlines().index("[[datum]]")]


@pytest.mark.parametrize("value", HOSTILE)
def test_hostile_values_give_a_scene_error_or_a_scene(value):
    """Every value of the new tables replaced by a hostile one: a SceneError naming the file, or
    a scene that writes back (common practice, no source: scenefile's contract)."""
    lines = GOOD.splitlines()
    for i in TABLE_LINES:
        text = "\n".join(lines[:i] + [f"{lines[i].split(' = ', 1)[0]} = {value}"] + lines[i + 1:]) + "\n"
        try:
            s = loads(text, FILE)
        except SceneError as e:
            assert str(e).startswith(f"{FILE}: ") and "\n" not in str(e), str(e)
        else:
            assert loads(dumps(s), FILE) == s
