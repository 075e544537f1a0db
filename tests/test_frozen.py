"""`coordination.frozen.quick_init`: the same instances as dataclasses' own ``__init__`` makes.

The reference is the standard library's dataclasses: each decorated class is compared with a
twin that dataclasses builds from the same fields.
"""

from __future__ import annotations

import dataclasses
import importlib
import inspect
import pkgutil

import pytest

import coordination
from coordination.frozen import QUICK_CLASSES, quick_init


def _quick_classes() -> list[type]:
    for info in pkgutil.iter_modules(coordination.__path__):
        if info.name != "__main__":  # that one runs the command
            importlib.import_module(f"coordination.{info.name}")
    return list(QUICK_CLASSES)


QUICK = _quick_classes()


def _twin(cls: type) -> type:
    """The same fields, defaults and __post_init__, with dataclasses' own frozen __init__."""
    namespace: dict[str, object] = {
        "__annotations__": {f.name: f.type for f in dataclasses.fields(cls)},
        "__module__": cls.__module__, "__qualname__": cls.__qualname__}
    for f in dataclasses.fields(cls):
        if f.default is not dataclasses.MISSING:
            namespace[f.name] = f.default
        elif f.default_factory is not dataclasses.MISSING:
            namespace[f.name] = dataclasses.field(default_factory=f.default_factory)
    if "__post_init__" in vars(cls):
        namespace["__post_init__"] = vars(cls)["__post_init__"]
    return dataclasses.dataclass(frozen=True)(type(cls.__name__, (), namespace))


def _arguments(cls: type) -> dict[str, object]:
    """A value for every field without a default (distinct strings: no __post_init__ of ours
    does arithmetic on them)."""
    return {f.name: f"value of {f.name}" for f in dataclasses.fields(cls)
            if f.default is dataclasses.MISSING and f.default_factory is dataclasses.MISSING}


def test_the_bulk_result_classes_are_decorated():
    names = {cls.__name__ for cls in QUICK}
    assert {"PairResult", "CheckResult", "NodeFaults", "Circuit", "Cable"} <= names


@pytest.mark.parametrize("cls", QUICK, ids=lambda c: c.__name__)
def test_same_signature_as_dataclasses_init(cls):
    quick = inspect.signature(cls.__init__)
    original = inspect.signature(_twin(cls).__init__)
    # as text: a default factory's sentinel is dataclasses' own object there, ours here
    assert [str(p) for p in quick.parameters.values()] == [
        str(p) for p in original.parameters.values()]
    assert quick.return_annotation == original.return_annotation


@pytest.mark.parametrize("cls", QUICK, ids=lambda c: c.__name__)
def test_same_instance_as_dataclasses_init(cls):
    args = _arguments(cls)
    quick = cls(**args)
    original = _twin(cls)(**args)
    assert vars(quick) == vars(original)
    assert list(vars(quick)) == list(vars(original))  # fields in the same order
    # positionally too
    ordered = [args[f.name] for f in dataclasses.fields(cls) if f.name in args]
    assert vars(cls(*ordered)) == vars(original)
    assert cls(*ordered) == quick


@pytest.mark.parametrize("cls", QUICK, ids=lambda c: c.__name__)
def test_still_frozen(cls):
    instance = cls(**_arguments(cls))
    name = dataclasses.fields(cls)[0].name
    with pytest.raises(dataclasses.FrozenInstanceError):
        setattr(instance, name, "changed")
    with pytest.raises(dataclasses.FrozenInstanceError):
        delattr(instance, name)


def test_default_factory_called_per_instance_and_post_init_run():
    @quick_init
    @dataclasses.dataclass(frozen=True, init=False)
    class Record:
        current_a: float
        notes: list = dataclasses.field(default_factory=list)
        time_s: float = 0.1

        def __post_init__(self) -> None:
            object.__setattr__(self, "notes", [*self.notes, "checked"])

    a, b = Record(1.0), Record(2.0, ["given"], 0.2)
    assert a.notes == ["checked"] and b.notes == ["given", "checked"]
    assert Record(3.0).notes is not a.notes
    assert (a.time_s, b.time_s) == (0.1, 0.2)
    with pytest.raises(TypeError):
        Record()  # a required field is still required


def test_refuses_what_it_does_not_cover():
    @dataclasses.dataclass
    class Mutable:
        x: int

    @dataclasses.dataclass(frozen=True, slots=True)
    class Slotted:
        x: int

    @dataclasses.dataclass(frozen=True)
    class KeywordOnly:
        x: int = dataclasses.field(kw_only=True)

    @dataclasses.dataclass(frozen=True)
    class Derived:
        x: int
        y: int = dataclasses.field(init=False, default=0)

    for cls in (Mutable, Slotted, KeywordOnly, Derived, int):
        with pytest.raises(TypeError):
            quick_init(cls)
