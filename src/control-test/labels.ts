/**
 * The words for the codes the workpaper stores (causes, intent, pattern, severity, follow-up
 * kinds), in one place. The interview, the demo and the fieldwork sheet use them as they are; the
 * memo uses them unless a firm's memo template gives its own wording.
 */
import type { Cause, FollowUpKind, Severity } from '../workpaper/schema.js';

export const CAUSE_LABELS: Record<Cause, string> = {
  'not-performed': 'Control not performed',
  'performed-late': 'Performed late',
  'wrong-performer': 'Wrong or unauthorised performer',
  'evidence-missing': 'Evidence missing',
  system: 'System or configuration',
  other: 'Other',
};

export const INTENT_LABELS = { no: 'No', suspected: 'Suspected', yes: 'Yes' } as const;

export const PATTERN_LABELS = { isolated: 'Isolated', systemic: 'Systemic', unclear: 'Unclear' } as const;

export const SEVERITY_LABELS: Record<Severity, string> = {
  none: 'No deficiency',
  deficiency: 'Deficiency',
  'significant-deficiency': 'Significant deficiency',
  'material-weakness': 'Material weakness',
};

export const FOLLOW_UP_LABELS: Record<FollowUpKind, string> = {
  'extend-sample': 'Extend the sample',
  'test-compensating-control': 'Test a compensating control',
  'reduce-reliance': 'Reduce reliance, expand substantive work',
  communicate: 'Communicate',
  'assess-severity': 'Assess severity',
  other: 'Other',
};
