"""While an analysis runs: other Python threads run (the GIL is released),
Ctrl-C stops it, and a long generator stays within the CLI's memory."""

import os
import subprocess
import sys
import textwrap
import threading
import time

import pytest

import clipwarden
from conftest import BINARY, FLICKER_CLIP


def test_a_thread_runs_while_an_analysis_is_in_progress():
    ticks = []
    done = threading.Event()

    def count():
        while not done.is_set():
            ticks.append(time.monotonic())
            time.sleep(0.001)

    counter = threading.Thread(target=count)
    counter.start()
    try:
        started = time.monotonic()
        clipwarden.analyze(FLICKER_CLIP, width=256)
        ended = time.monotonic()
    finally:
        done.set()
        counter.join()
    during = [t for t in ticks if started < t < ended]
    # Holding the GIL would leave the counter one tick at most (a switch
    # before the call enters C++); 120 frames take well over 0.1 s.
    assert len(during) >= 20, f"{len(during)} ticks in {ended - started:.2f} s"


def run_python(script):
    """Runs a script with Debian's interpreter and this module; 300 s at most."""
    env = dict(os.environ)
    done = subprocess.run(
        [sys.executable, "-c", textwrap.dedent(script)],
        capture_output=True, text=True, timeout=300, env=env,
    )
    assert done.returncode == 0, done.stderr
    return done.stdout


def test_ctrl_c_stops_an_endless_analysis():
    # The generator never ends; it sends SIGINT to its own process once the
    # analysis is under way. Without Ctrl-C handling the run would never end.
    out = run_python("""
        import itertools, os, signal
        import numpy as np
        import clipwarden

        def endless():
            base = np.random.default_rng(1).integers(0, 256, (72, 128, 3), dtype=np.uint8)
            for i in itertools.count():
                if i == 40:
                    os.kill(os.getpid(), signal.SIGINT)
                yield np.roll(base, i, axis=1)

        try:
            clipwarden.analyze_frames(endless(), 24, width=128, preset="fast")
            print("finished")
        except KeyboardInterrupt:
            print("interrupted")
        # The module still works afterwards.
        print(clipwarden.analyze_frames(np.zeros((3, 16, 16, 3), np.uint8), 24).verdict)
    """)
    first, after = out.split()
    assert first == "interrupted" and after in ("pass", "review", "reject")


def test_ctrl_c_stops_the_analysis_of_a_file(tmp_path):
    clip = tmp_path / "long.mkv"
    made = subprocess.run(
        ["ffmpeg", "-v", "error", "-f", "lavfi", "-i", "testsrc2=size=320x180:rate=24:duration=120",
         "-c:v", "ffv1", str(clip)], capture_output=True, text=True)
    if made.returncode != 0:
        pytest.skip("needs the ffmpeg program (Debian ffmpeg): " + made.stderr)
    out = run_python(f"""
        import os, signal, threading, time
        import clipwarden

        started = threading.Event()
        def interrupt():
            started.wait()
            time.sleep(0.5)
            os.kill(os.getpid(), signal.SIGINT)
        threading.Thread(target=interrupt, daemon=True).start()
        try:
            started.set()
            clipwarden.analyze({str(clip)!r})
            print("finished")
        except KeyboardInterrupt:
            print("interrupted")
    """)
    assert out.split() == ["interrupted"]


def test_a_2000_frame_generator_stays_within_the_clis_memory(tmp_path):
    # The CLI's peak memory on the demo clip at the same settings is the
    # bound (its memory depends on frame size and threads, not length).
    settings = ["--preset", "fast", "--width", "256", "--threads", "2"]
    cli = run_python(f"""
        import resource, subprocess
        subprocess.run([{BINARY!r}, "analyze", {FLICKER_CLIP!r}, "--out", {str(tmp_path)!r},
                        "--no-html", "--quiet", *{settings!r}], check=False)
        print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)
    """)
    cli_peak_kb = int(cli)
    # 2000 frames of the demo clip's size (480x270 RGB, 389 KB each: 777 MB
    # if they were kept), each a fresh array.
    grown = run_python(f"""
        import resource
        import numpy as np
        import clipwarden

        def frames():
            base = np.random.default_rng(7).integers(0, 256, (270, 480 + 2000, 3), dtype=np.uint8)
            for i in range(2000):
                yield np.ascontiguousarray(base[:, i:i + 480])

        clipwarden.analyze_frames(np.zeros((2, 270, 480, 3), np.uint8), 24)  # warm up
        before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        report = clipwarden.analyze_frames(frames(), 24, preset="fast", width=256, threads=2)
        assert len(report) == 2000
        print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss - before)
    """)
    growth_kb = int(grown)
    assert growth_kb <= cli_peak_kb, f"analysis grew by {growth_kb} KB, the CLI peaks at {cli_peak_kb} KB"
