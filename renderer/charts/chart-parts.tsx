import type { ReactNode } from 'react';
import { ReferenceLine, Scatter } from 'recharts';
import { isoDate, type TreatmentMarker } from './chart-data';
import { OUTLINE_INK } from './segment-style';

/** Pieces every course chart shares: the time axis, value-axis labels, treatment lines, the frame. */

export const INK = '#1d2327';
export const MUTED = '#5b6770';
export const GRID = '#e3e6e2';
export const TREATMENT_INK = '#6a5d7b';

export const CHART_MARGIN = { top: 24, right: 28, bottom: 30, left: 18 };

/** Props for a numeric time axis whose ticks are the visit dates, written as ISO dates. */
export function timeAxisProps(domain: [number, number], ticks: number[]) {
  return {
    type: 'number' as const,
    dataKey: 't',
    scale: 'time' as const,
    domain,
    ticks,
    allowDataOverflow: true,
    tickFormatter: (t: number) => isoDate(t),
    tick: { fontSize: 11, fill: MUTED },
    stroke: MUTED,
    label: { value: 'Visit date (YYYY-MM-DD)', position: 'insideBottom' as const, offset: -18, fontSize: 11, fill: MUTED },
  };
}

/** A value axis's label, written along the axis with its unit. */
export function valueAxisLabel(text: string) {
  return { value: text, angle: -90, position: 'insideLeft' as const, offset: 4, style: { textAnchor: 'middle' as const }, fontSize: 11, fill: MUTED };
}

const TREATMENT_WORDS: Record<string, string> = {
  'therapy-start': 'therapy start',
  'therapy-end': 'therapy end',
  ablation: 'ablation',
  resection: 'resection',
  embolisation: 'embolisation',
  other: 'treatment',
};

export function treatmentWord(kind: string): string {
  return TREATMENT_WORDS[kind] ?? kind;
}

/**
 * Treatment events as vertical lines. Returned as elements (not a component) so the chart sees them
 * as its own children.
 */
export function treatmentLines(markers: readonly TreatmentMarker[]): ReactNode[] {
  return markers.map((m, n) => (
    <ReferenceLine
      key={`treatment-${n}`}
      x={m.t}
      stroke={TREATMENT_INK}
      strokeDasharray="2 3"
      strokeWidth={1.5}
      ifOverflow="hidden"
      className="treatment-line"
      label={{ value: `▾ ${m.label}`, position: 'insideTopLeft', fontSize: 10, fill: TREATMENT_INK, offset: 4 }}
    />
  ));
}

/** One chart with its title, a line on how to read it, and the exact values beneath. */
export function ChartFrame(props: { id: string; title: string; note?: ReactNode; legend?: ReactNode; values: ReactNode; children: ReactNode }) {
  return (
    <figure className="chart" data-testid={`chart-${props.id}`} aria-labelledby={`chart-${props.id}-title`}>
      <figcaption>
        <h4 id={`chart-${props.id}-title`}>{props.title}</h4>
        {props.note && <p className="chart-note">{props.note}</p>}
      </figcaption>
      {props.legend}
      <div className="chart-body">{props.children}</div>
      <details className="chart-values">
        <summary>Values</summary>
        {props.values}
      </details>
    </figure>
  );
}

/** Tooltip box content: a heading and label–value lines. */
export function TipBox({ title, lines }: { title: string; lines: [string, string][] }) {
  return (
    <div className="chart-tip">
      <p className="chart-tip-title">{title}</p>
      <dl>
        {lines.map(([k, v]) => (
          <div key={k}><dt>{k}</dt><dd>{v}</dd></div>
        ))}
      </dl>
    </div>
  );
}

export const fmtMm = (x: number | null | undefined) => (x === null || x === undefined ? '—' : `${x} mm`);
export const fmtMl = (x: number | null | undefined) => (x === null || x === undefined ? '—' : `${x} mL`);
export const fmtPct = (x: number | null | undefined) => (x === null || x === undefined ? '—' : `${x > 0 ? '+' : ''}${x}%`);

/** Recharts hands a tooltip the hovered points; the first one's data is what we show. */
export function hovered<T>(props: { active?: boolean; payload?: readonly { payload?: unknown }[] }): T | null {
  if (!props.active || !props.payload?.length) return null;
  return (props.payload[0].payload as T | undefined) ?? null;
}

/** A length measured on a visit (unrounded in the analysis), as the tables show it: one decimal. */
export const oneDecimal = (x: number | null | undefined) => (x === null || x === undefined ? '—' : x.toFixed(1));

const NoShape = () => <g />;

/**
 * A dark line under a light-coloured one, so a yellow series stays visible on white. Returned as an
 * element for the chart's own children; it has no points to hover and no tooltip.
 */
export function lineCasing(key: string, data: readonly object[], dataKey: string, widthPx: number) {
  return (
    <Scatter
      key={`casing-${key}`}
      data={[...data]}
      dataKey={dataKey}
      line={{ stroke: OUTLINE_INK, strokeWidth: widthPx + 1.6 }}
      shape={NoShape}
      tooltipType="none"
      legendType="none"
      isAnimationActive={false}
    />
  );
}
