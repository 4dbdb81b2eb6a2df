"""Step: how often the answers hold when the reaction energies are drawn from their uncertainty
(a small run in an assessment; ``tfa robustness`` runs large ones)."""

from __future__ import annotations

from ...analyses.robustness import RobustnessResult, robustness
from ...errors import InputError, TfaError
from ..context import RunContext
from ..step import Section, Step


class RobustnessStep(Step):
    """Feasibility and the minimal uphill set over seeded draws of the energies, per mode."""

    id = "robustness"
    label = "robustness"
    title = "Robustness"
    question = "how often do the answers hold over draws of the energies from their uncertainty?"

    def run(self, ctx: RunContext) -> RobustnessResult | None:
        settings = ctx.settings
        if settings.draws == 0:
            return None
        modes = [m for m in ctx.applicable(settings.modes)
                 if not ctx.feasibility(m).demand_impossible]
        if not modes:
            ctx.note("robustness: skipped, no mode can meet the demand at all")
            return None
        total = settings.draws * len(modes) + len(modes)

        def show(done: int, _total: int, _line: dict) -> None:
            ctx.tick(done, total, "draws")

        options = ctx.options
        try:
            return robustness(ctx.model, ctx.environment, n_draws=settings.draws,
                              seed=settings.seed, modes=modes,
                              executor="pool" if settings.workers > 1 else "serial",
                              workers=settings.workers, threshold=False, solver=options.solver,
                              time_limit=options.time_limit,
                              min_driving_force=options.min_driving_force,
                              unknown_energy=options.unknown_energy, progress=show,
                              interval_width=settings.interval_width or None)
        except InputError:
            raise
        except TfaError as err:
            ctx.note(f"robustness: not computed ({err})")
            return None

    def tables(self, result: RobustnessResult | None, ctx: RunContext) -> dict:
        return {} if result is None else result.tables()

    def summary_lines(self, result: RobustnessResult | None, ctx: RunContext) -> list[str]:
        if result is None:
            return []
        lines = [f"robustness ({row.mode}): feasible in {row.feasible_draws} of {row.draws} draws "
                 f"of the energies (95 % interval {row.interval_low:.2f}-{row.interval_high:.2f})"
                 for row in result.feasibility_frame().itertuples() if row.draws]
        if lines and result.stopped_by:
            lines.append(f"robustness: draws stopped by {result.stopped_by}")
        return lines

    def summary_data(self, result: RobustnessResult | None, ctx: RunContext) -> dict:
        if result is None:
            return {}
        return {"robustness": result.feasibility_frame().to_dict(orient="records")}

    def verification(self, result: RobustnessResult | None, ctx: RunContext) -> dict:
        from ...analyses.jobs import points_verification

        return {} if result is None else points_verification(result.records)

    def sections(self, result: RobustnessResult | None, ctx: RunContext) -> list[Section]:
        if result is None:
            return []
        return [Section(self.title,
                        f"Up to {ctx.settings.draws} draws per mode of the reaction energies in "
                        f"compound space (seed {result.seed}), each probability with its 95 % "
                        "Wilson interval (Wilson 1927); a first look, enlarge it with --draws, "
                        "--interval-width or tfa robustness.\n" + result.summary(),
                        tables=[("robustness_feasibility", "Feasibility over the draws"),
                                ("robustness_uphill", "How often each reaction is in the minimal "
                                                      "uphill set")])]
