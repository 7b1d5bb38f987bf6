// The registry of job kinds the worker can run. Add a kind here and its payload schema in ../payloads.ts.
import type { JobKind } from '../types';
import { decomposeKind } from './decompose';
import { denoiseKind } from './denoise';
import { releaseKind } from './release';
import { notifyAssignmentsKind } from './notify-assignments';
import { notifyVotesCompleteKind } from './notify-votes-complete';
import { notifyOverdueKind } from './notify-overdue';
import { sendMailKind } from './send-mail';
import { scoreSuggestionsKind } from './score-suggestions';
import { trainSuggestionsKind } from './train-suggestions';
import { recalibrateKind } from './recalibrate';
import { agreementReportKind } from './agreement-report';

export const jobKinds: Readonly<Record<string, JobKind>> = {
  [decomposeKind.kind]: decomposeKind as unknown as JobKind,
  [denoiseKind.kind]: denoiseKind as unknown as JobKind,
  [releaseKind.kind]: releaseKind as unknown as JobKind,
  [notifyAssignmentsKind.kind]: notifyAssignmentsKind as unknown as JobKind,
  [notifyVotesCompleteKind.kind]: notifyVotesCompleteKind as unknown as JobKind,
  [notifyOverdueKind.kind]: notifyOverdueKind as unknown as JobKind,
  [sendMailKind.kind]: sendMailKind as unknown as JobKind,
  [trainSuggestionsKind.kind]: trainSuggestionsKind as unknown as JobKind,
  [scoreSuggestionsKind.kind]: scoreSuggestionsKind as unknown as JobKind,
  [recalibrateKind.kind]: recalibrateKind as unknown as JobKind,
  [agreementReportKind.kind]: agreementReportKind as unknown as JobKind,
};
