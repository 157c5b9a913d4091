/** Entries: the read model, the shared filters, and the commands that change them. */
export { assertCurrent, createObservation, restoreObservation, retireObservation, updateObservation } from './commands';
export type { ObservationCreateInput, ObservationUpdateInput } from './commands';
export { getObservationDetail } from './detail';
export {
  cursorCodec,
  filtersFromQuery,
  observationFilters,
  offsetCursorSchema,
  timeCursorSchema,
  type ObservationFilters,
} from './filters';
export { findNumbersOf, getObservation, getObservationRow, hydrate, observationsByIds, tagsOf } from './hydrate';
export { listObservations } from './list';
export { namesOf, toObservation, type Actor, type ObservationRow } from './map';
export { listRevisions, recordChange } from './revisions';
export { stampValues } from './stamp';
