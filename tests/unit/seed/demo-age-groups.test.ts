/** The demo estate's pupils are of the age their school or phase teaches (an all-through school has both). */
import { describe, expect, it } from 'vitest';
import { DEMO_SCHOOLS, demoRooms } from '../../../scripts/seed/demo-trust';

describe('demo age groups', () => {
  it('puts primary-age pupils in the all-through academy’s primary phase and secondary-age in its secondary phase', () => {
    const index = DEMO_SCHOOLS.findIndex((s) => s.phase === 'all_through');
    const school = DEMO_SCHOOLS[index]!;
    const rooms = demoRooms(school, index).filter((r) => r.pupils > 0);
    const ages = (block: string) => new Set(rooms.filter((r) => r.blockName === block).map((r) => r.ageGroup));
    expect(ages('Primary Phase')).toEqual(new Set(['primary']));
    expect(ages('Secondary Phase')).toEqual(new Set(['secondary']));
  });

  it('gives every primary school’s classrooms primary-age pupils', () => {
    for (const [index, school] of DEMO_SCHOOLS.entries()) {
      if (school.phase !== 'primary') continue;
      for (const room of demoRooms(school, index))
        if (room.use === 'classroom' && room.pupils > 0) expect(room.ageGroup).toBe('primary');
    }
  });
});
