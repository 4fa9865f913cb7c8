import { randomUUID } from 'node:crypto';
import { mkdir, rm, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { env } from '../env';

/** Files live under STORAGE_DIR, outside the web root, under names Kerfwise makes up. */
export function storagePath(folder: string, storedName: string): string {
  return path.resolve(env().STORAGE_DIR, folder, path.basename(storedName));
}

export async function storeFile(folder: string, extension: string, data: Buffer): Promise<string> {
  const storedName = `${randomUUID()}.${extension}`;
  await mkdir(path.resolve(env().STORAGE_DIR, folder), { recursive: true });
  await writeFile(storagePath(folder, storedName), data, { flag: 'wx' });
  return storedName;
}

export const removeStoredFile = (folder: string, storedName: string) => rm(storagePath(folder, storedName), { force: true });
