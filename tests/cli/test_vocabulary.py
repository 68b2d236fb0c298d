"""One vocabulary of options: the same option names for the same things in every command.

Walks every sub-command's parser (nested ones too).  A command that fails
here should adopt the helpers of ``certify/commands/options.py``
(add_target, add_json, add_out, add_name, add_progress, add_limits).
"""

from __future__ import annotations

import argparse

import pytest

from certify.cli import build_parser

# commands that compute a result: --json PATH; that write files: --out DIR;
# that aim at a target: --digits D; that can run long: a progress display.
PRODUCES_RESULT = {"race", "residues", "weighted", "certificate", "verify", "check", "claims",
                   "demo", "table", "ffrace", "fflpoly", "curve", "twists", "ecrace", "lirace", "order"}
WRITES_FILES = {"certificate", "render", "check", "claims", "demo", "table", "twists"}
HAS_TARGET = {"race", "residues", "weighted", "certificate", "check", "claims", "table", "ffrace",
              "curve", "twists", "ecrace", "lirace", "order"}
LONG_RUNNING = {"verify", "claims", "table", "twists", "race", "residues", "weighted", "certificate",
                "check", "ffrace", "curve", "ecrace", "lirace", "order"}
SIZE_LIMITED = {"race", "residues", "weighted", "certificate", "verify", "check", "claims", "table",
                "ffrace", "fflpoly", "curve", "twists", "order", "ecrace", "lirace"}

# the one name for each thing, and the names that must not appear for it
CANONICAL = {
    "target": "--digits",
    "json": "--json",
    "folder": "--out",
    "progress": "--no-progress",
    "limits": "--limit",
    "base name": "--name",
}
FORBIDDEN = {"--output", "--outdir", "--out-dir", "--output-dir", "--dir", "--target",
             "--precision", "--prec", "--json-out", "--json-file", "--progress", "--silent",
             "--basename", "--file-name", "--max-width", "--start", "--max"}


def _commands():
    parser = build_parser()
    out = {}

    def walk(p, prefix):
        for a in p._actions:
            if isinstance(a, argparse._SubParsersAction):
                for name, sp in a.choices.items():
                    out[(prefix + " " + name).strip()] = sp
                    walk(sp, prefix + " " + name)

    walk(parser, "")
    return out


COMMANDS = _commands()


def _options(p):
    return [a for a in p._actions if a.option_strings and not isinstance(a, argparse._HelpAction)]


def _flags(p):
    return {s for a in _options(p) for s in a.option_strings}


def test_every_command_is_walked():
    assert {"race", "certificate", "verify", "table", "cache show", "ffrace", "curve"} <= set(COMMANDS)
    top = {c for c in COMMANDS if " " not in c}
    unknown = top - PRODUCES_RESULT - WRITES_FILES - {"cache", "render"}
    # a new command must be classified here (and follow the vocabulary)
    assert not unknown, f"classify the new command(s) {sorted(unknown)} in this test"


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_every_option_and_argument_has_help(name):
    p = COMMANDS[name]
    for a in p._actions:
        if isinstance(a, (argparse._HelpAction, argparse._SubParsersAction, argparse._VersionAction)):
            continue
        if a.help == argparse.SUPPRESS:  # a hidden alias of a documented option
            assert any(a.dest == b.dest and b.help not in (None, argparse.SUPPRESS)
                       for b in p._actions if b is not a), f"{name}: hidden {a.option_strings} aliases nothing"
            continue
        assert a.help and len(a.help) > 8, f"certify {name}: {a.option_strings or a.dest} has no help text"


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_same_names_for_the_same_things(name):
    p = COMMANDS[name]
    flags = _flags(p)
    bad = flags & FORBIDDEN
    assert not bad, f"certify {name}: use {CANONICAL} instead of {sorted(bad)}"
    for a in _options(p):
        s = set(a.option_strings)
        # --json always takes a PATH (- for standard output), never a bare flag only
        if "--json" in s:
            assert a.nargs in (None, "?") and a.metavar == "PATH", f"certify {name}: --json PATH"
        if "--out" in s:
            assert a.metavar == "DIR" and "-o" in s, f"certify {name}: --out/-o DIR"
        if "--digits" in s:
            assert "-d" in s and a.metavar == "D", f"certify {name}: --digits/-d D"
        if "--name" in s:
            assert a.metavar == "BASE", f"certify {name}: --name BASE"
        if "--limit" in s:
            assert a.metavar == "KEY=N" and a.nargs is None, f"certify {name}: --limit KEY=N"
    # a width option is only an alias of --digits
    if "--width" in flags:
        assert "--digits" in flags, f"certify {name}: --width without --digits"
    # --quiet, where kept, is an alias of --no-progress
    if "--quiet" in flags:
        assert "--no-progress" in flags, f"certify {name}: --quiet without --no-progress"


@pytest.mark.parametrize("name", sorted(PRODUCES_RESULT))
def test_commands_with_a_result_take_json_path(name):
    assert "--json" in _flags(COMMANDS[name]), f"certify {name} needs --json PATH"


@pytest.mark.parametrize("name", sorted(WRITES_FILES))
def test_commands_writing_files_take_out_dir(name):
    assert "--out" in _flags(COMMANDS[name]), f"certify {name} needs --out DIR"


@pytest.mark.parametrize("name", sorted(HAS_TARGET))
def test_commands_with_a_target_take_digits(name):
    assert "--digits" in _flags(COMMANDS[name]), f"certify {name} needs --digits D"


@pytest.mark.parametrize("name", sorted(LONG_RUNNING))
def test_long_commands_show_progress_and_can_hide_it(name):
    assert "--no-progress" in _flags(COMMANDS[name])


@pytest.mark.parametrize("name", sorted(SIZE_LIMITED))
def test_commands_with_a_size_take_limit(name):
    assert "--limit" in _flags(COMMANDS[name])


def test_working_display_is_off_when_not_a_terminal(capsys):
    """The elapsed-time display writes nothing when standard error is not a terminal."""
    from certify.commands.options import working

    with working("certifying something", True):
        pass
    assert capsys.readouterr().err == ""


# one cheap run of each command whose stages can take long: (argv, what its display shows)
_STAGED = [
    (["ffrace", "3", "t^2+1", "t+1", "1", "--digits", "4", "--leaders", "5"], "ffrace: "),
    (["curve", "5", "t^2+1", "t^3+2", "--digits", "3"], "curve: "),
    (["ecrace", "[0,-1,1,-10,-20]", "--digits", "2", "--observe", "100"], "ecrace: "),
    (["lirace", "--digits", "3"], "lirace: "),
    (["order", "5", "1", "2", "3", "--digits", "2"], "order: "),
]


@pytest.mark.parametrize("argv,shown", _STAGED, ids=[a[0] for a, _ in _STAGED])
def test_progress_is_off_off_a_terminal_and_on_on_one(argv, shown, capsys, make_terminal):
    """Each stage's display: nothing on a pipe or a log, shown on a terminal, hidden there by
    --no-progress; the result on standard output is the same."""
    from certify.cli import main

    assert main(argv) in (0, 5)
    out, err = capsys.readouterr()
    assert shown not in err and "\r" not in err, err[:300]
    term = make_terminal()
    assert main(argv) in (0, 5)
    assert shown in term.getvalue(), term.getvalue()[:300]
    out2 = capsys.readouterr().out
    assert out2.splitlines()[:2] == out.splitlines()[:2]
    term2 = make_terminal()
    assert main(argv + ["--no-progress"]) in (0, 5)
    assert shown not in term2.getvalue()


def test_help_lists_the_same_names(capsys):
    """``certify <command> --help`` shows the canonical names (what a user reads)."""
    from certify.cli import main

    for name in ("race", "certificate", "table", "ffrace", "curve"):
        with pytest.raises(SystemExit):
            main([name, "--help"])
        text = capsys.readouterr().out
        assert "--digits D" in text and "--json [PATH]" in text, name


def test_citations_name_no_author():
    """Sources are cited by title, venue and year (a project convention): no author names."""
    import pathlib
    import re

    root = pathlib.Path(__file__).resolve().parents[2]
    authors = re.compile(r"\b(Rubinstein|Sarnak|Watson|Johansson|Deligne|Papadopoulos|Raynaud|"
                         r"Odlyzko|Platt|Rumely|Fiorilli|Granville|Feuerverger|Lamzouri|Mazur|"
                         r"Rohrlich|Buhler|Zagier|Ulmer|Jouve)\b"
                         r"|(?:\"|^\s*[*-] )(?:[A-Z]\. ?)+[A-Z][a-z]+(?:, | and )")  # "A. Name, Title"
    hits = []
    for folder in ("certify", "docs", "templates", "tests"):
        for p in (root / folder).rglob("*"):
            if p.suffix in (".py", ".md", ".j2", ".json", ".claims") and p.is_file():
                if p.name == "test_vocabulary.py":
                    continue
                for i, line in enumerate(p.read_text(encoding="utf-8", errors="replace").splitlines(), 1):
                    if authors.search(line):
                        hits.append(f"{p.relative_to(root)}:{i}")
    readme = (root / "README.md").read_text(encoding="utf-8")
    hits += [f"README.md:{i}" for i, ln in enumerate(readme.splitlines(), 1) if authors.search(ln)]
    assert not hits, hits[:10]
