"""How the command line reads CSV files: delimiter, stray fields, encoding, and
options that are refused before any work is done.

Each case runs the real ``infoscope`` command in a subprocess (exit status,
stdout, stderr) and checks the columns the reader made against pandas' own
reading of the same file with the right options spelled out (``pandas.read_csv``
with ``index_col=False``, ``sep``, ``decimal``, ``encoding``: the reference).
"""
from __future__ import annotations

import gzip
import os
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest

from infoscope.reading import SNIFF_BYTES, ReadError, read_table, sniff_csv

SRC = str(Path(__file__).resolve().parents[1] / "src")


def run(*args, cwd=None):
    env = {**os.environ, "PYTHONPATH": SRC + os.pathsep + os.environ.get("PYTHONPATH", "")}
    result = subprocess.run([sys.executable, "-m", "infoscope", *map(str, args)], capture_output=True,
                            text=True, timeout=180, env=env, cwd=cwd)
    assert "Traceback" not in result.stderr, result.stderr
    return result


def one_line_error(result, *needles):
    assert result.returncode == 2, (result.returncode, result.stdout, result.stderr)
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    for needle in needles:
        assert needle in lines[0], lines[0]
    return lines[0]


CHURN = "id,city,churned\n" + "".join(f"{i},{c},{i % 2}\n" for i, c in
                                       zip(range(1, 41), ["Oslo", "Rome", "Lima", "Nairobi"] * 10))


def entropy_rows(stdout: str) -> dict:
    """column -> (kind, k) from the printed entropy table."""
    block = stdout.split("== entropy per column")[1].split("\n==")[0].splitlines()[2:]
    rows = {}
    for line in block:
        parts = line.split()
        if len(parts) >= 3:
            rows[parts[0]] = (parts[1], parts[2])
    return rows


# ------------------------------------------------------------------ stray fields
def test_trailing_comma_on_every_data_row_keeps_the_columns_in_place(tmp_path):
    lines = CHURN.splitlines()
    path = tmp_path / "trailing.csv"
    path.write_text("\n".join([lines[0]] + [x + "," for x in lines[1:]]) + "\n")
    result = run("profile", path, "--target", "churned")
    assert result.returncode == 0, result.stderr
    assert "a trailing ','" in result.stdout and "empty fields dropped" in result.stdout
    rows = entropy_rows(result.stdout)
    # without the fix: 'id' held the city names (text) and 'churned' was 100% missing
    assert rows["id"][0] != "text" and rows["city"] == ("text", "4") and rows["churned"][1] == "2"
    reference = pd.read_csv(path, index_col=False)  # pandas' documented switch for this file
    pd.testing.assert_frame_equal(read_table(path), reference, check_like=False)
    assert "relevance to 'churned'" in result.stdout


def test_trailing_comma_on_some_rows_only(tmp_path):
    path = tmp_path / "some.csv"
    path.write_text("a,b\n1,x,\n2,y\n3,z,\n4,w\n")
    frame = read_table(path)
    assert list(frame.columns) == ["a", "b"] and frame["a"].tolist() == [1, 2, 3, 4]
    assert any("trailing ','" in n and "2 of the first 4 lines" in n for n in frame.attrs["read_notes"])


def test_first_data_row_with_an_extra_field_is_said_and_dropped(tmp_path):
    lines = CHURN.splitlines()
    path = tmp_path / "first.csv"
    path.write_text("\n".join([lines[0], lines[1] + ",stray"] + lines[2:]) + "\n")
    result = run("profile", path)
    assert result.returncode == 0, result.stderr
    assert "the first data line has 4 fields, the header 3" in result.stdout
    assert "'stray' dropped" in result.stdout
    rows = entropy_rows(result.stdout)
    assert rows["city"] == ("text", "4") and rows["churned"][1] == "2"
    with pytest.warns(pd.errors.ParserWarning):  # pandas drops the field too, with a notice
        reference = pd.read_csv(path, index_col=False)
    pd.testing.assert_frame_equal(read_table(path), reference)


def test_extra_fields_with_values_on_many_rows_are_kept_as_their_own_column(tmp_path):
    path = tmp_path / "short_header.csv"
    path.write_text("a,b\n1,x,10\n2,y,20\n3,z\n")
    frame = read_table(path)
    assert list(frame.columns) == ["a", "b", "(unnamed field 3)"]
    assert frame["a"].tolist() == [1, 2, 3] and frame["(unnamed field 3)"].tolist()[:2] == [10, 20]
    assert any("2 line(s) have more fields than the header's 2" in n for n in frame.attrs["read_notes"])


def test_a_later_line_with_more_fields_is_one_clear_error(tmp_path):
    path = tmp_path / "ragged.csv"
    # the first lines (SNIFF_BYTES) decide the width; a longer line after them is refused
    n = SNIFF_BYTES // 4 + 10
    path.write_text("a,b\n" + "1,2\n" * n + "3,4,5\n")
    one_line_error(run("profile", path), "ragged.csv", f"line {n + 2}", "more fields")


# ------------------------------------------------------------------ delimiters
def test_semicolon_file_is_sniffed_and_said(tmp_path):
    path = tmp_path / "data.csv"
    path.write_text(CHURN.replace(",", ";"))
    result = run("profile", path, "--target", "churned")
    assert result.returncode == 0, result.stderr
    assert "delimiter ';' (sniffed from the first lines; --sep sets it)" in result.stdout
    # without the fix: one column 'id;city;churned', flagged ID-like
    assert set(entropy_rows(result.stdout)) == {"id", "city", "churned"}


@pytest.mark.parametrize(("sep", "name"), [(";", "';'"), ("\t", "tab"), ("|", "'|'"), (",", "','")])
def test_delimiter_is_sniffed(tmp_path, sep, name):
    path = tmp_path / "data.csv"
    path.write_text(CHURN.replace(",", sep))
    frame = read_table(path)
    assert f"delimiter {name} (sniffed from the first lines" in frame.attrs["read_notes"][0]
    pd.testing.assert_frame_equal(frame, pd.read_csv(path, sep=sep, index_col=False))


def test_semicolon_file_with_decimal_commas(tmp_path):
    path = tmp_path / "eu.csv"
    path.write_text("name;price;n\nA;2,5;1\nB;3,75;2\nC;10,0;3\n")
    frame = read_table(path)
    reference = pd.read_csv(path, sep=";", decimal=",", index_col=False)
    pd.testing.assert_frame_equal(frame, reference)
    assert frame["price"].tolist() == [2.5, 3.75, 10.0]
    assert any("decimal comma" in n for n in frame.attrs["read_notes"])


def test_sniffer_leaves_a_comma_file_with_semicolons_in_its_text(tmp_path):
    path = tmp_path / "notes.csv"
    path.write_text('id,note\n1,"a; b"\n2,c; d\n3,e\n')
    frame = read_table(path)
    assert list(frame.columns) == ["id", "note"] and frame["note"].tolist() == ["a; b", "c; d", "e"]


def test_sep_option_overrides_the_sniffer(tmp_path):
    path = tmp_path / "odd.csv"
    path.write_text("a:b\n1:2\n3:4\n")
    result = run("profile", path, "--sep", ":")
    assert result.returncode == 0, result.stderr
    assert "delimiter ':' (--sep)" in result.stdout
    assert set(entropy_rows(result.stdout)) == {"a", "b"}
    with pytest.raises(ReadError, match="--sep must be one character"):
        read_table(path, sep="ab")
    assert list(read_table(tmp_path / "odd.csv", sep="tab").columns) == ["a:b"]


def test_tsv_and_gzip_files(tmp_path):
    tsv = tmp_path / "data.tsv"
    tsv.write_text(CHURN.replace(",", "\t"))
    assert list(read_table(tsv).columns) == ["id", "city", "churned"]
    assert "tab (a .tsv file)" in read_table(tsv).attrs["read_notes"][0]
    gz = tmp_path / "data.csv.gz"
    with gzip.open(gz, "wt") as handle:
        handle.write(CHURN.replace(",", ";"))
    pd.testing.assert_frame_equal(read_table(gz), pd.read_csv(gz, sep=";", index_col=False))


def test_single_column_file_stays_one_column(tmp_path):
    path = tmp_path / "one.csv"
    path.write_text("x\n1\n2\n3\n")
    frame = read_table(path)
    assert list(frame.columns) == ["x"] and "the default" in frame.attrs["read_notes"][0]


def test_sniff_csv_counts_fields_with_the_csv_module():
    # csv.reader: a quoted field holds the delimiter and a line break (RFC 4180)
    info = sniff_csv('a,b\n"x,\ny",1\n2,3,\n', sep=",")
    assert info["header"] == ["a", "b"] and info["width"] == 3
    assert info["rows"] == [(3, ["x,\ny", "1"]), (4, ["2", "3", ""])]
    # a cut last line is left out when the text is only the start of the file
    assert sniff_csv("a,b\n1,2\n3,4,5,6", complete=False)["width"] == 2


# ------------------------------------------------------------------ encodings
def test_encoding_option(tmp_path):
    path = tmp_path / "latin.csv"
    path.write_bytes("ville,n\nSète,1\nAgen,2\nSète,3\n".encode("latin-1"))
    one_line_error(run("profile", path), "not valid in it", "--encoding")
    result = run("profile", path, "--encoding", "latin-1")
    assert result.returncode == 0, result.stderr
    assert "encoding latin-1 (--encoding)" in result.stdout
    assert read_table(path, encoding="latin-1")["ville"].tolist() == ["Sète", "Agen", "Sète"]
    with pytest.raises(ReadError, match="--encoding 'no-such-codec' is not an encoding"):
        read_table(path, encoding="no-such-codec")


def test_utf8_byte_order_mark_is_not_part_of_the_first_name(tmp_path):
    path = tmp_path / "bom.csv"
    path.write_bytes("\ufeffa;b\n1;2\n3;4\n".encode("utf-8"))
    assert list(read_table(path).columns) == ["a", "b"]


def test_parquet_refuses_text_options(tmp_path):
    import pyarrow  # noqa: F401  (the test extra installs it)
    path = tmp_path / "t.parquet"
    pd.DataFrame({"a": [1, 2]}).to_parquet(path)
    with pytest.raises(ReadError, match="--sep and --encoding apply to text files"):
        read_table(path, sep=";")


# ------------------------------------------------------------------ options checked first
@pytest.mark.parametrize("out", ["/proc/p.html", "no-such-folder/p.html"])
def test_unwritable_out_fails_before_the_work(tmp_path, out):
    path = tmp_path / "data.csv"
    path.write_text(CHURN)
    result = run("profile", path, "--out", out, cwd=tmp_path)
    one_line_error(result, "--out")
    assert result.stdout == ""  # nothing was profiled or printed
    assert not (tmp_path / "p.html").exists()


def test_writable_out_probe_leaves_no_file_behind_on_a_later_error(tmp_path):
    path = tmp_path / "data.csv"
    path.write_text(CHURN)
    result = run("profile", path, "--out", tmp_path / "p.html", "--target", "nope")
    one_line_error(result, "--target 'nope'")
    assert not (tmp_path / "p.html").exists()


def test_negative_seed_is_one_line_before_the_header(tmp_path):
    # it was exit 1 with numpy's traceback, after the header had been printed
    path = tmp_path / "data.csv"
    path.write_text(CHURN)
    result = run("profile", path, "--seed", "-1")
    one_line_error(result, "seed=-1 must be an integer >= 0")
    assert result.stdout == ""
