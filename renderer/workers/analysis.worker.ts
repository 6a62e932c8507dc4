/// <reference lib="webworker" />
// Loads a stored patient and runs the core's visit analysis and follow-up off the window's thread.
import { analysePatient } from '../analysis/analyse-patient';
import type { AnalysisRequest } from '../analysis/types';
import { appDb } from '../store/db';
import { serveJob } from './job';

serveJob(({ patientId }: AnalysisRequest, progress) => analysePatient(appDb(), patientId, progress));
