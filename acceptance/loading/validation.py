"""Field validation of one file against its model, every problem with its location."""

from __future__ import annotations

import difflib
import types
import typing
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ValidationError

from ..errors import InputError, Problem
from ..text import visible
from ..yamlfile import Document, load_yaml
from .loaded import _suggest, confine


def _unwrap(annotation: Any) -> Any:
    origin = typing.get_origin(annotation)
    if origin is typing.Annotated:
        return _unwrap(typing.get_args(annotation)[0])
    if origin in (typing.Union, types.UnionType):
        options = [a for a in typing.get_args(annotation) if a is not type(None)]
        return _unwrap(options[0]) if len(options) == 1 else annotation
    return annotation


def _fields_at(model: type[BaseModel], loc: tuple[Any, ...]) -> list[str]:
    """Names of the fields allowed in the mapping at ``loc`` (for 'did you mean')."""
    current: Any = model
    for part in loc:
        current = _unwrap(current)
        if isinstance(current, type) and issubclass(current, BaseModel):
            info = current.model_fields.get(str(part))
            if info is None:
                return []
            current = info.annotation
        elif typing.get_origin(current) in (list, tuple) and isinstance(part, int):
            current = typing.get_args(current)[0]
        elif typing.get_origin(current) is dict:
            current = typing.get_args(current)[1]
        else:
            return []
    current = _unwrap(current)
    if isinstance(current, type) and issubclass(current, BaseModel):
        return list(current.model_fields)
    return []


# Pydantic's type errors in the words of the file: what was expected, what was written.
_TYPE_WORDS = {
    "string_type": "text", "model_type": "a mapping of fields", "dict_type": "a mapping",
    "list_type": "a list", "int_type": "a whole number", "int_parsing": "a whole number",
    "int_from_float": "a whole number", "float_type": "a number", "float_parsing": "a number",
    "bool_type": "true or false", "bool_parsing": "true or false",
}
_BOUND_WORDS = {"greater_than": "greater than", "greater_than_equal": "at least",
                "less_than": "less than", "less_than_equal": "at most"}


def _got(value: Any) -> str:
    if value is None:
        return "nothing (the value is empty)"
    if isinstance(value, bool):
        return str(value).lower()
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, int | float):
        return f"the number {value!r}"
    text = str(value)
    return repr(text if len(text) <= 60 else text[:57] + "...")


def _validate(model: type[BaseModel], document: Document, problems: list[Problem]) -> Any:
    data = document.data
    if not isinstance(data, dict):
        fields = ", ".join(list(model.model_fields)[:4])
        if data is None:
            message = f"the file is empty; write its fields ({fields}, …)"
        else:
            message = (f"the file holds {_got(data)}; it must hold a mapping of fields "
                       f"({fields}, …), one 'name: value' per line")
        problems.append(document.problem((), message))
        return None
    try:
        return model.model_validate(data)
    except ValidationError as error:
        for detail in error.errors(include_url=False):
            loc = tuple(detail["loc"])
            kind = detail["type"]
            if kind == "extra_forbidden":
                name = str(loc[-1])
                known = _fields_at(model, loc[:-1])
                message = f"unknown field '{name}'{_suggest(name, known)}"
            elif kind == "missing":
                message = f"required field '{loc[-1]}' is missing; add it"
                loc = loc  # the parent mapping is located by Document.where
            elif kind in ("value_error", "assertion_error"):
                message = str(detail.get("ctx", {}).get("error", detail["msg"]))
            elif kind == "too_short":
                wanted = detail.get("ctx", {}).get("min_length", 1)
                message = (f"needs at least {wanted} entr{'y' if wanted == 1 else 'ies'}; "
                           f"for example {loc[-1]}: [R. Name]" if loc and loc[-1] ==
                           "performed_by" else
                           f"needs at least {wanted} entr{'y' if wanted == 1 else 'ies'}")
            elif kind == "too_long" and isinstance(detail.get("input"), list):
                limit = detail.get("ctx", {}).get("max_length")
                message = (f"{len(detail['input'])} entries; the limit is {limit}: keep the "
                           "list to what the record needs (README, Limits)")
            elif kind in ("literal_error", "enum"):
                expected = detail.get("ctx", {}).get("expected", "")
                message = f"{detail['input']!r} is not allowed; use one of {expected}"
                options = [o.strip("'") for o in expected.replace(" or ", ", ").split(", ")]
                close = difflib.get_close_matches(str(detail["input"]), options, n=1,
                                                  cutoff=0.6)
                if not close:
                    close = [o for o in options
                             if o.lower() == str(detail["input"]).lower()][:1]
                if close and close[0] != str(detail["input"]):
                    message += f"; did you mean '{close[0]}'?"
            elif kind == "string_too_long":
                wanted = detail.get("ctx", {}).get("max_length", "")
                message = (f"{_got(detail['input'])} is longer than {wanted} characters; "
                           "shorten it")
            elif kind == "string_pattern_mismatch" and loc and loc[-1] == "category":
                message = (f"{detail['input']!r} is not a measurement category; write it as "
                           f"'CAT III 600 V' (IEC 61010-1)")
            elif kind == "string_pattern_mismatch":
                message = (f"{detail['input']!r} is not a valid id; use lower-case letters, "
                           f"digits, '-' and '_'")
            elif kind in _TYPE_WORDS:
                message = f"expected {_TYPE_WORDS[kind]}, got {_got(detail.get('input'))}"
                if kind in ("model_type", "dict_type"):
                    allowed = _fields_at(model, loc)
                    if allowed:
                        message += f"; write its fields ({', '.join(allowed[:4])}, …)"
                elif kind == "string_type" and isinstance(detail.get("input"), int | float):
                    message += f"; quote it if it is meant as text: '{detail['input']}'"
            elif kind in _BOUND_WORDS:
                bound = next(iter(detail.get("ctx", {}).values()), "")
                message = f"must be {_BOUND_WORDS[kind]} {bound}, got {_got(detail['input'])}"
            else:
                message = detail["msg"][:1].lower() + detail["msg"][1:]
                if "input" in detail and not isinstance(detail["input"], dict | list):
                    message += f" (got {detail['input']!r})"
            problems.append(document.problem(loc, message))
        return None


def _load_document(path: Path, root: Path, problems: list[Problem],
                   bound_name: str = "job folder") -> Document | None:
    """Read one YAML file under ``root``, confined to it (see :func:`confine`)."""
    confined = confine(path, root, bound_name)
    if confined.reason is not None:
        problems.append(Problem(_display(path, root), 1, 1, "", confined.reason))
        return None
    try:
        return load_yaml(path, display_name=_display(path, root))
    except InputError as error:
        problems.extend(error.problems)
        return None


def _display(path: Path, root: Path) -> str:
    """How a message names ``path``: from the job folder's name, invisible characters
    spelt out (a direction override in a file name would turn the message around)."""
    try:
        return visible(str(path.relative_to(root.parent if root.parent != root else root)))
    except ValueError:
        return visible(str(path))
