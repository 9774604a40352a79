"""Pure-analysis figures: scan_ratio and explain_us.

scan_ratio: a full review of the synthetic notebook (a warm process, cold
caches) divided by one regular-expression pass over the same text for brace
groups — the floor any scanner has to pay.
explain_us: mean time of one uncached analysis of a seven-domain mixed-ligand
species, isomer enumeration included.
"""

from __future__ import annotations

import re
import statistics
import time

from notebook import make_notebook


def _best_of(repeats: int, work) -> float:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        work()
        times.append(time.perf_counter() - start)
    return min(times)


def _clear_caches() -> None:
    from notelsp.chem import analysis as chem_analysis
    from notelsp.review import document

    document._cached_review.cache_clear()
    for name in dir(chem_analysis):
        cached = getattr(getattr(chem_analysis, name), "cache_clear", None)
        if cached:
            cached()


def scan_ratio(text: str) -> float:
    from notelsp.elements import preload
    from notelsp.review.document import review_text

    preload()  # element data is loaded once per process; not part of a check
    review_text("{H2O: bent}", "markdown")  # import and first-use costs out of the way
    brace = re.compile(r"\{[^{}\n]*\}")
    floor = _best_of(5, lambda: sum(1 for _ in brace.finditer(text)))

    def full_check() -> None:
        _clear_caches()
        review_text(text, "markdown")

    return _best_of(3, full_check) / floor


def explain_us() -> float:
    from notelsp.chem import analyse
    from notelsp.notation import parse_formula

    formula = parse_formula("IF5Cl2")  # seven domains, two kinds of ligand
    samples = []
    for _ in range(20):
        _clear_caches()
        start = time.perf_counter()
        analyse(formula)
        samples.append(time.perf_counter() - start)
    return statistics.mean(samples) * 1e6


def main() -> None:
    text = make_notebook()
    print(f"scan_ratio: {scan_ratio(text):.1f}")
    print(f"explain_us: {explain_us():.0f}")


if __name__ == "__main__":
    main()
