"""Every case of the bad-input corpus: one clear line on stderr (or accepted), right exit code, no traceback,
inputs unchanged (sha256 before and after)."""

from __future__ import annotations

import re

import pytest
from typer.testing import CliRunner

from assaycut.cli import app
from assaycut.errors import AssaycutError
from tests.corpus import CASES
from tests.helpers import sha256

runner = CliRunner()


def test_corpus_is_large_enough_and_the_readme_counts_it():
    from pathlib import Path

    assert len(CASES) >= 40
    readme = (Path(__file__).resolve().parents[2] / "README.md").read_text(encoding="utf-8")
    assert f"{len(CASES)}-case bad-input corpus" in readme


@pytest.mark.parametrize("name,build,expect", CASES, ids=[c[0] for c in CASES])
def test_corpus_case(tmp_path, monkeypatch, name, build, expect):
    monkeypatch.chdir(tmp_path)
    args, inputs = build(tmp_path)
    before = {str(p): sha256(p) for p in inputs}
    r = runner.invoke(app, args)
    out = r.stdout + r.stderr
    assert "Traceback" not in out
    if expect is None:
        assert r.exit_code == 0, (r.exit_code, r.stderr)
    else:
        assert r.exit_code == 2, (r.exit_code, r.stdout, r.stderr)
        lines = [x for x in r.stderr.splitlines() if x.strip()]
        assert len(lines) == 1, r.stderr
        assert lines[0].startswith("assaycut: error: ")
        assert re.search(expect, lines[0]), lines[0]
    assert {str(p): sha256(p) for p in inputs} == before


def _outcome(path):
    import pickle

    from assaycut.io import load_assay
    try:
        return "ok", pickle.dumps(load_assay(str(path)))
    except AssaycutError as e:
        return "refused", str(e)


def test_a_workbook_reads_the_same_whatever_was_read_before(tmp_path):
    """The reader keeps no state between files: every .xlsx of the corpus gives the same assay or the same
    refusal read in corpus order and in reverse order (a reader that remembered stylesheets once read a file
    differently after another with the same stylesheet)."""
    paths = []
    for name, build, _ in CASES:
        d = tmp_path / name
        d.mkdir()
        _, files = build(d)
        paths += [p for p in files if str(p).endswith(".xlsx")]
    assert len(paths) > 40
    forward = [_outcome(p) for p in paths]
    backward = [_outcome(p) for p in reversed(paths)][::-1]
    assert forward == backward
