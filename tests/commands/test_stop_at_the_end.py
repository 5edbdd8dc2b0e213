"""Ctrl-C in the last moments of a run, after its report and files were written, printed a Python traceback ending
in program()'s gc.collect() (hostile tester, sixteenth round, case 08); a stop while the arguments were read did too.
The run's end steps are made to raise KeyboardInterrupt here, as the signal would."""

import pytest

from cfa_tool import cli


def _interrupt(*args, **kwargs):
    raise KeyboardInterrupt


def test_ctrl_c_after_the_work_keeps_the_runs_own_exit_code(monkeypatch, capsys):
    monkeypatch.setattr(cli, "main", lambda: 0)
    monkeypatch.setattr(cli.gc, "collect", _interrupt)
    assert cli.program() == 0
    assert "Traceback" not in capsys.readouterr().err


def test_ctrl_c_while_the_arguments_are_read_is_one_line(monkeypatch, capsys):
    monkeypatch.setattr(cli, "main", _interrupt)
    assert cli.program() == 130
    assert capsys.readouterr().err.strip() == "cfa-tool: interrupted"


def test_a_termination_signal_is_its_own_line_and_code(monkeypatch, capsys):
    def terminated():
        raise cli.Terminated()

    monkeypatch.setattr(cli, "main", terminated)
    assert cli.program() == 143
    assert capsys.readouterr().err.strip() == "cfa-tool: stopped by a termination signal"


@pytest.fixture(autouse=True)
def _keep_the_signal_handler():
    import signal

    before = signal.getsignal(signal.SIGTERM)
    yield
    signal.signal(signal.SIGTERM, before)
