/**
 * `npm run bench`: runs every benchmark module in scripts/bench/ and prints its figures.
 * Each module exports `run(): Promise<void>` and prints its own table; nothing here asserts a time.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const dir = join(dirname(fileURLToPath(import.meta.url)), 'bench');
const only = process.argv.slice(2);
for (const file of readdirSync(dir).filter((f) => f.endsWith('.ts')).sort()) {
  const name = file.replace(/\.ts$/, '');
  if (only.length > 0 && !only.includes(name)) continue;
  console.log(`\n== ${name} ==`);
  const mod = (await import(pathToFileURL(join(dir, file)).href)) as { run: () => Promise<void> };
  await mod.run();
}
