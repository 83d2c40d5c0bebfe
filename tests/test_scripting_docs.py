"""docs/scripting.md runs: every ```python block, in order, in one shared namespace.

Like a doctest session: a block may use what an earlier block defined. The blocks run in a
temporary working directory (they write site files and a CSV there). A block that raises fails
the test with its number, its first line in the document and the traceback; what the blocks
printed so far is shown with it.
"""

import contextlib
import io
import re
import traceback
from pathlib import Path

import pytest

DOC = Path(__file__).resolve().parents[1] / "docs" / "scripting.md"
FENCE = re.compile(r"^```python[ \t]*\n(.*?)^```[ \t]*$", re.DOTALL | re.MULTILINE)


def python_blocks(text: str) -> list[tuple[int, str]]:
    """(line of the block's first code line, code) for each ```python block, in order."""
    return [(text.count("\n", 0, m.start(1)) + 1, m.group(1)) for m in FENCE.finditer(text)]


def test_fence_pattern_finds_blocks_and_their_lines():
    text = "intro\n```python\nx = 1\n```\ntext\n```\nnot python\n```\n```python\ny = x\n```\n"
    assert python_blocks(text) == [(3, "x = 1\n"), (10, "y = x\n")]


def test_the_document_opens_with_the_caution():
    head = DOC.read_text(encoding="utf-8")[:1200].lower()
    assert "preliminary feasibility estimate" in head
    assert "local codes" in head and "licensed installers" in head


def test_every_python_block_runs(tmp_path, monkeypatch):
    text = DOC.read_text(encoding="utf-8")
    blocks = python_blocks(text)
    assert len(blocks) >= 10, "docs/scripting.md lost its examples"
    monkeypatch.chdir(tmp_path)
    namespace = {"__name__": "__scripting_docs__"}
    out = io.StringIO()
    for number, (line, code) in enumerate(blocks, start=1):
        try:
            compiled = compile(code, f"{DOC.name}:block {number} (line {line})", "exec")
            with contextlib.redirect_stdout(out):
                exec(compiled, namespace)
        except Exception as err:  # noqa: BLE001 - any failure of a block is the finding
            failure = (f"docs/scripting.md block {number} (line {line}) raised "
                       f"{type(err).__name__}: {err}\n\n{traceback.format_exc()}\n"
                       f"printed so far:\n{out.getvalue()[-3000:]}")
        else:
            continue
        pytest.fail(failure, pytrace=False)
    # each block printed something a reader can look at
    assert out.getvalue().count("\n") >= len(blocks)


def test_the_readme_scripting_example_runs(tmp_path, monkeypatch):
    readme = DOC.parents[1] / "README.md"
    text = readme.read_text(encoding="utf-8")
    section = text[text.index("\n## Scripting\n"):]
    section = section[:section.index("\n## ", 1)]
    blocks = python_blocks(section)
    assert len(blocks) == 1
    monkeypatch.chdir(tmp_path)
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(blocks[0][1], "README.md:Scripting", "exec"), {})
    assert "->" in out.getvalue()
