/**
 * How a campaign's data is published: the licence and how positions appear in public files. Kept
 * apart from the export schemas so the campaign schema can use them without an import cycle.
 */

/** Licences a lead may publish the campaign's data under (Creative Commons identifiers as SPDX spells them). */
export const exportLicences = ['CC0-1.0', 'CC-BY-4.0', 'CC-BY-NC-4.0'] as const;
export type ExportLicence = (typeof exportLicences)[number];

/**
 * How positions appear in the exports meant for the public (Darwin Core Archive, GeoJSON):
 * exact, rounded to a 0.01° or 0.1° grid, or left out. The find register always carries exact
 * positions: it goes to the heritage authority, not to the public.
 */
export const publicPositionModes = ['exact', 'grid-0.01', 'grid-0.1', 'withheld'] as const;
export type PublicPositionMode = (typeof publicPositionModes)[number];
