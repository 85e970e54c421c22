"""Which extension files a run applies: the scenario's ``extensions`` entries (files resolved beside the scenario file
that names them) and ``--extension FILE[:function]`` on the command line. Only names and paths live here; importing
and applying them is :mod:`pathcast.model.extension`."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from .loader import LoadedScenario

__all__ = ["ExtensionSpec", "extension_specs", "parse_extension_argument", "DEFAULT_FUNCTION"]

DEFAULT_FUNCTION = "extend"


@dataclass(frozen=True)
class ExtensionSpec:
    """A Python file and the function in it that adds rules; ``origin`` says where it was named (for errors)."""

    file: Path
    function: str = DEFAULT_FUNCTION
    origin: str = "--extension"


def extension_specs(loaded: LoadedScenario) -> tuple[ExtensionSpec, ...]:
    """The scenario's ``extensions`` entries with their files resolved beside the scenario file that names them."""
    out = []
    for i, entry in enumerate(loaded.scenario.extensions):
        owner = loaded.file_of(("extensions", i, "file"))
        origin = f"{owner}: extensions.{i}.file"
        out.append(ExtensionSpec((owner.parent / entry.file).resolve(), entry.function, origin=origin))
    return tuple(out)


def parse_extension_argument(text: str) -> ExtensionSpec:
    """``rules.py`` or ``rules.py:function`` as given to ``--extension``."""
    file, _, function = text.rpartition(":")
    if not file or not function.isidentifier():  # no function given (or a drive letter such as C:\)
        file, function = text, DEFAULT_FUNCTION
    return ExtensionSpec(Path(file), function, origin=f"--extension {text}")
