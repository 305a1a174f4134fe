"""clipwarden.gate and clipwarden.compare against the CLI's gate and compare
on the same inputs."""

import json

import pytest

import clipwarden
from conftest import FLICKER_CLIP, JUMP_CLIP, run_cli

FAST = ["--preset", "fast", "--width", "160"]


def queue(folder):
    lines = (folder / "queue.jsonl").read_text().splitlines()
    return {line["path"]: line for line in map(json.loads, lines)}


@pytest.fixture(scope="module")
def batches(tmp_path_factory):
    """The same batch (two clips and a missing one) through the CLI and the module."""
    root = tmp_path_factory.mktemp("gate")
    missing = str(root / "missing.mp4")
    inputs = [FLICKER_CLIP, JUMP_CLIP, missing]
    run_cli("gate", *inputs, "--out", str(root / "cli"), "--no-html", "--quiet", *FAST, check=False)
    results = list(
        clipwarden.gate(inputs, out=root / "py", html=False, jobs=2, preset="fast", width=160)
    )
    return root, inputs, results


def test_gate_yields_every_clip_as_the_cli_judges_it(batches):
    root, inputs, results = batches
    assert sorted(r.path for r in results) == sorted(inputs)
    cli_queue = queue(root / "cli")
    for r in results:
        line = cli_queue[r.path]
        assert r.status == (line["verdict"] or "error")
        assert r.reasons == line["reasons"]
        assert r.to_dict() == line
    bad = next(r for r in results if r.path == inputs[2])
    assert bad.status == "error" and bad.error and bad.coherence is None
    # The reports themselves are the CLI's.
    for r in results:
        if r.report:
            assert (root / "py" / r.report).read_text() == (root / "cli" / r.report).read_text()
    assert queue(root / "py") == cli_queue


def test_a_second_run_takes_the_clips_from_the_store(batches):
    root, inputs, _ = batches
    again = list(clipwarden.gate(inputs[:2], out=root / "py", html=False, preset="fast", width=160))
    assert [r.from_store for r in again] == [True, True]


def test_compare_is_the_clis(batches):
    root, _, _ = batches
    out = root / "compared"
    mine = clipwarden.compare(root / "cli", root / "py", pair_by="name", out=out)
    run_cli("compare", str(root / "cli"), str(root / "py"), "--out", str(root / "cli-compared"),
            "--pair-by", "name")
    cli = json.loads((root / "cli-compared" / "compare.json").read_text())
    drop = lambda d: {k: v for k, v in d.items() if k != "inputs"}  # names its folders
    assert drop(mine) == drop(cli)
    assert (out / "compare.html").exists()
    with pytest.raises(clipwarden.UsageError, match="pair_by"):
        clipwarden.compare(root / "cli", root / "py", pair_by="colour")


def test_gate_errors_raise():
    with pytest.raises(clipwarden.UsageError, match="jobs"):
        clipwarden.gate([FLICKER_CLIP], jobs=0)


def test_close_stops_the_batch_and_a_rerun_finishes_it(tmp_path):
    clips = [FLICKER_CLIP, JUMP_CLIP, FLICKER_CLIP.replace("flicker", "clean")]
    settings = dict(out=tmp_path, html=False, jobs=1, preset="fast", width=160)
    with clipwarden.gate(clips, **settings) as batch:
        first = next(batch)
    # Closed after the first clip: the queue holds the finished clips only
    # (the one in flight was stopped, unless it had finished already).
    finished = list(queue(tmp_path))
    assert first.path in finished and set(finished) <= set(clips)
    rest = list(clipwarden.gate(clips, **settings))
    assert sorted(r.path for r in rest) == sorted(clips)
    assert all(r.from_store for r in rest if r.path in finished)
    assert list(queue(tmp_path)) == clips
