import type { ComponentType } from 'react';
import { OverviewTab } from './OverviewTab';
import { RemnantTab } from './RemnantTab';

/** The patient page's tabs, in order; each is one component reading the shared patient context. */
export const PATIENT_TABS: { id: string; label: string; Component: ComponentType }[] = [
  { id: 'overview', label: 'Visits', Component: OverviewTab },
  { id: 'remnant', label: 'Remnant', Component: RemnantTab },
];
