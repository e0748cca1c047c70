"""Option values converted without pydantic where the conversion is plain.

Typer (0.29) converts every value typed on the command line through a
pydantic ``TypeAdapter``: importing pydantic and building an adapter per option
costs about 70 ms of every command.  The values sawplan's commands take are
plain — text, flags, whole and decimal numbers, ``--units`` and paths — so this
layer converts those itself, as typer would; anything else, and every value
that does not convert cleanly, goes to typer's own conversion.  So the help is
typer's, and every error message is typer's, word for word
(``tests/test_cli_coercion.py`` compares both ways on every option of every
command).

``install()`` hooks typer's ``build_runtime_param``; with a typer whose
internals differ it does nothing, and commands are only slower.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field
from enum import Enum
from pathlib import Path
from typing import Any

_WHOLE = re.compile(r"-?[1-9][0-9]{0,17}|0")
_DECIMAL = re.compile(r"-?[0-9]{1,20}(\.[0-9]{1,20})?")

Convert = Callable[[Any, Any, Any], Any]  # (value, typer's parameter, click context) -> value


class Declined(Exception):
    """The value is not one this layer converts: typer's own conversion takes it."""


def install() -> bool:
    """Put the plain conversions in front of typer's; True when they are in place."""
    try:
        from typer import _coercion, core
    except ImportError:  # pragma: no cover - another typer
        return False
    original = getattr(_coercion, "build_runtime_param", None)
    base = getattr(_coercion, "RuntimeParam", None)
    if original is None or base is None or not hasattr(core, "build_runtime_param"):
        return False  # pragma: no cover - another typer
    if getattr(core.build_runtime_param, "sawplan_plain", False):
        return True
    plain_param = _plain_param_class(base, original)

    def build(descriptor: Any) -> Any:
        convert = plain_conversion(descriptor)
        if convert is None:
            return original(descriptor)
        return plain_param(
            annotation=descriptor.annotation,
            parameter_info=descriptor.parameter_info,
            descriptor=descriptor,
            convert=convert,
        )

    build.sawplan_plain = True  # type: ignore[attr-defined]
    core.build_runtime_param = build
    return True


def _plain_param_class(base: type, original: Callable[[Any], Any]) -> type:
    @dataclass(frozen=True)
    class PlainParam(base):  # type: ignore[misc, valid-type]
        """Converts plain values itself; hands the rest to typer's conversion."""

        descriptor: Any = None
        convert: Convert | None = None
        _typer: list = field(default_factory=list, compare=False, repr=False)

        def _coerce_value(self, value: Any, param: Any, ctx: Any) -> Any:
            try:
                return self.convert(value, param, ctx)
            except Declined:
                pass
            if not self._typer:
                self._typer.append(original(self.descriptor))
            return self._typer[0]._coerce_value(value, param=param, ctx=ctx)

    return PlainParam


def plain_conversion(descriptor: Any) -> Convert | None:
    """This layer's conversion for an option's type, or None to leave it all to typer."""
    from typing import get_args, get_origin

    info = descriptor.parameter_info
    if info.parser is not None or descriptor.file_annotation is not None:
        return None
    annotation = descriptor.annotation
    if get_origin(annotation) is list:
        (item,) = get_args(annotation)
        if item is not str:
            return None
        return _text_list
    if isinstance(annotation, type) and issubclass(annotation, Enum):
        return _choice(tuple(annotation), info.case_sensitive)
    if annotation is str:
        return lambda value, param, ctx: _text(value)
    if annotation is bool:
        return _flag
    if annotation is int and info.min is None and info.max is None:
        return _number(int, _WHOLE)
    if annotation is float and info.min is None and info.max is None:
        return _number(float, _DECIMAL)
    if isinstance(annotation, type) and issubclass(annotation, Path) and info.path_type is None:
        return _path(annotation, info)
    return None


def _text(value: Any) -> str:
    if type(value) is not str:
        raise Declined
    try:
        value.encode("utf-8")  # typer refuses text that is not valid Unicode: let it say so
    except UnicodeEncodeError:
        raise Declined from None
    return value


def _text_list(value: Any, param: Any, ctx: Any) -> list[str]:
    items = value if isinstance(value, list | tuple) else [value]
    return [_text(item) for item in items]


def _flag(value: Any, param: Any, ctx: Any) -> bool:
    if type(value) is not bool:
        raise Declined
    return value


def _number(kind: type, written: re.Pattern[str]) -> Convert:
    """A number already of its type, or typed as plain digits (anything else: typer)."""

    def convert(value: Any, param: Any, ctx: Any) -> Any:
        if type(value) is kind:
            return value
        if type(value) is str and written.fullmatch(value):
            return kind(value)
        raise Declined

    return convert


def _choice(choices: tuple[Any, ...], case_sensitive: bool) -> Convert:
    def convert(value: Any, param: Any, ctx: Any) -> Any:
        from typer._param_types import coerce_cli_choice

        if not isinstance(value, Enum):
            _text(value)
        try:
            return coerce_cli_choice(value, choices=choices, case_sensitive=case_sensitive, ctx=ctx)
        except ValueError:
            raise Declined from None  # typer words the refusal

    return convert


def _path(path_type: type, info: Any) -> Convert:
    def convert(value: Any, param: Any, ctx: Any) -> Any:
        from typer._param_types import coerce_cli_path

        if not isinstance(value, path_type):
            value = path_type(_text(value))
        try:
            return coerce_cli_path(value, info, path_type=path_type, param=param, ctx=ctx)
        except Exception:
            raise Declined from None  # typer words the refusal

    return convert
