"""The README's Python example runs as written: every ```python block of README.md is run with
doctest (the published number it checks is named beside it in the README: formate from H2 and
bicarbonate, Thauer et al. 1977, from memory)."""

from __future__ import annotations

import doctest
import re
from pathlib import Path

README = Path(__file__).resolve().parent.parent / "README.md"


def python_blocks(text: str) -> list[str]:
    """The ```python blocks of a Markdown text.

    >>> python_blocks("a\\n```python\\n>>> 1 + 1\\n2\\n```\\nb")
    ['>>> 1 + 1\\n2\\n']
    """
    return re.findall(r"```python\n(.*?)```", text, flags=re.S)


def test_readme_python_examples_pass():
    blocks = python_blocks(README.read_text(encoding="utf-8"))
    assert blocks, "README.md has no ```python example"
    parser = doctest.DocTestParser()
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    for k, block in enumerate(blocks):
        test = parser.get_doctest(block, {}, f"README.md python block {k + 1}", str(README), 0)
        assert test.examples, f"python block {k + 1} has no >>> example"
        runner.run(test)
    summary = runner.summarize(verbose=False)
    assert summary.failed == 0 and summary.attempted > 0
