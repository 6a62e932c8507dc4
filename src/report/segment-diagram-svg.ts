import type { SegmentDiagram } from './board-summary.js';
import { diagramDrawing, type SvgAttrs, type SvgShape } from './diagram-drawing.js';
import { esc, n2 } from './html-escape.js';

/**
 * The segment diagram as an SVG string for the board summary: the app's Diagram tab draws the same
 * shapes (`diagram-drawing.ts`) with React. Every value is escaped, and there is no style attribute,
 * since the app shows the page with innerHTML under a CSP that forbids them.
 */

const attrs = (a: SvgAttrs) => Object.entries(a).map(([k, v]) => ` ${k}="${typeof v === 'number' ? n2(v) : esc(v)}"`).join('');
const shape = (s: SvgShape) => (s.text === undefined ? `<${s.tag}${attrs(s.attrs)}/>` : `<${s.tag}${attrs(s.attrs)}>${esc(s.text)}</${s.tag}>`);

export function segmentDiagramSvg(d: SegmentDiagram): string {
  const drawing = diagramDrawing({
    segments: d.segments,
    lesions: d.lesions,
    label: `Segment diagram of visit ${d.visit} (${d.date}) with its lesions`,
  });
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" class="segment-diagram" viewBox="${drawing.viewBox}" role="img" aria-label="${esc(drawing.label)}">` +
    drawing.base.map(shape).join('') +
    drawing.lesions.map((m) => `<g${attrs(m.attrs)}><title>${esc(m.title)}</title>${m.shapes.map(shape).join('')}</g>`).join('') +
    drawing.lesions.map((m) => shape(m.label)).join('') +
    `</svg>`
  );
}
