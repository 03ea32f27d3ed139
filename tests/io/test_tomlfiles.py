"""The bounded TOML reader of cut, limit and price files: the pre-parse scan refuses what would make Python's
TOML reader slow (long dotted keys, deep nesting), and lets through what a real file holds: dots, brackets
and quotes inside strings and comments (TOML 1.0 specification, toml.io: strings and comments are not keys).
The names below are invented inputs."""

from __future__ import annotations

import tomllib

import pytest

from assaycut.errors import InputError
from assaycut.io.tomlfiles import TOML_MAX_KEY_PARTS, read_cut_set, read_limits

TRICKY = '''# a comment with a.b.c.d.e.f.g.h.i.j.k.l.m.n.o.p.q.r.s and [[[[ {{{{
[[cut]]
name = "v.g.o. a.b.c.d.e.f.g.h.i.j.k.l.m.n.o.p.q.r [[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[["
end_c = 177.5
[[cut]]
name = 'lit.a.b.c.d.e.f.g.h.i.j.k.l.m.n.o.p.q.r.s # not a comment'
end_c = 343
[[cut]]
name = """multi-line form "quoted" a.b.c.d.e.f.g.h.i.j.k.l.m.n.o.p.q.r.s ]]]]]]]] x"""
'''


def test_strings_and_comments_do_not_count_as_keys(tmp_path):
    p = tmp_path / "cuts.toml"
    p.write_text(TRICKY)
    cs = read_cut_set(str(p))
    assert [c.end_c for c in cs.cuts] == [177.5, 343.0, None]
    assert cs.cuts[1].name.endswith("# not a comment")


@pytest.mark.parametrize("parts", [TOML_MAX_KEY_PARTS, TOML_MAX_KEY_PARTS + 1])
def test_the_key_bound_is_exact(tmp_path, parts):
    # a limits file read by tomllib itself, then by our reader: the bound falls between 16 and 17 parts
    text = "[[limit]]\ncut = \"diesel\"\nproperty = \"sg\"\nmax = 0.85\n" + ".".join(["x"] * parts) + " = 1\n"
    tomllib.loads(text)  # valid TOML either way
    p = tmp_path / "limits.toml"
    p.write_text(text)
    with pytest.raises(InputError) as err:
        read_limits(str(p))
    if parts <= TOML_MAX_KEY_PARTS:  # past the scan: refused by the limits reader for its unknown key
        assert "unknown key 'x'" in str(err.value)
    else:
        assert "a dotted key of more than 16 parts" in str(err.value)


def test_the_scan_stops_at_an_unterminated_string(tmp_path):
    # what follows an unterminated string is never parsed: tomllib refuses the text at line 1, so the long
    # key after it is not what the message names
    text = 'a = "open\n' + "b" + ".b" * 40 + " = 1\n"
    with pytest.raises(tomllib.TOMLDecodeError, match="line 1"):
        tomllib.loads(text)
    p = tmp_path / "cuts.toml"
    p.write_text(text)
    with pytest.raises(InputError, match=r"not valid TOML: .*line 1"):
        read_cut_set(str(p))
