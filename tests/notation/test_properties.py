"""Generated formulas: spans are exact and counts add up, whatever is written."""

from hypothesis import given, settings
from hypothesis import strategies as st

from notelsp.notation import parse_formula, scan

# A few symbols chosen to mix one- and two-letter symbols (common practice, no source).
SYMBOLS = ["H", "C", "N", "O", "F", "P", "S", "Cl", "Br", "I", "Xe", "Si", "B", "Al"]

atoms = st.tuples(st.sampled_from(SYMBOLS), st.integers(min_value=1, max_value=12))


def _written(parts):
    return "".join(symbol + (str(count) if count > 1 else "") for symbol, count in parts)


def _expected(parts):
    counts = {}
    for symbol, count in parts:
        counts[symbol] = counts.get(symbol, 0) + count
    return counts


@settings(max_examples=60, deadline=None)
@given(st.lists(atoms, min_size=1, max_size=6))
def test_generated_formulas_read_back(parts):
    text = _written(parts)
    formula = parse_formula(text)
    assert formula.composition() == _expected(parts)
    for part in formula.parts:
        assert text[part.span.start : part.span.end] == part.symbol + (str(part.count) if part.count > 1 else "")


@settings(max_examples=40, deadline=None)
@given(st.lists(atoms, min_size=1, max_size=4), st.text(alphabet="abxyz.,é→", max_size=12))
def test_generated_annotations_sit_at_their_offsets(parts, prefix):
    formula = _written(parts)
    text = f"{prefix} {{{formula}: bent}} tail"
    (annotation,) = scan(text, "markdown").annotations
    assert text[annotation.span.start : annotation.span.end] == f"{{{formula}: bent}}"
    assert text[annotation.formula.span.start : annotation.formula.span.end] == formula
    assert text[annotation.claims[0].span.start : annotation.claims[0].span.end] == "bent"


BONDS = ["=", "≡", "#", "-"]
_ORDER = {"=": 2, "≡": 3, "#": 3, "-": 1}


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.lists(atoms, min_size=1, max_size=3), st.sampled_from(BONDS)), min_size=1, max_size=4),
       st.lists(atoms, min_size=1, max_size=3))
def test_generated_bonded_formulas_read_back(pieces, last):
    """Fragments joined by written bonds: counts add up and every bond is where and what it was written."""
    text = "".join(_written(fragment) + bond for fragment, bond in pieces) + _written(last)
    formula = parse_formula(text)
    every = [atom for fragment, _ in pieces for atom in fragment] + last
    assert formula.composition() == _expected(every)
    marks = [part for part in formula.parts if not hasattr(part, "symbol")]
    assert [text[mark.span.start : mark.span.end] for mark in marks] == [bond for _, bond in pieces]
    assert [mark.order for mark in marks] == [_ORDER[bond] for _, bond in pieces]


# Characters SMILES uses (Weininger's notation, as RDKit reads it), and the notation's and Markdown's own.
SMILES_ALPHABET = "CNOSPFclnos[]()=#@:+-/\\%0123456789*$.Hr_*`~<>!{"


@settings(max_examples=80, deadline=None)
@given(st.text(alphabet=SMILES_ALPHABET, min_size=1, max_size=40).filter(lambda s: "{" not in s))
def test_any_quoted_text_is_kept_verbatim_as_the_smiles(smiles):
    text = f'On Friday {{smiles "{smiles}": bent}} was logged.'
    (annotation,) = scan(text, "markdown").annotations
    assert annotation.formula.smiles == smiles
    assert text[annotation.formula.span.start : annotation.formula.span.end] == smiles
    assert [text[c.span.start : c.span.end] for c in annotation.claims] == ["bent"]
