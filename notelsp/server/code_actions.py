"""Code actions: the findings' fixes (quickfix), a bare formula's predicted description,
converting a formula's counts to subscripts, and cross-checking an annotation with a calculation.

Only what touches the requested range is looked at, and at most
``MAX_CODE_ACTIONS`` are returned: a request over a whole note of 100,000
annotations would otherwise build every action of the note.  When more exist
the client is told (a disabled action where it shows them, a log message always).
"""

from __future__ import annotations

import logging
from bisect import bisect_right
from collections.abc import Iterator
from itertools import islice

from lsprotocol import types

from ..notation.model import Annotation, Span
from ..review.document import DocumentReview
from ..review.findings import Fix
from ..review.predictions import predicted_description_fix
from ..review.subscripts import subscript_fix
from . import crosscheck
from .app import HeldDocument, NoteServer
from .diagnostics import to_diagnostic


def _edit(held: HeldDocument, fix: Fix) -> types.WorkspaceEdit:
    edit = types.TextEdit(range=held.index.range(fix.span), new_text=fix.replacement)
    return types.WorkspaceEdit(changes={held.uri: [edit]})


MAX_CODE_ACTIONS = 100  # far more than a menu can show; a whole-note request stays small
log = logging.getLogger("notelsp.server")


def annotations_touching(review: DocumentReview, wanted: Span) -> Iterator[Annotation]:
    """The annotations whose span touches ``wanted``, in order, made one at a time (found by bisection)."""
    scanned = review.scanned
    found = scanned.found
    # sorted by start, never overlapping: the one before the last starting at or before wanted.start may touch it
    first = max(bisect_right(scanned.starts, wanted.start) - 2, 0)
    for index in range(first, len(found)):
        start, end = found[index][0], found[index][1]
        if start > wanted.end:
            return
        if end >= wanted.start:
            yield scanned.annotation(index)


def fix_actions(held: HeldDocument, findings) -> Iterator[types.CodeAction]:
    for finding in findings:
        diagnostic = to_diagnostic(finding, held.index)
        for number, fix in enumerate(finding.fixes):
            yield types.CodeAction(
                title=fix.title,
                kind=types.CodeActionKind.QuickFix,
                diagnostics=[diagnostic],
                is_preferred=number == 0 and len(finding.fixes) == 1,
                edit=_edit(held, fix),
            )


def rewrite_actions(held: HeldDocument, review: DocumentReview, wanted: Span) -> Iterator[types.CodeAction]:
    for annotation in annotations_touching(review, wanted):
        analyses = review.analyses_of(annotation) if annotation.formulas else ()
        rewrites = [predicted_description_fix(annotation, analyses[0] if analyses else None)]
        rewrites += [subscript_fix(held.text, formula) for formula in annotation.formulas]
        for fix in filter(None, rewrites):
            yield types.CodeAction(title=fix.title, kind=types.CodeActionKind.RefactorRewrite, edit=_edit(held, fix))


def _shows_disabled(ls: NoteServer) -> bool:
    text_document = ls.client_capabilities.text_document
    code_action = text_document.code_action if text_document else None
    return bool(code_action and code_action.disabled_support)


def _more_exist(ls: NoteServer, actions: list[types.CodeAction]) -> list[types.CodeAction]:
    reason = (f"only the first {MAX_CODE_ACTIONS} code actions of this range are listed; "
              "select a smaller range for the others")
    log.info("%s", reason)
    ls.window_log_message(types.LogMessageParams(type=types.MessageType.Info, message=reason))
    if _shows_disabled(ls):
        actions.append(types.CodeAction(title="More code actions in this range",
                                        kind=types.CodeActionKind.QuickFix,
                                        disabled=types.CodeActionDisabled(reason=reason)))
    return actions


def register(server: NoteServer) -> None:
    @server.feature(
        types.TEXT_DOCUMENT_CODE_ACTION,
        types.CodeActionOptions(
            code_action_kinds=[types.CodeActionKind.QuickFix, types.CodeActionKind.RefactorRewrite, crosscheck.ACTION_KIND]
        ),
    )
    def code_actions(ls: NoteServer, params: types.CodeActionParams) -> list[types.CodeAction]:
        held = ls.held(params.text_document.uri, around=params.range)
        if held is None or held.review is None:
            return []
        review = held.review
        wanted = held.index.span(params.range)
        fixable = (f for f in review.findings_in(wanted) if f.fixes)
        offered = [fix_actions(held, fixable), rewrite_actions(held, review, wanted)]
        if crosscheck.wants_cross_check_actions(params.context.only):
            offered.append(iter(crosscheck.cross_check_actions(held, wanted)))
        actions: list[types.CodeAction] = []
        for source in offered:
            actions += islice(source, MAX_CODE_ACTIONS + 1 - len(actions))
        if len(actions) > MAX_CODE_ACTIONS:
            return _more_exist(ls, actions[:MAX_CODE_ACTIONS])
        return actions
