/**
 * The substrate classes a new campaign's vocabulary starts from: the Substrate Component of the
 * Coastal and Marine Ecological Classification Standard, FGDC-STD-018-2012 (Federal Geographic Data
 * Committee, 2012; a public-domain US federal standard), at the level of its substrate classes,
 * grouped by substrate origin. The names and the catalogue's unit numbers were checked against
 * the CMECS catalogue's unit pages (cmecscatalog.org/cmecs/classification/unit/<n>.html). Its
 * anthropogenic classes matter on a wreck: the hull's metal and wood are what lives on it sits on.
 */
import type { SubstrateOrigin } from './schemas/taxa';

/** `unit`: the catalogue's unit number where its own page was read; null where only its parent's page names it. */
export type StandardSubstrate = { name: string; origin: SubstrateOrigin; unit: number | null };

export const standardSubstrates: readonly StandardSubstrate[] = [
  { name: 'Rock Substrate', origin: 'geologic', unit: 26 },
  { name: 'Unconsolidated Mineral Substrate', origin: 'geologic', unit: 29 },
  { name: 'Algal Substrate', origin: 'biogenic', unit: 302 },
  { name: 'Coral Substrate', origin: 'biogenic', unit: 303 },
  { name: 'Organic Substrate', origin: 'biogenic', unit: 304 },
  { name: 'Shell Substrate', origin: 'biogenic', unit: 306 },
  { name: 'Worm Substrate', origin: 'biogenic', unit: 307 },
  { name: 'Anthropogenic Rock', origin: 'anthropogenic', unit: 363 },
  { name: 'Construction Materials', origin: 'anthropogenic', unit: 365 },
  { name: 'Metal', origin: 'anthropogenic', unit: 366 },
  { name: 'Anthropogenic Wood', origin: 'anthropogenic', unit: null },
];

/** Where the list comes from, for the screen that shows it. */
export const substrateStandard = 'CMECS, FGDC-STD-018-2012';
