"""A quicker ``__init__`` for frozen dataclasses made on hot paths.

A frozen dataclass's generated ``__init__`` sets each field through ``object.__setattr__``
(a call per field); a statement result has twenty fields and every statement makes one.
``quick_init`` replaces it with one that fills the instance's ``__dict__`` directly:
the same parameters, defaults and ``__post_init__``-free semantics, and the instance stays
frozen (assignment still raises). For classes without ``__slots__``, ``InitVar``, ``init=False``
fields or ``__post_init__``; anything else is refused at import time.
"""

from __future__ import annotations

import dataclasses
from typing import Any, TypeVar

T = TypeVar("T")
_MISSING = object()  # no argument given for a field with a default factory


def quick_init(cls: type[T]) -> type[T]:
    """Give the frozen dataclass ``cls`` an ``__init__`` that fills ``__dict__`` directly."""
    if (
        not dataclasses.is_dataclass(cls)
        or not cls.__dataclass_params__.frozen  # type: ignore[attr-defined]
        or hasattr(cls, "__post_init__")
        or "__slots__" in cls.__dict__
    ):
        raise TypeError(f"quick_init needs a plain frozen dataclass, not {cls.__name__}")
    params = dataclasses.fields(cls)
    defaults: dict[str, Any] = {}
    positional, keyword, assigned = [], [], []
    for item in params:
        if not item.init:
            raise TypeError(f"quick_init: {cls.__name__}.{item.name} needs the generated init")
        if item.default_factory is not dataclasses.MISSING:
            defaults[f"_factory_{item.name}"] = item.default_factory
            text = f"{item.name}=_MISSING"
            assigned.append(
                f"    fill['{item.name}'] = _factory_{item.name}() "
                f"if {item.name} is _MISSING else {item.name}\n"
            )
        else:
            if item.default is dataclasses.MISSING:
                text = item.name
            else:
                defaults[f"_default_{item.name}"] = item.default
                text = f"{item.name}=_default_{item.name}"
            assigned.append(f"    fill['{item.name}'] = {item.name}\n")
        (keyword if item.kw_only else positional).append(text)
    signature = ", ".join(["self", *positional, *(["*", *keyword] if keyword else [])])
    source = f"def __init__({signature}):\n    fill = self.__dict__\n" + "".join(assigned)
    namespace: dict[str, Any] = {"_MISSING": _MISSING, **defaults}
    exec(source, namespace)  # the code is built from the class's own field names only
    init = namespace["__init__"]
    init.__qualname__ = f"{cls.__qualname__}.__init__"
    init.__doc__ = cls.__init__.__doc__
    cls.__init__ = init  # type: ignore[misc]
    return cls
