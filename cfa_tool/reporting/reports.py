"""Which report each command's result has (cfa_tool.reporting.document), and the report a saved JSON result
carries."""

from __future__ import annotations

import re
import sys
from dataclasses import replace

from cfa_tool.data.csv_convention import convention_in
from cfa_tool.errors import OptionError
from cfa_tool.note_parts import Name, Note, Text, capitalised
from cfa_tool.numbers import word_list
from cfa_tool.version import check_written_version
from cfa_tool.reporting.document import Report, ResultKind


# the classes of each command's result: (kind, module or modules, class names), the fit's first
_RESULT_CLASSES = (
    (ResultKind.FIT, "cfa_tool.pipeline.results", ("FitResult",)),
    (ResultKind.CHECK, "cfa_tool.pipeline.results", ("CheckResult",)),
    (ResultKind.COMPARE, "cfa_tool.workflows.compare", ("Comparison",)),
    (ResultKind.INVARIANCE, ("cfa_tool.workflows.invariance", "cfa_tool.workflows.occasions"),
     ("InvarianceResult", "OccasionsResult")),  # across groups; over occasions of the same people
    (ResultKind.REPLICATE, "cfa_tool.workflows.replication", ("Replication", "Replications")),
    (ResultKind.BOOTSTRAP, "cfa_tool.workflows.bootstrap", ("BootstrapResult",)),
    (ResultKind.CUTOFFS, "cfa_tool.workflows.cutoffs", ("CutoffResult",)),
    (ResultKind.POWER, ("cfa_tool.workflows.power", "cfa_tool.workflows.power_nested"),
     ("PowerResult", "NestedPower")),  # of an RMSEA test; of the difference test against a nested model
    (ResultKind.POWER_SIMULATION, ("cfa_tool.workflows.montecarlo", "cfa_tool.workflows.group_power"),
     ("MonteCarloPower", "PowerCurve", "InvariancePower")),  # one group; several groups (--group-sizes)
    (ResultKind.SIMULATE, "cfa_tool.workflows.simulation", ("SimulatedData",)),
    (ResultKind.SCORES, "cfa_tool.workflows.factor_scores", ("ScoreResult",)),
    (ResultKind.EXPLORE, "cfa_tool.workflows.explore", ("ExploreResult",)),
    (ResultKind.ALIGN, "cfa_tool.workflows.alignment", ("AlignmentResult",)),
)


def kind_of(result: object) -> ResultKind:
    """The command whose result ``result`` is.  A module not yet imported holds no class of ``result``, so it is
    passed over, not imported (the workflows' modules would double the start of ``cfa-tool fit``)."""
    for kind, names, classes in _RESULT_CLASSES:
        for name in (names,) if isinstance(names, str) else names:  # results in several modules: each module's
            module = sys.modules.get(name)
            if module is not None and isinstance(result, tuple(getattr(module, c) for c in classes
                                                               if hasattr(module, c))):  # classes among them
                return kind
    raise TypeError(f"no report for a {type(result).__name__}")


def report_of(result: object) -> Report:
    """The report of any command's result, made once for every format."""
    kind = kind_of(result)
    if kind is ResultKind.FIT:
        from cfa_tool.reporting.fit_document import fit_report

        return fit_report(result)
    if kind is ResultKind.SCORES:
        from cfa_tool.reporting.score_report import scores_report

        return scores_report(result)
    if kind is ResultKind.EXPLORE:
        from cfa_tool.reporting.explore_report import explore_report

        return explore_report(result)
    group_power = sys.modules.get("cfa_tool.workflows.group_power")  # a plan with groups: its own report
    if group_power is not None and isinstance(result, group_power.InvariancePower):
        from cfa_tool.reporting.group_power_report import invariance_power_report

        return invariance_power_report(result)
    occasions = sys.modules.get("cfa_tool.workflows.occasions")  # a ladder over occasions: its own report
    if occasions is not None and isinstance(result, occasions.OccasionsResult):
        from cfa_tool.reporting.occasions_report import occasions_report

        return occasions_report(result)
    if kind is ResultKind.ALIGN:
        from cfa_tool.reporting.align_report import alignment_report

        return alignment_report(result)
    from cfa_tool.reporting import workflow_tables

    return workflow_tables.BUILDERS[kind](result)


def saved_report(payload: object, source: str) -> Report:
    """The report a saved JSON result carries; a one-line error naming ``source`` when it is not one."""
    if isinstance(payload, dict) and "tool" not in payload and isinstance(payload.get("estimates"), list):
        raise OptionError(f"{source}: a result's to_dict() saved from Python holds no report to render; write the "
                          f"file with the command's --json option")
    if not isinstance(payload, dict) or payload.get("tool") != "cfa-tool":
        raise OptionError(f"{source}: not a result written by cfa-tool (the file of a command's --json option)")
    check_written_version(payload, source)
    saved = payload.get("report")
    if saved is None:
        raise OptionError(f"{source}: this result holds no 'report' part (written before results carried their report, "
                          f"or removed by hand), so there is nothing to show; run the command again with --json")
    try:
        report = Report.from_dict(saved)
    except (KeyError, TypeError, ValueError, AttributeError):
        raise OptionError(f"{source}: the report in this result is incomplete or changed by hand; run the command "
                          f"again with --json") from None
    if isinstance(saved, dict) and "files" not in saved:  # saved before reports listed the user's files
        report = replace(report, files=saved_paths(report, payload))
    if isinstance(saved, dict) and "data_read" not in saved:  # saved before reports recorded it: the data's
        report = replace(report, data=data_in(payload))
    if isinstance(saved, dict) and "csv_convention" not in saved:  # saved before reports recorded it: the data's
        report = replace(report, csv_convention=convention_in(payload))
    return _with_estimate_problems(report, payload, source)


def data_in(payload: dict) -> tuple | None:
    """The data file a result saved before its report recorded it (document.DataRead) read, where the result says
    (a fit's and an exploration's 'data' part: its source, row filters and missing codes; no checksum); None where
    it does not."""
    from cfa_tool.reporting.document import DataRead

    data = payload.get("data")
    if not isinstance(data, dict) or not isinstance(data.get("source"), str) or not data["source"]:
        return None
    codes = data.get("missing_codes") if isinstance(data.get("missing_codes"), list) else []
    filters = data.get("row_filters") if isinstance(data.get("row_filters"), list) else []
    reading = ([f"code{'s' if len(codes) > 1 else ''} {word_list([str(c) for c in codes])} read as missing"] if codes else []) + \
        [f"rows where {f}" for f in filters]
    return (DataRead(data["source"], "", tuple(reading)),)


#: a path that names folders, as a report's words give a file: from the root ('/home/x/data.csv'), the home
#: ('~/data.csv'), the working folder ('./x', '../x') or a drive ('C:\\x\\data.csv'); not inside a web address
#: ('https://doi.org/...') nor a word ('and/or')
_PATH = re.compile(r"(?<![\w:/.~\\-])(?:~|\.{1,2})?/(?:[^\s/;,()'\"\[\]]+/)+[^\s/;,()'\"\[\]]+"
                   r"|(?<![\w])[A-Za-z]:\\(?:[^\s\\;,()'\"\[\]]+\\)+[^\s\\;,()'\"\[\]]+")


def saved_paths(report: Report, payload: dict) -> tuple[str, ...]:
    """The user's files of a result saved before its report listed them (Report.files; re-check s18, R7: 'report
    OLD.json --docx' printed 'Model file: /work/.../x.cfa' in Word): the model's and the data's ``source`` the result
    holds, and the paths that name folders in the report's own lines, found by their form, so that the views written
    for others name every file by its name whatever the result's age (document.by_file_name)."""
    found: list[str] = []

    def sources(part) -> None:
        if isinstance(part, dict):
            for key, value in part.items():
                if key == "report":
                    continue
                if key == "source" and isinstance(value, str):
                    found.append(value)
                else:
                    sources(value)
        elif isinstance(part, list):
            for value in part:
                sources(value)

    sources(payload)
    notice = report.notice.lines if report.notice is not None else ()
    tables = [t for t in (*report.tables, report.problem_table) if t is not None]
    cells = [cell for t in tables for row in t.rows for cell in row]
    for line in (report.title, *notice, *report.lines, *report.warnings, *report.notes, *report.cautions,
                 *(t.title for t in tables), *(t.note for t in tables if t.note), *cells):
        found += [path.rstrip(".") for path in _PATH.findall(str(line))]
    return tuple(dict.fromkeys(p for p in found if p and ("/" in p or "\\" in p)))


_NESTED_NAMES = {"calibration": "the calibration fit", "loose": "the loose refit"}


def _fits_in(payload: dict, where: str = "") -> list[tuple[str, dict]]:
    """Every fit a saved result holds, with the name its report gives it: the result itself when it is a fit (or a
    result of scores, which carries its fit's problems), and each fit nested in it (the models of a comparison, the
    steps of an invariance ladder, the fits of a replication): a part with an 'admissible' flag and a list of
    'problems'.  The saved report itself is not searched."""
    found = []
    if "admissible" in payload and isinstance(payload.get("problems"), list):
        name = payload.get("name") if isinstance(payload.get("name"), str) else None
        level = payload.get("level") if isinstance(payload.get("level"), str) else None
        # a model's name as given (note_parts.Name: never recased at a line's start), else words naming the fit
        found.append((Name(name) if name else (f"the {level} model" if level else None) or _NESTED_NAMES.get(where)
                      or "this fit", payload))
    for key, value in payload.items():
        if key == "report":
            continue
        for part in (value if isinstance(value, list) else [value]):
            if isinstance(part, dict):
                found += _fits_in(part, key)
    return found


def _with_estimate_problems(report: Report, payload: dict, source: str) -> Report:
    """``report`` with, first, the problems of every fit the result holds that its saved report does not show (a
    file changed after the run): a fit's estimates, when the file has them, are judged as a fresh fit's are (rows
    that cannot be read are an error, by the one reader of saved estimates), and the problems each fit lists that
    make it inadmissible must be said by the saved report (the fit marked inadmissible and the report's notice an
    inadmissible one)."""
    from dataclasses import replace

    from cfa_tool.assessment.admissibility import estimate_row_problems, listed_problems
    from cfa_tool.model.saved_estimates import saved_rows
    from cfa_tool.reporting.tables import NOT_ADMISSIBLE, ProblemNotice
    from cfa_tool.reporting.workflow_tables import SOME_NOT_ADMISSIBLE

    old = report.notice.lines if report.notice is not None else ()
    lines: list[Text] = []
    if "estimates" in payload:
        listed = payload.get("problems")
        known = {(q.get("kind"), tuple(q.get("parameters", ()))) for q in listed if isinstance(q, dict)} \
            if isinstance(listed, list) else set()
        lines += [f"The estimates in this file differ from the fit its report describes (changed after the fit?), and "
                  f"they are not admissible: {q.explanation} Fit the model again rather than edit its result."
                  for q in estimate_row_problems(saved_rows(payload["estimates"], source))
                  if (q.kind.value, q.parameters) not in known]
    for name, fit in _fits_in(payload):
        if fit.get("converged", True) is False:  # its views say it did not converge
            continue
        # shown: the fit is marked inadmissible and the saved report opens with an inadmissible notice (the flags,
        # not the notice's words, decide); otherwise the problems it lists that make it inadmissible come first
        said = fit.get("admissible") is False and report.notice is not None and report.notice.inadmissible
        unshown = [] if said else [q for q in listed_problems(fit["problems"], source) if q.kind.inadmissible]
        who = Note((name,)) if isinstance(name, Name) else capitalised(name)
        lines += [who + (f" is not admissible, and the report saved with it does not say so (changed after the "
                         f"run?): {q.explanation} Do not interpret its estimates or fit.") for q in unshown]
        if fit.get("admissible") is False and not said and not unshown:
            lines.append(who + " is marked not admissible in this file, and the report saved with it does not say "
                               "so (changed after the run?): do not interpret its estimates or fit.")
    if not lines:
        return report
    if report.notice is not None and report.notice.inadmissible:
        heading = report.notice.heading
    else:
        heading = NOT_ADMISSIBLE if "estimates" in payload else SOME_NOT_ADMISSIBLE
    kept = report.notice.leading if report.notice is not None and report.notice.inadmissible else 0
    return replace(report, notice=ProblemNotice(heading, tuple(lines) + old, True, leading=len(lines) + kept))
