# Type hints for the clipwarden module (the compiled part is clipwarden._core).
import os
from typing import Any, Iterable, Iterator, Literal, Mapping, Sequence, Union

import numpy as np
import numpy.typing as npt

__version__: str

_Path = Union[str, bytes, os.PathLike[str], os.PathLike[bytes]]
_Policy = Union[_Path, Mapping[str, Any], None]
_Frames = Union[npt.NDArray[np.uint8], npt.NDArray[np.floating[Any]], Iterable[npt.ArrayLike]]

class Error(Exception):
    """A clipwarden call failed; str(e) is the line the CLI prints."""

    kind: Literal["usage", "input", "output", "internal"]
    subject: str
    cause: str

class UsageError(Error, ValueError):
    """A bad argument, setting, policy, manifest or frame array."""

class InputError(Error, OSError):
    """An input could not be read or decoded."""

class OutputError(Error, OSError):
    """A result could not be written."""

class Report:
    """The report of one clip, as `clipwarden analyze` writes it."""

    @property
    def verdict(self) -> Literal["pass", "review", "reject"]: ...
    @property
    def reasons(self) -> list[str]: ...
    @property
    def coherence(self) -> float: ...
    @property
    def clip(self) -> dict[str, Any]: ...
    @property
    def settings(self) -> dict[str, Any]: ...
    @property
    def segments(self) -> list[dict[str, Any]]: ...
    @property
    def summary(self) -> dict[str, Any]: ...
    @property
    def objects(self) -> list[dict[str, Any]]: ...
    @property
    def notes(self) -> list[str]: ...
    @property
    def frame_times(self) -> npt.NDArray[np.float64]: ...
    @property
    def metric_names(self) -> list[str]: ...
    @property
    def metrics(self) -> dict[str, npt.NDArray[np.float64]]: ...
    def metric(self, name: str) -> npt.NDArray[np.float64]:
        """One per-frame metric, NaN where undefined; KeyError if unknown."""
    def __getitem__(self, name: str) -> npt.NDArray[np.float64]: ...
    def __len__(self) -> int: ...
    def to_json(self) -> str:
        """The JSON text exactly as `clipwarden analyze` writes it."""
    def to_dict(self) -> dict[str, Any]: ...
    def save(self, folder: _Path, *, html: bool = True) -> dict[str, str]:
        """Writes folder/<name>.json and folder/<name>.html; returns their paths."""

class GateResult:
    """One clip's line of the review queue."""

    @property
    def path(self) -> str: ...
    @property
    def id(self) -> str: ...
    @property
    def prompt_id(self) -> str | None: ...
    @property
    def status(self) -> Literal["pass", "review", "reject", "error"]: ...
    @property
    def coherence(self) -> float | None: ...
    @property
    def reasons(self) -> list[str]: ...
    @property
    def report(self) -> str | None: ...
    @property
    def error(self) -> str | None: ...
    @property
    def from_store(self) -> bool: ...
    def to_dict(self) -> dict[str, Any]: ...

class Gate(Iterator[GateResult]):
    """A running batch; iterating yields results as clips finish."""

    @property
    def out(self) -> str: ...
    def __iter__(self) -> Gate: ...
    def __next__(self) -> GateResult: ...
    def close(self) -> None: ...
    def __enter__(self) -> Gate: ...
    def __exit__(self, *args: object) -> None: ...

def analyze(
    path: _Path,
    *,
    preset: Literal["fast", "balanced", "thorough"] | None = None,
    width: int | None = None,
    threads: int | None = None,
    fps: float | None = None,
    policy: _Policy = None,
) -> Report:
    """Analyzes one clip (video file or folder of numbered frames), as `clipwarden analyze`."""

def analyze_frames(
    frames: _Frames,
    fps: float,
    *,
    preset: Literal["fast", "balanced", "thorough"] | None = None,
    width: int | None = None,
    threads: int | None = None,
    policy: _Policy = None,
    name: str = "frames",
) -> Report:
    """Analyzes RGB frames in memory: a T x H x W x 3 array or an iterable of H x W x 3 frames."""

def gate(
    paths: _Path | Sequence[_Path],
    *,
    out: _Path | None = None,
    policy: _Policy = None,
    jobs: int | None = None,
    preset: Literal["fast", "balanced", "thorough"] | None = None,
    width: int | None = None,
    threads: int | None = None,
    fps: float | None = None,
    db: _Path | None = None,
    html: bool = True,
) -> Gate:
    """Judges a batch as `clipwarden gate` does; yields a GateResult per finished clip."""

def compare(
    reports_a: _Path,
    reports_b: _Path,
    *,
    pair_by: Literal["id", "prompt_id", "name"] | None = None,
    statistics: Sequence[str] = ("p95",),
    out: _Path | None = None,
) -> dict[str, Any]:
    """Compares two folders of reports as `clipwarden compare` does."""

def read_report(path: _Path) -> Report:
    """Reads a report JSON written by clipwarden."""

def default_policy() -> dict[str, Any]:
    """The built-in policy as a dict in the policy file's format."""
