/** API calls of the measured-CO2 islands: upload with progress, map sensors, commit, delete, analysis, calibration. */
import type { AnalysisRunView } from '../server/monitor-logs/analysis.service';
import type { CalibrationVersion } from '../server/monitor-logs/calibration.service';
import type { LogOutcome } from '../server/monitor-logs/import.service';
import type { LogView } from '../server/monitor-logs/logs.repository';
import { apiFetch, uploadWithProgress } from './api';

export type { AnalysisRunView, CalibrationVersion, LogOutcome, LogView };

/**
 * Uploads a log file as the request body (streamed by the server as it arrives, so the bar follows both the
 * upload and the reading); resolves to the preview.
 */
export function uploadLog(
  file: File,
  options: { timeBasis: string; schoolId: string },
  onProgress: (fraction: number) => void,
): Promise<LogView> {
  const params = new URLSearchParams({ fileName: file.name, timeBasis: options.timeBasis });
  if (options.schoolId) params.set('schoolId', options.schoolId);
  return uploadWithProgress<LogView>(`/api/monitor-logs?${params.toString()}`, file, onProgress, {
    'content-type': 'application/octet-stream',
  });
}

/** Chooses rooms for sensors (null leaves a sensor out). */
export const mapSensors = (logId: string, sensors: { sensorId: string; roomId: string | null }[]) =>
  apiFetch<{ log: LogView }>(`/api/monitor-logs/${logId}/sensors`, { method: 'PATCH', body: { sensors } });

/** Commits or cancels a previewed log. */
export const commitLog = (logId: string, action: 'commit' | 'cancel') =>
  apiFetch<{ outcome: LogOutcome; analysisRunId: string | null }>(`/api/monitor-logs/${logId}/commit`, {
    method: 'POST',
    body: { action },
  });

/** Deletes a log's readings. */
export const deleteLog = (logId: string) =>
  apiFetch<{ analysisRunId: string | null }>(`/api/monitor-logs/${logId}`, { method: 'DELETE' });

/** The latest analysis run. */
export const latestAnalysis = () => apiFetch<{ run: AnalysisRunView | null }>('/api/monitor-logs/analysis');

/** Re-analyses every room with readings. */
export const reanalyse = () =>
  apiFetch<{ run: AnalysisRunView }>('/api/monitor-logs/analysis', { method: 'POST', body: {} });

/** Calibrates a room (a new version). */
export const calibrateRoom = (roomId: string) =>
  apiFetch<{ version: CalibrationVersion }>(`/api/rooms/${roomId}/calibration`, { method: 'POST' });

/** Reverts a room's calibration. */
export const revertCalibration = (roomId: string) =>
  apiFetch<void>(`/api/rooms/${roomId}/calibration`, { method: 'DELETE' });
