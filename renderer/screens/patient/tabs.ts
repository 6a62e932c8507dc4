import type { ComponentType } from 'react';
import { AlertsTab } from './AlertsTab';
import { BoardTab } from './BoardTab';
import { CourseTab } from './CourseTab';
import { DiagramTab } from './DiagramTab';
import { OverviewTab } from './OverviewTab';
import { RemnantTab } from './RemnantTab';
import { TracksTab } from './TracksTab';

/** The patient page's tabs, in order; each is one component reading the shared patient context. */
export const PATIENT_TABS: { id: string; label: string; Component: ComponentType }[] = [
  { id: 'overview', label: 'Visits', Component: OverviewTab },
  { id: 'course', label: 'Course', Component: CourseTab },
  { id: 'alerts', label: 'Alerts', Component: AlertsTab },
  { id: 'diagram', label: 'Diagram', Component: DiagramTab },
  { id: 'tracks', label: 'Tracks', Component: TracksTab },
  { id: 'remnant', label: 'Remnant', Component: RemnantTab },
  { id: 'board', label: 'Board summary', Component: BoardTab },
];
