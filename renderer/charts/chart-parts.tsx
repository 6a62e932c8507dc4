import type { ReactElement, ReactNode } from 'react';
import { CartesianGrid, ReferenceLine, Scatter, Tooltip, XAxis, YAxis } from 'recharts';
import type { ScatterShapeProps } from 'recharts/types/util/ScatterUtils';
import { INK } from '../../src/report/palette';
import { isoDate, type TreatmentMarker } from './chart-data';
import { OUTLINE_INK } from './segment-style';

/** Pieces every course chart shares: the time axis, value-axis labels, treatment lines, the frame. */

export { INK };
export const MUTED = '#5b6770';
export const GRID = '#e3e6e2';
export const TREATMENT_INK = '#6a5d7b';

export const CHART_MARGIN = { top: 24, right: 28, bottom: 30, left: 18 };

/** Props for a numeric time axis whose ticks are the visit dates, written as ISO dates. */
function timeAxisProps(domain: [number, number], ticks: number[]) {
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
function valueAxisLabel(text: string) {
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
function treatmentLines(markers: readonly TreatmentMarker[]): ReactNode[] {
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

/** The time axis every course chart shares: its extent, the visit dates as ticks, the treatments on it. */
export interface CourseTime {
  domain: [number, number];
  ticks: number[];
  treatments: TreatmentMarker[];
}

/**
 * What every course chart draws under its points: the grid, the visit-date axis, a value axis from 0
 * with its label, and the treatment lines. Elements, not a component, so the chart sees its own children.
 */
export function courseAxes(time: CourseTime, value: { dataKey: string; scale: { max: number; ticks: number[] }; label: string }): ReactNode[] {
  return [
    <CartesianGrid key="grid" stroke={GRID} />,
    <XAxis key="time" {...timeAxisProps(time.domain, time.ticks)} />,
    <YAxis
      key="value"
      type="number"
      dataKey={value.dataKey}
      domain={[0, value.scale.max]}
      ticks={value.scale.ticks}
      tick={{ fontSize: 11 }}
      label={valueAxisLabel(value.label)}
      width={62}
    />,
    ...treatmentLines(time.treatments),
  ];
}

/** A point's shape drawn from its data; nothing where the chart has not placed it. */
export function pointShape<T>(draw: (point: T, cx: number, cy: number) => ReactElement) {
  return function Point(props: ScatterShapeProps) {
    if (props.cx === undefined || props.cy === undefined) return <g />;
    return draw(props.payload as T, props.cx, props.cy);
  };
}

/** The tooltip of the hovered point (Recharts hands it every point under the pointer; the first is shown). */
export function pointTooltip<T>(tip: (point: T) => ReactNode) {
  return (
    <Tooltip
      cursor={false}
      isAnimationActive={false}
      content={(props) => {
        const p = props.active ? (props.payload?.[0]?.payload as T | undefined) : undefined;
        return p ? tip(p) : null;
      }}
    />
  );
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
