import { useCallback, useState } from 'react';

import { storage } from '@/hooks/storage';
import type { DiveLogFilters } from '@/hooks/observations';

type Sort = NonNullable<DiveLogFilters['sort']>;

export type ColumnId =
  | 'date'
  | 'time'
  | 'kind'
  | 'title'
  | 'depth'
  | 'author'
  | 'position'
  | 'temperature'
  | 'heading'
  | 'altitude'
  | 'count'
  | 'identification'
  | 'find';

export type Column = {
  id: ColumnId;
  label: string;
  /** Its full name in the column menu, where the header abbreviates. */
  name?: string;
  /** A fixed width by what the column holds (a date, a time, a name…); the title takes the rest. */
  width?: number;
  sort?: Sort;
  /** Shown only when the person picks it in the column menu. */
  optional?: boolean;
};

/** The table's columns in their order. Widths fit the longest usual value and the header with its sort arrow on one line. */
export const logColumns: readonly Column[] = [
  { id: 'date', label: 'Date', width: 92 },
  { id: 'time', label: 'Time (UTC)', width: 104, sort: 'time' },
  { id: 'kind', label: 'Kind', width: 96, sort: 'kind' },
  { id: 'title', label: 'Title' },
  { id: 'depth', label: 'Depth', width: 76, sort: 'depth' },
  { id: 'position', label: 'Position', width: 104, optional: true },
  { id: 'temperature', label: 'Temp.', name: 'Temperature', width: 76, optional: true },
  { id: 'heading', label: 'Hdg.', name: 'Heading', width: 64, optional: true },
  { id: 'altitude', label: 'Alt.', name: 'Altitude above the seabed', width: 72, optional: true },
  { id: 'count', label: 'Count', name: 'Count or cover', width: 80, optional: true },
  { id: 'identification', label: 'Identification', width: 168, optional: true },
  { id: 'find', label: 'Find no.', name: 'Find number', width: 88, optional: true },
  { id: 'author', label: 'Author', width: 120, sort: 'author' },
];

export const optionalColumns = logColumns.filter((c) => c.optional);

/** The title column never gets narrower than this: two lines of it still say what the entry is. */
export const TITLE_MIN_WIDTH = 200;
export const CELL_GAP = 8;
export const ROW_PADDING = 12;

/** The width the table needs to show these columns without squeezing any. */
export function tableWidth(columns: readonly Column[]): number {
  const fixed = columns.reduce((sum, c) => sum + (c.width ?? TITLE_MIN_WIDTH), 0);
  return fixed + CELL_GAP * (columns.length - 1) + ROW_PADDING * 2;
}

/**
 * The columns that fit in `width`: optional ones are left out, last first, until the rest fit;
 * null when even the usual columns do not (the log then shows cards).
 */
export function fitColumns(columns: readonly Column[], width: number): readonly Column[] | null {
  const fitted = [...columns];
  while (tableWidth(fitted) > width) {
    const i = fitted.findLastIndex((c) => c.optional);
    if (i < 0) return null;
    fitted.splice(i, 1);
  }
  return fitted;
}

const key = (userId: string | undefined) => `bathynote.log-columns.${userId ?? 'anyone'}`;

function readChosen(userId: string | undefined): ColumnId[] {
  try {
    const parsed: unknown = JSON.parse(storage.get(key(userId)) ?? '[]');
    return Array.isArray(parsed) ? optionalColumns.map((c) => c.id).filter((id) => parsed.includes(id)) : [];
  } catch {
    // A damaged preference is no reason to fail the log: it starts over with no optional columns.
    return [];
  }
}

/**
 * The optional columns a person has picked, remembered on this device for that person (a
 * control-room screen is shared by several people, each with their own choice).
 */
export function useLogColumns(userId: string | undefined) {
  const [state, setState] = useState<{ userId: string | undefined; chosen: ColumnId[] }>(() => ({ userId, chosen: readChosen(userId) }));
  // Someone else signed in on this screen: their own choice, read afresh.
  const chosen = state.userId === userId ? state.chosen : readChosen(userId);
  if (state.userId !== userId) setState({ userId, chosen });
  const toggle = useCallback(
    (id: ColumnId) => {
      const next = chosen.includes(id) ? chosen.filter((c) => c !== id) : [...chosen, id];
      storage.set(key(userId), JSON.stringify(next));
      setState({ userId, chosen: next });
    },
    [chosen, userId],
  );
  const columns = logColumns.filter((c) => !c.optional || chosen.includes(c.id));
  return { chosen, toggle, columns };
}
