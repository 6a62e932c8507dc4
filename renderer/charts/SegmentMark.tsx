import type { SVGProps } from 'react';
import type { SegmentName } from '../../src/segments/segment-map';

export type MarkShape = 'circle' | 'square' | 'triangle' | 'diamond';

/**
 * A second cue beside colour: each segment's points have a shape of their own, so segments whose
 * colours are close for some readers (II orange, V yellow, VII vermillion) differ in shape too.
 */
const SHAPES: Record<SegmentName, MarkShape> = {
  I: 'circle', II: 'square', III: 'triangle', IV: 'diamond', IVa: 'diamond', IVb: 'diamond',
  V: 'circle', VI: 'square', VII: 'triangle', VIII: 'diamond',
};

export function segmentShape(segment: SegmentName | null): MarkShape {
  return segment === null ? 'circle' : SHAPES[segment];
}

/** A point drawn in its segment's shape, about the area of a circle of radius r. */
export function SegmentMark({ segment, cx, cy, r, ...rest }: { segment: SegmentName | null; cx: number; cy: number; r: number } & SVGProps<SVGElement>) {
  const shape = segmentShape(segment);
  // The centre travels with every shape, so a script reads a point's place the same way whatever its shape.
  const props = { ...rest, 'data-shape': shape, 'data-cx': cx, 'data-cy': cy } as Record<string, unknown>;
  if (shape === 'square') {
    const h = r * 0.9;
    return <rect x={cx - h} y={cy - h} width={2 * h} height={2 * h} {...props} />;
  }
  if (shape === 'triangle') {
    const h = r * 1.25;
    return <polygon points={`${cx},${cy - h} ${cx + h * 0.95},${cy + h * 0.7} ${cx - h * 0.95},${cy + h * 0.7}`} {...props} />;
  }
  if (shape === 'diamond') {
    const h = r * 1.25;
    return <polygon points={`${cx},${cy - h} ${cx + h},${cy} ${cx},${cy + h} ${cx - h},${cy}`} {...props} />;
  }
  return <circle cx={cx} cy={cy} r={r} {...props} />;
}
