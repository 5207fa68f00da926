/**
 * The temporary folders of register uploads: one per upload being read, and one per spare reader's warm-up
 * (parse-in-worker.ts). A server stopped mid-read leaves its folder behind; the sweep removes such folders when the
 * server starts and whenever a spare reader starts.
 */
import { readdir, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** The prefixes of the temporary folders of an upload being read and of a spare's warm-up. */
export const UPLOAD_FOLDER = 'airtally-import-';
export const WARM_UP_FOLDER = 'airtally-warm-up-';
/** Age past which such a folder belongs to no read in progress (a read is stopped after two minutes). */
export const STALE_FOLDER_MS = 60 * 60 * 1000;

/**
 * Removes the temporary folders a server left when it was stopped while reading an upload or warming up a spare: theirs
 * is the only code that removes them. Only folders older than STALE_FOLDER_MS, so those of another server on this host
 * that is still reading are left alone.
 */
export async function sweepStaleFolders(): Promise<void> {
  const dir = tmpdir();
  const names = (await readdir(dir)).filter((n) => n.startsWith(UPLOAD_FOLDER) || n.startsWith(WARM_UP_FOLDER));
  for (const name of names) {
    const path = join(dir, name);
    const info = await stat(path).catch(() => null);
    if (info?.isDirectory() && Date.now() - info.mtimeMs > STALE_FOLDER_MS)
      await rm(path, { recursive: true, force: true }).catch(() => undefined);
  }
}
