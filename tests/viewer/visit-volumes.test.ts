import { describe, expect, it } from 'vitest';
import { VISIT_VOLUME_PARTS, type VisitOverlays, type VisitScan, type VisitVolumes } from '../../renderer/viewer/volume-messages.js';

const scanOf = (visitId: string): VisitScan => ({
  patientId: 'P1',
  visitId,
  dims: [2, 2, 1],
  affine: [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1],
  inverse: [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1],
  spacingMm: [1, 1, 1],
  scan: new Int16Array([-1000, 40, 60, 200]),
  slope: 1,
  inter: 0,
  values: { min: -1000, max: 200, auto: { centre: 50, width: 100 }, looksLikeCt: true },
  warnings: ['scan: qform and sform disagree'],
});

const overlays: VisitOverlays = {
  segments: { codes: new Uint8Array([0, 5, 5, 8]), splitIV: false, source: 'imported' },
  segmentProblem: null,
  lesions: { labels: new Uint8Array([0, 0, 1, 0]), ids: ['L1'] },
  viable: null,
  proposal: null,
  liverBoxMm: null,
  warnings: ['segments: 3 voxels outside the liver'],
};

describe('the viewer\'s volumes arriving scan first', () => {
  it('shows another visit\'s scan at once, with no overlays yet and marked as pending', () => {
    const first = scanOf('v2');
    const shown = VISIT_VOLUME_PARTS.early(first, null)!;
    expect(shown.scan).toBe(first.scan);
    expect(shown.segments).toBeNull();
    expect(shown.lesions).toBeNull();
    expect(shown.segmentProblem).toBeNull();
    expect(shown.viable).toBeNull();
    expect(shown.proposal).toBeNull();
    expect(shown.overlaysPending).toBe(true);
    const other = VISIT_VOLUME_PARTS.whole(scanOf('v1'), overlays);
    expect(VISIT_VOLUME_PARTS.early(first, other)?.visitId).toBe('v2');
  });

  it('keeps the visit on screen, overlays included, while that visit is reloaded', () => {
    const onScreen: VisitVolumes = VISIT_VOLUME_PARTS.whole(scanOf('v1'), overlays);
    expect(VISIT_VOLUME_PARTS.early(scanOf('v1'), onScreen)).toBeNull();
  });

  it('joins the scan and its overlays without copying either, warnings in order', () => {
    const first = scanOf('v1');
    const whole = VISIT_VOLUME_PARTS.whole(first, overlays);
    expect(whole.scan).toBe(first.scan);
    expect(whole.segments?.codes).toBe(overlays.segments!.codes);
    expect(whole.lesions?.labels).toBe(overlays.lesions!.labels);
    expect(whole.warnings).toEqual(['scan: qform and sform disagree', 'segments: 3 voxels outside the liver']);
    expect(whole.overlaysPending).toBe(false);
  });
});
