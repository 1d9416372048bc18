/**
 * Runs every seeder of this folder (`NNNN-<name>.ts`, each exporting `seed(transaction): Promise<string>`)
 * in name order inside one transaction. Numbering follows the migrations: 0001–0099 foundation,
 * 0100–0199 sessions, clips and flights. Every seeder must be idempotent.
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Transaction } from 'sequelize';
import { withTransaction } from '../db';

export type Seeder = (transaction: Transaction) => Promise<string>;

const SEEDERS_DIR = fileURLToPath(new URL('./', import.meta.url));

export async function runSeeders(): Promise<string[]> {
  const files = readdirSync(SEEDERS_DIR)
    .filter((file) => /^\d{4}-[a-z0-9-]+\.ts$/.test(file))
    .sort();
  const modules = await Promise.all(files.map(async (file) => (await import(pathToFileURL(join(SEEDERS_DIR, file)).href)) as { seed: Seeder }));
  return withTransaction(async (transaction) => {
    const results: string[] = [];
    for (const [i, mod] of modules.entries()) results.push(`${files[i].replace(/\.ts$/, '')}: ${await mod.seed(transaction)}`);
    return results;
  });
}
