import { describe, expect, it } from 'vitest';

import { CELL_GAP, ROW_PADDING, TITLE_MIN_WIDTH, fitColumns, logColumns, tableWidth } from '@/components/dives/log-columns';

const usual = logColumns.filter((c) => !c.optional);

describe('the log table’s columns', () => {
  it('adds up fixed widths, the title’s least width, the gaps and the row padding', () => {
    const fixed = usual.filter((c) => c.width).reduce((sum, c) => sum + c.width!, 0);
    expect(tableWidth(usual)).toBe(fixed + TITLE_MIN_WIDTH + CELL_GAP * (usual.length - 1) + ROW_PADDING * 2);
  });

  it('leaves optional columns out, last first, until the rest fit, and gives up below the usual ones', () => {
    const all = logColumns;
    expect(fitColumns(all, tableWidth(all))).toEqual(all);
    const withoutFind = all.filter((c) => c.id !== 'find');
    expect(fitColumns(all, tableWidth(all) - 1)).toEqual(withoutFind);
    expect(fitColumns(all, tableWidth(usual))).toEqual(usual);
    expect(fitColumns(all, tableWidth(usual) - 1)).toBeNull();
  });
});
