/**
 * The spare preview worker's warm-up register (warm-up.ts) must go down the same road as a real upload, to its end: a
 * header found with every template column, each row read and planned as a room. A warm-up that stopped at the header
 * or rejected its rows would leave the worker's hot code cold.
 */
import { describe, expect, it } from 'vitest';
import { analyseUpload } from '~/lib/server/register/analyse';
import { REGISTER_COLUMNS } from '~/lib/server/register/columns';
import { WARM_UP_ESTATE, WARM_UP_ROWS, warmUpWorkbook } from '~/lib/server/register/warm-up';

describe('the preview worker warm-up register', () => {
  it('is read as a clean register: every template column mapped, every row planned as a new room', async () => {
    const analysis = await analyseUpload(await warmUpWorkbook(), 'xlsx', new Map(), {}, WARM_UP_ESTATE);
    expect(analysis.header.columns.map((c) => c.field)).toEqual(REGISTER_COLUMNS.map((c) => c.field));
    expect(analysis.summary).toMatchObject({
      rowsRead: WARM_UP_ROWS,
      rowsRejected: 0,
      roomsToCreate: WARM_UP_ROWS,
      schoolsToCreate: 5,
      blocksToCreate: 20,
      errors: 0,
    });
  });
});
