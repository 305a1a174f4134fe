"""clipwarden.analyze, Report, read_report, default_policy and errors against
the clipwarden CLI on the same clip: the module is a layer over the same
library, so its reports must be the CLI's, bit for bit."""

import json

import numpy as np
import pytest

import clipwarden
from conftest import FLICKER_CLIP, cli_report, metric_from_json, run_cli


@pytest.fixture(scope="module")
def flicker(tmp_path_factory):
    """The CLI's report of the flicker demo clip and the module's."""
    out = tmp_path_factory.mktemp("cli")
    return cli_report(FLICKER_CLIP, out), clipwarden.analyze(FLICKER_CLIP), out


def test_report_json_is_the_clis_bit_for_bit(flicker):
    cli_text, report, _ = flicker
    assert report.to_json() == cli_text


def test_metric_arrays_are_the_json_values(flicker):
    cli_text, report, _ = flicker
    cli = json.loads(cli_text)
    assert report.metric_names
    for name in report.metric_names:
        expected = metric_from_json(cli, name)
        got = report.metric(name)
        assert got.dtype == np.float64 and got.shape == (len(cli["frames"]),)
        # Same doubles (JSON keeps them exactly), NaN exactly where the JSON has null.
        np.testing.assert_array_equal(got, expected, err_msg=name)
    assert np.array_equal(report.frame_times, [f["t"] for f in cli["frames"]])
    assert np.isnan(report["warp_error"][0])  # undefined for the first frame


def test_verdict_segments_summary(flicker):
    cli_text, report, _ = flicker
    cli = json.loads(cli_text)
    assert report.verdict == cli["verdict"]["status"] == "review"
    assert report.reasons == cli["verdict"]["reasons"]
    assert report.segments == cli["segments"]
    assert report.summary == cli["summary"]
    assert report.clip == cli["clip"] and report.settings == cli["settings"]
    assert report.objects == cli["objects"] and report.notes == cli["notes"]
    assert report.coherence == cli["summary"]["coherence"]
    assert report.to_dict() == cli


def test_save_writes_the_clis_files(flicker, tmp_path):
    cli_text, report, _ = flicker
    paths = report.save(tmp_path)
    assert paths["json"] == str(tmp_path / "lanternfish_flicker.json")
    assert open(paths["json"]).read() == cli_text
    # The CLI's page of the same clip, written beside its JSON.
    cli_out = tmp_path / "cli-html"
    run_cli("analyze", FLICKER_CLIP, "--out", str(cli_out), "--quiet")
    page = open(paths["html"]).read()
    assert page == (cli_out / "lanternfish_flicker.html").read_text()


def test_read_report_round_trip(flicker):
    cli_text, _, out = flicker
    again = clipwarden.read_report(out / "lanternfish_flicker.json")
    assert again.to_json() == cli_text


def test_settings_reach_the_analysis(tmp_path):
    report = clipwarden.analyze(FLICKER_CLIP, preset="fast", width=160, threads=1)
    assert report.settings["preset"] == "fast"
    assert report.settings["working_long_side_px"] == 160
    assert report.to_json() == cli_report(FLICKER_CLIP, tmp_path, "--preset", "fast", "--width", "160")


def test_default_policy_is_the_clis():
    printed = run_cli("gate", "--print-default-policy").stdout
    assert clipwarden.default_policy() == json.loads(printed)


def test_policy_as_dict_changes_the_verdict():
    judged = clipwarden.analyze(FLICKER_CLIP, preset="fast", width=160)
    assert any(reason.startswith("flicker ") for reason in judged.reasons)
    policy = clipwarden.default_policy()
    policy["metrics"]["flicker"] = None  # null turns a metric's rules off (docs/gate.md)
    report = clipwarden.analyze(FLICKER_CLIP, policy=policy, preset="fast", width=160)
    assert not any(reason.startswith("flicker ") for reason in report.reasons)


def test_errors_carry_the_clis_message(tmp_path):
    missing = str(tmp_path / "nope.mp4")
    with pytest.raises(clipwarden.InputError) as caught:
        clipwarden.analyze(missing)
    cli = run_cli("analyze", missing, "--out", str(tmp_path), "--quiet", check=False)
    assert cli.returncode == 3
    assert cli.stderr.strip() == "clipwarden: " + str(caught.value)
    assert isinstance(caught.value, OSError) and caught.value.subject == missing

    with pytest.raises(clipwarden.UsageError) as caught:
        clipwarden.analyze(FLICKER_CLIP, preset="sloppy")
    cli = run_cli("analyze", FLICKER_CLIP, "--preset", "sloppy", check=False)
    assert cli.returncode == 2
    assert cli.stderr.strip() == "clipwarden: " + str(caught.value)
    assert isinstance(caught.value, ValueError)

    with pytest.raises(clipwarden.UsageError, match="--width"):
        clipwarden.analyze(FLICKER_CLIP, width=3)
    with pytest.raises(clipwarden.UsageError, match="policy"):
        clipwarden.analyze(FLICKER_CLIP, policy={"metrics": {"flicker": {"segment": {"enter": -1}}}})
