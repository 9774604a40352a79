"""Reviews from scratch: no analysis host's memory, and the pure notation functions' memo emptied."""

from __future__ import annotations

from notelsp.notation import markdown_blocks, scanner, transform


def clear_memoised_parses() -> None:
    """Empty the caches of pure functions keyed by value (a body's parse, a segment's groups, a paragraph's
    pieces): a review made after this and without a memory computes everything again."""
    for cached in (transform.parse_body, scanner._inline_groups, scanner._block_body, markdown_blocks._paragraph_pieces):
        cached.cache_clear()
