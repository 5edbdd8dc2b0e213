"""numerics.records.quick_init against the reference it replaces: the __init__ that Python's dataclasses module
generates for the same frozen dataclass (the records of the default report built both ways are the same
instances: fields, their order in __dict__, equality, hash, repr, replace, pickling, frozen afterwards)."""

from __future__ import annotations

import dataclasses
import math
import pickle

import pytest

from cfa_tool.assessment.diagnostics import CaseDiagnostic
from cfa_tool.assessment.normality import Normality
from cfa_tool.assessment.reliability import BifactorPart, FactorReliability, Htmt, Keying
from cfa_tool.numerics.records import quick_init


def reference(cls: type) -> type:
    """The same frozen dataclass with the __init__ that dataclasses generates (the reference)."""
    fields = [(f.name, f.type, dataclasses.field(default=f.default)) if f.default is not dataclasses.MISSING
              else (f.name, f.type) for f in dataclasses.fields(cls)]
    params = cls.__dataclass_params__
    return dataclasses.make_dataclass(cls.__name__, fields, frozen=True, eq=params.eq)


def same_instance(quick, ref) -> None:
    assert list(vars(quick)) == [f.name for f in dataclasses.fields(quick)] == list(vars(ref))
    for name, value in vars(ref).items():
        got = vars(quick)[name]
        assert type(got) is type(value)
        assert got == value or (isinstance(value, float) and math.isnan(value) and math.isnan(got))
    assert repr(quick).split("(", 1)[1] == repr(ref).split("(", 1)[1]


CASES = [
    (CaseDiagnostic, (12, 3.5, 0.04, -1.25)),
    (CaseDiagnostic, (12, 3.5, 0.04, -1.25, "R-7", 5, 2.5)),
    (CaseDiagnostic, (), {"row": 3, "mahalanobis": float("nan"), "p_value": 1.0, "chi_square_share": 0.0, "id": None}),
    (Htmt, ("a", "b", 0.83)),
    (Htmt, ("a", "b", None, "no correlation within it")),
    (Normality, (1.5, 75.2, 165, 0.9, 99.1, 99.0, 0.05, 0.96)),
    (FactorReliability, ("visual", ("x1", "x2", "x3"), "first-order", 0.61, 0.62, None, 0.63, 0.37, 0.63, 0.46, True)),
    (FactorReliability, ("g", ("x1", "x2"), "first-order", 0.7, 0.8, 0.7, None, 0.4, 0.5, None, None, ("x2",),
                         Keying.DECLARED, 6.5, 1.2, (0.3, 0.4), ("x1",), 0.71, True, True, BifactorPart.GENERAL,
                         ("s1", "s2"))),
]


@pytest.mark.parametrize("case", CASES, ids=lambda c: c[0].__name__)
def test_quick_init_builds_the_dataclass_instance(case):
    cls, args, *rest = case
    kwargs = rest[0] if rest else {}
    ref_cls = reference(cls)
    quick, ref = cls(*args, **kwargs), ref_cls(*args, **kwargs)
    same_instance(quick, ref)
    assert quick == cls(*args, **kwargs) and hash(quick) == hash(cls(*args, **kwargs))
    with pytest.raises(dataclasses.FrozenInstanceError):
        quick.__setattr__(dataclasses.fields(cls)[0].name, None)
    first = dataclasses.fields(cls)[0].name
    same_instance(dataclasses.replace(quick, **{first: getattr(ref, first)}), ref)
    same_instance(pickle.loads(pickle.dumps(quick)), ref)


def test_quick_init_keeps_the_errors_of_the_generated_init():
    with pytest.raises(TypeError):
        CaseDiagnostic(1, 2.0, 0.5)  # a field without a value
    with pytest.raises(TypeError):
        CaseDiagnostic(1, 2.0, 0.5, 1.0, "a", 3, 4.0, 5)  # one value too many
    with pytest.raises(TypeError):
        CaseDiagnostic(1, 2.0, 0.5, 1.0, row=2)  # a field given twice
    with pytest.raises(TypeError):
        Htmt("a", "b", 0.5, colour="red")  # no such field


def test_quick_init_refuses_what_its_plain_init_does_not_cover():
    @dataclasses.dataclass(frozen=True)
    class WithFactory:
        values: list = dataclasses.field(default_factory=list)

    @dataclasses.dataclass(frozen=True)
    class WithPostInit:
        x: int

        def __post_init__(self):
            pass

    @dataclasses.dataclass(frozen=True)
    class KeywordOnly:
        x: int = dataclasses.field(default=1, kw_only=True)

    @dataclasses.dataclass
    class NotFrozen:
        x: int

    for cls in (WithFactory, WithPostInit, KeywordOnly, NotFrozen):
        with pytest.raises(TypeError):
            quick_init(cls)
