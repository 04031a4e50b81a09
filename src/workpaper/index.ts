export * from './schema.js';
export { newWorkpaper, loadWorkpaper, saveWorkpaper, parseWorkpaper, writeFileAtomic, WORKPAPER_SUFFIX } from './file.js';
export type { SaveMeta } from './file.js';
export { verifyLog, replay, diff, canonicalJson, stateHash, sha256, formatPath } from './log.js';
export type { IntegrityProblem } from './log.js';
