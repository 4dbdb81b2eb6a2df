"""The assessment: a loop over steps, each one analysis (:mod:`tfa.assessment.step`), sharing one
run context (:mod:`tfa.assessment.context`), registered in order (:mod:`tfa.assessment.registry`)
and run by :func:`tfa.assessment.run.assess`; the answers, the summary and the files are an
:class:`~tfa.assessment.result.Assessment`."""

from .context import RunContext, Settings
from .registry import STEPS, get_step, register_step, step_ids, unregister_step
from .result import REPORT_FILE, SUMMARY_FILE, Assessment
from .run import DEFAULT_OUT, assess, run_steps, select_steps
from .step import FigureSpec, Section, Step

__all__ = ["DEFAULT_OUT", "REPORT_FILE", "STEPS", "SUMMARY_FILE", "Assessment", "FigureSpec",
           "RunContext", "Section", "Settings", "Step", "assess", "get_step", "register_step",
           "run_steps", "select_steps", "step_ids", "unregister_step"]
