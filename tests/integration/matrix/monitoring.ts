import { signedIn, writers, type MatrixEntry } from './types';

// An id that exists nowhere, so write entries change nothing.
const NOBODY = '00000000-0000-4000-8000-000000000000';

/**
 * Measured CO2: everyone signed in sees logs, analyses, comparisons and calibrations; only estates managers
 * and trust admins import, map, commit, delete, re-analyse and calibrate. Write bodies are invalid or aim at
 * unknown ids; the school-limited member's view is covered in monitor-logs-api.test.ts.
 */
export const entries: MatrixEntry[] = [
  { file: 'monitor-logs/index.ts', method: 'GET', path: '/api/monitor-logs', expect: signedIn(200) },
  {
    file: 'monitor-logs/index.ts',
    method: 'POST',
    path: '/api/monitor-logs',
    body: '',
    expect: writers(400),
    note: 'no fileName: refused after the permission check',
  },
  { file: 'monitor-logs/[id]/index.ts', method: 'GET', path: `/api/monitor-logs/${NOBODY}`, expect: signedIn(404) },
  { file: 'monitor-logs/[id]/index.ts', method: 'DELETE', path: `/api/monitor-logs/${NOBODY}`, expect: writers(404) },
  {
    file: 'monitor-logs/[id]/sensors.ts',
    method: 'PATCH',
    path: `/api/monitor-logs/${NOBODY}/sensors`,
    body: { sensors: [{ sensorId: NOBODY, roomId: null }] },
    expect: writers(404),
  },
  {
    file: 'monitor-logs/[id]/commit.ts',
    method: 'POST',
    path: `/api/monitor-logs/${NOBODY}/commit`,
    body: { action: 'cancel' },
    expect: writers(404),
  },
  { file: 'monitor-logs/analysis.ts', method: 'GET', path: '/api/monitor-logs/analysis', expect: signedIn(200) },
  {
    file: 'monitor-logs/analysis.ts',
    method: 'POST',
    path: '/api/monitor-logs/analysis',
    body: { unexpected: true },
    expect: writers(400),
    note: 'an unknown field: refused after the permission check, nothing queued',
  },
  {
    file: 'measured/rooms/[id].ts',
    method: 'GET',
    path: (c) => `/api/measured/rooms/${c.demoRoomId}`,
    expect: { ...signedIn(200), other_trust: 404, school_limited: 404 },
    note: 'another trust, and a member limited to another school, get 404',
  },
  { file: 'measured/comparison.ts', method: 'GET', path: '/api/measured/comparison', expect: signedIn(200) },
  {
    file: 'rooms/[id]/calibration.ts',
    method: 'GET',
    path: (c) => `/api/rooms/${c.demoRoomId}/calibration`,
    expect: { ...signedIn(200), other_trust: 404, school_limited: 404 },
  },
  {
    file: 'rooms/[id]/calibration.ts',
    method: 'POST',
    path: `/api/rooms/${NOBODY}/calibration`,
    expect: writers(404),
  },
  {
    file: 'rooms/[id]/calibration.ts',
    method: 'DELETE',
    path: `/api/rooms/${NOBODY}/calibration`,
    expect: writers(404),
  },
];
