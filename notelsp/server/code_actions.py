"""Code actions: the findings' fixes (quickfix), a bare formula's predicted description,
converting a formula's counts to subscripts, and cross-checking an annotation with a calculation."""

from __future__ import annotations

from lsprotocol import types

from ..notation.model import Span
from ..review.findings import Finding, Fix
from ..review.predictions import predicted_description_fix
from ..review.subscripts import subscript_fix
from . import crosscheck
from .app import HeldDocument, NoteServer
from .diagnostics import to_diagnostic


def _edit(held: HeldDocument, fix: Fix) -> types.WorkspaceEdit:
    edit = types.TextEdit(range=held.index.range(fix.span), new_text=fix.replacement)
    return types.WorkspaceEdit(changes={held.uri: [edit]})


def _overlaps(span: Span, wanted: Span) -> bool:
    return span.start <= wanted.end and wanted.start <= span.end


def fix_actions(held: HeldDocument, findings: tuple[Finding, ...]) -> list[types.CodeAction]:
    actions = []
    for finding in findings:
        diagnostic = to_diagnostic(finding, held.index)
        for number, fix in enumerate(finding.fixes):
            actions.append(
                types.CodeAction(
                    title=fix.title,
                    kind=types.CodeActionKind.QuickFix,
                    diagnostics=[diagnostic],
                    is_preferred=number == 0 and len(finding.fixes) == 1,
                    edit=_edit(held, fix),
                )
            )
    return actions


def register(server: NoteServer) -> None:
    @server.feature(
        types.TEXT_DOCUMENT_CODE_ACTION,
        types.CodeActionOptions(
            code_action_kinds=[types.CodeActionKind.QuickFix, types.CodeActionKind.RefactorRewrite, crosscheck.ACTION_KIND]
        ),
    )
    def code_actions(ls: NoteServer, params: types.CodeActionParams) -> list[types.CodeAction]:
        held = ls.held(params.text_document.uri)
        if held is None or held.review is None:
            return []
        review = held.review
        wanted = held.index.span(params.range)
        actions = fix_actions(held, tuple(f for f in review.findings if f.fixes and _overlaps(f.span, wanted)))
        for annotation in review.annotations:
            if not _overlaps(annotation.span, wanted):
                continue
            analyses = review.analyses_of(annotation) if annotation.formulas else ()
            rewrites = [predicted_description_fix(annotation, analyses[0] if analyses else None)]
            rewrites += [subscript_fix(held.text, formula) for formula in annotation.formulas]
            for fix in filter(None, rewrites):
                actions.append(
                    types.CodeAction(title=fix.title, kind=types.CodeActionKind.RefactorRewrite, edit=_edit(held, fix))
                )
        if crosscheck.wants_cross_check_actions(params.context.only):
            actions += crosscheck.cross_check_actions(held, wanted)
        return actions
