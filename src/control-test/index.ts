/**
 * The test of a control: the rules every part of tolrate follows, in one place. The worklist
 * (which items are tested, in which order), recording a result, the steps and which later
 * answers a changed answer invalidates, the evaluation and the reliance decision (the engine's
 * one comparison), the qualitative escalation, the proposed conclusion, the state of the
 * sign-offs, and the figures the memo prints. The interview, the commands, the demo, the memo
 * and re-performance call it and hold no rule of their own.
 */
export * from './evaluate.js';
export * from './conclude.js';
export * from './worklist.js';
export * from './steps.js';
export * from './labels.js';
export * from './state.js';
export * from './review.js';
export * from './evidence.js';
export * from './plan.js';
export * from './parts.js';
