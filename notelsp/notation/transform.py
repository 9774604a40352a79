"""Parse trees -> the dataclasses of :mod:`notelsp.notation.model`.

Everything here is position-free: spans are offsets into the string that was
parsed (an annotation body), and the scanner shifts them into the document.
The body parse is cached by its text, so re-scanning an edited document
re-parses only the annotations whose text changed.
"""

from __future__ import annotations

import dataclasses
import re
from functools import lru_cache

from lark import Token, Tree
from lark.exceptions import UnexpectedCharacters, UnexpectedInput, UnexpectedToken

from .. import elements
from .errors import (
    ANNOTATION_NOT_READ,
    FORMULA_TOO_LARGE,
    IMPOSSIBLE_COUNT,
    MALFORMED_CLAIM,
    MALFORMED_FORMULA,
    UNKNOWN_CLAIM,
    UNKNOWN_ELEMENT,
)
from .claim_vocabulary import HYBRID_LABELS, canonical_shape, claim_words
from .grammar import parser
from .model import (
    ESD_COVERAGE,
    AngleClaim,
    AngleOrderClaim,
    Atom,
    AxeClaim,
    BondLengthClaim,
    BondMark,
    BondLengthValueClaim,
    Claim,
    CouplingClaim,
    ElectronGeometryClaim,
    Formula,
    Group,
    HybridizationClaim,
    Part,
    IndexClaim,
    IsomerCountClaim,
    LonePairClaim,
    MagnetismClaim,
    NotationError,
    PlacementClaim,
    PointGroupClaim,
    PolarityClaim,
    SCharacterClaim,
    ShapeClaim,
    ParsedBody,
    Span,
    UnpairedElectronClaim,
    shifted,
)

# Bounds that keep every parse small and fast.
MAX_COUNT = 99
MAX_CHARGE = 8
MAX_NESTING = 4
MAX_FORMULA_CHARS = 64
MAX_SMILES_CHARS = 256  # a SMILES spells out every atom and bond, so it runs longer than a formula
MAX_BODY_CHARS = 2000


class NotationSyntaxError(ValueError):
    """Raised by :func:`parse_formula`; carries the :class:`NotationError`."""

    def __init__(self, error: NotationError) -> None:
        super().__init__(error.message)
        self.error = error


# --- shared helpers -------------------------------------------------------------


def _span(token: Token, offset: int = 0) -> Span:
    return Span(token.start_pos + offset, token.end_pos + offset)


def _tokens(tree: Tree | Token) -> list[Token]:
    if isinstance(tree, Token):
        return [tree]
    return [token for child in tree.children for token in _tokens(child)]


def _syntax_error(code: str, text: str, error: UnexpectedInput, offset: int, what: str) -> NotationError:
    """A NotationError at the exact character lark stopped on."""
    if isinstance(error, UnexpectedCharacters):
        position = error.pos_in_stream
        return NotationError(code, f"unexpected '{text[position]}' in {what} '{text.strip()}'", Span(offset + position, offset + position + 1))
    token = getattr(error, "token", None)
    if isinstance(error, UnexpectedToken) and token is not None and token.type != "$END" and token.start_pos is not None:
        return NotationError(code, f"unexpected '{token}' in {what} '{text.strip()}'", _span(token, offset))
    opener = _unclosed_bracket(text)
    if opener is not None:
        return NotationError(code, f"unclosed '{text[opener]}' in {what} '{text.strip()}'", Span(offset + opener, offset + opener + 1))
    end = len(text.rstrip())
    return NotationError(code, f"{what} '{text.strip()}' ends too early", Span(offset + max(end - 1, 0), offset + end))


def _unclosed_bracket(text: str) -> int | None:
    stack: list[int] = []
    for index, char in enumerate(text):
        if char in "([":
            stack.append(index)
        elif char in ")]" and stack:
            stack.pop()
    return stack[-1] if stack else None


# --- formulas -------------------------------------------------------------------

_BOND_ORDERS = {"-": 1, "=": 2, "≡": 3, "#": 3}
_SUBSCRIPTS = str.maketrans("₀₁₂₃₄₅₆₇₈₉⁰¹²³⁴⁵⁶⁷⁸⁹", "01234567890123456789")


def _number_of(text: str) -> int:
    return int(text.translate(_SUBSCRIPTS))


def _symbol_suggestion(symbol: str, previous: Atom | None) -> tuple[str, Span] | None:
    """'CL' lexes as C + L: suggest the two-letter symbol the writer meant."""
    if len(symbol) == 1 and previous is not None and len(previous.symbol) == 1:
        joined = previous.symbol + symbol.lower()
        if elements.is_symbol(joined):
            return joined, previous.span
    return None


class _FormulaBuilder:
    """Walks one ``species`` tree, collecting parts and every problem in it."""

    def __init__(self, text: str, offset: int) -> None:
        self.text = text
        self.offset = offset
        self.errors: list[NotationError] = []

    def error(self, code: str, message: str, span: Span, suggestion: str | None = None) -> None:
        self.errors.append(NotationError(code, message, span, suggestion))

    def count(self, tree: Tree | None) -> int:
        if tree is None:
            return 1
        token = tree.children[0]
        value = _number_of(token)
        if value == 0:
            self.error(MALFORMED_FORMULA, f"count 0 in '{self.text.strip()}'", _span(token, self.offset))
        elif value > MAX_COUNT:
            self.error(FORMULA_TOO_LARGE, f"count {value} is above {MAX_COUNT}", _span(token, self.offset))
        return value

    def parts(self, tree: Tree, depth: int) -> tuple[Part, ...]:
        built: list[Part] = []
        for part in tree.children:
            if part.data == "atom":
                built.append(self.atom(part, built[-1] if built and isinstance(built[-1], Atom) else None))
            elif part.data == "bond_mark":
                built.append(self.bond_mark(part.children[0], built, depth))
            else:
                built.append(self.group(part, depth + 1))
        if built and isinstance(built[-1], BondMark):
            self.error(MALFORMED_FORMULA, f"bond '{self.text[built[-1].span.start - self.offset]}' "
                       "with no atom after it", built[-1].span)
        return tuple(built)

    def bond_mark(self, token: Token, before: list[Part], depth: int) -> BondMark:
        """An explicit bond: between two atoms or groups, or opening a group (the bond to the atom before it)."""
        span = _span(token, self.offset)
        written = str(token)
        if before and isinstance(before[-1], BondMark):
            self.error(MALFORMED_FORMULA, f"two bonds in a row in '{self.text.strip()}'", span)
        elif not before and depth == 0:
            self.error(MALFORMED_FORMULA, f"bond '{written}' with no atom before it", span)
        return BondMark(_BOND_ORDERS[written], span)

    def atom(self, tree: Tree, previous: Atom | None) -> Atom:
        token = tree.children[0]
        count_tree = tree.children[1] if len(tree.children) > 1 else None
        count = self.count(count_tree)
        end = count_tree.children[0].end_pos if count_tree is not None else token.end_pos
        span = Span(token.start_pos + self.offset, end + self.offset)
        if not elements.is_symbol(str(token)):
            self.unknown_symbol(str(token), _span(token, self.offset), previous)
        return Atom(str(token), count, span)

    def unknown_symbol(self, symbol: str, span: Span, previous: Atom | None) -> None:
        fix = _symbol_suggestion(symbol, previous)
        if fix is not None:
            suggestion, previous_span = fix
            self.error(
                UNKNOWN_ELEMENT,
                f"unknown element '{previous.symbol}{symbol}'; did you mean '{suggestion}'?",
                Span(previous_span.start, span.end),
                suggestion,
            )
        else:
            self.error(UNKNOWN_ELEMENT, f"unknown element '{symbol}'", span)

    def group(self, tree: Tree, depth: int) -> Group:
        opener, inner, closer = tree.children[0], tree.children[1], tree.children[2]
        if depth == MAX_NESTING + 1:  # reported once, at the first group too deep
            self.error(FORMULA_TOO_LARGE, f"groups nested deeper than {MAX_NESTING} levels", _span(opener, self.offset))
        count_tree = tree.children[3] if len(tree.children) > 3 else None
        count = self.count(count_tree)
        end = count_tree.children[0].end_pos if count_tree is not None else closer.end_pos
        return Group(self.parts(inner, depth), count, Span(opener.start_pos + self.offset, end + self.offset))

    def charge(self, tree: Tree | None) -> int:
        if tree is None:
            return 0
        magnitude, sign = 1, 1
        for token in tree.children:
            if token.type in ("DIGITS", "SUPDIGITS"):
                magnitude = _number_of(token)
            elif token.type in ("SIGN", "SUPSIGN"):
                sign = 1 if str(token) in "+⁺" else -1
        first, last = tree.children[0], tree.children[-1]
        span = Span(first.start_pos + self.offset, last.end_pos + self.offset)
        if magnitude == 0:
            self.error(MALFORMED_FORMULA, "charge 0 written with a sign", span)
        elif magnitude > MAX_CHARGE:
            self.error(FORMULA_TOO_LARGE, f"charge {magnitude} is above {MAX_CHARGE}", span)
        if " " in self.text[first.end_pos : last.start_pos] or "\t" in self.text[first.end_pos : last.start_pos]:
            self.error(MALFORMED_FORMULA, "space inside a charge", span)
        return sign * magnitude

    def smiles(self, tree: Tree) -> Formula:
        """``smiles "..."``: the SMILES between the quotes, kept verbatim for the chemistry to read."""
        quoted = tree.children[1]
        smiles = str(quoted)[1:-1]
        span = Span(quoted.start_pos + 1 + self.offset, quoted.end_pos - 1 + self.offset)
        if not smiles.strip():
            self.error(MALFORMED_FORMULA, 'empty SMILES; write e.g. smiles "CC(=O)O"', _span(quoted, self.offset))
        elif re.search(r"\s", smiles):
            at = span.start + re.search(r"\s", smiles).start()
            self.error(MALFORMED_FORMULA, f"space inside SMILES '{smiles.strip()}' (a SMILES is one word)", Span(at, at + 1))
        elif len(smiles) > MAX_SMILES_CHARS:
            self.error(FORMULA_TOO_LARGE, f"SMILES longer than {MAX_SMILES_CHARS} characters", span)
        return Formula(smiles, (), 0, span, smiles=smiles)

    def formula(self, tree: Tree, centre_tree: Tree | None) -> Formula:
        bracketed = tree.data == "bracketed"
        children = tree.children
        parts_tree = children[1] if bracketed else children[0]
        charge_tree = next((c for c in children if isinstance(c, Tree) and c.data == "charge"), None)
        parts = self.parts(parts_tree, 0)
        charge = self.charge(charge_tree)
        tokens = _tokens(tree)
        start, end = tokens[0].start_pos, tokens[-1].end_pos
        core_end = (charge_tree.children[0].start_pos if charge_tree is not None else end)
        self.check_spaces(start, core_end)
        written = self.text[start:end]
        span = Span(start + self.offset, end + self.offset)
        if len(written) > MAX_FORMULA_CHARS:
            self.error(FORMULA_TOO_LARGE, f"formula longer than {MAX_FORMULA_CHARS} characters", span)
        centre = None
        if centre_tree is not None:
            centre_token = centre_tree.children[1]
            centre = str(centre_token)
            if not elements.is_symbol(centre):
                self.error(UNKNOWN_ELEMENT, f"unknown element '{centre}'", _span(centre_token, self.offset))
            elif all(centre not in _symbols(part) for part in parts):
                self.error(MALFORMED_FORMULA, f"centre '{centre}' is not in '{written}'", _span(centre_token, self.offset))
        return Formula(written, parts, charge, span, centre, bracketed)

    def check_spaces(self, start: int, end: int) -> None:
        core = self.text[start:end].rstrip()
        match = re.search(r"\s", core)
        if match is not None:
            at = start + match.start() + self.offset
            self.error(MALFORMED_FORMULA, f"space inside formula '{core}'", Span(at, at + 1))


def _symbols(part: Part) -> set[str]:
    if isinstance(part, Atom):
        return {part.symbol}
    if isinstance(part, BondMark):
        return set()
    return set().union(*(_symbols(inner) for inner in part.parts))


def parse_formulas(text: str, offset: int = 0) -> tuple[tuple[Formula, ...], tuple[NotationError, ...]]:
    """The species written in ``text`` (one, or two around 'vs'), with spans shifted by ``offset``."""
    formulas, errors = _formulas_at_start(text)
    return shifted(formulas, offset), shifted(errors, offset)


@lru_cache(maxsize=8192)
def _formulas_at_start(text: str) -> tuple[tuple[Formula, ...], tuple[NotationError, ...]]:
    """``parse_formulas`` once per distinct text, spans from 0 (notes name the same species often)."""
    offset = 0
    smiles = _SMILES_MARKER.search(text) is not None
    if len(text) > 2 * (MAX_SMILES_CHARS if smiles else MAX_FORMULA_CHARS) + 16:
        start = len(text) - len(text.lstrip())
        what = f"SMILES longer than {MAX_SMILES_CHARS}" if smiles else f"formula longer than {MAX_FORMULA_CHARS}"
        return (), (NotationError(FORMULA_TOO_LARGE, f"{what} characters",
                                  Span(offset + start, offset + len(text.rstrip()))),)
    unclosed = _unclosed_smiles(text)
    if unclosed is not None:
        return (), (NotationError(MALFORMED_FORMULA, f"the SMILES opened at '{text[unclosed:].strip()[:24]}' has no "
                                  "closing '\"'; write e.g. smiles \"CC(=O)O\"", Span(unclosed, unclosed + 1)),)
    unquoted = _UNQUOTED_SMILES.search(text)
    if unquoted is not None:  # smiles CCO: the SMILES must be quoted, or its [ ] ( ) = # : would be read as notation
        word = unquoted.group(1)
        return (), (NotationError(MALFORMED_FORMULA, f"write the SMILES in double quotes: smiles \"{word}\"",
                                  Span(unquoted.start(1), unquoted.end(1)), f'"{word}"'),)
    try:
        tree = parser().parse(text, start="formula_spec")
    except UnexpectedInput as error:
        return (), (_syntax_error(MALFORMED_FORMULA, text, error, offset, "formula"),)
    builder = _FormulaBuilder(text, offset)
    formulas = []
    for species in tree.children:
        if isinstance(species, Token):  # 'vs'
            continue
        if species.data == "smiles_species":
            formulas.append(builder.smiles(species))
            continue
        centre = species.children[1] if len(species.children) > 1 else None
        formulas.append(builder.formula(species.children[0], centre))
    if builder.errors:
        return (), tuple(builder.errors)  # the chemistry only sees formulas that read cleanly
    return tuple(formulas), ()


# "smiles" (any case) then an opening quote: where a SMILES species begins
_SMILES_MARKER = re.compile(r'(?i)(?<![A-Za-z])smiles[ \t]*"')
_UNQUOTED_SMILES = re.compile(r'(?i)(?<![A-Za-z])smiles[ \t]+([^"\s]\S*)')


def _unclosed_smiles(text: str) -> int | None:
    """The offset of a SMILES' opening quote that is never closed, else None (quotes pair up in order)."""
    return text.rfind('"') if text.count('"') % 2 else None


def formula_end(body: str) -> int:
    """Where the species of an annotation body end: its first ':' outside a quoted SMILES (SMILES
    may contain ':'), else len(body). An unclosed quote cannot hide the claims: the first ':' then."""
    if '"' not in body:
        colon = body.find(":")
        return colon if colon != -1 else len(body)
    quoted = False
    for index, char in enumerate(body):
        if char == '"':
            quoted = not quoted
        elif char == ":" and not quoted:
            return index
    if quoted:  # never closed: split where the writer most likely meant
        colon = body.find(":")
        return colon if colon != -1 else len(body)
    return len(body)


def starts_with_smiles(body: str, quoted: bool = True) -> bool:
    """Whether an annotation body opens with a SMILES species: ``smiles "...``, or with ``quoted=False``
    also ``smiles CCO`` (a SMILES left unquoted, worth an error when claims follow)."""
    head = body.lstrip()
    return _SMILES_MARKER.match(head) is not None or (not quoted and _UNQUOTED_SMILES.match(head) is not None)


def parse_formula(text: str) -> Formula:
    """One formula, e.g. for ``notelsp explain``; raises :class:`NotationSyntaxError`."""
    formulas, errors = parse_formulas(text)
    if errors:
        raise NotationSyntaxError(errors[0])
    if len(formulas) != 1:
        raise NotationSyntaxError(NotationError(MALFORMED_FORMULA, "expected one formula, not a comparison",
                                                Span(0, len(text))))
    return formulas[0]


# --- claims -------------------------------------------------------------------

_D_FIRST_LABELS = {"dsp3": "sp3d", "d2sp3": "sp3d2"}  # older spellings of the same labels
_LENGTH_UNITS = {"pm": 0.01, "nm": 10.0}  # to ångström; every other unit word is ångström
_SUPERSCRIPT_DIGITS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
_LINK_ORDERS = {"DOUBLE_BOND": 2, "TRIPLE_BOND": 3}  # every dash is a single bond
_ATOM_NAME = re.compile(r"([A-Z][a-z]?)([0-9]+)")
_WORD_NUMBERS = {"a": 1, "an": 1, "one": 1, "single": 1, "two": 2, "three": 3, "four": 4, "five": 5, "six": 6, "no": 0}
_EXAMPLES = {
    "angle": "'H-N-H 107°' or 'angle 107°'",
    "index": "'i = 1.41'",
    "s": "'s-character 25%'",
    "lone": "'2 lone pairs' or 'lone pairs equatorial'",
    "electron": "'electron geometry tetrahedral'",
    "point": "'point group C2v'",
}


def _hyphenated(words: str) -> str:
    return re.sub(r"[ -]+", "-", words.strip().lower())


def _shape(token: Token) -> str:
    return canonical_shape(token)


class _ClaimBuilder:
    """Builds one claim from its tree; ``offset`` places it in the body."""

    def __init__(self, text: str, offset: int) -> None:
        self.text = text.strip()
        self.span = Span(offset, offset + len(self.text))
        self.offset = offset
        self.errors: list[NotationError] = []

    def error(self, code: str, message: str, span: Span | None = None, suggestion: str | None = None) -> None:
        self.errors.append(NotationError(code, message, span or self.span, suggestion))

    def at(self, token: Token) -> Span:
        return _span(token, self.offset)

    def build(self, tree: Tree) -> Claim | None:
        return getattr(self, tree.data)(tree.children)

    def shape_claim(self, children: list) -> Claim:
        return ShapeClaim(self.text, self.span, _shape(children[0]))

    def geometry_claim(self, children: list) -> Claim:
        shape = next(token for token in children if token.type == "SHAPE")  # before or after the words
        return ElectronGeometryClaim(self.text, self.span, _shape(shape))

    def polarity_claim(self, children: list) -> Claim:
        words = _hyphenated(children[0])
        return PolarityClaim(self.text, self.span, not (words.startswith(("non", "apolar", "zero", "no-"))))

    def hybrid_claim(self, children: list) -> Claim | None:
        token = children[0]
        written = str(token).lower().translate(str.maketrans("²³", "23")).replace("^", "")
        written = _D_FIRST_LABELS.get(written, written)
        if not written.startswith("sp"):
            return HybridizationClaim(self.text, self.span, "unhybridized")
        if written == "sp1":
            written = "sp"
        if token.type == "HYBRID_FRACTION":  # "sp^2.4": the index follows "sp"
            return HybridizationClaim(self.text, self.span, None, float(written[2:]))
        if written in HYBRID_LABELS:
            return HybridizationClaim(self.text, self.span, written)
        import difflib  # suggestions are made for mistakes only

        suggestion = difflib.get_close_matches(written, sorted(HYBRID_LABELS), n=1)
        self.error(UNKNOWN_CLAIM, f"unknown hybridization '{token}'" + (f"; did you mean '{suggestion[0]}'?" if suggestion else ""),
                   self.at(token), suggestion[0] if suggestion else None)
        return None

    def quantity(self, tree: Tree | None) -> int | str | None:
        """A count as written: int, or 'all' for 'both'/'all'; None when absent."""
        if tree is None:
            return None
        tokens = tree.children
        if tokens[0].type == "QWORD":
            word = str(tokens[0]).lower()
            return "all" if word in ("both", "all") else _WORD_NUMBERS[word]
        value = int(tokens[-1])
        if tokens[0].type == "HYPHEN":
            self.error(IMPOSSIBLE_COUNT, f"negative count in '{self.text}'", Span(self.at(tokens[0]).start, self.at(tokens[-1]).end))
            return -value
        return value

    def subject(self, tree: Tree) -> str | None:
        token = tree.children[0]
        if token.type == "LONE_PAIRS":
            return "lone-pair"
        word = str(token)
        if token.type in ("SYMBOL", "POINT_GROUP") and elements.is_symbol(word):
            return word
        if token.type == "NAME":
            element = elements.by_name(word)
            if element is not None:
                return element.symbol
        message, suggestion = _unknown_element(word)
        self.error(UNKNOWN_ELEMENT, message, self.at(token), suggestion)
        return None

    def placement_claim(self, children: list) -> Claim | None:
        quantity_tree = children[0] if len(children) == 3 else None
        subject, site = self.subject(children[-2]), str(children[-1]).lower()
        quantity = self.quantity(quantity_tree)
        if subject is None or (isinstance(quantity, int) and quantity < 0):
            return None
        if quantity == 0:
            self.error(MALFORMED_CLAIM, f"'{self.text}' places nothing; write e.g. 'F axial'")
            return None
        if quantity is None:
            quantity = "all"
        elif quantity == 1:
            quantity = "one"
        return PlacementClaim(self.text, self.span, subject, site, quantity)  # type: ignore[arg-type]

    def lone_pair_claim(self, children: list) -> Claim | None:
        if isinstance(children[0], Tree):
            count = self.quantity(children[0])
            if count == "all":
                self.error(MALFORMED_CLAIM, f"cannot read a count in '{self.text}'; write e.g. '2 lone pairs'")
                return None
        else:
            numbers = [token for token in children if token.type == "NUMBER"]
            count = int(numbers[0])
            if any(token.type == "HYPHEN" for token in children):
                self.error(IMPOSSIBLE_COUNT, f"negative count in '{self.text}'", self.at(numbers[0]))
                count = -count
        if not isinstance(count, int) or count < 0:
            if isinstance(count, int) and not self.errors:
                self.error(IMPOSSIBLE_COUNT, f"negative count in '{self.text}'")
            return None
        return LonePairClaim(self.text, self.span, count)

    def isomer_claim(self, children: list) -> Claim | None:
        count = self.quantity(children[0])
        if count == "all" or count is None:
            self.error(MALFORMED_CLAIM, f"cannot read a count in '{self.text}'; write e.g. '2 isomers'")
            return None
        if count < 1:  # type: ignore[operator]
            if not self.errors:
                self.error(IMPOSSIBLE_COUNT, f"every species has at least one isomer, not '{self.text}'")
            return None
        return IsomerCountClaim(self.text, self.span, count)  # type: ignore[arg-type]

    def node(self, tree: Tree) -> str | None:
        """One atom of a claim as written: an element symbol, an atom's name or a group; None, with an error, if unreadable."""
        token = tree.children[0]
        word = str(token)
        if token.type == "SYMBOL":
            if elements.is_symbol(word):
                return word
            message, suggestion = _unknown_element(word)
            self.error(UNKNOWN_ELEMENT, message, self.at(token), suggestion)
            return None
        if token.type == "GROUP_NAME":  # "OH", "CH3": every symbol in it must be an element
            for match in re.finditer(r"[A-Z][a-z]?", word):
                if not elements.is_symbol(match.group()):
                    message, suggestion = _unknown_element(match.group())
                    at = self.at(token).start + match.start()
                    self.error(UNKNOWN_ELEMENT, message + f" in '{word}'", Span(at, at + len(match.group())))
                    return None
            return word
        name = _ATOM_NAME.fullmatch(word)  # ATOM_NAME, or a POINT_GROUP token that may be one ("C2")
        if name is None:
            self.error(MALFORMED_CLAIM, f"'{word}' is a point group, not an atom; name an atom by its element and "
                       "its place among that element's atoms, e.g. 'C2'", self.at(token))
            return None
        symbol, number = name.group(1), int(name.group(2))
        if not elements.is_symbol(symbol):
            message, suggestion = _unknown_element(symbol)
            self.error(UNKNOWN_ELEMENT, message + f" in '{word}'", self.at(token),
                       suggestion + name.group(2) if suggestion and elements.is_symbol(suggestion) else None)
            return None
        if number == 0:
            self.error(MALFORMED_CLAIM, f"atoms are numbered from 1, not '{word}'; write e.g. '{symbol}1'",
                       self.at(token), f"{symbol}1")
            return None
        return word

    def path(self, tree: Tree) -> tuple[tuple[str, ...], tuple[int, ...], Span] | None:
        """The atoms of a bond or angle ("H-N-H", "O=C-O", "C1-C2"), the orders of the bonds between them, and its span."""
        nodes = [child for child in tree.children if child.data == "node"]
        names = [self.node(node) for node in nodes]
        if any(name is None for name in names):
            return None
        orders = tuple(_LINK_ORDERS.get(link.children[0].type, 1) for link in tree.children if link.data == "link")
        span = Span(self.at(nodes[0].children[0]).start, self.at(nodes[-1].children[0]).end)
        return tuple(names), orders, span  # type: ignore[return-value]

    def triple(self, tree: Tree) -> tuple[tuple[str, str, str], Span, tuple[int, int]] | None:
        path = self.path(tree)
        if path is None:
            return None
        names, orders, span = path
        return (names[0], names[1], names[2]), span, (orders[0], orders[1])

    def atom_claim(self, children: list) -> Claim | None:
        """A claim about one named atom: the claim proper keeps its own text and span, the name its own."""
        name = self.node(children[0])
        scoped = children[-1]
        claim = self.build(scoped)
        if name is None or claim is None:
            return None
        tokens = _tokens(scoped)
        start, end = tokens[0].start_pos, tokens[-1].end_pos
        return dataclasses.replace(claim, text=self.text[start:end],  # token positions index the parsed (stripped) text
                                   span=Span(start + self.offset, end + self.offset),
                                   atom=name, atom_span=self.at(children[0].children[0]))

    def angle_claim(self, children: list) -> Claim | None:
        atoms, orders = None, (1, 1)
        first = children[0]
        if isinstance(first, Tree) and first.data == "triple":
            triple = self.triple(first)
            if triple is None:
                return None
            atoms, orders = triple[0], triple[2]
        value = next(child for child in children if isinstance(child, Tree) and child.data == "angle_value")
        tokens = value.children
        approximate = any(isinstance(t, Token) and t.type == "APPROX" for t in tokens)
        negative = any(isinstance(t, Token) and t.type == "HYPHEN" for t in tokens[:2])
        numbers = [t for t in tokens if isinstance(t, Token) and t.type == "NUMBER"]
        degrees = [float(t) for t in numbers]
        if negative:
            degrees[0] = -degrees[0]
        for number, token in zip(degrees, numbers):
            if number <= 0 or number > 180:
                self.error(IMPOSSIBLE_COUNT, f"an angle of {number:g}° is impossible; bond angles lie in (0°, 180°]", self.at(token))
                return None
        low, high = min(degrees), max(degrees)
        allowance = max((self.allowance(u, n) for u, n in _uncertainties(tokens)), default=0.0)
        return AngleClaim(self.text, self.span, low, high, atoms, approximate, allowance, orders)

    def allowance(self, tree: Tree, value: Token) -> float:
        """The allowance on each side that a written uncertainty gives ``value``."""
        marker, number = tree.children[0], tree.children[1]
        if marker.type == "PLUSMINUS":
            return float(number)
        # 121.9(2): the digits in parentheses count in the last decimal place of the value
        decimals = len(str(value).partition(".")[2])
        return ESD_COVERAGE * float(number) / 10 ** decimals

    def length_claim(self, children: list) -> Claim | None:
        bond, order = None, 1
        if isinstance(children[0], Tree) and children[0].data == "bond":
            written = self.bond(children[0])
            if written is None:
                return None
            bond, order = written
        number = next(t for t in children if isinstance(t, Token) and t.type == "NUMBER")
        unit = next(t for t in children if isinstance(t, Token) and t.type == "LENGTH_UNIT")
        scale = _LENGTH_UNITS.get(str(unit), 1.0)
        value = float(number) * scale
        if value <= 0:
            self.error(IMPOSSIBLE_COUNT, f"a bond length of {number} {unit} is impossible", self.at(number))
            return None
        allowance = max((self.allowance(u, n) * scale for u, n in _uncertainties(children)), default=0.0)
        approximate = any(isinstance(t, Token) and t.type == "APPROX" for t in children)
        return BondLengthValueClaim(self.text, self.span, value, bond, allowance, approximate, order)

    def coupling_claim(self, children: list) -> Claim | None:
        written = str(children[0]).translate(_SUPERSCRIPT_DIGITS)
        bonds = int(written[0]) if written[0].isdigit() else 1
        nuclei = tuple(re.findall(r"[A-Z][a-z]?", written.partition("J")[2]))
        for symbol in nuclei:
            if not elements.is_symbol(symbol):
                message, suggestion = _unknown_element(symbol)
                self.error(UNKNOWN_ELEMENT, message, self.at(children[0]), suggestion)
                return None
        number = next(t for t in children if isinstance(t, Token) and t.type == "NUMBER")
        allowance = max((self.allowance(u, n) for u, n in _uncertainties(children)), default=0.0)
        return CouplingClaim(self.text, self.span, bonds, (nuclei[0], nuclei[1]), float(number), allowance)

    def unpaired_claim(self, children: list) -> Claim | None:
        count = self.quantity(children[0])
        if count == "all" or not isinstance(count, int):
            self.error(MALFORMED_CLAIM, f"cannot read a count in '{self.text}'; write e.g. '1 unpaired electron'")
            return None
        if count < 0:
            return None
        return UnpairedElectronClaim(self.text, self.span, count)

    def magnetism_claim(self, children: list) -> Claim:
        return MagnetismClaim(self.text, self.span, str(children[0]).lower().startswith("para"))

    def axe_claim(self, children: list) -> Claim | None:
        written = str(children[0]).translate(_SUBSCRIPTS)
        x, _, e = written[2:].partition("E")
        bonded = int(x) if x else 1
        lone_pairs = (int(e) if e else 1) if "E" in written else 0
        return AxeClaim(self.text, self.span, bonded, lone_pairs)

    def angle_order_claim(self, children: list) -> Claim | None:
        left, relation, right = self.triple(children[0]), str(children[1]), self.triple(children[2])
        if left is None or right is None:
            return None
        return AngleOrderClaim(self.text, self.span, left[0], relation, right[0], left[1], right[1],  # type: ignore[arg-type]
                               left[2], right[2])

    def index_claim(self, children: list) -> Claim:
        return IndexClaim(self.text, self.span, float(children[-1]))

    def bond(self, tree: Tree) -> tuple[tuple[str, str], int] | None:
        """The two atoms of a written bond and its order (2 for "C=O")."""
        path = self.path(tree)
        return None if path is None else ((path[0][0], path[0][1]), path[1][0])

    def s_claim(self, children: list) -> Claim | None:
        number = next(token for token in children if isinstance(token, Token) and token.type == "NUMBER")
        percent = float(number)
        ligand = None
        scope = next((child for child in children if isinstance(child, Tree) and child.data == "bond_scope"), None)
        if scope is not None:
            bond = self.bond(scope.children[1])
            if bond is None:
                return None
            ligand = bond[0][1]
        if percent > 100:
            self.error(IMPOSSIBLE_COUNT, f"s-character of {percent:g}% is above 100%", self.at(number))
            return None
        return SCharacterClaim(self.text, self.span, percent, ligand)

    def bond_claim(self, children: list) -> Claim | None:
        bond = self.bond(children[0])
        if bond is None:
            return None
        return BondLengthClaim(self.text, self.span, bond[0], str(children[1]).lower(), bond[1])  # type: ignore[arg-type]

    def point_group_claim(self, children: list) -> Claim:
        symbol = str(children[-1]).replace("∞", "inf")
        return PointGroupClaim(self.text, self.span, symbol)


def _uncertainties(children: list) -> list[tuple[Tree, Token]]:
    """Each written uncertainty with the number it follows."""
    found = []
    for previous, child in zip(children, children[1:]):
        if isinstance(child, Tree) and child.data == "uncertainty" and isinstance(previous, Token):
            found.append((child, previous))
    return found


def _unknown_element(word: str) -> tuple[str, str | None]:
    """Message and suggestion for a word that should name an element."""
    if elements.is_symbol(word.capitalize()):
        return f"unknown element '{word}'; did you mean '{word.capitalize()}'?", word.capitalize()
    import difflib  # suggestions are made for mistakes only

    names = [element.name.lower() for element in elements.table().values()]
    close = difflib.get_close_matches(word.lower(), names, n=1, cutoff=0.8)
    if close:
        return f"unknown element '{word}'; did you mean '{close[0]}'?", close[0]
    return f"unknown element '{word}'", None


def _unreadable_claim(text: str, offset: int) -> NotationError:
    """unknown-claim for a word the notation lacks, malformed-claim for known words in a wrong form."""
    import difflib  # suggestions are made for mistakes only

    span = Span(offset, offset + len(text))
    for match in re.finditer(r"[^\W\d_]+", text):
        word = match.group()
        if word.lower() in claim_words() or elements.is_symbol(word) or elements.by_name(word) is not None:
            continue
        # offer only a suggestion that is itself a claim the notation reads
        for close in difflib.get_close_matches(word.lower(), claim_words(), n=3, cutoff=0.7):
            suggestion = text[: match.start()] + close + text[match.end():]
            if _reads_as_claim(suggestion):
                return NotationError(UNKNOWN_CLAIM, f"unknown claim '{text}'; did you mean '{suggestion}'?", span, suggestion)
        return NotationError(UNKNOWN_CLAIM, f"unknown claim '{text}'", span)
    first = re.match(r"[^\W\d_]+", text)
    example = _EXAMPLES.get(first.group().lower() if first else "angle")
    hint = f"; write e.g. {example}" if example else ""
    return NotationError(MALFORMED_CLAIM, f"cannot read claim '{text}'{hint}", span)


def _reads_as_claim(text: str) -> bool:
    try:
        tree = parser().parse(text, start="claim")
    except UnexpectedInput:
        return False
    builder = _ClaimBuilder(text, 0)
    return builder.build(tree) is not None and not builder.errors


def parse_claim(text: str, offset: int = 0) -> tuple[Claim | None, tuple[NotationError, ...]]:
    """One claim (already split off, may carry surrounding spaces); spans shifted by ``offset``."""
    lead = len(text) - len(text.lstrip())
    stripped = text.strip()
    if not stripped:
        return None, (NotationError(MALFORMED_CLAIM, "empty claim between separators", Span(offset, offset + len(text))),)
    claim, errors = _claim_at_start(stripped)
    return shifted(claim, offset + lead), shifted(errors, offset + lead)


@lru_cache(maxsize=8192)
def _claim_at_start(stripped: str) -> tuple[Claim | None, tuple[NotationError, ...]]:
    """A claim parsed once per distinct text (notes repeat "sp3", "trigonal planar" ...), spans from 0."""
    try:
        tree = parser().parse(stripped, start="claim")
    except UnexpectedInput:
        return None, (_unreadable_claim(stripped, 0),)
    builder = _ClaimBuilder(stripped, 0)
    claim = builder.build(tree)
    return (claim if not builder.errors else None), tuple(builder.errors)


# --- whole annotation bodies ------------------------------------------------------------


@lru_cache(maxsize=16384)
def parse_body(body: str) -> ParsedBody:
    """An annotation body ``FORMULA[: claims]``; spans relative to the body (cached by text)."""
    if len(body) > MAX_BODY_CHARS:
        return ParsedBody((), (), (NotationError(FORMULA_TOO_LARGE, f"annotation longer than {MAX_BODY_CHARS} characters",
                                                  Span(0, len(body))),), ":" in body)
    end = formula_end(body)
    formula_text, colon, claims_text = body[:end], body[end : end + 1], body[end + 1 :]
    formulas, errors = parse_formulas(formula_text)
    all_errors = list(errors)
    claims: list[Claim] = []
    if colon and claims_text.strip():
        start = len(formula_text) + 1
        pieces = split_claims(claims_text)
        for index, piece in enumerate(pieces):
            if not piece.strip() and index == len(pieces) - 1:
                break  # a trailing separator is harmless
            claim, claim_errors = parse_claim(piece, start)
            all_errors.extend(claim_errors)
            if claim is not None:
                claims.append(claim)
            start += len(piece) + 1
    return ParsedBody(formulas, tuple(claims), tuple(all_errors), bool(colon))


def split_claims(text: str) -> list[str]:
    """Claims are separated by ',' or ';' outside parentheses, so "1J(C,H) 125 Hz" stays one claim."""
    pieces, depth, start = [], 0, 0
    for index, char in enumerate(text):
        if char == "(":
            depth += 1
        elif char == ")" and depth:
            depth -= 1
        elif char in ",;" and not depth:
            pieces.append(text[start:index])
            start = index + 1
    pieces.append(text[start:])
    return pieces


# --- brace groups meant as annotations but not written as one --------------------------

NEAR_MISS_CHARS = MAX_FORMULA_CHARS * 2  # a longer brace group is not looked at as a slip
_MAX_REPAIRED_LETTERS = 12  # letters re-cased at most: ≤ 233 readings of a run, each a cached parse


@lru_cache(maxsize=4096)
def near_miss_body(body: str) -> ParsedBody | None:
    """A parse for a brace group that is clearly meant as an annotation but is not one, else None.

    Two slips are recognised: element symbols in the wrong case (``{CLF3}``, ``{sf4: linear}``)
    and a LaTeX charge (``{SO4^{2-}: octahedral}``).  The group counts as meant only when the
    repaired text reads cleanly, with claims that read cleanly too, or, without claims, a formula
    with a count in it (so ``{no}`` or ``{x: 1}`` in prose are left alone).  The parse carries one
    error, ``annotation-not-read``, over the whole body, with the repaired text as its fix when
    there is exactly one reading.
    """
    if len(body) > NEAR_MISS_CHARS:
        return None
    end = formula_end(body)
    formula_text, colon, claims_text = body[:end], body[end : end + 1], body[end + 1 :]
    if colon:
        claims = parse_body("H:" + claims_text) if claims_text.strip() else None  # the claims alone
        if claims is None or not claims.claims or claims.errors:
            return None
    elif not any(char.isdigit() for char in formula_text):
        return None
    if sum(char.isalpha() for char in formula_text) < 2 and not any(char.isdigit() for char in formula_text):
        return None  # one letter ({c: polar}) is too little to say a species was meant
    readings = []
    for formula in _formula_readings(formula_text.strip()):
        repaired = body.replace(formula_text.strip(), formula, 1)
        parsed = parse_body(repaired)
        if parsed.formulas and not parsed.errors and repaired != body:
            readings.append(repaired)
    if not readings:
        return None
    # nh3 is NH3 and co2 CO2, not nihonium or cobalt: prefer readings of main-group elements up to Rn
    common = [reading for reading in readings if all(_common(symbol) for symbol in re.findall(r"[A-Z][a-z]?", reading))]
    readings = common if len(common) == 1 else readings
    span = Span(0, len(body))
    if len(readings) == 1:
        message = (f"'{{{body}}}' is not read as an annotation (element symbols are case-sensitive, charges are "
                   f"written ^2-); did you mean '{{{readings[0]}}}'?")
        error = NotationError(ANNOTATION_NOT_READ, message, span, readings[0])
    else:
        shown = ", ".join(f"'{{{reading}}}'" for reading in readings[:3])
        error = NotationError(ANNOTATION_NOT_READ, f"'{{{body}}}' is not read as an annotation; did you mean one of {shown}?", span)
    return ParsedBody((), (), (error,), bool(colon))


def _common(symbol: str) -> bool:
    element = elements.element(symbol)
    return element.is_main_group and element.number <= 86


def _formula_readings(text: str) -> list[str]:
    """The ways of writing ``text`` with element symbols cased right and a LaTeX charge plain."""
    text = re.sub(r"\^\{([0-9]*[+\-−])\}", r"^\1", text)  # SO4^{2-} -> SO4^2-
    letters = sum(char.isalpha() for char in text)
    if letters > _MAX_REPAIRED_LETTERS:
        return []
    pieces = re.split(r"([A-Za-z]+)", text)
    readings = [""]
    for index, piece in enumerate(pieces):
        if index % 2 == 0:  # between letter runs: digits, brackets, charges as written
            readings = [reading + piece for reading in readings]
        else:
            readings = [reading + run for reading in readings for run in _symbol_runs(piece)]
    return readings


def _symbol_runs(letters: str) -> list[str]:
    """Every split of a run of letters into element symbols (one or two letters, cased as symbols)."""
    if not letters:
        return [""]
    found = []
    for size in (1, 2):
        head = letters[:size]
        if len(head) == size:
            symbol = head[0].upper() + head[1:].lower()
            if elements.is_symbol(symbol):
                found.extend(symbol + rest for rest in _symbol_runs(letters[size:]))
    return found
