"""The project root: ``timespec.toml`` or ``[tool.timespec]`` above a spec widens the include root.

The include root is the nearest folder upward holding a project file, else the top
spec's own folder (the rule before project files existed).  The project file sets
default Monte Carlo samples and seed and folders a tree walk skips; the spec's own
statements and the command line take precedence over it.
"""

from __future__ import annotations

import io
import json
import os
from pathlib import Path

import pytest

import timespec
from timespec.cli import main
from timespec.errors import SpecError, SpecIncludeError, SpecSyntaxError, SpecValueError
from timespec.language.assemble import load
from timespec.language.project import Project, glob_matches, project_for, read_project_file
from timespec.model import MAX_SAMPLES

COMMON = "defaults:\n  supply 5 V ±5%\n"
BLOCK = "oneshot slot_debounce:\n  width 4 ms ±10%\n"


def _tree(top: Path, config: str | None, *, name: str = "timespec.toml") -> Path:
    """A project: the config at ``top``, shared defaults beside it, a spec two levels down."""
    top.mkdir(parents=True, exist_ok=True)
    if config is not None:
        (top / name).write_text(config, encoding="utf-8")
    (top / "common.tspec").write_text(COMMON, encoding="utf-8")
    spec = top / "boards" / "slot" / "debounce.tspec"
    spec.parent.mkdir(parents=True)
    spec.write_text('include "../../common.tspec"\n' + BLOCK, encoding="utf-8")
    return spec


# ------------------------------------------------------------------ finding the root


def test_timespec_toml_two_levels_up_is_the_root(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 500\nseed = 11\n")
    project = project_for(spec)
    assert project.root == (tmp_path / "proj").resolve()
    assert project.file == tmp_path / "proj" / "timespec.toml"
    assert (project.samples, project.seed, project.exclude) == (500, 11, ())
    block = load(spec).blocks[0]
    assert block.conditions.supply.centre == pytest.approx(5.0)
    assert (block.statistics.samples, block.statistics.seed) == (500, 11)


def test_pyproject_tool_table_marks_the_root(tmp_path: Path) -> None:
    config = '[project]\nname = "fixture-boards"\n\n[tool.timespec]\nseed = 99\n'
    spec = _tree(tmp_path / "proj", config, name="pyproject.toml")
    project = project_for(spec)
    assert project.file == tmp_path / "proj" / "pyproject.toml"
    assert (project.samples, project.seed) == (None, 99)
    block = timespec.load(spec).blocks[0]
    assert block.statistics.seed == 99
    assert block.statistics.samples == 20_000  # built-in default: the project sets none


def test_pyproject_without_the_table_is_not_a_project(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", '[project]\nname = "timespec-boards"\n', name="pyproject.toml")
    assert project_for(spec).file is None
    with pytest.raises(SpecIncludeError, match="lies outside the spec's folder"):
        load(spec)


def test_the_nearest_project_file_wins(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 500\n")
    (tmp_path / "proj" / "boards" / "timespec.toml").write_text("samples = 600\n")
    project = project_for(spec)
    assert project.root == (tmp_path / "proj" / "boards").resolve()
    assert project.samples == 600
    # The shared defaults now lie above the nearer root.
    with pytest.raises(SpecIncludeError, match="lies outside the project root"):
        load(spec)


def test_project_for_a_folder_starts_in_the_folder(tmp_path: Path) -> None:
    _tree(tmp_path / "proj", "")
    assert project_for(tmp_path / "proj").root == (tmp_path / "proj").resolve()
    assert project_for(tmp_path / "proj" / "boards").file == tmp_path / "proj" / "timespec.toml"
    bare = tmp_path / "loose"
    bare.mkdir()
    assert project_for(bare) == Project(root=bare.resolve())


def test_an_empty_project_file_sets_only_the_root(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "# shared defaults live in common.tspec\n")
    block = load(spec).blocks[0]
    assert (block.statistics.samples, block.statistics.seed) == (20_000, 2026)


# ------------------------------------------------------------------ no project file: as before


def test_without_a_project_includes_stay_in_the_spec_folder(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", None)
    assert project_for(spec) == Project(root=spec.parent.resolve())
    with pytest.raises(SpecIncludeError) as info:
        load(spec)
    folder = str(spec.parent.resolve())
    wanted = str((tmp_path / "proj" / "common.tspec").resolve())
    assert str(info.value) == (
        f"{spec}:1:9: error: '../../common.tspec' lies outside the spec's folder {folder!r} "
        f"(it resolves to {wanted!r})\n"
        '    include "../../common.tspec"\n'
        "            ^\n"
        "  hint: included files must sit in the folder of the top spec or below it; to share "
        "files from a folder above, make it the project root with a timespec.toml there"
    )


def test_without_a_project_includes_below_the_spec_still_work(tmp_path: Path) -> None:
    (tmp_path / "shared").mkdir()
    (tmp_path / "shared" / "rails.tspec").write_text(COMMON)
    spec = tmp_path / "board.tspec"
    spec.write_text('include "shared/rails.tspec"\n' + BLOCK)
    assert load(spec).blocks[0].conditions.supply.centre == pytest.approx(5.0)


# ------------------------------------------------------------------ leaving the root


def test_include_above_the_project_root_is_refused_at_the_statement(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    spec = _tree(proj, "")
    (tmp_path / "outside.tspec").write_text(COMMON)
    spec.write_text(BLOCK + '\ninclude "../../../outside.tspec"\n')
    with pytest.raises(SpecIncludeError) as info:
        load(spec)
    err = info.value
    assert (err.path, err.line, err.column) == (str(spec), 4, 9)
    assert err.message == (
        f"'../../../outside.tspec' lies outside the project root {str(proj.resolve())!r} "
        f"(it resolves to {str((tmp_path / 'outside.tspec').resolve())!r})"
    )
    assert err.hint == (
        "included files must sit under the project root, the folder of "
        f"{str(proj / 'timespec.toml')!r}"
    )


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="needs symbolic links")
def test_symlink_escaping_the_root_is_refused(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / "timespec.toml").write_text("")
    outside = tmp_path / "elsewhere" / "rails.tspec"
    outside.parent.mkdir()
    outside.write_text(COMMON)
    (proj / "rails.tspec").symlink_to(outside)
    spec = proj / "board.tspec"
    spec.write_text('include "rails.tspec"\n' + BLOCK)
    with pytest.raises(SpecIncludeError) as info:
        load(spec)
    assert info.value.message == (
        f"'rails.tspec' lies outside the project root {str(proj.resolve())!r} "
        f"(it resolves to {str(outside.resolve())!r})"
    )
    assert (info.value.line, info.value.column) == (1, 9)


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="needs symbolic links")
def test_symlinked_folder_leaving_the_root_is_refused(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / "timespec.toml").write_text("")
    shared = tmp_path / "shared"
    shared.mkdir()
    (shared / "rails.tspec").write_text(COMMON)
    (proj / "shared").symlink_to(shared, target_is_directory=True)
    spec = proj / "board.tspec"
    spec.write_text('include "shared/rails.tspec"\n' + BLOCK)
    with pytest.raises(SpecIncludeError, match="lies outside the project root"):
        load(spec)


@pytest.mark.skipif(not hasattr(os, "symlink"), reason="needs symbolic links")
def test_symlink_inside_the_root_is_followed(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "")
    (tmp_path / "proj" / "boards" / "rails.tspec").symlink_to(tmp_path / "proj" / "common.tspec")
    spec.write_text('include "../rails.tspec"\n' + BLOCK)
    assert load(spec).blocks[0].conditions.supply.centre == pytest.approx(5.0)


# ------------------------------------------------------------------ precedence


def test_spec_settings_beat_the_project_file(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 500\nseed = 11\n")
    spec.write_text(
        'include "../../common.tspec"\ndefaults:\n  samples 300\n'
        "oneshot a:\n  width 4 ms ±10%\n  seed 5\n"
        "oneshot b:\n  width 8 ms ±10%\n"
    )
    a, b = load(spec).blocks
    assert (a.statistics.samples, a.statistics.seed) == (300, 5)
    assert (b.statistics.samples, b.statistics.seed) == (300, 11)


def test_an_explicit_project_is_used_as_given(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 500\n")
    given = Project(root=(tmp_path / "proj").resolve(), samples=42)
    assert load(spec, project=given).blocks[0].statistics.samples == 42


def _solve_json(*argv: str) -> dict[str, object]:
    out, err = io.StringIO(), io.StringIO()
    code = main(["solve", "--json", *argv], stdout=out, stderr=err)
    assert code == 0, err.getvalue()
    doc: dict[str, object] = json.loads(out.getvalue())
    return doc


def _mc(doc: dict[str, object]) -> tuple[int, int]:
    blocks = doc["blocks"]
    assert isinstance(blocks, list)
    mc = blocks[0]["statistics"]["monte_carlo"]
    return mc["samples"], mc["seed"]


def test_cli_solve_uses_the_project_samples_and_seed(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 500\nseed = 11\n")
    assert _mc(_solve_json(str(spec))) == (500, 11)


def test_cli_flags_override_the_project(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 500\nseed = 11\n")
    assert _mc(_solve_json(str(spec), "--samples", "700", "--seed", "5")) == (700, 5)
    assert _mc(_solve_json(str(spec), "--seed", "5")) == (500, 5)


def test_cli_reports_a_project_error_and_exits_2(tmp_path: Path) -> None:
    spec = _tree(tmp_path / "proj", "samples = 0\n")
    out, err = io.StringIO(), io.StringIO()
    assert main(["solve", "--no-statistics", str(spec)], stdout=out, stderr=err) == 2
    assert out.getvalue() == ""
    toml = tmp_path / "proj" / "timespec.toml"
    assert err.getvalue() == (
        f"{toml}:1:1: error: project option 'samples' must lie from 1 to 10,000,000, not 0\n"
        "    samples = 0\n"
        "    ^\n"
        "  hint: allowed: 1 to 10,000,000\n"
    )


# ------------------------------------------------------------------ config errors, located


def _config_error(tmp_path: Path, text: str, name: str = "timespec.toml") -> SpecError:
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / name).write_text(text, encoding="utf-8")
    with pytest.raises(SpecError) as info:
        project_for(proj)
    return info.value


def test_unknown_key_is_named_with_a_suggestion(tmp_path: Path) -> None:
    err = _config_error(tmp_path, "seed = 1\n  sampels = 5000\n")
    assert isinstance(err, SpecValueError)
    assert str(err) == (
        f"{tmp_path / 'proj' / 'timespec.toml'}:2:3: error: unknown project option 'sampels'\n"
        "      sampels = 5000\n"
        "      ^\n"
        "  hint: did you mean 'samples'?"
    )


def test_unknown_table_is_located_at_its_header(tmp_path: Path) -> None:
    err = _config_error(tmp_path, "samples = 5000\n\n[limits]\nfoo = 1\n")
    assert (err.line, err.column, err.message) == (3, 1, "unknown project option 'limits'")
    assert err.hint == "project options are samples, seed, exclude"


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ('samples = "5000"', "project option 'samples' must be a whole number, not a string"),
        ("samples = true", "project option 'samples' must be a whole number, not a boolean"),
        ("samples = 5e3", "project option 'samples' must be a whole number, not a decimal number"),
        (
            f"samples = {MAX_SAMPLES + 1}",
            "project option 'samples' must lie from 1 to 10,000,000, not 10,000,001",
        ),
        (
            "seed = -1",
            "project option 'seed' must lie from 0 to 9,223,372,036,854,775,807, not -1",
        ),
        (
            f"seed = {2**63 - 1}",  # the largest seed is fine: checked below
            None,
        ),
        ('exclude = "vendor"', "project option 'exclude' must be a list of strings, not a string"),
        ("exclude = [1, 2]", "project option 'exclude' must be a list of strings, not a list"),
        (
            'exclude = ["/abs/path"]',
            "exclude pattern '/abs/path' is not a relative path under the root",
        ),
        (
            'exclude = ["../sibling"]',
            "exclude pattern '../sibling' is not a relative path under the root",
        ),
    ],
)
def test_wrong_types_and_ranges_are_located(tmp_path: Path, text: str, message: str | None) -> None:
    if message is None:
        proj = tmp_path / "proj"
        proj.mkdir()
        (proj / "timespec.toml").write_text("# options\n" + text + "\n")
        assert project_for(proj).seed == 2**63 - 1
        return
    err = _config_error(tmp_path, "# options\n" + text + "\n")
    assert isinstance(err, SpecValueError)
    assert err.path == str(tmp_path / "proj" / "timespec.toml")
    assert (err.line, err.column, err.message) == (2, 1, message)
    assert err.source_line == text


def test_pyproject_error_is_located_in_the_tool_table(tmp_path: Path) -> None:
    text = (
        '[project]\nname = "boards"\nseed = "not ours"\n\n'
        "[tool.timespec]\nsamples = 500\nseed = 2.5\n\n[tool.other]\nseed = 1\n"
    )
    err = _config_error(tmp_path, text, name="pyproject.toml")
    assert err.path == str(tmp_path / "proj" / "pyproject.toml")
    assert (err.line, err.column) == (7, 1)
    assert err.message == "project option 'seed' must be a whole number, not a decimal number"


def test_key_the_scan_cannot_find_is_named_in_the_message(tmp_path: Path) -> None:
    err = _config_error(tmp_path, "tool = {timespec = {sampels = 3}}\n", name="pyproject.toml")
    assert err.line is None
    assert err.message == "unknown project option 'sampels' (key '[tool.timespec] sampels')"
    assert err.location == str(tmp_path / "proj" / "pyproject.toml")


def test_tool_timespec_must_be_a_table(tmp_path: Path) -> None:
    err = _config_error(tmp_path, "[tool]\ntimespec = 3\n", name="pyproject.toml")
    assert (err.line, err.message) == (2, "'tool.timespec' must be a table, not a whole number")


def test_invalid_toml_is_a_located_syntax_error(tmp_path: Path) -> None:
    err = _config_error(tmp_path, "samples = 500\nseed 7\n")
    assert isinstance(err, SpecSyntaxError)
    assert (err.line, err.column, err.source_line) == (2, 6, "seed 7")
    assert err.message.startswith("the project file is not valid TOML: ")
    assert "(at line" not in err.message


def test_two_project_files_in_one_folder_are_an_error(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / "pyproject.toml").write_text("[tool.timespec]\nsamples = 10\n")
    (proj / "timespec.toml").write_text("samples = 20\n")
    with pytest.raises(SpecValueError, match="two project files"):
        project_for(proj)


def test_project_folder_named_like_the_file_is_refused(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    (proj / "timespec.toml").mkdir(parents=True)
    with pytest.raises(SpecValueError, match="it is a folder"):
        project_for(proj)


def test_read_project_file_directly(tmp_path: Path) -> None:
    config = tmp_path / "timespec.toml"
    config.write_text('exclude = ["vendor"]\n')
    assert read_project_file(config) == Project(
        root=tmp_path.resolve(), exclude=("vendor",), file=config
    )


def test_edited_project_file_is_read_again(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    proj.mkdir()
    config = proj / "timespec.toml"
    config.write_text("samples = 10\n")
    assert project_for(proj).samples == 10
    config.write_text("samples = 200\n")
    os.utime(config, ns=(1, 1))  # a different stamp even on a coarse clock
    assert project_for(proj).samples == 200


# ------------------------------------------------------------------ exclude patterns


def test_glob_patterns() -> None:
    assert glob_matches("vendor", "vendor")
    assert not glob_matches("vendor", "vendor/a.tspec")
    assert glob_matches("*.tspec", "a.tspec")
    assert not glob_matches("*.tspec", "sub/a.tspec")
    assert glob_matches("**/draft", "draft")
    assert glob_matches("**/draft", "a/b/draft")
    assert glob_matches("old/**", "old/x/y.tspec")
    assert glob_matches("board?.tspec", "board7.tspec")
    assert glob_matches("rev[ab]", "reva")
    assert not glob_matches("rev[!ab]", "reva")


def test_excludes_folders_and_files_relative_to_the_root(tmp_path: Path) -> None:
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / "timespec.toml").write_text(
        'exclude = ["vendor", "**/draft", "old/*.tspec"]\n', encoding="utf-8"
    )
    project = project_for(proj)
    assert project.excludes(proj / "vendor")
    assert project.excludes(proj / "vendor" / "deep" / "a.tspec")
    assert project.excludes(proj / "boards" / "draft" / "b.tspec")
    assert project.excludes(proj / "old" / "a.tspec")
    assert not project.excludes(proj / "old" / "keep" / "a.tspec")
    assert not project.excludes(proj / "boards" / "a.tspec")
    assert not project.excludes(proj)
    assert not project.excludes(tmp_path / "vendor")  # outside the root


def test_relative_paths_are_taken_from_the_working_folder(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    proj = tmp_path / "proj"
    proj.mkdir()
    (proj / "timespec.toml").write_text('exclude = ["vendor"]\n')
    monkeypatch.chdir(proj)
    project = project_for("boards/a.tspec")
    assert project.file == proj / "timespec.toml"
    assert project.excludes("vendor/a.tspec")
    assert project.relative("boards/a.tspec") == "boards/a.tspec"
    assert project.relative(tmp_path) is None
