"""A reviewer's page: one self-contained HTML file for a set of reviewed notes.

A summary, each note's findings with the annotation they concern, and a drawing
of every species the notes name (see :mod:`notelsp.formats.drawing`), its
isomers side by side.  Everything is inline: no network, no external script,
font or image.  A small script lets each drawing be turned by dragging (or with
the arrow keys); without it the page still shows every drawing and prints.
"""

from __future__ import annotations

from collections import Counter
from html import escape
from typing import Any, TextIO

from .. import __version__
from . import SEVERITY_ORDER, ReviewedFile
from .drawing import LONE_PAIR_FILL, OTHER_ELEMENT, PALETTE, angles_claimed, models_of, svg

CAUTION = ("Predictions are not safety data. Many species worth writing about are toxic or violently reactive; "
           "follow the safety data sheet, local rules and licensed practice.")

STYLE = """
body{font-family:system-ui,sans-serif;margin:1.5rem;max-width:70rem;color:#111;background:#fff}
h1{font-size:1.5rem}h2{font-size:1.2rem;margin-top:2rem;border-bottom:1px solid #ccc}
table{border-collapse:collapse}td,th{border:1px solid #bbb;padding:.2rem .5rem;text-align:left;vertical-align:top}
.caution{border:2px solid #b35900;padding:.5rem;background:#fff4e5}
.sev-error{color:#a00000;font-weight:bold}.sev-warning{color:#7a4b00;font-weight:bold}
.sev-information{color:#00466e}.sev-hint{color:#444}
.species{display:flex;flex-wrap:wrap;gap:1rem}figure{margin:0;border:1px solid #ddd;padding:.4rem;width:230px}
figcaption{font-size:.8rem}svg.molecule{cursor:grab;touch-action:none}svg.molecule:focus{outline:2px solid #0072B2}
.legend span{display:inline-block;margin-right:.8rem}.swatch{display:inline-block;width:.9rem;height:.9rem;
border:1px solid #222;border-radius:50%;vertical-align:middle;margin-right:.2rem}
code{background:#f3f3f3;padding:0 .2rem}
@media print{svg.molecule{cursor:auto}figure{break-inside:avoid}.noprint{display:none}}
"""

# Turns a drawing: the same projection as drawing.view, redrawn from the model in data-model.
SCRIPT = r"""
(function(){
"use strict";
var P=%(palette)s,O=%(other)s,LP="%(lp)s",MARK={axial:"ax",equatorial:"eq",apical:"ap",basal:"bas"};
function view(p,yaw,pitch){var x=p[0]*Math.cos(yaw)-p[1]*Math.sin(yaw),y=p[0]*Math.sin(yaw)+p[1]*Math.cos(yaw),z=p[2];
var y2=y*Math.cos(pitch)-z*Math.sin(pitch),z2=y*Math.sin(pitch)+z*Math.cos(pitch);return[x,z2,-y2];}
function el(name,attrs,text){var e=document.createElementNS("http://www.w3.org/2000/svg",name);
for(var k in attrs){e.setAttribute(k,attrs[k]);}if(text!==undefined){e.textContent=text;}return e;}
function draw(svg,model,yaw,pitch){var size=svg.viewBox.baseVal.width,half=size/2,
reach=Math.max.apply(null,model.atoms.map(function(a){return Math.hypot(a[1][0],a[1][1],a[1][2]);}))||1,scale=size*0.36/reach;
var title=svg.querySelector("title");while(svg.lastChild&&svg.lastChild!==title){svg.removeChild(svg.lastChild);}
var pr=model.atoms.map(function(a){return view(a[1],yaw,pitch);});
function pt(i){return[half+scale*pr[i][0],half-scale*pr[i][1]];}
var items=[];
model.bonds.forEach(function(b){var s=pt(b[0]),e=pt(b[1]),dx=e[0]-s[0],dy=e[1]-s[1],l=Math.hypot(dx,dy)||1,
nx=-dy/l*3.2,ny=dx/l*3.2,offs=b[2]===2?[-0.5,0.5]:b[2]===3?[-1,0,1]:[0];
items.push([Math.min(pr[b[0]][2],pr[b[1]][2])-0.01,function(){offs.forEach(function(k){svg.appendChild(el("line",
{x1:s[0]+k*nx,y1:s[1]+k*ny,x2:e[0]+k*nx,y2:e[1]+k*ny,stroke:"#222","stroke-width":2.2,"stroke-linecap":"round"}));});}]);});
model.atoms.forEach(function(a,i){var p=pt(i);if(!a[0]){var c=pt(0),dx=p[0]-c[0],dy=p[1]-c[1],
reach=Math.max(Math.hypot(dx,dy),scale*0.3),m=[c[0]+dx*0.75,c[1]+dy*0.75],ang=Math.atan2(dy,dx)*180/Math.PI;
items.push([pr[i][2],function(){svg.appendChild(el("ellipse",{cx:m[0],cy:m[1],rx:reach*0.55,ry:scale*0.28,
transform:"rotate("+ang+" "+m[0]+" "+m[1]+")",fill:LP,"fill-opacity":0.55,stroke:"#54278F","stroke-dasharray":"3 2"}));}]);return;}
var col=P[a[0]]||O,r=scale*(i===0?0.42:0.32);items.push([pr[i][2]+0.001,function(){
svg.appendChild(el("circle",{cx:p[0],cy:p[1],r:r,fill:col[0],stroke:"#222","stroke-width":1.2}));
svg.appendChild(el("text",{x:p[0],y:p[1]+4,"font-size":11,"font-family":"sans-serif","text-anchor":"middle",fill:col[1]},a[0]));
if(MARK[a[2]]){svg.appendChild(el("text",{x:p[0]+r+1,y:p[1]-r,"font-size":9,fill:"#333"},MARK[a[2]]));}}]);});
items.sort(function(a,b){return a[0]-b[0];}).forEach(function(it){it[1]();});}
document.querySelectorAll("svg.molecule").forEach(function(svg){var model=JSON.parse(svg.getAttribute("data-model"));
var yaw=%(yaw)s,pitch=%(pitch)s,drag=null;svg.setAttribute("tabindex","0");
svg.addEventListener("pointerdown",function(e){drag=[e.clientX,e.clientY];svg.setPointerCapture(e.pointerId);});
svg.addEventListener("pointermove",function(e){if(!drag){return;}yaw+=(e.clientX-drag[0])/60;
pitch+=(e.clientY-drag[1])/60;drag=[e.clientX,e.clientY];draw(svg,model,yaw,pitch);});
svg.addEventListener("pointerup",function(){drag=null;});
svg.addEventListener("keydown",function(e){var k={ArrowLeft:[-0.2,0],ArrowRight:[0.2,0],ArrowUp:[0,-0.2],ArrowDown:[0,0.2]}[e.key];
if(k){yaw+=k[0];pitch+=k[1];draw(svg,model,yaw,pitch);e.preventDefault();}});});
document.body.setAttribute("data-drawings-ready","yes");
})();
"""


def _script() -> str:
    import json

    from .drawing import VIEW_PITCH, VIEW_YAW

    return SCRIPT % {"palette": json.dumps({k: list(v) for k, v in PALETTE.items()}), "other": json.dumps(list(OTHER_ELEMENT)),
                     "lp": LONE_PAIR_FILL, "yaw": repr(VIEW_YAW), "pitch": repr(VIEW_PITCH)}


def _mentioned_angles(annotations) -> dict[str, set[tuple[str, str, str]]]:
    """Per formula text: the angles (A, X, B) claims name, to be marked in the drawings."""
    found: dict[str, set[tuple[str, str, str]]] = {}
    for annotation in annotations:
        if annotation.formula is not None:
            found.setdefault(annotation.formula.text, set()).update(angles_claimed(annotation))
    return found


def write_html(reviewed: list[ReviewedFile], out: TextIO, title: str = "notelsp review") -> None:
    """The whole page for ``reviewed``; species are drawn once each, in order of first mention."""
    annotations_total = 0
    severities: Counter[str] = Counter()
    rules: Counter[str] = Counter()
    species: dict[str, Any] = {}
    mentioned: dict[str, set[tuple[str, str, str]]] = {}
    sections = []
    for item in reviewed:
        review = item.review
        annotations = review.annotations
        annotations_total += len(annotations)
        for annotation in annotations:
            for formula, analysis in zip(annotation.formulas, review.analyses_of(annotation)):
                species.setdefault(formula.text, analysis)
        for key, angles in _mentioned_angles(annotations).items():
            mentioned.setdefault(key, set()).update(angles)
        rows = []
        for finding in review.findings:
            severities[finding.severity.value] += 1
            rules[finding.code] += 1
            line, column, _, _ = item.location(finding.span)
            holder = review.annotation_at(finding.span.start)
            written = review.text[holder.span.start:holder.span.end] if holder is not None else ""
            rows.append(f'<tr><td>{line}:{column}</td><td class="sev-{finding.severity.value}">{finding.severity.value}'
                        f'</td><td><code>{escape(finding.code)}</code></td><td>{escape(finding.message)}</td>'
                        f'<td><code>{escape(written)}</code></td></tr>')
        table = ("<table><tr><th>line:col</th><th>severity</th><th>rule</th><th>message</th><th>annotation</th></tr>"
                 + "".join(rows) + "</table>") if rows else "<p>No findings.</p>"
        sections.append(f"<h3>{escape(item.shown_path)}</h3><p>{len(annotations)} annotations, "
                        f"{len(review.findings)} findings.</p>{table}")
    summary = (f"<table><tr><th>files</th><td>{len(reviewed)}</td></tr><tr><th>annotations</th><td>{annotations_total}</td></tr>"
               + "".join(f"<tr><th>{s.value}</th><td>{severities.get(s.value, 0)}</td></tr>" for s in SEVERITY_ORDER)
               + "</table>")
    by_rule = ("<p>By rule: " + ", ".join(f"<code>{escape(code)}</code> {count}" for code, count in rules.most_common())
               + "</p>") if rules else ""
    figures = []
    for number, (text, analysis) in enumerate(species.items()):
        models = models_of(analysis, tuple(sorted(mentioned.get(text, ()))))
        if not models:
            reason = analysis.outside_model if analysis is not None and analysis.outside_model else \
                "no fixed arrangement of sites to draw"
            figures.append(f'<h3>{escape(text)}</h3><p>Not drawn: {escape(str(reason))}.</p>')
            continue
        drawn = "".join(
            f'<figure>{svg(model, element_id=f"m{number}-{index}")}<figcaption>{escape(model.caption)}'
            f'<br><span class="alt">{escape(model.description)}</span></figcaption></figure>'
            for index, model in enumerate(models))
        figures.append(f'<h3>{escape(text)}</h3><div class="species">{drawn}</div>')
    legend = ('<p class="legend">' + "".join(
        f'<span><span class="swatch" style="background:{fill}"></span>{symbol}</span>' for symbol, (fill, _) in PALETTE.items())
        + f'<span><span class="swatch" style="background:{OTHER_ELEMENT[0]}"></span>other elements</span>'
        f'<span><span class="swatch" style="background:{LONE_PAIR_FILL};border-style:dashed"></span>lone pair</span></p>')
    out.write(
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        f"<title>{escape(title)}</title><meta name=\"generator\" content=\"notelsp {__version__}\">"
        f"<style>{STYLE}</style></head><body>"
        f"<h1>{escape(title)}</h1><p class=\"caution\" role=\"note\">{escape(CAUTION)}</p>"
        f"<h2>Summary</h2>{summary}{by_rule}<h2>Notes</h2>{''.join(sections)}"
        "<h2>Species</h2><p>Each drawing is the predicted arrangement of the species' central atom on its ideal "
        "polyhedron (bond lengths from covalent radii): the expected isomer first, the others beside it. "
        "Atoms carry their symbol; sites are marked ax (axial), eq (equatorial), ap (apical), bas (basal); an angle "
        "a claim names is drawn with its ideal value. <span class=\"noprint\">Drag a drawing, or focus it and use the "
        f"arrow keys, to turn it.</span></p>{legend}{''.join(figures)}"
        f"<script>{_script()}</script></body></html>\n")
