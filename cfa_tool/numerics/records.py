"""Frozen result records built quickly.

A frozen dataclass's generated ``__init__`` stores each field through ``object.__setattr__`` (its own
``__setattr__`` refuses every assignment): in CPython 3.11 about four times the cost of a plain class's
``__init__`` (11,700 instructions against 2,800 for a record of seven fields, counted by valgrind).  A fit's
default report builds a few dozen such records (case diagnostics, reliability rows), so :func:`quick_init`
gives a frozen dataclass an ``__init__`` that writes its fields into the instance's ``__dict__`` directly,
in the order of the fields, as unpickling does: the same instance (fields, their order, equality, repr,
``dataclasses.replace``, frozen afterwards).  No code is generated (the package runs no exec): positional
values, the defaults after them added, go in at once; keywords are arranged in the fields' order first.
"""

from __future__ import annotations

import dataclasses
import inspect

_MISSING = dataclasses.MISSING


def quick_init(cls: type) -> type:
    """Give the frozen dataclass ``cls`` an ``__init__`` that stores its fields in ``__dict__`` directly (see the
    module docstring).  Only for plain records: every field in the ``__init__`` by position or keyword, defaults
    plain values (no ``default_factory``, no keyword-only fields or ``InitVar``), no ``__post_init__`` and no
    ``__slots__``; anything else is refused with a TypeError, as the generated ``__init__`` would differ."""
    params = getattr(cls, "__dataclass_params__", None)
    if params is None or not params.frozen:
        raise TypeError(f"quick_init: {cls.__name__} is not a frozen dataclass")
    if hasattr(cls, "__post_init__") or "__slots__" in cls.__dict__:
        raise TypeError(f"quick_init: {cls.__name__} has __post_init__ or __slots__")
    pseudo = [f for f in cls.__dataclass_fields__.values() if f._field_type is not dataclasses._FIELD]
    fields = dataclasses.fields(cls)
    if pseudo or any(not f.init or f.kw_only or f.default_factory is not _MISSING for f in fields):
        raise TypeError(f"quick_init: {cls.__name__} has a field the plain __init__ does not cover")
    names = tuple(f.name for f in fields)
    defaults = {f.name: f.default for f in fields if f.default is not _MISSING}
    count = len(names)
    signature = inspect.signature(cls.__init__)  # the generated one's, kept for introspection

    def arranged(args: tuple, kwargs: dict) -> tuple:
        """Every field's value in the fields' order, or the TypeError the generated __init__ raises."""
        if len(args) > count:
            raise TypeError(f"{cls.__name__}.__init__() takes {count + 1} positional arguments but "
                            f"{len(args) + 1} were given")
        given = dict(zip(names, args))
        for key, value in kwargs.items():
            if key not in defaults and key not in names:
                raise TypeError(f"{cls.__name__}.__init__() got an unexpected keyword argument '{key}'")
            if key in given:
                raise TypeError(f"{cls.__name__}.__init__() got multiple values for argument '{key}'")
            given[key] = value
        missing = [n for n in names if n not in given and n not in defaults]
        if missing:
            raise TypeError(f"{cls.__name__}.__init__() missing required arguments: {', '.join(missing)}")
        return tuple(given[n] if n in given else defaults[n] for n in names)

    # the defaults of the fields after the first k, for every k from which all fields have one
    tails = {k: tuple(defaults[n] for n in names[k:]) for k in range(count + 1)
             if all(n in defaults for n in names[k:])}

    def __init__(self, *args, **kwargs):
        if kwargs or len(args) not in tails:
            args = arranged(args, kwargs)
        else:
            args += tails[len(args)]
        self.__dict__.update(zip(names, args))

    __init__.__qualname__ = f"{cls.__qualname__}.__init__"
    __init__.__module__ = cls.__module__
    __init__.__signature__ = signature
    cls.__init__ = __init__
    return cls
