/**
 * The local folders every storage keeps under its local root, whatever holds the objects: work folders
 * (`.work/<purpose>-XXXXXX`, removed by their user) and the uploads received in parts (`.partial-uploads`).
 */
import { mkdir, mkdtemp } from 'node:fs/promises';
import { join } from 'node:path';

/** `<root>/.work`, the folder holding every work folder (swept of folders a killed process left). */
export function workFolderRoot(root: string): string {
  return join(root, '.work');
}

/** A fresh private folder under `<root>/.work`. */
export async function makeWorkDir(root: string, purpose: string): Promise<string> {
  const base = workFolderRoot(root);
  await mkdir(base, { recursive: true });
  return mkdtemp(join(base, `${purpose.replace(/[^a-z0-9-]/gi, '-')}-`));
}

/** `<root>/.partial-uploads`, created when missing. */
export async function partialUploadsFolder(root: string): Promise<string> {
  const dir = join(root, '.partial-uploads');
  await mkdir(dir, { recursive: true });
  return dir;
}
