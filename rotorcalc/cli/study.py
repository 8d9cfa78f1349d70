"""``rotorcalc study``: the probability that a verdict fails over the inputs' tolerances."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Optional

import typer
from rich.markup import escape

from ..errors import InputError
from ..vocabulary import CAUTION
from .common import (EXIT_BAD_INPUT, console, errors, fail_input, input_errors, load,
                     output_errors, print_table, save_figure, write_outputs)
from .whatif_common import check_outputs

EXAMPLE = ("[bold]Example[/]: rotorcalc study cases/compressor_study.toml --samples 200 "
           "--results study.jsonl --json study.json --plot criticals.png\n\n"
           "On a Dask cluster: --scheduler tcp://HOST:8786 (or --scheduler local); "
           "docs/scale.md.")


def _read_results(path, plan):
    """The records a results file already holds for this study (resuming), or none."""
    from ..errors import InputError
    if path is None or not path.exists():
        return []
    lines = path.read_text(encoding="utf-8").splitlines()
    if not lines:
        return []
    try:
        header = json.loads(lines[0])
    except json.JSONDecodeError:
        header = {}
    if header.get("study") != plan.key():
        fail_input(InputError("--results", "holds the samples of another study (or is not a "
                              "results file)", value=str(path), expected="a new file name, or "
                              "the file of this same study to resume it", kind="output"))
    records = []
    for line in lines[1:]:
        try:
            records.append(json.loads(line))
        except json.JSONDecodeError:      # a line cut short by an interruption: run it again
            continue
    return [r for r in records if isinstance(r, dict) and "index" in r]


class _Log:
    """Appends each record to the results file as it comes (flushed: an interruption
    loses only the samples running)."""

    def __init__(self, path, plan, done):
        self.stream = None
        if path is not None:
            # the header and the whole records kept (a line cut short by the interruption
            # is dropped: its sample runs again), then the new ones appended
            from ..output import atomic_write
            atomic_write(path, "".join(json.dumps(r) + "\n" for r in [
                {"study": plan.key(), "format": "rotorcalc-study-1"}, *done]))
            self.stream = open(path, "a", encoding="utf-8")

    def write(self, record):
        if self.stream is not None:
            self.stream.write(json.dumps(record) + "\n")
            self.stream.flush()

    def close(self):
        if self.stream is not None:
            self.stream.close()


def command(
    study: Path = typer.Argument(..., help="Study file (TOML): the rotor, the uncertain "
                                           "inputs and their distributions."),
    samples: Optional[int] = typer.Option(None, "--samples", min=1,
                                          help="Number of samples (default: the file's)."),
    indices: Optional[str] = typer.Option(
        None, "--indices", help="Influence measure: 'rank' (rank correlations over the "
                                "samples) or 'sobol' (also Sobol indices, by Saltelli's and "
                                "Jansen's estimators: samples x (inputs + 2) screenings). "
                                "Default: the file's, else rank."),
    jobs: int = typer.Option(0, "--jobs", min=0, help="Local worker processes (0: one per "
                             "core); with --scheduler local, the LocalCluster's workers."),
    scheduler: Optional[str] = typer.Option(
        None, "--scheduler", help="Run the samples on a Dask scheduler: its address "
                                  "(tcp://HOST:8786) or 'local' for a LocalCluster."),
    results: Optional[Path] = typer.Option(
        None, "--results", help="Keep every sample here as it finishes (JSON lines); run "
                                "again with the same file to resume an interrupted study."),
    json_path: Optional[Path] = typer.Option(None, "--json", help="Write the summary and "
                                             "every sample as JSON."),
    csv_path: Optional[Path] = typer.Option(None, "--csv", help="Write every sample (inputs "
                                            "and outputs) as CSV."),
    plot: Optional[Path] = typer.Option(None, "--plot", help="Picture: each critical "
                                        "speed's distribution against the operating range."),
    plot_probability: Optional[Path] = typer.Option(
        None, "--plot-probability", help="Picture: the probability of failure by kind."),
    plot_influence: Optional[Path] = typer.Option(
        None, "--plot-influence", help="Picture: each input's influence (rank correlation)."),
):
    """Uncertainty study: screen the rotor at every sample of its uncertain inputs and
    report the probability that each check fails (with its confidence interval), the
    percentiles of every critical speed, margin and log decrement, and each input's
    influence."""
    import dataclasses

    from ..analysis.study import run_study
    from ..executor import make_executor
    from ..study_file import checked_indices, read_study
    from ..tables_study import (INFLUENCE_CAPTION, PERCENTILE_COLUMNS, PROBABILITY_COLUMNS,
                                SOBOL_CAPTION, SOBOL_COLUMNS, describe_runs,
                                influence_columns, influence_rows, percentile_rows,
                                sample_columns, sobol_rows)
    outputs = {"--json": json_path, "--csv": csv_path, "--plot": plot,
               "--plot-probability": plot_probability, "--plot-influence": plot_influence,
               "--results": results}
    check_outputs(study, outputs)
    with input_errors():
        rotor_path, plan = read_study(study)
    if samples is not None:
        plan = dataclasses.replace(plan, samples=samples)
    if indices is not None:
        with input_errors():
            plan = dataclasses.replace(plan, indices=checked_indices(indices, "--indices"))
    rotor = load(rotor_path)
    from ..analysis.study import check_plan
    with input_errors():
        try:
            check_plan(rotor, plan)
        except InputError as err:     # named in the study file, not the rotor file
            raise err.with_location(file=str(study)) from None
    if not plan.balanced:
        low, high = plan.nearest_balanced
        errors.print(f"[yellow]warning[/] Sobol points are balanced only in powers of two: "
                     f"{plan.samples} samples converge more slowly than {low} or {high}",
                     highlight=False, soft_wrap=True)
    done = _read_results(results, plan)
    with output_errors(results):
        log = _Log(results, plan, done)
    from .whatif_common import progress_bar
    try:
        with input_errors(), make_executor(jobs, scheduler) as executor:
            runs = describe_runs(plan)
            console.print(f"{runs} ({len(done)} already in {escape(str(results))}) on "
                          f"{escape(executor.name)}" if done
                          else f"{runs} on {escape(executor.name)}", highlight=False)
            with progress_bar("screening samples", plan.runs) as bar:
                found = run_study(rotor, plan, executor, done, progress=bar,
                                  on_record=log.write)
    finally:
        log.close()
    print_table(f"{rotor.name}: probability of failure over "
                f"{plan.independent} samples "
                f"({plan.sampling}, seed {plan.seed})", PROBABILITY_COLUMNS,
                found.probabilities,
                caption=f"Interval: exact binomial (Clopper-Pearson 1934) at "
                        f"{plan.confidence:.0%} confidence. Samples that failed to compute "
                        f"are left out and counted below.")
    print_table("Critical speeds, margins and log decrements over the samples",
                PERCENTILE_COLUMNS, percentile_rows(found),
                caption="Each sample's criticals matched one to one to the rotor's own.")
    print_table("Influence of each input (rank correlation)", influence_columns(found),
                influence_rows(found), caption=INFLUENCE_CAPTION)
    if found.sobol and not any(found.sobol.values()):
        errors.print("[yellow]warning[/] too few complete base rows for Sobol indices (4 or "
                     "more needed: every run of a row must compute); raise --samples",
                     highlight=False, soft_wrap=True)
    elif found.sobol:
        print_table("Sobol indices: the inputs that matter to each output",
                    SOBOL_COLUMNS, sobol_rows(found), caption=SOBOL_CAPTION)
    if found.errors:
        errors.print(f"[yellow]warning[/] {len(found.errors)} sample(s) failed to compute "
                     f"and are left out (first: {escape(found.errors[0]['error'])}); they "
                     "are in the JSON, CSV and results file with their error",
                     highlight=False, soft_wrap=True)
    console.print(f"[dim]{CAUTION}[/]", highlight=False)
    columns = sample_columns(found)
    write_outputs("study", study, found.to_dict, (), json_path, csv_path, columns,
                  found.records)
    from .. import plotting
    for path, draw in ((plot, "plot_study_criticals"), (plot_probability,
                                                        "plot_study_probability"),
                       (plot_influence, "plot_study_influence")):
        if path is not None:
            save_figure(getattr(plotting, draw)(found, rotor.operating).figure, path)
    if found.errors and len(found.errors) == len(found.records):
        raise typer.Exit(EXIT_BAD_INPUT)


def register(app: typer.Typer):
    doc = " ".join(command.__doc__.split())
    app.command("study", help=doc + "\n\n" + EXAMPLE)(command)
