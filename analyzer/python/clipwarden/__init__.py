"""clipwarden: checks video clips for temporal incoherence.

Flicker, boiling textures, colour and shape drift, cuts, freezes, jerk and
flashes, measured frame by frame with optical flow by the same library the
`clipwarden` command-line tool uses, with the same results.

    import clipwarden
    report = clipwarden.analyze("clip.mp4")
    print(report.verdict, report.reasons)
    flicker = report.metric("flicker")        # NumPy array, NaN where undefined
    report.save("clipwarden-out")             # the CLI's JSON and HTML files

Frames straight from a sampler: clipwarden.analyze_frames(frames, fps=24).
"""

from ._core import (
    Error,
    Gate,
    GateResult,
    InputError,
    OutputError,
    Report,
    UsageError,
    __version__,
    analyze,
    analyze_frames,
    compare,
    default_policy,
    gate,
    read_report,
)

__all__ = [
    "Error",
    "Gate",
    "GateResult",
    "InputError",
    "OutputError",
    "Report",
    "UsageError",
    "__version__",
    "analyze",
    "analyze_frames",
    "compare",
    "default_policy",
    "gate",
    "read_report",
]
