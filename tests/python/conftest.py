"""Shared fixtures of the Python module's tests: the CLI binary built beside
the module, the demo clips, and frames decoded by OpenCV (Debian
python3-opencv), a decoder that is not ours."""

import json
import os
import subprocess
from pathlib import Path

import numpy as np
import pytest

SOURCE_DIR = Path(os.environ.get("CLIPWARDEN_SOURCE_DIR", Path(__file__).resolve().parents[2]))
BINARY = os.environ.get("CLIPWARDEN_BINARY", str(SOURCE_DIR / "build" / "clipwarden"))
FLICKER_CLIP = str(SOURCE_DIR / "clips" / "lanternfish_flicker.mp4")
JUMP_CLIP = str(SOURCE_DIR / "clips" / "lanternfish_jump.mp4")


def run_cli(*args, check=True):
    """Runs the clipwarden binary; returns the CompletedProcess (text)."""
    done = subprocess.run([BINARY, *args], capture_output=True, text=True, timeout=600)
    if check and done.returncode not in (0, 1):
        raise AssertionError(f"clipwarden {' '.join(args)} failed: {done.stderr}")
    return done


def cli_report(clip, out_dir, *options):
    """The CLI's JSON report text for one clip."""
    run_cli("analyze", clip, "--out", str(out_dir), "--no-html", "--quiet", *options)
    name = Path(clip).stem
    return (Path(out_dir) / f"{name}.json").read_text()


def metric_from_json(report_json, name):
    """A per-frame metric from report JSON, null as NaN."""
    values = [frame[name] for frame in report_json["frames"]]
    return np.array([np.nan if v is None else v for v in values], dtype=np.float64)


def read_frames_cv2(path):
    """Every frame of a clip as RGB uint8 arrays, decoded by OpenCV."""
    cv2 = pytest.importorskip("cv2", reason="needs OpenCV for Python (Debian python3-opencv)")
    capture = cv2.VideoCapture(path)
    frames = []
    while True:
        ok, bgr = capture.read()
        if not ok:
            break
        frames.append(cv2.cvtColor(bgr, cv2.COLOR_BGR2RGB))
    capture.release()
    assert frames, f"OpenCV read no frame of {path}"
    return frames


def load_json(text):
    return json.loads(text)
