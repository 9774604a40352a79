"""The Markdown scanner's time grows linearly with the note, whatever the note repeats.

Each construct below once made the scanner super-linear (a nesting of list
markers read again from every marker, a regular expression backtracking over a
run of spaces, a look-ahead from every display-math opener to its closer, a
link label normalised once per bracket).  Each is generated at three sizes, each
four times the last, and scanned afresh (every cache emptied); the time per
size is the best of three runs, measured as this process's CPU time (so other
work on the machine counts little).  Linear growth makes each step about 4x and
quadratic 16x: a step must stay below 8x.  Only ratios are compared, never a
time.  Every generated note also keeps its one annotation: text past the nesting
cap is read as text, nothing is lost.

Under ``make fuzz`` a search also tries repetitions of every block and inline
opener the scanner knows, alone and two together, and reports any shape whose
time grows clearly faster than its size (common practice, no source).
"""

from __future__ import annotations

import gc
import itertools
import random
import time
from collections.abc import Callable

import pytest

from notelsp.notation import markdown_blocks, scan, scanner

from .scale import FUZZ, scaled, tried

SIZES = (10_000, 40_000, 160_000) if FUZZ else (2_500, 10_000, 40_000)  # characters
STEP_RATIO_LIMIT = 8.0  # linear growth is 4x a step, quadratic 16x
ANNOTATION = "{H2O: bent}"

CONSTRUCTS: dict[str, Callable[[int], str]] = {
    "list markers nested on one line": lambda n: "- " * (n // 2) + "a " + ANNOTATION + "\n",
    "list markers nested, then blank lines": lambda n: "- " * (n // 4) + "a " + ANNOTATION + "\n" + "\n" * (n // 2),
    "list markers nested, then indented lines": (
        lambda n: "- " * 200 + "a " + ANNOTATION + "\n" + (" " * 400 + "b\n") * (n // 402)
    ),
    "block quotes nested on one line": lambda n: "> " * (n // 2) + "a " + ANNOTATION + "\n",
    "block quotes nested, then lines": lambda n: "> " * 100 + "a " + ANNOTATION + "\n" + ("> " * 100 + "b\n") * (n // 202),
    "spaces before a closing '#x' in a heading": lambda n: "# " + ANNOTATION + " " * n + "#x\n",
    "display-math openers in a list item": lambda n: "- a " + ANNOTATION + "\n\n" + "  $$ x\n\n" * (n // 8) + "$$\n",
    "display-math openers in a block quote": lambda n: "> a " + ANNOTATION + "\n" + "> $$ x\n>\n" * (n // 9) + "> $$\n",
    "brackets nested, a reference defined": lambda n: "[a]: /u\n\n" + "[ " * (n // 4) + ANNOTATION + " ]" * (n // 4) + "\n",
    "brackets opened, a reference defined": lambda n: "[a]: /u\n\n" + "[" * n + "a] " + ANNOTATION + "\n",
    "a long fence closed in a quote": lambda n: "> " + "`" * (n // 4) + "\n" + "> x\n" * (n // 8) + "\n" + ANNOTATION + "\n",
    # An unclosed code span (or math) was looked for again from each opener, over every run after it.
    "backtick pairs between escapes": lambda n: "``\\" * (n // 3) + " " + ANNOTATION + "\n",
    "dollars between escapes": lambda n: "$a\\$" * (n // 4) + " " + ANNOTATION + "\n",
    # Markdown as people write it: front matter, strikethrough, wiki links, directives, admonitions.
    "unclosed front matter": lambda n: "---\n" + "a: b\n" * (n // 5) + ANNOTATION + "\n",
    "strikethrough runs": lambda n: "~~a *b " * (n // 7) + ANNOTATION + "\n",
    "wiki-link openers": lambda n: "[[a|" * (n // 4) + " " + ANNOTATION + "\n",
    "admonitions nested, then blank lines": (
        lambda n: "".join("    " * i + "!!! note\n" for i in range(40)) + " " * 160 + "a " + ANNOTATION + "\n"
        + ("\n" + " " * 160 + "b\n") * (n // 164)
    ),
    "directives nested, then lines": (
        lambda n: ":::{note}\n" * 40 + "a " + ANNOTATION + "\n" + "b\n" * (n // 2)
    ),
    # Directives were not under the nesting cap: each unclosed opener nested in the one before.
    "directive openers repeated": lambda n: ":::{note}\n" * (n // 10) + ANNOTATION + "\n",
    "backtick directive openers repeated": lambda n: "```{note} a\n" * (n // 12) + ANNOTATION + "\n",
}


def _scan_afresh(text: str):
    """Scan ``text`` with every cache of the scanner emptied (nothing remembered from a run before; no
    block memory is passed, so nothing of another document is either)."""
    scanner._inline_groups.cache_clear()
    scanner._block_body.cache_clear()
    markdown_blocks._paragraph_pieces.cache_clear()
    return scan(text, "markdown")


def _cpu_seconds(text: str, runs: int, repeat: int = 3) -> float:
    """The best of ``repeat`` timings of ``runs`` fresh scans, per scan."""
    best = float("inf")
    enabled = gc.isenabled()
    gc.disable()
    try:
        for _ in range(repeat):
            started = time.process_time()
            for _ in range(runs):
                _scan_afresh(text)
            best = min(best, (time.process_time() - started) / runs)
    finally:
        if enabled:
            gc.enable()
    return best


def _step_ratios(make: Callable[[int], str], sizes: tuple[int, ...]) -> list[float]:
    """t(next size) / t(size) for each step.  Smaller sizes are scanned more times per timing,
    so every timing covers about as many characters as the largest size."""
    times = [_cpu_seconds(make(size), max(1, sizes[-1] // size)) for size in sizes]
    return [later / max(earlier, 1e-9) for earlier, later in zip(times, times[1:])]


@pytest.mark.timeout(600)
@pytest.mark.parametrize("construct", sorted(CONSTRUCTS))
def test_scanning_time_grows_linearly(construct):
    make = CONSTRUCTS[construct]
    text = make(SIZES[0])
    bodies = [text[body_start:body_end] for _, _, body_start, body_end, _, _ in _scan_afresh(text).found]
    assert bodies == [ANNOTATION[1:-1]], f"{construct}: the annotation is lost ({bodies})"
    ratios = _step_ratios(make, SIZES)
    tried("constructs timed at three sizes (linear-time check)")
    print(f"\n{construct}: time ratios per 4x size {[round(r, 1) for r in ratios]} (sizes {SIZES})")
    assert max(ratios) < STEP_RATIO_LIMIT, f"{construct}: time grew {ratios} for sizes {SIZES}"


# --- searching for new super-linear shapes ----------------------------------------------------

# What opens a block or an inline construct (CommonMark 0.31, GFM tables and strikethrough,
# dollar math, front matter, wiki links, MyST directives, admonitions).
BLOCK_OPENERS = (
    ">", "> ", "- ", "* ", "+ ", "1. ", "1) ", "# ", "###### ", "    ", "\t", "```", "~~~", "```bonding",
    "```{note}", ":::", ":::{note}", "$$", "<div>", "<!--", "<?", "<!X", "<![CDATA[", "<script>", "[a]: ",
    "| a |", "|---|", "---", "===", "***", "!!! note", "??? note", "+++",
)
INLINE_OPENERS = (
    "`", "``", "$", "\\", "<", "<a ", "<!-- ", "[", "![", "](", "[a](", "[a][", "~~", "~", "[[", "]]", "[[a|",
    "{", "}", '"', "(", "*", "_", "|", ":", "]:", "# ",
)
SEARCH_SIZES = (2_000, 16_000)  # 8x the characters: linear is 8x the time, quadratic 64x
# A shape that grows too fast at those sizes is timed again at larger ones: below the nesting
# cap the work per line grows with the depth, which the larger sizes are past.
CONFIRM_SIZES = (8_000, 64_000)
SEARCH_RATIO_LIMIT = 24.0
SEARCH_SEED = 20261203


def _shapes(opener: str, other: str | None) -> list[tuple[str, Callable[[int], str]]]:
    """Notes repeating ``opener`` (with ``other``, when given, nested or alternating)."""
    if other is None:
        return [
            (f"{opener!r} on one line", lambda n: opener * (n // len(opener)) + " " + ANNOTATION + "\n"),
            (f"{opener!r} lines", lambda n: (opener + "\n") * (n // (len(opener) + 1)) + ANNOTATION + "\n"),
            (f"{opener!r} lines of text", lambda n: (opener + " a " + ANNOTATION + "\n") * (n // (len(opener) + 15))),
            (f"{opener!r} paragraphs", lambda n: (opener + " a\n\n") * (n // (len(opener) + 4)) + ANNOTATION + "\n"),
        ]
    pair = opener + other
    return [
        (f"{opener!r} then {other!r}", lambda n: opener * (n // (2 * len(opener))) + other * (n // (2 * len(other))) + ANNOTATION + "\n"),
        (f"{pair!r} repeated", lambda n: pair * (n // len(pair)) + " " + ANNOTATION + "\n"),
        (f"{opener!r} nesting {other!r} lines", lambda n: (opener * 20 + other + " a\n") * (n // (20 * len(opener) + len(other) + 3))),
    ]


def _search_space() -> list[tuple[str, Callable[[int], str]]]:
    shapes = [shape for opener in BLOCK_OPENERS + INLINE_OPENERS for shape in _shapes(opener, None)]
    pairs = list(itertools.product(BLOCK_OPENERS, repeat=2)) + list(itertools.product(INLINE_OPENERS, repeat=2))
    if not FUZZ:  # a sample in the normal run, so the search itself is kept working
        rng = random.Random(SEARCH_SEED)
        shapes = rng.sample(shapes, 12)
        pairs = rng.sample(pairs, 6)
    return shapes + [shape for first, second in pairs for shape in _shapes(first, second)]


def _search_ratio(make: Callable[[int], str], sizes: tuple[int, int] = SEARCH_SIZES) -> float:
    small, large = sizes
    return _cpu_seconds(make(large), 1, repeat=2) / max(_cpu_seconds(make(small), large // small, repeat=2), 1e-9)


@pytest.mark.timeout(3600)
def test_no_repeated_opener_makes_scanning_super_linear():
    suspects = []
    shapes = _search_space()
    for name, make in shapes:
        if _search_ratio(make) > SEARCH_RATIO_LIMIT and (ratio := _search_ratio(make, CONFIRM_SIZES)) > SEARCH_RATIO_LIMIT:
            suspects.append((name, round(ratio, 1)))
    tried("shapes of repeated openers searched for super-linear time", len(shapes))
    print(f"\n{len(shapes)} shapes of repeated openers timed at {SEARCH_SIZES} characters, {len(suspects)} super-linear")
    assert not suspects, f"time grew more than {SEARCH_RATIO_LIMIT}x for 8x the size: {suspects}"
