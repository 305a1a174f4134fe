"""clipwarden.analyze_frames: frames from memory. The frames come from
OpenCV's own decoder (cv2.VideoCapture, Debian python3-opencv), not ours."""

import numpy as np
import pytest

import clipwarden
from conftest import FLICKER_CLIP, read_frames_cv2

cv2 = pytest.importorskip("cv2", reason="needs OpenCV for Python (Debian python3-opencv)")

FAST = {"preset": "fast", "width": 256}


@pytest.fixture(scope="module")
def frames():
    return read_frames_cv2(FLICKER_CLIP)


@pytest.fixture(scope="module")
def png_folder(frames, tmp_path_factory):
    """The decoded frames as numbered PNG files (written by OpenCV)."""
    folder = tmp_path_factory.mktemp("png")
    for i, rgb in enumerate(frames):
        assert cv2.imwrite(str(folder / f"f{i:04d}.png"), cv2.cvtColor(rgb, cv2.COLOR_RGB2BGR))
    return folder


def assert_same_analysis(a, b):
    """Everything but the clip's own facts (path, container, codec)."""
    assert a.metric_names == b.metric_names
    for name in a.metric_names:
        np.testing.assert_array_equal(a.metric(name), b.metric(name), err_msg=name)
    np.testing.assert_array_equal(a.frame_times, b.frame_times)
    assert a.segments == b.segments
    assert a.summary == b.summary
    assert a.objects == b.objects
    assert (a.verdict, a.reasons) == (b.verdict, b.reasons)


def test_frames_match_a_folder_of_the_same_pictures(frames, png_folder):
    # The same pictures from PNG files (decoded by FFmpeg's PNG decoder) and
    # from memory go through the same scaler: identical reports.
    from_folder = clipwarden.analyze(png_folder, fps=24, **FAST)
    from_memory = clipwarden.analyze_frames(np.stack(frames), 24, **FAST)
    assert_same_analysis(from_folder, from_memory)
    assert from_memory.clip["container"] == "memory"
    assert from_memory.clip["frame_count"] == len(frames)


def test_generator_array_and_float_frames_agree(frames):
    as_array = clipwarden.analyze_frames(np.stack(frames), 24, **FAST)
    as_generator = clipwarden.analyze_frames((f for f in frames), 24, **FAST)
    assert_same_analysis(as_array, as_generator)
    assert as_generator.clip["frame_count"] == len(frames)
    # v / 255 in float64, times 255 and rounded, is v again: same report.
    as_float = clipwarden.analyze_frames(np.stack(frames) / 255.0, 24, **FAST)
    assert_same_analysis(as_array, as_float)


def test_frames_decoded_by_opencv_give_the_files_report(frames):
    # OpenCV converts YUV to RGB at the clip's size, then we scale; the file
    # path scales YUV and converts at the working size. Pixels differ
    # slightly, so values do too (measured on this clip: flicker 4.3 % and
    # warp_error 5.5 % of their peaks at most, drift's onset 3 frames apart);
    # the judgement and the flagged stretches must not.
    from_file = clipwarden.analyze(FLICKER_CLIP)
    from_frames = clipwarden.analyze_frames(np.stack(frames), from_file.clip["fps"])
    assert from_frames.verdict == from_file.verdict == "review"
    # Info segments are not compared: a metric that peaks near its entry
    # level can cross it on one side only (measured 2026-12-05 on this clip:
    # flicker_local peaks 0.108 from OpenCV's frames, 0.093 from the file,
    # entry 0.1; an info segment from the frames, none from the file).
    flagged = lambda r: [
        (s["metric"], s["severity"], s["start_frame"], s["end_frame"])
        for s in r.segments
        if s["severity"] != "info"
    ]
    assert flagged(from_frames) == flagged(from_file) != []
    # The file's timestamps are in milliseconds (its time base); ours are i / fps.
    np.testing.assert_allclose(from_frames.frame_times, from_file.frame_times, rtol=0, atol=5e-4)
    for name in ("flicker", "warp_error"):
        a, b = from_frames.metric(name), from_file.metric(name)
        assert np.array_equal(np.isnan(a), np.isnan(b)), name
        assert np.nanmax(np.abs(a - b)) <= 0.1 * np.nanmax(np.abs(b)), name
    assert abs(from_frames.coherence - from_file.coherence) <= 2


def test_wrong_shape_or_dtype_is_a_clear_error(frames):
    video = np.stack(frames[:4])
    with pytest.raises(clipwarden.UsageError, match=r"T x H x W x 3.*\(4, 270, 480\)"):
        clipwarden.analyze_frames(video[..., 0], 24)
    with pytest.raises(clipwarden.UsageError, match=r"T x H x W x 3.*\(4, 270, 480, 4\)"):
        clipwarden.analyze_frames(np.concatenate([video, video[..., :1]], axis=3), 24)
    with pytest.raises(clipwarden.UsageError, match="dtype int32 is not supported"):
        clipwarden.analyze_frames(video.astype(np.int32), 24)
    with pytest.raises(clipwarden.UsageError, match=r"\[0, 1\].*255"):
        clipwarden.analyze_frames(video.astype(np.float32), 24)
    with pytest.raises(clipwarden.UsageError, match="frame 2: size 240x270 differs"):
        clipwarden.analyze_frames(iter([video[0], video[1], video[2, :, :240]]), 24)
    with pytest.raises(clipwarden.UsageError, match=r"frame 1: must be an H x W x 3"):
        clipwarden.analyze_frames([video[0], video[1, :, :, 0]], 24)
    with pytest.raises(clipwarden.UsageError, match="frame 0: holds NaN"):
        clipwarden.analyze_frames(np.full((2, 8, 8, 3), np.nan), 24)
    with pytest.raises(clipwarden.InputError, match="no frames given"):
        clipwarden.analyze_frames(iter([]), 24)
    with pytest.raises(clipwarden.UsageError, match="fps"):
        clipwarden.analyze_frames(video, 0)
    with pytest.raises(TypeError):
        clipwarden.analyze_frames(42, 24)


def test_an_exception_in_the_generator_comes_through(frames):
    class SamplerFailed(Exception):
        pass

    def sampler():
        yield from frames[:10]
        raise SamplerFailed("out of memory on the GPU")

    with pytest.raises(SamplerFailed, match="GPU"):
        clipwarden.analyze_frames(sampler(), 24, **FAST)
