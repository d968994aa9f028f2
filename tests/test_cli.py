"""``infoscope demo`` prints the demo profile's tables and the cautions."""
from __future__ import annotations

import io
import subprocess
import sys

import pytest

from infoscope.cli import CAUTION, build_parser, cmd_demo, main
from infoscope.datasets import PLANTED

SMALL = ["demo", "--rows", "4000", "--batch-rows", "2000"]


@pytest.fixture(scope="module")
def demo_output():
    out = io.StringIO()
    assert cmd_demo(build_parser().parse_args(SMALL), out=out) == 0
    return out.getvalue()


def test_demo_prints_every_table(demo_output):
    for heading in ("== entropy per column", "== top 10 pairs", "== relevance to 'late'",
                    "== drift of a later batch"):
        assert heading in demo_output
    assert demo_output.count(CAUTION) == 2  # at the top and at the end


def test_demo_shows_what_was_planted(demo_output):
    lines = demo_output.splitlines()
    top_pairs = lines[lines.index(next(x for x in lines if x.startswith("== top"))) + 2]
    assert all(name in top_pairs for name in PLANTED["near_duplicates"])
    relevance = demo_output.split("== relevance")[1].split("== drift")[0].splitlines()
    leak_line = next(x for x in relevance if x.strip().startswith(PLANTED["leak"]))
    assert leak_line.rstrip().endswith("True")
    drift = demo_output.split("== drift")[1].splitlines()
    for column, flag in PLANTED["drift"].items():
        assert next(x for x in drift if x.strip().startswith(column + " ")).rstrip().endswith(flag)
    assert "- column 'parcel_ref'" in demo_output  # the notes list the data warnings


def test_main_without_command_prints_help(capsys):
    assert main([]) == 2
    assert "demo" in capsys.readouterr().out


@pytest.mark.parametrize(("option", "match"), [(["--rows", "0"], "--rows must be >= 1, got 0"),
                                               (["--seed", "-1"], "--seed must be >= 0, got -1")])
def test_bad_option_is_one_clear_line(capsys, option, match):
    assert main(["demo", *option]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert err == [f"infoscope demo: {match}"]


def test_python_dash_m_runs_the_demo():
    result = subprocess.run([sys.executable, "-m", "infoscope", *SMALL],
                            capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr
    assert "== drift of a later batch" in result.stdout
    assert "Traceback" not in result.stderr
