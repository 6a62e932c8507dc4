import { createElement, type ReactElement } from 'react';
import { diagramDrawing, type SvgAttrs, type SvgShape } from '../../src/report/diagram-drawing';
import type { PlacedLesion } from '../../src/report/diagram-placement';
import type { SegmentName } from '../../src/segments/segment-map';

/** React's names for SVG attributes: camelCase, except data-* and aria-*. */
function reactProps(attrs: SvgAttrs): Record<string, string | number> {
  const out: Record<string, string | number> = {};
  for (const [k, v] of Object.entries(attrs)) {
    const name = k === 'class' ? 'className' : /^(data|aria)-/.test(k) ? k : k.replace(/-([a-z])/g, (_, c: string) => c.toUpperCase());
    out[name] = v;
  }
  return out;
}

const draw = (s: SvgShape, key: string | number): ReactElement => createElement(s.tag, { key, ...reactProps(s.attrs) }, s.text);

/**
 * The segment diagram of one visit, drawn from the same shapes as the board summary's, so the screen
 * and the printed page show the same drawing. Each lesion carries its description as a tooltip.
 */
export function SegmentDiagram(props: { segments: readonly SegmentName[]; lesions: readonly PlacedLesion[]; caption: string }) {
  const d = diagramDrawing({ segments: props.segments, lesions: props.lesions, label: props.caption });
  return (
    <svg className="segment-diagram" viewBox={d.viewBox} role="img" aria-label={d.label} data-testid="segment-diagram">
      {d.base.map(draw)}
      {d.lesions.map((m) => (
        <g key={m.lesion.lesion} data-testid="diagram-lesion" {...reactProps(m.attrs)}>
          <title>{m.title}</title>
          {m.shapes.map(draw)}
        </g>
      ))}
      {d.lesions.map((m) => draw(m.label, `label-${m.lesion.lesion}`))}
    </svg>
  );
}
