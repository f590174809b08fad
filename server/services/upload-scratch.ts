import { readdir, rm } from 'node:fs/promises';
import path from 'node:path';

/** Folder of the data directory where uploaded scan logs (and their packed-chunk scratch files) wait while they are read. */
export const uploadsDir = (dataDir: string) => path.join(dataDir, 'uploads');

/**
 * Removes the uploaded logs and scratch files a stopped server left in the uploads folder;
 * returns how many files went. Call it at start, after the interrupted uploads were marked
 * failed and before serving: then no file there belongs to a log still being read.
 */
export async function removeLeftoverUploads(dataDir: string): Promise<number> {
  const dir = uploadsDir(dataDir);
  // A server killed mid-upload (SIGKILL, power loss) never reached its own clean-up, and the
  // folder would otherwise grow by a whole log each time.
  const names = await readdir(dir).catch((e: NodeJS.ErrnoException) => {
    if (e.code === 'ENOENT') return [] as string[];
    throw e;
  });
  for (const name of names) await rm(path.join(dir, name), { recursive: true, force: true });
  return names.length;
}
