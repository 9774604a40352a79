"""Print the counts the reliability tests tried (notes, frames, edits) at the end of the run."""

from .scale import FUZZ, TRIED


def pytest_terminal_summary(terminalreporter):
    if not TRIED:
        return
    mode = "make fuzz (NOTELSP_FUZZ=1)" if FUZZ else "bounded CI subset"
    terminalreporter.section(f"notelsp reliability: counts tried ({mode})")
    for what, count in sorted(TRIED.items()):
        terminalreporter.write_line(f"{count:>10,}  {what}")
