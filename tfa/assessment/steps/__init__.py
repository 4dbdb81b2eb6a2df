"""The steps of an assessment, one module per analysis (see :mod:`tfa.assessment.step`)."""
