"""YAML read by our rules, not YAML 1.1's: no surprises from `no`, `1e-3`, dates or repeats.

The YAML 1.1 behaviours guarded against are those of the YAML 1.1 type repository
(yaml.org/type/bool, /float, /timestamp) [S]; the YAML 1.2 core schema (YAML 1.2.2,
10.3.2) reads `1e-3` as a float [S].
"""

from __future__ import annotations

from pathlib import Path

import pytest

from acceptance.errors import InputError
from acceptance.yamlfile import load_yaml


def load(tmp_path: Path, content: str | bytes):
    path = tmp_path / "file.yaml"
    if isinstance(content, bytes):
        path.write_bytes(content)
    else:
        path.write_text(content, encoding="utf-8")
    return load_yaml(path, display_name="file.yaml")


def problems(tmp_path: Path, content: str | bytes) -> list[str]:
    with pytest.raises(InputError) as caught:
        load(tmp_path, content)
    return [str(p) for p in caught.value.problems]


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("no", "no"),  # YAML 1.1 bool, kept as written
        ("yes", "yes"),
        ("on", "on"),
        ("off", "off"),
        ("y", "y"),
        ("NO", "NO"),  # the Norway problem: a country code, not false
        ("1e-3", 0.001),  # a float in YAML 1.2; YAML 1.1 needs a '.'
        ("2.5", 2.5),
        ("-40", -40),
        ("2026-03-10", "2026-03-10"),  # not a date object: the field that wants one parses it
        ("2026-03-10 14:30:00", "2026-03-10 14:30:00"),
        ("12:30", "12:30"),  # YAML 1.1 sexagesimal 750
        ("0x1F", "0x1F"),
        ("1_000", "1_000"),
        ("true", True),
        ("false", False),
        ("~", None),
        ("null", None),
        ("'no'", "no"),
        ('"1e-3"', "1e-3"),
        ("230 V", "230 V"),
    ],
)
def test_scalars_follow_our_rules(tmp_path, text, expected):
    value = load(tmp_path, f"value: {text}\n").data["value"]
    assert value == expected
    assert type(value) is type(expected)


def test_empty_value_is_none(tmp_path):
    assert load(tmp_path, "value:\n").data == {"value": None}


def test_duplicate_key_names_both_lines(tmp_path):
    assert problems(tmp_path, "title: one\nnotes: x\ntitle: two\n") == [
        "file.yaml:3:1: title: duplicate key 'title' (first given on line 1); keep one of them"
    ]


def test_every_duplicate_is_reported(tmp_path):
    text = "site:\n  name: a\n  name: b\nsite2: 1\nsite2: 2\n"
    assert problems(tmp_path, text) == [
        "file.yaml:3:3: site.name: duplicate key 'name' (first given on line 2); keep one of them",
        "file.yaml:5:1: site2: duplicate key 'site2' (first given on line 4); keep one of them",
    ]


def test_alias_is_refused(tmp_path):
    text = "a: &limit 50 V\nb: *limit\n"
    assert problems(tmp_path, text) == [
        "file.yaml:2:4: not valid YAML: aliases ('*name') are not supported in job files; "
        "repeat the value instead"
    ]


def test_merge_key_is_refused(tmp_path):
    text = "a: {x: 1}\nb:\n  <<: {x: 1}\n  y: 2\n"
    assert problems(tmp_path, text) == [
        "file.yaml:3:3: b: merge keys ('<<') are not supported; write the fields out"
    ]


def test_tag_is_refused(tmp_path):
    assert problems(tmp_path, "a: !!python/name:os.system x\n") == [
        "file.yaml:1:4: a: YAML tag 'tag:yaml.org,2002:python/name:os.system' is not allowed; "
        "write a plain value"
    ]


def test_tab_indentation(tmp_path):
    assert problems(tmp_path, "site:\n\tname: a\n") == [
        "file.yaml:2:1: a tab is used for indentation; indent with spaces"
    ]


def test_byte_order_mark_is_accepted(tmp_path):
    document = load(tmp_path, b"\xef\xbb\xbftitle: Hall 3\n")
    assert document.data == {"title": "Hall 3"}
    assert document.where(("title",)) == (1, 1)


def test_non_utf8_bytes_give_line_and_column(tmp_path):
    # 0xE9 is 'é' in Latin-1 and cannot start a UTF-8 sequence here (RFC 3629, 3) [S].
    assert problems(tmp_path, b"title: ok\nsite: Caf\xe9 hall\n") == [
        "file.yaml:2:10: byte 0xe9 is not valid UTF-8; save the file as UTF-8"
    ]


@pytest.mark.parametrize("text", [".nan", ".inf", "-.inf"])
def test_not_finite_numbers_are_refused(tmp_path, text):
    assert problems(tmp_path, f"value: {text}\n") == [
        f"file.yaml:1:8: value: '{text}' is not a finite number; write the measured value"
    ]


def test_syntax_error_has_a_location(tmp_path):
    (message,) = problems(tmp_path, "a: [1, 2\nb: 3\n")
    assert message.startswith("file.yaml:")
    assert "not valid YAML" in message


def test_locations_of_nested_keys(tmp_path):
    document = load(tmp_path, "machine:\n  nameplate:\n    phases: 3\n  items:\n    - a\n    - b\n")
    assert document.where(("machine", "nameplate", "phases")) == (3, 5)
    assert document.where(("machine", "items", 1)) == (6, 7)
    # A path that is not in the file falls back to its nearest located parent.
    assert document.where(("machine", "nameplate", "missing")) == (2, 3)


def test_oversized_file_is_refused(tmp_path):
    path = tmp_path / "big.yaml"
    path.write_text("a: 1\n" * 10, encoding="utf-8")
    with pytest.raises(InputError) as caught:
        load_yaml(path, display_name="big.yaml", max_bytes=20)
    assert str(caught.value) == (
        "big.yaml:1:1: file is 50 bytes; the limit is 20 bytes for a YAML file: split it (one "
        "file per visit) and keep bulk data in captures")
