/** Selection: seeded random, systematic with random starts, spares, haphazard record, fieldwork sheet. */
export {
  selectRandom,
  selectSystematic,
  redraw,
  algorithmId,
  RANDOM_V1,
  SYSTEMATIC_V1,
  HAPHAZARD_V1,
  ALGORITHM_IDS,
} from './select.js';
export { recordHaphazard, HAPHAZARD_NOTE } from './haphazard.js';
export type { HaphazardInput, HaphazardRecord } from './haphazard.js';
export { Draws, drawSeed, normaliseSeed, partialShuffle, GENERATOR } from './draws.js';
export {
  writeFieldworkSheet,
  fieldworkItems,
  fieldworkCsv,
  fieldworkTable,
  roleText,
  neutraliseCell,
  restoreCell,
  writeAtomic,
  SEQ_COLUMN,
  ROLE_COLUMN,
  ROW_COLUMN,
  KEY_COLUMN,
  NOTE_COLUMN,
  FIELDWORK_SHEET,
  INSTRUCTIONS_SHEET,
} from './fieldwork.js';
export type { FieldworkItem, FieldworkSheet } from './fieldwork.js';
export type { Selection, RandomInput, SystematicInput, RecordedSelection } from './types.js';
export { stageOfDraw } from './stages.js';
